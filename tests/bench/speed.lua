-- The speed of the uniform forms, long series, long paths and big sweeps (make bench runs
-- it after run.lua; alone: lua5.4 tests/bench/speed.lua). Figures and targets printed,
-- nothing asserted; each target is a ratio of two figures measured in this same run, and
-- every computation timed is first checked against an independent value. A feature this
-- tree lacks (an older tree) prints n/a.
--
--   (a) the Airy-type uniform contribution of two saddles together against the plain
--       expansion of the same two saddles at the same order;
--   (b) Stirling's coefficients gamma_k to k = 100 and 200 against exact rationals;
--   (c) J:quad along a given path of 10^5 points: bytes allocated per point, and time
--       against GSL's QAG on the same segments in C;
--   (d) a sweep of Airy's integral, one process against as many warm expansions plus
--       quadratures at one value, and on two processes against one.
--
-- Environment: STEEP_BENCH_SWEEP (values in (d), default 10000), STEEP_BENCH_PATH
-- (points in (c), default 100000).

local root = (arg and arg[0] or ""):match("^(.*)/tests/bench/[%w_]+%.lua$") or "."
package.path = table.concat({ root .. "/lua/?.lua", root .. "/lua/?/init.lua",
  package.path }, ";")
package.cpath = table.concat({ root .. "/lua/?.so", root .. "/tests/bench/?.so",
  root .. "/tests/ref/?.so", package.cpath }, ";")

local steep = require "steep"
local core = require "steep.core"
local qagi = require "qagi"
local ok_ref, gslref = pcall(require, "gslref")

local format, clock, now = string.format, os.clock, qagi.now
local I, pi = steep.I, math.pi
local function cabs(z) return type(z) == "number" and math.abs(z) or z:abs() end
local function verdict(ok) return ok == nil and "n/a" or (ok and "met" or "NOT met") end
local function row(label, value, target, ok, fmt)
  print(format("%-58s %12s %10s   %s", label,
    value == nil and "n/a" or format(fmt or "%.3g", value), target, verdict(ok)))
end
local function load_average()
  local f = io.open("/proc/loadavg")
  local s = f and f:read("l") or "?"
  if f then f:close() end
  return s
end

print()
print(format("speed of uniform forms, long series, long paths and sweeps (tree %s)", root))
print("load average at the start: " .. load_average())

local t, x = steep.var "t", steep.param "x"
local function airy_integral()
  return steep.integral { var = t, exponent = I * (t ^ 3 / 3 + x * t),
    contour = steep.line(steep.inf(pi), steep.inf(0)), large = x }
end

-- (a) uniform against plain -----------------------------------------------------------
-- Airy's integral at x = -2: its saddles +-sqrt 2 are close enough (|zeta| = 2 < 4) for
-- the uniform form, and far enough apart for the plain expansion of each. Warm J:expand
-- (the landscape kept) with the uniform form, and with it switched off
-- (coalesce.ZETA_RADIUS = 0), order 6, interleaved, best of 5 runs of 20 calls, CPU time.
do
  local coalesce = require "steep.coalesce"
  local J = airy_integral()
  local X, ORDER = -2, 6
  local ref = qagi.airy_ai(X) * 2 * pi
  local zr = coalesce.ZETA_RADIUS
  local function run(uniform)
    coalesce.ZETA_RADIUS = uniform and zr or 0
    local r = J:expand { x = X, order = ORDER }
    local t0 = clock()
    for _ = 1, 20 do J:expand { x = X, order = ORDER } end
    return (clock() - t0) / 20, r
  end
  local tu, tp, ru, rp = math.huge, math.huge, nil, nil
  for _ = 1, 5 do
    local a, r1 = run(true)
    local b, r2 = run(false)
    if a < tu then tu, ru = a, r1 end
    if b < tp then tp, rp = b, r2 end
  end
  coalesce.ZETA_RADIUS = zr
  print()
  print(format("(a) Airy's integral at x = %g, %d terms: uniform %s, rel. error %.2e (reported "
    .. "%.2e); plain %s, rel. error %.2e (reported %.2e)", X, ORDER, ru.contributions[1].kind,
    cabs(ru.value - ref) / cabs(ref), ru.error / cabs(ref), rp.contributions[1].kind,
    cabs(rp.value - ref) / cabs(ref), rp.error / cabs(ref)))
  print(format("    warm J:expand: uniform %.3f ms, plain (two saddles) %.3f ms", tu * 1e3, tp * 1e3))
  row("uniform two-saddle contribution / plain expansion", tu / tp, "<= 2", tu / tp <= 2, "%.2f")
