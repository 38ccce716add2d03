/*
 * test_kernels.c — C-level tests of the numerical kernels, without Lua: series
 * identities that must hold to rounding on seeded random coefficients; quadrature
 * (quad.c) on exact integrals; polyline geometry (geom.c) on figures whose winding and
 * crossing numbers are known; zeros (roots.c) of a polynomial with known roots; steepest
 * paths (path.c) and samples on circles (rings.c) over tapes built by hand; the Airy
 * functions (airy.c) in test_airy.c. Prints one line
 * `kernels: N passed, M failed` and exits non-zero on failure.
 */
#include <limits.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <float.h>
#include "series.h"
#include "quad.h"
#include "geom.h"
#include "invmap.h"
#include "roots.h"
#include "path.h"
#include "problem.h"
#include "rings.h"
#include "tape.h"
#include "clog.h"
#include "kernel_check.h"
#include "mjet.h"
#include "mexpand.h"
#include "mcrit.h"

#define PI 3.14159265358979323846

static int passed, failed;
static unsigned long long rng_state = 0x9e3779b97f4a7c15ULL;

double rnd(void) {   /* uniform in [-1, 1) */
  rng_state = rng_state * 6364136223846793005ULL + 1442695040888963407ULL;
  return (double)(rng_state >> 11) / (double)(1ULL << 52) - 1.0;
}

