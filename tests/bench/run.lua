-- The benchmark of the foundation (make bench): figures printed, nothing asserted.
--
-- One phase function, phi(t) = i (t^3/3 + x t) - log(1 + t^2) at x = 1.7, evaluated at
-- 10^6 complex points three ways: a compiled tape (tape:eval_many on a steep.cvec),
-- hand-written C (tests/bench/native.c) and a Lua closure on steep.complex values;
-- then the cost of a jet of order N (tape:jet) and its growth with N. Values are
-- checked against each other first: a benchmark of the wrong computation is worthless.
--
-- Times are CPU times (os.clock), best of 3 runs, with a full collection before each.

local root = arg[0]:match("^(.*)/tests/bench/run%.lua$") or "."
package.path = table.concat({ root .. "/lua/?.lua", root .. "/lua/?/init.lua",
  package.path }, ";")
package.cpath = table.concat({ root .. "/lua/?.so", root .. "/tests/bench/?.so",
  package.cpath }, ";")

local steep = require "steep"
local core = require "steep.core"
local native = require "native"

local format = string.format
local clock = os.clock

local function shell(cmd)
  local p = io.popen(cmd .. " 2>/dev/null")
  local s = p and p:read("a") or ""
  if p then p:close() end
  return (s:gsub("%s+$", ""))
end

local function cpu_model()
  local f = io.open("/proc/cpuinfo")
  if not f then return "?" end
  local s = f:read("a")
  f:close()
  return s:match("model name%s*:%s*([^\n]+)") or "?"
end

-- Best CPU time of `runs` calls of f (each after a full collection); f's results of the
-- last run are returned after the time.
local function best_of(runs, f)
  local best, r1, r2 = math.huge, nil, nil
  for _ = 1, runs do
    r1, r2 = nil, nil
    collectgarbage()
    collectgarbage()
    local t0 = clock()
    r1, r2 = f()
    local dt = clock() - t0
    if dt < best then best = dt end
  end
  return best, r1, r2
end

local function verdict(ok) return ok and "met" or "NOT met" end

print("steep " .. steep.version .. " benchmark")
print(format("machine: %s, %s CPUs (nproc), %s", shell("uname -m"), shell("nproc"), cpu_model()))
print("date:    " .. shell("date '+%Y-%m-%d %H:%M:%S %z'"))
print("lua:     " .. _VERSION)
print()

-- The phase function ---------------------------------------------------------------

local t, x = steep.var "t", steep.param "x"
local F = steep.I * (t ^ 3 / 3 + x * t) - steep.log(1 + t ^ 2)
local tape = steep.compile(F, t)
local X = 1.7
local params = { x = X }
local M = 1000000
local A, B = steep.complex(-3, -0.5), steep.complex(3, 0.5)

print(format("phi(t) = i (t^3/3 + x t) - log(1 + t^2), x = %g; tape of %d instructions",
  X, (tape:size())))
print(format("%d points evenly spaced from %s to %s", M, tostring(A), tostring(B)))
print()

local points = steep.cvec_range(A, B, M)

-- (a) tape, (b) native C -----------------------------------------------------------

tape:eval_many(points, params)   -- warm-up (page faults of the first large allocation)
local t_tape, v_tape = best_of(3, function() return tape:eval_many(points, params) end)
native.phi(points, X)
local t_native, v_native, s_native = best_of(3, function() return native.phi(points, X) end)

-- (c) a Lua closure on steep.complex values ----------------------------------------

local list = points:totable()    -- Lua complex values, built outside the timing
local I, log = steep.I, steep.log
local function phi(z, xx) return I * (z ^ 3 / 3 + xx * z) - log(1 + z ^ 2) end
-- The same closure with the complex log of the C core called directly: steep.log
-- first checks whether its argument is a series, which costs a call of its own.
local clog = core.cmath.log
local function phi_direct(z, xx) return I * (z ^ 3 / 3 + xx * z) - clog(1 + z ^ 2) end

local function run_lua(f)
  return function()
    local res = {}
    for i = 1, M do res[i] = f(list[i], X) end
    return res
  end
end
local t_lua, v_lua = best_of(3, run_lua(phi))
v_lua = steep.cvec(v_lua)
local t_lua2, v_lua2 = best_of(3, run_lua(phi_direct))
v_lua2 = steep.cvec(v_lua2)

-- Agreement --------------------------------------------------------------------------

local vmax = native.maxdiff(v_native, steep.cvec_range(0, 0, M))   -- max |phi|
local s_tape
do   -- the sum of the tape's values, in the order native.phi sums them
  local sr, si = 0.0, 0.0
  for i = 1, M do
    local z = v_tape:get(i)
    sr, si = sr + z[1], si + z[2]
  end
  s_tape = steep.complex(sr, si)
