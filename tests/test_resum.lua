-- Tests of the expansions beyond optimal truncation (lua/steep/resum.lua, borel.lua,
-- hyper.lua): Borel-Pade summation and hyperasymptotics against GSL's special functions
-- (e^x E1(x), Ai(x), log Gamma), with the error estimate of every resummed value checked
-- to bound its true error in every cell; Berry's smoothed Stokes multiplier against the
-- exact multiplier of Ai across arg x = 2 pi/3; the options and the reports.
local lu = require "luaunit"
local H = require "helpers"
local gsl = require "gslref"
local steep = H.steep

local C, I = steep.complex, steep.I
local t, x = steep.var "t", steep.param "x"
local pi = math.pi

local function cabs(z) return type(z) == "number" and math.abs(z) or z:abs() end

-- |value - reference| <= estimate + the reference's own error: the estimate bounds the error
local function bounded(v, err, ref, ref_err, msg)
  local d = cabs(v - ref)
  if not (d <= err + (ref_err or 0)) then
    lu.fail(string.format("%s: true error %.3g exceeds the error estimate %.3g (value %s, "
      .. "reference %s)", msg, d, err, tostring(v), tostring(ref)))
  end
  return d
end

---------------------------------------------------------------------------------------

TestResumExpint = {}

-- e^x E1(x) = int_0^inf e^{-x t}/(1 + t) dt (DLMF 6.2.2, from memory); its series at the
-- endpoint, sum (-1)^n n!/x^(n+1) (DLMF 6.12.1), diverges; the pole at t = -1 is its only
-- singulant (F(0) - F(-1) = -x).
local function expint_integral()
  return steep.integral { var = t, exponent = -x * t, amplitude = 1 / (1 + t),
    contour = steep.line(0, steep.inf(0)), large = x }
end

