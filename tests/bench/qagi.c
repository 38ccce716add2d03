/*
 * qagi.c — the GSL side of the Airy benchmark in tests/bench/run.lua (make bench):
 * Ai(x) = (1/pi) int_0^inf cos(t^3/3 + x t) dt by gsl_integration_qagiu and
 * Ai(x) = (1/2pi) int_-inf^inf cos(t^3/3 + x t) dt by gsl_integration_qagi (the sine
 * part is odd and integrates to 0), each with an evaluation counter in the integrand;
 * the reference gsl_sf_airy_Ai(_scaled); and a monotonic wall clock. Bench only: never
 * installed, nothing asserted.
 *
 * qagi.qagiu(x, epsrel, limit) -> value, abserr, status text, evaluations
 * qagi.qagi(x, epsrel, limit)  -> value, abserr, status text, evaluations
 * qagi.qagi_deformed(x, epsrel, limit) -> Ai(x) exp(2/3 x^(3/2)), abserr (both scaled so),
 *   status text, evaluations: the real line moved by hand onto the horizontal line through
 *   the saddle i sqrt(x) (x > 0), t = u + i sqrt(x), where DLMF 9.5.4 becomes
 *   Ai(x) = exp(-2/3 x^(3/2)) (1/2pi) int_-inf^inf exp(-sqrt(x) u^2) cos(u^3/3) du (Cauchy's
 *   theorem: the integrand decays in the sectors the ends sweep through), by
 *   gsl_integration_qagi on the even real integrand (the odd sine part integrates to 0):
 *   what a practitioner would write by hand for this one integral.
 * qagi.airy_ai(x)              -> Ai(x), status text (gsl_sf_airy_Ai_e, GSL_PREC_DOUBLE)
 * qagi.airy_ai_scaled(x)       -> Ai(x) exp(2/3 x^(3/2)) (x > 0), status text
 * qagi.now()                   -> seconds of CLOCK_MONOTONIC
 * qagi.qag_path(n, x, epsrel)  -> value (re, im), evaluations, status text: the integral of
 *   exp(-x t^2/2 + i t) / (1 + t^2/16) along the polyline through the n points
 *   t_k = s_k + 0.3 i sin(3 s_k), s_k = -6 + 12 k/(n-1), by gsl_integration_qag (15-point
 *   rule) on the real and on the imaginary part of each segment, each to epsrel of the
 *   integral of |f| over that segment (epsabs) — the long-path benchmark of make bench,
 *   which integrates the same polyline with J:quad{along = "given"}.
 */
#define _POSIX_C_SOURCE 199309L
#include <complex.h>
#include <math.h>
#include <time.h>
#include <lua.h>
#include <lauxlib.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_integration.h>
#include <gsl/gsl_sf_airy.h>

typedef struct { double x, scale; long evals; } airy_ctx;

static double airy_cos(double t, void *p) {
  airy_ctx *c = p;
  c->evals++;
  return c->scale * cos(t * t * t / 3 + c->x * t);
}

static int run(lua_State *L, int whole_line) {
  double x = luaL_checknumber(L, 1), epsrel = luaL_optnumber(L, 2, 1e-12);
  lua_Integer limit = luaL_optinteger(L, 3, 1000);
  luaL_argcheck(L, limit >= 1 && limit <= 1000000, 3, "limit out of range");
  const double pi = 3.14159265358979323846;
  airy_ctx c = {x, whole_line ? 1 / (2 * pi) : 1 / pi, 0};
  gsl_function f = {airy_cos, &c};
  gsl_integration_workspace *w = gsl_integration_workspace_alloc((size_t)limit);
  if (!w) return luaL_error(L, "gsl_integration_workspace_alloc failed");
  double res = 0, err = 0;
  int st = whole_line ? gsl_integration_qagi(&f, 0, epsrel, (size_t)limit, w, &res, &err)
                      : gsl_integration_qagiu(&f, 0, 0, epsrel, (size_t)limit, w, &res, &err);
  gsl_integration_workspace_free(w);
  lua_pushnumber(L, res);
  lua_pushnumber(L, err);
  lua_pushstring(L, gsl_strerror(st));
  lua_pushinteger(L, c.evals);
  return 4;
}

typedef struct { double a; long evals; } deformed_ctx;

static double airy_deformed(double u, void *p) {
  deformed_ctx *c = p;
  c->evals++;
  return exp(-c->a * u * u) * cos(u * u * u / 3);
}

