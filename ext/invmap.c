/*
 * invmap.c — inverse of the saddle (or endpoint) map on a circle; see invmap.h.
 */
#include <float.h>
#include <math.h>
#include "invmap.h"

/* Newton for F0 - F(t0 + h) = target, from *h. Returns 0 on convergence; F'(t0+h) in *dF. */
static int solve(problem *p, cplx t0, cplx F0, cplx target, cplx *h, cplx *dF) {
  for (int it = 0; it < 40; it++) {
    cplx F;
    if (problem_dF(p, t0 + *h, &F, dF) != STEEP_OK || *dF == 0) return -1;
    cplx r = F0 - F - target;
    cplx step = r / *dF;   /* d/dh (F0 - F) = -F' : h <- h + r / F' */
    *h += step;
    if (!(isfinite(creal(*h)) && isfinite(cimag(*h)))) return -1;
    /* quadratic convergence: a step this small leaves an error near rounding; or the
     * residual is at the rounding level of F0 - F itself (small h: cancellation) */
    if (cabs(step) <= 1e-10 * (cabs(*h) + 1e-300) ||
        cabs(r) <= 8 * DBL_EPSILON * (cabs(F0) + cabs(F) + cabs(target))) {
      if (problem_dF(p, t0 + *h, &F, dF) != STEEP_OK || *dF == 0) return -1;
      *h += (F0 - F - target) / *dF;
      return 0;
    }
  }
  return -1;
}

/* The change of the continuous F from t0 + a to t0 + b: the integral of F' by 8-point
 * Gauss-Legendre (F' is single-valued across cuts of log). */
static cplx continuous_change(problem *p, cplx t0, cplx a, cplx b) {
  static const double x8[4] = {0.183434642495649805, 0.525532409916328986,
                               0.796666477413626740, 0.960289856497536232};
  static const double w8[4] = {0.362683783378361983, 0.313706645877887287,
                               0.222381034453374471, 0.101228536290376259};
  cplx mid = t0 + 0.5 * (a + b), half = 0.5 * (b - a), sum = 0, F, dF;
  for (int k = 0; k < 4; k++) {
    if (problem_dF(p, mid - half * x8[k], &F, &dF) == STEEP_OK) sum += w8[k] * dF;
    if (problem_dF(p, mid + half * x8[k], &F, &dF) == STEEP_OK) sum += w8[k] * dF;
  }
  return half * sum;
}

static cplx wpow(cplx w, int m) {
  cplx r = 1;
  for (int k = 0; k < m; k++) r *= w;
  return r;
}

/* The local map F0 - F(t0 + h) = P(w): P(w) = w^m at a saddle of order m (or m = 1 at an
 * endpoint), or P(u) = u^3/3 - zeta u for two saddles together (Chester, Friedman &
 * Ursell's cubic). */
typedef struct { int m; int cubic; cplx zeta; } mapspec;

static cplx mapP(const mapspec *ms, cplx w) {
  return ms->cubic ? w * w * w / 3.0 - ms->zeta * w : wpow(w, ms->m);
}

static cplx mapdP(const mapspec *ms, cplx w) {
  return ms->cubic ? w * w - ms->zeta : (double)ms->m * wpow(w, ms->m - 1);
}

/* Continues h from w0 (solved: value *h, F'(t0 + h) in *dF) to w1 in `steps` equal
 * steps along a segment (arc = 0) or an arc of |w| = rho (arc = 1). Each step starts
 * from the Euler predictor h + h'(w) dw and is accepted only if Newton lands near it
 * (so it cannot jump to another branch of the inverse); otherwise the stretch left is
 * redone with four times as many steps, to a bound. F is followed by continuity: where
 * the principal value jumps across a branch cut of a log inside F between two nearby
 * points (its change differs from F' dh by much more than the step's second-order
 * term), the jump is added to *off, and the equation solved is for F + off. Every step
 * spends one unit of *budget; none left is INVMAP_NEWTON. */
static int follow(problem *p, cplx t0, cplx F0, const mapspec *ms, cplx w0, cplx w1, cplx *h,
                  cplx *dF, cplx *off, int steps, int arc, double rho, long *budget) {
  double th0 = carg(w0), th1 = th0 + carg(w1 / w0);
  cplx wprev = w0;
  for (int k = 1; k <= steps; k++) {
    if (--*budget < 0) return INVMAP_NEWTON;
    double u = (double)k / steps;
    cplx w = arc ? rho * cexp(I * (th0 + u * (th1 - th0))) : w0 + u * (w1 - w0);
    cplx dh = -mapdP(ms, wprev) / *dF * (w - wprev);   /* h'(w) dw */
    cplx hn = *h + dh, dFn = *dF, Fa, Fb, d1;
    if (problem_dF(p, t0 + *h, &Fa, &d1) != STEEP_OK ||
        problem_dF(p, t0 + hn, &Fb, &dFn) != STEEP_OK)
      return INVMAP_SINGULAR;
    /* a large discrepancy is a branch jump only if it survives small steps (the
     * trapezoidal error of a long step near a singular point can be large too) */
    cplx jump = Fb - Fa - 0.5 * (d1 + dFn) * dh;
    cplx offn = *off;
    int big = cabs(jump) > fmax(0.5, 0.25 * cabs(0.5 * (d1 + dFn) * dh));
    /* a cut of log makes F jump by a purely imaginary amount (Re F is continuous): take
     * such a jump at once; anything else large is a step too long for the trapezoid */
    int pure = 0;
    if (big) {   /* measure the jump accurately: Gauss-Legendre instead of the trapezoid */
      jump = Fb - Fa - continuous_change(p, t0, *h, hn);
      big = cabs(jump) > 0.5;
      pure = fabs(creal(jump)) < 1e-8 * cabs(jump);
    }
    if (big && !pure && steps <= 16384) {
      return follow(p, t0, F0, ms, wprev, w1, h, dF, off, 4 * (steps - k + 1), arc, rho,
                    budget);
    }
    if (big) offn -= jump;
    int ok = solve(p, t0, F0 - offn, mapP(ms, w), &hn, &dFn) == 0 &&
             cabs(hn - (*h + dh)) <= 0.5 * cabs(dh) + 1e-14 * cabs(hn);
    if (!ok) {
      if (steps > 65536) return INVMAP_NEWTON;
      return follow(p, t0, F0, ms, wprev, w1, h, dF, off, 4 * (steps - k + 1), arc, rho,
                    budget);
    }
    *h = hn;
    *dF = dFn;
    *off = offn;
    wprev = w;
  }
  return INVMAP_OK;
}

