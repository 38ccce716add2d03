-- The speed of the first call at a new parameter value (make bench runs it after
-- speed.lua; alone: lua5.4 tests/bench/cold.lua). Figures and targets printed, nothing
-- asserted; each target is a ratio of two figures measured in this same run, and every
-- computation timed is first checked against an independent value.
--
-- "Cold" means that nothing kept per parameter value is there: J's landscapes, its
-- analyses at infinity, and those of its turned copy (Stokes lines) are forgotten before
-- each call (cold(J) below); the tapes stay compiled (they do not depend on the values).
-- "Warm" is the same call again with everything kept. Evaluations are counted on every
-- tape the integral holds (tape:evals(): values, batches, jets, Newton steps, paths,
-- argument-principle counts, quadrature), so they include the landscape's own work.
-- Times are CPU times (os.clock): the best of several runs of a loop of calls, divided.
--
--   (a) Airy's integral at x = 1, 10, 100: a cold and a warm J:quad against GSL's QAGI on
--       the real line moved by hand onto the horizontal line through the saddle
--       (tests/bench/qagi.c: qagi_deformed), time and evaluations;
--   (b) five one-saddle integrals: cold J:landscape, J:quad and J:expand{order = 10};
--   (c) the decomposition's cost against the number of saddles (8 to 32).
-- Environment: STEEP_BENCH_COLD (the sections to run, e.g. "ab"; default all).

local root = (arg and arg[0] or ""):match("^(.*)/tests/bench/[%w_]+%.lua$") or "."
package.path = table.concat({ root .. "/lua/?.lua", root .. "/lua/?/init.lua",
  package.path }, ";")
package.cpath = table.concat({ root .. "/lua/?.so", root .. "/tests/bench/?.so",
  root .. "/tests/ref/?.so", package.cpath }, ";")

local steep = require "steep"
local qagi = require "qagi"
local gslref = require "gslref"

local format, clock = string.format, os.clock
local I, pi = steep.I, math.pi
local function cabs(z) return type(z) == "number" and math.abs(z) or z:abs() end
local function verdict(ok) return ok == nil and "n/a" or (ok and "met" or "NOT met") end
local function row(label, value, target, ok, fmt)
  print(format("%-58s %12s %10s   %s", label,
    value == nil and "n/a" or format(fmt or "%.3g", value), target, verdict(ok)))
end

-- Forget what J keeps per parameter value.
local function cold(J)
  J._lcache, J._acache = nil, nil
  local K = rawget(J, "_turned")
  if K then K._lcache, K._acache = {}, {} end
end