static int l_qagi_deformed(lua_State *L) {
  double x = luaL_checknumber(L, 1), epsrel = luaL_optnumber(L, 2, 1e-12);
  lua_Integer limit = luaL_optinteger(L, 3, 1000);
  luaL_argcheck(L, x > 0, 1, "x > 0 expected (the saddle i sqrt(x))");
  luaL_argcheck(L, limit >= 1 && limit <= 1000000, 3, "limit out of range");
  const double pi = 3.14159265358979323846;
  deformed_ctx c = {sqrt(x), 0};
  gsl_function f = {airy_deformed, &c};
  gsl_integration_workspace *w = gsl_integration_workspace_alloc((size_t)limit);
  if (!w) return luaL_error(L, "gsl_integration_workspace_alloc failed");
  double res = 0, err = 0;
  int st = gsl_integration_qagi(&f, 0, epsrel, (size_t)limit, w, &res, &err);
  gsl_integration_workspace_free(w);
  lua_pushnumber(L, res / (2 * pi));
  lua_pushnumber(L, err / (2 * pi));
  lua_pushstring(L, gsl_strerror(st));
  lua_pushinteger(L, c.evals);
  return 4;
}

typedef struct { double complex a, d; double x; int part; long evals; } path_ctx;

static double path_f(double u, void *p) {
  path_ctx *c = p;
  c->evals++;
  double complex t = c->a + u * c->d;
  double complex v = cexp(-c->x * t * t / 2 + I * t) / (1 + t * t / 16) * c->d;
  return c->part ? cimag(v) : creal(v);
}

static double complex path_point(long k, long n) {
  double s = -6 + 12 * (double)k / (double)(n - 1);
  return s + 0.3 * I * sin(3 * s);
}

static int l_qag_path(lua_State *L) {
  lua_Integer n = luaL_checkinteger(L, 1);
  double x = luaL_checknumber(L, 2), epsrel = luaL_optnumber(L, 3, 1e-13);
  luaL_argcheck(L, n >= 2 && n <= 100000000, 1, "2 <= n <= 1e8");
  gsl_integration_workspace *w = gsl_integration_workspace_alloc(100);
  if (!w) return luaL_error(L, "gsl_integration_workspace_alloc failed");
  path_ctx c = {0, 0, x, 0, 0};
  gsl_function f = {path_f, &c};
  double re = 0, im = 0;
  int worst = GSL_SUCCESS;
  for (long k = 0; k + 1 < n; k++) {
    c.a = path_point(k, n);
    c.d = path_point(k + 1, n) - c.a;
    double complex mid = c.a + 0.5 * c.d;
    double size = cabs(cexp(-x * mid * mid / 2 + I * mid) / (1 + mid * mid / 16) * c.d);
    for (int part = 0; part < 2; part++) {
      double r = 0, e = 0;
      c.part = part;
      int st = gsl_integration_qag(&f, 0, 1, epsrel * size, 0, 100, GSL_INTEG_GAUSS15, w, &r, &e);
      if (st != GSL_SUCCESS) worst = st;
      if (part) im += r; else re += r;
    }
  }
  gsl_integration_workspace_free(w);
  lua_pushnumber(L, re);
  lua_pushnumber(L, im);
  lua_pushinteger(L, c.evals);
  lua_pushstring(L, gsl_strerror(worst));
  return 4;
}

static int l_qagiu(lua_State *L) { return run(L, 0); }
static int l_qagi(lua_State *L) { return run(L, 1); }

static int l_airy(lua_State *L, int scaled) {
  double x = luaL_checknumber(L, 1);
  gsl_sf_result r = {0, 0};
  int st = scaled ? gsl_sf_airy_Ai_scaled_e(x, GSL_PREC_DOUBLE, &r)
                  : gsl_sf_airy_Ai_e(x, GSL_PREC_DOUBLE, &r);
  lua_pushnumber(L, r.val);
  lua_pushstring(L, gsl_strerror(st));
  return 2;
}

static int l_airy_ai(lua_State *L) { return l_airy(L, 0); }
static int l_airy_ai_scaled(lua_State *L) { return l_airy(L, 1); }

static int l_now(lua_State *L) {
  struct timespec ts;
  clock_gettime(CLOCK_MONOTONIC, &ts);
  lua_pushnumber(L, (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec);
  return 1;
}

int luaopen_qagi(lua_State *L) {
  /* failures are statuses to report, not aborts */
  gsl_set_error_handler_off();
  static const luaL_Reg funcs[] = {
    {"qagiu", l_qagiu}, {"qagi", l_qagi}, {"airy_ai", l_airy_ai},
    {"airy_ai_scaled", l_airy_ai_scaled}, {"now", l_now}, {"qag_path", l_qag_path},
    {"qagi_deformed", l_qagi_deformed},
    {NULL, NULL}};
  luaL_newlib(L, funcs);
  return 1;
}
