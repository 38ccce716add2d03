-- Stokes lines and real problems: decompositions that settle where a descent path runs into
-- another saddle, the mean of the two sides where the jump is genuine, and J:crossings
-- following saddles by position. References: gsl_sf_airy_Ai, Ai's Maclaurin series (DLMF
-- 9.4.1 with Ai(0), Ai'(0) from DLMF 9.2.3-9.2.4, summed here), gsl_sf_bessel_Jn, and
-- exact integers by their sums and recurrences.
local lu = require "luaunit"
local H = require "helpers"
local gsl = require "gslref"
local steep = H.steep

local t, x, z, n = steep.var "t", steep.param "x", steep.var "z", steep.param "n"
local I, pi, C = steep.I, math.pi, steep.complex

local function within(got, err, want, msg)
  local d = (got - want):abs()
  lu.assertTrue(d <= err, string.format("%s: got %s, want %s: error %.3g exceeds the stated %.3g",
    msg, tostring(got), tostring(want), d, err))
end

-- Ai(z) by its Maclaurin series (DLMF 9.4.1 with Ai(0), Ai'(0) from DLMF 9.2.3-9.2.4;
-- gsl_sf_gamma), shared with the calibration families
local ai_maclaurin = require("calibration").ai_maclaurin

TestStokesAiry = {}

-- Airy's integral on the real line: for x > 0 the dominant saddle's descent path runs into
-- the contributing one (a Stokes line), but the dominant saddle's weight is 0: settled.
-- 2 pi Ai(x), gsl_sf_airy_Ai.
function TestStokesAiry:test_real_line_both_signs()
  local J = steep.integral { var = t, exponent = I * (t ^ 3 / 3 + x * t),
    contour = steep.line(steep.inf(pi), steep.inf(0)), large = x }
  for _, xv in ipairs({ 2, 4, 8, 16, -2, -4, -8, -16 }) do
    local msg = "x = " .. xv
    local r = J:expand { x = xv, order = 4 }
    lu.assertEquals(r.status, "estimated", msg .. ": " .. r.status)
    local ai, ai_err = gsl.airy_Ai(xv)
    within(r.value, r.error + 2 * pi * ai_err, 2 * pi * ai, msg)
    if xv > 0 then
      lu.assertTrue(r.stokes_line and r.stokes_line.settled, msg .. ": on a settled Stokes line")
    end
  end
end

