-- Tests of J:quad against GSL (tests/ref/gslref.so) on integral representations of
-- special functions: Airy's integral, Bessel's integral, Hankel's loop for 1/Gamma, the
-- Laplace-transform form of E1, a Gaussian with a pole that the deformation crosses, and
-- Cauchy's coefficient formula on circles. Every value is also checked to lie within ten
-- times the returned error estimate (plus 1e-15 relative): the estimate must be honest.
local lu = require "luaunit"
local H = require "helpers"
local gsl = require "gslref"
local steep = H.steep

local C, I = steep.complex, steep.I
local t, x = steep.var("t"), steep.param("x")
local pi = math.pi

local function cabs(z) return type(z) == "number" and math.abs(z) or z:abs() end

-- |value - ref| <= 10 error + 1e-15 |ref|: the error estimate is honest
local function honest(v, e, ref, msg)
  local d = cabs(v - ref)
  if not (d <= 10 * e + 1e-15 * cabs(ref)) then
    lu.fail(string.format("%s: |value - reference| = %.3g exceeds 10 x the error estimate "
      .. "%.3g (value %s, reference %s)", msg, d, e, tostring(v), tostring(ref)))
  end
end

-- 1/Gamma(z) from GSL's log Gamma: exp(-(log|Gamma(z)| + i arg Gamma(z)))
local function rgamma(z)
  local lnr, arg = gsl.lngamma_complex(z:re(), z:im())
  return steep.exp(C(-lnr, -arg))
end

---------------------------------------------------------------------------------------

TestQuadAiry = {}

-- Ai(x) = (1/2 pi) int_{-inf}^{inf} exp(i (t^3/3 + x t)) dt: the cosine form
-- Ai(x) = (1/pi) int_0^inf cos(t^3/3 + x t) dt of DLMF 9.5 (eq. 9.5.1, number from memory)
-- with the odd sine part added. The ends lie on the edges of the valleys of i t^3/3
-- (conditionally convergent); the deformation moves them into the valleys.
function TestQuadAiry:test_airy_integral()
  local J = steep.integral { var = t, exponent = I * (t ^ 3 / 3 + x * t),
    contour = steep.line(steep.inf(pi), steep.inf(0)) }
  for _, xv in ipairs({ 1, -1, 5, -5, 20, -20 }) do
    local msg = "Ai(" .. xv .. ")"
    local v, e, info = J:quad { x = xv }
    local ref = gsl.airy_Ai(xv)          -- gsl_sf_airy_Ai_e
    lu.assertEquals(info.along, "deformed", msg .. ": route")
    lu.assertEquals(info.status, "ok", msg .. ": status")
    H.close(v / (2 * pi), ref, 1e-10, msg)
    honest(v / (2 * pi), e / (2 * pi), ref, msg)
  end
end

---------------------------------------------------------------------------------------

TestQuadBranchCut = {}

-- Euler's integral Gamma(c + 1) = int_0^inf exp(c log t - t) dt (DLMF 5.2.1) with complex
-- c: one descent path of the saddle t = c spirals into the sink t = 0 and crosses the cut
-- of log on the negative axis, where the principal value of F jumps by 2 pi i c (not a
-- multiple of 2 pi i). The decomposition must say so, and quadrature must fall back to the
-- given contour and still be right (reference: gsl_sf_lngamma_complex_e).
function TestQuadBranchCut:test_spiral_into_a_sink_crosses_the_cut()
  for _, c in ipairs({ C(2, 3), C(2, 12) }) do
    local J = steep.integral { var = t, exponent = c * steep.log(t) - t,
      contour = steep.line(0, steep.inf(0)) }
    local msg = "Gamma(" .. tostring(c + 1) .. ")"
    local v, e, info = J:quad {}
    lu.assertEquals(info.along, "given", msg .. ": route")
    local note = table.concat(info.notes, " ")
    lu.assertStrContains(note, "crosses a branch cut of the exponent", false)
    local ref = 1 / rgamma(c + 1)
    H.close(v, ref, 1e-10, msg)
    honest(v, e, ref, msg)
  end
end

---------------------------------------------------------------------------------------

TestQuadBessel = {}

