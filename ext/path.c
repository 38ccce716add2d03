/*
 * path.c — steepest path tracing; contracts in path.h.
 */
#include <math.h>
#include "cplx.h"
#include "path.h"

static int finite_c(cplx z) { return isfinite(creal(z)) && isfinite(cimag(z)); }

/* F and F' at t, both finite, else a non-zero status. */
static int eval(problem *p, cplx t, cplx *F, cplx *dF) {
  if (problem_dF(p, t, F, dF) != STEEP_OK) return STEEP_SINGULAR;
  return finite_c(*F) && finite_c(*dF) ? STEEP_OK : STEEP_NONFINITE;
}

/* log |g(t) e^{F(t)}| = Re F + log|g| (no overflow or underflow of the integrand), where
 * the last evaluation was problem_dF at t (g continues it). */
static double log_integrand(problem *p, cplx t, cplx Fcont) {
  if (p->t->nout < 2) return creal(Fcont);
  return creal(Fcont) + log(cabs(problem_amplitude_after_dF(p, t)));
}

/* Newton's corrector onto Im(F + off) = target: moves along grad Im F = i conj(F').
 * `known`: *F and *dF hold F and F' at *t already (the predictor's evaluation); the last
 * evaluation made is at the returned *t. */
static int correct(problem *p, cplx *t, double target, cplx off, cplx *F, cplx *dF,
                   int known) {
  for (int k = 0; k < 6; k++) {
    if (!(k == 0 && known) && eval(p, *t, F, dF) != STEEP_OK) return STEEP_SINGULAR;
    double r = cimag(*F + off) - target;
    double d2 = creal(*dF) * creal(*dF) + cimag(*dF) * cimag(*dF);
    if (fabs(r) <= 1e-13 * (1 + cabs(*F + off)) || d2 == 0) return STEEP_OK;
    *t -= r * I * conj(*dF) / d2;
  }
  return eval(p, *t, F, dF);
}

static cplx direction(cplx dF, int descent) {
  cplx d = conj(dF) / cabs(dF);
  return descent ? -d : d;
}

