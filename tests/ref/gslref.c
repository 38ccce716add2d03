/* gslref — GSL reference values for the tests (test-only; not installed).
 *
 * Each function calls the gsl_sf_*_e (or gsl_cdf_*) routine, checks its status and
 * raises a Lua error carrying gsl_strerror on failure. The special functions return
 * (value, error estimate) as GSL reports them; the cdf_* and *_pdf functions return the
 * value.
 * faddeeva_w comes from libcerf (w_of_z), not GSL: it returns the real and imaginary
 * parts of w(z) = exp(-z^2) erfc(-iz) (DLMF 7.2.3) and has no error estimate.
 * stirling_gamma comes from exact rational arithmetic (GMP), not GSL.
 * airy_quad comes from neither: Ai and Ai' by their asymptotic expansions summed in
 * quadruple precision (GCC's __float128, libquadmath), for |z| >= 20, where double
 * precision cannot hold the phase zeta = (2/3) z^(3/2) to the last digit (this file is
 * therefore compiled as gnu11).
 */
#include <lua.h>
#include <lauxlib.h>
#include <complex.h>
#include <math.h>
#include <stdlib.h>

#include <gsl/gsl_errno.h>
#include <gsl/gsl_mode.h>
#include <gsl/gsl_sf_airy.h>
#include <gsl/gsl_sf_bessel.h>
#include <gsl/gsl_sf_erf.h>
#include <gsl/gsl_sf_expint.h>
#include <gsl/gsl_sf_gamma.h>
#include <gsl/gsl_sf_psi.h>
#include <gsl/gsl_sf_result.h>
#include <gsl/gsl_cdf.h>
#include <gsl/gsl_randist.h>

#include <cerf.h>
#include <gmp.h>
#include <quadmath.h>

static int fail(lua_State *L, const char *fname, int status)
{
  return luaL_error(L, "gslref.%s: GSL error %d (%s)", fname, status, gsl_strerror(status));
}

static int push_result(lua_State *L, const char *fname, int status, const gsl_sf_result *r)
{
  if (status != GSL_SUCCESS) return fail(L, fname, status);
  lua_pushnumber(L, r->val);
  lua_pushnumber(L, r->err);
  return 2;
}

static int l_airy_Ai(lua_State *L)
{
  gsl_sf_result r;
  int st = gsl_sf_airy_Ai_e(luaL_checknumber(L, 1), GSL_PREC_DOUBLE, &r);
  return push_result(L, "airy_Ai", st, &r);
}

static int l_airy_Ai_deriv(lua_State *L)
{
  gsl_sf_result r;
  int st = gsl_sf_airy_Ai_deriv_e(luaL_checknumber(L, 1), GSL_PREC_DOUBLE, &r);
  return push_result(L, "airy_Ai_deriv", st, &r);
}

static int l_airy_Bi(lua_State *L)
{
  gsl_sf_result r;
  int st = gsl_sf_airy_Bi_e(luaL_checknumber(L, 1), GSL_PREC_DOUBLE, &r);
  return push_result(L, "airy_Bi", st, &r);
}

static int l_airy_Bi_deriv(lua_State *L)
{
  gsl_sf_result r;
  int st = gsl_sf_airy_Bi_deriv_e(luaL_checknumber(L, 1), GSL_PREC_DOUBLE, &r);
  return push_result(L, "airy_Bi_deriv", st, &r);
}

static int l_bessel_Jn(lua_State *L)
{
  gsl_sf_result r;
  lua_Integer n = luaL_checkinteger(L, 1);
  luaL_argcheck(L, n >= -100000 && n <= 100000, 1, "order out of range");
  int st = gsl_sf_bessel_Jn_e((int)n, luaL_checknumber(L, 2), &r);
  return push_result(L, "bessel_Jn", st, &r);
}

