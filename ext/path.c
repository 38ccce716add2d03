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
    /* F no longer changes over a step (F' vanished where no saddle was listed) */
    if (!accepted || cabs(dF) * (cabs(t) + o->scale) <= 1e-13 * (1 + cabs(F))) return PATH_FLAT;
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
