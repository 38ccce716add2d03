/*
 * native.c — the hand-written C reference of the benchmark (make bench): the phase
 * phi(t) = i (t^3/3 + x t) - log(1 + t^2) in C99 double complex, over the points of a
 * steep.cvec, to set the tape's batch evaluation against what plain C does.
 *
 *   native.phi(points, x) -> values (a new steep.cvec), sum of the values (complex)
 *   native.maxdiff(u, v)  -> max |u[i] - v[i]| over two steep.cvec of one length
 *
 * The sum keeps the work observable; maxdiff lets the script check that native code
 * and tape compute the same thing without a Lua value per point.
 *
 * This module is not linked with steep.core (Lua loads each C module with its own
 * symbols), so it reads steep.cvec userdata through the registry metatable only.
 */
#include <math.h>
#include <lua.h>
#include <lauxlib.h>
#include "steep.h"

/* Must match the cvec struct of ext/bind_cvec.c (the steep.cvec userdata layout). */
typedef struct {
  size_t n;
  cplx v[];
} cvec;

#define checkcvec(L, i) ((cvec *)luaL_checkudata(L, i, STEEP_CVEC_MT))

/* A new steep.cvec of n points on the stack (the same layout as bind_newcvec). */
static cvec *newcvec(lua_State *L, size_t n) {
  cvec *c = lua_newuserdatauv(L, sizeof(cvec) + n * sizeof(cplx), 0);
  c->n = n;
  luaL_setmetatable(L, STEEP_CVEC_MT);
  return c;
}

static void pushcomplex(lua_State *L, cplx z) {
  lua_createtable(L, 2, 0);
  lua_pushnumber(L, creal(z));
  lua_rawseti(L, -2, 1);
  lua_pushnumber(L, cimag(z));
  lua_rawseti(L, -2, 2);
  luaL_setmetatable(L, STEEP_COMPLEX_MT);
}

static int native_phi(lua_State *L) {
  const cvec *pts = checkcvec(L, 1);
  double x = luaL_checknumber(L, 2);
  size_t n = pts->n;
  cvec *out = newcvec(L, n);
  cplx sum = 0;
  for (size_t i = 0; i < n; i++) {
    cplx t = pts->v[i];
    cplx t2 = t * t;
    cplx f = I * (t2 * t / 3.0 + x * t) - clog(1.0 + t2);
    out->v[i] = f;
    sum += f;
  }
  pushcomplex(L, sum);
  return 2;
}

static int native_maxdiff(lua_State *L) {
  const cvec *u = checkcvec(L, 1), *v = checkcvec(L, 2);
  luaL_argcheck(L, u->n == v->n, 2, "vectors of different lengths");
  double m = 0;
  for (size_t i = 0; i < u->n && !isnan(m); i++) {
    double d = cabs(u->v[i] - v->v[i]);
    if (d > m || isnan(d)) m = d;   /* a NaN difference sticks */
  }
  lua_pushnumber(L, m);
  return 1;
}

int luaopen_native(lua_State *L) {
  static const luaL_Reg funcs[] = {
    {"phi", native_phi}, {"maxdiff", native_maxdiff}, {NULL, NULL}
  };
  luaL_newlib(L, funcs);
  return 1;
}