/* bessel_I0_scaled(x) -> e^{-|x|} I0(x) (DLMF 10.25.2), error */
static int l_bessel_I0_scaled(lua_State *L)
{
  gsl_sf_result r;
  int st = gsl_sf_bessel_I0_scaled_e(luaL_checknumber(L, 1), &r);
  return push_result(L, "bessel_I0_scaled", st, &r);
}

static int l_expint_E1(lua_State *L)
{
  gsl_sf_result r;
  int st = gsl_sf_expint_E1_e(luaL_checknumber(L, 1), &r);
  return push_result(L, "expint_E1", st, &r);
}

static int l_expint_E1_scaled(lua_State *L)
{
  gsl_sf_result r;
  int st = gsl_sf_expint_E1_scaled_e(luaL_checknumber(L, 1), &r);
  return push_result(L, "expint_E1_scaled", st, &r);
}

static int l_erfc(lua_State *L)
{
  gsl_sf_result r;
  int st = gsl_sf_erfc_e(luaL_checknumber(L, 1), &r);
  return push_result(L, "erfc", st, &r);
}

/* faddeeva_w(re, im) -> Re w(z), Im w(z) for z = re + i im (libcerf's w_of_z). A
 * non-finite result (w overflows for Im z very negative) is reported as an error. */
static int l_faddeeva_w(lua_State *L)
{
  double x = luaL_checknumber(L, 1), y = luaL_checknumber(L, 2);
  double _Complex w = w_of_z(x + y * I);
  if (!isfinite(creal(w)) || !isfinite(cimag(w)))
    return luaL_error(L, "gslref.faddeeva_w: w(%f + %f i) is not finite", x, y);
  lua_pushnumber(L, creal(w));
  lua_pushnumber(L, cimag(w));
  return 2;
}

static int l_gamma(lua_State *L)
{
  gsl_sf_result r;
  int st = gsl_sf_gamma_e(luaL_checknumber(L, 1), &r);
  return push_result(L, "gamma", st, &r);
}

static int l_lngamma(lua_State *L)
{
  gsl_sf_result r;
  int st = gsl_sf_lngamma_e(luaL_checknumber(L, 1), &r);
  return push_result(L, "lngamma", st, &r);
}

/* lngamma_complex(re, im) -> log|Gamma(z)|, arg Gamma(z) (the phase, in (-pi, pi]),
 * and their error estimates. */
static int l_lngamma_complex(lua_State *L)
{
  gsl_sf_result lnr, arg;
  int st = gsl_sf_lngamma_complex_e(luaL_checknumber(L, 1), luaL_checknumber(L, 2), &lnr, &arg);
  if (st != GSL_SUCCESS) return fail(L, "lngamma_complex", st);
  lua_pushnumber(L, lnr.val);
  lua_pushnumber(L, arg.val);
  lua_pushnumber(L, lnr.err);
  lua_pushnumber(L, arg.err);
  return 4;
}

/* The cdf functions have no status: a NaN result is reported as an error. */
static int push_cdf(lua_State *L, const char *fname, double v)
{
  if (isnan(v)) return fail(L, fname, GSL_EDOM);
  lua_pushnumber(L, v);
  return 1;
}

static int l_cdf_gamma_Q(lua_State *L)
{
  double x = luaL_checknumber(L, 1), a = luaL_checknumber(L, 2), b = luaL_checknumber(L, 3);
  return push_cdf(L, "cdf_gamma_Q", gsl_cdf_gamma_Q(x, a, b));
}

static int l_cdf_binomial_Q(lua_State *L)
{
  lua_Integer k = luaL_checkinteger(L, 1);
  double p = luaL_checknumber(L, 2);
  lua_Integer n = luaL_checkinteger(L, 3);
  luaL_argcheck(L, k >= 0 && k <= 4294967295LL, 1, "k out of range");
  luaL_argcheck(L, n >= 0 && n <= 4294967295LL, 3, "n out of range");
  return push_cdf(L, "cdf_binomial_Q", gsl_cdf_binomial_Q((unsigned int)k, p, (unsigned int)n));
}

