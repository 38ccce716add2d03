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
 * qagi.airy_ai(x)              -> Ai(x), status text (gsl_sf_airy_Ai_e, GSL_PREC_DOUBLE)
 * qagi.airy_ai_scaled(x)       -> Ai(x) exp(2/3 x^(3/2)) (x > 0), status text
 * qagi.now()                   -> seconds of CLOCK_MONOTONIC
 */
#define _POSIX_C_SOURCE 199309L
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
    {"airy_ai_scaled", l_airy_ai_scaled}, {"now", l_now}, {NULL, NULL}};
  luaL_newlib(L, funcs);
  return 1;
}
