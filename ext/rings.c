/*
 * rings.c — the integrand sampled on circles; contracts in rings.h.
 */
#include <math.h>
#include <stdlib.h>
#include "cplx.h"
#include "rings.h"

static const double TWO_PI = 6.283185307179586;
static const double PI = 3.141592653589793;

static int by_value(const void *a, const void *b) {
  double x = *(const double *)a, y = *(const double *)b;
  return (x > y) - (x < y);
}

/* z^m by binary powering (as the tapes raise to whole powers). */
static cplx powi(cplx z, int m) {
  cplx r = 1;
  while (m > 0) {
    if (m & 1) r *= z;
    m >>= 1;
    if (m) z *= z;
  }
  return r;
}

static void ring_values(problem *p, cplx c, double r, int n, cplx *t, cplx *F) {
  for (int k = 0; k < n; k++) {
    t[k] = c + r * cexp(I * (TWO_PI * k / n));
    (void)problem_integrand(p, t[k], &F[k]);
  }
}

int ring_power(problem *p, cplx c, double r2, double r3, int n, double *growth, cplx *lead2,
               cplx *lead3, cplx *work) {
  cplx *F2 = work, *F3 = work + n, *t = work + 2 * n;
  double *ratios = (double *)(work + 2 * n);   /* reuses t's space after the loop */
  ring_values(p, c, r3, n, t, F3);
  ring_values(p, c, r2, n, t, F2);
  int m = 0;
  double scale = log(r3 / r2);
  for (int k = 0; k < n; k++) {
    double a = cabs(F2[k]), b = cabs(F3[k]);
    if (a > 0 && b > 0 && isfinite(a) && isfinite(b)) ratios[m++] = log(b / a) / scale;
  }
  *growth = NAN;
  *lead2 = *lead3 = 0;
  if (m == 0) return 0;
  qsort(ratios, (size_t)m, sizeof(double), by_value);
  *growth = ratios[m / 2];
  double whole = floor(*growth + 0.5);
  if (!(whole >= 1 && fabs(*growth - whole) < 0.1 && whole <= 1024)) return 0;
  int deg = (int)whole;
  cplx s2 = 0, s3 = 0;
  for (int k = 0; k < n; k++) {
    cplx u = cexp(I * (TWO_PI * k / n));
    s2 += F2[k] / powi(c + r2 * u, deg);
    s3 += F3[k] / powi(c + r3 * u, deg);
  }
  *lead2 = s2 / n;
  *lead3 = s3 / n;
  return deg;
}

double ring_log_spread(problem *p, cplx c, double rho, int n) {
  double lo = INFINITY, hi = -INFINITY;
  for (int k = 0; k < n; k++) {
    cplx F;
    double v = cabs(problem_integrand(p, c + rho * cexp(I * (TWO_PI * (k + 0.5) / n)), &F));
    if (!(v > 0) || !isfinite(v)) return INFINITY;
    lo = fmin(lo, log(v));
    hi = fmax(hi, log(v));
  }
  return hi - lo;
}

int ring_quietest(problem *p, cplx c, double r0, int count, int n, cplx *work, double *rho,
                  double *score, double *spread) {
  cplx *pts = work, *out = work + n, *slots = work + (size_t)n * (1 + p->t->nout);
  double best = INFINITY;
  int found = 0;
  for (int i = 0; i < count; i++) {
    double r = r0 * pow(2.0, (double)(-i) / 3.0);
    for (int k = 0; k < n; k++) pts[k] = c + r * cexp(I * (2 * PI * (k + 0.5) / n));
    problem_values_batch(p, pts, (size_t)n, slots, out);
    double hi = -INFINITY, lo = INFINITY;
    for (int k = 0; k < n; k++) {
      double gm = p->t->nout > 1 ? plain_abs(out[n + k]) : 1;
      double l = creal(out[k]) + (gm > 0 ? log(gm) : -INFINITY);
      if (l != l) l = INFINITY;
      if (l > hi) hi = l;
      if (l < lo) lo = l;
    }
    /* max|f| (|c| + 2r): the rule's rounding u max|f| r and its points' own, u |c|, a
     * relative u |c| / r in f near a pole, together (score: log of max|f| r) */
    double sc = hi + log(cabs(c) + 2 * r);
    if (sc < best) {
      best = sc;
      *score = hi + log(r);
      *rho = r;
      *spread = hi - lo;
      found = 1;
    }
  }
  return found;
}

/* F'(t) from the jet of F (output 0) of order 1. */
static int dF_at(problem *p, cplx t, cplx *d) {
  cplx a[2];
  int st = problem_jet(p, t, 1, 0, a);
  *d = a[1];
  return st;
}

int circle_log_coefficient(problem *p, cplx c, double rho, int n, cplx *a) {
  cplx s = 0;
  for (int k = 0; k < n; k++) {
    cplx u = cexp(I * (2 * PI * k / n)), d;
    int st = dF_at(p, c + rho * u, &d);
    if (st != STEEP_OK) return st;
    s += d * u;
  }
  *a = s * rho / n;
  return STEEP_OK;
}

int circle_dF_laurent(problem *p, cplx c, double rho, int n, int depth, cplx *work, cplx *b) {
  for (int j = 0; j < n; j++) {
    cplx u = cexp(I * (2 * PI * j / n));
    int st = dF_at(p, c + rho * u, &work[j]);
    if (st != STEEP_OK) return st;
  }
  for (int m = -depth - 1; m <= 0; m++) {
    cplx sum = 0;
    for (int j = 0; j < n; j++) sum += work[j] * cexp(I * (-2 * PI * j * m / n));
    b[m + depth + 1] = sum / n * pow(rho, (double)(-m));
  }
  return STEEP_OK;
}

void circle_laurent(problem *p, cplx c, double rho, int n, int depth, const cplx *root,
                    cplx *work, cplx *out, cplx *half, double *vmax) {
  cplx *pts = work, *f = work + n, *vals = work + 2 * (size_t)n;
  cplx *slots = vals + (size_t)n * p->t->nout;
  for (int k = 0; k < n; k++) pts[k] = c + rho * cexp(I * (TWO_PI * (double)k / (double)n));
  problem_values_batch(p, pts, (size_t)n, slots, vals);
  *vmax = 0;
  for (int k = 0; k < n; k++) {
    f[k] = (p->t->nout > 1 ? vals[n + k] : 1.0) * cexp(vals[k]);
    *vmax = fmax(*vmax, cabs(f[k]));
  }
  for (int m = -depth; m <= 1; m++) {
    cplx sum = 0, sum2 = 0;
    int step = ((m % n) + n) % n, idx = 0;   /* idx = k m mod n, stepped */
    for (int k = 0; k < n; k++) {
      cplx term = f[k] * root[idx];
      sum += term;
      if (k % 2 == 0) sum2 += term;
      idx += step;
      if (idx >= n) idx -= n;
    }
    out[m + depth] = sum / (double)n;
    if (half) half[m + depth] = sum2 / (double)(n / 2);
  }
}