static int l_cdf_ugaussian_Q(lua_State *L)
{
  return push_cdf(L, "cdf_ugaussian_Q", gsl_cdf_ugaussian_Q(luaL_checknumber(L, 1)));
}

/* gamma_pdf(x, a, b): the density x^(a-1) e^(-x/b) / (Gamma(a) b^a) of the gamma law with
 * shape a and scale b (gsl_ran_gamma_pdf). */
static int l_gamma_pdf(lua_State *L)
{
  double x = luaL_checknumber(L, 1), a = luaL_checknumber(L, 2), b = luaL_checknumber(L, 3);
  return push_cdf(L, "gamma_pdf", gsl_ran_gamma_pdf(x, a, b));
}

/* Bessel functions of real order nu >= 0 (GSL: gsl_sf_bessel_Jnu_e, _Ynu_e,
 * _Knu_scaled_e = e^x K_nu(x), _Inu_scaled_e = e^-x I_nu(x)). */
static int l_bessel_Jnu(lua_State *L)
{
  gsl_sf_result r;
  int st = gsl_sf_bessel_Jnu_e(luaL_checknumber(L, 1), luaL_checknumber(L, 2), &r);
  return push_result(L, "bessel_Jnu", st, &r);
}

static int l_bessel_Ynu(lua_State *L)
{
  gsl_sf_result r;
  int st = gsl_sf_bessel_Ynu_e(luaL_checknumber(L, 1), luaL_checknumber(L, 2), &r);
  return push_result(L, "bessel_Ynu", st, &r);
}

static int l_bessel_Knu_scaled(lua_State *L)
{
  gsl_sf_result r;
  int st = gsl_sf_bessel_Knu_scaled_e(luaL_checknumber(L, 1), luaL_checknumber(L, 2), &r);
  return push_result(L, "bessel_Knu_scaled", st, &r);
}

static int l_bessel_Inu_scaled(lua_State *L)
{
  gsl_sf_result r;
  int st = gsl_sf_bessel_Inu_scaled_e(luaL_checknumber(L, 1), luaL_checknumber(L, 2), &r);
  return push_result(L, "bessel_Inu_scaled", st, &r);
}

/* The regularized upper incomplete gamma function Q(a, x) (gsl_sf_gamma_inc_Q_e). */
/* the upper incomplete gamma function Gamma(a, x), any real a, x > 0 */
static int l_gamma_inc(lua_State *L)
{
  gsl_sf_result r;
  int st = gsl_sf_gamma_inc_e(luaL_checknumber(L, 1), luaL_checknumber(L, 2), &r);
  return push_result(L, "gamma_inc", st, &r);
}

static int l_gamma_inc_Q(lua_State *L)
{
  gsl_sf_result r;
  int st = gsl_sf_gamma_inc_Q_e(luaL_checknumber(L, 1), luaL_checknumber(L, 2), &r);
  return push_result(L, "gamma_inc_Q", st, &r);
}

/* The digamma function psi(x) (gsl_sf_psi_e). */
static int l_psi(lua_State *L)
{
  gsl_sf_result r;
  int st = gsl_sf_psi_e(luaL_checknumber(L, 1), &r);
  return push_result(L, "psi", st, &r);
}

/* The trigamma function psi'(x) (gsl_sf_psi_1_e). */
static int l_psi_1(lua_State *L)
{
  gsl_sf_result r;
  int st = gsl_sf_psi_1_e(luaL_checknumber(L, 1), &r);
  return push_result(L, "psi_1", st, &r);
}

/* stirling_gamma(n): {gamma_0, ..., gamma_n} (1-based list) of Stirling's series
 * Gamma(z) ~ e^{-z} z^z (2 pi/z)^{1/2} sum gamma_k z^-k (DLMF 5.11.3), exact rationals
 * rounded to doubles: sum gamma_k w^k = exp(A(w)), A(w) = sum_j B_2j/(2j(2j-1)) w^(2j-1)
 * (DLMF 5.11.1), through E' = A' E: k gamma_k = sum_{m=1}^{k} m a_m gamma_{k-m}; the
 * Bernoulli numbers by sum_{k=0}^{m} C(m+1, k) B_k = 0 (DLMF 24.5.3). n <= 250. */
