-- Exponents whose derivative is periodic (lua/steep/periodic.lua) and strip valleys in
-- words (lua/steep/strips.lua). References: the saddles of nu (z sinh w - w) are the zeros
-- of cosh w = 1/z, w = +-acosh(1/z) + 2 pi i k (exact); Re(c e^{a w}) = |c| e^{Re(a w)}
-- cos(arg c + Im(a w)) gives the strips (exact).
local lu = require "luaunit"
local H = require "helpers"
local steep = H.steep
local periodic = require "steep.periodic"

local w, nu = steep.var "w", steep.param "nu"
local I, pi, C = steep.I, math.pi, steep.complex

local function schlaefli(z)
  return steep.integral { var = w, exponent = nu * (z * steep.sinh(w) - w),
    amplitude = 1 / (2 * pi * I),
    contour = steep.line(steep.inf(0, C(0, -pi)), steep.inf(0, C(0, pi))), large = nu }
end

TestPeriodic = {}

-- F' = nu (z cosh w - 1) = (nu z / 2) u + (nu z / 2) / u - nu with u = e^w (exact).
function TestPeriodic:test_detect_sinh()
  local J = schlaefli(0.5)
  local D = assert(periodic.detect(J, { nu = 20 }))
  H.close(D.rate, 1, 1e-15, "rate 1")
  H.close(D.period, C(0, 2 * pi), 1e-15, "period 2 pi i")
  lu.assertEquals(D.mmin, -1)
  lu.assertEquals(D.mmax, 1)
  H.close(D.coef[1], 5, 1e-15, "c_1 = nu z / 2")
  H.close(D.coef[-1], 5, 1e-15, "c_-1 = nu z / 2")
  H.close(D.coef[0], -20, 1e-15, "c_0 = -nu")
end

-- Commensurate rates share the largest common rate; others are not periodic; a power of
-- the variable times an exponential is not either (exact).
function TestPeriodic:test_detect_rates()
  local function J_of(F)
    return steep.integral { var = w, exponent = F, contour = steep.line(0, 1) }
  end
  local D = assert(periodic.detect(J_of(steep.exp(2 * w) + 3 * steep.exp(3 * w)), {}))
  H.close(D.rate, 1, 1e-14, "rates 2 and 3: common rate 1")
  lu.assertEquals(D.mmin, 2)
  lu.assertEquals(D.mmax, 3)
  local D2 = assert(periodic.detect(J_of(steep.cosh(I * w) - w / 2), {}))
  H.close(math.abs(D2.period:re()), 2 * pi, 1e-14, "cosh(i w): period 2 pi")
  lu.assertEquals(D2.period:im(), 0, "along the real axis")
  lu.assertNil(periodic.detect(J_of(steep.exp(w) + steep.exp(math.sqrt(2) * w)), {}),
    "rates 1 and sqrt 2")
  lu.assertNil(periodic.detect(J_of(w * steep.exp(w)), {}), "w e^w")
  lu.assertNil(periodic.detect(J_of(w ^ 3), {}), "a polynomial")
end

