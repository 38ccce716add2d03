-- Tests of the uniform form for three saddles together (the cusp, lua/steep/cusp.lua):
-- its map and model integrals on their own, Pearcey's integral, continuity through the
-- cusp, a non-quartic exponent with a non-constant amplitude, and a real Laplace-type
-- integral whose saddles sit on a Stokes line.
local lu = require "luaunit"
local H = require "helpers"
local gsl = require "gslref"
local steep = H.steep
local cusp = require "steep.cusp"

local I, pi = steep.I, math.pi
local EPS = 2.220446049250313e-16

local function cabs(z) return type(z) == "number" and math.abs(z) or z:abs() end
local function expi(th) return steep.complex(math.cos(th), math.sin(th)) end

-- The contributions of a result that use the cusp form, and a list of every kind.
local function cusp_parts(r)
  local found, kinds = {}, {}
  for _, c in ipairs(r.contributions) do
    kinds[#kinds + 1] = c.kind
    if c.kind:find("cusp", 1, true) then found[#found + 1] = c end
  end
  return found, table.concat(kinds, "; ")
end

-- |expansion - reference| within the expansion's estimate plus the reference's (1x).
local function within(r, ref, ref_err, msg)
  local d = cabs(r.value - ref)
  if not (d <= r.error + ref_err) then
    lu.fail(string.format("%s: |expansion - reference| = %.3g exceeds the estimates %.3g + "
      .. "%.3g; expansion %s, reference %s", msg, d, r.error, ref_err, tostring(r.value),
      tostring(ref)))
  end
  return d
end

---------------------------------------------------------------------------------------

TestCuspParts = {}

-- The map of an exact quartic: F(t) = A0 + P((t - t0)/beta) with P(u) = -(u^4/4 -
-- zeta u^2/2 + eta u) has its saddles at t0 + beta u_j (u_j the roots of u^3 - zeta u +
-- eta); the map built from the saddles alone must give back A0, zeta and eta (beta has
-- argument below pi/4, the principal root the map starts from) and t'(u_j) = beta. Exact
-- algebra (no outside reference).
function TestCuspParts:test_map_of_an_exact_quartic()
  local zeta, eta = steep.complex(0.3, 0.2), steep.complex(0.1, -0.05)
  local beta, t0, A0 = 1.3 * expi(0.2), steep.complex(2, 0.5), steep.complex(-0.4, 1.1)
  local function P(u) return -(u * (u * (0.25 * u * u - 0.5 * zeta) + eta)) end
  -- the roots by Newton's method from three guesses (the cubic is near u^3 - 0.3 u)
  local roots = {}
  for k, g in ipairs({ steep.complex(0.6, 0.1), steep.complex(0.3, 0), steep.complex(-0.7, -0.1) }) do
    local u = g
    for _ = 1, 60 do u = u - (u * u * u - zeta * u + eta) / (3 * u * u - zeta) end
    roots[k] = u
  end
  lu.assertTrue(cabs(roots[1] - roots[2]) > 0.1 and cabs(roots[2] - roots[3]) > 0.1
    and cabs(roots[1] - roots[3]) > 0.1, "three distinct roots")
  local S = {}
  for k, u in ipairs(roots) do
    -- F''(t) = P''(u) / beta^2 with P'' = -(3u^2 - zeta)
    S[k] = { at = t0 + beta * u, F = A0 + P(u), F2 = -(3 * u * u - zeta) / (beta * beta) }
  end
  local map = assert(cusp.quartic_map(S[1], S[2], S[3]))
  H.close(map.zeta, zeta, 1e-13, "zeta")
  H.close(map.eta, eta, 1e-12, "eta")
  H.close(map.A, A0, 1e-14, "A")
  for k = 1, 3 do
    H.close(map.u[k], roots[k], 1e-13, "root " .. k)
    H.close(map.tp[k], beta, 1e-13, "t'(u_" .. k .. ")")
  end
  -- three saddles that no quartic map sends onto a cusp: values and second derivatives
  -- that contradict their places (common practice: the chords must match t' at the ends)
  local bad = { { at = steep.complex(0, 0), F = steep.complex(0, 0), F2 = steep.complex(1, 0) },
    { at = steep.complex(1, 0), F = steep.complex(0, 3), F2 = steep.complex(0, 50) },
    { at = steep.complex(0, 4), F = steep.complex(2, 0), F2 = steep.complex(-0.01, 0) } }
  local none, why = cusp.quartic_map(bad[1], bad[2], bad[3])
  lu.assertNil(none, "an inconsistent triple is refused")
  lu.assertEquals(type(why), "string")
end

-- The model integrals against their Maclaurin series in zeta and eta: between the valleys
-- about the directions a pi/2 and b pi/2,
--   integral of u^n e^{-u^4/4} du = (w_b^(n+1) - w_a^(n+1)) 4^((n+1)/4 - 1) Gamma((n+1)/4)
-- (w_k = e^{i k pi/2}; the ray integral by v = u^4/4 and Euler's integral, DLMF 5.2.1),
-- and e^{zeta u^2/2 - eta u} expanded term by term (the integrand is entire and the
-- moments decay like Gamma((n+1)/4): the sum converges; for |zeta|, |eta| <= 1 its terms
-- do not cancel). Gamma from gsl_sf_gamma. Within the quadrature's own estimate plus the
-- series' rounding (16 eps times the sum of the terms' sizes).
function TestCuspParts:test_model_integrals_against_their_series()
  local cases = {
    { zeta = steep.complex(0.4, 0.3), eta = steep.complex(-0.2, 0.1), from = 2, to = 0 },
    { zeta = steep.complex(-0.8, 0.1), eta = steep.complex(0.5, 0), from = 3, to = 1 },
    { zeta = steep.complex(0, 1), eta = steep.complex(0.3, -0.6), from = 0, to = 1 },
    { zeta = steep.complex(1e-9, 0), eta = steep.complex(0, 0), from = 2, to = 0 },
  }
  for _, case in ipairs(cases) do
    local boundary = { [0] = 0, 0, 0, 0 }
    boundary[case.from], boundary[case.to] = -1, 1
    local map = { zeta = case.zeta, eta = case.eta, u = { 0, 0, 0 } }
    local Iq, Eq = cusp.model_integrals(map, boundary)
    lu.assertNotNil(Iq, "model integrals by quadrature")
    for m = 0, 2 do
      local sum, size = steep.complex(0, 0), 0
      local fj = steep.complex(1, 0)
      for j = 0, 60 do
        local fk = steep.complex(1, 0)
        for k = 0, 60 do
          local n = m + 2 * j + k
          local w = expi((n + 1) * case.to * pi / 2) - expi((n + 1) * case.from * pi / 2)
          local term = fj * fk * w * 4 ^ ((n + 1) / 4 - 1) * gsl.gamma((n + 1) / 4)
          sum, size = sum + term, size + cabs(term)
          fk = fk * (-case.eta) / (k + 1)
        end
        fj = fj * (case.zeta / 2) / (j + 1)
      end
      local msg = string.format("I_%d, zeta = %s, eta = %s, valleys %d -> %d", m,
        tostring(case.zeta), tostring(case.eta), case.from, case.to)
      local d = cabs(Iq[m] - sum)
      lu.assertTrue(d <= Eq[m] + 16 * EPS * size, string.format("%s: quadrature %s, series %s, "
        .. "difference %.3g, estimates %.3g + %.3g", msg, tostring(Iq[m]), tostring(sum), d,
        Eq[m], 16 * EPS * size))
      lu.assertTrue(Eq[m] < 1e-10 * math.max(cabs(sum), 1), msg .. ": a small estimate")
    end
  end
end

---------------------------------------------------------------------------------------

TestCuspPearcey = {}

-- Pearcey's integral J(l, y) = integral over the real line of exp(i l (t^4/4 - t^2/2) +
-- i y t) dt (t = (4/l)^(1/4) s turns it into the canonical cusp integral of DLMF 36.2.4,
-- K = 2, with x = -sqrt(l) and y (4/l)^(1/4)). Three real saddles, 0 and about +-1, close
-- together on the pair form's scale for these l.
local t, l, y = steep.var "t", steep.param "l", steep.param "y"
local JP = steep.integral { var = t, exponent = I * (l * (t ^ 4 / 4 - t ^ 2 / 2) + y * t),
  contour = steep.line(steep.inf(pi), steep.inf(0)), large = l }

-- The same by its Maclaurin series in x and y: expanding e^{i(x s^2 + y s)} against
-- e^{i s^4} and integrating term by term along the real line turned by pi/8,
--   integral of s^n e^{i s^4} ds = e^{i pi (n+1)/8} Gamma((n+1)/4) / 2   (n even; 0 for odd)
-- (DLMF 5.2.1 after s = e^{i pi/8} r). The terms grow to about e^{x^2/4} before they fall,
-- so the sum carries the rounding of its largest terms: returned with it (16 eps times
-- the sum of the terms' sizes).
local function pearcey_series(lv, yv)
  local c = (4 / lv) ^ 0.25
  local x, yc = -math.sqrt(lv), yv * c
  local sum, size = steep.complex(0, 0), 0
  local fj = steep.complex(1, 0)
  for j = 0, 200 do
    local fk = steep.complex(1, 0)
    for k = 0, 200 do
      local n = 2 * j + k
      if n % 2 == 0 then
        local term = fj * fk * expi(pi * (n + 1) / 8) * (gsl.gamma((n + 1) / 4) / 2)
        sum, size = sum + term, size + cabs(term)
      end
      fk = fk * (I * yc) / (k + 1)
      if cabs(fk) < 1e-300 then break end
    end
    fj = fj * (I * x) / (j + 1)
    if cabs(fj) * gsl.gamma((2 * j + 3) / 4) < 1e-30 then break end
  end
  return sum * c, 16 * EPS * size * c
end

-- The reference is the project's own quadrature along the deformed contour (about 1e-12,
-- with its estimate); the series above confirms it independently. The expansion (one
-- term, and three) lies within its estimate of both, uses the cusp form for all three
-- saddles in one contribution, and is not suspect.
function TestCuspPearcey:test_against_quadrature_and_series()
  for _, lv in ipairs({ 10, 20, 40 }) do
    for _, yv in ipairs({ 0, 0.01, 0.1 }) do
      local msg = string.format("l = %g, y = %g", lv, yv)
      local q, qe, info = JP:quad { l = lv, y = yv }
      lu.assertEquals(info.status, "ok", msg .. ": quadrature")
      lu.assertTrue(qe <= 1e-12 * cabs(q), msg .. ": quadrature to 1e-12")
      local s, se = pearcey_series(lv, yv)
      lu.assertTrue(cabs(s - q) <= se + qe, string.format("%s: series %s against quadrature %s "
        .. "(difference %.3g, allowed %.3g)", msg, tostring(s), tostring(q), cabs(s - q), se + qe))
      for _, order in ipairs({ 1, 3 }) do
        local r = JP:expand { l = lv, y = yv, order = order }
        local m = msg .. ", order " .. order
        local parts, kinds = cusp_parts(r)
        lu.assertEquals(#r.contributions, 1, m .. ": one contribution (" .. kinds .. ")")
        lu.assertEquals(#parts, 1, m .. ": the cusp form (" .. kinds .. ")")
        lu.assertEquals(#parts[1].partners, 2, m .. ": three saddles in it")
        lu.assertEquals(r.status, "estimated", m)
        within(r, q, qe, m .. " (quadrature)")
        within(r, s, se, m .. " (series)")
      end
    end
  end
end

-- A symmetric problem gets a symmetric treatment: J(l, y) = J(l, -y) (t -> -t), and the
-- expansions at y and -y are one contribution each, mirrored, and equal within their
-- estimates. (Exact symmetry of the integral.)
function TestCuspPearcey:test_symmetric_treatment()
  for _, lv in ipairs({ 10, 40 }) do
    local a, b = JP:expand { l = lv, y = 0.1, order = 2 }, JP:expand { l = lv, y = -0.1, order = 2 }
    local pa, pb = cusp_parts(a), cusp_parts(b)
    lu.assertEquals(#pa, 1)
    lu.assertEquals(#pb, 1)
    H.close(pa[1].at, -pb[1].at, 1e-12, "mirrored middle saddle", 1e-12)
    local d = cabs(a.value - b.value)
    lu.assertTrue(d <= a.error + b.error, string.format("l = %g: J(0.1) - J(-0.1) = %.3g, "
      .. "estimates %.3g", lv, d, a.error + b.error))
  end
end

---------------------------------------------------------------------------------------

TestCuspContinuity = {}

-- Through the cusp: F = i l (t^4/4 - a t^2/2), l = 10, as a goes through 0 the three
-- saddles 0, +-sqrt(a) merge into one of order 4 and leave the real axis. On either side
-- the cusp form, at a = 0 the saddle of order 4; each against quadrature along the
-- deformed contour within its estimate; and no jump at a = 0: the second difference over
-- a = -h, 0, h is of the size of the curvature times h^2, not of a jump (common practice
-- for a uniform form, as tests/test_uniform.lua does for the pair). The plain expansions
-- of the three saddles blow up here (their estimates exceed the value by up to 1e80).
function TestCuspContinuity:test_through_the_cusp()
  local tt, ll, a = steep.var "t", steep.param "l", steep.param "a"
  local J = steep.integral { var = tt, exponent = I * ll * (tt ^ 4 / 4 - a * tt ^ 2 / 2),
    contour = steep.line(steep.inf(pi), steep.inf(0)), large = ll }
  local values = {}
  for _, av in ipairs({ 0.3, 0.1, 0.01, 1e-3, 1e-4, 1e-6, 1e-8, 0, -1e-8, -1e-6, -1e-4, -1e-3,
      -0.01, -0.1, -0.3 }) do
    local msg = "a = " .. av
    local r = J:expand { l = 10, a = av, order = 3 }
    local q, qe, info = J:quad { l = 10, a = av }
    lu.assertEquals(info.status, "ok", msg .. ": quadrature")
    local parts, kinds = cusp_parts(r)
    if av == 0 then
      lu.assertStrContains(kinds, "order 4", msg)
    else
      lu.assertEquals(#parts, 1, msg .. ": the cusp form (" .. kinds .. ")")
    end
    lu.assertEquals(r.status, "estimated", msg)
    within(r, q, qe, msg)
    values[av] = r
  end
  local h = 1e-3
  local v1, v0, v2 = values[h].value, values[0].value, values[-h].value
  local second = cabs(v1 + v2 - 2 * v0)
  local curvature = cabs(values[0.01].value + values[-0.01].value - 2 * v0) / 1e-4
  local allowed = 3 * curvature * h * h + values[h].error + values[-h].error + 2 * values[0].error
  lu.assertTrue(second <= allowed, string.format("no jump at the cusp: second difference %.3g, "
    .. "allowed %.3g", second, allowed))
end

-- Across a fold of the cusp: with the linear term y, two of Pearcey's three saddles merge
-- at y_c = 2 l / (3 sqrt 3) (F' = i (l (t^3 - t) + y) with a double zero at t = 1/sqrt 3;
-- exact algebra) and leave the real axis beyond. The three stay one cusp contribution on
-- both sides, each against quadrature along the deformed contour within its estimate, with
-- a non-constant amplitude (1 + t/3); no jump (second difference, as above).
function TestCuspContinuity:test_across_a_fold()
  local tt, ll, yy = steep.var "t", steep.param "l", steep.param "y"
  local J = steep.integral { var = tt, exponent = I * (ll * (tt ^ 4 / 4 - tt ^ 2 / 2) + yy * tt),
    amplitude = 1 + tt / 3, contour = steep.line(steep.inf(pi), steep.inf(0)), large = ll }
  local yc = 2 * 10 / (3 * math.sqrt(3))
  local values = {}
  for _, dy in ipairs({ -0.3, -0.01, -1e-4, 1e-4, 0.01, 0.3 }) do
    local msg = string.format("y = y_c %+g", dy)
    local r = J:expand { l = 10, y = yc + dy, order = 3 }
    local q, qe, info = J:quad { l = 10, y = yc + dy }
    lu.assertEquals(info.status, "ok", msg .. ": quadrature")
    local parts, kinds = cusp_parts(r)
    lu.assertEquals(#parts, 1, msg .. ": the cusp form (" .. kinds .. ")")
    lu.assertEquals(r.status, "estimated", msg)
    within(r, q, qe, msg)
    values[dy] = r
  end
  -- (the midpoint by quadrature: y_c itself has a saddle of order 3, outside the cusp form)
  local qm = J:quad { l = 10, y = yc }
  local second = cabs(values[1e-4].value + values[-1e-4].value - 2 * qm)
  local curvature = cabs(values[0.01].value + values[-0.01].value - 2 * qm) / 1e-4
  local allowed = 3 * curvature * 1e-8 + values[1e-4].error + values[-1e-4].error
  lu.assertTrue(second <= allowed, string.format("no jump at the fold: second difference "
    .. "%.3g, allowed %.3g", second, allowed))
end

---------------------------------------------------------------------------------------

TestCuspGeneral = {}

-- A non-quartic exponent and a non-constant amplitude: F = i l (t^4/4 - a t^2/2 + t/20 +
-- t^5/20), g = cos t + t. The quintic term bends the map (and adds a fourth saddle near
-- t = -4 that the real line passes through: a plain contribution of its own). Against
-- quadrature along the deformed contour within the estimate, for 1, 2 and 4 terms. At
-- l = 10 the three saddles near 0 are in one contribution and the higher terms work (four
-- terms at least 1e4 times closer than one); at l = 40 and a = 1 they are too far apart
-- (|F_j - F_k| above the pair form's scale) and the plain and pair forms take them.
function TestCuspGeneral:test_quintic_with_amplitude()
  local tt, ll, a = steep.var "t", steep.param "l", steep.param "a"
  local J = steep.integral { var = tt,
    exponent = I * ll * (tt ^ 4 / 4 - a * tt ^ 2 / 2 + tt / 20 + tt ^ 5 / 20),
    amplitude = steep.cos(tt) + tt, contour = steep.line(steep.inf(pi), steep.inf(0)), large = ll }
  for _, lv in ipairs({ 10, 40 }) do
    for _, av in ipairs({ 1, 0.3, 0.01, 0, -0.01, -0.3, -1 }) do
      local q, qe, info = J:quad { l = lv, a = av }
      local msg = string.format("l = %g, a = %g", lv, av)
      lu.assertEquals(info.status, "ok", msg .. ": quadrature")
      local d = {}
      for _, order in ipairs({ 1, 2, 4 }) do
        local r = J:expand { l = lv, a = av, order = order }
        local m = msg .. ", order " .. order
        local parts, kinds = cusp_parts(r)
        if lv == 10 then lu.assertEquals(#parts, 1, m .. ": the cusp form (" .. kinds .. ")") end
        lu.assertEquals(r.status, "estimated", m)
        d[order] = within(r, q, qe, m)
      end
      if lv == 10 then
        lu.assertTrue(d[4] <= 1e-4 * d[1], string.format("%s: four terms (%.3g) against one "
          .. "(%.3g)", msg, d[4], d[1]))
      end
    end
  end
end

-- Real data on the real line, the rule rather than the exception: exp(-l (t^4/4 - a t^2/2
-- + y t)) / (1 + t^2/9). For a > 0 the three saddles are real with real F: on a Stokes
-- line, with a genuine jump of the middle saddle's weight at y != 0 (the decomposition
-- takes the two sides' mean); the cusp form takes the three together, so nothing is left
-- unsettled. Against quadrature along the real line itself (independent of any
-- deformation), within the estimate, and not suspect.
function TestCuspGeneral:test_real_laplace_type_on_a_stokes_line()
  local tt, ll, a, yy = steep.var "t", steep.param "l", steep.param "a", steep.param "y"
  local J = steep.integral { var = tt, exponent = -ll * (tt ^ 4 / 4 - a * tt ^ 2 / 2 + yy * tt),
    amplitude = 1 / (1 + tt ^ 2 / 9), contour = steep.line(steep.inf(pi), steep.inf(0)),
    large = ll }
  for _, lv in ipairs({ 4, 10 }) do
    for _, av in ipairs({ 1, 0.3, -0.3 }) do
      for _, yv in ipairs({ 0, 0.05 }) do
        local msg = string.format("l = %g, a = %g, y = %g", lv, av, yv)
        local q, qe, info = J:quad { l = lv, a = av, y = yv, along = "given" }
        lu.assertEquals(info.status, "ok", msg .. ": quadrature")
        local r = J:expand { l = lv, a = av, y = yv, order = 4 }
        local parts, kinds = cusp_parts(r)
        lu.assertEquals(#parts, 1, msg .. ": the cusp form (" .. kinds .. ")")
        lu.assertEquals(r.status, "estimated", msg)
        within(r, q, qe, msg)
      end
    end
  end
end

-- Where the cusp form cannot be built it says so and the other forms take the saddles: a
-- pole of the amplitude among three saddles close together (exp(-t^4/5 - 0.6 t^2 +
-- 1.25 i x t) / (t - (-0.45 + 0.8i)) at x = +-3: no circle about the three saddles' images
-- gives the amplitude's Taylor coefficients there). The result's notes name the reason;
-- the value (the pole form and plain saddles) lies within its estimate of quadrature along
-- the real line as given.
function TestCuspGeneral:test_falls_back_and_says_so()
  local tt, xx = steep.var "t", steep.param "x"
  local J = steep.integral { var = tt, exponent = -tt ^ 4 / 5 - 0.6 * tt ^ 2 + I * 1.25 * xx * tt,
    amplitude = 1 / (tt - steep.complex(-0.45, 0.8)),
    contour = steep.line(steep.inf(pi), steep.inf(0)), large = xx }
  for _, xv in ipairs({ 3, -3 }) do
    local msg = "x = " .. xv
    local r = J:expand { x = xv, order = 4 }
    local parts = cusp_parts(r)
    lu.assertEquals(#parts, 0, msg)
    local said = false
    for _, n in ipairs(r.notes) do
      if n:find("the cusp form was not used", 1, true) then said = true end
    end
    lu.assertTrue(said, msg .. ": a note says why: " .. table.concat(r.notes, " | "))
    local q, qe, info = J:quad { x = xv, along = "given" }
    lu.assertEquals(info.status, "ok", msg .. ": quadrature")
    within(r, q, qe, msg)
  end
end
