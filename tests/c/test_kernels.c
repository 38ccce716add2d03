/*
 * test_kernels.c — C-level tests of the series kernels, without Lua: identities that
 * must hold to rounding, on seeded random coefficients. Prints one line
 * `kernels: N passed, M failed` and exits non-zero on failure.
 */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "series.h"

static int passed, failed;
static unsigned long long rng_state = 0x9e3779b97f4a7c15ULL;

static double rnd(void) {   /* uniform in [-1, 1) */
  rng_state = rng_state * 6364136223846793005ULL + 1442695040888963407ULL;
  return (double)(rng_state >> 11) / (double)(1ULL << 52) - 1.0;
}

static void check(int ok, const char *what) {
  if (ok) passed++;
  else { failed++; printf("FAIL %s (seed state %llu)\n", what, rng_state); }
}

static double maxdiff(const cplx *a, const cplx *b, size_t n) {
  double m = 0;
  for (size_t k = 0; k < n; k++) m = fmax(m, cabs(a[k] - b[k]));
  return m;
}

/* Random series with decaying coefficients (radius of convergence > 1). */
static void random_series(cplx *a, size_t n, double decay) {
  double s = 1;
  for (size_t k = 0; k < n; k++, s *= decay) a[k] = s * (rnd() + I * rnd());
}

int main(void) {
  enum { N = 31 };
  cplx a[N], b[N], c[N], d[N], e[N], work[4 * N];
  for (int trial = 0; trial < 20; trial++) {
    random_series(a, N, 0.5);
    random_series(b, N, 0.5);
    a[0] += 2;   /* keep constant terms away from 0 */
    b[0] += 2;
    /* (a*b)/b = a: Griewank & Walther 2008, Table 13.2 (identity) */
    ser_mul(c, a, b, N);
    check(ser_div(d, c, b, N) == STEEP_OK && maxdiff(d, a, N) < 1e-12, "(a*b)/b == a");
    /* exp(log a) = a */
    ser_log(c, a, N);
    ser_exp(d, c, N);
    check(maxdiff(d, a, N) < 1e-12, "exp(log a) == a");
    /* sqrt(a)^2 = a */
    ser_sqrt(c, a, N);
    ser_mul(d, c, c, N);
    check(maxdiff(d, a, N) < 1e-12, "sqrt(a)^2 == a");
    /* a^3 by powi equals a*a*a, and a^(-2) * a^2 = 1 */
    ser_powi(c, a, 3, N, work);
    ser_mul(d, a, a, N);
    ser_mul(e, d, a, N);
    check(maxdiff(c, e, N) < 1e-12 * (1 + cabs(e[0])), "powi(a,3) == a*a*a");
    ser_powi(c, a, -2, N, work);
    ser_mul(e, c, d, N);
    memset(d, 0, sizeof d);
    d[0] = 1;
    check(maxdiff(e, d, N) < 1e-12, "a^-2 * a^2 == 1");
    /* revert(revert(r)) = r for r with r0 = 0, r1 != 0 */
    random_series(c, N, 0.5);
    c[0] = 0;
    c[1] = 1 + 0.5 * rnd();
    ser_revert(d, c, N, work);
    ser_compose(e, c, d, N, work);   /* c(d(z)) = z */
    memset(b, 0, sizeof b);
    b[1] = 1;
    /* the inverse can have large coefficients (small radius): compare the residual
     * with the size of the coefficients that cancel in it */
    double big = 0;
    for (int k = 0; k < N; k++) big = fmax(big, cabs(d[k]));
    check(maxdiff(e, b, N) < 1e-13 * (1 + big), "c(revert(c)) == z");
    /* sin^2 + cos^2 = 1 */
    ser_sincos(c, d, a, N);
    ser_mul(e, c, c, N);
    ser_mul(b, d, d, N);
    for (int k = 0; k < N; k++) e[k] += b[k];
    memset(b, 0, sizeof b);
    b[0] = 1;
    check(maxdiff(e, b, N) < 1e-10 * (1 + cabs(c[0] * c[0])), "sin^2 + cos^2 == 1");
  }
  /* misuse is reported, not computed */
  memset(a, 0, sizeof a);
  a[1] = 1;
  check(ser_log(c, a, N) == STEEP_SINGULAR, "log of a series with a0 = 0 is singular");
  check(ser_pow(c, a, 0.5, N) == STEEP_BRANCH, "a^0.5 with a0 = 0 is a branch point");
  check(ser_div(c, b, a, N) == STEEP_SINGULAR, "division by a0 = 0 is singular");
  printf("kernels: %d passed, %d failed\n", passed, failed);
  return failed ? 1 : 0;
}
