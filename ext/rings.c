/*
 * rings.c — the integrand sampled on circles; contracts in rings.h.
 */
#include <math.h>
#include <stdlib.h>
#include "rings.h"

static const double TWO_PI = 6.283185307179586;

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