-- Every tape J holds (its own, the critical points', the exponent's, the turned copy's,
-- the endpoints'), and the sum of their evaluation tallies.
local tape_mt
local function tapes_of(J)
  local out, seen = {}, {}
  local function scan(t, depth)
    if seen[t] or depth > 2 then return end
    seen[t] = true
    for _, v in pairs(t) do
      if getmetatable(v) == tape_mt then
        if not seen[v] then seen[v] = true; out[#out + 1] = v end
      elseif type(v) == "table" and getmetatable(v) ~= getmetatable(J.exponent) then
        scan(v, depth + 1)
      end
    end
  end
  scan(J, 0)
  return out
end
local function evals_of(J)
  local n = 0
  for _, t in ipairs(tapes_of(J)) do n = n + t:evals() end
  return n
end

-- Best CPU time per call of f over `runs` runs of `reps` calls each.
local function per_call(runs, reps, f)
  local best = math.huge
  for _ = 1, runs do
    collectgarbage()
    collectgarbage()
    local t0 = clock()
    for _ = 1, reps do f() end
    best = math.min(best, (clock() - t0) / reps)
  end
  return best
end

local sections = os.getenv("STEEP_BENCH_COLD") or "abc"
local function section(c) return sections:find(c, 1, true) ~= nil end

print()
print("cold calls: the first call at a new parameter value")
local t, x = steep.var "t", steep.param "x"
tape_mt = getmetatable(steep.compile(t, t))
if section("a") then
  local J = steep.integral { var = t, exponent = I * (t ^ 3 / 3 + x * t),
    contour = steep.line(steep.inf(pi), steep.inf(0)), large = x }
  print()
  print("(a) Ai(x) = (1/2pi) int exp(i(t^3/3 + x t)) dt along the real line (DLMF 9.5.4); "
    .. "GSL: QAGI on the line through the saddle i sqrt(x), epsrel 1e-12")
  print(format("%-6s %10s %10s %10s %8s %8s %10s %10s %10s", "x", "cold ms", "warm ms",
    "GSL ms", "evals", "GSL ev", "rel.err", "GSL err", "steep est"))
  local worst = { time = 0, evals = 0, warm = 0 }
  for _, X in ipairs({ 1, 10, 100 }) do
    local s = 2 / 3 * X ^ 1.5
    local ref = qagi.airy_ai_scaled(X)   -- Ai(x) exp(2/3 x^(3/2)), gsl_sf_airy_Ai_scaled
    J:quad { x = X }   -- first call at all: compiles what is compiled once
    cold(J)
    local e0 = evals_of(J)
    local v, e = J:quad { x = X }
    local evals = evals_of(J) - e0
    v, e = v / (2 * pi) * math.exp(s), e / (2 * pi) * math.exp(s)
    local gv, _, gst, gev = qagi.qagi_deformed(X, 1e-12, 1000)
    local t_cold = per_call(5, 20, function() cold(J); J:quad { x = X } end)
    local t_warm = per_call(5, 100, function() J:quad { x = X } end)
    local t_gsl = per_call(5, 200, function() qagi.qagi_deformed(X, 1e-12, 1000) end)
    print(format("%-6g %10.3f %10.3f %10.4f %8d %8d %10.2e %10.2e %10.2e  %s", X,
      t_cold * 1e3, t_warm * 1e3, t_gsl * 1e3, evals, gev, cabs(v - ref) / ref,
      math.abs(gv - ref) / ref, e / ref, gst))
    worst.time = math.max(worst.time, t_cold / t_gsl)
    worst.warm = math.max(worst.warm, t_warm / t_gsl)
    worst.evals = math.max(worst.evals, evals / gev)
  end
  row("cold J:quad / GSL QAGI time (largest over x)", worst.time, "<= 20", worst.time <= 20, "%.1f")
  row("cold J:quad / GSL QAGI evaluations (largest over x)", worst.evals, "<= 3",
    worst.evals <= 3, "%.2f")
  row("warm J:quad / GSL QAGI time (largest over x)", worst.warm, "<= 3", worst.warm <= 3, "%.1f")
end

-- (b) five integrals, each with its reference:
--   Airy x = 8: 2 pi Ai(8), gsl_sf_airy_Ai;
--   Gamma(21) = int_0^inf t^20 e^-t dt (DLMF 5.2.1): 20! exactly (a product of integers);
--   K_{1/3}(25) = (1/2) int_-inf^inf exp(-x cosh t + t/3) dt (DLMF 10.32.9, the even part
--     of e^{t/3} is cosh(t/3)), gsl_sf_bessel_Knu_scaled;
--   C(200, 100) = (1/2 pi i) oint (1+z)^200 z^-101 dz on the unit circle (Cauchy's formula),
--     the binomial coefficient by its product (rounded to doubles, 1e-15 relative);
--   a Bromwich tail: (1/2 pi i) int_{1/2 - i inf}^{1/2 + i inf} e^{n(K(s) - s b)} ds / s with
--     K(s) = -log(1 - s), n = 20, b = 1.5: for the mean of n exponential(1) variables,
--     P(mean >= b) = Q(n, n b) (gamma law), gsl_sf_gamma_inc_Q; the integral is that
--     probability (the pole at 0 lies left of the line).
if section("b") then
  local s, n, z, xb = steep.var "s", steep.param "n", steep.var "z", steep.param "xb"
  local function binom(a, b)
    local r = 1
    for k = 1, b do r = r * (a - b + k) / k end
    return r
  end
  local cases = {
    { "Airy x = 8", steep.integral { var = t, exponent = I * (t ^ 3 / 3 + x * t),
        contour = steep.line(steep.inf(pi), steep.inf(0)), large = x }, { x = 8 },
      2 * pi * gslref.airy_Ai(8) },
    { "Gamma(21)", steep.integral { var = t, exponent = x * steep.log(t) - t,
        contour = steep.line(0, steep.inf(0)), large = x }, { x = 20 },
      (function() local f = 1 for k = 2, 20 do f = f * k end return f end)() },
    { "K_{1/3}(25), -x cosh t + t/3", steep.integral { var = t,
        exponent = -x * steep.cosh(t) + t / 3, contour = steep.line(steep.inf(pi), steep.inf(0)),
        large = x }, { x = 25 }, 2 * gslref.bessel_Knu_scaled(1 / 3, 25) * math.exp(-25) },
    { "C(200,100) on the unit circle", steep.integral { var = z,
        exponent = 2 * n * steep.log(1 + z) - (n + 1) * steep.log(z),
        amplitude = 1 / (2 * pi * I), contour = steep.circle(0, 1), large = n }, { n = 100 },
      binom(200, 100) },
    { "Bromwich tail, n = 20, b = 1.5", steep.integral { var = s,
        exponent = n * (-steep.log(1 - s) - s * xb), amplitude = 1 / (2 * pi * I * s),
        contour = steep.path { steep.inf(-pi / 2), 0.5, steep.inf(pi / 2) }, large = n },
      { n = 20, xb = 1.5 }, gslref.gamma_inc_Q(20, 30) },
  }
  print()
  print("(b) five integrals: cold J:landscape, J:quad, J:expand{order = 10} (CPU ms)")
  print(format("%-32s %9s %9s %9s %8s %8s %9s %9s %8s", "integral", "landscape", "quad",
    "expand", "exp/quad", "land/exp", "quad err", "exp err", "evals"))
  local worst_ratio, worst_share = 0, 0
  for _, c in ipairs(cases) do
    local name, J, p, ref = c[1], c[2], c[3], c[4]
    local po = { order = 10 }
    local pl = { paths = false }
    for k, v in pairs(p) do po[k], pl[k] = v, v end
    J:expand(po); J:quad(p)
    cold(J)
    local e0 = evals_of(J)
    local v = J:quad(p)
    local qev = evals_of(J) - e0
    cold(J)
    local r = J:expand(po)
    local tl = per_call(5, 5, function() cold(J); J:landscape(pl) end)
    local tq = per_call(5, 5, function() cold(J); J:quad(p) end)
    local te = per_call(5, 5, function() cold(J); J:expand(po) end)
    print(format("%-32s %9.3f %9.3f %9.3f %8.2f %8.2f %9.2e %9.2e %8d", name, tl * 1e3,
      tq * 1e3, te * 1e3, te / tq, tl / te, cabs(v - ref) / math.abs(ref),
      cabs(r.value - ref) / math.abs(ref), qev))
    worst_ratio = math.max(worst_ratio, te / tq)
    worst_share = math.max(worst_share, tl / te)
  end
  row("cold J:expand{order = 10} / cold J:quad (largest)", worst_ratio, "<= 1.5",
    worst_ratio <= 1.5, "%.2f")
  row("cold landscape / cold J:expand (largest)", worst_share, "<= 0.25", worst_share <= 0.25,
    "%.2f")
end

-- (c) the decomposition against the number of saddles: F = -t^(m+1)/(m+1) + c t, c =
-- 0.9 e^{0.37 i}, whose m saddles (t^m = c) lie on a circle, from the valley nearest
-- direction pi through 0 to the valley about direction 0. The decomposition alone
-- (decompose.decompose on a landscape mapped first, without paths) and the whole cold
-- J:quad; the exponent of the growth from 8 to 32 saddles: log(T32 / T8) / log 4.
-- Checked first: the quadrature along the deformed contour against the given one.
if section("c") then
  local decompose = require "steep.decompose"
  local c = 0.9 * steep.complex(math.cos(0.37), math.sin(0.37))
  local ms = { 8, 12, 16, 24, 32 }
  local td, tq = {}, {}
  print()
  print("(c) the decomposition against the number of saddles m: F = -t^(m+1)/(m+1) + c t")
  print(format("%-6s %12s %12s %10s %12s", "m", "decompose ms", "cold quad ms", "pieces",
    "|deformed - given| / |J|"))
  for _, m in ipairs(ms) do
    local d = m + 1
    local J = steep.integral { var = t, exponent = -t ^ d / d + c * t,
      contour = steep.path { steep.inf(2 * pi * (d // 2) / d), 0, steep.inf(0) } }
    local v, _, info = J:quad {}
    local g = J:quad { along = "given" }
    local function decomposition()
      cold(J)
      local L = J:_landscape({}, nil, false)
      local t0 = clock()
      decompose.decompose(J, {}, L, J.contour)
      return clock() - t0
    end
    local best = math.huge
    for _ = 1, 5 do best = math.min(best, decomposition()) end
    td[m] = best
    tq[m] = per_call(3, 2, function() cold(J); J:quad {} end)
    print(format("%-6d %12.3f %12.3f %10d %12.2e", m, td[m] * 1e3, tq[m] * 1e3, #info.pieces,
      cabs(v - g) / cabs(g)))
  end
  local function slope(T)
    return math.log(T[32] / T[8]) / math.log(4)
  end
  print(format("growth exponent from 8 to 32 saddles: decomposition %.2f, cold J:quad %.2f",
    slope(td), slope(tq)))
  row("decomposition cost ~ saddles^p, p from 8 to 32", slope(td), "<= 1.2", slope(td) <= 1.2,
    "%.2f")
end
