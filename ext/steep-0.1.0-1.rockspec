-- LuaRocks build of steep through the Makefile. From the top of the tree:
--   luarocks --lua-version=5.4 make ext/steep-0.1.0-1.rockspec
-- (Debian 12's luarocks targets Lua 5.1 unless told otherwise; add --tree=DIR to install
-- somewhere other than the default tree.)
package = "steep"
version = "0.1.0-1"
source = {
  url = "git+file://.",   -- `luarocks make` builds the checked-out tree and fetches nothing
}
description = {
  summary = "Asymptotic analysis of integrals with a large parameter",
}
dependencies = {
  "lua >= 5.4, < 5.5",
}
build = {
  type = "make",
  build_variables = {
    CFLAGS = "$(CFLAGS)",   -- the Makefile finds Lua, GSL and libcerf with pkg-config
  },
  install_variables = {
    LUA_LIBDIR = "$(LIBDIR)",   -- lua/steep/core.so goes to LIBDIR/steep/core.so
    LUA_SHARE = "$(LUADIR)",    -- lua/steep/*.lua go to LUADIR/steep/
  },
}