/* Round the circle |w| = rho from a solved start (w0, h), writing G at the N points
 * rho e^{2 pi i j/N}: out along the ray through w0, round to angle 0, then the circle.
 * The trip takes about N + 80 continuation steps when h(w) is tame; refining by four at
 * each failure could otherwise cost millions of steps (of up to ~50 jets each) where h
 * is badly stretched or a branch point lies on the path, hence a bound on the total. */
#define STEP_BUDGET(N) (131072 + 16 * (long)(N))
static int circle(problem *p, cplx t0, cplx F0, const mapspec *ms, cplx w0, cplx h, cplx dF,
                  double rho, size_t N, cplx *G) {
  const double twopi = 6.283185307179586;
  cplx off = 0;
  long budget = STEP_BUDGET(N);
  cplx dir = cabs(w0) > 0 ? w0 / cabs(w0) : 1;
  int st = follow(p, t0, F0, ms, w0, rho * dir, &h, &dF, &off, 60, 0, rho, &budget);
  if (st != INVMAP_OK) return st;
  if (cabs(dir - 1) > 1e-15) {
    st = follow(p, t0, F0, ms, rho * dir, rho, &h, &dF, &off, 16, 1, rho, &budget);
    if (st != INVMAP_OK) return st;
  }
  cplx h0 = h;
  for (size_t j = 0; j < N; j++) {
    cplx wj = rho * cexp(I * (twopi * (double)j / (double)N));
    if (j > 0) {
      cplx wprev = rho * cexp(I * (twopi * (double)(j - 1) / (double)N));
      st = follow(p, t0, F0, ms, wprev, wj, &h, &dF, &off, 1, 1, rho, &budget);
      if (st != INVMAP_OK) return st;
    }
    cplx F;
    cplx g = 1;
    if (p->t->nout > 1) {
      (void)problem_integrand(p, t0 + h, &F);
      g = p->vals[1];
    }
    /* F0 - F(t0 + h(w)) = P(w)  =>  h'(w) = -P'(w) / F'(t0 + h) */
    G[j] = g * (-mapdP(ms, wj) / dF);
    if (!(isfinite(creal(G[j])) && isfinite(cimag(G[j])))) return INVMAP_SINGULAR;
  }
  /* once round: back where we started? */
  cplx wlast = rho * cexp(I * (twopi * (double)(N - 1) / (double)N));
  st = follow(p, t0, F0, ms, wlast, rho, &h, &dF, &off, 1, 1, rho, &budget);
  if (st != INVMAP_OK) return st;
  if (cabs(h - h0) > 1e-8 * (cabs(h0) + 1e-300)) return INVMAP_NOTCLOSED;
  return INVMAP_OK;
}

int invmap_circle(problem *p, cplx t0, cplx F0, int m, cplx s, double rho, size_t N,
                  cplx *G) {
  mapspec ms = {m, 0, 0};
  cplx dF = 0;
  double w = 0.05 * rho;   /* not smaller: F0 - F cancels to rounding near the saddle */
  cplx h = w / s;
  if (solve(p, t0, F0, mapP(&ms, w), &h, &dF) != 0) return INVMAP_NEWTON;
  return circle(p, t0, F0, &ms, w, h, dF, rho, N, G);
}

int invmap_cubic(problem *p, cplx t1, cplx A, cplx zeta, cplx ua, cplx tprime, double rho,
                 size_t N, cplx *G) {
  mapspec ms = {3, 1, zeta};
  cplx dF = 0;
  /* start a little way from u_a, outwards from 0 (or along +1 when u_a = 0), with the
   * linear guess t - t1 = t'(u_a) (u - u_a) */
  cplx dir = cabs(ua) > 0 ? ua / cabs(ua) : 1;
  double eps = 0.05 * rho;
  cplx w = ua + eps * dir;
  cplx h = tprime * (w - ua);
  if (solve(p, t1, A, mapP(&ms, w), &h, &dF) != 0) return INVMAP_NEWTON;
  return circle(p, t1, A, &ms, w, h, dF, rho, N, G);
}
