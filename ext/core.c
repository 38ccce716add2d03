/*
 * core.c — luaopen_steep_core: the module table of the C extension.
 */
#define _POSIX_C_SOURCE 200809L   /* isatty, stat */
#include <errno.h>
#include <stdio.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>
#include "bind.h"

/* core.isatty(fd) -> true if the file descriptor is a terminal (progress output) */
static int core_isatty(lua_State *L) {
  lua_Integer fd = luaL_checkinteger(L, 1);
  lua_pushboolean(L, fd >= 0 && fd <= 1024 && isatty((int)fd));
  return 1;
}

/* core.file_kind(path) -> "regular", "directory", "other" (a device, a pipe, ...), or
 * "absent"; nil and the reason when it cannot be told (a file written through a temporary
 * name and a rename must be a regular file or not exist yet: renaming over a device
 * would replace it). */
static int core_file_kind(lua_State *L) {
  const char *path = luaL_checkstring(L, 1);
  struct stat st;
  if (stat(path, &st) != 0) {
    if (errno == ENOENT) { lua_pushliteral(L, "absent"); return 1; }
    char why[128] = "unknown error";
    int e = errno;
    if (strerror_r(e, why, sizeof why) != 0) snprintf(why, sizeof why, "error %d", e);
    lua_pushnil(L);
    lua_pushstring(L, why);
    return 2;
  }
  lua_pushstring(L, S_ISREG(st.st_mode) ? "regular" : S_ISDIR(st.st_mode) ? "directory" : "other");
  return 1;
}

int luaopen_steep_core(lua_State *L);

int luaopen_steep_core(lua_State *L) {
  /* GSL's error handler is process-wide: the host application's setting is its own, and
   * loading the module leaves it as it was. No kernel of the module calls GSL (quadrature,
   * roots and series are the module's own; w(z) comes from libcerf, which has no handler),
   * so there is nothing to switch off; a kernel that ever calls GSL must use a routine
   * that returns a status without calling the handler, or be guarded explicitly. */
  lua_newtable(L);
  luaL_newmetatable(L, STEEP_COMPLEX_MT);  /* methods are added by lua/steep/complex.lua */
  bind_keep_complex_mt(L);
  lua_setfield(L, -2, "complex_mt");
  bind_series_open(L);
  bind_tape_open(L);
  bind_cvec_open(L);
  bind_cmath_open(L);
  bind_landscape_open(L);
  bind_process_open(L);
  bind_multi_open(L);
  lua_pushcfunction(L, core_isatty);
  lua_setfield(L, -2, "isatty");
  lua_pushcfunction(L, core_file_kind);
  lua_setfield(L, -2, "file_kind");
  lua_pushinteger(L, STEEP_MAX_ORDER);
  lua_setfield(L, -2, "max_order");
  return 1;
}