static int l_stirling_gamma(lua_State *L)
{
  lua_Integer n = luaL_checkinteger(L, 1);
  luaL_argcheck(L, n >= 0 && n <= 250, 1, "0 <= n <= 250 expected");
  int nb = (int)n + 2;
  mpq_t *B = malloc((size_t)nb * sizeof *B), *a = malloc(((size_t)n + 1) * sizeof *a),
        *g = malloc(((size_t)n + 1) * sizeof *g);
  mpq_t t, sum;
  mpz_t binom;
  if (!B || !a || !g) { free(B); free(a); free(g); return luaL_error(L, "out of memory"); }
  mpq_init(t);
  mpq_init(sum);
  mpz_init(binom);
  for (int m = 0; m < nb; m++) {
    mpq_init(B[m]);
    if (m == 0) { mpq_set_ui(B[0], 1, 1); continue; }
    mpq_set_ui(sum, 0, 1);
    for (int k = 0; k < m; k++) {
      mpz_bin_uiui(binom, (unsigned long)m + 1, (unsigned long)k);
      mpq_set_z(t, binom);
      mpq_mul(t, t, B[k]);
      mpq_add(sum, sum, t);
    }
    mpq_set_si(t, -1, (unsigned long)m + 1);
    mpq_mul(B[m], sum, t);
  }
  for (int m = 0; m <= n; m++) {
    mpq_init(a[m]);
    if (m % 2 == 1) {   /* a_m = B_2j / (2j (2j - 1)), m = 2j - 1 */
      int j = (m + 1) / 2;
      mpq_set_ui(t, 1, (unsigned long)(2 * j) * (unsigned long)(2 * j - 1));
      mpq_mul(a[m], B[2 * j], t);
    }
  }
  lua_createtable(L, (int)n + 1, 0);
  for (int k = 0; k <= n; k++) {
    mpq_init(g[k]);
    if (k == 0) mpq_set_ui(g[0], 1, 1);
    else {
      mpq_set_ui(sum, 0, 1);
      for (int m = 1; m <= k; m += 2) {
        mpq_set_ui(t, (unsigned long)m, 1);
        mpq_mul(t, t, a[m]);
        mpq_mul(t, t, g[k - m]);
        mpq_add(sum, sum, t);
      }
      mpq_set_ui(t, 1, (unsigned long)k);
      mpq_mul(g[k], sum, t);
    }
    lua_pushnumber(L, mpq_get_d(g[k]));
    lua_rawseti(L, -2, k + 1);
  }
  for (int m = 0; m < nb; m++) mpq_clear(B[m]);
  for (int k = 0; k <= n; k++) { mpq_clear(a[k]); mpq_clear(g[k]); }
  mpq_clear(t);
  mpq_clear(sum);
  mpz_clear(binom);
  free(B);
  free(a);
  free(g);
  return 1;
}

/* Ai(z), Ai'(z) for |arg z| <= 2 pi/3 by DLMF 9.7.5, 9.7.6 (u_k, v_k by DLMF 9.7.2:
 * u_k = u_{k-1} (6k-5)(6k-3)(6k-1) / ((2k-1) 216 k), v_k = -(6k+1)/(6k-1) u_k), summed in
 * quadruple precision up to the smallest term; beyond 2 pi/3 by the connection formula
 * Ai(z) = -w Ai(w z) - w^2 Ai(w^2 z), w = e^{2 pi i/3} (DLMF 9.2.12), and Ai' likewise
 * (Ai'(z) = -w^2 Ai'(w z) - w Ai'(w^2 z), its derivative). For |z| >= 20 the smallest term
 * is below 1e-60 of the sum. */
