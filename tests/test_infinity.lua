-- The behaviour of an integrand at infinity read from its expression (lua/steep/
-- infinity.lua): exact sectors, algebraic decay, strips of exponential type, and what the
-- analysis leaves undecided. References: the sign rule Re(c e^{a t}) = |c| e^{Re(a t)}
-- cos(arg c + Im(a t)) and Re(c t^n) = |c| r^n cos(arg c + n theta) (exact), and the
-- integrability of r^kappa at infinity (kappa < -1; common practice).
local lu = require "luaunit"
local H = require "helpers"
local steep = H.steep
local infinity = require "steep.infinity"
local landscape = require "steep.landscape"

local t, x = steep.var "t", steep.param "x"
local I, pi = steep.I, math.pi

local function analyze(F, g, params) return infinity.analyze(F, g, t, params or {}) end

local function by_type(A, kind)
  local out = {}
  for _, v in ipairs(A.valleys) do if v.type == kind then out[#out + 1] = v end end
  return out
end

TestInfinity = {}

-- cosh: Re(-x cosh(s + i y)) = -x cosh(s) cos(y): valleys are the strips |y| < pi/2 + 2 pi k,
-- to the right and (y -> -y) to the left; no sector (exact).
function TestInfinity:test_cosh_strips()
  local A = assert(analyze(-x * steep.cosh(t) + t / 3, nil, { x = 25 }))
  local strips = by_type(A, "strip")
  lu.assertEquals(#strips, 2, "one family each side")
  for _, f in ipairs(strips) do
    H.close(f.period, 2 * pi, 1e-12, "period 2 pi")
    H.close(f.hi - f.lo, pi, 1e-12, "width pi")
    local mid = 0.5 * (f.lo + f.hi)
    H.close(math.cos(mid - math.floor(mid / (2 * pi) + 0.5) * 2 * pi), 1, 1e-12,
      "centred on Im t = 0 (mod 2 pi)")
  end
  lu.assertEquals(#A.valleys, 2, "strips only")
end

-- Schlaefli's exponent x (sinh w / 2 - w): to the right e^w/4 grows, valleys where
-- cos(Im w) < 0; to the left -e^{-w}/4, valleys where cos(Im w) > 0 (exact).
function TestInfinity:test_sinh_strips()
  local A = assert(analyze(x * (0.5 * steep.sinh(t) - t), nil, { x = 10 }))
  local strips = by_type(A, "strip")
  lu.assertEquals(#strips, 2)
  for _, f in ipairs(strips) do
    local mid = 0.5 * (f.lo + f.hi)            -- offset from the line through 0
    local y = mid * math.cos(f.direction)      -- Im t at the middle (direction 0 or pi)
    if math.abs(f.direction) < 1e-9 then
      lu.assertTrue(math.cos(y) < -0.999, "right: cos(Im w) < 0 in the middle")
    else
      H.close(math.abs(f.direction), pi, 1e-12, "the other family points left")
      lu.assertTrue(math.cos(y) > 0.999, "left: cos(Im w) > 0 in the middle")
    end
  end
  -- the strip holding a ray: from i pi to the right (Im w = pi) is a valley; from 0 is not
  local L = { valleys = {}, strip_families = strips, region = { center = steep.complex(0, 0), radius = 1 } }
  lu.assertNotNil(landscape.ray_valley(L, steep.complex(0, pi), 0), "Im w = pi, to the right")
  lu.assertNil(landscape.ray_valley(L, steep.complex(0, 0), 0), "Im w = 0, to the right: a hill")
  lu.assertNotNil(landscape.ray_valley(L, steep.complex(0, 0), pi), "Im w = 0, to the left")
end

-- Algebraic decay: -2 log(1 + t^2) gives |integrand| ~ r^-4 in every direction; t^-x
-- likewise r^-x (exact).
function TestInfinity:test_algebraic()
  local A = assert(analyze(-2 * steep.log(1 + t ^ 2)))
  lu.assertEquals(#A.valleys, 1)
  lu.assertEquals(A.valleys[1].type, "algebraic")
  H.close(A.valleys[1].kappa, -4, 1e-12, "kappa")
  H.close(A.valleys[1].to - A.valleys[1].from, 2 * pi, 1e-12, "all directions")
  local B = assert(analyze(-x * steep.log(t), nil, { x = 3 }))
  H.close(B.valleys[1].kappa, -3, 1e-12, "t^-3")
  -- t^-x/2 is not integrable at infinity: no valley
  local C = assert(analyze(-0.5 * steep.log(t)))
  lu.assertEquals(#C.valleys, 0, "r^-1/2 does not converge")
end

-- Oscillation on top of decay: x (i sin(10 t) - t^2/100) is bounded-oscillatory plus a
-- decaying Gaussian on every horizontal line (|e^{10 i t}| = e^{-10 Im t}): the ends at
-- 0 and pi converge from any point; vertically e^{10 |Im t|} grows without turning: strips.
function TestInfinity:test_bounded_oscillation()
  local A = assert(analyze(x * (I * steep.sin(10 * t) - t ^ 2 / 100), nil, { x = 1 }))
  local lines = by_type(A, "line")
  lu.assertEquals(#lines, 2, "the two horizontal directions")
  for _, v in ipairs(lines) do
    lu.assertTrue(math.abs(math.sin(v.from)) < 1e-12, "horizontal: " .. v.from)
  end
  for _, f in ipairs(by_type(A, "strip")) do
    H.close(math.abs(f.direction), pi / 2, 1e-12, "strips are vertical")
    H.close(f.period, 2 * pi / 10, 1e-12, "period 2 pi/10")
  end
end

-- An end along a valley's edge where the integrand only oscillates: r^kappa e^{i c r^p}
-- converges as an improper integral exactly when kappa < p - 1 (u = r^p and Dirichlet's
-- test; common practice). Along the real axis, i t^4 with amplitude t (kappa 1 < 3)
-- converges; with t^3 (kappa 3) it does not, and i t with amplitude 1 (kappa 0 = p - 1)
-- neither; i t with amplitude 1/(1 + t^2)^(1/4) (kappa -1/2 < 0) converges.
function TestInfinity:test_oscillatory_ends()
  local cases = {
    { I * t ^ 4, t, true, "t e^{i t^4}" },
    { I * t ^ 4, t ^ 3, false, "t^3 e^{i t^4}" },
    { I * t ^ 4, t ^ 2.9, true, "t^2.9 e^{i t^4}" },
    { I * t, nil, false, "e^{i t}" },
    { I * t, (1 + t ^ 2) ^ -0.25, true, "e^{i t} / (1 + t^2)^(1/4)" },
  }
  for _, c in ipairs(cases) do
    local A = assert(analyze(c[1], c[2]))
    local ok, cl = A.converges(0)
    lu.assertEquals(ok, c[3], c[4] .. " (" .. cl.class .. ")")
  end
end

-- Bell numbers' exponent e^z - n log z: strips to the right (cos(Im z) < 0), and in the
-- left half-plane e^z dies and z^-n decays algebraically (exact).
function TestInfinity:test_exp_exp()
  local A = assert(analyze(steep.exp(t) - 51 * steep.log(t)))
  local strips = by_type(A, "strip")
  lu.assertEquals(#strips, 1)
  H.close(strips[1].direction, 0, 1e-12, "to the right", 1e-12)
  local alg = by_type(A, "algebraic")
  lu.assertEquals(#alg, 1)
  H.close(alg[1].from, pi / 2, 1e-12, "from pi/2")
  H.close(alg[1].to, 3 * pi / 2, 1e-12, "to 3 pi/2")
  H.close(alg[1].kappa, -51, 1e-12, "z^-51")
end

-- Polynomials: coefficients and degree read exactly (x t^3 i/3 + x t: c3 = i/3 x, c1 = i x).
function TestInfinity:test_polynomial()
  local c, d = infinity.polynomial(I * (t ^ 3 / 3 + x * t), t, { x = 8 })
  lu.assertEquals(d, 3)
  H.close(c[3], I / 3, 1e-15, "c3")
  H.close(c[1], 8 * I, 1e-15, "c1")
  H.close(c[0]:abs() + c[2]:abs(), 0, 1, "c0 = c2 = 0", 1e-300)
  lu.assertNil(infinity.polynomial(t ^ 2 + steep.log(t), t, {}), "not a polynomial")
  lu.assertNil(infinity.polynomial(1 / (1 + t), t, {}), "not a polynomial")
end

-- What it cannot read it says so (tan: poles all along the real axis), and the landscape
-- then samples the valleys and marks them indicative.
function TestInfinity:test_undecided()
  local A, why = analyze(steep.tan(t))
  lu.assertNil(A)
  lu.assertStrContains(why, "not decided")
end

-- Undecided directions beside decided valleys: e^{-x (cosh t - 1)} cosh(nu t), whose
-- amplitude along the imaginary axis is cos(nu y), two oscillating terms of one size (no
-- term dominates its log), keeps its strips left and right; the undecided directions are
-- listed, and are no valleys. The whole analysis had been dropped, and the sampled
-- valleys missed direction 0 for nu >= 66, so that e^x K_nu(x) = int_0^inf of it (DLMF
-- 10.32.9) was refused as divergent: now quad gives gsl_sf_bessel_Knu_scaled.
function TestInfinity:test_undecided_beside_strips()
  local nu = steep.param "nu"
  local F, g = -x * (steep.cosh(t) - 1), steep.cosh(nu * t)
  local A = assert(analyze(F, g, { x = 100, nu = 100 }))
  lu.assertEquals(#by_type(A, "strip"), 2, "the strips right and left")
  lu.assertNotNil(A.undecided, "the undecided directions are listed")
  for _, th in ipairs(A.undecided) do
    lu.assertFalse((A.converges(th)), "an undecided direction is no valley: " .. th)
  end
  lu.assertTrue((A.converges(0)))
  local gsl = require "gslref"
  local K = steep.integral { var = t, exponent = F, amplitude = g,
    contour = steep.line(0, steep.inf(0)), large = x }
  for _, nv in ipairs({ 75, 100 }) do
    local v, e = K:quad { x = 100, nu = nv }
    local want = gsl.bessel_Knu_scaled(nv, 100)
    lu.assertTrue((v - want):abs() <= e, string.format("nu = %d: error %.3g, stated %.3g",
      nv, (v - want):abs(), e))
    H.close(v, want, 1e-12, "nu = " .. nv)
  end
end

-- Cross-check against sampling: for a polynomial exponent far out, the sampled valleys
-- lie inside the exact sectors (sampling is indicative, the sectors exact).
function TestInfinity:test_sampling_agrees()
  local J = steep.integral { var = t, exponent = I * (t ^ 3 / 3 - 2 * t) + 0.1 * t ^ 2,
    contour = steep.line(steep.inf(pi), steep.inf(0)) }
  local exact = J:landscape {}.valleys
  local sampled = landscape.sampled_valleys(J, {}, { center = steep.complex(0, 0), radius = 8 })
  local sectors = {}
  for _, v in ipairs(sampled) do if v.to > v.from then sectors[#sectors + 1] = v end end
  lu.assertEquals(#sectors, #exact, "as many sampled sectors as exact ones")
  for _, v in ipairs(sectors) do
    local mid = 0.5 * (v.from + v.to)
    lu.assertNotNil(landscape.valley_of(exact, mid), "sampled valley around " .. mid
      .. " lies in an exact sector")
  end
end