int path_trace(problem *p, cplx start, cplx level, const path_opts *o, cplx *pts, cplx *Fs,
               size_t maxpts, size_t *n, int *which) {
  const double target = cimag(level);
  const double hmin = 1e-9 * o->scale;
  cplx t = start, F, dF, off = 0;
  *n = 0;
  *which = -1;
  if (maxpts < 2) return PATH_BOUND;
  /* The start lies on the level curve of the continuous F; where the principal value
   * there differs from it by a branch jump (a saddle on a cut of log), carry the jump. */
  if (eval(p, t, &F, &dF) == STEEP_OK && fabs(cimag(level - F)) > 0.5)
    off = I * cimag(level - F);
  if (correct(p, &t, target, off, &F, &dF, 0) != STEEP_OK) return PATH_SINGULAR;
  pts[0] = t;
  Fs[0] = F;
  *n = 1;
  if (cabs(dF) == 0) return PATH_FLAT;
  double h = 1e-2 * o->scale;
  for (int step = 0; step < o->maxsteps; step++) {
    cplx d = direction(dF, o->descent);
    /* never step over a stop point, or so far that Re F changes by more than ~2 */
    double hcap = 0.1 * o->radius;
    for (size_t j = 0; j < o->nstops; j++) {
      /* (a stop farther than 2 hcap + its radius cannot lower hcap: told by the square
       * of its distance, with room for rounding, before the modulus is taken) */
      double lim = 2 * hcap + o->stop_r[j];
      if (lim >= 0 && abs2(t - o->stops[j]) > lim * lim * (1 + 1e-12)) continue;
      double dist = cabs(t - o->stops[j]) - o->stop_r[j];
      hcap = fmin(hcap, fmax(0.5 * dist, hmin));
    }
    if (!o->coarse) hcap = fmin(hcap, 2.0 / cabs(dF));
    if (h > hcap) h = hcap;
    cplx t1 = t, F1 = 0, dF1 = 0;
    int accepted = 0;
    for (int tries = 0; tries < 60 && !accepted; tries++) {
      t1 = t + h * d;
      if (eval(p, t1, &F1, &dF1) != STEEP_OK) {
        if (h > hmin) { h *= 0.5; continue; }
        return PATH_SINGULAR;
      }
      /* continuity of F: compare the change with the trapezoidal integral of F' */
      cplx pred = 0.5 * (dF + dF1) * (t1 - t);
      cplx jump = (F1 + off) - (F + off) - pred;
      if (o->jumps && cabs(jump) > 0.5 + 0.1 * cabs(pred)) {
        if (h > 1e-6 * o->scale) { h *= 0.5; continue; }
        off -= jump;   /* a branch jump of F's principal value: undo it */
      }
      if (correct(p, &t1, target, off, &F1, &dF1, 1) != STEEP_OK) {
        if (h > hmin) { h *= 0.5; continue; }
        return PATH_SINGULAR;
      }
      if (cabs(dF1) == 0) break;
      double turn = fabs(carg(direction(dF1, o->descent) / d));
      if (turn > 0.15 && h > hmin) { h *= 0.5; continue; }
      accepted = 1;
      if (turn < 0.04) h *= 1.6;
    }
    t = t1;
    F = F1;
    dF = dF1;
    pts[*n] = t;
    Fs[*n] = F + off;
    (*n)++;
    if (!finite_c(F) || !finite_c(dF)) return PATH_SINGULAR;
    for (size_t j = 0; j < o->nstops; j++) {
      double r = o->stop_r[j];
      if (abs2(t - o->stops[j]) > r * r * (1 + 1e-12)) continue;   /* surely outside */
      if (cabs(t - o->stops[j]) <= r) { *which = (int)j; return PATH_STOP; }
    }
    if (o->descent) {
      if (log_integrand(p, t, F + off) < o->ref - o->cutoff) return PATH_LOW;
    } else if (creal(F + off) - creal(level) > o->cutoff) {
      return PATH_HIGH;
    }
    if (cabs(t - o->center) > o->radius) return PATH_EDGE;
    /* F no longer changes over a step (F' vanished where no saddle was listed); not
     * within a few stop radii of a stop point, where F' vanishes by right (a saddle only
     * 1e-4 from its neighbours: F' there is below any fixed floor) and the step cap above
     * leads the path in */
    if (!accepted) return PATH_FLAT;
    if (cabs(dF) * (cabs(t) + o->scale) <= 1e-13 * (1 + cabs(F))) {
      int near_stop = 0;
      for (size_t j = 0; j < o->nstops && !near_stop; j++)
        near_stop = cabs(t - o->stops[j]) <= 4 * o->stop_r[j];
      if (!near_stop) return PATH_FLAT;
    }
    if (*n >= maxpts) return PATH_BOUND;
  }
  return PATH_BOUND;
}

/* F(t) continued from F(t0) = F0 along the segment: F0 + integral of F' by 8-point
 * Gauss-Legendre (F' is single-valued across cuts of log; the segment is short). */
static cplx continuous_F(problem *p, cplx t0, cplx F0, cplx t) {
  static const double x8[4] = {0.183434642495649805, 0.525532409916328986,
                               0.796666477413626740, 0.960289856497536232};
  static const double w8[4] = {0.362683783378361983, 0.313706645877887287,
                               0.222381034453374471, 0.101228536290376259};
  cplx mid = 0.5 * (t0 + t), half = 0.5 * (t - t0), sum = 0, F, dF;
  for (int k = 0; k < 4; k++) {
    if (eval(p, mid - half * x8[k], &F, &dF) == STEEP_OK) sum += w8[k] * dF;
    if (eval(p, mid + half * x8[k], &F, &dF) == STEEP_OK) sum += w8[k] * dF;
  }
  return F0 + half * sum;
}