typedef __complex128 cq;
static void airy_quad_sector(cq z, cq *ai, cq *aip)
{
  cq zeta = 2.0Q / 3.0Q * z * csqrtq(z), z14 = csqrtq(csqrtq(z));
  cq su = 0, sv = 0, zk = 1;
  __float128 u = 1, last = 1e300Q;
  for (int k = 0; k < 400; k++) {
    if (k > 0) u *= (6.0Q * k - 5) * (6.0Q * k - 3) * (6.0Q * k - 1) / ((2.0Q * k - 1) * 216.0Q * k);
    __float128 v = k == 0 ? 1 : -(6.0Q * k + 1) / (6.0Q * k - 1) * u;
    __float128 sign = (k & 1) ? -1 : 1;
    cq term = sign * u / zk;
    __float128 m = cabsq(term);
    if (m > last) break;
    last = m;
    su += term;
    sv += sign * v / zk;
    if (m < 1e-40Q) break;
    zk *= zeta;
  }
  __float128 sp = sqrtq(M_PIq);
  cq e = cexpq(-zeta);
  *ai = e / (2 * sp * z14) * su;
  *aip = -z14 * e / (2 * sp) * sv;
}

static int l_airy_quad(lua_State *L)
{
  double re = luaL_checknumber(L, 1), im = luaL_optnumber(L, 2, 0);
  if (hypot(re, im) < 20) return luaL_error(L, "gslref.airy_quad: |z| >= 20 expected");
  cq z = re + im * 1.0Qi, ai, aip;
  if (fabsq(cargq(z)) <= 2 * M_PIq / 3) {
    airy_quad_sector(z, &ai, &aip);
  } else {
    int lower = im < 0;
    if (lower) z = conjq(z);
    cq w = cexpq(2 * M_PIq / 3 * 1.0Qi), a1, d1, a2, d2;
    airy_quad_sector(w * z, &a1, &d1);
    airy_quad_sector(w * w * z, &a2, &d2);
    ai = -w * a1 - w * w * a2;
    aip = -w * w * d1 - w * d2;
    if (lower) { ai = conjq(ai); aip = conjq(aip); }
  }
  lua_pushnumber(L, (double)crealq(ai));
  lua_pushnumber(L, (double)cimagq(ai));
  lua_pushnumber(L, (double)crealq(aip));
  lua_pushnumber(L, (double)cimagq(aip));
  return 4;
}

static const luaL_Reg funcs[] = {
  { "airy_quad", l_airy_quad },
  { "airy_Ai", l_airy_Ai },
  { "airy_Ai_deriv", l_airy_Ai_deriv },
  { "airy_Bi", l_airy_Bi },
  { "airy_Bi_deriv", l_airy_Bi_deriv },
  { "bessel_Jn", l_bessel_Jn },
  { "bessel_Jnu", l_bessel_Jnu },
  { "bessel_Ynu", l_bessel_Ynu },
  { "bessel_Knu_scaled", l_bessel_Knu_scaled },
  { "bessel_Inu_scaled", l_bessel_Inu_scaled },
  { "gamma_inc", l_gamma_inc },
  { "gamma_inc_Q", l_gamma_inc_Q },
  { "psi", l_psi },
  { "psi_1", l_psi_1 },
  { "bessel_I0_scaled", l_bessel_I0_scaled },
  { "erfc", l_erfc },
  { "expint_E1", l_expint_E1 },
  { "expint_E1_scaled", l_expint_E1_scaled },
  { "faddeeva_w", l_faddeeva_w },
  { "gamma", l_gamma },
  { "lngamma", l_lngamma },
  { "lngamma_complex", l_lngamma_complex },
  { "cdf_gamma_Q", l_cdf_gamma_Q },
  { "cdf_binomial_Q", l_cdf_binomial_Q },
  { "cdf_ugaussian_Q", l_cdf_ugaussian_Q },
  { "gamma_pdf", l_gamma_pdf },
  { "stirling_gamma", l_stirling_gamma },
  { NULL, NULL }
};

int luaopen_gslref(lua_State *L)
{
  gsl_set_error_handler_off();
  luaL_newlib(L, funcs);
  return 1;
}