void check(int ok, const char *what) {
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

static void test_series(void) {
  enum { N = 31 };
  cplx a[N], b[N], c[N], d[N], e[N], work[4 * N], rwork[N * N];   /* ser_revert: n*n */
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
    ser_revert(d, c, N, rwork);
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
}

/* Relative distance |got - want| / |want| (absolute when want = 0). */
static double relerr(cplx got, cplx want) {
  double s = cabs(want);
  return cabs(got - want) / (s > 0 ? s : 1);
}

/* ---- quadrature (quad.c) -------------------------------------------------------- */

/* Integrands: ctx is a counter of evaluations (a long), or the data named below. */
typedef struct { long calls; int k; cplx poly[11]; } qctx;

static cplx f_monomial(void *ctx, cplx t) {   /* t^k; real pow on the real axis */
  qctx *q = ctx;
  q->calls++;
  if (cimag(t) == 0) return pow(creal(t), q->k);
  cplx r = 1;
  for (int j = 0; j < q->k; j++) r *= t;
  return r;
}

static cplx f_poly(void *ctx, cplx t) {   /* sum poly[j] t^j, Horner */
  qctx *q = ctx;
  q->calls++;
  cplx r = 0;
  for (int j = 10; j >= 0; j--) r = r * t + q->poly[j];
  return r;
}

static cplx f_gauss(void *ctx, cplx t) { ((qctx *)ctx)->calls++; return cexp(-t * t); }
static cplx f_peak(void *ctx, cplx t) { ((qctx *)ctx)->calls++; return 1.0 / (1e-4 + t * t); }
static cplx f_rsqrt(void *ctx, cplx t) { ((qctx *)ctx)->calls++; return 1.0 / csqrt(t); }
static cplx f_log(void *ctx, cplx t) { ((qctx *)ctx)->calls++; return clog(t); }
static cplx f_nan(void *ctx, cplx t) { ((qctx *)ctx)->calls++; return creal(t) > 0.3 ? NAN : 1.0; }

/* Legendre P_7 by Bonnet's recurrence (n+1) P_{n+1} = (2n+1) x P_n - n P_{n-1}
 * (Abramowitz & Stegun 22.7.10, from memory; P_7(1) = 1 follows), stable on [-1, 1]. */
static double legendre7(double x) {
  double p0 = 1, p1 = x;
  for (int n = 1; n < 7; n++) {
    double p2 = ((2 * n + 1) * x * p1 - n * p0) / (n + 1);
    p0 = p1;
    p1 = p2;
  }
  return p1;
}

static double nodes[32];
static int nodes_seen;

static cplx f_record(void *ctx, cplx t) {   /* records the abscissae (real) */
  (void)ctx;
  if (nodes_seen < 32) nodes[nodes_seen] = creal(t);
  nodes_seen++;
  return 1;
}

static void test_quad(void) {
  qctx q;
  cplx r;
  double e, rabs;
  /* Degrees of exactness: the 15-point Kronrod rule integrates t^k exactly for
   * k <= 3*7+1 = 22, its embedded 7-point Gauss rule for k <= 2*7-1 = 13 (Kronrod,
   * Nodes and weights of quadrature formulas, 1965; Piessens et al., QUADPACK, 1983,
   * ch. 2; section from memory). This checks the node and weight table typed from QUADPACK's qk15: a
   * wrong digit in any node or weight breaks exactness at some k <= 22.
   * Exact: integral of t^k over [-1, 1] = 2/(k+1) for even k, 0 for odd k. */
  int kron_ok = 1, floor_ok = 1;
  for (int k = 0; k <= 22; k++) {
    q.calls = 0;
    q.k = k;
    quad_gk15(f_monomial, &q, -1, 1, &r, &e, &rabs);
    double want = k % 2 ? 0 : 2.0 / (k + 1);
    double tol = k % 2 ? 1e-15 : 1e-15 * want;   /* odd: absolute (the value is 0) */
    if (!(cabs(r - want) <= tol) || q.calls != 15) {
      kron_ok = 0;
      printf("  gk15: t^%d gives %.17g, want %.17g (%ld calls)\n", k, creal(r), want, q.calls);
    }
    /* resabs is the rule applied to |t^k|: for even k that is t^k again, 2/(k+1) */
    if (k % 2 == 0 && !(fabs(rabs - want) <= 1e-15 * want)) {
      kron_ok = 0;
      printf("  gk15: resabs for t^%d is %.17g, want %.17g\n", k, rabs, want);
    }
    /* while the Gauss part is exact as well (k <= 13), the Gauss-Kronrod difference is
     * rounding and the estimate sits at QUADPACK's rounding floor 50 eps resabs */
    if (k <= 13 && !(e <= 50 * DBL_EPSILON * rabs * (1 + 1e-12))) {
      floor_ok = 0;
      printf("  gk15: error estimate %.3g for t^%d is not at the rounding floor\n", e, k);
    }
  }
  check(kron_ok, "gk15 integrates t^k, k <= 22, on [-1,1] to 1e-15 (QUADPACK qk15 table)");
  check(floor_ok, "gk15 error estimate at the rounding floor for k <= 13 (Gauss part exact)");
  /* and the degrees are exactly 13 and 22: t^14 shows a Gauss-Kronrod difference (the
   * 7-point Gauss error on t^14 is 2^15 (7!)^4 / (15 (14!)^2) ~ 1.8e-4 by the remainder
   * of Abramowitz & Stegun 25.4.29, equation number from memory), t^24 a Kronrod error
   * well above rounding */
  q.k = 14;
  quad_gk15(f_monomial, &q, -1, 1, &r, &e, &rabs);
  check(e > 1e-6, "gk15 error estimate for t^14 is not small (Gauss degree is 13)");
  q.k = 24;
  quad_gk15(f_monomial, &q, -1, 1, &r, &e, &rabs);
  check(relerr(r, 2.0 / 25) > 1e-12, "gk15 is not exact for t^24 (Kronrod degree is 22)");

  /* The 7 Gauss nodes among the 15 are the zeros of the Legendre polynomial P_7 (Gauss;
   * Abramowitz & Stegun 25.4.29, from memory), the 8 Kronrod nodes are not: record the abscissae of
   * one rule on [-1, 1] (where they are the tabulated nodes exactly). */
  {
    nodes_seen = 0;
    quad_gk15(f_record, &q, -1, 1, &r, &e, &rabs);
    int zeros = 0, others = 0;
    for (int j = 0; j < nodes_seen; j++) {
      double v = legendre7(nodes[j]);
      if (fabs(v) <= 1e-15) zeros++;
      else if (fabs(v) > 1e-2) others++;
    }
    check(fabs(legendre7(1) - 1) <= 1e-15 && fabs(legendre7(-1) + 1) <= 1e-15 &&
          fabs(legendre7(0)) <= 1e-15, "test helper: P_7(1) = 1, P_7(-1) = -1, P_7(0) = 0");
    check(nodes_seen == 15 && zeros == 7 && others == 8,
          "gk15: 7 of the 15 nodes are zeros of P_7 to 1e-15 (Gauss nodes), 8 are not");
  }

  /* Complex segments: the integral of a polynomial p along a -> b is P(b) - P(a) with P
   * an antiderivative (Cauchy: path independence), for degree <= 22 in one rule. */
  {
    cplx a = -1.0 + 0.5 * I, b = 2.0 - 1.0 * I, Pa = 0, Pb = 0;
    for (int j = 0; j <= 10; j++) q.poly[j] = (j % 3 - 1.0) + (0.5 * j - 2.0) * I;
    for (int j = 10; j >= 0; j--) {   /* P(t) = sum poly[j] t^(j+1)/(j+1) */
      Pa = Pa * a + q.poly[j] / (j + 1);
      Pb = Pb * b + q.poly[j] / (j + 1);
    }
    Pa *= a;
    Pb *= b;
    q.calls = 0;
    quad_gk15(f_poly, &q, a, b, &r, &e, &rabs);
    check(relerr(r, Pb - Pa) <= 1e-13, "gk15 on a complex segment: degree-10 polynomial exact");
    /* t^22 from 0.3i to 1 + i: (b^23 - a^23)/23 */
    cplx a2 = 0.3 * I, b2 = 1.0 + 1.0 * I, w = 1, v = 1;
    for (int j = 0; j < 23; j++) { w *= b2; v *= a2; }
    q.k = 22;
    quad_gk15(f_monomial, &q, a2, b2, &r, &e, &rabs);
    check(relerr(r, (w - v) / 23.0) <= 1e-13, "gk15 on a complex segment: t^22 exact");
    /* reversing the segment negates the integral */
    cplx r2;
    quad_gk15(f_monomial, &q, b2, a2, &r2, &e, &rabs);
    check(relerr(r2, -r) <= 1e-15, "gk15: integral from b to a is minus that from a to b");
  }

  /* quad_adaptive. e^{-t^2} over [-10, 10]: sqrt(pi) erf(10) (Abramowitz & Stegun
   * 7.1.1), and erfc(10) < e^{-100}/(10 sqrt(pi)) ~ 2e-45 (7.1.13; both from memory) is
   * below double rounding, so the value is sqrt(pi). */
  {
    long nev = 100;   /* the count is added to */
    q.calls = 0;
    int st = quad_adaptive(f_gauss, &q, -10, 10, 0, 1e-13, QUAD_MAX_SUB, &r, &e, &nev);
    check(st == QUAD_OK, "adaptive e^{-t^2}: status ok");
    check(relerr(r, sqrt(PI)) <= 1e-14, "adaptive e^{-t^2} over [-10,10] = sqrt(pi) to 1e-14");
    check(e <= 1e-12 && e >= cabs(r - sqrt(PI)), "adaptive e^{-t^2}: error estimate bounds the error");
    check(nev - 100 == q.calls && q.calls > 15 && q.calls % 30 == 15,
          "adaptive: evaluation count added = the integrand's calls (15 + 30 per bisection)");
  }
  /* A peak of width 1e-2: the integral of 1/(eps^2 + t^2) over [a, b] is
   * (atan(b/eps) - atan(a/eps))/eps (elementary antiderivative), eps = 1e-2. */
  {
    long nev = 0;
    double want = (atan(1.0 / 1e-2) - atan(-0.3 / 1e-2)) / 1e-2;
    q.calls = 0;
    int st = quad_adaptive(f_peak, &q, -0.3, 1, 0, 1e-12, QUAD_MAX_SUB, &r, &e, &nev);
    check(st == QUAD_OK && relerr(r, want) <= 1e-12,
          "adaptive 1/(1e-4 + t^2) over [-0.3,1] = arctan formula to 1e-12");
    check(nev == q.calls && nev > 15 * 9, "adaptive: the peak needs bisections (count reported)");
    /* limit = 1: one rule, not enough, so QUAD_LIMIT with the one-rule estimate */
    nev = 0;
    q.calls = 0;
    st = quad_adaptive(f_peak, &q, -0.3, 1, 0, 1e-12, 1, &r, &e, &nev);
    cplx r1;
    double e1;
    quad_gk15(f_peak, &q, -0.3, 1, &r1, &e1, &rabs);
    check(st == QUAD_LIMIT && nev == 15 && r == r1 && e == e1 && e > 1e-12 * cabs(r),
          "adaptive with limit = 1 on the peak: QUAD_LIMIT after one rule");
    /* a NaN in the integrand is reported */
    nev = 0;
    st = quad_adaptive(f_nan, &q, 0, 1, 0, 1e-12, QUAD_MAX_SUB, &r, &e, &nev);
    check(st == QUAD_NONFINITE, "adaptive: a NaN integrand gives QUAD_NONFINITE");
  }

  /* Tanh-sinh on integrable endpoint singularities: the integral over [0, 1] of t^{-1/2}
   * is 2 and of log t is -1 (elementary); along 0 -> i, t^{-1/2} (principal branch)
   * integrates to 2 sqrt(i). */
  {
    long nev = 0;
    q.calls = 0;
    int st = quad_tanhsinh(f_rsqrt, &q, 0, 1, 0, 1e-13, &r, &e, &nev);
    check(st == QUAD_OK && relerr(r, 2) <= 1e-12, "tanh-sinh t^{-1/2} over [0,1] = 2 to 1e-12");
    check(nev == q.calls, "tanh-sinh: evaluation count = the integrand's calls");
    nev = 0;
    st = quad_tanhsinh(f_log, &q, 0, 1, 0, 1e-13, &r, &e, &nev);
    check(st == QUAD_OK && relerr(r, -1) <= 1e-12, "tanh-sinh log t over [0,1] = -1 to 1e-12");
    st = quad_tanhsinh(f_rsqrt, &q, 0, I, 0, 1e-13, &r, &e, &nev);
    check(st == QUAD_OK && relerr(r, 2 * csqrt(I)) <= 1e-12,
          "tanh-sinh t^{-1/2} along 0 -> i = 2 sqrt(i) to 1e-12");
    /* the singular end may be b as well: reversed, t^{-1/2} from 1 to 0 = -2 */
    st = quad_tanhsinh(f_rsqrt, &q, 1, 0, 0, 1e-13, &r, &e, &nev);
    check(st == QUAD_OK && relerr(r, -2) <= 1e-12, "tanh-sinh t^{-1/2} from 1 to 0 = -2");
  }
}

/* ---- geometry (geom.c) ------------------------------------------------------------ */

static void f_gauss_batch(void *ctx, const cplx *t, size_t m, cplx *f) {
  for (size_t i = 0; i < m; i++) f[i] = f_gauss(ctx, t[i]);
}

/* quad_polyline: e^{-t^2} along a wavy polyline of 20001 points from -6 to 6 is, by
 * Cauchy's theorem, the integral over [-6, 6]: sqrt(pi) erf(6), and erfc(6) ~ 2e-17
 * (Abramowitz & Stegun 7.1.13, from memory) is below rounding: sqrt(pi). The batched
 * first pass gives the same numbers as the one-point one, with the same count (15 per
 * segment, plus bisections); a budget below the first pass is a status. 1/sqrt(t) along
 * a broken line from 0 to 1 (the first segment singular at 0) is 2. */
static void test_quad_polyline(void) {
  enum { NP = 20001 };
  cplx *pts = malloc(NP * sizeof *pts);
  void *scratch = malloc(QUAD_POLYLINE_BYTES(NP - 1));
  for (int k = 0; k < NP; k++) {
    double x = -6 + 12.0 * k / (NP - 1);
    pts[k] = x + 0.4 * I * sin(2 * x) * sin(PI * x / 6);
  }
  qctx q = {0, 0, {0}};
  cplx r1, r2;
  double e1, e2;
  long n1 = 0, n2 = 0;
  int s1 = quad_polyline(f_gauss, f_gauss_batch, &q, pts, NP, 0, 1e-13, QUAD_MAX_SUB, 2000000,
                         0, 0, scratch, &r1, &e1, &n1);
  int s2 = quad_polyline(f_gauss, NULL, &q, pts, NP, 0, 1e-13, QUAD_MAX_SUB, 2000000, 0, 0,
                         scratch, &r2, &e2, &n2);
  check(s1 == QUAD_OK && relerr(r1, sqrt(PI)) <= 1e-13 && e1 >= cabs(r1 - sqrt(PI)) &&
        e1 <= 1e-11, "quad_polyline: e^{-t^2} along 20000 segments = sqrt(pi), estimate bounds");
  check(s2 == s1 && r2 == r1 && e2 == e1 && n1 == n2 && n1 >= 15L * (NP - 1),
        "quad_polyline: batched and one-point first passes agree exactly");
  long n3 = 0;
  int s3 = quad_polyline(f_gauss, f_gauss_batch, &q, pts, NP, 0, 1e-13, QUAD_MAX_SUB, 1000, 0, 0,
                         scratch, &r1, &e1, &n3);
  check(s3 == QUAD_LIMIT, "quad_polyline: budget below the first pass: status limit");
  cplx broken[3] = {0, 0.3 + 0.2 * I, 1};
  long n4 = 0;
  int s4 = quad_polyline(f_rsqrt, NULL, &q, broken, 3, 0, 1e-12, QUAD_MAX_SUB, 2000000, 1, 0,
                         scratch, &r1, &e1, &n4);
  check(s4 == QUAD_OK && relerr(r1, 2) <= 1e-10, "quad_polyline: 1/sqrt(t) from 0 (singular) = 2");
  free(pts);
  free(scratch);
}

/* quad_merge_vertices: a straight descent path with levels falling by 0.1, 0.1, 0.3,
 * 0.6, 2, 2 joins the first four segments (a fall of 1.1 > 1 stops before the fourth:
 * kept 0, 3, 4, 5, 6), and a pole beside the chord keeps every segment. */
static void test_merge_vertices(void) {
  cplx pts[7], lev[7], pole = 0.15 + 0.05 * I;
  double fall[7] = {0, 0.1, 0.2, 0.5, 1.1, 3.1, 5.1};
  for (int k = 0; k < 7; k++) { pts[k] = 0.1 * k; lev[k] = -fall[k]; }
  size_t keep[7];
  size_t m = quad_merge_vertices(pts, lev, 7, 1.0, NULL, 0, keep);
  check(m == 5 && keep[0] == 0 && keep[1] == 3 && keep[2] == 4 && keep[3] == 5 && keep[4] == 6,
        "quad_merge_vertices: segments joined while Re F falls by at most 1");
  m = quad_merge_vertices(pts, lev, 7, 1.0, &pole, 1, keep);
  check(m == 7, "quad_merge_vertices: no chord passes near a pole");
  /* a turn of more than 0.25 rad ends a joined stretch */
  pts[2] = 0.1 + 0.1 * I;
  m = quad_merge_vertices(pts, lev, 7, 1.0, NULL, 0, keep);
  check(m >= 2 && keep[1] == 1, "quad_merge_vertices: a turn ends a joined stretch");
}

static void test_geom(void) {
  enum { NP = 64 };
  cplx c[2 * NP + 1], cw[NP + 1];
  /* a regular 64-gon inscribed in the unit circle, counter-clockwise, closed; traversed
   * twice; and clockwise */
  for (int k = 0; k <= 2 * NP; k++) c[k] = cexp(I * (2 * PI * (k % NP) / NP));
  for (int k = 0; k <= NP; k++) cw[k] = conj(c[k]);
  /* winding numbers of a circle: 1 inside, 0 outside, 2 for a double traversal, -1
   * clockwise (definition of the winding number; rounding only: 1e-12) */
  check(fabs(geom_turning(c, NP + 1, 0.3 + 0.2 * I) - 1) <= 1e-12, "turning: inside point winds once");
  check(fabs(geom_turning(c, NP + 1, 0.99 * cexp(0.5 * I)) - 1) <= 1e-12,
        "turning: inside point near the edge winds once");
  check(fabs(geom_turning(c, NP + 1, 2.0 - 0.5 * I)) <= 1e-12, "turning: outside point winds 0");
  check(fabs(geom_turning(c, NP + 1, 1.01 * cexp(0.5 * I))) <= 1e-12,
        "turning: outside point near the edge winds 0");
  check(fabs(geom_turning(c, 2 * NP + 1, -0.4 * I) - 2) <= 1e-12, "turning: twice traversed = 2");
  check(fabs(geom_turning(cw, NP + 1, 0.1) + 1) <= 1e-12, "turning: clockwise = -1");
  /* an open arc: a quarter of the circle seen from the centre turns by 1/4 */
  check(fabs(geom_turning(c, NP / 4 + 1, 0) - 0.25) <= 1e-12, "turning: quarter arc = 1/4");
  /* on the curve: at a vertex and in the middle of a segment */
  check(isnan(geom_turning(c, NP + 1, c[5])), "turning: NAN at a vertex of the curve");
  check(isnan(geom_turning(c, NP + 1, 0.5 * (c[5] + c[6]))), "turning: NAN on a segment");

  /* Crossings, sign convention of geom.h: +1 when b crosses a from right to left. */
  cplx ax[2] = {-1, 1}, up[2] = {-I, I}, down[2] = {I, -I};
  cplx pts[8];
  size_t np = 99;
  check(geom_crossings(ax, 2, up, 2, pts, 8, &np) == 1 && np == 1 && cabs(pts[0]) <= 1e-15,
        "crossings: b upwards across a eastwards = +1 at 0");
  check(geom_crossings(ax, 2, down, 2, NULL, 0, &np) == -1 && np == 1,
        "crossings: b downwards across a = -1");
  check(geom_crossings(up, 2, ax, 2, NULL, 0, &np) == -1, "crossings: swapping a and b flips the sign");
  /* a vertex of a exactly on b; a vertex of b exactly on a; a vertex of both: once each */
  cplx a3[3] = {-1, 0, 1}, b3[3] = {-I, 0, I};
  check(geom_crossings(a3, 3, up, 2, pts, 8, &np) == 1 && np == 1 && pts[0] == 0,
        "crossings: at a vertex of a, counted once");
  check(geom_crossings(ax, 2, b3, 3, pts, 8, &np) == 1 && np == 1 && pts[0] == 0,
        "crossings: at a vertex of b, counted once");
  check(geom_crossings(a3, 3, b3, 3, pts, 8, &np) == 1 && np == 1 && pts[0] == 0,
        "crossings: at a vertex of both, counted once");
  /* the same with a's vertex exactly on b but b's slanted, and at a vertex of both
   * polylines with more segments: 0.5 + 0.5i is a vertex of both */
  cplx a4[4] = {-1, 0.5 + 0.5 * I, 2 + I, 3}, b4[3] = {1 - 1 * I, 0.5 + 0.5 * I, 1 * I};
  check(geom_crossings(a4, 4, b4, 3, NULL, 0, &np) == 1 && np == 1,
        "crossings: slanted polylines through a common vertex, once");
  /* touching without crossing: a V whose tip lies on b, from the left and from the right;
   * b touching a at a vertex from above */
  cplx vl[3] = {-1 - 1 * I, 0, -1 + 1 * I}, vr[3] = {1 - 1 * I, 0, 1 + 1 * I}, line[2] = {-2 * I, 2 * I};
  cplx tb[3] = {I, 0, 1 + I};
  check(geom_crossings(vl, 3, line, 2, NULL, 0, &np) == 0, "crossings: V touching from the left = 0");
  check(geom_crossings(vr, 3, line, 2, NULL, 0, &np) == 0 && np == 0,
        "crossings: V touching from the right = 0");
  check(geom_crossings(ax, 2, tb, 3, NULL, 0, &np) == 0, "crossings: b touching a from above = 0");
  /* parallel and collinear segments, and disjoint ones */
  cplx par[2] = {-1 + I, 1 + I}, col[2] = {-0.5, 0.5}, far[2] = {5 + 5 * I, 6 + 7 * I};
  check(geom_crossings(ax, 2, par, 2, NULL, 0, &np) == 0 && np == 0, "crossings: parallel = 0");
  check(geom_crossings(ax, 2, col, 2, NULL, 0, &np) == 0 && np == 0, "crossings: collinear = 0");
  check(geom_crossings(ax, 2, far, 2, NULL, 0, &np) == 0 && np == 0, "crossings: disjoint = 0");
  /* a zigzag across the real axis three times: +1 -1 +1 = 1 at x = -1.5, 0, 1.5 */
  cplx zz[5] = {-2 - I, -1 + I, 1 - I, 2 + I, 2.5 + I}, big[2] = {-3, 3};
  int tot = geom_crossings(big, 2, zz, 5, pts, 8, &np);
  check(tot == 1 && np == 3 && cabs(pts[0] + 1.5) <= 1e-15 && cabs(pts[1]) <= 1e-15 &&
        cabs(pts[2] - 1.5) <= 1e-15, "crossings: zigzag = +1 -1 +1 at -1.5, 0, 1.5");
  /* maxpts bounds the points written, not the count */
  pts[1] = 42;
  check(geom_crossings(big, 2, zz, 5, pts, 1, &np) == 1 && np == 3 && pts[1] == 42,
        "crossings: at most maxpts points written, all counted");
  /* closed curves: a closed polyline crossed by a line through its inside crosses it
   * twice with opposite signs (Jordan) */
  check(geom_crossings(c, NP + 1, big, 2, NULL, 0, &np) == 0 && np == 2,
        "crossings: a line through a closed curve: two crossings, total 0");
}

/* ---- zeros (roots.c) ---------------------------------------------------------------- */

/* h(t) = (t - 1)(t + 2)(t - i)^2 = sum hp[j] t^j; jets by Taylor shift (repeated
 * synthetic division). */
static cplx hp[5];

static void poly_mul(cplx *out, const cplx *a, int na, const cplx *b, int nb) {
  for (int k = 0; k < na + nb - 1; k++) out[k] = 0;
  for (int i = 0; i < na; i++)
    for (int j = 0; j < nb; j++) out[i + j] += a[i] * b[j];
}

static int poly_jet(void *ctx, cplx t, size_t order, cplx *c) {
  long *calls = ctx;
  (*calls)++;
  cplx w[5];
  memcpy(w, hp, sizeof w);
  /* after step k, w[k] is the k-th Taylor coefficient at t */
  for (int k = 0; k < 5; k++)
    for (int j = 3; j >= k; j--) w[j] += t * w[j + 1];
  for (size_t k = 0; k <= order; k++) c[k] = k < 5 ? w[k] : 0;
  return STEEP_OK;
}

/* 1/(t - 0.5): a pole, c_k = (-1)^k (t - 0.5)^{-k-1} */
static int pole_jet(void *ctx, cplx t, size_t order, cplx *c) {
  (void)ctx;
  cplx u = 1.0 / (t - 0.5), p = u;
  for (size_t k = 0; k <= order; k++, p *= -u) c[k] = p;
  return STEEP_OK;
}

static void test_roots(void) {
  cplx f1[2] = {-1, 1}, f2[2] = {2, 1}, f3[2] = {-I, 1}, q12[3], q33[3];
  poly_mul(q12, f1, 2, f2, 2);
  poly_mul(q33, f3, 2, f3, 2);
  poly_mul(hp, q12, 3, q33, 3);
  long calls = 0;
  /* the jet callback itself: h and h' at 0.3 + 0.7i against the factored form */
  {
    cplx t = 0.3 + 0.7 * I, c[3];
    poly_jet(&calls, t, 2, c);
    cplx h = (t - 1) * (t + 2) * (t - I) * (t - I);
    cplx dh = (t + 2) * (t - I) * (t - I) + (t - 1) * (t - I) * (t - I) + 2 * (t - 1) * (t + 2) * (t - I);
    check(relerr(c[0], h) <= 1e-14 && relerr(c[1], dh) <= 1e-14, "poly_jet: h and h' (test helper)");
  }
  /* Newton from seeds near each zero: simple zeros 1, -2 (multiplicity 1), the double
   * zero i (multiplicity 2, polished as the simple zero of h'), all to 1e-12 */
  struct { cplx seed, want; int mult; } z[3] = {
    {1.2 + 0.1 * I, 1, 1}, {-2.3 - 0.2 * I, -2, 1}, {0.1 + 1.3 * I, I, 2}};
  for (int j = 0; j < 3; j++) {
    cplx root = 99;
    int mult = 0;
    int st = root_newton(poly_jet, &calls, z[j].seed, 0, 5, 1, 60, &root, &mult);
    char msg[120];
    snprintf(msg, sizeof msg, "root_newton: zero %g%+gi found to 1e-12 with multiplicity %d",
             creal(z[j].want), cimag(z[j].want), z[j].mult);
    check(st == ROOT_OK && cabs(root - z[j].want) <= 1e-12 * cabs(z[j].want) && mult == z[j].mult, msg);
  }
  /* from a seed far from every zero in a small disc, the iterate leaves the disc */
  {
    cplx root = 0;
    int mult = 0;
    int st = root_newton(poly_jet, &calls, 10, 10, 0.5, 1, 60, &root, &mult);
    check(st == ROOT_LEFT, "root_newton: no zero in the disc -> ROOT_LEFT");
  }
  /* argument principle: zeros with multiplicity inside circles */
  struct { cplx c; double r; int want; } circ[6] = {
    {0, 0.5, 0},          /* none */
    {1, 0.5, 1},          /* the simple zero 1 */
    {I, 0.5, 2},          /* the double zero i */
    {0.5 + 0.5 * I, 1, 3},/* 1 and i (twice) */
    {0, 3, 4},            /* all */
    {-2, 0.2, 1}};        /* -2 */
  for (int j = 0; j < 6; j++) {
    int count = -99;
    double dist = 1;
    int st = root_count(poly_jet, &calls, circ[j].c, circ[j].r, 20000, &count, &dist);
    char msg[120];
    snprintf(msg, sizeof msg, "root_count: %d zeros in |t - (%g%+gi)| < %g", circ[j].want,
             creal(circ[j].c), cimag(circ[j].c), circ[j].r);
    check(st == ROOT_OK && count == circ[j].want && dist <= 1e-6, msg);
  }
  {
    int count = 0;
    double dist = 0;
    /* |t| = 1 passes through the zeros 1 and i */
    check(root_count(poly_jet, &calls, 0, 1, 20000, &count, &dist) == ROOT_ONCIRCLE,
          "root_count: a zero on the circle -> ROOT_ONCIRCLE");
    /* zeros minus poles: 1/(t - 0.5) has one pole inside |t| = 1 */
    check(root_count(pole_jet, NULL, 0, 1, 20000, &count, &dist) == ROOT_OK && count == -1,
          "root_count: a pole counts -1");
  }
  /* the search of a disc: from the grid every zero of h in |t| < 3 (1, -2 and the double
   * zero i), each once, counted 4 with multiplicity; from one seed only, just its zero */
  {
    cplx at[ROOT_SEARCH_MAX(1)];
    int mult[ROOT_SEARCH_MAX(1)], cst = -1, count = -1, total = 0, seen[3] = {0, 0, 0};
    size_t n = 0;
    long newton = 0;
    cplx want[3] = {1, -2, I};
    root_search(poly_jet, &calls, &calls, 0, 3, 1, NULL, 0, 20000, 0, at, mult, &n, &newton,
                &cst, &count);
    for (size_t k = 0; k < n; k++) {
      total += cabs(at[k]) < 3 ? mult[k] : 0;
      for (int j = 0; j < 3; j++)
        if (cabs(at[k] - want[j]) <= 1e-12) seen[j] += j == 2 ? (mult[k] == 2) : (mult[k] == 1);
    }
    check(cst == ROOT_OK && count == 4 && total == 4 && n == 3 && seen[0] == 1 && seen[1] == 1 &&
              seen[2] == 1 && newton > 0,
          "root_search: every zero of h in |t| < 3 once, with multiplicity, counted 4");
    /* seeds by each zero reach the count: the grid is not searched (one Newton run per
     * seed, a handful of jets each, against 169 runs) */
    cplx near[3] = {1.1, -2.1, 0.05 + 1.05 * I};
    long grid_evals = newton;
    root_search(poly_jet, &calls, &calls, 0, 3, 1, near, 3, 20000, 0, at, mult, &n, &newton,
                &cst, &count);
    check(cst == ROOT_OK && count == 4 && n == 3 && newton < grid_evals / 5,
          "root_search: seeds that reach the count spare the grid");
    /* Aberth's iteration: the roots of (z - 1)(z + 2)(z - i)(z - 3i)(z + 0.5 - 0.5i), from the
     * expanded coefficients (bound 6 >= every |root|), each found once to 1e-13 */
    {
      cplx rts[5] = {1, -2, I, 3 * I, -0.5 + 0.5 * I}, c[6] = {1, 0, 0, 0, 0, 0}, z[5];
      for (int r = 0; r < 5; r++) {   /* c <- c (z - rts[r]), ascending powers */
        for (int k = r + 1; k >= 1; k--) c[k] = c[k - 1] - rts[r] * c[k];
        c[0] = -rts[r] * c[0];
      }
      int sweeps = root_aberth(c, 5, 6, z), found = 0;
      for (int r = 0; r < 5; r++)
        for (int k = 0; k < 5; k++) if (cabs(z[k] - rts[r]) <= 1e-13) { found++; break; }
      check(found == 5 && sweeps < 100, "root_aberth: five known roots from the coefficients");
    }
    cplx seed = -1.8 + 0.1 * I;
    root_search(poly_jet, &calls, &calls, 0, 3, 0, &seed, 1, 0, 0, at, mult, &n, &newton, &cst,
                &count);
    check(n == 1 && cabs(at[0] + 2) <= 1e-12 && mult[0] == 1 && cst == ROOT_FAIL,
          "root_search: from one seed and no grid, its zero -2 alone (no count)");
  }
}

/* ---- steepest paths (path.c) -------------------------------------------------------- */

/* A hand-built tape: n instructions, one output (the last slot). */
typedef struct { tape t; tape_ins ins[16]; int out[1]; unsigned char varying[16]; } htape;

static void htape_init(htape *h, const tape_ins *ins, size_t n, size_t nparams) {
  memcpy(h->ins, ins, n * sizeof *ins);
  h->t.n = n;
  h->t.nparams = nparams;
  h->t.nout = 1;
  h->t.ins = h->ins;
  h->t.out = h->out;
  h->t.varying = h->varying;
  h->out[0] = (int)n - 1;
}

static void path_defaults(path_opts *o, int descent) {
  memset(o, 0, sizeof *o);
  o->descent = descent;
  o->jumps = 1;
  o->cutoff = 40;
  o->ref = 0;
  o->center = 0;
  o->radius = 50;
  o->scale = 1;
  o->maxsteps = 4000;
}

/* max over the points of |Im F(pts[k]) - im| / max(1, |F|), F evaluated afresh */
static double im_drift(problem *p, const cplx *pts, size_t n, double im) {
  double worst = 0;
  for (size_t k = 0; k < n; k++) {
    cplx F;
    (void)problem_integrand(p, pts[k], &F);
    worst = fmax(worst, fabs(cimag(F) - im) / fmax(1, cabs(F)));
  }
  return worst;
}

/* Re F strictly falls (descent) or rises (ascent) from point to point */
static int monotone(const cplx *Fs, size_t n, int descent) {
  for (size_t k = 1; k < n; k++)
    if (descent ? !(creal(Fs[k]) < creal(Fs[k - 1])) : !(creal(Fs[k]) > creal(Fs[k - 1]))) return 0;
  return 1;
}

static void test_path(void) {
  enum { MAXP = 4000 };
  const char *why = "";
  cplx *pts = malloc(MAXP * sizeof *pts), *Fs = malloc(MAXP * sizeof *Fs);
  size_t n = 0;
  int which = 0;
  path_opts o;

  /* F(t) = -t^2/2: saddle at 0, descent along the real axis, ascent along the imaginary
   * axis (Im F = 0 on both; Re F = -t^2/2 resp. +s^2/2 at t = is). */
  htape g;
  const tape_ins gins[4] = {
    {OP_VAR, -1, -1, 0, 0}, {OP_POWI, 0, -1, 2, 0}, {OP_CONST, -1, -1, 0, -0.5},
    {OP_MUL, 1, 2, 0, 0}};
  htape_init(&g, gins, 4, 0);
  check(tape_check(&g.t, &why) == -1, "hand-built tape -t^2/2 is well formed");
  void *mem = malloc(problem_bytes(&g.t));
  problem p;
  problem_init(&p, &g.t, NULL, mem);
  {
    cplx F, dF;
    check(problem_dF(&p, 1.5 + 0.5 * I, &F, &dF) == STEEP_OK &&
          relerr(F, -0.5 * (1.5 + 0.5 * I) * (1.5 + 0.5 * I)) <= 1e-15 &&
          relerr(dF, -(1.5 + 0.5 * I)) <= 1e-15, "problem_dF on -t^2/2: F and F'");
  }
  path_defaults(&o, 1);
  int end = path_trace(&p, 0.01, 0, &o, pts, Fs, MAXP, &n, &which);
  double tend = creal(pts[n - 1]);
  check(end == PATH_LOW && n > 2 && im_drift(&p, pts, n, 0) <= 1e-10 && monotone(Fs, n, 1),
        "path -t^2/2: descent from the saddle keeps Im F = 0, Re F falls, ends PATH_LOW");
  /* it ends just past the cut-off: -t^2/2 < -40 at t > sqrt(80) */
  check(tend > sqrt(80) && -0.5 * tend * tend > -40 - 10 && fabs(cimag(pts[n - 1])) <= 1e-10,
        "path -t^2/2: descent ends on the positive real axis just past the cut-off");
  path_defaults(&o, 0);
  end = path_trace(&p, 0.01 * I, 0, &o, pts, Fs, MAXP, &n, &which);
  check(end == PATH_HIGH && im_drift(&p, pts, n, 0) <= 1e-10 && monotone(Fs, n, 0) &&
        cimag(pts[n - 1]) > sqrt(80) && fabs(creal(pts[n - 1])) <= 1e-10,
        "path -t^2/2: ascent up the imaginary axis ends PATH_HIGH");
  /* bounds and stops */
  path_defaults(&o, 1);
  o.maxsteps = 3;
  end = path_trace(&p, 0.01, 0, &o, pts, Fs, MAXP, &n, &which);
  check(end == PATH_BOUND && n == 4, "path: maxsteps = 3 -> PATH_BOUND after 3 steps");
  path_defaults(&o, 1);
  end = path_trace(&p, 0.01, 0, &o, pts, Fs, 3, &n, &which);
  check(end == PATH_BOUND && n == 3, "path: maxpts = 3 -> PATH_BOUND with 3 points");
  end = path_trace(&p, 0.01, 0, &o, pts, Fs, 1, &n, &which);
  check(end == PATH_BOUND && n == 0, "path: maxpts < 2 -> PATH_BOUND, nothing written");
  o.radius = 2;
  end = path_trace(&p, 0.01, 0, &o, pts, Fs, MAXP, &n, &which);
  check(end == PATH_EDGE && cabs(pts[n - 1]) > 2, "path: leaving |t| < 2 -> PATH_EDGE");
  path_defaults(&o, 1);
  cplx stop[1] = {3};
  double stop_r[1] = {0.1};
  o.stops = stop;
  o.stop_r = stop_r;
  o.nstops = 1;
  end = path_trace(&p, 0.01, 0, &o, pts, Fs, MAXP, &n, &which);
  check(end == PATH_STOP && which == 0 && cabs(pts[n - 1] - 3) <= 0.1,
        "path: reaching a stop point -> PATH_STOP with its index");
  free(mem);

  /* F(t) = i (t^3/3 + x t), x = 1 (the Airy exponent). By hand: F' = i (t^2 + 1)
   * vanishes at +-i, F(i) = -2/3, F''(i) = 2i * i = -2, so F - F(i) ~ -(t - i)^2:
   * descent starts horizontally and ends in the valleys arg t in (0, pi/3) and
   * (2pi/3, pi), where Re(i t^3) = -|t|^3 sin(3 arg t) < 0; ascent starts vertically,
   * up to where Re F grows without bound, and down along the imaginary axis (where F is
   * real and increasing downwards between i and -i) into the saddle -i. */
  htape ai;
  const tape_ins ains[9] = {
    {OP_VAR, -1, -1, 0, 0}, {OP_PARAM, -1, -1, 0, 0}, {OP_POWI, 0, -1, 3, 0},
    {OP_CONST, -1, -1, 0, 1.0 / 3}, {OP_MUL, 2, 3, 0, 0}, {OP_MUL, 1, 0, 0, 0},
    {OP_ADD, 4, 5, 0, 0}, {OP_CONST, -1, -1, 0, I}, {OP_MUL, 7, 6, 0, 0}};
  htape_init(&ai, ains, 9, 1);
  check(tape_check(&ai.t, &why) == -1, "hand-built tape i(t^3/3 + x t) is well formed");
  cplx params[1] = {1};
  mem = malloc(problem_bytes(&ai.t));
  problem_init(&p, &ai.t, params, mem);
  cplx t0 = I, F0 = -2.0 / 3, starts[2];
  {
    cplx F, dF;
    check(problem_dF(&p, t0, &F, &dF) == STEEP_OK && relerr(F, F0) <= 1e-15 && cabs(dF) <= 1e-15,
          "Airy exponent: F(i) = -2/3, F'(i) = 0");
  }
  check(path_saddle_starts(&p, t0, F0, 2, -1, 1, 1, starts) == STEEP_OK,
        "path_saddle_starts (descent) succeeds");
  int valleys_ok = 1, desc_ok = 1;
  for (int k = 0; k < 2; k++) {
    path_defaults(&o, 1);
    o.ref = creal(F0);
    end = path_trace(&p, starts[k], F0, &o, pts, Fs, MAXP, &n, &which);
    double th = carg(pts[n - 1]);
    if (!(end == PATH_LOW && im_drift(&p, pts, n, cimag(F0)) <= 1e-10 && monotone(Fs, n, 1)))
      desc_ok = 0;
    if (!((th > 0 && th < PI / 3) || (th > 2 * PI / 3 && th < PI))) valleys_ok = 0;
    /* Re F at the end is below the cut-off */
    if (!(creal(Fs[n - 1]) < creal(F0) - 40)) desc_ok = 0;
  }
  check(desc_ok, "Airy x=1: both descent paths from i keep Im F = 0 to 1e-10, end PATH_LOW");
  check(valleys_ok, "Airy x=1: descent paths end in the valleys (0, pi/3) and (2pi/3, pi)");
  check(path_saddle_starts(&p, t0, F0, 2, -1, 0, 1, starts) == STEEP_OK,
        "path_saddle_starts (ascent) succeeds");
  int asc_ok = 1;
  for (int k = 0; k < 2; k++) {
    path_defaults(&o, 0);
    /* stop at the other saddle -i: the downward ascent path runs into it */
    cplx other[1] = {-I};
    double rr[1] = {0.05};
    o.stops = other;
    o.stop_r = rr;
    o.nstops = 1;
    end = path_trace(&p, starts[k], F0, &o, pts, Fs, MAXP, &n, &which);
    int up = cimag(starts[k]) > 1;
    if (im_drift(&p, pts, n, cimag(F0)) > 1e-10 || !monotone(Fs, n, 0)) asc_ok = 0;
    if (up && !(end == PATH_HIGH && creal(Fs[n - 1]) - creal(F0) > 40)) asc_ok = 0;
    if (!up && !(end == PATH_STOP && which == 0)) asc_ok = 0;
  }
  check(asc_ok, "Airy x=1: ascent from i goes up to PATH_HIGH and down into the saddle -i");
  free(mem);
  free(pts);
  free(Fs);
}

/* ---- tape checking (tape.c) ------------------------------------------------------ */

/* Regression (found by tests/fuzz/fuzz_tape.c): tape_check accepted an instruction whose
 * unused operand was not -1, and tape_eval then read that slot, past the work array. */
static void test_tape_check(void) {
  const char *why = "";
  htape h;
  const tape_ins bad_const[2] = {{OP_CONST, -1, 7, 0, 1}, {OP_NEG, 0, -1, 0, 0}};
  htape_init(&h, bad_const, 2, 0);
  check(tape_check(&h.t, &why) == 0, "tape_check: const with an unused operand 7 is rejected");
  const tape_ins bad_unary[2] = {{OP_VAR, -1, -1, 0, 0}, {OP_EXP, 0, 0, 0, 0}};
  htape_init(&h, bad_unary, 2, 0);
  check(tape_check(&h.t, &why) == 1, "tape_check: exp with a second operand is rejected");
  const tape_ins good[3] = {{OP_VAR, -1, -1, 0, 0}, {OP_EXP, 0, -1, 0, 0}, {OP_ADD, 0, 1, 0, 0}};
  htape_init(&h, good, 3, 0);
  check(tape_check(&h.t, &why) == -1, "tape_check: unused operands -1 are accepted");
}

/* ---- inverse map (invmap.c) ---------------------------------------------------------- */

/* Regression (found by tests/fuzz/fuzz_paths.c, a timeout): following h(u) round the circle
 * refines a failing stretch four times over, up to 262144 steps, and did so again and
 * again; a trip now has a budget of 131072 + 16 N steps. F(t) = -i log(t + 36i) with the
 * cubic map of a tiny zeta on |u| = 4: u^3/3 swings by 21, so t would have to come within
 * e^-21 of the branch point -36i and go out to e^21 (the old code got round after about
 * 8.1 million jets). Each step takes at most 51 jets (2, 8 for the jump test, 41 for
 * Newton's method). */
static void test_invmap_budget(void) {
  htape h;
  const tape_ins ins[6] = {
    {OP_VAR, -1, -1, 0, 0}, {OP_CONST, -1, -1, 0, 36 * I}, {OP_ADD, 0, 1, 0, 0},
    {OP_LOG, 2, -1, 0, 0}, {OP_CONST, -1, -1, 0, -I}, {OP_MUL, 4, 3, 0, 0}};
  htape_init(&h, ins, 6, 0);
  const char *why = "";
  check(tape_check(&h.t, &why) == -1, "hand-built tape -i log(t + 36i) is well formed");
  void *mem = malloc(problem_bytes(&h.t));
  problem p;
  problem_init(&p, &h.t, NULL, mem);
  enum { N = 64 };
  cplx G[N], t1 = 0.14 + 0.02 * I, zeta = -6e-5 * (1 + I), F1, dF1;
  check(problem_dF(&p, t1, &F1, &dF1) == STEEP_OK, "F and F' of -i log(t + 36i) at t1");
  cplx A = F1 - zeta * zeta + zeta * zeta * zeta / 3;   /* u_a = zeta: F(t1) = P(u_a) */
  p.evals = 0;
  int st = invmap_cubic(&p, t1, A, zeta, zeta, 0.06 * I, 4, N, G);
  check(st == INVMAP_NEWTON && p.evals <= 51L * (131072 + 16 * N) + 41,
        "invmap_cubic: a map too stretched to follow gives up within its step budget");
  free(mem);
}

/* The quartic map of three saddles together on a map known in closed form: F(t) =
 * -(u^4/4 - zeta u^2/2 + eta u) with u = t + b t^2, so t(u) = (sqrt(1 + 4bu) - 1)/(2b) and
 * G = t'(u) = (1 + 4bu)^(-1/2) (exact formula). The roots 0.6, -0.1, -0.5 give zeta = 0.31,
 * eta = -0.03; the trip starts at u_a = 0.6 (the largest) and goes round |u| = 1.2,
 * inside the branch point u = -1/(4b) = -2.5. */
static void test_invmap_quartic(void) {
  const double b = 0.1;
  const cplx zeta = 0.31, eta = -0.03;
  htape h;
  const tape_ins ins[16] = {
    {OP_VAR, -1, -1, 0, 0}, {OP_CONST, -1, -1, 0, b}, {OP_POWI, 0, -1, 2, 0},
    {OP_MUL, 1, 2, 0, 0}, {OP_ADD, 0, 3, 0, 0},                       /* u = t + b t^2 */
    {OP_POWI, 4, -1, 2, 0}, {OP_POWI, 4, -1, 4, 0}, {OP_CONST, -1, -1, 0, 0.25},
    {OP_MUL, 7, 6, 0, 0}, {OP_CONST, -1, -1, 0, zeta / 2}, {OP_MUL, 9, 5, 0, 0},
    {OP_SUB, 8, 10, 0, 0}, {OP_CONST, -1, -1, 0, eta}, {OP_MUL, 12, 4, 0, 0},
    {OP_ADD, 11, 13, 0, 0}, {OP_NEG, 14, -1, 0, 0}};              /* F = -P(u) */
  htape_init(&h, ins, 16, 0);
  const char *why = "";
  check(tape_check(&h.t, &why) == -1, "hand-built tape of the quartic map is well formed");
  void *mem = malloc(problem_bytes(&h.t));
  problem p;
  problem_init(&p, &h.t, NULL, mem);
  enum { N = 64 };
  cplx G[N], ua = 0.6;
  cplx t1 = (csqrt(1 + 4 * b * ua) - 1) / (2 * b), tprime = 1 / csqrt(1 + 4 * b * ua);
  double rho = 1.2, worst = 0;
  int st = invmap_quartic(&p, t1, 0, zeta, eta, ua, tprime, rho, N, G);
  for (int j = 0; j < N; j++) {
    cplx w = rho * cexp(I * (6.283185307179586 * j / N));
    worst = fmax(worst, cabs(G[j] - 1 / csqrt(1 + 4 * b * w)));
  }
  char msg[120];
  snprintf(msg, sizeof msg, "invmap_quartic: G = t'(u) on |u| = 1.2 for u = t + t^2/10 "
           "(worst error %.3g)", worst);
  check(st == INVMAP_OK && worst < 1e-13, msg);
  free(mem);
}

/* ---- first derivatives (tape_dual_upto) against jets of order 1 ------------------ */

static void test_dual(void) {
  /* every unary operation on u = 0.3 t + 0.2 i, then combined with the others: value
   * and derivative must agree with the jet of order 1 (coefficients 0 and 1) to rounding */
  static const int unary[] = {OP_EXP, OP_LOG, OP_SQRT, OP_SIN, OP_COS, OP_TAN, OP_SINH,
                              OP_COSH, OP_TANH, OP_ATAN, OP_NEG, OP_POWI, OP_POWC};
  const cplx xs[3] = {0.7 + 0.4 * I, -1.3 + 0.2 * I, 0.1 - 2.1 * I};
  double worst = 0;
  int status_ok = 1;
  for (size_t u = 0; u < sizeof unary / sizeof *unary; u++) {
    htape h;
    const tape_ins ins[9] = {
      {OP_VAR, -1, -1, 0, 0}, {OP_CONST, -1, -1, 0, 0.3}, {OP_MUL, 1, 0, 0, 0},
      {OP_CONST, -1, -1, 0, 0.2 * I}, {OP_ADD, 2, 3, 0, 0},
      {unary[u], 4, -1, unary[u] == OP_POWI ? -3 : 0, unary[u] == OP_POWC ? 0.5 - 1.5 * I : 0},
      {OP_DIV, 5, 4, 0, 0}, {OP_SUB, 6, 0, 0, 0}, {OP_MUL, 7, 5, 0, 0}};
    htape_init(&h, ins, 9, 0);
    const char *why = "";
    if (tape_check(&h.t, &why) != -1) { status_ok = 0; continue; }
    cplx work[9 * 2], scratch[4 * 2], v[9], d[9];
    long bad;
    for (int k = 0; k < 3; k++) {
      int sj = tape_jet_upto(&h.t, xs[k], NULL, 1, work, scratch, &bad, 8);
      int sd = tape_dual_upto(&h.t, xs[k], NULL, v, d, &bad, 8);
      if (sj != STEEP_OK || sd != STEEP_OK) { status_ok = 0; continue; }
      worst = fmax(worst, fmax(relerr(v[8], work[16]), relerr(d[8], work[17])));
    }
  }
  check(status_ok, "tape_dual_upto: every operation evaluates where its jet does");
  check(worst <= 1e-13, "tape_dual_upto: value and derivative agree with the jet of order 1");
  /* singular points give the jets' statuses: log(0), 1/0, sqrt(0) */
  htape h;
  const tape_ins lg[2] = {{OP_VAR, -1, -1, 0, 0}, {OP_LOG, 0, -1, 0, 0}};
  const tape_ins sq[2] = {{OP_VAR, -1, -1, 0, 0}, {OP_SQRT, 0, -1, 0, 0}};
  const tape_ins inv[3] = {{OP_CONST, -1, -1, 0, 1}, {OP_VAR, -1, -1, 0, 0}, {OP_DIV, 0, 1, 0, 0}};
  cplx v[3], d[3];
  long bad = -1;
  const char *why = "";
  htape_init(&h, lg, 2, 0);
  check(tape_check(&h.t, &why) == -1 && tape_dual_upto(&h.t, 0, NULL, v, d, &bad, 1) == STEEP_SINGULAR &&
        bad == 1, "tape_dual_upto: log(0) is singular at slot 1");
  htape_init(&h, sq, 2, 0);
  check(tape_check(&h.t, &why) == -1 && tape_dual_upto(&h.t, 0, NULL, v, d, &bad, 1) == STEEP_BRANCH,
        "tape_dual_upto: sqrt(0) is a branch point");
  htape_init(&h, inv, 3, 0);
  check(tape_check(&h.t, &why) == -1 && tape_dual_upto(&h.t, 0, NULL, v, d, &bad, 2) == STEEP_SINGULAR,
        "tape_dual_upto: 1/0 is singular");
  /* the least long as an integer power (found by fuzzing: k - 1 overflowed): no undefined
   * behaviour, a status in range; and t^1 at 0 has derivative 1 */
  const tape_ins least[2] = {{OP_VAR, -1, -1, 0, 0}, {OP_POWI, 0, -1, LONG_MIN, 0}};
  htape_init(&h, least, 2, 0);
  int st = tape_check(&h.t, &why) == -1 ? tape_dual_upto(&h.t, 2, NULL, v, d, &bad, 1) : -1;
  check(st >= STEEP_OK && st <= STEEP_NONFINITE, "tape_dual_upto: t^LONG_MIN evaluates to a status");
  const tape_ins one[2] = {{OP_VAR, -1, -1, 0, 0}, {OP_POWI, 0, -1, 1, 0}};
  htape_init(&h, one, 2, 0);
  check(tape_check(&h.t, &why) == -1 && tape_dual_upto(&h.t, 0, NULL, v, d, &bad, 1) == STEEP_OK &&
        v[1] == 0 && d[1] == 1, "tape_dual_upto: t^1 at 0 has derivative 1");
}

/* ---- rings (rings.c) ------------------------------------------------------------- */

static void test_rings(void) {
  /* F(t) = 2i t^3 + t: the mean of F/t^3 over a circle about 0 is 2i exactly (the
   * trapezoidal rule integrates t^-2 to 0 on n >= 3 points); |F| grows like r^3 */
  htape h;
  const tape_ins ins[5] = {
    {OP_VAR, -1, -1, 0, 0}, {OP_POWI, 0, -1, 3, 0}, {OP_CONST, -1, -1, 0, 2 * I},
    {OP_MUL, 2, 1, 0, 0}, {OP_ADD, 3, 0, 0, 0}};
  htape_init(&h, ins, 5, 0);
  const char *why = "";
  check(tape_check(&h.t, &why) == -1, "hand-built tape 2i t^3 + t is well formed");
  void *mem = malloc(problem_bytes(&h.t));
  problem p;
  problem_init(&p, &h.t, NULL, mem);
  enum { N = 72 };
  cplx work[3 * N], l2, l3;
  double growth;
  int deg = ring_power(&p, 0, 10, 20, N, &growth, &l2, &l3, work);
  check(deg == 3 && fabs(growth - 3) < 1e-2 && cabs(l2 - 2 * I) <= 1e-14 && cabs(l3 - 2 * I) <= 1e-14,
        "ring_power: 2i t^3 + t grows like t^3 with leading coefficient 2i");
  /* about another centre the fit is F/t^3 still (t, not t - c): close to 2i far out */
  deg = ring_power(&p, 0.5 + 0.25 * I, 100, 200, N, &growth, &l2, &l3, work);
  check(deg == 3 && cabs(l3 - 2 * I) <= 1e-3, "ring_power: off-centre rings, same leading term");
  free(mem);

  /* F(t) = -t^2/2 (no amplitude): log |e^F| = -Re t^2 / 2, so on |t| = rho at the angles
   * (k + 1/2) 2pi/32 its spread is rho^2 cos(pi/16) */
  const tape_ins gins[4] = {
    {OP_VAR, -1, -1, 0, 0}, {OP_POWI, 0, -1, 2, 0}, {OP_CONST, -1, -1, 0, -0.5},
    {OP_MUL, 1, 2, 0, 0}};
  htape_init(&h, gins, 4, 0);
  mem = malloc(problem_bytes(&h.t));
  problem_init(&p, &h.t, NULL, mem);
  check(fabs(ring_log_spread(&p, 0, 2, 32) - 4 * cos(PI / 16)) <= 1e-13,
        "ring_log_spread: -t^2/2 on |t| = 2 spreads by 4 cos(pi/16)");
  check(isinf(ring_log_spread(&p, 0, 100, 32)), "ring_log_spread: INFINITY where e^F overflows");
  check(ring_power(&p, 0, 10, 20, N, &growth, &l2, &l3, work) == 2 && cabs(l3 + 0.5) <= 1e-14,
        "ring_power: -t^2/2 has degree 2, leading coefficient -1/2");
  free(mem);

  /* F(t) = t - 5 log t: the integrand e^t t^-5 has a pole of order 5 at 0 with residue
   * 1/4! (the Taylor coefficient of e^t). The quietest circle about it (radii 0.9 2^(-i/3))
   * and the trapezoidal rule on it give 1/24 to rounding; the log coefficient is -5. */
  {
    const tape_ins lins[5] = {
      {OP_VAR, -1, -1, 0, 0}, {OP_LOG, 0, -1, 0, 0}, {OP_CONST, -1, -1, 0, -5},
      {OP_MUL, 2, 1, 0, 0}, {OP_ADD, 0, 3, 0, 0}};
    htape_init(&h, lins, 5, 0);
    check(tape_check(&h.t, &why) == -1, "hand-built tape t - 5 log t is well formed");
    mem = malloc(problem_bytes(&h.t));
    problem_init(&p, &h.t, NULL, mem);
    enum { M = 256 };
    cplx *w = malloc((h.t.n * TAPE_BLOCK + (h.t.nout + 2) * M) * sizeof(cplx));
    cplx root[M], out[8], half[8], a = 0;
    double rho = 0, score = 0, spread = 0, vmax = 0;
    int ok = ring_quietest(&p, 0, 0.9, 61, 64, w, &rho, &score, &spread);
    /* max |f| rho on |t| = rho is e^rho rho^-4 (at the points (k + 1/2) 2pi/64, Re t is
     * at most rho cos(pi/64)): least at rho = 4, beyond 0.9 */
    check(ok && rho == 0.9 && fabs(score - (0.9 * cos(PI / 64) - 4 * log(0.9))) <= 1e-13 &&
              spread > 0,
          "ring_quietest: e^t t^-5 is quietest on the largest circle offered");
    for (int k = 0; k < M; k++) root[k] = cexp(-I * (2 * PI * k / M));
    circle_laurent(&p, 0, rho, M, 5, root, w, out, half, &vmax);
    check(fabs(creal(out[4] * rho) - 1.0 / 24) <= 1e-15 && fabs(cimag(out[4] * rho)) <= 1e-15 &&
              cabs(out[4] - half[4]) <= 1e-14 && vmax > 0,
          "circle_laurent: the residue of e^t t^-5 at 0 is 1/24");
    check(circle_log_coefficient(&p, 0, 0.5, 64, &a) == STEEP_OK && cabs(a + 5) <= 1e-14,
          "circle_log_coefficient: -5 in t - 5 log t");
    free(w);
    free(mem);
  }
  /* F(t) = 2/t + 3 log t: F' = -2 t^-2 + 3 t^-1, Laurent coefficients b_-2 = -2, b_-1 = 3,
   * the others 0 */
  {
    const tape_ins dins[7] = {
      {OP_VAR, -1, -1, 0, 0}, {OP_CONST, -1, -1, 0, 2}, {OP_DIV, 1, 0, 0, 0},
      {OP_LOG, 0, -1, 0, 0}, {OP_CONST, -1, -1, 0, 3}, {OP_MUL, 4, 3, 0, 0}, {OP_ADD, 2, 5, 0, 0}};
    htape_init(&h, dins, 7, 0);
    check(tape_check(&h.t, &why) == -1, "hand-built tape 2/t + 3 log t is well formed");
    mem = malloc(problem_bytes(&h.t));
    problem_init(&p, &h.t, NULL, mem);
    cplx w[64], b[5];   /* m = -4..0 */
    int st = circle_dF_laurent(&p, 0, 0.7, 64, 3, w, b);
    double other = fmax(fmax(cabs(b[0]), cabs(b[1])), cabs(b[4]));
    check(st == STEEP_OK && cabs(b[2] + 2) <= 1e-14 && cabs(b[3] - 3) <= 1e-14 && other <= 1e-14,
          "circle_dF_laurent: F' = -2/t^2 + 3/t");
    free(mem);
  }

  /* geom_nearest: the first nearest segment of 0 -> 1 -> 1 + i */
  cplx poly[3] = {0, 1, 1 + I};
  size_t seg = 9;
  check(fabs(geom_nearest(poly, 3, 2 + 0.5 * I, &seg) - 1) <= 1e-15 && seg == 1,
        "geom_nearest: a point beside the second segment");
  check(fabs(geom_nearest(poly, 3, 0.5 - 0.1 * I, &seg) - 0.1) <= 1e-15 && seg == 0,
        "geom_nearest: a point below the first segment");
}

/* ---- the complex logarithm (clog.h) ----------------------------------------------- */

/* steep_clog against the C library's clog: the same argument exactly, log|z| to a few
 * units of 2^-53 absolute (near |z| = 1 too, where the library is slower), on seeded
 * random points at every scale; 0 gives -infinity. */
static void test_clog(void) {
  double worst = 0;
  int same_arg = 1;
  for (int k = 0; k < 20000; k++) {
    double r = k % 2 ? 1 + 1e-3 * rnd() : pow(10, 300 * rnd());
    cplx z = r * cexp(I * PI * rnd());
    cplx a = steep_clog(z), b = clog(z);
    worst = fmax(worst, fabs(creal(a) - creal(b)) / fmax(1, fabs(creal(b))));
    if (cimag(a) != cimag(b)) same_arg = 0;
  }
  check(worst <= 4.5e-16 && same_arg, "steep_clog: clog's value to 4.5e-16 (absolute below 1)");
  cplx z0 = steep_clog(0);
  check(isinf(creal(z0)) && creal(z0) < 0 && cimag(z0) == 0, "steep_clog(0) = -infinity");
  check(cabs(steep_clog(-1) - I * PI) == 0, "steep_clog(-1) = i pi");
}

/* ---- several variables (mjet.c, mexpand.c, mcrit.c) ------------------------------ */

static double fact(int k) { double f = 1; for (int j = 2; j <= k; j++) f *= j; return f; }

/* the rank of the monomial with exponents e (by search: the test does not trust the
 * layout's own table) */
static size_t find_rank(const mlayout *ly, const int *e) {
  for (size_t i = 0; i < ly->N; i++) {
    int same = 1;
    for (int k = 0; k < ly->n; k++) if (ly->exps[i * (size_t)ly->n + (size_t)k] != e[k]) same = 0;
    if (same) return i;
  }
  return (size_t)-1;
}

static void test_multi(void) {
  /* the layout: binomial(n + D, n) monomials in graded order, binomial(d + n - 1, n - 1)
   * of degree d, and the dense table inverting the exponents */
  mlayout ly;
  void *mem = malloc(mlayout_bytes(3, 5));
  mlayout_init(&ly, 3, 5, mem);
  int ok = ly.N == 56;
  for (int d = 0; d <= 5; d++)
    ok = ok && ly.upto[d + 1] - ly.upto[d] == (size_t)((d + 2) * (d + 1) / 2);
  for (size_t i = 0; i < ly.N; i++) {
    int e[3] = {ly.exps[3 * i], ly.exps[3 * i + 1], ly.exps[3 * i + 2]};
    ok = ok && find_rank(&ly, e) == i && (size_t)ly.rank[ly.code[i]] == i &&
         e[0] + e[1] + e[2] == ly.degree[i] && (i == 0 || ly.degree[i] >= ly.degree[i - 1]);
  }
  check(ok, "mlayout: 56 monomials of degree <= 5 in 3 variables, graded, ranks invert codes");
  free(mem);
  check(mlayout_bytes(5, 2) == 0 && mlayout_bytes(4, 100) == 0,
        "mlayout: 5 variables, or a dense table too large, are refused");

  /* mpoly_mul against the schoolbook product by exponents, n = 2, D = 7 */
  mem = malloc(mlayout_bytes(2, 7));
  mlayout_init(&ly, 2, 7, mem);
  cplx a[36], b[36], c[36], want[36];
  for (size_t i = 0; i < ly.N; i++) { a[i] = 0.5 * (rnd() + I * rnd()); b[i] = rnd() + I * rnd(); want[i] = 0; }
  for (size_t i = 0; i < ly.N; i++)
    for (size_t j = 0; j < ly.N; j++) {
      int e[2] = {ly.exps[2 * i] + ly.exps[2 * j], ly.exps[2 * i + 1] + ly.exps[2 * j + 1]};
      if (e[0] + e[1] <= 7) want[find_rank(&ly, e)] += a[i] * b[j];
    }
  mpoly_mul(&ly, c, a, b, 7);
  check(maxdiff(c, want, ly.N) <= 1e-13, "mpoly_mul: the truncated product");
  /* exp(a) exp(-a) = 1 by composition with exp's series at a0 (Griewank & Walther 2008,
   * Table 13.2: exp' = exp) */
  cplx f1[8], f2[8], work[72], ea[36], ema[36], na[36];
  for (int k = 0; k <= 7; k++) {
    f1[k] = cexp(a[0]) / fact(k);
    f2[k] = cexp(-a[0]) / fact(k);   /* exp at -a0, composed with -a + a0 */
  }
  for (size_t i = 0; i < ly.N; i++) na[i] = -a[i];
  mpoly_compose(&ly, ea, a, f1, 7, work);
  mpoly_compose(&ly, ema, na, f2, 7, work);
  mpoly_mul(&ly, c, ea, ema, 7);
  c[0] -= 1;
  /* (the tolerance is relative to the size of the products that cancel) */
  double worst = 0, size = 0;
  for (size_t i = 0; i < ly.N; i++) { worst = fmax(worst, cabs(c[i])); size = fmax(size, cabs(ea[i]) * cabs(ema[i])); }
  check(worst <= 1e-14 * fmax(1, size), "mpoly_compose: exp(a) exp(-a) = 1");
  free(mem);

  /* a tape in two variables (parameter slots 0 and 1): exp(x + 2y); its jet at 0 has
   * coefficients 2^j / (i! j!) (exact series) */
  htape h;
  const tape_ins ins[6] = {
    {OP_PARAM, -1, -1, 0, 0}, {OP_PARAM, -1, -1, 1, 0}, {OP_CONST, -1, -1, 0, 2},
    {OP_MUL, 1, 2, 0, 0}, {OP_ADD, 0, 3, 0, 0}, {OP_EXP, 4, -1, 0, 0}};
  htape_init(&h, ins, 6, 2);
  const char *why = "";
  int slots[2] = {0, 1};
  cplx params[2] = {0, 0}, x0[2] = {0, 0};
  mem = malloc(mlayout_bytes(2, 6));
  mlayout_init(&ly, 2, 6, mem);
  cplx *w = malloc(6 * ly.N * sizeof *w), *scr = malloc(mjet_scratch_len(&ly, &h.t, 6) * sizeof *scr);
  long bad = -1;
  int st = tape_check(&h.t, &why) == -1 ? mjet_tape(&ly, &h.t, params, slots, x0, NULL, 6, 5, w, scr, &bad) : -1;
  worst = 0;
  for (size_t i = 0; st == STEEP_OK && i < ly.N; i++) {
    int e0 = ly.exps[2 * i], e1 = ly.exps[2 * i + 1];
    worst = fmax(worst, cabs(w[5 * ly.N + i] - pow(2, e1) / (fact(e0) * fact(e1))));
  }
  check(st == STEEP_OK && worst <= 1e-15, "mjet_tape: exp(x + 2y) against its exact series");
  /* log of the variable at 0: singular, at the log's slot */
  const tape_ins lg[2] = {{OP_PARAM, -1, -1, 0, 0}, {OP_LOG, 0, -1, 0, 0}};
  htape_init(&h, lg, 2, 2);
  st = tape_check(&h.t, &why) == -1 ? mjet_tape(&ly, &h.t, params, slots, x0, NULL, 3, 1, w, scr, &bad) : -1;
  check(st == STEEP_SINGULAR && bad == 1, "mjet_tape: log 0 is singular at slot 1");
  free(w);
  free(scr);
  free(mem);

  /* Isserlis' theorem (Isserlis, Biometrika 12 (1918)) for Sigma = [[p, q], [q, r]]:
   * E x^2 = p, E x y = q, E x^4 = 3 p^2, E x^3 y = 3 p q, E x^2 y^2 = p r + 2 q^2 */
  mem = malloc(mlayout_bytes(2, 6));
  mlayout_init(&ly, 2, 6, mem);
  cplx pp = 0.7 + 0.2 * I, qq = -0.3 + 0.1 * I, rr = 1.1;
  cplx Sig[4] = {pp, qq, qq, rr}, mom[28];
  int kinds[2] = {MEXP_FULL, MEXP_FULL};
  mexpand_gauss_moments(&ly, kinds, Sig, mom);
  int e20[2] = {2, 0}, e11[2] = {1, 1}, e40[2] = {4, 0}, e31[2] = {3, 1}, e22[2] = {2, 2}, e30[2] = {3, 0};
  check(cabs(mom[find_rank(&ly, e20)] - pp) < 1e-15 && cabs(mom[find_rank(&ly, e11)] - qq) < 1e-15 &&
        cabs(mom[find_rank(&ly, e40)] - 3 * pp * pp) < 1e-15 &&
        cabs(mom[find_rank(&ly, e31)] - 3 * pp * qq) < 1e-15 &&
        cabs(mom[find_rank(&ly, e22)] - (pp * rr + 2 * qq * qq)) < 1e-15 &&
        mom[find_rank(&ly, e30)] == 0, "mexpand_gauss_moments: Isserlis' theorem in 2 variables");
  free(mem);

  /* the terms for F = -(x^2 + y^2)/2 and g = x^2 (both exact Gaussian integrals): T_0 = 0,
   * T_2 = Sigma_xx = 1, everything else 0; with x an edge (F = -x - y^2/2, g = 1): the
   * Watson and Gaussian factors are exact, T_0 = 1 and the rest 0 */
  mem = malloc(mlayout_bytes(2, 12));
  mlayout_init(&ly, 2, 12, mem);
  cplx *Fj = calloc(ly.N, sizeof *Fj), *gj = calloc(ly.N, sizeof *gj), terms[5];
  cplx *ms = malloc(mexpand_scratch_len(&ly) * sizeof *ms);
  Fj[find_rank(&ly, e20)] = -0.5;
  int e02[2] = {0, 2}, e10[2] = {1, 0};
  Fj[find_rank(&ly, e02)] = -0.5;
  gj[find_rank(&ly, e20)] = 1;
  cplx id[4] = {1, 0, 0, 1};
  st = mexpand_terms(&ly, Fj, gj, kinds, id, 4, terms, NULL, ms);
  check(st == STEEP_OK && cabs(terms[0]) == 0 && cabs(terms[2] - 1) < 1e-15 && cabs(terms[1]) == 0 &&
        cabs(terms[3]) == 0 && cabs(terms[4]) == 0, "mexpand_terms: a Gaussian moment exactly");
  Fj[find_rank(&ly, e20)] = 0;
  Fj[find_rank(&ly, e10)] = -1;
  gj[find_rank(&ly, e20)] = 0;
  gj[0] = 1;
  int kinds2[2] = {MEXP_EDGE, MEXP_FULL};
  st = mexpand_terms(&ly, Fj, gj, kinds2, id, 4, terms, NULL, ms);
  check(st == STEEP_OK && cabs(terms[0] - 1) < 1e-15 && cabs(terms[1]) + cabs(terms[2]) +
        cabs(terms[3]) + cabs(terms[4]) == 0, "mexpand_terms: Watson times Gaussian exactly");
  Fj[find_rank(&ly, e10)] = 0;
  check(mexpand_terms(&ly, Fj, gj, kinds2, id, 4, terms, NULL, ms) == STEEP_SINGULAR,
        "mexpand_terms: an edge without slope is refused");
  free(Fj);
  free(gj);
  free(ms);
  free(mem);

  /* mcrit_solve on a 3 x 3 system with a known solution */
  cplx A[9] = {2, 1, 0, 1, 3, 1, 0, 1, 4}, y[3] = {1, I, -1}, rhs[3];
  for (int i = 0; i < 3; i++) rhs[i] = A[3 * i] * y[0] + A[3 * i + 1] * y[1] + A[3 * i + 2] * y[2];
  double rc = 0;
  check(mcrit_solve(3, A, rhs, &rc) == STEEP_OK && maxdiff(rhs, y, 3) < 1e-15 && rc > 0.1,
        "mcrit_solve: a 3 x 3 system");
  cplx S[4] = {1, 2, 2, 4}, r2[2] = {1, 1};
  check(mcrit_solve(2, S, r2, &rc) == STEEP_SINGULAR, "mcrit_solve: a singular matrix");

  /* F = x^3/3 - x + y^3/3 - 4y: grad (x^2 - 1, y^2 - 4); Newton from (2, 3) reaches (1, 2);
   * deflated by (1, 2), from the same seed it reaches another root; the homotopy's four
   * paths end at the four roots (+-1, +-2), each once */
  const tape_ins cub[11] = {
    {OP_PARAM, -1, -1, 0, 0}, {OP_POWI, 0, -1, 3, 0}, {OP_CONST, -1, -1, 0, 1.0 / 3},
    {OP_MUL, 1, 2, 0, 0}, {OP_SUB, 3, 0, 0, 0}, {OP_PARAM, -1, -1, 1, 0},
    {OP_POWI, 5, -1, 3, 0}, {OP_MUL, 6, 2, 0, 0}, {OP_CONST, -1, -1, 0, 4},
    {OP_MUL, 8, 5, 0, 0}, {OP_SUB, 7, 9, 0, 0}};
  tape_ins all[12];
  memcpy(all, cub, sizeof cub);
  all[11] = (tape_ins){OP_ADD, 4, 10, 0, 0};
  htape_init(&h, all, 12, 2);
  check(tape_check(&h.t, &why) == -1, "the cubic tape checks");
  mproblem mp;
  void *pm = malloc(mproblem_bytes(&h.t, 2));
  mproblem_init(&mp, &h.t, params, slots, 2, pm);
  cplx seed[2] = {2, 3}, root[2], root2[2];
  int it = 0;
  st = mcrit_newton(&mp, seed, NULL, 0, INFINITY, 1e-14, 50, root, &it);
  check(st == MCRIT_OK && cabs(root[0] - 1) < 1e-14 && cabs(root[1] - 2) < 1e-14,
        "mcrit_newton: (1, 2) from (2, 3)");
  st = mcrit_newton(&mp, seed, root, 1, 2.0, 1e-14, 200, root2, &it);
  cplx F0, g0[2];
  check(st == MCRIT_OK && cabs(root2[0] - root[0]) + cabs(root2[1] - root[1]) > 0.5 &&
        mproblem_derivs(&mp, root2, &F0, g0, NULL) == STEEP_OK && cabs(g0[0]) + cabs(g0[1]) < 1e-12,
        "mcrit_newton: deflation finds another critical point");
  int degs[2] = {2, 2}, hits[4] = {0, 0, 0, 0}, good = 1;
  for (int pth = 0; pth < 4; pth++) {
    cplx start[2] = {pth % 2 ? -1 : 1, pth / 2 ? -1 : 1}, end[2];
    int steps = 0;
    st = mcrit_track(&mp, degs, 0.8109 + 0.5852 * I, start, 1e8, 4000, end, &rc, &steps);
    if (st != MCRIT_OK) { good = 0; continue; }
    int k = (creal(end[0]) < 0) + 2 * (creal(end[1]) < 0);
    if (fabs(fabs(creal(end[0])) - 1) > 1e-12 || fabs(fabs(creal(end[1])) - 2) > 1e-12) good = 0;
    hits[k]++;
  }
  check(good && hits[0] == 1 && hits[1] == 1 && hits[2] == 1 && hits[3] == 1,
        "mcrit_track: four paths, four roots, each once");
  free(pm);
}

int main(void) {
  test_series();
  test_quad();
  test_quad_polyline();
  test_geom();
  test_roots();
  test_path();
  test_tape_check();
  test_invmap_budget();
  test_invmap_quartic();
  test_rings();
  test_clog();
  test_merge_vertices();
  test_dual();
  test_airy();
  test_multi();
  printf("kernels: %d passed, %d failed\n", passed, failed);
  return failed ? 1 : 0;
}