int path_saddle_starts(problem *p, cplx t0, cplx F0, int order, cplx c, int descent,
                       double scale, cplx *starts) {
  const double pi = 3.141592653589793;
  double delta = fmin(pow(1e-2 / cabs(c), 1.0 / order), 2 * scale);
  for (int k = 0; k < order; k++) {
    /* descent: c u^m real negative; ascent: real positive */
    double alpha = ((descent ? pi : 0) - carg(c) + 2 * pi * k) / order;
    cplx h = delta * cexp(I * alpha), t = t0 + h, F, dF;
    /* continuity across a branch cut through the saddle: a principal value far from the
     * continued one carries a jump */
    cplx off = 0;
    if (eval(p, t, &F, &dF) == STEEP_OK) {
      cplx cont = continuous_F(p, t0, F0, t);
      if (fabs(cimag(cont - F)) > 0.5) off = I * cimag(cont - F);
    }
    if (correct(p, &t, cimag(F0), off, &F, &dF, 0) != STEEP_OK) return STEEP_SINGULAR;
    starts[k] = t;
  }
  return STEEP_OK;
}

/* ---- the integral along a saddle's descent path, in its own variable ------------------ */

/* The u of each traced point of a ray: sqrt(Re(F0 - F)), which must increase. */
static int ray_u(cplx F0, path_ray r, double *u) {
  double prev = 0;
  for (size_t k = 0; k < r.n; k++) {
    double d = creal(F0 - r.F[k]);
    u[k] = d > 0 ? sqrt(d) : 0;
    if (!(u[k] > prev) || !isfinite(u[k])) return -1;
    prev = u[k];
  }
  return 0;
}

#define TAYLOR_ORDER 12
#define EPS 2.220446049250313e-16

typedef struct {
  problem *p;
  cplx t0, F0, dt0;   /* dt/du at u = 0; F0 = c[0], the tape's F at t0 */
  double abs_F0;
  path_ray ray[2];    /* [0]: u > 0 (ray a), [1]: u < 0 (ray b) */
  double *u[2];
  /* Near the saddle F0 - F(t) = u^2 is solved on F's Taylor polynomial at t0 (degree
   * TAYLOR_ORDER), whose coefficients are F's differences exactly: F(t) itself carries
   * about eps |F0| of rounding, so t solved from it is off by eps |F0| / |F'|, a relative
   * error of about eps |F0| / (2 u^2) in dt/du at u. Each node takes the route whose
   * error estimate is smaller (c[13], c[14] estimate the polynomial's truncation). */
  cplx c[TAYLOR_ORDER + 3];
  double abs_c[TAYLOR_ORDER + 3];   /* |c_k|, for taylor_error (once, not per node) */
  int top;                          /* the highest k <= TAYLOR_ORDER with c_k != 0 */
  size_t hint[2];                   /* per side, the last bracket found (nodes come in
                                     * increasing u within a level) */
} saddle_path;

/* Horner's rule in real arithmetic (C's complex product checks for infinities on every
 * step; these values are finite), from the highest nonzero coefficient (top). */
static void taylor(const saddle_path *sp, cplx h, cplx *G, cplx *dG) {
  double hr = creal(h), hi = cimag(h), gr = 0, gi = 0, dr = 0, di = 0;
  for (int k = sp->top; k >= 1; k--) {
    double ndr = dr * hr - di * hi + gr, ndi = dr * hi + di * hr + gi;
    dr = ndr; di = ndi;
    double ngr = gr * hr - gi * hi + creal(sp->c[k]), ngi = gr * hi + gi * hr + cimag(sp->c[k]);
    gr = ngr; gi = ngi;
  }
  *G = cplx_of(gr * hr - gi * hi, gr * hi + gi * hr);     /* sum_{k=1..top} c_k h^k */
  *dG = cplx_of(dr * hr - di * hi + gr, dr * hi + di * hr + gi);   /* its derivative */
}

