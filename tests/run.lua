-- The test runner: every Lua test file (tests/test_*.lua, LuaUnit) and the C-level kernel
-- tests, then one closing line `tests: N passed, M failed`; exit status 1 on any failure.
--
-- Environment: STEEP_CPATH picks the C module build (make asan sets the sanitized one);
-- STEEP_KERNEL_TESTS the C test binary. Arguments are passed to LuaUnit (e.g. -p pattern).
-- Test-only C modules (tests/ref/gslref.so, GSL reference values) load from tests/ref/.

local root = arg[0]:match("^(.*)/tests/run%.lua$") or "."
package.path = table.concat({ root .. "/lua/?.lua", root .. "/lua/?/init.lua",
  root .. "/tests/?.lua", root .. "/recipes/?.lua", package.path }, ";")
package.cpath = (os.getenv("STEEP_CPATH") or "lua/?.so"):gsub("^([^/])", root .. "/%1")
  .. ";" .. root .. "/tests/ref/?.so;" .. package.cpath

local lu = require "luaunit"

-- Lua tests: each file defines global Test<Area> tables.
local files = {}
local ls = assert(io.popen('ls "' .. root .. '"/tests/test_*.lua 2>/dev/null'))
for f in ls:lines() do files[#files + 1] = f end
ls:close()
for _, f in ipairs(files) do dofile(f) end

local runner = lu.LuaUnit.new()
runner:setOutputType("text")
runner:runSuite(table.unpack(arg))
local r = runner.result
local passed = r.runCount - r.notSuccessCount - r.skippedCount
local failed = r.notSuccessCount + r.skippedCount   -- a skipped check is not a pass

-- C kernel tests: the binary prints its own `kernels: N passed, M failed` line.
local kernel_bin = os.getenv("STEEP_KERNEL_TESTS") or (root .. "/tests/c/test_kernels")
local p = io.popen(kernel_bin .. " 2>&1")
local out = p and p:read("a") or ""
local ok = p and p:close()
io.write(out)
local kp, kf = out:match("kernels: (%d+) passed, (%d+) failed")
if kp then
  passed, failed = passed + tonumber(kp), failed + tonumber(kf)
  if not ok and tonumber(kf) == 0 then failed = failed + 1 end
else
  print("C kernel tests did not run (" .. kernel_bin .. ")")
  failed = failed + 1
end

print(string.format("tests: %d passed, %d failed", passed, failed))
os.exit(failed == 0 and 0 or 1)
