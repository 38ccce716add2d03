/*
 * bind_cmath.c — elementary functions of one complex value (C99 <complex.h>, principal
 * branches), so that Lua-side complex values, constant folding in expressions and the
 * tape all use the same branch conventions; and the Faddeeva function w(z) from libcerf
 * for the uniform expansion of a pole near a saddle.
 */
#include <cerf.h>
#include "bind.h"

#define CFUN(name, f) \
  static int cmath_##name(lua_State *L) { bind_pushcomplex(L, f(bind_checkcomplex(L, 1))); return 1; }
CFUN(exp, cexp)
CFUN(log, clog)
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

static const luaL_Reg cmath_funcs[] = {
  {"faddeeva", cmath_faddeeva},
  {"exp", cmath_exp}, {"log", cmath_log}, {"sqrt", cmath_sqrt}, {"sin", cmath_sin},
  {"cos", cmath_cos}, {"tan", cmath_tan}, {"sinh", cmath_sinh}, {"cosh", cmath_cosh},
  {"tanh", cmath_tanh}, {"atan", cmath_atan}, {"abs", cmath_abs}, {NULL, NULL}
};

void bind_cmath_open(lua_State *L) {
  luaL_newlib(L, cmath_funcs);
  lua_setfield(L, -2, "cmath");
}
