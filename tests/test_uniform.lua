-- Tests of the uniform forms: the saddle with a nearby pole of the amplitude (through the
-- Faddeeva function) as the pole crosses the steepest path, and two saddles together
-- (the Airy-type form; the Airy functions themselves are tested in test_airy.lua).
local lu = require "luaunit"
local H = require "helpers"
local gsl = require "gslref"
local steep = H.steep

local I, pi = steep.I, math.pi

local function cabs(z) return type(z) == "number" and math.abs(z) or z:abs() end

---------------------------------------------------------------------------------------

TestUniformPole = {}

-- J(x, y) = integral of exp(-x t^2/2) / (t - (0.3 + i y)) dt along the path from -inf
-- (direction pi) to -2 + i, then to 2 + i, then to +inf (direction 0). The contour stays
-- above the pole, so J is analytic in y; the steepest path through the saddle t = 0 is the
-- real axis, which the pole crosses as y changes sign: for y > 0 the deformation picks up
-- the pole's residue, for y < 0 it does not, and the uniform form's Faddeeva term jumps
-- by exactly that residue.
local t, x, y = steep.var "t", steep.param "x", steep.param "y"
local J = steep.integral { var = t, exponent = -x * t ^ 2 / 2,
  amplitude = 1 / (t - (0.3 + I * y)),
  contour = steep.path { steep.inf(pi), -2 + I, 2 + I, steep.inf(0) }, large = x }

local YS = { 0.3, 0.2, 0.1, 1e-2, 1e-3, 1e-6, 1e-9, -1e-9, -1e-6, -1e-3, -1e-2, -0.1, -0.2, -0.3 }

local expansions = {}
local function expand(yv)
  if not expansions[yv] then expansions[yv] = J:expand { x = 10, y = yv, order = 4 } end
  return expansions[yv]
end

