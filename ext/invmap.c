/*
 * invmap.c — inverse of the saddle (or endpoint) map on a circle; see invmap.h.
 */
#include <float.h>
#include <math.h>
#include "cdiv.h"
#include "invmap.h"

/* max(|Re z|, |Im z|): within a factor sqrt 2 of |z|, without hypot's care, for the
 * tolerance tests taken at every step */
static double maxnorm(cplx z) { return fmax(fabs(creal(z)), fabs(cimag(z))); }

/* A solved point of the map: h, with F and F' at t0 + h, and the offset added to the
 * principal F where a branch cut of a log inside it was crossed (F followed by
 * continuity is F + off). */
typedef struct { cplx h, F, dF, off; } mappoint;

/* Newton for F0 - F(t0 + h) = target from q->h, where q->F and q->dF already hold F and
 * F' there; on convergence (0) they hold F and F' at the solution (h'(w) = -P'(w)/F'
 * needs F' there to rounding, so the last, tiny step is evaluated too). */
static int solve(problem *p, cplx t0, cplx F0, cplx target, mappoint *q) {
  double prev = 0;
  for (int it = 0; it < 40; it++) {
    if (q->dF == 0) return -1;
    cplx r = F0 - q->F - target;
    cplx step = cdiv(r, q->dF);   /* d/dh (F0 - F) = -F' : h <- h + r / F' */
    q->h += step;
    if (!(isfinite(creal(q->h)) && isfinite(cimag(q->h)))) return -1;
    if (problem_dF(p, t0 + q->h, &q->F, &q->dF) != STEEP_OK) return -1;
    /* quadratic convergence: the error left after a step s is about C s^2, with
     * C ~ s / s_prev^2 from the last two steps; done when that is below rounding (or the
     * step itself is that small); or the residual was at the rounding level of F0 - F
     * itself (small h: cancellation) */
    double s = maxnorm(step), scale = maxnorm(q->h) + 1e-300;
    if (s <= 1e-10 * scale || (prev > 0 && s < 1e-3 * prev && s * s * s <= 1e-16 * scale * prev * prev) ||
        maxnorm(r) <= 8 * DBL_EPSILON * (maxnorm(F0) + maxnorm(q->F) + maxnorm(target)))
      return 0;
    prev = s;
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
 * endpoint), P(u) = u^3/3 - zeta u for two saddles together (Chester, Friedman &
 * Ursell's cubic), or P(u) = u^4/4 - zeta u^2/2 + eta u for three (the cusp). */
enum { MAP_POWER, MAP_CUBIC, MAP_QUARTIC };
typedef struct { int m; int kind; cplx zeta, eta; } mapspec;

static cplx mapP(const mapspec *ms, cplx w) {
  switch (ms->kind) {
  case MAP_CUBIC: return w * w * w / 3.0 - ms->zeta * w;
  case MAP_QUARTIC: return w * (w * (0.25 * w * w - 0.5 * ms->zeta) + ms->eta);
  default: return wpow(w, ms->m);
  }
}

static cplx mapdP(const mapspec *ms, cplx w) {
  switch (ms->kind) {
  case MAP_CUBIC: return w * w - ms->zeta;
  case MAP_QUARTIC: return w * (w * w - ms->zeta) + ms->eta;
  default: return (double)ms->m * wpow(w, ms->m - 1);
  }
}

/* Continues the solved point *q from w0 to w1 in `steps` equal steps along a segment
 * (arc = 0) or an arc of |w| = rho (arc = 1). Each step starts from the Euler predictor
 * h + h'(w) dw and is accepted only if Newton lands near it (so it cannot jump to
 * another branch of the inverse); otherwise the stretch left is redone with four times
 * as many steps, to a bound. F is followed by continuity: where the principal value
 * jumps across a branch cut of a log inside F between two nearby points (its change
 * differs from F' dh by much more than the step's second-order term), the jump is
 * added to q->off, and the equation solved is for F + off. Every step spends one unit
 * of *budget; none left is INVMAP_NEWTON. A step costs one evaluation of F and F' at
 * the predictor plus one per Newton iteration. */
static int follow(problem *p, cplx t0, cplx F0, const mapspec *ms, cplx w0, cplx w1,
                  mappoint *q, int steps, int arc, double rho, long *budget) {
  double th0 = 0, th1 = 0;
  if (arc && steps > 1) th0 = carg(w0), th1 = th0 + carg(w1 / w0);
  cplx wprev = w0;
  for (int k = 1; k <= steps; k++) {
    if (--*budget < 0) return INVMAP_NEWTON;
    double u = (double)k / steps;
    cplx w = k == steps ? w1 : arc ? rho * cexp(I * (th0 + u * (th1 - th0))) : w0 + u * (w1 - w0);
    cplx dh = -cdiv(mapdP(ms, wprev), q->dF) * (w - wprev);   /* h'(w) dw */
    mappoint n = {q->h + dh, 0, 0, q->off};
    if (problem_dF(p, t0 + n.h, &n.F, &n.dF) != STEEP_OK) return INVMAP_SINGULAR;
    /* a large discrepancy is a branch jump only if it survives small steps (the
     * trapezoidal error of a long step near a singular point can be large too) */
    cplx jump = n.F - q->F - 0.5 * (q->dF + n.dF) * dh;
    int big = maxnorm(jump) > fmax(0.5, 0.25 * maxnorm(0.5 * (q->dF + n.dF) * dh));
    /* a cut of log makes F jump by a purely imaginary amount (Re F is continuous): take
     * such a jump at once; anything else large is a step too long for the trapezoid */
    int pure = 0;
    if (big) {   /* measure the jump accurately: Gauss-Legendre instead of the trapezoid */
      jump = n.F - q->F - continuous_change(p, t0, q->h, n.h);
      big = cabs(jump) > 0.5;
      pure = fabs(creal(jump)) < 1e-8 * cabs(jump);
    }
    if (big && !pure && steps <= 16384)
      return follow(p, t0, F0, ms, wprev, w1, q, 4 * (steps - k + 1), arc, rho, budget);
    if (big) n.off -= jump;
    /* solve for the principal F: F0 - off - F = P(w) */
    int ok = solve(p, t0, F0 - n.off, mapP(ms, w), &n) == 0 &&
             maxnorm(n.h - (q->h + dh)) <= 0.5 * maxnorm(dh) + 1e-14 * maxnorm(n.h);
    if (!ok) {
      if (steps > 65536) return INVMAP_NEWTON;
      return follow(p, t0, F0, ms, wprev, w1, q, 4 * (steps - k + 1), arc, rho, budget);
    }
    *q = n;
    wprev = w;
  }
  return INVMAP_OK;
}

/* Round the circle |w| = rho from a solved start (w0, *q), writing G at the N points
 * rho e^{2 pi i j/N}: out along the ray through w0, round to angle 0, then the circle.
 * The trip takes about N + 80 continuation steps when h(w) is tame; refining by four at
 * each failure could otherwise cost millions of steps (of up to ~40 evaluations of F and
 * F' each) where h is badly stretched or a branch point lies on the path, hence a bound
 * on the total. */
#define STEP_BUDGET(N) (131072 + 16 * (long)(N))
static int circle(problem *p, cplx t0, cplx F0, const mapspec *ms, cplx w0, mappoint q,
                  double rho, size_t N, cplx *G) {
  const double twopi = 6.283185307179586;
  long budget = STEP_BUDGET(N);
  cplx dir = cabs(w0) > 0 ? w0 / cabs(w0) : 1;
  int st = follow(p, t0, F0, ms, w0, rho * dir, &q, 60, 0, rho, &budget);
  if (st != INVMAP_OK) return st;
  if (cabs(dir - 1) > 1e-15) {
    st = follow(p, t0, F0, ms, rho * dir, rho, &q, 16, 1, rho, &budget);
    if (st != INVMAP_OK) return st;
  }
  cplx h0 = q.h, wprev = rho;
  /* the amplitude at each point, unless it does not depend on t (then once) */
  const tape *tp = p->t;
  int g_varies = tp->nout > 1 && tp->varying[tp->out[1]];
  cplx g = 1, F;
  if (tp->nout > 1 && !g_varies) {
    (void)problem_integrand(p, t0 + q.h, &F);
    g = p->vals[1];
  }
  for (size_t j = 0; j < N; j++) {
    cplx wj = rho * cexp(I * (twopi * (double)j / (double)N));
    if (j > 0) {
      st = follow(p, t0, F0, ms, wprev, wj, &q, 1, 1, rho, &budget);
      if (st != INVMAP_OK) return st;
    }
    wprev = wj;
    if (g_varies) {
      (void)problem_integrand(p, t0 + q.h, &F);
      g = p->vals[1];
    }
    /* F0 - F(t0 + h(w)) = P(w)  =>  h'(w) = -P'(w) / F'(t0 + h) */
    G[j] = g * -cdiv(mapdP(ms, wj), q.dF);
    if (!(isfinite(creal(G[j])) && isfinite(cimag(G[j])))) return INVMAP_SINGULAR;
  }
  /* once round: back where we started? */
  st = follow(p, t0, F0, ms, wprev, rho, &q, 1, 1, rho, &budget);
  if (st != INVMAP_OK) return st;
  if (cabs(q.h - h0) > 1e-8 * (cabs(h0) + 1e-300)) return INVMAP_NOTCLOSED;
  return INVMAP_OK;
}

/* The first solved point, at w from the guess h (off = 0). */
static int start(problem *p, cplx t0, cplx F0, const mapspec *ms, cplx w, cplx h, mappoint *q) {
  q->h = h;
  q->off = 0;
  if (problem_dF(p, t0 + h, &q->F, &q->dF) != STEEP_OK) return -1;
  return solve(p, t0, F0, mapP(ms, w), q);
}

int invmap_circle(problem *p, cplx t0, cplx F0, int m, cplx s, double rho, size_t N,
                  cplx *G) {
  mapspec ms = {m, MAP_POWER, 0, 0};
  mappoint q;
  double w = 0.05 * rho;   /* not smaller: F0 - F cancels to rounding near the saddle */
  if (start(p, t0, F0, &ms, w, w / s, &q) != 0) return INVMAP_NEWTON;
  return circle(p, t0, F0, &ms, w, q, rho, N, G);
}

/* Both models: start a little way from u_a, outwards from 0 (or along +1 when u_a = 0),
 * with the linear guess t - t1 = t'(u_a) (u - u_a), then round the circle. */
static int model_circle(problem *p, cplx t1, cplx A, const mapspec *ms, cplx ua, cplx tprime,
                        double rho, size_t N, cplx *G) {
  mappoint q;
  cplx dir = cabs(ua) > 0 ? ua / cabs(ua) : 1;
  double eps = 0.05 * rho;
  cplx w = ua + eps * dir;
  if (start(p, t1, A, ms, w, tprime * (w - ua), &q) != 0) return INVMAP_NEWTON;
  return circle(p, t1, A, ms, w, q, rho, N, G);
}

int invmap_cubic(problem *p, cplx t1, cplx A, cplx zeta, cplx ua, cplx tprime, double rho,
                 size_t N, cplx *G) {
  mapspec ms = {3, MAP_CUBIC, zeta, 0};
  return model_circle(p, t1, A, &ms, ua, tprime, rho, N, G);
}

int invmap_quartic(problem *p, cplx t1, cplx A, cplx zeta, cplx eta, cplx ua, cplx tprime,
                   double rho, size_t N, cplx *G) {
  mapspec ms = {4, MAP_QUARTIC, zeta, eta};
  return model_circle(p, t1, A, &ms, ua, tprime, rho, N, G);
}