-- J_n(x) = (1/2 pi) int_{-pi}^{pi} exp(i (x sin t - n t)) dt: Bessel's integral
-- J_n(x) = (1/pi) int_0^pi cos(x sin t - n t) dt (DLMF 10.9.2, number from memory) with
-- the odd sine part added.
function TestQuadBessel:test_bessel_integral()
  local n = steep.param("n")
  local J = steep.integral { var = t, exponent = I * (x * steep.sin(t) - n * t),
    contour = steep.line(-pi, pi) }
  for _, c in ipairs({ { 0, 1 }, { 1, 1 }, { 2, 5 }, { 5, 1 }, { 3, 10 }, { 10, 10 },
      { 0, 30 }, { 7, 30 }, { 4, -3 }, { -3, 2.5 } }) do
    local nv, xv = c[1], c[2]
    local msg = string.format("J_%d(%g)", nv, xv)
    for _, along in ipairs({ "deformed", "given" }) do
      local v, e, info = J:quad { x = xv, n = nv, along = along }
      local ref = gsl.bessel_Jn(nv, xv)  -- gsl_sf_bessel_Jn_e
      lu.assertEquals(info.status, "ok", msg .. ": status")
      H.close(v / (2 * pi), ref, 1e-10, msg .. " (" .. along .. ")")
      honest(v / (2 * pi), e / (2 * pi), ref, msg .. " (" .. along .. ")")
    end
  end
end

function TestQuadBessel:test_bessel_integral_small_value()
  -- J_20(5) = 2.77e-11 while |integrand| = 1 on the real segment: along it the value is
  -- a cancellation of terms of size 1, so the tolerance is relative to the integral of
  -- |integrand|/(2 pi) = 1, not to the value (1e-14 of that).
  local n = steep.param("n")
  local J = steep.integral { var = t, exponent = I * (x * steep.sin(t) - n * t),
    contour = steep.line(-pi, pi) }
  local v, e = J:quad { x = 5, n = 20 }
  local ref = gsl.bessel_Jn(20, 5)       -- gsl_sf_bessel_Jn_e
  H.close(v / (2 * pi), ref, 1e-14 / math.abs(ref), "J_20(5), absolute 1e-14")
  honest(v / (2 * pi), e / (2 * pi), ref, "J_20(5)")
end

---------------------------------------------------------------------------------------

TestQuadHankel = {}

-- 1/Gamma(z) = (1/2 pi i) int_{-inf}^{(0+)} e^t t^(-z) dt: Hankel's loop (DLMF 5.9.2,
-- number from memory), from -inf below the negative axis, around 0, back to -inf above.
function TestQuadHankel:test_reciprocal_gamma()
  local z = steep.param("z")
  local J = steep.integral { var = t, exponent = t - z * steep.log(t),
    contour = steep.path { steep.inf(pi), C(-1, -1), C(1, -1), C(1, 1), C(-1, 1), steep.inf(pi) } }
  for _, zv in ipairs({ C(0.5), C(3), C(2.5, 1), C(10), C(10.5), C(-1.5, 0.5), C(-0.5, -2) }) do
    local ref = rgamma(zv)                -- gsl_sf_lngamma_complex_e
    for _, along in ipairs({ "deformed", "given" }) do
      local msg = "1/Gamma(" .. tostring(zv) .. ") (" .. along .. ")"
      local v, e, info = J:quad { z = zv, along = along }
      lu.assertEquals(info.status, "ok", msg .. ": status")
      local w = v / (2 * pi * I)
      H.close(w, ref, 1e-10, msg)
      honest(w, e / (2 * pi), ref, msg)
    end
  end
end

-- Gamma(z) = int_0^inf t^(z-1) e^(-t) dt, Re z > 0 (Euler's integral, DLMF 5.2.1, number
-- from memory). The contour starts at the sink t = 0; for Re z near 1 the last stretch of
-- the descent path into it matters (z = 1.5), and for complex z that path spirals into 0
-- across the cut of log t (z = 2+i, 4-2i).
function TestQuadHankel:test_euler_gamma_integral()
  local z = steep.param("z")
  local J = steep.integral { var = t, exponent = -t + (z - 1) * steep.log(t),
    contour = steep.line(0, steep.inf(0)) }
  for _, zv in ipairs({ C(1.5), C(2.5), C(3.5), C(10.5), C(2, 1), C(4, -2) }) do
    local lnr, arg = gsl.lngamma_complex(zv:re(), zv:im())   -- gsl_sf_lngamma_complex_e
    local ref = steep.exp(C(lnr, arg))
    if zv:im() == 0 then H.close(ref, gsl.gamma(zv:re()), 1e-13, "GSL Gamma vs lnGamma") end
    for _, along in ipairs({ "deformed", "given" }) do
      local msg = "Gamma(" .. tostring(zv) .. ") (" .. along .. ")"
      local v, e, info = J:quad { z = zv, along = along }
      lu.assertEquals(info.status, "ok", msg .. ": status")
      H.close(v, ref, 1e-10, msg)
      honest(v, e, ref, msg)
    end
  end