-- Each expansion (x = 10, four terms) agrees with quadrature along the given contour within
-- its reported error (plus the quadrature's), and uses the uniform form; the
-- residue term appears exactly when the pole is above the real axis.
function TestUniformPole:test_against_quadrature()
  for _, yv in ipairs(YS) do
    local r = expand(yv)
    local q, qe, info = J:quad { x = 10, y = yv, along = "given" }
    local msg = string.format("y = %g", yv)
    lu.assertEquals(info.status, "ok", msg)
    local d = cabs(r.value - q)
    if not (d <= r.error + qe) then
      lu.fail(string.format("%s: |expansion - quadrature| = %.3g exceeds %.3g + %.3g; "
        .. "expansion %s, quadrature %s", msg, d, r.error, qe, tostring(r.value), tostring(q)))
    end
    local uniform, residue = false, false
    for _, c in ipairs(r.contributions) do
      if c.kind:find("uniform", 1, true) then uniform = true end
      if c.kind == "pole" then residue = true end
    end
    lu.assertTrue(uniform, msg .. ": a uniform contribution")
    lu.assertEquals(residue, yv > 0, msg .. ": the residue term")
  end
end

-- No jump at the crossing: J is analytic in y, so the change from y = -1e-9 to 1e-9 is
-- (within the error estimates) 1e-3 times the change from -1e-6 to 1e-6 (the symmetric
-- differences agree to O(h^2)), and matches the change of the quadrature. A wrong side
-- for the pole would show as a jump of 2 pi |e^{-x p^2/2}| ~ 4.7.
function TestUniformPole:test_no_jump_at_crossing()
  local a, b = expand(1e-9), expand(-1e-9)
  local c, d = expand(1e-6), expand(-1e-6)
  local small = a.value - b.value
  local big = (c.value - d.value) * 1e-3
  local tol = a.error + b.error + 1e-3 * (c.error + d.error)
  lu.assertTrue(cabs(small - big) <= tol, string.format("J(1e-9) - J(-1e-9) = %s against "
    .. "1e-3 (J(1e-6) - J(-1e-6)) = %s: difference %.3g, allowed %.3g", tostring(small),
    tostring(big), cabs(small - big), tol))
  local qa, qea = J:quad { x = 10, y = 1e-9, along = "given" }
  local qb, qeb = J:quad { x = 10, y = -1e-9, along = "given" }
  lu.assertTrue(cabs(small - (qa - qb)) <= a.error + b.error + qea + qeb,
    string.format("jump of the expansion %s, of the quadrature %s", tostring(small),
      tostring(qa - qb)))
end

---------------------------------------------------------------------------------------

-- A second pole inside the first circle the uniform form tries: exp(-x t^2/2) / ((t - P1)
-- (t - P2)) on the real line at x = 10, P1 = 0.1i near the saddle (its image b = 0.22i)
-- and P2 = 0.5 + 0.2i at |w| = 1.2 (the first circle has radius |b| + 1.2 = 1.42). A
-- circle enclosing P2 would add its residue to H's coefficients; the form must notice and
-- use a smaller circle. (With P2 that close, H's series converges slowly and the expansion
-- is rough at x = 10: the test asks for an honest estimate, not a small error.)
-- Reference by partial fractions and DLMF 7.7.2 (Im z > 0):
-- integral of exp(-a t^2) / (t - z) dt = i pi w(z sqrt(a)), w from libcerf.
function TestUniformPole:test_second_pole_inside_first_circle()
  local P1, P2 = 0.1 * I, 0.5 + 0.2 * I
  local J2 = steep.integral { var = t, exponent = -x * t ^ 2 / 2,
    amplitude = 1 / ((t - P1) * (t - P2)),
    contour = steep.line(steep.inf(pi), steep.inf(0)), large = x }
  local X = 10
  local sa = math.sqrt(X / 2)
  local function w(z)
    local re, im = gsl.faddeeva_w((z * sa):re(), (z * sa):im())
    return steep.complex(re, im)
  end
  local want = I * pi * (w(P1) - w(P2)) / (P1 - P2)
  local r = J2:expand { x = X, order = 4 }
  local uniform
  for _, c in ipairs(r.contributions) do
    if c.kind:find("uniform", 1, true) then uniform = c end
  end
  lu.assertNotNil(uniform, "the saddle is expanded uniformly (pole P1 nearby)")
  local rho = tonumber(uniform.note:match("circle |w| = ([%d.e+-]+)"))
  lu.assertTrue(rho < 1.2, "the circle used excludes P2's image (radius " .. tostring(rho) .. ")")
  local d = cabs(r.value - want)
  lu.assertTrue(d <= r.error, string.format("|expansion - "
    .. "Faddeeva reference| = %.3g, estimate %.3g, |J| = %.3g", d, r.error, cabs(want)))
end

TestUniformAiry = {}

-- Airy's integral (1/2 pi) int exp(i (t^3/3 + x t)) dt (DLMF 9.5.4) with its two saddles
-- +-sqrt(-x) 2e-2 to 2e-4 apart: J:expand decomposes the pair and expands it by the
-- Airy-type form, which is exact for this cubic; against gsl_sf_airy_Ai within the
-- reported error (plus 1e-13 relative).
function TestUniformAiry:test_expand_with_saddles_close_together()
  local tt, xx = steep.var "t", steep.param "x"
  local J = steep.integral { var = tt, exponent = I * (tt ^ 3 / 3 + xx * tt),
    contour = steep.line(steep.inf(pi), steep.inf(0)), large = xx }
  for _, xv in ipairs({ -1e-4, -1e-6, -1e-8, 1e-8 + 1e-8 * I }) do
    local msg = "x = " .. tostring(xv)
    local r = J:expand { x = xv, order = 3 }
    local ref = gsl.airy_Ai(type(xv) == "number" and xv or xv:re())
    if type(xv) ~= "number" then
      -- Ai(x) = Ai(re x) + i im(x) Ai'(re x) + O(im x^2): the derivative from GSL too
      ref = ref + I * xv:im() * gsl.airy_Ai_deriv(xv:re())
    end
    local d = cabs(r.value / (2 * pi) - ref)
    lu.assertTrue(d <= r.error / (2 * pi) + 1e-13 * cabs(ref), string.format("%s: "
      .. "|expansion - Ai| = %.3g, estimate %.3g", msg, d, r.error / (2 * pi)))
  end
end

-- The Airy-type form at high fixed orders: each round of its recursion (G = (u^2 - zeta) H
-- + p + q u, then H') multiplies the high coefficients' errors by about k, and the terms
-- depend on where the recursion starts (the coefficients omitted). Both now enter the
-- estimate (they had not: Airy at x = 0.3, order 28, 6.7e-5 off under 9.9e-14; e^3 K_1/2(3)
-- at order 22, 8.7e-7 under 1.9e-8, both "estimated"): every order's error within its
-- estimate. References: 2 pi Ai(x) (DLMF 9.5.4, gsl_sf_airy_Ai); e^x K_nu(x) = (1/2) int
-- over the real line of exp(-x (cosh t - 1) + nu t) (DLMF 10.32.9, gsl_sf_bessel_Knu_scaled,
-- sqrt(pi/6) at nu = 1/2, x = 3).
function TestUniformAiry:test_high_orders_within_estimate()
  local tt, xx, nu = steep.var "t", steep.param "x", steep.param "nu"
  local A = steep.integral { var = tt, exponent = I * (tt ^ 3 / 3 + xx * tt),
    contour = steep.line(steep.inf(pi), steep.inf(0)), large = xx }
  local K = steep.integral { var = tt, exponent = -xx * (steep.cosh(tt) - 1) + nu * tt,
    amplitude = 0.5, contour = steep.line(steep.inf(pi), steep.inf(0)), large = xx }
  local aref, kref = 2 * pi * gsl.airy_Ai(0.3), gsl.bessel_Knu_scaled(0.5, 3)
  for _, order in ipairs({ 8, 16, 24, 28, 40 }) do
    local r = A:expand { x = 0.3, order = order }
    local d = cabs(r.value - aref)
    lu.assertTrue(d <= r.error, string.format("Airy x = 0.3, order %d: error %.3g, stated "
      .. "%.3g", order, d, r.error))
    local k = K:expand { nu = 0.5, x = 3, order = order }
    local dk = cabs(k.value - kref)
    lu.assertTrue(dk <= k.error, string.format("K_1/2(3), order %d: error %.3g, stated %.3g",
      order, dk, k.error))
  end
  -- (and at a low order the estimate still means something)
  local r = A:expand { x = 0.3, order = 8 }
  lu.assertTrue(r.error <= 1e-12 * cabs(aref), "order 8: " .. r.error)
end

-- A term below 1e-13 of the largest is no rounding noise: the Airy-type form of a Hermite
-- polynomial's two saddles near the turning point, at 6 terms, had its seventh term (2.2e-14
-- against a largest of 0.22) dropped from the remainder, and was 2.3e-14 off under 1.1e-14.
-- H_n(x)/n! = (1/2 pi i) oint e^{2xt - t^2} t^(-n-1) dt (DLMF 18.12.15); the reference by
-- the recurrence h_(k+1) = (2x h_k - 2 h_(k-1))/(k+1), h_k = H_k/k! (DLMF 18.9.1), in doubles:
-- at n = 35 its rounding is below 1e-15 relative (common practice: a forward recurrence in
-- its dominant direction).
function TestUniformAiry:test_small_terms_count()
  local tt, xx, nn = steep.var "t", steep.param "x", steep.param "n"
  local J = steep.integral { var = tt, exponent = 2 * xx * tt - tt ^ 2 - (nn + 1) * steep.log(tt),
    amplitude = 1 / (2 * pi * I), contour = steep.circle(0, 1), large = nn }
  local n, xv = 35, 8.1150649186011261
  local a, b = 1, 2 * xv
  for k = 1, n - 1 do a, b = b, (2 * xv * b - 2 * a) / (k + 1) end
  for _, order in ipairs({ 6, 8, "optimal" }) do
    local r = J:expand { n = n, x = xv, order = order }
    local d = cabs(r.value - b)
    lu.assertTrue(d <= r.error + 1e-15 * math.abs(b), string.format("order %s: error %.3g, "
      .. "stated %.3g", tostring(order), d, r.error))
  end
end

---------------------------------------------------------------------------------------

TestUniformCoalescence = {}

-- Two stationary points +-sqrt(a) of x (t^3/3 - a t) that merge as a -> 0, with an extra
-- quartic term and a non-constant amplitude so that the cubic map is not exact: the
-- Airy-type uniform form (Chester, Friedman & Ursell 1957; DLMF 2.4(v)) against
-- quadrature along the deformed contour, through the coalescence and past it (the
-- points then leave the real axis), within the reported error, and continuous at
-- a = 0 (no jump beyond the error estimates; common practice for a uniform form).
function TestUniformCoalescence:test_through_coalescence()
  local t, x, a = steep.var "t", steep.param "x", steep.param "a"
  local J = steep.integral { var = t, exponent = steep.I * (x * (t ^ 3 / 3 - a * t) + t ^ 4 / 40),
    amplitude = 1 / (1 + t ^ 2 / 9), contour = steep.line(steep.inf(math.pi), steep.inf(0)),
    large = x }
  local values = {}
  -- (at a = 0 exactly the two points are one saddle of order 3, expanded as such; as
  -- close as 1e-8 apart they are the uniform pair, whose paths must start closer to each
  -- saddle than the other one lies)
  for _, av in ipairs({ 0.5, 0.1, 0.01, 0.003, 1e-4, 1e-6, 1e-8, 0, -1e-8, -1e-6, -1e-4,
      -0.003, -0.01, -0.1 }) do
    local r = J:expand { x = 10, a = av, order = 3 }
    local q, qe = J:quad { x = 10, a = av }
    -- (the quartic term also makes a third saddle, near t = -10 x, which the real line
    -- passes through: a plain contribution of its own)
    local kinds = {}
    for _, c in ipairs(r.contributions) do kinds[#kinds + 1] = c.kind end
    lu.assertStrContains(table.concat(kinds, "; "), av == 0 and "order 3" or "Airy type",
      "a = " .. av)
    local d = (r.value - q):abs()
    lu.assertTrue(d <= r.error + qe, string.format("a = %g: |expansion - quad| = %.3g, "
      .. "error %.3g", av, d, r.error))
    values[av] = r
  end
  -- continuity through the coalescence: the second difference over a = -0.003, 0, 0.003 is
  -- of the size of the curvature times 0.003^2, not of a jump
  local v1, v0, v2 = values[0.003].value, values[0].value, values[-0.003].value
  local second = (v1 + v2 - 2 * v0):abs()
  local curvature = (values[0.01].value + values[-0.01].value - 2 * v0):abs() / 1e-4
  lu.assertTrue(second <= 3 * curvature * 0.003 ^ 2 + 3 * (values[0.003].error
    + values[-0.003].error + 2 * values[0].error),
    string.format("no jump at the coalescence: second difference %.3g", second))
end

TestUniformEndpoint = {}

-- A simple saddle a few widths from a finite endpoint (steep.nearend): the saddle's series
-- with the endpoint's weight on its ray, less the convergent series from the saddle to the
-- endpoint. Where the saddle and the endpoint were expanded apart their estimates grew past
-- the value within about two widths (status suspect at every order).
-- (a) The truncated Gaussian: integral_0^inf (1 + t) e^{-x (t - a)^2} dt =
--     (1 + a) sqrt(pi/x)/2 erfc(-a sqrt x) + e^{-x a^2}/(2x) (exact, by parts; erfc from
--     gsl_sf_erfc), a sqrt x from -2 to 2.
-- (b) A gamma-type tail: integral_1^inf t^x e^{-x (1 - a) t} dt =
--     Gamma(x + 1) Q(x + 1, x (1 - a)) / (x (1 - a))^(x + 1) (DLMF 8.2.2 and 8.2.4;
--     gsl_sf_gamma_inc_Q, gsl_sf_lngamma), the saddle 1/(1 - a) next to the endpoint 1.
function TestUniformEndpoint:test_saddle_near_an_endpoint()
  local a = steep.param "a"
  local G = steep.integral { var = t, exponent = -x * (t - a) ^ 2, amplitude = 1 + t,
    contour = steep.line(0, steep.inf(0)), large = x }
  local T = steep.integral { var = t, exponent = x * (steep.log(t) - t + a * t),
    contour = steep.line(1, steep.inf(0)), large = x }
  local function check(J, xv, av, want, msg)
    local uniform = false
    for _, order in ipairs({ 1, 3, 6, "optimal" }) do
      local r = J:expand { x = xv, a = av, order = order }
      local m = string.format("%s, order %s", msg, tostring(order))
      lu.assertEquals(r.status, "estimated", m)
      local d = cabs(r.value - want)
      lu.assertTrue(d <= r.error + 1e-15 * math.abs(want), string.format("%s: error %.3g, "
        .. "stated %.3g", m, d, r.error))
      for _, c in ipairs(r.contributions) do
        if c.kind:match("near an endpoint") then uniform = true end
      end
    end
    return uniform
  end
  for _, xv in ipairs({ 100, 1000 }) do
    for _, z in ipairs({ -2, -0.5, 0.02, 0.5, 2 }) do
      local av = z / math.sqrt(xv)
      local e = z < 0 and gsl.erfc(-z) or 2 - gsl.erfc(z)
      local want = (1 + av) * math.sqrt(pi / xv) / 2 * e + math.exp(-z * z) / (2 * xv)
      local used = check(G, xv, av, want, string.format("(a) x = %g, a sqrt x = %g", xv, z))
      if math.abs(z) <= 0.5 then lu.assertTrue(used, "(a) the uniform form, a sqrt x = " .. z) end
    end
  end
  for _, xv in ipairs({ 20, 200 }) do
    for _, av in ipairs({ -0.05, 0.003, 0.05 }) do
      local u = xv * (1 - av)
      local want = math.exp(gsl.lngamma(xv + 1) - (xv + 1) * math.log(u)) * gsl.gamma_inc_Q(xv + 1, u)
      check(T, xv, av, want, string.format("(b) x = %g, a = %g", xv, av))
    end
  end
end
