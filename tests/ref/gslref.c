/* gslref — GSL reference values for the tests (test-only; not installed).
 *
 * Each function calls the gsl_sf_*_e (or gsl_cdf_*) routine, checks its status and
 * raises a Lua error carrying gsl_strerror on failure. The special functions return
 * (value, error estimate) as GSL reports them; the cdf_* and *_pdf functions return the
 * value.
 * faddeeva_w comes from libcerf (w_of_z), not GSL: it returns the real and imaginary
 * parts of w(z) = exp(-z^2) erfc(-iz) (DLMF 7.2.3) and has no error estimate.
 */
#include <lua.h>
#include <lauxlib.h>
#include <complex.h>
#include <math.h>

#include <gsl/gsl_errno.h>
#include <gsl/gsl_mode.h>
#include <gsl/gsl_sf_airy.h>
#include <gsl/gsl_sf_bessel.h>
#include <gsl/gsl_sf_erf.h>
#include <gsl/gsl_sf_expint.h>
#include <gsl/gsl_sf_gamma.h>
#include <gsl/gsl_sf_result.h>
#include <gsl/gsl_cdf.h>
#include <gsl/gsl_randist.h>

#include <cerf.h>

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

/* lngamma(x) -> log |Gamma(x)|, error */
static int l_lngamma(lua_State *L)
{
  gsl_sf_result r;
  int st = gsl_sf_lngamma_e(luaL_checknumber(L, 1), &r);
  return push_result(L, "lngamma", st, &r);
}

static int l_expint_E1(lua_State *L)
{
  gsl_sf_result r;
  int st = gsl_sf_expint_E1_e(luaL_checknumber(L, 1), &r);
  return push_result(L, "expint_E1", st, &r);
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

static const luaL_Reg funcs[] = {
  { "airy_Ai", l_airy_Ai },
  { "airy_Ai_deriv", l_airy_Ai_deriv },
  { "airy_Bi", l_airy_Bi },
  { "bessel_Jn", l_bessel_Jn },
  { "bessel_I0_scaled", l_bessel_I0_scaled },
  { "lngamma", l_lngamma },
  { "erfc", l_erfc },
  { "expint_E1", l_expint_E1 },
  { "faddeeva_w", l_faddeeva_w },
  { "gamma", l_gamma },
  { "lngamma_complex", l_lngamma_complex },
  { "cdf_gamma_Q", l_cdf_gamma_Q },
  { "cdf_binomial_Q", l_cdf_binomial_Q },
  { "cdf_ugaussian_Q", l_cdf_ugaussian_Q },
  { "gamma_pdf", l_gamma_pdf },
  { NULL, NULL }
};

int luaopen_gslref(lua_State *L)
{
  gsl_set_error_handler_off();
  luaL_newlib(L, funcs);
  return 1;
}