/* h with G(h) = -u^2 on the Taylor polynomial, from the guess x; 0 when Newton does not
 * settle or lands off the ray's side. */
static int taylor_solve(const saddle_path *sp, double u, cplx x, cplx *h, cplx *dG) {
  cplx G;
  for (int it = 0; it < 30; it++) {
    taylor(sp, x, &G, dG);
    double d2 = abs2(*dG);
    if (!(d2 > 0 && d2 < 1e300)) return 0;
    /* (the quotient by conj: dG is neither tiny nor huge here, so no scaling is needed) */
    cplx step = (G + u * u) * conj(*dG) / d2;
    x -= step;
    /* (quadratic convergence: a step below 1e-8 of x leaves an error near 1e-16 of it
     * after it is taken) */
    if (abs2(step) <= 1e-16 * abs2(x)) {
      taylor(sp, x, &G, dG);
      *h = x;
      return creal(x * conj(sp->dt0 * u)) > 0;
    }
  }
  return 0;
}

/* The relative error of g e^F dt/du at a node solved on the Taylor polynomial at h:
 * the polynomial's truncation (the next two terms, common practice: a tail of a
 * convergent series well inside its disc) and rounding (eps times the sum of the moduli of
 * its terms), in G (which moves the node: f changes by about f times the shift in u^2,
 * f falling like e^{-u^2}) and in G' (dt/du = -2u / G'), four times over. */
static double taylor_error(const saddle_path *sp, cplx h, cplx dG) {
  double ah = plain_abs(h), hk = ah, sumG = 0, sumD = 0;
  /* (the sums stop at the highest nonzero coefficient; h^(TAYLOR_ORDER + 1) only where
   * the next two are not 0) */
  for (int k = 1; k <= sp->top; k++) {
    sumG += sp->abs_c[k] * hk;
    sumD += k * sp->abs_c[k] * hk / ah;
    hk *= ah;
  }
  double t13 = 0, t14 = 0;
  if (sp->abs_c[TAYLOR_ORDER + 1] != 0 || sp->abs_c[TAYLOR_ORDER + 2] != 0) {
    for (int k = sp->top + 1; k <= TAYLOR_ORDER; k++) hk *= ah;
    t13 = sp->abs_c[TAYLOR_ORDER + 1] * hk;
    t14 = sp->abs_c[TAYLOR_ORDER + 2] * hk * ah;
  }
  double dG_err = ((TAYLOR_ORDER + 1) * t13 + (TAYLOR_ORDER + 2) * t14) / ah + EPS * sumD;
  double G_err = t13 + t14 + EPS * sumG;
  return 4 * (dG_err / plain_abs(dG) + G_err);
}

/* g e^F dt/du at u, or a non-finite value when the node cannot be solved; *rel set to the
 * relative error of the value from solving for the node (the rounding of g e^F at the node
 * is the quadrature's floor). e^F is the tape's at the node found (its rounding differs
 * from node to node, where e^{F0 - u^2} would carry F0's own into every node alike). */
