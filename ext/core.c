/*
 * core.c — luaopen_steep_core: the module table of the C extension.
 */
#define _POSIX_C_SOURCE 200809L   /* isatty */
#include <unistd.h>
#include <gsl/gsl_errno.h>
#include "bind.h"

/* core.isatty(fd) -> true if the file descriptor is a terminal (progress output) */
static int core_isatty(lua_State *L) {
  lua_Integer fd = luaL_checkinteger(L, 1);
  lua_pushboolean(L, fd >= 0 && fd <= 1024 && isatty((int)fd));
  return 1;
}

int luaopen_steep_core(lua_State *L);

int luaopen_steep_core(lua_State *L) {
  /* GSL's default error handler aborts the process; the library checks every GSL status
   * instead. The handler is process-wide (not per lua_State), and setting it to "off" is
   * idempotent, so every lua_State that loads the module may do it. */
  gsl_set_error_handler_off();
  lua_newtable(L);
  luaL_newmetatable(L, STEEP_COMPLEX_MT);  /* methods are added by lua/steep/complex.lua */
  bind_keep_complex_mt(L);
  lua_setfield(L, -2, "complex_mt");
  bind_series_open(L);
  bind_tape_open(L);
  bind_cvec_open(L);
  bind_cmath_open(L);
  bind_landscape_open(L);
  bind_multi_open(L);
  lua_pushcfunction(L, core_isatty);
  lua_setfield(L, -2, "isatty");
  lua_pushinteger(L, STEEP_MAX_ORDER);
  lua_setfield(L, -2, "max_order");
  return 1;
}