-- Complex x on and near the Stokes lines arg x = +-2 pi/3 of Ai (DLMF 9.7: the subdominant
-- exponential switches on there), with the contour in the middle of the valleys so that
-- it converges for every x; against the Maclaurin sum.
function TestStokesAiry:test_complex_x_across_the_line()
  local J = steep.integral { var = t, exponent = I * (t ^ 3 / 3 + x * t),
    contour = steep.path { steep.inf(5 * pi / 6), 0, steep.inf(pi / 6) }, large = x }
  for _, r0 in ipairs({ 4, 6 }) do
    for _, base in ipairs({ 2 * pi / 3, -2 * pi / 3 }) do
      for _, d in ipairs({ -0.2, -0.02, 0, 0.02, 0.2 }) do
        local xv = r0 * C(math.cos(base + d), math.sin(base + d))
        local msg = string.format("x = %s (arg %.4g)", tostring(xv), base + d)
        local res = J:expand { x = xv, order = 4 }
        lu.assertStrContains(res.status, "estimated", msg)
        within(res.value, res.error, 2 * pi * ai_maclaurin(xv), msg)
        if d == 0 then
          lu.assertNotNil(res.stokes_line, msg .. ": on the line")
          -- a genuine jump (Ai's subdominant exponential switches on): the value is the
          -- mean of the two sides, both given
          local sd = res.stokes_line.sides
          lu.assertFalse(res.stokes_line.settled, msg)
          lu.assertEquals(res.stokes_line.multiplier, 0.5, msg)
          lu.assertTrue(((sd.plus.value + sd.minus.value) / 2 - res.value):abs()
            <= 1e-14 * res.value:abs(), msg .. ": the mean of the sides")
        end
      end
    end
  end
end

-- Near the line, at optimal truncation: Berry's smoothing (Proc. R. Soc. A 422 (1989) 7-21)
-- adds the share of the subdominant saddle that the dominant's least-term truncation
-- leaves out, where the decomposition's weights jump only at the line. Against the
-- Maclaurin sum at |x| = 5, 6, 7 and arg x = 2 pi/3 + d: within the estimate; the
-- smoothing contribution present for |d| <= 0.1, with Berry's multiplier on the right
-- side of 1/2; the error with it at most a fifth of the error without it (the value less
-- the smoothing contribution) for |d| <= 0.03 (measured: 20 to 40 times smaller); and no
-- jump at the line (at d = +-1e-3 the error is the error at d = 0 to a tenth of the jump).
function TestStokesAiry:test_berry_smoothing_near_the_line()
  local J = steep.integral { var = t, exponent = I * (t ^ 3 / 3 + x * t),
    contour = steep.path { steep.inf(5 * pi / 6), 0, steep.inf(pi / 6) }, large = x }
  for _, r0 in ipairs({ 5, 6, 7 }) do
    local on
    for _, d in ipairs({ 0, -0.1, -0.03, -1e-3, 1e-3, 0.03, 0.1 }) do
      local xv = r0 * C(math.cos(2 * pi / 3 + d), math.sin(2 * pi / 3 + d))
      local msg = string.format("|x| = %g, arg x = 2pi/3 %+g", r0, d)
      local want = 2 * pi * ai_maclaurin(xv)
      local res = J:expand { x = xv, order = "optimal" }
      lu.assertEquals(res.status, "estimated", msg)
      within(res.value, res.error, want, msg)
      if d == 0 then
        on = res
      else
        local sm
        for _, c in ipairs(res.contributions) do if c.smoothing then sm = c end end
        lu.assertNotNil(sm, msg .. ": a smoothing contribution")
        local S = sm.smoothing.multiplier
        lu.assertTrue(S > 0 and S < 1 and (S - 0.5) * sm.smoothing.sigma > 0,
          msg .. ": multiplier " .. S)
        if math.abs(d) <= 0.03 then
          local with, without = (res.value - want):abs(), (res.value - sm.value - want):abs()
          lu.assertTrue(with <= 0.2 * without, string.format("%s: error %.3g with the "
            .. "smoothing, %.3g without", msg, with, without))
        end
        if math.abs(d) == 1e-3 then
          -- no jump at the line: the error (value less reference) just off the line is
          -- the error on it, to within a tenth of the jump the smoothing bridges (the
          -- unsettled half of the subdominant's share on the line; Ai's own change
          -- between the two points cancels in the errors)
          local on_want = 2 * pi * ai_maclaurin(r0 * C(math.cos(2 * pi / 3), math.sin(2 * pi / 3)))
          local moved = ((res.value - want) - (on.value - on_want)):abs()
          lu.assertTrue(moved <= 0.1 * on.stokes_line.unsettled, string.format("%s: the "
            .. "error moves by %.3g between the line and d, the jump there is %.3g", msg,
            moved, on.stokes_line.unsettled))
        end
      end
    end
  end
end

-- A log term that changes the exponent only by 2 pi i (2 (log(t - 10) - log(10 - t)) is
-- +-2 pi i off the cut) leaves the integral Airy's: on the Stokes line the exponent is
-- turned by +-eps to decide the weights, and the turned term jumps by rho 2 pi i where
-- the paths cross its cut, which must still count as harmless (it once made the weights
-- undecidable: an error). Against the Maclaurin sum, as above; the status says whether
-- the integral converges only in Abel's sense also on the line (Pearcey's exponent with
-- a growing linear term, -2t on the real line's left end).
function TestStokesAiry:test_harmless_cut_on_the_line()
  local J = steep.integral { var = t, exponent = I * (t ^ 3 / 3 + x * t)
      + 2 * (steep.log(t - 10) - steep.log(10 - t)),
    contour = steep.path { steep.inf(5 * pi / 6), 0, steep.inf(pi / 6) }, large = x }
  for _, d in ipairs({ 0, 0.05 }) do
    local xv = 6 * C(math.cos(2 * pi / 3 + d), math.sin(2 * pi / 3 + d))
    local msg = string.format("|x| = 6, arg x = 2pi/3 %+g", d)
    local res = J:expand { x = xv, order = 4 }
    lu.assertStrContains(res.status, "estimated", msg)
    within(res.value, res.error, 2 * pi * ai_maclaurin(xv), msg)
    if d == 0 then lu.assertFalse(res.stokes_line.settled, msg .. ": a genuine jump") end
  end
  local l, y = steep.param "l", steep.param "y"
  local P = steep.integral { var = t, exponent = I * (l * (t ^ 4 / 4 - t ^ 2 / 2) + y * t),
    contour = steep.line(steep.inf(pi), steep.inf(0)), large = l }
  for _, lv in ipairs({ 2, 4 }) do
    local res = P:expand { l = lv, y = C(0, 2), order = 2 }
    lu.assertStrContains(res.status, "Abel's sense", "Pearcey, y = 2i, l = " .. lv)
  end
end

-- J:crossings follows the saddles by position: x from 4 to 1 on the real line crosses no
-- Stokes line that matters; on the circle |x| = 4 through arg x = 2pi/3 and -2pi/3 exactly
-- one event each, where the subdominant saddle's weight switches (DLMF 9.7).
function TestStokesAiry:test_crossings()
  local J = steep.integral { var = t, exponent = I * (t ^ 3 / 3 + x * t),
    contour = steep.path { steep.inf(5 * pi / 6), 0, steep.inf(pi / 6) }, large = x }
  local c = J:crossings { x = { from = 4, to = 1, steps = 12 } }
  for _, e in ipairs(c.events) do lu.assertNotEquals(e.kind, "stokes", e.text) end
  local pts = {}
  for k = 0, 60 do
    local th = pi / 3 + (2 * pi - 2 * pi / 3) * k / 60   -- pi/3 .. 5 pi/3, through 2pi/3 and 4pi/3
    pts[#pts + 1] = 4 * C(math.cos(th), math.sin(th))
  end
  local e = J:crossings { x = pts }
  local stokes = {}
  for _, ev in ipairs(e.events) do if ev.kind == "stokes" then stokes[#stokes + 1] = ev end end
  lu.assertEquals(#stokes, 2, "two Stokes events:\n" .. e:report())
  local args = {}
  for _, ev in ipairs(stokes) do
    local a = ev.at:arg()
    if a < 0 then a = a + 2 * pi end
    args[#args + 1] = a
  end
  table.sort(args)
  -- (reported at the first value past the line: steps of 0.07 rad)
  lu.assertTrue(math.abs(args[1] - 2 * pi / 3) < 0.08, "first at arg 2pi/3: " .. args[1])
  lu.assertTrue(math.abs(args[2] - 4 * pi / 3) < 0.08, "second at arg 4pi/3: " .. args[2])
end

TestStokesCoefficients = {}

-- Central Delannoy numbers D_n = [z^n] (1+z)^n (1-z)^(-n-1) = sum_k C(n,k) C(n+k,k)
-- (the sum, exact in integers; here in double precision, 1e-15 relative): both saddles
-- real, a connection between them, settled.
-- Written with log(-(-1 - z)) for log(1 + z), the lower saddle -1 - sqrt 2 sits on the cut
-- of log z alone, its F carries -2 pi i n, and its paths cross that cut: harmless in
-- exp(F) (n an integer), and harmless too when the exponent is turned off the line to
-- decide the weights (there it was once taken for a real cut, leaving the result
-- suspect for n >= 50). That form on the circle through the upper saddle sqrt 2 - 1 (as
-- the diagonal recipe's one-variable route has it).
function TestStokesCoefficients:test_delannoy()
  local plain = steep.integral { var = z, exponent = n * steep.log(1 + z)
    - (n + 1) * steep.log(1 - z) - (n + 1) * steep.log(z), amplitude = 1 / (2 * pi * I),
    contour = steep.circle(0, 0.3), large = n }
  local on_the_cut = steep.integral { var = z, exponent = n * (steep.log(-(-1 - z))
    - steep.log(1 - z) - steep.log(z)), amplitude = 1 / (2 * pi * I * (1 - z) * z),
    contour = steep.circle(0, math.sqrt(2) - 1), large = n }
  for _, J in ipairs({ plain, on_the_cut }) do
  for _, N in ipairs({ 10, 20, 50, 100 }) do
    local s, c1 = 0, 1
    for k = 0, N do
      local c2 = 1
      for j = 1, k do c2 = c2 * (N + j) / j end
      s = s + c1 * c2
      c1 = c1 * (N - k) / (k + 1)
    end
    local r = J:expand { n = N, order = 4 }
    lu.assertStrContains(r.status, "estimated", "n = " .. N)
    within(r.value, r.error, C(s, 0), "D_" .. N .. " expansion")
    local q, qe = J:quad { n = N }
    within(q, qe + 1e-14 * s, C(s, 0), "D_" .. N .. " quadrature")
  end
  end
end

-- Central trinomial coefficients T_n = [z^n] (1 + z + z^2)^n, by the recurrence
-- n T_n = (2n - 1) T_{n-1} + 3 (n - 1) T_{n-2}, T_0 = T_1 = 1 (exact; checked against
-- T_2..T_4 = 3, 7, 19).
function TestStokesCoefficients:test_trinomial()
  local T = { [0] = 1, [1] = 1 }
  for k = 2, 100 do T[k] = ((2 * k - 1) * T[k - 1] + 3 * (k - 1) * T[k - 2]) / k end
  lu.assertEquals(T[4], 19)
  local J = steep.integral { var = z, exponent = n * steep.log(1 + z + z ^ 2) - (n + 1) * steep.log(z),
    amplitude = 1 / (2 * pi * I), contour = steep.circle(0, 0.5), large = n }
  for _, N in ipairs({ 10, 20, 50, 100 }) do
    local r = J:expand { n = N, order = 4 }
    within(r.value, r.error, C(T[N], 0), "T_" .. N)
  end
end

-- Bessel's integral on the unit circle, J_n(x) = (1/2 pi i) of exp((x/2)(z - 1/z)) z^(-n-1)
-- (DLMF 10.12.1): at x = n/2 both real saddles (one next to the essential singularity at 0)
-- are found, one contributes; at x = 2n two complex saddles. gsl_sf_bessel_Jn.
function TestStokesCoefficients:test_bessel_circle()
  local J = steep.integral { var = z, exponent = (x / 2) * (z - 1 / z) - (n + 1) * steep.log(z),
    amplitude = 1 / (2 * pi * I), contour = steep.circle(0, 1), large = x }
  for _, N in ipairs({ 10, 20, 40 }) do
    for _, xv in ipairs({ N / 2, 2 * N }) do
      local msg = string.format("J_%d(%g)", N, xv)
      local L = J:landscape { n = N, x = xv }
      lu.assertEquals(#L.saddles, 2, msg .. ": both saddles")
      lu.assertEquals(L.saddle_count.status, "complete", msg)
      local r = J:expand { n = N, x = xv, order = 4 }
      local ref, ref_err = gsl.bessel_Jn(N, xv)
      within(r.value, r.error + ref_err, C(ref, 0), msg)
    end
  end
end

TestStokesRescaling = {}

-- A pole that goes through infinity with the whole rescaled plane: e^{-x^2 t^2}/(t - i) over
-- the real line is i pi w(i |x|) for either sign of x (u = |x| t and DLMF 7.7.2; libcerf's
-- w). Rescaled by t = x s (singular at x = 0) the pole sits at s = i/x. J:compare over
-- x = 3, 1, -1, -3: no route disagrees with quadrature; past x = 0 the formula is derived
-- afresh instead of being given a residue term that does not apply.
function TestStokesRescaling:test_compare_through_a_singular_rescaling()
  local s = steep.var "s"
  local J = steep.integral { var = t, exponent = -x ^ 2 * t ^ 2, amplitude = 1 / (t - I),
    contour = steep.line(steep.inf(pi), steep.inf(0)), large = x }
  local cmp = J:compare { x = { 3, 1, -1, -3 }, order = 4, rescale = { var = s, t = x * s } }
  local report = cmp:report()
  for _, row in ipairs(cmp.rows) do
    local msg = "x = " .. row.x .. "\n" .. report
    local re, im = gsl.faddeeva_w(0, math.abs(row.x))
    within(row.quad, row.quad_error + 1e-15, C(0, pi) * C(re, im), "quadrature, x = " .. row.x)
    lu.assertTrue(row.unrescaled_ok, "unrescaled: " .. msg)
    lu.assertTrue(row.rescaled_ok, "held contour: " .. msg)
    lu.assertTrue(row.corrected_ok or row.fresh_ok, "a formula route: " .. msg)
    lu.assertFalse(row.all_routes_fail, msg)
    if row.x < 0 then
      lu.assertNil(row.corrected, "no residue term across the singular rescaling")
      lu.assertEquals(row.fresh_from, -1)
    end
  end
  lu.assertStrContains(report, "formula from x = -1 (afresh)")
end