end

---------------------------------------------------------------------------------------

TestQuadExpint = {}

-- e^x E1(x) = int_0^inf e^(-x t)/(1 + t) dt (DLMF 6.2.2, number from memory; it follows
-- from E1(x) = int_x^inf e^(-u)/u du, DLMF 6.2.1, by u = x (1 + t)).
function TestQuadExpint:test_exponential_integral()
  local J = steep.integral { var = t, exponent = -x * t, amplitude = 1 / (1 + t),
    contour = steep.line(0, steep.inf(0)) }
  for _, xv in ipairs({ 0.5, 1, 5, 20 }) do
    local ref = math.exp(xv) * gsl.expint_E1(xv)   -- gsl_sf_expint_E1_e
    for _, along in ipairs({ "deformed", "given" }) do
      local msg = string.format("e^x E1(x) at x = %g (%s)", xv, along)
      local v, e, info = J:quad { x = xv, along = along }
      lu.assertEquals(info.status, "ok", msg .. ": status")
      lu.assertEquals(info.along, along, msg .. ": route")
      H.close(v, ref, 1e-10, msg)
      honest(v, e, ref, msg)
    end
  end
end

---------------------------------------------------------------------------------------

TestQuadDeformation = {}

-- int_{-inf}^{inf} exp(-x (t - i)^2)/(t - i/2) dt. Shifting t = s + i puts the line at
-- Im s = -1, below the pole s = -i/2; moving it up to the real s axis crosses the pole:
-- the value is int_R e^(-x s^2)/(s + i/2) ds + 2 pi i e^(x/4). The real-axis integral is
-- -(i/2) int_R e^(-x s^2)/(s^2 + 1/4) ds = -i pi e^(x/4) erfc(sqrt(x)/2), by
-- erfc(w) = (2/pi) e^(-w^2) int_0^inf e^(-w^2 u^2)/(u^2 + 1) du (DLMF 7.7.1, number from
-- memory). So the integral is i pi e^(x/4) (2 - erfc(sqrt(x)/2)), with
-- erfc(w) = 2 Q(w sqrt 2), Q the upper tail of the unit Gaussian (gsl_cdf_ugaussian_Q).
local function gauss_pole_ref(xv)
  return I * pi * math.exp(xv / 4) * 2 * (1 - gsl.cdf_ugaussian_Q(math.sqrt(xv / 2)))
end

local function gauss_pole_integral(contour)
  return steep.integral { var = t, exponent = -x * (t - I) ^ 2, amplitude = 1 / (t - I / 2),
    contour = contour or steep.line(steep.inf(pi), steep.inf(0)) }
end

