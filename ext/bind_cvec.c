/*
 * bind_cvec.c — steep.cvec: a flat array of complex numbers in C memory, so that batch
 * evaluation of a tape at many points costs one call and no Lua value per point.
 */
#include <math.h>
#include <string.h>
#include "bind.h"

typedef struct {
  size_t n;
  cplx v[];
} cvec;

#define checkcvec(L, i) ((cvec *)luaL_checkudata(L, i, STEEP_CVEC_MT))

/* Largest vector: STEEP_MAX_POINTS (steep.h), a guard against absurd sizes. */
#define CVEC_MAX STEEP_MAX_POINTS

cplx *bind_newcvec(lua_State *L, size_t n) {
  if (n > CVEC_MAX)
    luaL_error(L, "a complex vector of %I points is too large (at most %I)", (lua_Integer)n,
               (lua_Integer)CVEC_MAX);
  cvec *c = lua_newuserdatauv(L, sizeof(cvec) + n * sizeof(cplx), 0);
  c->n = n;
  luaL_setmetatable(L, STEEP_CVEC_MT);
  return c->v;
}

cplx *bind_tocvec(lua_State *L, int idx, size_t *n) {
  cvec *c = luaL_testudata(L, idx, STEEP_CVEC_MT);
  if (!c) return NULL;
  *n = c->n;
  return c->v;
}

/* core.cvec{z1, z2, ...} from numbers and complex values. */
static int cvec_new(lua_State *L) {
  luaL_checktype(L, 1, LUA_TTABLE);
  lua_Integer len = (lua_Integer)bind_checklen(L, 1, CVEC_MAX, "points");
  cplx *v = bind_newcvec(L, (size_t)len);
  for (lua_Integer i = 1; i <= len; i++) {
    lua_geti(L, 1, i);
    if (!bind_tocomplex(L, -1, &v[i - 1]))
      return luaL_error(L, "bad argument #1 to 'cvec' (entry %I is a %s, number or complex "
                        "expected)", i, luaL_typename(L, -1));
    lua_pop(L, 1);
  }
  return 1;
}

/* core.cvec_range(a, b, n): n points evenly spaced from a to b inclusive. */
static int cvec_range(lua_State *L) {
  cplx a = bind_checkcomplex(L, 1), b = bind_checkcomplex(L, 2);
  lua_Integer n = luaL_checkinteger(L, 3);
  luaL_argcheck(L, n >= 1 && (size_t)n <= CVEC_MAX, 3, "number of points out of range");
  cplx *v = bind_newcvec(L, (size_t)n);
  for (lua_Integer i = 0; i < n; i++)
    v[i] = n == 1 ? a : a + (b - a) * ((double)i / (double)(n - 1));
  return 1;
}

/* core.cvec_arc(c, r, from, to, n): the n + 1 points c + r e^{i a}, a evenly spaced from
 * `from` to `to` inclusive (an arc as a polyline). */
static int cvec_arc(lua_State *L) {
  cplx c = bind_checkcomplex(L, 1);
  double r = luaL_checknumber(L, 2), from = luaL_checknumber(L, 3), to = luaL_checknumber(L, 4);
  lua_Integer n = luaL_checkinteger(L, 5);
  luaL_argcheck(L, n >= 1 && (size_t)n < CVEC_MAX, 5, "number of pieces out of range");
  cplx *v = bind_newcvec(L, (size_t)n + 1);
  for (lua_Integer i = 0; i <= n; i++) {
    double a = from + (to - from) * ((double)i / (double)n);
    v[i] = c + r * (cos(a) + I * sin(a));
  }
  return 1;
}

/* core.cvec_join(a, b): the polyline a followed by b without b's first point (shared
 * with a's last; all of b when a is empty); a and b are cvecs or lists of points, b may
 * be nil or empty. */
static int cvec_join(lua_State *L) {
  size_t na = 0, nb = 0;
  const cplx *a = bind_checkpoints(L, 1, &na);
  const cplx *b = lua_isnoneornil(L, 2) ? NULL : bind_checkpoints(L, 2, &nb);
  size_t skip = na > 0 && nb > 0 ? 1 : 0;   /* nothing is shared with an empty a */
  size_t extra = nb - skip;
  cplx *v = bind_newcvec(L, na + extra);
  if (na) memcpy(v, a, na * sizeof *v);
  if (extra) memcpy(v + na, b + skip, extra * sizeof *v);
  return 1;
}

static int cvec_get(lua_State *L) {
  cvec *c = checkcvec(L, 1);
  lua_Integer i = luaL_checkinteger(L, 2);
  luaL_argcheck(L, i >= 1 && (size_t)i <= c->n, 2, "index out of range");
  bind_pushcomplex(L, c->v[i - 1]);
  return 1;
}

static int cvec_totable(lua_State *L) {
  cvec *c = checkcvec(L, 1);
  lua_createtable(L, (int)(c->n < 1u << 30 ? c->n : 0), 0);
  for (size_t i = 0; i < c->n; i++) {
    bind_pushcomplex(L, c->v[i]);
    lua_rawseti(L, -2, (lua_Integer)i + 1);
  }
  return 1;
}

static int cvec_len(lua_State *L) {
  lua_pushinteger(L, (lua_Integer)checkcvec(L, 1)->n);
  return 1;
}

static int cvec_tostring(lua_State *L) {
  lua_pushfstring(L, "steep.cvec (%d points)", (int)checkcvec(L, 1)->n);
  return 1;
}

static const luaL_Reg cvec_methods[] = {
  {"get", cvec_get}, {"totable", cvec_totable}, {NULL, NULL}
};

void bind_cvec_open(lua_State *L) {
  luaL_newmetatable(L, STEEP_CVEC_MT);
  lua_pushcfunction(L, cvec_len);
  lua_setfield(L, -2, "__len");
  lua_pushcfunction(L, cvec_tostring);
  lua_setfield(L, -2, "__tostring");
  luaL_newlib(L, cvec_methods);
  lua_setfield(L, -2, "__index");
  lua_pop(L, 1);
  lua_pushcfunction(L, cvec_new);
  lua_setfield(L, -2, "cvec");
  lua_pushcfunction(L, cvec_range);
  lua_setfield(L, -2, "cvec_range");
  lua_pushcfunction(L, cvec_arc);
  lua_setfield(L, -2, "cvec_arc");
  lua_pushcfunction(L, cvec_join);
  lua_setfield(L, -2, "cvec_join");
}