end

-- (b) Stirling's coefficients -------------------------------------------------------------
-- int_0^inf exp(lam (log s - s)) ds: c_k = sqrt(2 pi) gamma_(k-1) (DLMF 5.11.3), the
-- exact gamma_k from the test module (GMP rationals). The largest relative error up to
-- k = 100 and up to 200 (order = 200 where the tree allows it, else 100), whether every
-- coefficient lies within its reported error, and the time of J:series (warm landscape).
do
  local sv, lam = steep.var "s", steep.param "lam"
  local J = steep.integral { var = sv, exponent = lam * (steep.log(sv) - sv),
    contour = steep.line(0, steep.inf(0)), large = lam }
  print()
  if not ok_ref or not gslref.stirling_gamma then
    print("(b) Stirling's coefficients: n/a (tests/ref/gslref.so with stirling_gamma not built)")
  else
    local exact = gslref.stirling_gamma(200)
    local results = {}
    for _, N in ipairs({ 100, 200 }) do
      local ok, out = pcall(J.series, J, { order = N })
      if ok then
        J:series { order = N }
        local t0 = clock()
        out = J:series { order = N }
        local dt = clock() - t0
        local c, errs = out[1].coefficients, out[1].errors
        local worst100, worst, within = 0, 0, errs ~= nil
        for k = 1, #c do
          local want = math.sqrt(2 * pi) * exact[k]
          local rel = cabs(c[k] - want) / math.abs(want)
          if k <= 101 then worst100 = math.max(worst100, rel) end
          worst = math.max(worst, rel)
          if errs and not (cabs(c[k] - want) <= errs[k]) then within = false end
        end
        results[N] = { time = dt, worst100 = worst100, worst = worst, within = within,
          reported = errs ~= nil }
        print(format("(b) J:series{order = %d}: %.1f ms; largest relative error %.2e (k <= 100), "
          .. "%.2e (all); errors reported: %s%s", N, dt * 1e3, worst100, worst,
          tostring(errs ~= nil), errs and (within and ", every coefficient within its own"
          or ", NOT every coefficient within its own") or ""))
      else
        print(format("(b) J:series{order = %d}: n/a (%s)", N, tostring(out):sub(1, 80)))
      end
    end
    local r100, r200 = results[100], results[200]
    row("Stirling gamma_k, k <= 100: largest relative error", r100 and r100.worst100, "<= 1e-10",
      r100 and r100.worst100 <= 1e-10, "%.2e")
    row("Stirling gamma_k, k <= 200: reported, every one within it", r200 and (r200.within and 1 or 0),
      "1", r200 and r200.reported and r200.within, "%d")
  end
end

