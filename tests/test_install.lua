-- Tests of `make install`: the module is installed into a temporary tree (once through
-- PREFIX, once through DESTDIR), then a plain lua5.4 started in another directory, with
-- LUA_PATH and LUA_CPATH naming only the installed tree, loads it and computes a Taylor
-- series and an integral. The child runs without LD_PRELOAD and ASAN_OPTIONS, so under
-- `make asan` it is an ordinary process using the installed plain build.
local lu = require "luaunit"
local H = require "helpers"
local gsl = require "gslref"

local root = debug.getinfo(1, "S").source:match("^@(.*)/tests/test_install%.lua$") or "."

local function q(s) return "'" .. s:gsub("'", "'\\''") .. "'" end

-- runs a shell command with the sanitizer preload and make's flags removed; returns its
-- output (stdout and stderr) and whether it succeeded
local function sh(cmd)
  local p = assert(io.popen("env -u LD_PRELOAD -u ASAN_OPTIONS -u MAKEFLAGS -u MFLAGS "
    .. "-u LUA_INIT -u LUA_INIT_5_4 -u LUA_PATH -u LUA_CPATH " .. cmd .. " 2>&1"))
  local out = p:read("a")
  return out, p:close()
end

-- the child's script: only the installed tree is reachable
local CHECK = [[
local steep = require "steep"
print("STEEP-INSTALL-CHECK")
print("core " .. package.searchpath("steep.core", package.cpath))
print("lua " .. package.searchpath("steep", package.path))
local function parts(v)
  if type(v) == "number" then return v, 0 end
  return v:re(), v:im()
end
local t, x = steep.var "t", steep.param "x"
local s = steep.taylor(steep.exp(t), t, 0, 8)
for k = 0, 8 do print(string.format("taylor %d %.17g %.17g", k, parts(s:coef(k)))) end
local J = steep.integral { var = t, exponent = -x * t, amplitude = 1 / (1 + t),
  contour = steep.line(0, steep.inf(0)), large = x }
local v, e, info = J:quad { x = 5 }
local vr, vi = parts(v)
print(string.format("quad %.17g %.17g %.17g %s", vr, vi, e, info.status))
local r = J:expand { x = 20, order = 4 }
print(string.format("expand %.17g %.17g", parts(r.value)))
print("STEEP-INSTALL-OK")
]]

-- checks the child's output: where it loaded from, and its numbers
local function check_output(out, tree)
  lu.assertStrContains(out, "STEEP-INSTALL-OK", false)
  local core = out:match("\ncore ([^\n]*)")
  local lib = out:match("\nlua ([^\n]*)")
  lu.assertEquals(core, tree .. "/lib/lua/5.4/steep/core.so", "the C module's location")
  lu.assertEquals(lib, tree .. "/share/lua/5.4/steep/init.lua", "the Lua library's location")
  -- exp(t) = sum t^k / k! (exact)
  local fact = 1
  for k = 0, 8 do
    if k > 0 then fact = fact * k end
    local cr, ci = out:match("\ntaylor " .. k .. " (%S+) (%S+)")
    H.close(tonumber(cr), 1 / fact, 1e-15, "Taylor coefficient " .. k .. " of exp")
    lu.assertEquals(tonumber(ci), 0, "Taylor coefficient " .. k .. " of exp is real")
  end
  -- e^x E1(x) = int_0^inf e^(-x t)/(1 + t) dt (DLMF 6.2.2, number from memory), against
  -- GSL's gsl_sf_expint_E1_e
  local re, im, err, status = out:match("\nquad (%S+) (%S+) (%S+) (%S+)")
  lu.assertEquals(status, "ok", "quadrature status")
  H.close(tonumber(re), math.exp(5) * gsl.expint_E1(5), 1e-10, "e^5 E1(5) by J:quad")
  lu.assertTrue(math.abs(tonumber(im)) <= 1e-14, "e^5 E1(5) is real")
  lu.assertTrue(tonumber(err) < 1e-10, "quadrature error estimate")
  -- Watson's lemma: e^x E1(x) ~ sum_k (-1)^k k!/x^(k+1) (DLMF 6.12.1, number from memory);
  -- four terms at x = 20 are exactly 1/20 - 1/400 + 2/8000 - 6/160000
  local er, ei = out:match("\nexpand (%S+) (%S+)")
  H.close(tonumber(er), 1 / 20 - 1 / 400 + 2 / 8000 - 6 / 160000, 1e-13, "four terms at x = 20")
  lu.assertTrue(math.abs(tonumber(ei)) <= 1e-15, "four terms are real")
end

TestInstall = {}

function TestInstall:setUp()
  local p = assert(io.popen("mktemp -d"))
  self.tmp = p:read("l")
  p:close()
  lu.assertNotNil(self.tmp, "mktemp -d")
  assert(os.execute("mkdir " .. q(self.tmp .. "/work")))
  local f = assert(io.open(self.tmp .. "/work/check.lua", "w"))
  f:write(CHECK)
  f:close()
end

function TestInstall:tearDown()
  if self.tmp and self.tmp:match("^/.+") then os.execute("rm -rf " .. q(self.tmp)) end
end

-- runs the check script from tmp/work against the tree installed under `tree`
function TestInstall:run_check(tree)
  local out, ok = sh("sh -c " .. q("cd " .. q(self.tmp .. "/work") .. " && LUA_PATH="
    .. q(tree .. "/share/lua/5.4/?.lua;" .. tree .. "/share/lua/5.4/?/init.lua")
    .. " LUA_CPATH=" .. q(tree .. "/lib/lua/5.4/?.so") .. " lua5.4 check.lua"))
  lu.assertTrue(ok, "the installed module runs:\n" .. out)
  check_output(out, tree)
end

function TestInstall:test_prefix()
  local tree = self.tmp .. "/prefix"
  local out, ok = sh("make -s -C " .. q(root) .. " install PREFIX=" .. q(tree) .. " DESTDIR=")
  lu.assertTrue(ok, "make install PREFIX=...:\n" .. out)
  self:run_check(tree)
  out, ok = sh("make -s -C " .. q(root) .. " uninstall PREFIX=" .. q(tree) .. " DESTDIR=")
  lu.assertTrue(ok, "make uninstall PREFIX=...:\n" .. out)
  local left = sh("find " .. q(tree) .. " -name 'steep*'")
  lu.assertEquals(left, "", "make uninstall leaves nothing named steep")
end

function TestInstall:test_destdir()
  local dest = self.tmp .. "/dest"
  local out, ok = sh("make -s -C " .. q(root) .. " install DESTDIR=" .. q(dest)
    .. " PREFIX=/usr/local")
  lu.assertTrue(ok, "make install DESTDIR=...:\n" .. out)
  local files = sh("find " .. q(dest) .. " -type f")
  lu.assertStrContains(files, dest .. "/usr/local/lib/lua/5.4/steep/core.so\n")
  lu.assertStrContains(files, dest .. "/usr/local/share/lua/5.4/steep/init.lua\n")
  self:run_check(dest .. "/usr/local")
end
