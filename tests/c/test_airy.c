/*
 * test_airy.c — kernel tests of airy.c: the remainder factor against DLMF Table 9.7.1;
 * identities that hold for every complex z, checked at seeded random points from the
 * origin to |z| = 16 (both methods and their switch), each within the error estimates
 * the kernel reports; values at 0; the statuses past the range of a double; and the
 * valleys of the cubic model where the answer is known by hand.
 */
#include <float.h>
#include <math.h>
#include <stdio.h>
#include "airy.h"
#include "kernel_check.h"

#define PI 3.14159265358979323846

static const cplx OMEGA = -0.5 + 0.86602540378443864676 * I;   /* e^{2 pi i/3} */

static void test_chi(void) {
  /* DLMF Table 9.7.1 (2D): chi(1..20); the bound must be above each (beyond the second
   * decimal) and not wastefully so (within 40%) */
  static const double table[20] = {1.57, 2.00, 2.36, 2.67, 2.95, 3.20, 3.44, 3.66, 3.87,
                                   4.06, 4.25, 4.43, 4.61, 4.77, 4.94, 5.09, 5.24, 5.39,
                                   5.54, 5.68};
  int ok = 1;
  for (int n = 1; n <= 20; n++) {
    double b = airy_chi_bound(n);
    if (!(b >= table[n - 1] + 0.005 && b <= 1.4 * table[n - 1])) ok = 0;
  }
  check(ok, "airy_chi_bound: above chi(n) of DLMF Table 9.7.1, within 40%");
}

static void test_origin(void) {
  cplx a, d, b, bd;
  double ea, ed, eb, ebd;
  airy_ai(0, &a, &d, &ea, &ed);
  airy_bi(0, &b, &bd, &eb, &ebd);
  /* DLMF 9.2.3-9.2.4 (values to 20 digits, from memory): Ai(0) = 0.35502805388781723926,
   * Ai'(0) = -0.25881940379280679840; Bi = sqrt(3) Ai, Bi' = -sqrt(3) Ai' at 0 (DLMF
   * 9.2.5-9.2.6) */
  check(fabs(creal(a) - 0.35502805388781723926) <= 1e-16 && cimag(a) == 0, "Ai(0)");
  check(fabs(creal(d) + 0.25881940379280679840) <= 1e-16 && cimag(d) == 0, "Ai'(0)");
  check(fabs(creal(b) - sqrt(3.0) * 0.35502805388781723926) <= 3e-16, "Bi(0) = sqrt 3 Ai(0)");
  check(fabs(creal(bd) - sqrt(3.0) * 0.25881940379280679840) <= 3e-16, "Bi'(0) = -sqrt 3 Ai'(0)");
  check(ea <= 4 * DBL_EPSILON && ed <= 4 * DBL_EPSILON, "error estimates at 0: rounding only");
}

/* A random point with |z| in [r0, r1), any phase. */
static cplx random_point(double r0, double r1) {
  double r = r0 + (r1 - r0) * 0.5 * (rnd() + 1), th = PI * rnd();
  return r * cexp(I * th);
}

static void test_identities(void) {
  int ok_w = 1, ok_c = 1, ok_cd = 1, ok_real = 1;
  double worst_w = 0, worst_c = 0;
  for (int trial = 0; trial < 600; trial++) {
    /* radii spread over the Maclaurin region, the overlap and the expansions */
    double r0 = trial < 200 ? 0 : trial < 400 ? 7 : 12;
    cplx z = random_point(r0, r0 + (trial < 200 ? 7 : trial < 400 ? 5 : 4));
    cplx a, d, b, bd;
    double ea, ed, eb, ebd;
    int s1 = airy_ai(z, &a, &d, &ea, &ed), s2 = airy_bi(z, &b, &bd, &eb, &ebd);
    if (s1 != AIRY_OK || s2 != AIRY_OK) { ok_w = 0; continue; }
    /* Wronskian Ai Bi' - Ai' Bi = 1/pi (DLMF 9.2.7), within the propagated estimates */
    cplx W = a * bd - d * b;
    double eW = ea * cabs(bd) + ebd * cabs(a) + ed * cabs(b) + eb * cabs(d) +
                4 * DBL_EPSILON * (cabs(a * bd) + cabs(d * b));
    if (!(cabs(W - 1 / PI) <= eW)) ok_w = 0;
    worst_w = fmax(worst_w, cabs(W - 1 / PI) / eW);
    /* Ai(z) + omega Ai(omega z) + omega^2 Ai(omega^2 z) = 0 and the derivative's
     * Ai'(z) + omega^2 Ai'(omega z) + omega Ai'(omega^2 z) = 0 (DLMF 9.2.12). The rotated
     * arguments are rounded (relative 2 eps): that moves Ai by |Ai'| |dz| and Ai' by
     * |z Ai| |dz|, allowed for too. */
    cplx z1 = OMEGA * z, z2 = conj(OMEGA) * z;
    cplx a1, d1, a2, d2;
    double e1, f1, e2, f2;
    airy_ai(z1, &a1, &d1, &e1, &f1);
    airy_ai(z2, &a2, &d2, &e2, &f2);
    double dz = 2 * DBL_EPSILON * cabs(z);
    cplx sum = a + OMEGA * a1 + conj(OMEGA) * a2;
    double tol = ea + e1 + e2 + dz * (cabs(d1) + cabs(d2)) +
                 4 * DBL_EPSILON * (cabs(a) + cabs(a1) + cabs(a2));
    if (!(cabs(sum) <= tol)) ok_c = 0;
    worst_c = fmax(worst_c, cabs(sum) / tol);
    cplx sumd = d + conj(OMEGA) * d1 + OMEGA * d2;
    double told = ed + f1 + f2 + dz * cabs(z) * (cabs(a1) + cabs(a2)) +
                  4 * DBL_EPSILON * (cabs(d) + cabs(d1) + cabs(d2));
    if (!(cabs(sumd) <= told)) ok_cd = 0;
    /* real arguments give real values */
    double x = creal(z);
    airy_ai(x, &a, &d, &ea, &ed);
    airy_bi(x, &b, &bd, &eb, &ebd);
    if (cimag(a) != 0 || cimag(d) != 0 || cimag(b) != 0 || cimag(bd) != 0) ok_real = 0;
  }
  char msg[160];
  snprintf(msg, sizeof msg, "Wronskian Ai Bi' - Ai' Bi = 1/pi within the estimates, |z| < 16 "
           "(worst ratio %.2f)", worst_w);
  check(ok_w, msg);
  snprintf(msg, sizeof msg, "connection formula for Ai within the estimates (worst ratio %.2f)",
           worst_c);
  check(ok_c, msg);
  check(ok_cd, "connection formula for Ai' within the estimates");
  check(ok_real, "real arguments: real values");
}