-- (c) a path of many points ---------------------------------------------------------------
-- exp(-x t^2/2 + i t) / (1 + t^2/16) at x = 2 along the polyline through n points
-- t_k = s_k + 0.3 i sin(3 s_k), s_k = -6 + 12 k/(n - 1), by J:quad{along = "given"}, and by
-- GSL's gsl_integration_qag on each segment in C (tests/bench/qagi.c: qag_path). Memory:
-- the bytes the Lua allocator handed out during J:quad (the collector stopped, so this is
-- every allocation, garbage included: an upper bound of the peak), per point. CPU times.
do
  local n = tonumber(os.getenv("STEEP_BENCH_PATH")) or 100000
  local pts = {}
  for k = 0, n - 1 do
    local s = -6 + 12 * k / (n - 1)
    pts[#pts + 1] = steep.complex(s, 0.3 * math.sin(3 * s))
  end
  local J = steep.integral { var = t, exponent = -x * t ^ 2 / 2 + I * t,
    amplitude = 1 / (1 + t ^ 2 / 16), contour = steep.path(pts), large = x }
  collectgarbage()
  collectgarbage()
  collectgarbage("stop")
  local kb0 = collectgarbage("count")
  local t0 = clock()
  local v, e, info = J:quad { x = 2, along = "given" }
  local dt = clock() - t0
  local bytes = (collectgarbage("count") - kb0) * 1024
  collectgarbage("restart")
  local t1 = clock()
  local re, im, gevals, gst = qagi.qag_path(n, 2, 1e-13)
  local dg = clock() - t1
  local g = steep.complex(re, im)
  print()
  print(format("(c) %d points along the given path: J:quad %.3f s, %d evaluations, %s; GSL QAG "
    .. "%.3f s, %d evaluations, %s; |difference| %.2e (J:quad's estimate %.2e)", n, dt,
    info.evals, info.status, dg, gevals, gst, cabs(v - g), e))
  row("J:quad along a path: bytes allocated per point", bytes / n, "<= 200", bytes / n <= 200, "%.0f")
  row("J:quad along a path / GSL QAG on the same segments", dt / dg, "<= 3", dt / dg <= 3, "%.2f")
end

-- (d) sweeps ---------------------------------------------------------------------------------
-- Airy's integral over N values of x evenly in [1, 100], 6 terms and J:quad at each
-- (J:sweep, wall and CPU time), on one process and on two (workers = 2; wall time, the
-- children's CPU time is not this process's); against N warm J:expand{order = 6} +
-- J:quad at one value (x = 50, the landscape kept). The two sweeps' rows must be equal.
do
  local N = tonumber(os.getenv("STEEP_BENCH_SWEEP")) or 10000
  local J = airy_integral()
  local range = { from = 1, to = 100, steps = N - 1 }
  J:expand { x = 50, order = 6 }
  J:quad { x = 50 }
  local t0 = clock()
  for _ = 1, N do
    J:expand { x = 50, order = 6 }
    J:quad { x = 50 }
  end
  local t_warm = clock() - t0
  local has_workers = pcall(J.sweep, J, { x = { 1 }, order = 1, workers = 1, progress = false })
  local opts1 = { x = range, order = 6, progress = false, workers = has_workers and 1 or nil }
  collectgarbage()
  local w0, c0 = now(), clock()
  local s1 = J:sweep(opts1)
  local wall1, cpu1 = now() - w0, clock() - c0
  local wall2, s2, same
  if has_workers then
    collectgarbage()
    w0 = now()
    s2 = J:sweep { x = range, order = 6, progress = false, workers = 2 }
    wall2 = now() - w0
    same = s2:csv() == s1:csv()
  end
  local bad = 0
  for _, r in ipairs(s1.rows) do if r.failure or not r.agrees then bad = bad + 1 end end
  print()
  print(format("(d) sweep of %d values of Airy's integral, x in [1, 100], 6 terms + J:quad: "
    .. "rows failed or disagreeing %d; status %s", N, bad, tostring(s1.status)))
  print(format("    one process: %.2f s wall, %.2f s CPU (%.2f ms a value); %d warm expand + "
    .. "quad at x = 50: %.2f s CPU", wall1, cpu1, cpu1 / N * 1e3, N, t_warm))
  local ideal
  if has_workers then
    local most = math.max(table.unpack(s2.worker_cpu or { 0 }))
    ideal = most > 0 and cpu1 / most or nil
    print(format("    two workers: %.2f s wall, CPU %s s each (one process / the busier worker: "
      .. "%.2f, the speed-up on two idle cores); rows equal to one process's: %s; load "
      .. "average now %s", wall2, table.concat((function()
        local t = {}
        for i, c in ipairs(s2.worker_cpu or {}) do t[i] = format("%.2f", c) end
        return t
      end)(), " and "), ideal or 0 / 0, tostring(same), load_average()))
  end
  row("sweep, one process / warm expand + quad at one value", cpu1 / t_warm, "<= 5",
    cpu1 / t_warm <= 5, "%.2f")
  row("sweep: one process / two workers (wall)", wall2 and wall1 / wall2, ">= 1.7",
    wall2 and wall1 / wall2 >= 1.7, "%.2f")
  row("sweep: one process's CPU / the busier worker's CPU", ideal, "(>= 1.7)",
    ideal and ideal >= 1.7, "%.2f")
  print("    (on a machine that other work keeps busy, the wall-clock ratio measures the load;")
  print("    the CPU ratio is what two otherwise idle cores would give)")
end
