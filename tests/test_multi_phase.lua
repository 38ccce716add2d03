-- Tests of stationary-phase integrals over R^2 (lua/steep/multi.lua): the expansion at
-- the real stationary point against iterated quadrature (stated as the reference: the
-- inner integral deformed by the one-variable machinery, the outer line along the
-- steepest descent path of the reduced exponent), and the phase factor e^{i pi sgn/4} of
-- a signature 0, +2 and -2.
local lu = require "luaunit"
local H = require "helpers"
local steep = H.steep

local pi = math.pi
local x, y = steep.var "x", steep.var "y"
local lam = steep.param "lam"
local I = steep.I
local R = steep.line(steep.inf(pi), steep.inf(0))

TestMultiPhase = {}

-- e^{i lam phi} with phi = (x^2 - y^2)/2 + c x^2 y (signature 0), phi = +-((x^2 + y^2)/2
-- + c x^2 y^2 / 2) (signature +-2): each has one real stationary point, (0, 0), where
-- the leading term is (2 pi / lam) e^{i pi sgn / 4} g(0) (Hormander, Thm 7.7.5).
local C = 0.3
local cases = {
  { sgn = 0, phi = (x ^ 2 - y ^ 2) / 2 + C * x ^ 2 * y, g = 1 },
  { sgn = 2, phi = (x ^ 2 + y ^ 2) / 2 + C * x ^ 2 * y ^ 2 / 2, g = 1 },
  { sgn = -2, phi = -((x ^ 2 + y ^ 2) / 2 + C * x ^ 2 * y ^ 2 / 2), g = 1 },
  { sgn = 0, phi = (x ^ 2 - y ^ 2) / 2 + C * x ^ 2 * y, g = 1 + x * y + y ^ 2 / 2 },
}

local function integral(case)
  return steep.integral { var = { x, y }, exponent = I * lam * case.phi, amplitude = case.g,
    contour = { R, R }, large = lam }
end

-- The phase factor: the leading term over (2 pi / lam) is e^{i pi sgn / 4} (g(0) = 1).
function TestMultiPhase:test_phase_factor()
  for _, case in ipairs(cases) do
    local r = integral(case):expand { lam = 30, order = 1 }
    lu.assertEquals(#r.contributions, 1)
    local c = r.contributions[1]
    lu.assertEquals(c.signature, case.sgn)
    lu.assertStrContains(c.kind, string.format("signature %+d", case.sgn))
    local want = (2 * pi / 30) * steep.complex(math.cos(pi * case.sgn / 4), math.sin(pi * case.sgn / 4))
    H.close(c.terms[1], want, 1e-14, "leading term, signature " .. case.sgn)
  end
end

-- Expansion (4 terms) against iterated quadrature at lam = 20: the quadrature's estimate
-- below 1e-10 relative, and the two within the expansion's estimate plus the
-- quadrature's. (Signature -2 is the complex conjugate of +2, exactly: checked below
-- without a quadrature of its own.)
function TestMultiPhase:test_against_quadrature()
  for i, case in ipairs(cases) do
    if case.sgn == -2 then goto continue end
    do
    local J = integral(case)
    local r = J:expand { lam = 20, order = 4 }
    local q, qe, info = J:quad { lam = 20 }
    lu.assertEquals(info.status, "ok", "case " .. i)
    lu.assertEquals(info.inner, "deformed")
    lu.assertTrue(qe <= 1e-10 * q:abs(), string.format("case %d: quadrature estimate %.3g", i,
      qe / q:abs()))
    local d = (r.value - q):abs()
    lu.assertTrue(d <= r.error + qe, string.format("case %d (signature %+d): expansion vs "
      .. "quadrature %.3g, estimates %.3g + %.3g", i, case.sgn, d, r.error, qe))
    lu.assertEquals(r.status, "estimated")
    end
    ::continue::
  end
  -- e^{-i lam phi} with a real amplitude is the conjugate of e^{i lam phi} (exact)
  local plus = integral(cases[2]):expand { lam = 20, order = 4 }
  local minus = integral(cases[3]):expand { lam = 20, order = 4 }
  H.close(minus.value, plus.value:conj(), 1e-14, "signature -2 against the conjugate of +2")
end