static void test_range(void) {
  cplx a, d;
  double ea, ed;
  /* Ai(200) ~ e^{-1886}: below the smallest double */
  int st = airy_ai(200, &a, &d, &ea, &ed);
  check(st == AIRY_UNDERFLOW && cabs(a) <= DBL_MIN && ea >= DBL_MIN, "Ai(200) underflows");
  /* Ai(-200 + 200 i e^{...}): |Ai| ~ e^{|Re zeta|} past the largest double along
   * ph z = 2pi/3 */
  st = airy_ai(200 * OMEGA, &a, &d, &ea, &ed);
  check(st == AIRY_OVERFLOW && isinf(creal(a)) && isinf(ea), "Ai(200 e^{2 pi i/3}) overflows");
  st = airy_ai(NAN, &a, &d, &ea, &ed);
  check(st == AIRY_NONFINITE, "Ai(NaN): status nonfinite");
  /* Ai(-1e6): |Ai| <= x^{-1/4}/sqrt(pi) (DLMF 9.7.9's leading amplitude); a value of
   * that size with an error estimate of at most that size */
  st = airy_ai(-1e6, &a, &d, &ea, &ed);
  check(st == AIRY_OK && cabs(a) <= 1.01 / (sqrt(PI) * pow(1e6, 0.25)) && ea < 1e-3,
        "Ai(-1e6): bounded, with an estimate");
}

static void test_model_valleys(void) {
  int hit;
  /* P(u) = u - u^3/3 (zeta = 1): along the real axis P has a maximum at u = 1 and a
   * minimum at u = -1. From 1 the descent direction 0 runs to +infinity (valley 0); the
   * direction pi runs down the real axis into the saddle -1 (a Stokes line). From -1 the
   * descent directions are +-pi/2, ending in the valleys at 2pi/3 and -2pi/3. */
  check(airy_model_valley(1, 1, 0.1, &hit) == 0, "model: from u = 1 along 0 to valley 0");
  check(airy_model_valley(1, 1, PI, &hit) == -2 && hit, "model: from u = 1 along pi, into -1");
  check(airy_model_valley(1, -1, PI / 2, &hit) == 1, "model: from u = -1 up to valley 1");
  check(airy_model_valley(1, -1, -PI / 2 + 0.3, &hit) == 2, "model: from u = -1 down to 2");
  check(airy_model_valley(1, -1, 0, &hit) == -1, "model: no descent direction near 0 at -1");
  /* zeta = -1 (saddles +-i): P(i) = -2i/3, P(-i) = 2i/3, Im P differs: from i the
   * descent directions are 3pi/4 and -pi/4 (arg P''(i) = -pi/2), ending in valleys 1, 0 */
  check(airy_model_valley(-1, I, 3 * PI / 4, &hit) == 1, "model zeta = -1: from i to valley 1");
  check(airy_model_valley(-1, I, -PI / 4, &hit) == 0, "model zeta = -1: from i to valley 0");
  /* two saddles 2e-8 apart: the same answers at the scale of the pair */
  check(airy_model_valley(1e-16, 1e-8, 0.1, &hit) == 0, "model zeta = 1e-16: valley 0");
  check(airy_model_valley(1e-16, -1e-8, PI / 2, &hit) == 1, "model zeta = 1e-16: valley 1");
}

void test_airy(void) {
  test_chi();
  test_origin();
  test_identities();
  test_range();
  test_model_valleys();
}
