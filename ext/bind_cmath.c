/*
 * bind_cmath.c — elementary functions of one complex value (C99 <complex.h>, principal
 * branches), so that Lua-side complex values, constant folding in expressions and the
 * tape all use the same branch conventions; the Faddeeva function w(z) from libcerf
 * for the uniform expansion of a pole near a saddle; the Airy functions (airy.c) and the
 * valleys of their cubic model for the uniform expansion of two saddles together.
 */
#include <cerf.h>
#include "airy.h"
#include "bind.h"
#include "clog.h"

#define CFUN(name, f) \
  static int cmath_##name(lua_State *L) { bind_pushcomplex(L, f(bind_checkcomplex(L, 1))); return 1; }
CFUN(exp, cexp)
CFUN(log, steep_clog)
CFUN(sqrt, csqrt)
CFUN(sin, csin)
CFUN(cos, ccos)
CFUN(tan, ctan)
CFUN(sinh, csinh)
CFUN(cosh, ccosh)
CFUN(tanh, ctanh)
CFUN(atan, catan)

static int cmath_abs(lua_State *L) {
  lua_pushnumber(L, cabs(bind_checkcomplex(L, 1)));
  return 1;
}

/* core.cmath.faddeeva(z): w(z) = exp(-z^2) erfc(-iz) (DLMF 7.2.3), from libcerf. */
static int cmath_faddeeva(lua_State *L) {
  bind_pushcomplex(L, w_of_z(bind_checkcomplex(L, 1)));
  return 1;
}

static const char *const airy_text[] = {"ok", "underflow", "overflow", "nonfinite"};

/* core.cmath.airy(z) -> Ai(z), Ai'(z), error of Ai, error of Ai', status;
 * core.cmath.airy_bi(z) -> the same for Bi (airy.h). */
static int push_airy(lua_State *L, int st, cplx v, cplx d, double ev, double ed) {
  bind_pushcomplex(L, v);
  bind_pushcomplex(L, d);
  lua_pushnumber(L, ev);
  lua_pushnumber(L, ed);
  lua_pushstring(L, airy_text[st]);
  return 5;
}

static int cmath_airy(lua_State *L) {
  cplx v, d;
  double ev, ed;
  int st = airy_ai(bind_checkcomplex(L, 1), &v, &d, &ev, &ed);
  return push_airy(L, st, v, d, ev, ed);
}

static int cmath_airy_bi(lua_State *L) {
  cplx v, d;
  double ev, ed;
  int st = airy_bi(bind_checkcomplex(L, 1), &v, &d, &ev, &ed);
  return push_airy(L, st, v, d, ev, ed);
}

/* core.cmath.airy_valley(zeta, u0, dir) -> valley number 0, 1 or 2 (directions 0, 2pi/3,
 * -2pi/3) of the model e^{zeta u - u^3/3}, or nil and "direction" | "saddle" | "failed"
 * (airy_model_valley in airy.h). */
static int cmath_airy_valley(lua_State *L) {
  cplx zeta = bind_checkcomplex(L, 1), u0 = bind_checkcomplex(L, 2);
  double dir = luaL_checknumber(L, 3);
  int hit = 0;
  int k = airy_model_valley(zeta, u0, dir, &hit);
  if (k >= 0) {
    lua_pushinteger(L, k);
    return 1;
  }
  lua_pushnil(L);
  lua_pushstring(L, k == -1 ? "direction" : k == -2 ? "saddle" : "failed");
  return 2;
}

static const luaL_Reg cmath_funcs[] = {
  {"faddeeva", cmath_faddeeva}, {"airy", cmath_airy}, {"airy_bi", cmath_airy_bi},
  {"airy_valley", cmath_airy_valley},
  {"exp", cmath_exp}, {"log", cmath_log}, {"sqrt", cmath_sqrt}, {"sin", cmath_sin},
  {"cos", cmath_cos}, {"tan", cmath_tan}, {"sinh", cmath_sinh}, {"cosh", cmath_cosh},
  {"tanh", cmath_tanh}, {"atan", cmath_atan}, {"abs", cmath_abs}, {NULL, NULL}
};

void bind_cmath_open(lua_State *L) {
  luaL_newlib(L, cmath_funcs);
  lua_setfield(L, -2, "cmath");
}