-- The homotopy finds every critical point of the polynomial phase: for signature 0, the
-- real one and two complex ones, x = +-i/(c sqrt 2), y = -1/(2c) (solving
-- x (1 + 2 c y) = 0, c x^2 = y by hand); the fourth path of 2 x 2 goes to infinity.
function TestMultiPhase:test_critical_points()
  local J = integral(cases[1])
  local crit, info = J:critical { lam = 20 }
  lu.assertEquals(info.status, "complete")
  lu.assertEquals(info.paths, 4)
  lu.assertEquals(#crit, 3)
  local real, complex = 0, 0
  for _, c in ipairs(crit) do
    if c.real then
      real = real + 1
      lu.assertTrue(c.x[1]:abs() < 1e-14 and c.x[2]:abs() < 1e-14)
    else
      complex = complex + 1
      H.close(c.x[1]:abs(), 1 / (C * math.sqrt(2)), 1e-13, "|x| at a complex point")
      H.close(c.x[2], -1 / (2 * C), 1e-13, "y at a complex point")
    end
  end
  lu.assertEquals({ real, complex }, { 1, 2 })
end

-- Several real stationary points: the iterated quadrature along one steepest path per
-- variable is refused with a clear error (phi = x^3/3 - x + y^2/2: x = +-1).
function TestMultiPhase:test_several_points_refused_by_quad()
  local J = steep.integral { var = { x, y }, exponent = I * lam * (x ^ 3 / 3 - x + y ^ 2 / 2),
    contour = { R, R }, large = lam }
  local r = J:expand { lam = 20, order = 2 }
  lu.assertEquals(#r.contributions, 2)
  H.raises({ "quad", "2 real stationary points" }, J.quad, J, { lam = 20 })
end

-- Orientation: the second line reversed negates the expansion and the quadrature (the
-- integral over a reversed contour is the negated one), in the stationary-phase and the
-- Laplace case.
function TestMultiPhase:test_reversed_contour()
  local phi = cases[1].phi
  local J = integral(cases[1])
  local Jr = steep.integral { var = { x, y }, exponent = I * lam * phi, contour = { R, R:reverse() },
    large = lam }
  local r, rr = J:expand { lam = 20, order = 3 }, Jr:expand { lam = 20, order = 3 }
  H.close(rr.value, -r.value, 1e-14, "stationary phase, reversed")
  local L = steep.integral { var = { x, y }, exponent = -lam * (x ^ 2 + x * y + y ^ 2 + x ^ 4),
    contour = { steep.line(1, -1), steep.line(-1, 1) }, large = lam }
  local L2 = steep.integral { var = { x, y }, exponent = -lam * (x ^ 2 + x * y + y ^ 2 + x ^ 4),
    contour = { steep.line(-1, 1), steep.line(-1, 1) }, large = lam }
  H.close(L:expand { lam = 30, order = 3 }.value, -L2:expand { lam = 30, order = 3 }.value, 1e-14,
    "Laplace, reversed")
  local q = L:quad { lam = 30 }
  local q2 = L2:quad { lam = 30 }
  H.close(q, -q2, 1e-12, "Laplace quadrature, reversed")
end

-- Stationary phase over R^2 with four real stationary points, e^{i lam (x^3/3 - x + y^3/3
-- - y)}: the integral is (2 pi)^2 lam^(-2/3) Ai(-lam^(2/3))^2 (DLMF 9.5.1 with t =
-- lam^(-1/3) s, in each variable), Ai from gsl_sf_airy_Ai. The exponent is purely imaginary
-- on the real box; a sample on the ray from steep.inf(pi) (at sin(pi) = 1.2e-16 off the
-- axis) where F cancels to about 0 had it refused from lam = 150 on.
function TestMultiPhase:test_four_points_large_lam()
  local gsl = require "gslref"
  local J = steep.integral { var = { x, y }, contour = { R, R }, large = lam,
    exponent = lam * I * (x ^ 3 / 3 - x + y ^ 3 / 3 - y) }
  for _, L in ipairs({ 100, 150, 300, 1000 }) do
    local ai, aerr = gsl.airy_Ai(-L ^ (2 / 3))
    local want = (2 * pi) ^ 2 * L ^ (-2 / 3) * ai * ai
    local werr = (2 * pi) ^ 2 * L ^ (-2 / 3) * 2 * math.abs(ai) * aerr
    local r = J:expand { lam = L, order = 3 }
    lu.assertEquals(r.status, "estimated")
    lu.assertTrue((r.value - want):abs() <= r.error + werr, string.format("lam = %g: %.3g off "
      .. "under %.3g", L, (r.value - want):abs(), r.error))
  end
end
