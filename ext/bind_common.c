/*
 * bind_common.c — conversions shared by the binding files; see bind.h.
 */
#include <math.h>
#include "bind.h"

/* The complex metatable is also kept under this key (a light userdata: no string
 * lookup), for the conversions that run once per point. */
static const char complex_mt_key = 0;

void bind_keep_complex_mt(lua_State *L) {
  lua_pushvalue(L, -1);
  lua_rawsetp(L, LUA_REGISTRYINDEX, &complex_mt_key);
}

int bind_tocomplex(lua_State *L, int idx, cplx *z) {
  idx = lua_absindex(L, idx);
  if (lua_type(L, idx) == LUA_TNUMBER) {
    *z = lua_tonumber(L, idx);
    return 1;
  }
  if (lua_type(L, idx) != LUA_TTABLE || !lua_getmetatable(L, idx)) return 0;
  lua_rawgetp(L, LUA_REGISTRYINDEX, &complex_mt_key);
  int ok = lua_rawequal(L, -1, -2);
  lua_pop(L, 2);
  if (!ok) return 0;
  lua_rawgeti(L, idx, 1);
  lua_rawgeti(L, idx, 2);
  *z = lua_tonumber(L, -2) + I * lua_tonumber(L, -1);
  lua_pop(L, 2);
  return 1;
}

cplx bind_checkcomplex(lua_State *L, int arg) {
  cplx z = 0;
  if (!bind_tocomplex(L, arg, &z))
    luaL_typeerror(L, arg, "number or complex");
  return z;
}

void bind_pushcomplex(lua_State *L, cplx z) {
  lua_createtable(L, 2, 0);
  lua_pushnumber(L, creal(z));
  lua_rawseti(L, -2, 1);
  lua_pushnumber(L, cimag(z));
  lua_rawseti(L, -2, 2);
  lua_rawgetp(L, LUA_REGISTRYINDEX, &complex_mt_key);
  lua_setmetatable(L, -2);
}

size_t bind_checkorder(lua_State *L, int arg) {
  lua_Integer n = 0;
  int isint = 0;
  if (lua_type(L, arg) == LUA_TNUMBER) n = lua_tointegerx(L, arg, &isint);
  if (!isint) luaL_typeerror(L, arg, "integer order");
  if (n < 0 || n > STEEP_MAX_ORDER)
    luaL_argerror(L, arg, lua_pushfstring(L, "order %I outside 0..%d", n, STEEP_MAX_ORDER));
  return (size_t)n;
}

void *bind_scratch(lua_State *L, size_t bytes) {
  return lua_newuserdatauv(L, bytes ? bytes : 1, 0);
}

void *bind_array(lua_State *L, size_t count, size_t size) {
  if (size == 0 || count > STEEP_MAX_SCRATCH / size)
    luaL_error(L, "scratch memory for %I elements of %I bytes exceeds the limit of %I bytes",
               (lua_Integer)count, (lua_Integer)size, (lua_Integer)STEEP_MAX_SCRATCH);
  return bind_scratch(L, count * size);
}

size_t bind_mulcount(lua_State *L, size_t a, size_t b) {
  if (a != 0 && b > STEEP_MAX_SCRATCH / a)
    luaL_error(L, "%I times %I elements exceeds the limit of %I", (lua_Integer)a,
               (lua_Integer)b, (lua_Integer)STEEP_MAX_SCRATCH);
  return a * b;
}

size_t bind_checklen(lua_State *L, int idx, size_t max, const char *what) {
  lua_Integer len = luaL_len(L, idx);
  if (len > 0 && (lua_Unsigned)len > (lua_Unsigned)max)
    luaL_argerror(L, idx, lua_pushfstring(L, "a list of %I %s is too long (at most %I)", len,
                                          what, (lua_Integer)max));
  return len > 0 ? (size_t)len : 0;
}

cplx *bind_checkpoints(lua_State *L, int idx, size_t *n) {
  cplx *v = bind_tocvec(L, idx, n);
  if (v) return v;
  luaL_checktype(L, idx, LUA_TTABLE);
  *n = bind_checklen(L, idx, STEEP_MAX_POINTS, "points");
  v = bind_array(L, *n, sizeof(cplx));
  for (size_t i = 0; i < *n; i++) {
    lua_geti(L, idx, (lua_Integer)i + 1);
    if (!bind_tocomplex(L, -1, &v[i]))
      luaL_error(L, "point %d is a %s (number or complex expected)", (int)i + 1,
                 luaL_typename(L, -1));
    lua_pop(L, 1);
  }
  return v;
}

/* The registry key of the reusable buffer (an address unique to this module). */
static const char buffer_key = 0;

void *bind_buffer(lua_State *L, size_t bytes) {
  if (bytes == 0) bytes = 1;
  /* taken out of the registry while in use: a re-entrant call (a finalizer calling back
   * during an allocation) finds none and makes its own, and an error that skips the
   * release only costs a new one next time. A kept buffer far larger than asked (over
   * 1 MB and 4 times the request) is let go rather than held for ever. */
  if (lua_rawgetp(L, LUA_REGISTRYINDEX, &buffer_key) == LUA_TUSERDATA) {
    size_t have = lua_rawlen(L, -1);
    if (have >= bytes && !(have > ((size_t)1 << 20) && have / 4 > bytes)) {
      lua_pushnil(L);
      lua_rawsetp(L, LUA_REGISTRYINDEX, &buffer_key);
      return lua_touserdata(L, -1);
    }
  }
  lua_pop(L, 1);
  return lua_newuserdatauv(L, bytes, 0);
}

void bind_buffer_release(lua_State *L, int idx) {
  lua_pushvalue(L, idx);
  lua_rawsetp(L, LUA_REGISTRYINDEX, &buffer_key);
}