end
print("agreement (max |phi| over the points = " .. format("%.3f", vmax) .. ")")
print(format("  max |tape - native|      %.3e", native.maxdiff(v_tape, v_native)))
print(format("  max |tape - lua|         %.3e", native.maxdiff(v_tape, v_lua)))
print(format("  max |tape - lua direct|  %.3e", native.maxdiff(v_tape, v_lua2)))
print(format("  sum of values: tape %s, native %s", tostring(s_tape), tostring(s_native)))
print()

-- Table ------------------------------------------------------------------------------

local ns = function(sec) return sec / M * 1e9 end
local r_tn = t_tape / t_native
local r_lt = t_lua / t_tape
local r_lt2 = t_lua2 / t_tape
print(format("%-44s %12s", "batch evaluation, 10^6 points (best of 3)", "ns/point"))
print(format("%-44s %12.1f", "(a) tape:eval_many on a steep.cvec", ns(t_tape)))
print(format("%-44s %12.1f", "(b) native C (tests/bench/native.c)", ns(t_native)))
print(format("%-44s %12.1f", "(c) Lua closure, steep.complex + steep.log", ns(t_lua)))
print(format("%-44s %12.1f", "(c') Lua closure, steep.complex + cmath.log", ns(t_lua2)))
print()
print(format("%-30s %10s %12s   %s", "ratio", "measured", "target", ""))
print(format("%-30s %10.2f %12s   %s", "tape / native", r_tn, "<= 3", verdict(r_tn <= 3)))
print(format("%-30s %10.1f %12s   %s", "lua / tape", r_lt, ">= 20", verdict(r_lt >= 20)))
print(format("%-30s %10.1f %12s   %s", "lua (cmath.log) / tape", r_lt2, ">= 20",
  verdict(r_lt2 >= 20)))
print()

-- (d) jets -------------------------------------------------------------------------

local z0 = steep.complex(0.3, 0.2)
do   -- check the first coefficients against phi, phi' and phi''/2 by hand
  local s = tape:jet(z0, 128, params)
  local one = steep.complex(1, 0)
  local q = 1 + z0 ^ 2
  local d0 = I * (z0 ^ 3 / 3 + X * z0) - core.cmath.log(q)
  local d1 = I * (z0 ^ 2 + X) - 2 * z0 / q
  local d2 = (2 * I * z0 - 2 * (one - z0 ^ 2) / q ^ 2) / 2
  local e = 0
  for k, want in ipairs { d0, d1, d2 } do
    e = math.max(e, core.cmath.abs(s:coef(k - 1) - want))
  end
  print(format("jet at %s, order 128: max |c_k - phi^(k)/k!| for k = 0..2: %.3e",
    tostring(z0), e))
end

local Ns = { 16, 32, 64, 128 }
local per = {}
print(format("%-8s %10s %12s", "N", "jets/run", "us per jet"))
for _, N in ipairs(Ns) do
  tape:jet(z0, N, params)
  local reps = 1
  while true do   -- calibrate: a run of `reps` jets takes at least 0.2 s
    local t0 = clock()
    for _ = 1, reps do tape:jet(z0, N, params) end
    if clock() - t0 >= 0.2 then break end
    reps = reps * 2
  end
  local dt = best_of(3, function()
    for _ = 1, reps do tape:jet(z0, N, params) end
  end)
  per[#per + 1] = dt / reps
  print(format("%-8d %10d %12.3f", N, reps, dt / reps * 1e6))
end

-- Least squares slope of log(time) on log(N).
local n, sx, sy = #Ns, 0, 0
for i = 1, n do sx, sy = sx + math.log(Ns[i]), sy + math.log(per[i]) end
local mx, my = sx / n, sy / n
local sxy, sxx = 0, 0
for i = 1, n do
  local dx = math.log(Ns[i]) - mx
  sxy, sxx = sxy + dx * (math.log(per[i]) - my), sxx + dx * dx
end
local slope = sxy / sxx
local last = math.log(per[n] / per[n - 1]) / math.log(Ns[n] / Ns[n - 1])
print()
print(format("%-30s %10s %12s   %s", "jet cost ~ N^p", "measured", "target", ""))
print(format("%-30s %10.2f %12s   %s", "p (least squares, N=16..128)", slope, "<= 2.3",
  verdict(slope <= 2.3)))
print(format("%-30s %10.2f", "p (N=64..128 only)", last))