function TestQuadDeformation:test_deformed_and_given_agree_across_a_pole()
  local J = gauss_pole_integral()
  for _, xv in ipairs({ 0.5, 1, 4, 10 }) do
    local msg = "x = " .. xv
    local vd, ed, infod = J:quad { x = xv }
    local vg, eg, infog = J:quad { x = xv, along = "given" }
    lu.assertEquals(infod.along, "deformed", msg .. ": route")
    lu.assertEquals(infod.status, "ok", msg .. ": status (deformed)")
    lu.assertEquals(infog.status, "ok", msg .. ": status (given)")
    -- the deformation through the saddle t = i sweeps over the pole i/2 once,
    -- counter-clockwise; its residue is e^(x/4) (exact)
    lu.assertEquals(#infod.residues, 1, msg .. ": residues")
    lu.assertEquals(infod.residues[1].winding, 1, msg .. ": winding")
    H.close(infod.residues[1].residue, math.exp(xv / 4), 1e-12, msg .. ": residue")
    H.close(vd, vg, 1e-10, msg .. ": deformed vs given")
    local ref = gauss_pole_ref(xv)
    H.close(vd, ref, 1e-10, msg .. ": deformed vs exact")
    H.close(vg, ref, 1e-10, msg .. ": given vs exact")
    honest(vd, ed, ref, msg .. " (deformed)")
    honest(vg, eg, ref, msg .. " (given)")
  end
end

function TestQuadDeformation:test_strong_exponent_across_a_pole()
  -- x = 30: along the real line the integrand reaches e^30 against a value of 1e4, so the
  -- given route is only as good as its (honest) error estimate; the deformed one is exact
  -- to 1e-10
  local J = gauss_pole_integral()
  local ref = gauss_pole_ref(30)
  local vd, ed, infod = J:quad { x = 30 }
  lu.assertEquals(infod.along, "deformed")
  H.close(vd, ref, 1e-10, "x = 30, deformed")
  honest(vd, ed, ref, "x = 30, deformed")
  local vg, eg = J:quad { x = 30, along = "given" }
  honest(vg, eg, ref, "x = 30, given")
end

function TestQuadDeformation:test_reversed_contour_negates()
  local J = gauss_pole_integral()
  local Jr = gauss_pole_integral(J.contour:reverse())
  for _, xv in ipairs({ 1, 10 }) do
    for _, along in ipairs({ "deformed", "given" }) do
      local msg = string.format("x = %g (%s)", xv, along)
      local v = J:quad { x = xv, along = along }
      local vr, er, info = Jr:quad { x = xv, along = along }
      lu.assertEquals(info.along, along, msg .. ": route")
      H.close(vr, -v, 1e-12, msg .. ": reversed contour")
      honest(vr, er, -gauss_pole_ref(xv), msg .. ": reversed")
    end
  end
  -- the Airy integral reversed
  local A = steep.integral { var = t, exponent = I * (t ^ 3 / 3 + x * t),
    contour = steep.line(steep.inf(0), steep.inf(pi)) }
  local v, e = A:quad { x = 1 }
  local ref = -2 * pi * gsl.airy_Ai(1)   -- gsl_sf_airy_Ai_e
  H.close(v, ref, 1e-10, "Airy integral reversed")
  honest(v, e, ref, "Airy integral reversed")
end

---------------------------------------------------------------------------------------

TestQuadCircle = {}

-- (1/2 pi i) closed integral of e^z z^-(n+1) dz = 1/n! (Cauchy's formula for the
-- Taylor coefficients of e^z = sum z^k/k!, DLMF 4.2.19; exact).
function TestQuadCircle:test_cauchy_coefficient()
  local z = steep.var("z")
  for _, n in ipairs({ 5, 10 }) do
    local inv = 1
    for k = 1, n do inv = inv / k end
    -- radius 1 puts the pole of order n+1 well inside; radius n is near the saddle n+1,
    -- where the integrand is as small as the result allows
    for _, r in ipairs({ 1, n / 2, n }) do
      local J = steep.integral { var = z, exponent = z - (n + 1) * steep.log(z),
        contour = steep.circle(0, r) }
      for _, along in ipairs({ "deformed", "given" }) do
        local msg = string.format("1/%d! on |z| = %g (%s)", n, r, along)
        local v, e, info = J:quad { along = along }
        lu.assertEquals(info.status, "ok", msg .. ": status")
        lu.assertEquals(info.along, along, msg .. ": route")
        local w = v / (2 * pi * I)
        honest(w, e / (2 * pi), inv, msg)
        if along == "deformed" or r > 1 then
          H.close(w, inv, 1e-10, msg)
        else
          -- on |z| = 1 the integrand is of size up to e against 1/n!: the trapezoidal
          -- sum loses log10(e n!) digits to rounding, so the tolerance is relative to
          -- (1/2 pi) times the integral of |integrand|, at most e (1e-14 of that)
          H.close(w, inv, 1e-14 * math.exp(1) / inv, msg .. ", absolute")
        end
      end
    end
  end
end

TestQuadLongPath = {}

-- A path of many points along the given contour: exp(-x t^2/2 + i k t) along a wavy
-- polyline through 20001 points from -7 to 7 equals, by Cauchy's theorem, the integral
-- over [-7, 7], which is sqrt(2 pi/x) e^{-k^2/(2x)} (the Gaussian's Fourier transform,
-- Abramowitz & Stegun 7.4.6, from memory) up to tails below e^{-x 49/2} ~ 5e-22 at x = 2.
-- The runs of segments go to C in one call: 15 evaluations a segment (they are short),
-- the estimate honest. Then the same path with rays at both ends (the ray pieces go
-- piece by piece): the integral over the whole line, the same value.
function TestQuadLongPath:test_many_points_along_the_given_path()
  local n = 20001
  local pts = {}
  for j = 0, n - 1 do
    local s = -7 + 14 * j / (n - 1)
    pts[#pts + 1] = C(s, 0.3 * math.sin(3 * s) * math.sin(pi * s / 7))
  end
  local k = 1.5
  local J = steep.integral { var = t, exponent = -x * t ^ 2 / 2 + I * k * t,
    contour = steep.path(pts), large = x }
  local want = math.sqrt(2 * pi / 2) * math.exp(-k * k / 4)
  local v, e, info = J:quad { x = 2, along = "given" }
  lu.assertEquals(info.status, "ok")
  honest(v, e, want, "20000 segments")
  H.close(v, want, 1e-12, "20000 segments")
  lu.assertTrue(info.evals >= 15 * (n - 1) and info.evals <= 16 * (n - 1),
    "one 15-point rule per segment: " .. info.evals .. " evaluations")
  local ends = { steep.inf(pi) }
  for j = 1, n do ends[#ends + 1] = pts[j] end
  ends[#ends + 1] = steep.inf(0)
  local J2 = steep.integral { var = t, exponent = -x * t ^ 2 / 2 + I * k * t,
    contour = steep.path(ends), large = x }
  local v2, e2, info2 = J2:quad { x = 2, along = "given" }
  lu.assertEquals(info2.status, "ok")
  honest(v2, e2, want, "20000 segments and two rays")
end

---------------------------------------------------------------------------------------

-- A simple saddle passed through along its two descent rays is integrated at once by
-- the trapezoidal rule in the saddle's own variable u, F0 - F = u^2 (core.saddle_quad:
-- geometric convergence, Trefethen & Weideman, SIAM Review 56 (2014)). Its value must
-- lie within its own estimate (not ten times it), the estimate must stay near rounding
-- (an inflated one fails too), and the two rays' parts must add up to the value. Where
-- it cannot settle, or the exponent has branch cuts, the polylines take over.
TestQuadSaddleVariable = {}

local SADDLE_RULE = "trapezoidal rule in the saddle's variable"

-- The number of pieces integrated by the rule, the sum of every piece's weighted value,
-- and the rule's own error estimate (its pieces' errors: the contour's other pieces and
-- the result's floor left out).
local function by_rule(info)
  local n, sum, err = 0, C(0, 0), 0
  for _, p in ipairs(info.pieces) do
    if p.method == SADDLE_RULE then n, err = n + 1, err + math.abs(p.weight) * p.error end
    sum = sum + p.weight * p.value
  end
  return n, sum, err
end

local function within_own_estimate(v, e, ref, max_rel, msg)
  local d = cabs(v - ref)
  lu.assertTrue(d <= e, string.format("%s: |value - reference| = %.3g exceeds the estimate "
    .. "%.3g", msg, d, e))
  lu.assertTrue(e <= max_rel * cabs(ref), string.format("%s: estimate %.3g of a value %.3g",
    msg, e, cabs(ref)))
end

-- 2 pi Ai(x) = int exp(i (t^3/3 + x t)) dt along the real line (DLMF 9.5.4, the exponential
-- form of 9.5.1), Ai from GSL (gsl_sf_airy_Ai). At x = 100, e^F carries the rounding of
-- F0 = -2/3 x^(3/2) = t^3/3 + x t at t = 10i, a sum of terms of size 1000: the running error
-- bound through the tape puts it at 1.3e-12 (the error found is 7e-14): the bound allows
-- for it.
function TestQuadSaddleVariable:test_airy_integral()
  local J = steep.integral { var = t, exponent = I * (t ^ 3 / 3 + x * t),
    contour = steep.line(steep.inf(pi), steep.inf(0)), large = x }
  for _, c in ipairs({ { 1, 1e-13 }, { 10, 1e-13 }, { 100, 2e-12 } }) do
    local X, max_rel = c[1], c[2]
    local msg = "Ai at x = " .. X
    local v, e, info = J:quad { x = X }
    lu.assertEquals(info.status, "ok", msg)
    local n, sum, rule_err = by_rule(info)
    lu.assertEquals(n, 2, msg .. ": both rays by the rule in u")
    within_own_estimate(v, e, 2 * pi * gsl.airy_Ai(X), max_rel, msg)
    -- (the contour is the saddle's path alone: the rule's own estimate bounds the error)
    within_own_estimate(v, rule_err, 2 * pi * gsl.airy_Ai(X), max_rel, msg .. " (the rule's)")
    H.close(sum, v, 1e-15, msg .. ": the rays' parts add up to the value")
  end
end

-- K_nu(x) = (1/2) int_{-inf}^{inf} exp(-x cosh t + nu t) dt (DLMF 10.32.9 with the even
-- part of e^{nu t}), K from GSL (gsl_sf_bessel_Knu_scaled times e^{-x}); nu = 1/3 at
-- x = 25, and nu = 2.5 at x = 5 where the amplitude's growth moves the saddle off 0.
function TestQuadSaddleVariable:test_bessel_k()
  local nu = steep.param "nu"
  local J = steep.integral { var = t, exponent = -x * steep.cosh(t) + nu * t,
    contour = steep.line(steep.inf(pi), steep.inf(0)), large = x }
  for _, c in ipairs({ { 25, 1 / 3 }, { 5, 2.5 } }) do
    local X, NU = c[1], c[2]
    local msg = string.format("K_%g(%g)", NU, X)
    local v, e, info = J:quad { x = X, nu = NU }
    lu.assertEquals(info.status, "ok", msg)
    local n, _, rule_err = by_rule(info)
    lu.assertEquals(n, 2, msg .. ": both rays by the rule in u")
    local ref = 2 * gsl.bessel_Knu_scaled(NU, X) * math.exp(-X)
    within_own_estimate(v, e, ref, 1e-13, msg)
    within_own_estimate(v, rule_err, ref, 1e-13, msg .. " (the rule's)")
  end
end

-- Where the rule cannot settle it gives way: int exp(-x t^2) / (t^2 + a^2) dt over the
-- real line = (pi/a) e^{a^2 x} erfc(a sqrt x) (from memory; erfc from GSL), with poles at
-- +-i a: at a = 0.02, x = 1 they sit at u = +-0.02 i, too close to the real u axis for
-- the rule's finest step, so the polylines integrate; at a = 0.3, x = 10 the rule does.
-- And an exponent with a log (branch cuts) is left to the polylines: Gamma(21) =
-- int_0^inf t^20 e^-t dt (DLMF 5.2.1), 20! by a product of integers.
function TestQuadSaddleVariable:test_gives_way()
  local a = steep.param "a"
  local G = steep.integral { var = t, exponent = -x * t ^ 2, amplitude = 1 / (t ^ 2 + a ^ 2),
    contour = steep.line(steep.inf(pi), steep.inf(0)), large = x }
  for _, c in ipairs({ { 1, 0.02, 0 }, { 10, 0.3, 2 } }) do
    local X, A, rays = c[1], c[2], c[3]
    local msg = string.format("poles at +-%g i, x = %g", A, X)
    local v, e, info = G:quad { x = X, a = A }
    lu.assertEquals(info.status, "ok", msg)
    lu.assertEquals((by_rule(info)), rays, msg .. ": rays by the rule in u")
    -- (2e-13: the poles' residues carry the rounding of 1/(t^2 + a^2) on their circles,
    -- which cancels there, by a running error bound)
    within_own_estimate(v, e, pi / A * math.exp(A * A * X) * gsl.erfc(A * math.sqrt(X)),
      2e-13, msg)
  end
  local Gam = steep.integral { var = t, exponent = x * steep.log(t) - t,
    contour = steep.line(0, steep.inf(0)), large = x }
  local v, e, info = Gam:quad { x = 20 }
  local f = 1
  for k = 2, 20 do f = f * k end
  lu.assertEquals((by_rule(info)), 0, "Gamma(21): a log in the exponent")
  honest(v, e, f, "Gamma(21) by the polylines")
end