static cplx node_value(saddle_path *sp, double u, double *rel) {
  problem *p = sp->p;
  cplx F, dF;
  *rel = 0;
  if (u == 0) {
    if (eval(p, sp->t0, &F, &dF) != STEEP_OK) return NAN;
    return problem_amplitude_after_dF(p, sp->t0) * cexp(F) * sp->dt0;
  }
  int side = u > 0 ? 0 : 1;
  double s = fabs(u);
  const path_ray *r = &sp->ray[side];
  const double *us = sp->u[side];
  if (r->n == 0 || s > us[r->n - 1]) return NAN;
  /* the bracketing points: (0, t0) before the first; from the last bracket forward
   * when s lies past it (the next node usually sits in the same or the next one) */
  size_t lo = 0, hi = r->n - 1;
  if (s <= us[0]) hi = 0;
  else {
    size_t k = sp->hint[side];
    if (k > 0 && k < r->n && us[k - 1] < s) {
      while (k < r->n - 1 && us[k] < s) k++;
      lo = k - 1, hi = k;
    } else {
      while (hi - lo > 1) {
        size_t mid = (lo + hi) / 2;
        if (us[mid] < s) lo = mid; else hi = mid;
      }
    }
    sp->hint[side] = hi;
  }
  cplx ta = hi == 0 ? sp->t0 : r->pts[hi - 1], tb = r->pts[hi];
  double ua = hi == 0 ? 0 : us[hi - 1], ub = us[hi];
  cplx seed = ta + (tb - ta) * ((s - ua) / (ub - ua)), t = seed;
  /* Solved on the tape: Newton's residual in F is at most 4 eps (2|F0| + u^2 + 1) = d,
   * which moves u^2 by d and G' = F' by |F''| d / |F'| (relative d / (2 u^2)) */
  double d = 4 * EPS * (2 * sp->abs_F0 + s * s + 1);
  double tape_rel = 4 * d * (1 / (2 * s * s) + 1);
  /* (the root of the equation on the path: Newton from the traced points, and it must land
   * on the segment it started from; F0 - F = u^2 has other roots on other curves) */
  cplx h, dG;
  double seg2 = abs2(tb - ta);
  if (taylor_solve(sp, u, seed - sp->t0, &h, &dG) && abs2(sp->t0 + h - seed) <= seg2) {
    double taylor_rel = taylor_error(sp, h, dG);
    if (taylor_rel < tape_rel) {
      /* (the value alone: F' there is the polynomial's dG) */
      cplx f = problem_integrand(p, sp->t0 + h, &F);
      /* (the tape's F there against the polynomial's: a jet that does not describe F
       * this far out, say past a singular point, is not used; a non-finite F fails it) */
      if (plain_abs(F - (sp->F0 - s * s)) <= d + taylor_rel * s * s) {
        *rel = taylor_rel;
        return f * (-2 * u / dG);
      }
    }
  }
  *rel = tape_rel;
  cplx target = sp->F0 - s * s;
  for (int it = 0; it < 12; it++) {
    if (eval(p, t, &F, &dF) != STEEP_OK || dF == 0) return NAN;
    cplx r0 = F - target;
    if (plain_abs(r0) <= d) {
      if (abs2(t - seed) > seg2) return NAN;   /* left its segment */
      return problem_amplitude_after_dF(p, t) * cexp(F) * (-2 * u / dF);
    }
    t -= r0 / dF;
  }
  return NAN;
}

/* One side's nodes k h (k from `from` by `by` up to u_end), added to *sum, *abs_sum and
 * *cond (the sum of |f| times each node's relative error); the outermost node's value and
 * u kept in *f_end, *u_end when beyond the last. */
static int add_nodes(saddle_path *sp, int sign, double h, double u_end, long from,
                     long by, cplx *sum, double *abs_sum, double *cond, cplx *f_end,
                     double *u_out) {
  long kmax = (long)floor(u_end / h);
  for (long k = from; k <= kmax; k += by) {
    double u = k * h, rel;
    cplx f = node_value(sp, sign * u, &rel);
    if (!isfinite(creal(f)) || !isfinite(cimag(f))) return -1;
    double af = plain_abs(f);
    *sum += f;
    *abs_sum += af;
    /* (and e^F's own rounding there: eps |F| in its argument, F about F0 - u^2) */
    *cond += af * (rel + 2 * EPS * (sp->abs_F0 + u * u + 1));
    if (u > *u_out) { *u_out = u; *f_end = f; }
  }
  return 0;
}

