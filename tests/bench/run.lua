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

-- (e) the landscape quadrature: the Airy integral ------------------------------------
--
-- Ai(x) = (1/2pi) int exp(i(t^3/3 + x t)) dt along the real line (DLMF 9.5.4), at
-- x = 10, 100, 1000, three ways:
--   steep   J:quad{x = x}: the real line deformed onto steepest descent paths;
--   QAGIU   GSL's gsl_integration_qagiu on Ai(x) = (1/pi) int_0^inf cos(t^3/3 + x t) dt;
--   QAGI    GSL's gsl_integration_qagi on (1/2pi) int_-inf^inf cos(t^3/3 + x t) dt
--           (epsabs 0, epsrel 1e-12, a workspace of 1000 subintervals; tests/bench/qagi.c).
-- Reference: gsl_sf_airy_Ai. Ai(1000) ~ 10^-9157 underflows (0 is its correctly rounded
-- value), so the integral is also taken with the exponent shifted by s = (2/3) x^(3/2),
-- which gives Ai(x) exp(2/3 x^(3/2)): compared with gsl_sf_airy_Ai_scaled, itself checked
-- against the asymptotic series DLMF 9.7.5 (u_k of DLMF 9.7.2), summed to its smallest
-- term. A value of exp(F) with |F| ~ (2/3) x^(3/2) carries a rounding error of about
-- |F| u (u = 2^-53) however it is computed, so that is printed beside the errors.
-- Times are wall times (CLOCK_MONOTONIC), best of 3; evaluations are info.evals (J:quad's
-- third result) and the counter in GSL's integrand.

local qagi = require "qagi"
local now = qagi.now
local landscape_m = require "steep.landscape"
local decompose_m = require "steep.decompose"

local function best_wall(runs, f)
  local best, res = math.huge, nil
  for _ = 1, runs do
    res = nil
    collectgarbage()
    collectgarbage()
    local t0 = now()
    res = table.pack(f())
    local dt = now() - t0
    if dt < best then best = dt end
  end
  return best, table.unpack(res, 1, res.n)
end

local function relerr(got, want)
  local g = steep.is_complex(got) and got or steep.complex(got, 0)
  local d = core.cmath.abs(g - want)
  if want == 0 then return d == 0 and 0 or math.huge end
  return d / math.abs(want)
end

-- Ai(x) exp(2/3 x^(3/2)) by DLMF 9.7.5, u_k = Gamma(3k+1/2) / (54^k k! Gamma(k+1/2)).
local function ai_scaled_series(X)
  local z = 2 / 3 * X ^ 1.5
  local s, u, last, k = 1, 1, 1, 0
  while true do
    k = k + 1
    u = u * (3 * k - 0.5) * (3 * k - 1.5) * (3 * k - 2.5) / (54 * k * (k - 0.5))
    local term = u / z ^ k
    if term > last or term < 1e-20 then break end
    last = term
    s = s + (k % 2 == 1 and -term or term)
  end
  return s / (2 * math.sqrt(math.pi) * X ^ 0.25)
end

local tt, xx, ss = steep.var "t", steep.param "x", steep.param "s"
local line = steep.path { steep.inf(math.pi), 0, steep.inf(0) }
local Jai = steep.integral { var = tt, exponent = steep.I * (tt ^ 3 / 3 + xx * tt),
  contour = line }
local Jsc = steep.integral { var = tt, exponent = steep.I * (tt ^ 3 / 3 + xx * tt) + ss,
  contour = line }
local twopi = 2 * math.pi
local XS = { 10, 100, 1000 }
local U = 2 ^ -53

print()
print("Airy integral Ai(x) = (1/2pi) int exp(i(t^3/3 + x t)) dt along the real line")
print(format("%-6s %-22s %-24s %9s %9s %8s %9s  %s", "x", "method", "value", "rel.err",
  "est.err", "evals", "ms", "status"))