-- The saddles in the band of the Schlaefli contour (-pi <= Im w <= pi, one period more
-- on each side): +-acosh(2) + 2 pi i k, k = -1, 0, 1, each exact; two families.
function TestPeriodic:test_schlaefli_band()
  local J = schlaefli(0.5)
  local L = J:landscape { nu = 20 }
  local a = math.log(2 + math.sqrt(3))          -- acosh 2
  lu.assertEquals(#L.saddles, 6, "two families, three copies each")
  lu.assertEquals(#L.periodic.families, 2)
  for _, sgn in ipairs({ -1, 1 }) do
    for k = -1, 1 do
      local want = C(sgn * a, 2 * pi * k)
      local found = false
      for _, s in ipairs(L.saddles) do
        if (s.at - want):abs() <= 1e-13 then found = true end
      end
      lu.assertTrue(found, "saddle " .. tostring(want))
    end
  end
  -- the report lists each family once
  local text = L:report()
  lu.assertStrContains(text, "2 saddle families, period 6.283185307i")
  lu.assertNil(text:find("saddle 3", 1, true), "no list of every copy: " .. text)
end

-- On the Stokes line of real nu and z (the descent path of -acosh(1/z) runs into
-- +acosh(1/z), in every copy) the expansion notes the connection once, and the result
-- agrees with GSL's J_nu within its estimate.
function TestPeriodic:test_connection_noted_once()
  local ref = require "gslref"
  local J = schlaefli(1 / math.cosh(1))
  local r = J:expand { nu = 20, order = 6 }
  local n = 0
  for _, note in ipairs(r.notes) do
    if note:find("saddle connection", 1, true) then n = n + 1 end
  end
  lu.assertEquals(n, 1, "one note: " .. table.concat(r.notes, " | "))
  local want = ref.bessel_Jnu(20, 20 / math.cosh(1))   -- GSL gsl_sf_bessel_Jnu
  lu.assertTrue((r.value - want):abs() <= r.error,
    string.format("J_20(20 sech 1): %s vs %.17g, estimate %.3g", tostring(r.value), want, r.error))
end

-- A contour end in a hill strip: the error names the strip, the valleys on either side
-- (with the ends to write instead) and all valleys, in three lines; the end it suggests
-- gives a convergent integral (exact strips: x sinh w to the right is a hill where
-- cos(Im w) > 0).
function TestPeriodic:test_wrong_strip_end()
  local J = steep.integral { var = w, exponent = nu * (2 * steep.sinh(w) - w),
    contour = steep.path { steep.inf(pi), 0, steep.inf(0) }, large = nu }
  for _, f in ipairs({ J.expand, J.quad }) do
    local err = H.raises({ "finishing end at infinity", "hill strip",
      "-1.571 < Im w < 1.571 to the right",
      "the strip -4.712 < Im w < -1.571 to the right",
      "the strip 1.571 < Im w < 4.712 to the right",
      "steep.inf(0, steep.complex(0, 3.142))" }, f, J, { nu = 20 })
    local _, lines = err:gsub("\n", "")
    lu.assertTrue(lines <= 2, "three lines at most: " .. err)
  end
  local K = steep.integral { var = w, exponent = nu * (2 * steep.sinh(w) - w),
    contour = steep.path { steep.inf(pi), 0, steep.inf(0, C(0, 3.142)) }, large = nu }
  local v, e, info = K:quad { nu = 20 }
  lu.assertEquals(info.status, "ok")
  lu.assertTrue(e < 1e-12 * v:abs(), "the suggested end converges")
end

---------------------------------------------------------------------------------------

TestStripQuadrature = {}

-- Rays inside strip valleys by the double-exponential rule (lua/steep/integral.lua):
-- integral_0^inf exp(-e^s) ds = E1(1) (t = e^s; DLMF 6.2.1; GSL gsl_sf_expint_E1) and
-- integral_0^inf exp(-x cosh s) ds = K_0(x) (DLMF 10.32.9; GSL gsl_sf_bessel_Knu_scaled),
-- to 1e-13, in a few hundred evaluations (the piecewise Gauss-Kronrod rule took 780 for
-- the first, and 480 to 900 for the others).
function TestStripQuadrature:test_known_rays()
  local ref = require "gslref"
  local J1 = steep.integral { var = w, exponent = -steep.exp(w),
    contour = steep.line(0, steep.inf(0)) }
  local v, e, info = J1:quad { along = "given" }
  local want = ref.expint_E1(1)
  H.close(v, want, 1e-14, "E1(1)")
  lu.assertTrue(e <= 1e-13 * want, "estimate")
  lu.assertTrue(info.evals <= 300, "evaluations: " .. info.evals)
  for _, x in ipairs({ 0.1, 2, 40 }) do
    local K = steep.integral { var = w, exponent = -x * steep.cosh(w),
      contour = steep.line(0, steep.inf(0)) }
    local vk, ek, ik = K:quad { along = "given" }
    local ks = ref.bessel_Knu_scaled(0, x)
    H.close(vk, ks * math.exp(-x), 1e-13, "K_0(" .. x .. ")")
    lu.assertTrue(ek <= 1e-13 * vk:abs(), "estimate at x = " .. x)
    lu.assertTrue(ik.evals <= 500, "evaluations: " .. ik.evals)
  end
end

-- A ray off the strip's middle line oscillates as it decays: from i y it must equal the
-- ray from 0 less the segment from 0 to i y (Cauchy's theorem in the strip |Im w| < pi/2
-- of -x cosh w, where the integrand vanishes far out; exact).
function TestStripQuadrature:test_off_middle_ray()
  local x = 3
  for _, y in ipairs({ 0.7, -1.2 }) do
    local F = -x * steep.cosh(w) + I * 5 * w
    local function quad(contour)
      local K = steep.integral { var = w, exponent = F, contour = contour }
      local v, e = K:quad { along = "given" }
      return v, e
    end
    local r0, e0 = quad(steep.line(0, steep.inf(0)))
    local ry, ey = quad(steep.line(C(0, y), steep.inf(0)))
    local s, es = quad(steep.line(0, C(0, y)))
    lu.assertTrue((ry - (r0 - s)):abs() <= 1e-13 * r0:abs() + e0 + ey + es,
      string.format("y = %g: %s vs %s", y, tostring(ry), tostring(r0 - s)))
  end
end

---------------------------------------------------------------------------------------

TestStripMaps = {}

local function read_svg(J, opts)
  local base = os.tmpname()
  local file = base .. ".svg"
  opts.file = file
  local _, summary = J:map(opts)
  local f = assert(io.open(file, "rb"))
  local s = f:read("a")
  f:close()
  os.remove(file)
  os.remove(base)
  return s, summary
end

-- Schlaefli's J: the strips are drawn along the left and right sides of the frame (the
-- valleys of nu (sinh w / cosh 1 - w): to the right where cos(Im w) < 0, to the left
-- where cos(Im w) > 0, exact), not as labels at one point of the rim; the colour scale is
-- symmetric-log (Re F reaches 4e4 in the window, the saddles +-4.8); level lines drawn.
function TestStripMaps:test_schlaefli_map()
  local J = schlaefli(1 / math.cosh(1))
  local svg, summary = read_svg(J, { nu = 20 })
  lu.assertNotNil(summary.range.symlog, "a symmetric-log scale")
  lu.assertTrue(summary.level_lines >= 5, "level lines: " .. summary.level_lines)
  lu.assertStrContains(svg, "symmetric-log scale")
  -- the strip bands: on the right side x > frame, on the left x < frame
  local right, left = 0, 0
  for dir, d in svg:gmatch('class="valley%-strip" data%-direction="([^"]+)" d="([^"]+)"') do
    local x = tonumber(d:match("^M([%d.]+)"))
    if math.abs(tonumber(dir)) < 1e-9 then right = right + 1; lu.assertTrue(x > 600, "right side")
    else left = left + 1; lu.assertTrue(x < 100, "left side") end
  end
  -- the window is |Re w|, |Im w| <= 10 or so: three valley strips on each side at least
  lu.assertTrue(right >= 3 and left >= 3, string.format("strips: %d right, %d left", right, left))
  -- the colour bar's tick labels do not overlap (0.62 font px a character)
  local spans = {}
  for x, text in svg:gmatch('class="colour%-tick" x="([%d.]+)" y="[%d.]+" text%-anchor="middle">([^<]+)<') do
    local half = 0.5 * 0.62 * 11 * utf8.len(text)
    for _, sp in ipairs(spans) do
      lu.assertTrue(tonumber(x) - half >= sp[2] or tonumber(x) + half <= sp[1],
        "colour bar labels overlap at " .. text)
    end
    spans[#spans + 1] = { tonumber(x) - half, tonumber(x) + half }
  end
  lu.assertTrue(#spans >= 5, "colour bar ticks: " .. #spans)
end

-- Tick labels never overlap: a narrow window far from the origin has long labels
-- (1000.0002 and the like); the step grows until each fits between its neighbours.
function TestStripMaps:test_ticks_fit()
  local t = steep.var "t"
  local J = steep.integral { var = t, exponent = -(t - 1000) ^ 2,
    contour = steep.line(steep.inf(pi), steep.inf(0)) }
  for _, view in ipairs({ { center = C(1000, 0), radius = 3e-4 },
      { center = C(123456.789, 0), radius = 0.05 }, { center = C(0, 0), radius = 7e6 } }) do
    local svg = read_svg(J, { view = view, width = 400 })
    local xs = {}
    for x, text in svg:gmatch('class="tick" x="([%d.]+)" y="[%d.]+" text%-anchor="middle">([^<]+)<') do
      xs[#xs + 1] = { tonumber(x), utf8.len(text) }
    end
    lu.assertTrue(#xs >= 2, "ticks on the x axis")
    for k = 2, #xs do
      local gap = xs[k][1] - xs[k - 1][1]
      local need = 0.5 * 0.62 * 12 * (xs[k][2] + xs[k - 1][2])
      lu.assertTrue(gap >= need, string.format("labels %d and %d overlap (%g px apart, %g needed)",
        k - 1, k, gap, need))
    end
  end
end

---------------------------------------------------------------------------------------

TestStripRoutes = {}

-- Routes that follow the parameter read the ends in strips by their lines: along nu the
-- Schlaefli contour's ends stay in the valley strips about Im w = -+pi (exact), so
-- J:crossings reports no end leaving its valley, and a sweep records the strips.
function TestStripRoutes:test_crossings_and_sweep_ends()
  local J = schlaefli(1 / math.cosh(1))
  local c = J:crossings { nu = { from = 10, to = 20, steps = 3 } }
  for _, e in ipairs(c.events) do
    lu.assertNotEquals(e.kind, "end", "no end event: " .. (e.text or ""))
  end
  local s = J:sweep { nu = { 10, 20 }, order = 4, workers = 1, progress = false }
  for _, row in ipairs(s.rows) do
    lu.assertStrContains(row.valleys, "strip")
    lu.assertNil(row.valleys:find("none", 1, true), "ends in valleys: " .. row.valleys)
    lu.assertTrue(row.agrees, "nu = " .. row.x .. ": expansion and quadrature agree")
  end
end

-- The machine-readable landscape report carries each family once too (its copy k = 0,
-- the copies taken), beside the full list of saddles; the strip families as well.
function TestPeriodic:test_json_summary()
  local J = schlaefli(0.5)
  local L = J:landscape { nu = 20 }
  local cjson = require "cjson"
  local d = cjson.decode(L:report { format = "json" })
  lu.assertEquals(#d.periodic.families, 2)
  H.close(d.periodic.period.im, 2 * pi, 1e-15, "period")
  local a = math.log(2 + math.sqrt(3))
  H.close(math.abs(d.periodic.families[1].at.re), a, 1e-13, "representative +-acosh 2")
  lu.assertEquals(d.periodic.families[1].copies[1], -1)
  lu.assertEquals(d.periodic.families[1].copies[2], 1)
  lu.assertEquals(#d.strip_families, 2)
end

-- Sampling as a cross-check of the exact strips: far out along each family's direction,
-- log |g e^F| on the middle line of a valley strip lies far below its value at the
-- region's rim, and on the middle line of the hill strip between two valleys far above
-- (the strips themselves from the expression, exact; the sampled values from the tape).
function TestPeriodic:test_strips_cross_checked_by_sampling()
  local cases = {
    { schlaefli(0.7), { nu = 15 } },
    { steep.integral { var = w, exponent = steep.exp(w) - nu * steep.log(w),
      contour = steep.circle(0, 1), large = nu }, { nu = 30 } },
  }
  for _, case in ipairs(cases) do
    local J, p = case[1], case[2]
    local L = J:landscape(p)
    lu.assertTrue(#L.strip_families >= 1, "strip families")
    for _, f in ipairs(L.strip_families) do
      local u = steep.complex(math.cos(f.direction), math.sin(f.direction))
      local function level(offset, s)
        local z = steep.complex(s, offset) * u
        local F, g = J.tape:eval(z, p)
        local gm = g and g:abs() or 1
        return F:re() + math.log(gm)
      end
      for m = -1, 1 do
        local valley = f.lo + m * f.period + 0.5 * (f.hi - f.lo)
        local hill = valley + 0.5 * f.period
        local near, far = level(valley, 4), level(valley, 9)
        lu.assertTrue(far < near - 50, string.format("valley strip %g: %g -> %g", valley, near, far))
        lu.assertTrue(level(hill, 9) > level(hill, 4) + 50, "hill strip " .. hill)
      end
    end
  end
end
