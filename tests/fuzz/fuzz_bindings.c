/*
 * fuzz_bindings.c — the bindings (ext/bind_*.c) from arbitrary bytes, through a Lua state
 * that links the module in as a host application would. Every binding that reads a list
 * of points gets a list of numbers, complex values and garbage whose length, as `#`
 * reports it, is whatever the input chooses: its __len may lie (2^60, 2^63 - 1, -1, the
 * limit of 2^24 points and one past it, any 64-bit pattern). A Lua error is the expected
 * answer to bad input; nothing may crash, write out of bounds or trip a sanitizer (a
 * count multiplied into a size before it was checked once wrapped round to a 1-byte
 * block that the points were then written past).
 *
 * Input: which binding (1 byte), how many true entries (2 bytes: 0..16), the length #
 * reports (1 byte, and 8 more for a raw pattern), the entries (each a kind byte and its
 * value), a point z (fuzz.h's fz_cplx).
 */
#include <stdio.h>
#include <lua.h>
#include <lauxlib.h>
#include <lualib.h>
#include "fuzz.h"

int luaopen_steep_core(lua_State *L);

/* The chunk gets the module and returns the function that makes one call. */
static const char CALLS[] =
  "local core = ...\n"
  "local tape = core.tape { code = { { 'var' }, { 'mul', a = 1, b = 1 }, { 'neg', a = 2 } },\n"
  "  params = {}, outputs = { 3, 1 } }\n"
  "local P = {}\n"
  "local calls = {\n"
  "  function(L) return core.cvec(L) end,\n"
  "  function(L) return core.cvec_join(L, { 1, 2 }) end,\n"
  "  function(L) return core.cvec_join({ 1, 2 }, L) end,\n"
  "  function(L) return tape:eval_many(L, P) end,\n"
  "  function(L, z) return core.turning(L, z) end,\n"
  "  function(L) return core.crossings({ 0, 1 }, L) end,\n"
  "  function(L, z) return core.distance(L, z) end,\n"
  "  function(L, z) return core.nearest(L, z) end,\n"
  "  function(L) return core.integrand_many(tape, P, L) end,\n"
  "  function(L) return core.quad_polyline(tape, P, L, { budget = 20000 }) end,\n"
  "  function(L) return core.quad_polyline(tape, P, L, { budget = 20000, first = 2, last = 3 }) end,\n"
  "  function(L) return core.short_stretches(tape, P, L, { radius = 1 }) end,\n"
  "  function(L, z) return core.short_stretches(tape, P, { 0, z, 1 }, { saddles = L, widths = L })\n"
  "  end,\n"
  "  function(L, z) return core.branch_jump(tape, P, L, L, z) end,\n"
  "  function(L, z) return core.trace(tape, P, z, 0, { stops = L, stop_r = { 1, 1, 1 },\n"
  "    maxsteps = 200, maxpts = 200 }) end,\n"
  "  function(L) return core.series(L) end,\n"
  "  function(L, z) return core.zeros(tape, P, { out = 1, deriv = 1 }, z, 2,\n"
  "    { seeds = L, count = 200 }) end,\n"
  "  function(L, z) return core.ring_quietest(tape, P, z, 1, 3, #L) end,\n"
  "  function(L, z) return core.laurent(tape, P, z, 1, #L, 2) end,\n"
  "  function(L, z) return core.dF_laurent(tape, P, z, 1, #L, 3) end,\n"
  "  function(L, z) return core.log_coefficient(tape, P, z, 1, #L) end,\n"
  "}\n"
  "local mt = { __len = function(t) return t.n end }\n"
  "return function(which, n, entries, z)\n"
  "  entries.n = n\n"
  "  return calls[which % #calls + 1](setmetatable(entries, mt), z)\n"
  "end\n";

static lua_State *state;   /* one Lua state for the whole run (the harness's, not the module's) */

int LLVMFuzzerInitialize(int *argc, char ***argv);
int LLVMFuzzerInitialize(int *argc, char ***argv) {
  (void)argc; (void)argv;
  state = luaL_newstate();
  if (!state) abort();
  luaL_openlibs(state);
  luaL_requiref(state, "steep.core", luaopen_steep_core, 0);
  if (luaL_loadbuffer(state, CALLS, sizeof CALLS - 1, "=calls") != LUA_OK) abort();
  lua_insert(state, -2);
  if (lua_pcall(state, 1, 1, 0) != LUA_OK) abort();
  lua_setfield(state, LUA_REGISTRYINDEX, "fuzz_call");
  return 0;
}

static lua_Integer length(fz *f, lua_Integer k) {
  switch (fz_u8(f) % 12) {
    case 0: return k;
    case 1: return 0;
    case 2: return k + 1;
    case 3: return -1;
    case 4: return (lua_Integer)1 << 24;
    case 5: return ((lua_Integer)1 << 24) + 1;
    case 6: return (lua_Integer)1 << 31;
    case 7: return ((lua_Integer)1 << 32) + k;
    case 8: return (lua_Integer)1 << 60;
    case 9: return LUA_MAXINTEGER;
    case 10: return LUA_MININTEGER;
    default: return (lua_Integer)fz_u64(f);
  }
}

static void push_entry(lua_State *L, fz *f) {
  switch (fz_u8(f) % 7) {
    case 0: case 1: lua_pushnumber(L, fz_real(f, 1)); break;
    case 2: case 3: {
      cplx z = fz_cplx(f, 1);
      lua_createtable(L, 2, 0);
      lua_pushnumber(L, creal(z));
      lua_rawseti(L, -2, 1);
      lua_pushnumber(L, cimag(z));
      lua_rawseti(L, -2, 2);
      luaL_setmetatable(L, STEEP_COMPLEX_MT);
      break;
    }
    case 4: lua_pushliteral(L, "a"); break;
    case 5: lua_newtable(L); break;           /* a table that is no complex value */
    default: lua_pushnil(L); break;           /* a hole */
  }
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size) {
  fz f = {data, size};
  lua_State *L = state;
  lua_settop(L, 0);
  lua_getfield(L, LUA_REGISTRYINDEX, "fuzz_call");
  lua_pushinteger(L, fz_u8(&f));
  size_t k = fz_below(&f, 17);
  lua_pushinteger(L, length(&f, (lua_Integer)k));
  lua_createtable(L, (int)k, 1);
  for (size_t i = 0; i < k; i++) {
    push_entry(L, &f);
    lua_rawseti(L, -2, (lua_Integer)i + 1);
  }
  cplx z = fz_cplx(&f, 1);
  lua_createtable(L, 2, 0);
  lua_pushnumber(L, creal(z));
  lua_rawseti(L, -2, 1);
  lua_pushnumber(L, cimag(z));
  lua_rawseti(L, -2, 2);
  luaL_setmetatable(L, STEEP_COMPLEX_MT);
  /* an error is a fine answer (FUZZ_VERBOSE=1 prints it, to check what an input reaches) */
  if (lua_pcall(L, 4, 0, 0) != LUA_OK && getenv("FUZZ_VERBOSE"))
    fprintf(stderr, "error: %s\n", lua_tostring(L, -1));
  lua_settop(L, 0);
  lua_gc(L, LUA_GCCOLLECT);   /* scratch of up to 256 MiB per call must not pile up */
  return 0;
}