local rows, land_ms = {}, {}
for _, X in ipairs(XS) do
  local ref, ref_st = qagi.airy_ai(X)
  local refs = qagi.airy_ai_scaled(X)
  local s = 2 / 3 * X ^ 1.5
  Jai:quad { x = X }   -- first call: compiles the tape of the critical points
  local t_q, v, e, info = best_wall(3, function() return Jai:quad { x = X } end)
  v, e = v / twopi, e / twopi
  local t_s, vs, es, infos = best_wall(3, function() return Jsc:quad { x = X, s = s } end)
  vs, es = vs / twopi, es / twopi
  local t_l = best_wall(3, function() return Jai:landscape { x = X } end)
  land_ms[X] = t_l * 1e3
  local t_u, qu, qu_e, qu_st, qu_n = best_wall(3, function() return qagi.qagiu(X, 1e-12, 1000) end)
  local t_i, qi, qi_e, qi_st, qi_n = best_wall(3, function() return qagi.qagi(X, 1e-12, 1000) end)
  -- the error estimates relative to the value each method returned
  local function est(err, val)
    local a = core.cmath.abs(val)
    if err == 0 then return 0 end
    return a > 0 and err / a or math.huge
  end
  local r = { x = X, ref = ref, steep_err = relerr(v, ref), steep_evals = info.evals,
    scaled_err = relerr(vs, refs), floor = s * U, steep_zero = core.cmath.abs(v) == 0,
    qagiu_err = relerr(qu, ref), qagiu_evals = qu_n, qagiu_status = qu_st,
    qagi_err = relerr(qi, ref), qagi_evals = qi_n, qagi_status = qi_st }
  rows[#rows + 1] = r
  local refnote = ref_st == "success" and "" or (" (gsl_sf_airy_Ai: " .. ref_st .. ")")
  print(format("%-6g %-22s %-24s %9.2e %9.2e %8d %9.2f  %s, along %s%s", X, "steep J:quad",
    tostring(v), r.steep_err, est(e, v), info.evals, t_q * 1e3, info.status, info.along,
    refnote))
  print(format("%-6s %-22s %-24s %9.2e %9.2e %8d %9.2f  %s", "", "steep, shifted by s",
    tostring(vs), r.scaled_err, est(es, vs), infos.evals, t_s * 1e3, infos.status))
  print(format("%-6s %-22s %-24.16g %9.2e %9.2e %8d %9.2f  %s", "", "GSL qagiu [0,inf)", qu,
    r.qagiu_err, est(qu_e, qu), qu_n, t_u * 1e3, qu_st))
  print(format("%-6s %-22s %-24.16g %9.2e %9.2e %8d %9.2f  %s", "", "GSL qagi (-inf,inf)", qi,
    r.qagi_err, est(qi_e, qi), qi_n, t_i * 1e3, qi_st))
  print(format("%-6s %-22s %-24.16g", "", "gsl_sf_airy_Ai", ref))
  print(format("%-6s %-22s %-24.16g %9.2e  (vs DLMF 9.7.5 series %.16g)", "",
    "gsl_sf_airy_Ai_scaled", refs, relerr(refs, ai_scaled_series(X)), ai_scaled_series(X)))
  print(format("%-6s %-22s %-24s %9.2e", "", "rounding: |F(saddle)| u", "", r.floor))
end
print()
print(format("%-6s %14s", "x", "J:landscape ms"))
for _, X in ipairs(XS) do print(format("%-6g %14.2f", X, land_ms[X])) end

-- Targets: 1e-12 relative at x = 100 with >= 10x fewer evaluations than QAGI(U); a
-- correct answer (1e-12 relative) wherever QAGI(U) fails.
print()
print(format("%-54s %10s %12s   %s", "Airy target", "measured", "target", ""))
local r100
for _, r in ipairs(rows) do if r.x == 100 then r100 = r end end
print(format("%-54s %10.2e %12s   %s", "steep relative error, x = 100", r100.steep_err,
  "<= 1e-12", verdict(r100.steep_err <= 1e-12)))
local fewer_u = r100.qagiu_evals / r100.steep_evals
local fewer_i = r100.qagi_evals / r100.steep_evals
print(format("%-54s %10.1f %12s   %s", "QAGIU evaluations / steep evaluations, x = 100", fewer_u,
  ">= 10", verdict(fewer_u >= 10)))
print(format("%-54s %10.1f %12s   %s", "QAGI evaluations / steep evaluations, x = 100", fewer_i,
  ">= 10", verdict(fewer_i >= 10)))
for _, r in ipairs(rows) do
  local failed = r.qagiu_status ~= "success" or r.qagiu_err > 1e-12
      or r.qagi_status ~= "success" or r.qagi_err > 1e-12
  local tag = format("x = %g: QAGI(U) %s;", r.x, failed and "failed" or "succeeded")
  if r.ref == 0 then
    print(format("%-54s %10s %12s   %s", tag .. " steep Ai (underflows)",
      r.steep_zero and "0" or "not 0", "0", failed and verdict(r.steep_zero) or "n/a"))
  else
    print(format("%-54s %10.2e %12s   %s", tag .. " steep rel. error", r.steep_err,
      "<= 1e-12", failed and verdict(r.steep_err <= 1e-12) or "n/a"))
  end
  print(format("%-54s %10.2e %12s   %s", tag .. " steep shifted, rel. error", r.scaled_err,
    "<= 1e-12", failed and verdict(r.scaled_err <= 1e-12) or "n/a"))
end
print("note: rel.err is against gsl_sf_airy_Ai(_scaled); est.err is the method's own error")
print("estimate over |value|. |F(saddle)| u bounds from below the relative error of any")
print("double evaluation of exp(F) there: above 1e-12 at x = 1000 (|F| = 2.1e4).")

-- Where J:quad's time and evaluations go: one more run at each x with the kernel entry
-- points of steep.core, the tape methods and the stages of steep.landscape/decompose
-- wrapped by counters and timers (bench side only; the library is not changed).
-- info.evals counts the evaluations of path tracing and quadrature; core.zero reports its
-- jets; core.count (argument principle) does not report its count. Stages nest (trace
-- runs inside saddle_paths and decompose), kernels run inside stages.
print()
print("J:quad broken down (calls, integrand/jet evaluations, wall ms)")
do
  local wrapped, stats, counted = {}, {}, {}
  local function wrap(tbl, name, label, evals_of)
    local f = tbl[name]
    wrapped[#wrapped + 1] = { tbl, name, f }
    tbl[name] = function(...)
      local t0 = now()
      local res = table.pack(f(...))
      local st = stats[label] or { calls = 0, evals = 0, time = 0, known = evals_of ~= nil }
      stats[label] = st
      st.calls = st.calls + 1
      st.time = st.time + (now() - t0)
      if evals_of then st.evals = st.evals + (evals_of(res, ...) or 0) end
      return table.unpack(res, 1, res.n)
    end
  end
  local kernels = {
    { core, "zero", "core.zero (Newton)", function(r) return r[4] end },
    { core, "count", "core.count (argument principle)" },
    { core, "trace", "core.trace (steepest paths)", function(r) return r[5] end },
    { core, "saddle_starts", "core.saddle_starts" },
    { core, "quad_polyline", "core.quad_polyline", function(r) return r[3] end },
    { core, "integrand_many", "core.integrand_many", function(r) return #r[1] end },
    { core, "crossings", "core.crossings" }, { core, "turning", "core.turning" },
    { core, "distance", "core.distance" } }
  local tape_methods = getmetatable(Jai.tape).__index
  if type(tape_methods) == "table" then
    kernels[#kernels + 1] = { tape_methods, "jet", "tape:jet", function() return 1 end }
    kernels[#kernels + 1] = { tape_methods, "eval", "tape:eval", function() return 1 end }
    kernels[#kernels + 1] = { tape_methods, "eval_many", "tape:eval_many",
      function(_, _, pts) return #pts end }
  end
  local stages = {
    { getmetatable(Jai).__index, "_landscape", "J:_landscape (in all)" },
    { landscape_m, "singularities", "landscape.singularities" },
    { landscape_m, "saddles", "landscape.saddles" },
    { landscape_m, "valleys", "landscape.valleys" },
    { landscape_m, "saddle_paths", "landscape.saddle_paths" },
    { decompose_m, "decompose", "decompose.decompose" } }
  local is_kernel = {}
  for _, k in ipairs(kernels) do wrap(k[1], k[2], k[3], k[4]); is_kernel[k[3]] = true end
  for _, k in ipairs(stages) do wrap(k[1], k[2], k[3]) end
  for _, X in ipairs(XS) do
    stats = {}
    local t0 = now()
    local _, _, info = Jai:quad { x = X }
    local total = now() - t0
    print(format("x = %g: J:quad %.2f ms in all (instrumented), info.evals %d", X, total * 1e3,
      info.evals))
    for _, group in ipairs { stages, kernels } do
      local kern, ev = 0, 0
      for _, k in ipairs(group) do
        local st = stats[k[3]]
        if st and group == stages then
          print(format("  %-34s %6d calls %15s %9.2f ms", k[3], st.calls, "", st.time * 1e3))
        elseif st then
          print(format("  %-34s %6d calls %9s evals %9.2f ms", k[3], st.calls,
            st.known and tostring(st.evals) or "n/a", st.time * 1e3))
          kern, ev = kern + st.time, ev + st.evals
        end
      end
      if group == kernels then
        counted[X] = ev
        print(format("  %-34s %12s %9d evals %9.2f ms", "C kernels in all", "", ev, kern * 1e3))
        print(format("  %-34s %12s %9s       %9.2f ms", "Lua outside the C kernels", "", "",
          (total - kern) * 1e3))
      end
    end
  end
  for j = #wrapped, 1, -1 do local w = wrapped[j]; w[1][w[2]] = w[3] end
  -- the evaluation target again, counting every evaluation J:quad reports anywhere (a
  -- lower bound: core.count's are not reported)
  print()
  print(format("%-54s %10s %12s   %s", "Airy target, all counted evaluations", "measured",
    "target", ""))
  local fu, fi = r100.qagiu_evals / counted[100], r100.qagi_evals / counted[100]
  print(format("%-54s %10.1f %12s   %s", "QAGIU evaluations / all steep evaluations, x = 100",
    fu, ">= 10", verdict(fu >= 10)))
  print(format("%-54s %10.1f %12s   %s", "QAGI evaluations / all steep evaluations, x = 100",
    fi, ">= 10", verdict(fi >= 10)))
end

-- (f) expansions: J:series and J:expand ----------------------------------------------
--
-- Stirling's integral int_0^inf exp(lam (log s - s)) ds = Gamma(lam+1)/lam^(lam+1): the
-- saddle at s = 1 gives c_k = sqrt(2 pi) gamma_(k-1) on lam^-(k - 1/2) (Stirling's
-- coefficients, DLMF 5.11.3-5.11.4; tests/test_expand.lua checks them to order 20 against
-- exact rationals). J:series{order = N} for N = 10, 20, 50, 100, then a full J:expand of
-- the Airy integral at x = 8 with 10 terms plus the J:quad that checks it. Wall times
-- (CLOCK_MONOTONIC), median of 9 runs after one warm-up run; the first coefficients and
-- the value are checked first. Then one instrumented run of each, broken down by stage.

local function median_wall(runs, f)
  local times, res = {}, nil
  for i = 1, runs do
    collectgarbage()
    collectgarbage()
    local t0 = now()
    res = table.pack(f())
    times[i] = now() - t0
  end
  table.sort(times)
  return times[(runs + 1) // 2], table.unpack(res, 1, res.n)
end

print()
print("expansions: J:series of Stirling's integral, J:expand + J:quad of Airy's")
local sv, slam = steep.var "s", steep.param "lam"
local Jst = steep.integral { var = sv, exponent = slam * (steep.log(sv) - sv),
  contour = steep.line(0, steep.inf(0)), large = slam }
do   -- correctness first: gamma_1..gamma_5 (DLMF 5.11.4, from memory)
  local c = Jst:series { order = 6 }[1].coefficients
  local want = { 1 / 12, 1 / 288, -139 / 51840, -571 / 2488320, 163879 / 209018880 }
  local e = core.cmath.abs(c[1] - math.sqrt(2 * math.pi)) / math.sqrt(2 * math.pi)
  for k, w in ipairs(want) do e = math.max(e, core.cmath.abs(c[k + 1] / c[1] - w) / math.abs(w)) end
  print(format("Stirling check: max relative error of c_1 and c_(k+1)/c_1 = gamma_k, k <= 5: %.2e", e))
end
local series_ms = {}
print(format("%-34s %12s", "J:series{order = N}", "median ms"))
for _, N in ipairs({ 10, 20, 50, 100 }) do
  Jst:series { order = N }
  local dt = median_wall(9, function() return Jst:series { order = N } end)
  series_ms[N] = dt * 1e3
  print(format("%-34s %12.2f", "N = " .. N, dt * 1e3))
end

local XE = 8
local ref8 = qagi.airy_ai(XE)
local Jx = steep.integral { var = tt, exponent = steep.I * (tt ^ 3 / 3 + xx * tt),
  contour = line, large = xx }
local function expand_and_quad()
  local r = Jx:expand { x = XE, order = 10 }
  local q, qe = Jx:quad { x = XE }
  return r, q, qe
end
expand_and_quad()
local t_eq, r8, q8, qe8 = median_wall(9, expand_and_quad)
local t_e = median_wall(9, function() return Jx:expand { x = XE, order = 10 } end)
local t_qq = median_wall(9, function() return Jx:quad { x = XE } end)
local t_chk = median_wall(9, function() return Jx:check { x = { XE }, order = 10 } end)
print(format("Airy x = %g, 10 terms: expansion/2pi %s (rel. error %.2e vs gsl_sf_airy_Ai, "
  .. "reported %.2e); quadrature rel. error %.2e", XE, tostring(r8.value / twopi),
  relerr(r8.value / twopi, ref8), r8.error / twopi / ref8, relerr(q8 / twopi, ref8)))
print(format("%-34s %12.2f", "J:expand{order = 10}", t_e * 1e3))
print(format("%-34s %12.2f", "J:quad", t_qq * 1e3))
print(format("%-34s %12.2f", "J:expand + J:quad", t_eq * 1e3))
print(format("%-34s %12.2f", "J:check{x = {8}, order = 10}", t_chk * 1e3))
print()
print(format("%-54s %10s %12s   %s", "expansion targets", "measured", "target", ""))
print(format("%-54s %10.2f %12s   %s", "J:series, 20 coefficients (ms)", series_ms[20], "< 1",
  verdict(series_ms[20] < 1)))
print(format("%-54s %10.2f %12s   %s", "J:series, 100 coefficients (ms)", series_ms[100], "< 50",
  verdict(series_ms[100] < 50)))
print(format("%-54s %10.2f %12s   %s", "J:expand (10 terms) + J:quad, one saddle (ms)",
  t_eq * 1e3, "< 5", verdict(t_eq * 1e3 < 5)))

-- Where the time goes: stages and kernels wrapped by timers for one run each.
print()
print("expansions broken down (calls, wall ms; stages nest, kernels run inside stages)")
do
  local expand_m = require "steep.expand"
  local wrapped, stats = {}, {}
  local function wrap(tbl, name, label)
    local f = tbl[name]
    wrapped[#wrapped + 1] = { tbl, name, f }
    tbl[name] = function(...)
      local t0 = now()
      local res = table.pack(f(...))
      local st = stats[label] or { calls = 0, time = 0 }
      stats[label] = st
      st.calls, st.time = st.calls + 1, st.time + (now() - t0)
      return table.unpack(res, 1, res.n)
    end
  end
  local tape_methods = getmetatable(Jst.tape).__index
  local list = {
    { getmetatable(Jst).__index, "_landscape", "J:_landscape" },
    { decompose_m, "decompose", "decompose.decompose" },
    { landscape_m, "saddle_paths", "landscape.saddle_paths" },
    { expand_m, "saddle_series", "expand.saddle_series (all)" },
    { expand_m, "endpoint_series", "expand.endpoint_series (all)" },
    { core, "invmap_circle", "core.invmap_circle (Cauchy circles)" },
    { core, "quad_polyline", "core.quad_polyline" },
    { core, "count", "core.count (argument principle)" },
    { core, "zero", "core.zero (Newton)" },
    { core, "trace", "core.trace (steepest paths)" } }
  if type(tape_methods) == "table" then list[#list + 1] = { tape_methods, "jet", "tape:jet" } end
  for _, w in ipairs(list) do wrap(w[1], w[2], w[3]) end
  local function show(label, f)
    stats = {}
    local t0 = now()
    f()
    local total = now() - t0
    print(format("%s: %.2f ms in all (instrumented)", label, total * 1e3))
    for _, w in ipairs(list) do
      local st = stats[w[3]]
      if st then print(format("  %-40s %6d calls %9.2f ms", w[3], st.calls, st.time * 1e3)) end
    end
  end
  for _, N in ipairs({ 20, 100 }) do
    show("J:series{order = " .. N .. "} (Stirling)", function() Jst:series { order = N } end)
  end
  show("J:expand{x = 8, order = 10} + J:quad (Airy)", expand_and_quad)
  for j = #wrapped, 1, -1 do local w = wrapped[j]; w[1][w[2]] = w[3] end
end

-- (g) a sweep with continuation -------------------------------------------------------
--
-- J(x) = int exp(-1.6 t^2/2 + 1.25 i x t) / (t - P) dt along the real line, P = -0.45 +
-- 0.8i (the family of tests/test_routes.lua; its saddle 1.25 i x / 1.6 moves linearly and
-- passes the pole's level at x ~ 1): J:sweep over 1000 values of x evenly from 3 to 8,
-- expansion of order 6 and J:quad at each, with continuation (each step's saddles seed
-- Newton at the next) and without (continuation = false: a full search at each step),
-- in the same run. CPU times (os.clock), the best of three runs each (interleaved, after
-- a full collection each: this machine's speed drifts by tens of per cent over seconds).
-- The two sweeps are checked against each other and against quadrature first.
-- Targets: with continuation < 2 s; without / with >= 3.

do
  local t_, x_ = steep.var "t", steep.param "x"
  local P = steep.complex(-0.45, 0.8)
  local Jsw = steep.integral { var = t_,
    exponent = -1.6 * t_ ^ 2 / 2 + steep.I * 1.25 * x_ * t_, amplitude = 1 / (t_ - P),
    contour = steep.line(steep.inf(math.pi), steep.inf(0)), large = x_ }
  local NSW = 1000
  local range = { from = 3, to = 8, steps = NSW - 1 }
  Jsw:sweep { x = { 3, 3.1 }, order = 6, progress = false }   -- warm-up: tapes compiled
  local function timed_sweep(cont)
    collectgarbage()
    collectgarbage()
    local t0 = clock()
    -- (one process: the time is this process's CPU, and workers would do the work)
    local sw = Jsw:sweep { x = range, order = 6, continuation = cont, progress = false,
      workers = 1 }
    return clock() - t0, sw
  end
  local t_on, t_off, sw_on, sw_off = math.huge, math.huge, nil, nil
  for _ = 1, 3 do
    local t1, s1 = timed_sweep(true)
    local t2, s2 = timed_sweep(false)
    if t1 < t_on then t_on, sw_on = t1, s1 end
    if t2 < t_off then t_off, sw_off = t2, s2 end
  end
  local failed, disagree, maxdiff, maxrel = 0, 0, 0, 0
  for i, r in ipairs(sw_on.rows) do
    local o = sw_off.rows[i]
    if r.failure or o.failure then
      failed = failed + 1
    else
      if not (r.agrees and o.agrees) then disagree = disagree + 1 end
      maxdiff = math.max(maxdiff, core.cmath.abs(r.expansion - o.expansion)
        / core.cmath.abs(r.quad))
      maxrel = math.max(maxrel, r.relative_error)
    end
  end
  print()
  print(format("sweep of %d values of x in [3, 8], order 6, expansion + J:quad at each", NSW))
  print(format("  rows failed %d; rows where expansion and quadrature disagree beyond the "
    .. "estimates %d", failed, disagree))
  print(format("  max |expansion(continuation) - expansion(full search)| / |J| = %.2e; "
    .. "max relative error of the expansion %.2e", maxdiff, maxrel))
  print(format("%-44s %10s %12s   %s", "sweep", "measured", "target", ""))
  print(format("%-44s %10.2f %12s   %s", "with continuation, s (best of 3)", t_on, "< 2",
    verdict(t_on < 2)))
  print(format("%-44s %10.2f", "without continuation, s (best of 3)", t_off))
  print(format("%-44s %10.2f %12s   %s", "ratio without / with", t_off / t_on, ">= 3",
    verdict(t_off / t_on >= 3)))

  -- Where the time goes: one more sweep of 200 values each way with the stages wrapped
  -- by CPU-time counters (bench side only; the library is not changed). Stages are
  -- counted apart by caller: the sweep's own landscape and expansion, and J:quad (which
  -- maps the landscape again for itself, by a full search). Stages nest: the landscape's
  -- parts run inside J:_landscape, decompose and the coefficients inside expand or quad.
  local methods = getmetatable(Jsw).__index
  local asym = require "steep.asymptotics"
  local expand_m = require "steep.expand"
  local wrapped, stats, in_quad = {}, {}, false
  local function wrap(tbl, name, label_of)
    local f = tbl[name]
    wrapped[#wrapped + 1] = { tbl, name, f }
    tbl[name] = function(...)
      local label = label_of(...)
      local t0 = clock()
      local res = table.pack(f(...))
      local st = stats[label] or { calls = 0, time = 0 }
      stats[label] = st
      st.calls, st.time = st.calls + 1, st.time + (clock() - t0)
      return table.unpack(res, 1, res.n)
    end
  end
  local function where() return in_quad and "quad: " or "sweep: " end
  wrap(methods, "_landscape", function(_, _, _, _, cont)
    local how = (cont and cont.fast) and " (continued)" or " (full search)"
    return where() .. "J:_landscape" .. how
  end)
  wrap(landscape_m, "singularities", function() return where() .. "  landscape.singularities" end)
  wrap(landscape_m, "saddles", function() return where() .. "  landscape.saddles" end)
  wrap(landscape_m, "valleys", function() return where() .. "  landscape.valleys" end)
  wrap(decompose_m, "decompose", function() return where() .. "decompose.decompose" end)
  wrap(expand_m, "circle_coefficients", function()
    return where() .. "expand.circle_coefficients"
  end)
  wrap(asym, "expand", function() return "sweep: asymptotics.expand (all of it)" end)
  wrap(methods, "quad", function() return "quad: J:quad (all of it)" end)
  local quad = methods.quad
  methods.quad = function(...)
    in_quad = true
    local res = table.pack(quad(...))
    in_quad = false
    return table.unpack(res, 1, res.n)
  end
  local labels = { "sweep: J:_landscape (continued)", "sweep: J:_landscape (full search)",
    "sweep:   landscape.singularities", "sweep:   landscape.saddles",
    "sweep:   landscape.valleys", "sweep: asymptotics.expand (all of it)",
    "sweep: decompose.decompose", "sweep: expand.circle_coefficients",
    "quad: J:quad (all of it)", "quad: J:_landscape (full search)",
    "quad:   landscape.singularities", "quad:   landscape.saddles", "quad:   landscape.valleys",
    "quad: decompose.decompose", "quad: expand.circle_coefficients" }
  print()
  print("sweep broken down (200 values of x in [3, 8]; CPU s, share of the instrumented total)")
  for _, cont in ipairs({ true, false }) do
    stats = {}
    collectgarbage()
    collectgarbage()
    local kb0 = collectgarbage("count")
    local t0 = clock()
    Jsw:sweep { x = { from = 3, to = 8, steps = 199 }, order = 6, continuation = cont,
      progress = false, workers = 1 }
    local total = clock() - t0
    print(format("continuation %s: %.2f s in all; Lua heap grew %.0f kB (garbage not yet "
      .. "collected)", tostring(cont), total, collectgarbage("count") - kb0))
    for _, label in ipairs(labels) do
      local st = stats[label]
      if st then
        print(format("  %-52s %5d calls %8.3f s %6.1f%%", label, st.calls, st.time,
          100 * st.time / total))
      end
    end
  end
  methods.quad = quad
  for j = #wrapped, 1, -1 do local w = wrapped[j]; w[1][w[2]] = w[3] end
end

-- (h) the saddlepoint recipe: a table of tail probabilities ----------------------------
--
-- recipes/saddlepoint.lua on the mean of n = 20 exponential(1) variables (K(s) = -log(1 - s)):
-- d:table at 1000 thresholds evenly from 0.5 to 3 with the default method (Lugannani-Rice:
-- Newton's method for the saddlepoint, then a closed formula) and with method = "uniform"
-- (the Bromwich integral expanded by steep: J:expand at each threshold, four terms), in
-- the same run. CPU times (os.clock), one run each after a warm-up and a full collection.
-- Both tables are checked first against the exact tail, which for a whole n is
-- P(mean >= x) = e^{-n x} sum_{k < n} (n x)^k / k! (gamma law with integer shape).
-- Target: the default table in under 0.5 s.

do
  package.path = root .. "/recipes/?.lua;" .. package.path
  local sp = require "saddlepoint"
  local sv = steep.var "s"
  local d = sp.distribution { K = -steep.log(1 - sv), s = sv, domain = { -math.huge, 1 } }
  local NS, NT = 20, 1000
  local function exact(xv)
    local term, sum = 1, 1
    for k = 1, NS - 1 do term = term * NS * xv / k; sum = sum + term end
    return math.exp(-NS * xv) * sum
  end
  d:table { n = NS, from = 0.5, to = 3, steps = 3 }                       -- warm-up
  d:table { n = NS, from = 0.5, to = 3, steps = 3, method = "uniform" }
  local function timed(method)
    collectgarbage()
    collectgarbage()
    local t0 = clock()
    local rows = d:table { n = NS, from = 0.5, to = 3, steps = NT - 1, method = method }
    return clock() - t0, rows
  end
  local t_lr, rows_lr = timed(nil)
  local t_un, rows_un = timed("uniform")
  local function check(rows)
    local bad, worst, at = 0, 0, nil
    for _, r in ipairs(rows) do
      if not (r.p and r.p >= 0 and r.p <= 1) then
        bad = bad + 1
      else
        local e = math.abs(r.p - exact(r.x)) / exact(r.x)
        if e > worst then worst, at = e, r.x end
      end
    end
    return bad, worst, at
  end
  local bad_lr, worst_lr, at_lr = check(rows_lr)
  local bad_un, worst_un, at_un = check(rows_un)
  print()
  print(format("saddlepoint recipe: P(mean >= x) for n = %d exponential(1) variables at %d "
    .. "thresholds in [0.5, 3]", NS, NT))
  print(format("  Lugannani-Rice: rows without a probability %d; largest relative error %.2e "
    .. "(x = %.4g)", bad_lr, worst_lr, at_lr or 0 / 0))
  print(format("  uniform series: rows without a probability %d; largest relative error %.2e "
    .. "(x = %.4g)", bad_un, worst_un, at_un or 0 / 0))
  print(format("%-44s %10s %12s   %s", "saddlepoint table, 1000 thresholds", "measured",
    "target", ""))
  print(format("%-44s %10.3f %12s   %s", "Lugannani-Rice (default), s", t_lr, "< 0.5",
    verdict(t_lr < 0.5)))
  print(format("%-44s %10.3f", "uniform (Bromwich integral by steep), s", t_un))
  print(format("%-44s %10.1f", "ratio uniform / Lugannani-Rice", t_un / t_lr))
  print(format("%-44s %10.2f", "uniform, ms per threshold", t_un / NT * 1e3))
end

---------------------------------------------------------------------------------------
-- Several variables: the cost of an expansion (jets in total degree and Hormander's
-- sum, ext/mjet.c and ext/mexpand.c) and of the iterated quadrature that checks it, on
-- the cases tests/test_multi*.lua checks against exact values. Figures only.
---------------------------------------------------------------------------------------

do
  local x, y, z = steep.var "x", steep.var "y", steep.var "z"
  local lam, nn = steep.param "lam", steep.param "n"
  local log = steep.log
  local c = steep.circle(0, 1)
  local cases = {
    { "cos box, 2 variables, lam = 20", steep.integral { var = { x, y },
      exponent = lam * (steep.cos(x) + steep.cos(y)),
      contour = { steep.line(0, math.pi), steep.line(0, math.pi) }, large = lam },
      { lam = 20 }, { 2, 6 } },
    { "torus (1+x+y+z)^4n, 3 variables, n = 10", steep.integral { var = { x, y, z },
      exponent = nn * (4 * log(1 + x + y + z) - log(x) - log(y) - log(z)),
      amplitude = 1 / (x * y * z), contour = { c, c, c }, large = nn }, { n = 10 }, { 2, 4 } },
    { "stationary phase on R^2, lam = 20", steep.integral { var = { x, y },
      exponent = I * lam * ((x ^ 2 - y ^ 2) / 2 + 0.3 * x ^ 2 * y),
      contour = { steep.line(steep.inf(math.pi), steep.inf(0)),
        steep.line(steep.inf(math.pi), steep.inf(0)) }, large = lam }, { lam = 20 }, { 4 } },
  }
  print()
  print("several variables: J:expand (which points contribute, jets, terms) and J:quad")
  print(format("%-44s %s", "case", "J:expand CPU s by order; J:quad CPU s"))
  for _, case in ipairs(cases) do
    local J, p = case[2], case[3]
    local texp = {}
    for _, K in ipairs(case[4]) do
      local opts = { order = K }
      for k, v in pairs(p) do opts[k] = v end
      texp[#texp + 1] = format("%d: %.3f", K, (best_of(2, function() return J:expand(opts) end)))
    end
    local tq, v, e = best_of(1, function() return J:quad(p) end)
    print(format("%-44s %s   quad %.3f s (estimate %.1e relative)", case[1],
      "order " .. table.concat(texp, ", order "), tq, e / v:abs()))
  end
end