int path_saddle_quad(problem *p, cplx t0, cplx F0, cplx F2, path_ray a, path_ray b,
                     double abstol, double reltol, double *work, cplx *res, double *err,
                     cplx *part_a, cplx *part_b) {
  saddle_path sp;
  sp.p = p;
  sp.t0 = t0;
  sp.ray[0] = a;
  sp.ray[1] = b;
  sp.u[0] = work;
  sp.u[1] = work + a.n;
  sp.hint[0] = sp.hint[1] = 0;
  if (a.n < 2 || b.n < 2 || F2 == 0) return -1;
  if (problem_jet(p, t0, TAYLOR_ORDER + 2, 0, sp.c) != STEEP_OK || sp.c[2] == 0) return -1;
  /* (F0 as the jet has it, so that both routes to a node measure u from the same value;
   * it agrees with the caller's to rounding) */
  if (!(cabs(sp.c[0] - F0) <= 1e-12 * (cabs(F0) + 1))) return -1;
  sp.F0 = sp.c[0];
  sp.abs_F0 = plain_abs(sp.F0);
  sp.top = 1;
  for (int k = 0; k < TAYLOR_ORDER + 3; k++) {
    sp.abs_c[k] = plain_abs(sp.c[k]);
    if (k >= 1 && k <= TAYLOR_ORDER && sp.c[k] != 0) sp.top = k;
  }
  if (ray_u(sp.F0, a, sp.u[0]) || ray_u(sp.F0, b, sp.u[1])) return -1;
  /* dt/du at the saddle: 1/sqrt(-c_2), the root pointing along ray a */
  cplx dt0 = csqrt(-1.0 / sp.c[2]);
  if (creal(dt0 * conj(a.pts[0] - t0)) < 0) dt0 = -dt0;
  sp.dt0 = dt0;
  /* (nodes up to u = 30 at most, where e^{-u^2} = e^{-900} is far below any tolerance:
   * a ray that overshoots its cutoff in one long step does not cost millions of nodes) */
  double ua = fmin(sp.u[0][a.n - 1], 30), ub = fmin(sp.u[1][b.n - 1], 30), rel0;
  cplx sum_a = 0, sum_b = 0, end_a = 0, end_b = 0, f0 = node_value(&sp, 0, &rel0);
  double abs_sum = cabs(f0), cond = abs_sum * 2 * EPS * (cabs(sp.F0) + 1), out_a = 0, out_b = 0;
  if (!isfinite(abs_sum)) return -1;
  /* level 0: step 1/2, every node; later levels the odd multiples of the new step */
  double h = 0.5;
  if (add_nodes(&sp, 1, h, ua, 1, 1, &sum_a, &abs_sum, &cond, &end_a, &out_a) ||
      add_nodes(&sp, -1, h, ub, 1, 1, &sum_b, &abs_sum, &cond, &end_b, &out_b))
    return -1;
  cplx T = h * (f0 + sum_a + sum_b);
  for (int level = 1; level <= 7; level++) {
    h *= 0.5;
    if (add_nodes(&sp, 1, h, ua, 1, 2, &sum_a, &abs_sum, &cond, &end_a, &out_a) ||
        add_nodes(&sp, -1, h, ub, 1, 2, &sum_b, &abs_sum, &cond, &end_b, &out_b))
      return -1;
    cplx T2 = h * (f0 + sum_a + sum_b);
    /* the rounding of the sum, and each node's own errors (cond) */
    double diff = cabs(T2 - T), floor8 = 8 * EPS * h * abs_sum + h * cond;
    T = T2;
    if (diff <= fmax(abstol, reltol * cabs(T2)) + floor8) {
      /* the tails past the outermost nodes: |f(u)| e^{-(v^2 - u^2)} integrated over
       * v > u is at most |f(u)| / (2u) */
      double tails = (out_a > 0 ? cabs(end_a) / (2 * out_a) : 0) +
                     (out_b > 0 ? cabs(end_b) / (2 * out_b) : 0);
      *res = T2;
      *err = diff + floor8 + tails;
      *part_a = h * (0.5 * f0 + sum_a);
      *part_b = h * (0.5 * f0 + sum_b);
      return 0;
    }
  }
  return -1;
}