function TestResumExpint:test_resummed_against_gsl()
  local J = expint_integral()
  for _, X in ipairs({ 3, 5, 10 }) do
    local ref, ref_err = gsl.expint_E1_scaled(X)        -- gsl_sf_expint_E1_scaled_e
    local opt = J:expand { x = X, order = "optimal" }
    local opt_err = cabs(opt.value - ref)
    for _, how in ipairs({ true, "borel", "hyper" }) do
      local msg = string.format("e^x E1(x), x = %g, resum = %s", X, tostring(how))
      local r = J:expand { x = X, order = "optimal", resum = how }
      local d = bounded(r.value, r.error, ref, ref_err, msg)
      -- the issue's targets: 1e-10 at x = 5, 1e-6 at x = 3, and 10^4 below optimal truncation
      if X == 5 then lu.assertTrue(d <= 1e-10 * ref, msg .. string.format(": %.3g > 1e-10", d / ref)) end
      if X == 3 then lu.assertTrue(d <= 1e-6 * ref, msg .. string.format(": %.3g > 1e-6", d / ref)) end
      lu.assertTrue(d <= 1e-4 * opt_err, string.format("%s: error %.3g not 10^4 below optimal "
        .. "truncation's %.3g", msg, d, opt_err))
      lu.assertEquals(#r.contributions, 1, msg)
      local c = r.contributions[1]
      lu.assertEquals(c.method, how == true and "borel" or how, msg .. ": method")
      lu.assertEquals(r.resum.method, c.method, msg .. ": the result says which method")
      -- the truncated value is kept beside the resummed one
      H.close(c.truncated.value, opt.value, 1e-15, msg .. ": truncated value kept")
    end
  end
end

-- Gamma(a, x) e^x x^(-a) = int_0^inf e^{-x t} (1 + t)^(a - 1) dt (DLMF 8.6.5 after
-- t -> 1 + t, from memory), against gsl_sf_gamma_inc: a branch point at t = -1, where
-- Pade approximants converge slowly. Where the linear system of a degree fails, the
-- approximant below stood in and agreed with itself (a = -4.5, x = 1.2: 1.4e-10 off under
-- 7.9e-12); where they scatter about a floor (|singulant| < 1), the degree chosen for the
-- best agreement of its neighbours understated the scatter (a = 0.5, x = 0.5: 6e-8 off
-- under 3e-8).
function TestResumExpint:test_branch_point_borel()
  -- (and below x = 1, where the approximants share a bias: a = 1.5, x = 0.9 was 9e-9 off
  -- under 5e-9, a = 0.5, x = 0.6 1.7e-8 under 1.4e-8)
  local cases = { { -4.5, 1.2 }, { -4.5, 2.5 }, { -1.5, 1.5 }, { 0.5, 0.5 }, { 0.5, 2 },
    { 1.5, 0.9 }, { 0.5, 0.6 } }
  for _, c in ipairs(cases) do
    local a, X = c[1], c[2]
    local J = steep.integral { var = t, exponent = -x * t, amplitude = (1 + t) ^ (a - 1),
      contour = steep.line(0, steep.inf(0)), large = x }
    local g, gerr = gsl.gamma_inc(a, X)
    local scale = math.exp(X) * X ^ (-a)
    local msg = string.format("Gamma(%g, %g), resum = borel", a, X)
    local r = J:expand { x = X, order = "optimal", resum = "borel" }
    lu.assertEquals(r.resum.method, "borel", msg)
    bounded(r.value, r.error, g * scale, gerr * scale + 4e-16 * g * scale, msg)
  end
end

-- The pole is the whole story here: level 1 is exact up to the terms' accuracy, and the
-- late terms give the Stokes constant of the pole as an integer.
function TestResumExpint:test_hyper_reads_the_pole()
  local J = expint_integral()
  local r = J:expand { x = 5, resum = "hyper" }
  local c = r.contributions[1]
  lu.assertEquals(c.method, "hyper")
  lu.assertEquals(c.level, 1, "level 1: the adjacent pole's contribution is exact")
  lu.assertEquals(#c.resummed.adjacent, 1, "one adjacent point")
  local a = c.resummed.adjacent[1]
  lu.assertStrContains(a.what, "pole at -1")
  H.close(a.sigma, -5, 1e-12, "singulant F(0) - F(-1) = -x")
  lu.assertEquals(math.abs(a.K:re()), 1, "Stokes constant +-1")
  lu.assertEquals(a.K:im(), 0, "Stokes constant real")
  lu.assertTrue(a.connected, "the endpoint's steepest path at the Stokes phase runs through the pole")
end

---------------------------------------------------------------------------------------

TestResumAiry = {}

-- Ai(z) for complex z by its Maclaurin series (DLMF 9.4.1 with f, g of DLMF 9.4.2-3, from
-- memory), Ai(0) and Ai'(0) from GSL (gsl_sf_airy_Ai_e, gsl_sf_airy_Ai_deriv_e); with a
-- bound on its rounding error, 64 u times the sum of the terms' sizes (each term carries
-- the rounding of the products that made it; common practice).
local function airy_series(z)
  local a0, ad0 = gsl.airy_Ai(0), gsl.airy_Ai_deriv(0)
  local f, g = C(0, 0), C(0, 0)
  local tf, tg = C(1, 0), z
  local z3 = z * z * z
  local size = 0
  for k = 0, 400 do
    f, g = f + tf, g + tg
    size = size + math.abs(a0) * tf:abs() + math.abs(ad0) * tg:abs()
    tf = tf * z3 * (3 * (k + 1 / 3) / ((3 * k + 1) * (3 * k + 2) * (3 * k + 3)))
    tg = tg * z3 * (3 * (k + 2 / 3) / ((3 * k + 2) * (3 * k + 3) * (3 * k + 4)))
    if tf:abs() + tg:abs() < 1e-18 * (f:abs() + g:abs()) then break end
  end
  return a0 * f + ad0 * g, 64 * 2.2e-16 * size
end

-- Ai(x) = (1/2 pi) int exp(i (t^3/3 + x t)) dt along the real line (DLMF 9.5.4, from
-- memory). Optimal truncation of its saddle series, straight from DLMF: for x > 0,
-- Ai(x) ~ e^{-zeta}/(2 sqrt(pi) x^(1/4)) sum (-1)^k u_k zeta^-k (DLMF 9.7.5); for x < 0,
-- Ai(-|x|) = Re of (1/(sqrt(pi)|x|^(1/4))) e^{i(zeta - pi/4)} sum u_k (-i)^k zeta^-k
-- (DLMF 9.7.9 written as one complex sum), each stopped before its smallest term;
-- u_k from DLMF 9.7.2 by the ratio (6k-5)(6k-3)(6k-1)/(216 k (2k-1)), zeta = (2/3)|x|^(3/2).
local function airy_integral()
  return steep.integral { var = t, exponent = I * (t ^ 3 / 3 + x * t),
    contour = steep.line(steep.inf(pi), steep.inf(0)), large = x }
end

local function airy_u(n)
  local u = { [0] = 1 }
  for k = 1, n do
    u[k] = u[k - 1] * (6 * k - 5) * (6 * k - 3) * (6 * k - 1) / (216 * k * (2 * k - 1))
  end
  return u
end

local function airy_optimal(xv)
  local ax = math.abs(xv)
  local zeta = 2 / 3 * ax ^ 1.5
  local u = airy_u(80)
  local step = xv > 0 and C(-1 / zeta, 0) or C(0, -1 / zeta)
  local term, sum, prev = C(1, 0), C(0, 0), math.huge
  for k = 0, 80 do
    local tk = term * u[k]
    if tk:abs() >= prev then break end
    prev = tk:abs()
    sum = sum + tk
    term = term * step
  end
  if xv > 0 then return (math.exp(-zeta) / (2 * math.sqrt(pi) * ax ^ 0.25)) * sum:re() end
  return (steep.exp(C(0, zeta - pi / 4)) * sum):re() / (math.sqrt(pi) * ax ^ 0.25)
end

function TestResumAiry:test_optimal_truncation_reference()
  -- the reference's own check: optimal truncation is about as far off as e^{-2 zeta}
  -- predicts (common practice: the size of the subdominant exponential)
  for _, xv in ipairs({ 4, -4 }) do
    local zeta = 2 / 3 * math.abs(xv) ^ 1.5
    local d = math.abs(airy_optimal(xv) - gsl.airy_Ai(xv)) / math.abs(gsl.airy_Ai(xv))
    lu.assertTrue(d < 10 * math.exp(-2 * zeta) and d > 1e-3 * math.exp(-2 * zeta),
      string.format("x = %g: optimal truncation off by %.3g, e^{-2 zeta} = %.3g", xv, d,
        math.exp(-2 * zeta)))
  end
end

function TestResumAiry:test_resummed_against_gsl()
  local J = airy_integral()
  for _, xv in ipairs({ 1, 1.5, 2, 4, -2, -4 }) do
    local zeta = 2 / 3 * math.abs(xv) ^ 1.5
    local ref, ref_err = gsl.airy_Ai(xv)                 -- gsl_sf_airy_Ai_e
    local opt_err = math.abs(airy_optimal(xv) - ref)
    -- (resum = true keeps the Airy-type uniform form for |x| < 4, exact here: tried where
    -- the saddles are apart)
    local hows = math.abs(xv) >= 4 and { true, "borel", "hyper" } or { "borel", "hyper" }
    for _, how in ipairs(hows) do
      local msg = string.format("Ai(%g), resum = %s", xv, tostring(how))
      local r = J:expand { x = xv, resum = how }
      local v, e = r.value / (2 * pi), r.error / (2 * pi)
      local d = bounded(v, e, ref, ref_err, msg)
      lu.assertTrue(math.abs(v:im()) <= e + ref_err, msg .. ": real")
      if zeta >= 1 then
        lu.assertTrue(d <= 1e-3 * opt_err, string.format("%s: error %.3g not 10^3 below "
          .. "optimal truncation's %.3g (zeta = %.3g)", msg, d, opt_err, zeta))
      end
      if how ~= true then
        -- a named method expands the saddles apart even where the uniform form applies
        for _, c in ipairs(r.contributions) do
          lu.assertEquals(c.method, how, msg .. ": every saddle resummed by " .. how)
          lu.assertEquals(c.kind, "saddle", msg)
        end
      end
    end
  end
end

-- Adjacency from the landscape: for Ai(-x) each saddle's steepest descent path, turned to
-- the pair's Stokes phase, runs into the other saddle (Berry & Howls 1991, sec. 3); the
-- late terms give Stokes constant +-1 and level 2 re-expands back through the first saddle.
function TestResumAiry:test_hyper_adjacency()
  local J = airy_integral()
  local r = J:expand { x = -3, resum = "hyper" }
  lu.assertEquals(#r.contributions, 2)
  for _, c in ipairs(r.contributions) do
    lu.assertEquals(c.method, "hyper")
    lu.assertEquals(c.level, 2, "level 2 reached at x = -3")
    lu.assertEquals(#c.resummed.adjacent, 1)
    local a = c.resummed.adjacent[1]
    lu.assertTrue(a.connected, "connected at the Stokes phase")
    lu.assertEquals(a.K:abs(), 1, "Stokes constant +-1")
    -- the singulant F_n - F_m = +-2 i zeta (DLMF 9.7.9's two exponentials)
    H.close(a.sigma:abs(), 2 * (2 / 3) * 3 ^ 1.5, 1e-12, "|singulant| = 2 zeta")
    lu.assertStrContains(c.resummed.detail, "reached by the steepest path at the Stokes phase")
  end
end

-- Borel-Pade's poles against the landscape: for x > 0 the nearest singularity of the
-- Borel transform of the recessive saddle's series is the singulant of the other saddle,
-- F_2 - F_1 = -2 zeta (Berry & Howls 1991).
function TestResumAiry:test_borel_singularity_is_the_other_saddle()
  local J = airy_integral()
  local r = J:expand { x = 4, resum = "borel" }
  local c = r.contributions[1]
  local seen = table.concat(c.resummed.notes, " | ")
  lu.assertStrContains(seen, "is the singulant of the saddle")
  local nearest = c.resummed.poles[1]
  local zeta = 2 / 3 * 4 ^ 1.5
  lu.assertTrue(math.abs(math.sqrt(nearest.re ^ 2 + nearest.im ^ 2) - 2 * zeta) < 0.25 * 2 * zeta,
    "nearest pole near |sigma| = 2 zeta")
end

-- Near the Stokes line arg x = 2 pi/3 the optimally truncated series misses the
-- smoothly switched-on subdominant share, which exceeds its smallest term: the resummed
-- value is used all the same (the two methods agree), and bounds its error against
-- quadrature (the integral along the steepest paths, J:quad).
function TestResumAiry:test_near_the_stokes_line()
  local J = airy_integral()
  local th = 2 * pi / 3 - 0.01
  local xv = C(4 * math.cos(th), 4 * math.sin(th))
  local q, qe = J:quad { x = xv }
  local opt = J:expand { x = xv, order = "optimal" }
  local r = J:expand { x = xv, resum = true }
  bounded(r.value, r.error + qe, q, 0, "Ai near arg x = 2 pi/3, resummed")
  lu.assertTrue(cabs(opt.value - q) > 1e3 * cabs(r.value - q), "resummation improves by 10^3")
  lu.assertNotNil(r.contributions[1].resummed, "resummed")
  -- (confirmed by the truncated series within its estimate, which near the line carries
  -- Olver's factor; or, where a method disagreed, by the other method: the note says so)
  local note = r.contributions[1].resum_note
  if note then lu.assertStrContains(note, "agree") end
end

-- On the Stokes line itself the decomposition takes the mean of the subdominant saddle's
-- weights on its two sides (Berry's multiplier 1/2), and the dominant saddle's Borel sum
-- is the median of its two lateral sums, which is the same smoothing: together they give
-- Ai there to far better than the truncated series, against Ai's Maclaurin series (DLMF
-- 9.4.1; the reference above), with the estimate bounding the error.
function TestResumAiry:test_on_the_stokes_line()
  local J = airy_integral()
  local r0 = 4
  local xv = C(r0 * math.cos(2 * pi / 3), r0 * math.sin(2 * pi / 3))
  local ref, round = airy_series(xv)
  ref, round = 2 * pi * ref, 2 * pi * round
  local opt = J:expand { x = xv, order = "optimal" }
  local r = J:expand { x = xv, resum = true }
  local d = bounded(r.value, r.error, ref, round, "Ai on arg x = 2 pi/3, resummed")
  lu.assertTrue(d < 1e-3 * cabs(opt.value - ref), string.format("resummed %.3g against "
    .. "truncated %.3g", d, cabs(opt.value - ref)))
  local seen_mean, seen_median = false, false
  for _, c in ipairs(r.contributions) do
    if c.kind:match("mean of its two sides") then seen_mean = true end
    if c.resummed and c.resummed.detail:match("median of the lateral sums") then seen_median = true end
  end
  lu.assertTrue(seen_mean, "the subdominant saddle: the mean of its two sides")
  lu.assertTrue(seen_median, "the dominant saddle: the median of its lateral Borel sums")
end

---------------------------------------------------------------------------------------

TestResumGamma = {}

-- int_0^inf e^{x (log s - s)} ds = Gamma(x + 1)/x^(x+1) = Gamma(x)/x^x (Euler's integral,
-- DLMF 5.2.1 with s = u/x, from memory): Stirling's series is the saddle's series at s = 1.
local s_, lam = steep.var "s", steep.param "lam"
local function stirling_integral()
  return steep.integral { var = s_, exponent = lam * (steep.log(s_) - s_),
    contour = steep.line(0, steep.inf(0)), large = lam }
end

function TestResumGamma:test_gamma_by_borel()
  local J = stirling_integral()
  for _, X in ipairs({ 2, 3, 5 }) do
    local lg, lg_err = gsl.lngamma(X)                   -- gsl_sf_lngamma_e
    local ref = math.exp(lg - X * math.log(X))
    local ref_err = ref * (lg_err + 1e-16 * X * math.log(X))
    local r = J:expand { lam = X, resum = true }
    local msg = "Gamma(" .. X .. ") by the resummed Stirling integral"
    local d = bounded(r.value, r.error, ref, ref_err, msg)
    if X == 3 then
      lu.assertTrue(d <= 1e-13 * ref, string.format("%s: %.3g > 1e-13", msg, d / ref))
      lu.assertEquals(r.contributions[1].method, "borel", msg)
    end
  end
end

-- The Stirling series resurges from the saddle's images on the other sheets of the
-- logarithm (singulants +-2 pi i x, ...), which the landscape does not list:
-- hyperasymptotics says so and keeps optimal truncation.
function TestResumGamma:test_hyper_says_why_not()
  local J = stirling_integral()
  local r = J:expand { lam = 3, resum = "hyper" }
  local c = r.contributions[1]
  lu.assertEquals(c.method, "optimal truncation")
  lu.assertNil(c.resummed)
  lu.assertStrContains(c.resum_note, "not governed by any saddle or pole")
end

---------------------------------------------------------------------------------------

TestResumStokes = {}


-- The exact Stokes multiplier of Ai across arg z = 2 pi/3 (Berry 1989, sec. 4): with
-- zeta = (2/3) z^(3/2), the dominant series e^{-zeta}/(2 sqrt(pi) z^(1/4)) sum (-1)^k u_k
-- zeta^-k (DLMF 9.7.5) cut at N = |Lambda| (Lambda = -2 zeta, the singulant), and the
-- subdominant one i e^{zeta}/(2 sqrt(pi) z^(1/4)) sum u_k zeta^-k, whose Stokes constant i
-- follows from the connection formula Ai(z) + w Ai(wz) + w^2 Ai(w^2 z) = 0 (DLMF 9.2.12,
-- w = e^{2 pi i/3}: w^2 z lies on the positive axis there), S = (Ai - dominant)/subdominant.
local function exact_multiplier(r, theta)
  local z = C(r * math.cos(theta), r * math.sin(theta))
  local u = airy_u(40)
  local z14 = steep.exp(steep.log(z) / 4)
  local zeta = (2 / 3) * steep.exp(steep.log(z) * 1.5)
  local Lam = -2 * zeta
  local N = math.floor(Lam:abs() + 0.5)
  local dom, sub = C(0, 0), C(0, 0)
  for k = 0, N - 1 do dom = dom + (-1) ^ k * u[k] / zeta ^ k end
  -- the subdominant series to 10 terms (its smallest term is near k = 2|zeta|, 20 here):
  -- its truncation leaves u_10 |zeta|^-10, about 1e-10
  for k = 0, 9 do sub = sub + u[k] / zeta ^ k end
  dom = dom * steep.exp(-zeta) / (2 * math.sqrt(pi) * z14)
  sub = sub * I * steep.exp(zeta) / (2 * math.sqrt(pi) * z14)
  local ai, round = airy_series(z)
  -- rounding: the series' and the dominant sum's, against the subdominant part
  return (ai - dom) / sub, Lam, (round + 64 * 2.2e-16 * dom:abs()) / sub:abs() + 1e-9
end

function TestResumStokes:test_reference_on_the_line()
  -- DLMF 9.2.12 on the line: with w^2 z = r real and w z = conj(z),
  -- 2 Re(e^{-i pi/3} Ai(z)) = Ai(r) (gsl_sf_airy_Ai_e). Checks the Maclaurin values where
  -- the subdominant part is e^{-2|zeta|} of the dominant one.
  for _, r in ipairs({ 4, 6 }) do
    local z = C(r * math.cos(2 * pi / 3), r * math.sin(2 * pi / 3))
    local ai, round = airy_series(z)
    local lhs = 2 * (steep.exp(C(0, -pi / 3)) * ai):re()
    local ref, ref_err = gsl.airy_Ai(r)
    -- the series' rounding (its terms are far larger than Ai(r) there) and GSL's own
    lu.assertTrue(round < 1e-4 * ref, "the check is meaningful at r = " .. r)
    H.close(lhs, ref, (2 * round + ref_err) / ref, "DLMF 9.2.12 at r = " .. r)
  end
end

-- Berry's smoothing (Proc. R. Soc. A 422 (1989) 7-21; DLMF 2.11(iv)): S = (1/2) erfc(-sigma),
-- sigma = Im Lambda / sqrt(2 Re Lambda), at five angles through the line. Berry's law is
-- the leading term in 1/|Lambda|^(1/2); the real part of the exact multiplier follows it
-- to 0.01 here (|Lambda| = 19.6; measured), the imaginary part reflects where the
-- dominant series is cut (O(|Lambda|^-1/2)). On the line Re S = 1/2 exactly (by DLMF
-- 9.2.12). Across the line S rises from 0 to 1: a wrong sign of sigma would fail by far.
function TestResumStokes:test_berry_against_the_exact_multiplier()
  local r = 6
  local prev = -1
  for _, d in ipairs({ -0.4, -0.2, 0, 0.2, 0.4 }) do
    local S, Lam, S_err = exact_multiplier(r, 2 * pi / 3 + d)
    local B, sigma = steep.stokes_multiplier(Lam)
    local msg = string.format("angle 2 pi/3 %+g (sigma = %.3f)", d, sigma)
    lu.assertTrue(math.abs(S:re() - B) <= 0.01, string.format("%s: exact Re S = %.5f, Berry's "
      .. "S = %.5f", msg, S:re(), B))
    lu.assertTrue(math.abs(S:im()) <= 0.5 / math.sqrt(Lam:abs()), msg .. ": Im S small")
    if d == 0 then H.close(S:re(), 0.5, 2 * S_err, msg .. ": Re S = 1/2 on the line") end
    lu.assertTrue(B > prev, msg .. ": increasing across the line")
    prev = B
  end
  -- and the exact multiplier approaches Berry's as |Lambda| grows (r = 4 to 6)
  for _, d in ipairs({ -0.2, 0.2 }) do
    local S4, L4 = exact_multiplier(4, 2 * pi / 3 + d)
    local S6, L6 = exact_multiplier(6, 2 * pi / 3 + d)
    lu.assertTrue(cabs(S6 - steep.stokes_multiplier(L6)) < cabs(S4 - steep.stokes_multiplier(L4)),
      "closer at the larger |Lambda|")
  end
end

-- The function itself: S(0) = 1/2, S(-sigma) = 1 - S(sigma), and (1/2) erfc(-sigma) against
-- GSL (gsl_sf_erfc_e); the large parameter multiplies the singulant.
function TestResumStokes:test_multiplier_values()
  for _, sig in ipairs({ -3, -1, -0.2, 0, 0.5, 2, 4 }) do
    -- Lambda = R + i sigma sqrt(2 R), R = 8
    local R = 8
    local S, s = steep.stokes_multiplier(C(R, sig * math.sqrt(2 * R)))
    H.close(s, sig, 1e-14, "sigma", 1e-300)
    H.close(S, 0.5 * gsl.erfc(-sig), 1e-13, "S at sigma = " .. sig)
    local S2 = steep.stokes_multiplier(C(R / 2, sig * math.sqrt(2 * R) / 2), 2)
    H.close(S2, S, 1e-14, "large = 2 times half the singulant")
  end
end

function TestResumStokes:test_bad_input()
  H.raises({ "bad argument #1 to 'stokes_multiplier'", "got string" }, steep.stokes_multiplier, "a")
  H.raises({ "bad argument #2 to 'stokes_multiplier'" }, steep.stokes_multiplier, 1, {})
  H.raises({ "no positive real part", "not subdominant" }, steep.stokes_multiplier, C(-2, 1))
  H.raises({ "bad argument #1 to 'stokes_multiplier'", "NaN" }, steep.stokes_multiplier, 0 / 0)
end

---------------------------------------------------------------------------------------

TestResumFloors = {}

-- Two cases a random scan against quadrature found beyond their estimates (project's own
-- quadrature as the reference, 1e-14): an endpoint series with a power a parameter at
-- small x, whose Pade approximants of degree 26 use coefficients below their own errors
-- (the sum is now taken again with them moved: 4.7e-13 off, estimate 3.6e-14 -> 1.4e-12),
-- and Pearcey's saddles at +-1 summed apart (resum = "borel"), where every check passed
-- and the sums were 6e-13 relative off (estimate 4.6e-14): the relative floor.
function TestResumFloors:test_estimates_bound()
  local p, y, l = steep.param "p", steep.param "y", steep.param "l"
  local E = steep.integral { var = t, exponent = -x * (t + t ^ 2 / 2), amplitude = t ^ p / (1 + t),
    contour = steep.line(0, steep.inf(0)), large = x }
  local P = steep.integral { var = t, exponent = I * (l * (t ^ 4 / 4 - t ^ 2 / 2) + y * t),
    amplitude = 1 + t / 3, contour = steep.line(steep.inf(pi), steep.inf(0)), large = l }
  for _, case in ipairs({ { E, { p = -0.36545960410382, x = 4.0679622011271 }, true },
    { P, { l = 34.613178156812, y = C(-0.166110407681711, -0.0327242006892552) }, "borel" } }) do
    local J, params, how = case[1], case[2], case[3]
    local q, qe, info = J:quad(params)
    lu.assertEquals(info.status, "ok")
    local o = { order = "optimal", resum = how }
    for k, v in pairs(params) do o[k] = v end
    local r = J:expand(o)
    local d = cabs(r.value - q)
    lu.assertTrue(d <= r.error + qe, string.format("%s: resummed %.3g off, estimate %.3g",
      tostring(J), d, r.error))
    lu.assertTrue(r.error <= 1e-11 * cabs(q), string.format("%s: estimate %.3g", tostring(J), r.error))
  end
end

-- On a Stokes line with a genuine jump a uniform pair's value is the mean of the two
-- sides; its pieces carry one side's weights and were once expanded apart and resummed
-- with them: a sextic exponent whose saddle at 0 has weights +1 and -1 on the two sides
-- (mean 0) came back with a spurious 0.58i (the integral is real, 4.37) under an estimate
-- of 6e-6, status estimated. Against quadrature (the project's own, 1e-13): within the
-- estimate, whatever the status.
function TestResumFloors:test_mean_of_sides_not_split()
  local p, y = steep.param "p", steep.param "y"
  local J = steep.integral { var = t, exponent = -x * (t ^ 6 / 6 + p * t ^ 4 / 4 + y * t ^ 2 / 2),
    contour = steep.line(steep.inf(pi), steep.inf(0)), large = x }
  local params = { y = -0.37904697130524, p = 0.75110925589889, x = 44.367071724066 }
  local q, qe = J:quad(params)
  for _, how in ipairs({ true, "borel", "hyper" }) do
    local o = { order = "optimal", resum = how }
    for k, v in pairs(params) do o[k] = v end
    local r = J:expand(o)
    local d = cabs(r.value - q)
    lu.assertTrue(d <= r.error + qe, string.format("resum = %s: %.3g off, estimate %.3g (%s)",
      tostring(how), d, r.error, r.status))
  end
end

-- Just off a Stokes line (arg x = 2 pi/3 +- 3e-7 for Airy's integral): the decomposition
-- is that side's, with the subdominant saddle's whole weight, while the dominant's Borel
-- sum met the singulant within 1e-6 rad of its ray and took the median of the two lateral
-- sums, as on the line: half the jump counted twice (2.4e-4 off under estimates of 3e-9,
-- status estimated). Off the line the one lateral sum along the axis itself is taken (and
-- the terminants likewise). Against quadrature (the project's own); exactly on the line
-- the value stays right (the mean of the sides with the median sum).
function TestResumFloors:test_just_off_the_stokes_line()
  local J = steep.integral { var = t, exponent = I * (t ^ 3 / 3 + x * t),
    contour = steep.path { steep.inf(5 * pi / 6), 0, steep.inf(pi / 6) }, large = x }
  for _, d in ipairs({ 3e-7, -3e-7, 0 }) do
    local th = 2 * pi / 3 + d
    local xv = 5.146 * C(math.cos(th), math.sin(th))
    local q, qe = J:quad { x = xv }
    for _, how in ipairs({ true, "borel", "hyper" }) do
      local r = J:expand { x = xv, order = "optimal", resum = how }
      local err = cabs(r.value - q)
      local msg = string.format("d = %g, resum = %s: %.3g off, estimate %.3g", d,
        tostring(how), err, r.error)
      lu.assertTrue(err <= r.error + qe, msg)
      lu.assertTrue(err <= 1e-8, msg)
    end
  end
end

TestResumInterface = {}

function TestResumInterface:test_options()
  local J = expint_integral()
  H.raises({ "expand: option 'resum' must be true, \"hyper\" or \"borel\"", "pade" },
    J.expand, J, { x = 5, resum = "pade" })
  H.raises({ "option 'resum' starts from the optimally truncated series", "order = 4" },
    J.expand, J, { x = 5, order = 4, resum = true })
  H.raises({ "check: option 'resum'" }, J.check, J, { x = { 5 }, resum = 1 })
  -- order defaults to "optimal" with resum
  local r = J:expand { x = 5, resum = "borel" }
  lu.assertEquals(r.order, "optimal")
  -- resum = false is no resummation
  local p = J:expand { x = 5, order = "optimal", resum = false }
  lu.assertNil(p.resum)
  lu.assertNil(p.contributions[1].truncated)
end

function TestResumInterface:test_report_and_json()
  local J = expint_integral()
  local r = J:expand { x = 5, resum = true }
  local text = r:report()
  lu.assertStrContains(text, "resummed: Borel-Pade [")
  lu.assertStrContains(text, "optimal truncation:")
  local json = r:report { format = "json" }
  lu.assertStrContains(json, "\"method\":\"borel\"")
end

-- J:check with resum: every row resummed and verified against quadrature.
function TestResumInterface:test_check()
  local J = expint_integral()
  local c = J:check { x = { 3, 5, 10 }, resum = true }
  lu.assertTrue(c.verified, c:report())
  for _, row in ipairs(c.rows) do
    lu.assertEquals(row.method, "borel")
    lu.assertTrue(row.relative_error <= row.estimated + 1e-13, "row at x = " .. row.x)
    lu.assertTrue(row.relative_error < 1e-12, "row at x = " .. row.x)
  end
  lu.assertStrContains(c:report(), "borel")
  lu.assertStrContains(c:report { format = "csv" }, "method")
end

-- J:sweep with resum: rows say the method, the CSV gains its two columns.
function TestResumInterface:test_sweep()
  local J = expint_integral()
  local sw = J:sweep { x = { 3, 6 }, resum = true }
  lu.assertEquals(sw.status, "complete")
  for _, row in ipairs(sw.rows) do
    lu.assertEquals(row.method, "borel")
    lu.assertTrue(row.agrees, "row at x = " .. row.x)
    H.close(row.expansion, gsl.expint_E1_scaled(row.x), 1e-12,       -- gsl_sf_expint_E1_scaled_e
      "resummed row at x = " .. row.x)
  end
  lu.assertStrContains(sw:csv(), ",method,level")
  lu.assertStrContains(sw:report(), "resummed")
  H.raises({ "sweep: option 'resum' starts from the optimally truncated series" }, J.sweep, J,
    { x = { 3 }, order = 2, resum = true })
end

---------------------------------------------------------------------------------------

TestResumShapes = {}

-- Other shapes against quadrature (J:quad along the steepest paths, its own estimate
-- added): two complex saddles on either side of the Laplace ray (Borel-Pade converges
-- slowly there; hyperasymptotics does better), an endpoint whose series feels a saddle
-- and two poles, a saddle with two poles at one singulant. Every estimate must bound
-- the error; the method named must be the one used.
function TestResumShapes:test_estimates_bound_the_error()
  local cases = {
    { "t - t^4/4 on the real line", steep.integral { var = t, exponent = x * (t - t ^ 4 / 4),
      contour = steep.line(steep.inf(pi), steep.inf(0)), large = x }, { 4 } },
    { "relaxation response", steep.integral { var = t, exponent = -x * (t + t ^ 2 / 4),
      amplitude = 1 / (1 + t ^ 2), contour = steep.line(0, steep.inf(0)), large = x }, { 3 } },
    { "Gaussian with poles at +-i/2", steep.integral { var = t, exponent = -x * t ^ 2,
      amplitude = 1 / (t ^ 2 + 0.25), contour = steep.line(steep.inf(pi), steep.inf(0)),
      large = x }, { 4 } },
  }
  for _, case in ipairs(cases) do
    for _, xv in ipairs(case[3]) do
      local q, qe = case[2]:quad { x = xv }
      for _, how in ipairs({ "borel", "hyper" }) do
        local msg = string.format("%s, x = %g, resum = %s", case[1], xv, tostring(how))
        local r = case[2]:expand { x = xv, resum = how }
        bounded(r.value, r.error, q, qe, msg)
        for _, c in ipairs(r.contributions) do
          lu.assertTrue(c.method == how or c.method == "exact", msg .. ": " .. c.method
            .. (c.resum_note and (" (" .. c.resum_note .. ")") or ""))
        end
      end
    end
  end
end
