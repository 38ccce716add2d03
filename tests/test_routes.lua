-- Tests of the two routes (lua/steep/routes.lua): J:rescale, J:crossings, J:compare,
-- J:suggest_rescaling and J:sweep, on a family with a pole whose exact value is known
-- through the Faddeeva function (libcerf, tests/ref/gslref.so), on a quartic member of
-- it checked against quadrature along the given contour, and on two coefficient
-- integrals on circles with exact integer answers (Bell numbers, central binomial
-- coefficients) computed here by recurrences in exact big-integer arithmetic.
local lu = require "luaunit"
local H = require "helpers"
local gsl = require "gslref"
local steep = H.steep

local C, I = steep.complex, steep.I
local pi = math.pi
local t, x, s = steep.var "t", steep.param "x", steep.var "s"

local function cabs(z) return type(z) == "number" and math.abs(z) or z:abs() end
local function cx(v) return steep.is_complex(v) and v or C(v, 0) end

---------------------------------------------------------------------------------------
-- The family: a Gaussian with a linear term of size x and a simple pole off the axis.
--
--   J(x) = int_{-inf}^{inf} exp(-A t^2/2 + i B x t) / (t - P) dt,  A = 1.6, B = 1.25,
--   P = -0.45 + 0.8i (a second pole P2 = 0.3 - 0.7i below the axis for the other branch).
--
-- The saddle of the exponent is t0 = i B x / A: it moves linearly with x, upwards for
-- x > 0 (past the pole, which then adds its residue) and downwards for x < 0.
---------------------------------------------------------------------------------------

local A, B = 1.6, 1.25
local P = C(-0.45, 0.8)
local P2 = C(0.3, -0.7)
local REAL_LINE = steep.line(steep.inf(pi), steep.inf(0))

local function family(pole)
  return steep.integral { var = t, exponent = -A * t ^ 2 / 2 + I * B * x * t,
    amplitude = 1 / (t - pole), contour = REAL_LINE, large = x }
end

-- w(z) from libcerf as a steep.complex
local function w(z)
  local re, im = gsl.faddeeva_w(z:re(), z:im())   -- libcerf w_of_z
  return C(re, im)
end

-- The exact value of J(x) (x real or complex; beta = B x):
--
-- Complete the square: -A t^2/2 + i beta t = -(A/2)(t - i beta/A)^2 - beta^2/(2A), and
-- put u = sqrt(A/2) (t - i beta/A). Then t - P = sqrt(2/A) (u - q) with
-- q = sqrt(A/2) P - i beta / sqrt(2A), and dt = sqrt(2/A) du, so
--
--   J = exp(-beta^2/(2A)) * int_{Im u = c} exp(-u^2) / (u - q) du,   c = -Re(beta)/sqrt(2A),
--
-- the real t line becoming the horizontal line Im u = c, run left to right.
--
-- DLMF 7.7.2 (number from memory): w(z) = (i/pi) int_R exp(-u^2) / (z - u) du for
-- Im z > 0, that is int_R exp(-u^2) / (u - z) du = i pi w(z). (Note the sign: the
-- integral with 1/(z - u) is -i pi w(z).) The Gaussian decays in every horizontal strip,
-- so a horizontal line may be moved up or down freely as long as it does not pass the
-- pole: for a line below q (Im q > c) the integral equals the one over any line below q,
-- i pi w(q); for a line above q (Im q < c) it equals the one over any line above q,
-- which by u -> -u is -int_R exp(-u^2) / (u - (-q)) du = -i pi w(-q) (Im(-q) > 0).
--
-- Im q > c  <=>  sqrt(A/2) Im P - Re(beta)/sqrt(2A) > -Re(beta)/sqrt(2A)  <=>  Im P > 0:
-- the side is that of the pole from the real t line, whatever x is. Hence
--
--   J = exp(-beta^2/(2A)) *  i pi w(q)    (Im P > 0)
--   J = exp(-beta^2/(2A)) * -i pi w(-q)   (Im P < 0).
--
-- For Im P > 0 and Re beta large, w(q) ~ 2 exp(-q^2) is large and the product is
-- 2 pi i exp(-A P^2/2 + i beta P): the residue term of the pole that the deformation
-- onto the saddle's level crosses.
local function exact(xv, pole)
  local beta = B * cx(xv)
  local q = math.sqrt(A / 2) * pole - I * beta / math.sqrt(2 * A)
  local pre = steep.exp(-beta ^ 2 / (2 * A))
  if pole:im() > 0 then return pre * I * pi * w(q) end
  return -pre * I * pi * w(-q)
end

-- the residue of the integrand at the pole: exp(-A P^2/2 + i B x P)
local function residue(xv, pole) return steep.exp(-A * pole ^ 2 / 2 + I * B * cx(xv) * pole) end

---------------------------------------------------------------------------------------

TestRoutesFaddeevaReference = {}

-- The reference itself: w(0) = 1 and w(iy) = exp(y^2) erfc(y) (DLMF 7.2.3 with z = iy:
-- w(z) = exp(-z^2) erfc(-iz)), erfc from GSL (gsl_sf_erfc_e); and the reflection
-- w(-z) = 2 exp(-z^2) - w(z) (DLMF 7.4.3, number from memory), which the family's
-- lower-pole branch relies on.
function TestRoutesFaddeevaReference:test_faddeeva_w()
  local re, im = gsl.faddeeva_w(0, 0)
  lu.assertEquals(re, 1, "Re w(0)")
  lu.assertEquals(im, 0, "Im w(0)")
  for _, y in ipairs({ 0.1, 0.5, 1, 2, 5, 12 }) do
    local wr, wi = gsl.faddeeva_w(0, y)
    local e = gsl.erfc(y)                       -- gsl_sf_erfc_e
    H.close(wr, math.exp(y * y) * e, 1e-12, "w(" .. y .. "i)")
    lu.assertTrue(math.abs(wi) <= 1e-15 * wr, "w(iy) is real")
  end
  for _, z in ipairs({ C(0.7, 0.4), C(-1.3, 2.1), C(3, -0.5), C(0.2, -2) }) do
    H.close(w(-z), 2 * steep.exp(-z ^ 2) - w(z), 1e-12, "w(-z) for z = " .. tostring(z))
  end
end

---------------------------------------------------------------------------------------

TestRoutesFamily = {}

-- J:quad against the Faddeeva closed form, for x of both signs and both sides of the
-- pole; the real-line quadrature too where the value is not much smaller than the
-- integrand along the line.
function TestRoutesFamily:test_quad_against_faddeeva()
  for _, pole in ipairs({ P, P2 }) do
    local J = family(pole)
    for _, xv in ipairs({ -6, -3, -1, 0.5, 2, 5, 8 }) do
      local msg = string.format("J(%g), pole %s", xv, tostring(pole))
      local v, e, info = J:quad { x = xv }
      local ref = exact(xv, pole)
      lu.assertEquals(info.status, "ok", msg .. ": status")
      H.close(v, ref, 1e-10, msg)
      lu.assertTrue(cabs(v - ref) <= 10 * e + 1e-15 * cabs(ref), msg .. ": error estimate honest")
      if math.abs(xv) <= 2 then
        local g = J:quad { x = xv, along = "given" }
        H.close(g, ref, 1e-10, msg .. " (along the real line)")
      end
    end
  end
end

-- t = x s: the exponent becomes x^2 (-A s^2/2 + i B s), homogeneous of degree 2; the
-- amplitude x/(x s - P) is not a power of x. K is the same integral (held contour: the
-- real s line, run left to right as at x = 4); for x < 0 the real t line runs the other
-- way in s, so K = -J there.
function TestRoutesFamily:test_rescale()
  local J = family(P)
  local K = J:rescale { var = s, t = x * s, at = { x = 4 } }
  lu.assertTrue(K.homogeneity.ok, tostring(K.homogeneity.why))
  H.close(K.homogeneity.power, 2, 1e-9, "degree of homogeneity")
  lu.assertNil(K.homogeneity.amplitude_power, "the amplitude is not a power of x")
  for _, xv in ipairs({ 4, 2.5, 7 }) do
    H.close(K:quad { x = xv }, exact(xv, P), 1e-10, "K(" .. xv .. ") = J")
  end
  for _, xv in ipairs({ -3, -5 }) do
    H.close(K:quad { x = xv }, -exact(xv, P), 1e-10, "K(" .. xv .. ") = -J")
  end
end

-- Without `at`: the real line is two rays from the origin, which t = x s (x > 0) maps onto
-- themselves, so the contour is held as given and the rescaling says for which x (the
-- same integral as above for x > 0: K = J by the closed form). t = x^2 s holds for every
-- real x other than 0; t = x s + 1 moves the origin and needs `at`.
function TestRoutesFamily:test_rescale_default_holding()
  local J = family(P)
  local K = J:rescale { var = s, t = x * s }
  lu.assertStrContains(K.rescaling.holds, "held as given for x > 0")
  lu.assertEquals(K.rescaling.at.x, 1)
  lu.assertEquals(tostring(K.contour), tostring(J.contour))
  for _, xv in ipairs({ 2.5, 7 }) do
    H.close(K:quad { x = xv }, exact(xv, P), 1e-10, "K(" .. xv .. ") = J, held by default")
  end
  local K2 = J:rescale { var = s, t = x ^ 2 * s }
  lu.assertStrContains(K2.rescaling.holds, "for every real x other than 0")
  H.close(K2:quad { x = -3 }, exact(-3, P), 1e-10, "t = x^2 s keeps the orientation at x = -3")
  H.raises({ "rescale: give the parameter values", "moves the origin" }, J.rescale, J,
    { var = s, t = x * s + 1 })
end

-- Along x = 4 -> -4 (16 values, 0 not among them) the rescaled integral meets x = 0:
-- dt/ds = x changes sign (a "rescaling" event) and the pole of K at P/x goes out towards
-- infinity above the contour and comes back below it (a "side change"): both between the
-- two values next to 0. The term a formula derived at x = 4 needs is -2 pi i Res, with
-- Res = exp(-A P^2/2 + i B x P) at the value after the crossing.
function TestRoutesFamily:test_crossings_through_zero()
  local K = family(P):rescale { var = s, t = x * s, at = { x = 4 } }
  local c = K:crossings { x = { from = 4, to = -4, steps = 15 } }
  local function index_of(v)
    for i, u in ipairs(c.values) do if u == v then return i end end
  end
  local side, resc = {}, {}
  for _, e in ipairs(c.events) do
    lu.assertNotEquals(e.kind, "failure", e.text)
    if e.kind == "side change" then side[#side + 1] = e end
    if e.kind == "rescaling" then resc[#resc + 1] = e end
  end
  lu.assertEquals(#side, 1, c:report())
  lu.assertEquals(#resc, 1, c:report())
  local e = side[1]
  lu.assertTrue(e.from_at > 0 and e.at < 0, "the side change brackets 0: " .. e.text)
  lu.assertTrue(e.from_at - e.at <= 8 / 15 + 1e-12, "between neighbouring values")
  lu.assertEquals(e.before, "left")
  lu.assertEquals(e.after, "right")
  H.close(e.term, -2 * pi * I * residue(e.at, P), 1e-8, "the residue term at x = " .. e.at)
  local r = resc[1]
  local k = index_of(r.at)
  lu.assertTrue(k and k > 1, "the rescaling event is at a value of the path")
  lu.assertTrue(c.values[k - 1] > 0 and r.at < 0, "dt/ds passes through zero between "
    .. c.values[k - 1] .. " and " .. r.at)
end

-- crossings looks for singularities in a disc of radius 20 (times the contour's scale).
-- At |x| = 8 the integrand of K is beyond the double range on most of that disc (|F| up
-- to 64 * 0.8 * 400), yet the pole at P/x, well inside, must be found with its residue.
function TestRoutesFamily:test_pole_found_where_the_disc_overflows()
  local K = family(P):rescale { var = s, t = x * s, at = { x = 4 } }
  for _, xv in ipairs({ 8, -8, 20 }) do
    local L = K:landscape { x = xv, region = { center = 0, radius = 20 }, paths = false }
    local msg = "x = " .. xv
    lu.assertEquals(#L.singularities, 1, msg .. ": " .. L:report())
    local sg = L.singularities[1]
    lu.assertEquals(sg.kind, "pole", msg)
    H.close(sg.at, P / xv, 1e-12, msg .. ": position")
    H.close(sg.residue, residue(xv, P), 1e-8, msg .. ": residue")
  end
end

-- The two routes against quadrature (and quadrature against the closed form) for x of
-- both signs, |x| >= 3. The rescaled formula derived at x = 8 keeps the residue term of
-- the pole it had there; after the pole changes side between 3 and -3 that term is
-- wrong (the pole's residue is then exponentially large: exp(B |x| Im P)). The rescaling
-- t = x s is singular at x = 0, where the pole goes through infinity with the whole
-- s-plane: no residue term carries the formula across that, and the formula derived
-- afresh at x = -3 agrees.
function TestRoutesFamily:test_compare()
  local J = family(P)
  local values = { 8, 5, 3, -3, -5, -8 }
  local cmp = J:compare { x = values, order = 4, rescale = { var = s, t = x * s } }
  lu.assertEquals(#cmp.rows, #values)
  for i, row in ipairs(cmp.rows) do
    local msg = "x = " .. row.x .. "\n" .. cmp:report()
    lu.assertEquals(row.x, values[i])
    H.close(row.quad, exact(row.x, P), 1e-10, "quadrature at x = " .. row.x)
    lu.assertTrue(row.unrescaled_ok, "unrescaled route: " .. msg)
    lu.assertTrue(row.rescaled_ok, "rescaled route on the held contour: " .. msg)
    if row.x > 0 then
      lu.assertTrue(row.corrected_ok, "corrected rescaled formula: " .. msg)
      lu.assertTrue(row.formula_ok, "before the crossing the formula needs no correction: " .. msg)
      lu.assertEquals(row.orientation, 1, msg)
    else
      lu.assertFalse(row.formula_ok, "after the crossing the uncorrected formula must fail: "
        .. msg)
      lu.assertEquals(row.orientation, -1, msg)
      lu.assertNil(row.corrected, "no crossing term across the singular rescaling: " .. msg)
      lu.assertEquals(row.fresh_from, -3, msg)
      lu.assertTrue(row.fresh_ok, "the formula derived afresh at x = -3: " .. msg)
      -- the old formula's error is its residue term: 2 pi i Res with the held contour's
      -- orientation (-1) applied, -2 pi i Res (its residue at the pole, exact)
      H.close(row.formula - row.fresh, -2 * pi * I * residue(row.x, P), 1e-8,
        "the old formula's extra term at x = " .. row.x)
    end
  end
end

---------------------------------------------------------------------------------------
-- The quartic member: exponent -t^4/5 - 0.6 t^2 + i B x t, the same pole. No closed
-- form: the reference is quadrature along the real line as given (J:quad{along =
-- "given"}), where the values chosen are not much smaller than the integrand on the line.
---------------------------------------------------------------------------------------

TestRoutesQuartic = {}

local function quartic()
  return steep.integral { var = t, exponent = -t ^ 4 / 5 - 0.6 * t ^ 2 + I * B * x * t,
    amplitude = 1 / (t - P), contour = REAL_LINE, large = x }
end

local QUARTIC_X = { 6, 4.5, 3, -3, -4.5, -6 }

function TestRoutesQuartic:test_expand_against_given_contour()
  local J = quartic()
  local rel = {}
  for _, xv in ipairs(QUARTIC_X) do
    local msg = "x = " .. xv
    local g, ge, gi = J:quad { x = xv, along = "given" }
    lu.assertEquals(gi.status, "ok", msg)
    lu.assertTrue(ge <= 1e-9 * cabs(g), msg .. ": the reference is accurate")
    local r = J:expand { x = xv, order = 4 }
    lu.assertTrue(cabs(r.value - g) <= r.error + ge, string.format("%s: expansion %s, "
      .. "quadrature %s, |difference| %.3g > %.3g + %.3g", msg, tostring(r.value),
      tostring(g), cabs(r.value - g), r.error, ge))
    rel[xv] = cabs(r.value - g) / cabs(g)
  end
  -- the expansion improves as |x| grows, on each side
  lu.assertTrue(rel[6] < rel[4.5] and rel[4.5] < rel[3], "x > 0")
  lu.assertTrue(rel[-6] < rel[-3], "x < 0")
end

function TestRoutesQuartic:test_compare()
  local J = quartic()
  local cmp = J:compare { x = QUARTIC_X, order = 4, rescale = { var = s, t = x * s } }
  for _, row in ipairs(cmp.rows) do
    local msg = "x = " .. row.x .. "\n" .. cmp:report()
    local g, ge = J:quad { x = row.x, along = "given" }
    lu.assertTrue(cabs(row.quad - g) <= row.quad_error + ge, "deformed and given "
      .. "quadrature agree: " .. msg)
    lu.assertTrue(cabs(row.unrescaled - g) <= row.unrescaled_error + ge,
      "unrescaled: " .. msg)
    local formula = row.corrected or row.fresh
    local ferr = row.corrected_error or row.fresh_error
    lu.assertTrue(cabs(formula - g) <= ferr + ge, "corrected or fresh: " .. msg)
    lu.assertTrue(row.unrescaled_ok and (row.corrected_ok or row.fresh_ok), msg)
    if row.x < 0 then
      lu.assertFalse(row.formula_ok, "after the crossing the uncorrected formula must fail: "
        .. msg)
      lu.assertTrue(cabs(row.formula - g) > 3 * (row.formula_error + ge), msg)
    else
      lu.assertTrue(row.formula_ok, msg)
    end
  end
end

---------------------------------------------------------------------------------------
-- Exact big integers (non-negative; little-endian limbs of base 10^7): enough for the
-- recurrences below, which only add, and multiply or divide exactly by small integers.
---------------------------------------------------------------------------------------

local BASE = 10000000

local function big(n) return { n } end

local function big_add(a, b)
  local r, carry = {}, 0
  for i = 1, math.max(#a, #b) do
    local v = (a[i] or 0) + (b[i] or 0) + carry
    r[i], carry = v % BASE, v // BASE
  end
  if carry > 0 then r[#r + 1] = carry end
  return r
end

local function big_mul(a, m)
  local r, carry = {}, 0
  for i = 1, #a do
    local v = a[i] * m + carry
    r[i], carry = v % BASE, v // BASE
  end
  while carry > 0 do r[#r + 1], carry = carry % BASE, carry // BASE end
  return r
end

-- exact division by a small integer (asserts there is no remainder)
local function big_div(a, m)
  local r, rem = {}, 0
  for i = #a, 1, -1 do
    local v = rem * BASE + a[i]
    r[i], rem = v // m, v % m
  end
  assert(rem == 0, "inexact division")
  while #r > 1 and r[#r] == 0 do r[#r] = nil end
  return r
end

local function big_string(a)
  local parts = { tostring(a[#a]) }
  for i = #a - 1, 1, -1 do parts[#parts + 1] = string.format("%07d", a[i]) end
  return table.concat(parts)
end

-- the nearest double (tonumber on the decimal string: correctly rounded by strtod)
local function big_number(a) return tonumber(big_string(a) .. ".0") end

-- Bell numbers by the Bell triangle (Aitken's array; from memory): each row starts with
-- the last entry of the row before, and each next entry adds the entry above-left:
-- B_n is the first entry of row n. Exact (big integers) to n = 60.
local function bell_numbers(nmax)
  local bell, row = { [0] = big(1) }, { big(1) }
  for m = 1, nmax do
    local new = { row[#row] }
    for k = 1, m do new[k + 1] = big_add(new[k], row[k]) end
    bell[m], row = new[1], new
  end
  return bell
end

TestRoutesCounting = {}

-- The exact arithmetic itself: B_10 = 115975, B_20 = 51724158235372 (from memory), and
-- agreement with the same triangle in Lua integers up to B_25 = 4638590332229999353,
-- the last below 2^63 (B_26 ~ 4.96e19 overflows them).
function TestRoutesCounting:test_bell_triangle()
  local bell = bell_numbers(30)
  lu.assertEquals(big_string(bell[10]), "115975")
  lu.assertEquals(big_string(bell[20]), "51724158235372")
  local row, b = { 1 }, { [0] = 1 }
  for m = 1, 25 do
    local new = { row[#row] }
    for k = 1, m do new[k + 1] = new[k] + row[k] end
    b[m], row = new[1], new
  end
  for m = 0, 25 do lu.assertEquals(big_string(bell[m]), tostring(b[m]), "B_" .. m) end
  lu.assertEquals(b[25], 4638590332229999353)
  lu.assertTrue(big_number(bell[26]) > 2 ^ 63)
end

-- B_n = n!/(2 pi i e) oint exp(e^z) z^(-n-1) dz (Flajolet & Sedgewick 2009, ch. VIII):
-- the exponent e^z - (n+1) log z on the circle through its saddle, radius r with
-- r e^r = n + 1. The unrescaled route (J:expand, 4 terms); n! from GSL's gamma.
function TestRoutesCounting:test_bell_numbers()
  local z, n = steep.var "z", steep.param "n"
  local bell = bell_numbers(60)
  local prev = math.huge
  for nv = 10, 60, 10 do
    local r = math.log(nv + 1)      -- r e^r = n + 1 by Newton's method
    for _ = 1, 60 do r = r - (r * math.exp(r) - (nv + 1)) / (math.exp(r) * (r + 1)) end
    H.close(r * math.exp(r), nv + 1, 1e-14, "saddle radius")
    local J = steep.integral { var = z, exponent = steep.exp(z) - (n + 1) * steep.log(z),
      contour = steep.circle(0, r), large = n }
    local res = J:expand { n = nv, order = 4 }
    local factor = gsl.gamma(nv + 1) / (2 * pi * I * math.exp(1))   -- gsl_sf_gamma_e
    local v, err = res.value * factor, res.error * cabs(factor)
    local want = big_number(bell[nv])
    local d = cabs(v - want)
    local msg = string.format("B_%d: expansion %s, exact %s, |difference| %.3g, reported "
      .. "error %.3g", nv, tostring(v), big_string(bell[nv]), d, err)
    lu.assertTrue(d <= err, msg)
    lu.assertTrue(d / want < prev, msg .. ": the relative error falls as n grows")
    prev = d / want
  end
  lu.assertTrue(prev < 1e-8, "B_60 to better than 1e-8")
end

-- C(2n, n) = (1/2 pi i) oint (1 + z)^(2n) z^(-n-1) dz on the unit circle, in the
-- standard form: exponent n phi(z), phi = 2 log(1 + z) - log z, amplitude 1/z. One
-- series (6 terms, coefficients fixed once), evaluated for n = 5..200 against exact
-- values from C(2n+2, n+1) = C(2n, n) * 2 (2n + 1)/(n + 1) in big integers (beyond
-- C(66, 33) they exceed 2^63).
function TestRoutesCounting:test_central_binomial()
  local z, n = steep.var "z", steep.param "n"
  local J = steep.integral { var = z, exponent = n * (2 * steep.log(1 + z) - steep.log(z)),
    amplitude = 1 / z, contour = steep.circle(0, 1), large = n }
  local ser = J:series { order = 6 }
  lu.assertEquals(#ser, 1, "one saddle, at z = 1")
  local c = ser[1]
  H.close(c.at, 1, 1e-12, "saddle")
  H.close(c.phi, 2 * math.log(2), 1e-14, "phi(1) = log 4")
  -- C(2n, n) ~ 4^n / sqrt(pi n) (1 - 1/(8n) + 1/(128 n^2) + 5/(1024 n^3) - 21/(32768 n^4)
  -- - 399/(262144 n^5) + ...) (the standard expansion; from memory), times 2 pi i here
  H.close(c.coefficients[1], 2 * I * math.sqrt(pi), 1e-12, "leading coefficient 2i sqrt(pi)")
  local ratios = { 1, -1 / 8, 1 / 128, 5 / 1024, -21 / 32768, -399 / 262144 }
  for k, want in ipairs(ratios) do
    H.close(c.coefficients[k] / c.coefficients[1], want, 1e-10, "coefficient " .. k)
    H.close(c.powers[k], k - 0.5, 1e-15, "power " .. k)
  end
  local cb = big(1)
  local rel = {}
  for nv = 1, 200 do
    cb = big_div(big_mul(cb, 2 * (2 * nv - 1)), nv)    -- C(2n, n) from C(2n-2, n-1)
    if nv == 10 then lu.assertEquals(big_string(cb), "184756") end         -- from memory
    if nv == 20 then lu.assertEquals(big_string(cb), "137846528820") end   -- from memory
    if nv >= 5 then
      local v = c:value(nv) / (2 * pi * I)
      local want = big_number(cb)
      rel[nv] = cabs(v - want) / want
      -- exp(n phi) carries a rounding error of about n phi u (u = 2^-53) however it is
      -- computed: the floor below which the error cannot fall
      local floor = 16 * nv * 2 * math.log(2) * 2 ^ -53
      lu.assertTrue(rel[nv] <= 2 * rel[5] * (5 / nv) ^ 6 + floor, string.format("n = %d: "
        .. "relative error %.3g, above %.3g (n^-6 from n = 5) + %.3g (rounding)", nv,
        rel[nv], 2 * rel[5] * (5 / nv) ^ 6, floor))
    end
  end
  for nv = 6, 40 do
    lu.assertTrue(rel[nv] < rel[nv - 1], string.format("error falls: n = %d: %.3g, n = %d: %.3g",
      nv - 1, rel[nv - 1], nv, rel[nv]))
  end
end

---------------------------------------------------------------------------------------

TestRoutesSuggest = {}

-- The saddle i B x / A moves linearly: t = x^1 s.
function TestRoutesSuggest:test_linear_saddle()
  local sug = family(P):suggest_rescaling { x = { from = 2, to = 50 } }
  lu.assertEquals(sug.exponent, 1, sug.text)
  H.close(sug.fitted, 1, 1e-6, "fitted exponent")
  lu.assertEquals(sug.fraction, "1/1")
  lu.assertTrue(steep.is_expr(sug.t) and sug.t:depends_on(x) and sug.t:depends_on(sug.var))
  H.close(sug.t:value { x = 7, s = 3 }, 21, 1e-15, "t = x s")
end

---------------------------------------------------------------------------------------

TestRoutesSweep = {}

-- splits a CSV line into fields (quoted fields may hold commas)
local function csv_fields(line)
  local out, i = {}, 1
  while i <= #line + 1 do
    if line:sub(i, i) == '"' then
      local j = line:find('"', i + 1, true)
      out[#out + 1] = line:sub(i + 1, j - 1)
      i = j + 2
    else
      local j = line:find(",", i, true) or (#line + 1)
      out[#out + 1] = line:sub(i, j - 1)
      i = j + 1
    end
  end
  return out
end

local function read_lines(path)
  local f = assert(io.open(path))
  local text = f:read("a")
  f:close()
  local lines = {}
  for l in text:gmatch("([^\n]*)\n") do lines[#lines + 1] = l end
  return text, lines
end

-- Continuation (each step's saddles seed Newton at the next) must give the rows a full
-- search gives: the family over x in [3, 8], and Airy's integral (two saddles that move
-- towards each other, x from 4 down to 0.5). Common practice: continuation is a speed-up,
-- not a different answer.
function TestRoutesSweep:test_continuation_matches_full_search()
  local J = family(P)
  local tt, xx = steep.var "t", steep.param "x"
  local Jai = steep.integral { var = tt, exponent = I * (tt ^ 3 / 3 + xx * tt),
    contour = steep.line(steep.inf(math.pi), steep.inf(0)), large = xx }
  for _, case in ipairs({ { J, { from = 3, to = 8, steps = 24 } },
                          { Jai, { from = 4, to = 0.5, steps = 24 } } }) do
    local on = case[1]:sweep { x = case[2], order = 4, progress = false }
    local off = case[1]:sweep { x = case[2], order = 4, progress = false, continuation = false }
    lu.assertEquals(#on.rows, 25)
    -- the first step searches, the others follow (these families keep their saddles)
    lu.assertEquals(on.rows[1].landscape, "full search")
    lu.assertStrContains(on:report(), "saddles followed from the previous step at 24 values, "
      .. "searched for in the whole region at 1")
    lu.assertStrContains(off:report(), "at 0 values, searched for in the whole region at 25")
    for i, row in ipairs(on.rows) do
      local msg = "x = " .. tostring(row.x)
      lu.assertNil(row.failure, msg)
      if i > 1 then lu.assertEquals(row.landscape, "continued", msg) end
      lu.assertNil(off.rows[i].failure, msg)
      H.close(row.expansion, off.rows[i].expansion, 1e-12, msg .. ": expansion")
      H.close(row.quad, off.rows[i].quad, 1e-12, msg .. ": quadrature")
      lu.assertTrue(row.agrees, msg .. ": expansion and quadrature agree")
    end
  end
end

function TestRoutesSweep:test_csv_and_shards()
  local J = family(P)
  local values = { 3, 4.5, -3, -5, C(3, 1), C(-4, 0.5), 6 }
  local all, s1, s2 = os.tmpname(), os.tmpname(), os.tmpname()
  local ok, err = pcall(function()
    local sw = J:sweep { x = values, order = 4, csv = all }
    lu.assertEquals(#sw.rows, #values)
    for i, row in ipairs(sw.rows) do
      local msg = "x = " .. tostring(row.x)
      lu.assertNil(row.failure, msg)
      lu.assertEquals(tostring(row.x), tostring(values[i]), msg)
      lu.assertTrue(type(row.valleys) == "string" and #row.valleys > 0, msg .. ": valleys recorded")
      lu.assertTrue(row.agrees, msg)
      H.close(row.quad, exact(row.x, P), 1e-10, msg .. ": quadrature (complex x too)")
    end
    local text, lines = read_lines(all)
    lu.assertEquals(#lines, 1 + #values, "a header and one line per value")
    local header = csv_fields(lines[1])
    lu.assertEquals(header[1], "x_re")
    lu.assertEquals(header[2], "x_im")
    for i = 2, #lines do
      local f = csv_fields(lines[i])
      lu.assertEquals(#f, #header, "line " .. i .. " has as many fields as the header: "
        .. lines[i])
      local xv = cx(values[i - 1])
      lu.assertEquals(tonumber(f[1]), xv:re())
      lu.assertEquals(tonumber(f[2]), xv:im())
      local col = {}
      for k, name in ipairs(header) do col[name] = f[k] end
      H.close(C(tonumber(col.quad_re), tonumber(col.quad_im)), sw.rows[i - 1].quad, 1e-16,
        "CSV quadrature column")
      lu.assertEquals(tonumber(col.error), sw.rows[i - 1].error)
      lu.assertEquals(col.valleys, sw.rows[i - 1].valleys)
    end
    -- shards: contiguous blocks, only the first with the header
    J:sweep { x = values, order = 4, csv = s1, shard = { 1, 2 } }
    J:sweep { x = values, order = 4, csv = s2, shard = { 2, 2 } }
    local t1 = read_lines(s1)
    local t2 = read_lines(s2)
    lu.assertEquals(t1 .. t2, text, "shards 1/2 and 2/2 concatenated = the whole sweep")
  end)
  os.remove(all)
  os.remove(s1)
  os.remove(s2)
  if not ok then error(err, 0) end
end

-- Shards partition every list: for N = 1..500 values and n = 1..N shards, the blocks of
-- shards 1..n are contiguous, in order, and cover 1..N exactly once (exact integers;
-- the blocks were computed in floating point once, and 649 (N, n) pairs with N <= 200
-- lost a value at a block edge).
function TestRoutesSweep:test_shards_partition_every_list()
  local shard_range = require("steep.sweep").shard_range
  for N = 1, 500 do
    for n = 1, N do
      local next_first = 1
      for k = 1, n do
        local first, last = shard_range(N, k, n)
        if first ~= next_first or last < first - 1 then
          lu.fail(string.format("N = %d, n = %d: shard %d is %d..%d, expected to start at %d",
            N, n, k, first, last, next_first))
        end
        next_first = last + 1
      end
      if next_first ~= N + 1 then
        lu.fail(string.format("N = %d, n = %d: the shards end at %d", N, n, next_first - 1))
      end
    end
  end
  -- through J:sweep: 15 values in 11 shards, every value computed exactly once
  local J = steep.integral { var = t, exponent = -x * t ^ 2, contour = REAL_LINE, large = x }
  local values = {}
  for k = 1, 15 do values[k] = 1 + k / 4 end
  local seen = {}
  for k = 1, 11 do
    local sw = J:sweep { x = values, order = 1, shard = { k, 11 }, progress = false }
    for _, row in ipairs(sw.rows) do
      lu.assertNil(seen[row.x], "value " .. row.x .. " in two shards")
      seen[row.x] = k
      -- int exp(-x t^2) dt = sqrt(pi/x) (exact)
      H.close(row.quad, math.sqrt(pi / row.x), 1e-12, "shard row x = " .. row.x)
    end
  end
  for _, v in ipairs(values) do lu.assertNotNil(seen[v], "value " .. v .. " in no shard") end
end

-- Failed rows: the status says "incomplete" with the count (a failed allocation used to
-- leave "complete"), and the CSV leaves their fields empty (agrees was written "nil").
function TestRoutesSweep:test_failed_rows()
  local J = steep.integral { var = t, exponent = -x * t ^ 2, contour = REAL_LINE, large = x }
  local ok = J:sweep { x = { 2, 3 }, order = 1, progress = false }
  lu.assertEquals(ok.status, "complete")
  -- the landscape step of x = 3 fails as a failed allocation does in Lua
  local landscape_method = J._landscape
  J._landscape = function(self, p, ...)
    if p.x == 3 then error("not enough memory", 0) end
    return landscape_method(self, p, ...)
  end
  local sw = J:sweep { x = { 2, 3, 4 }, order = 1, progress = false }
  J._landscape = nil
  lu.assertEquals(sw.rows[2].failure, "not enough memory")
  lu.assertEquals(sw.status, "incomplete: 1 of 3 rows failed (first at 3: not enough memory)")
  lu.assertStrContains(sw:report(), "status: incomplete: 1 of 3 rows failed")
  -- x = 0 and -1: the ends of the real line in no valley (the integral diverges)
  local bad_rows = J:sweep { x = { 2, 0, -1 }, order = 1, progress = false }
  lu.assertStrContains(bad_rows.status, "incomplete: 2 of 3 rows failed (first at 0:")
  local lines = {}
  for l in bad_rows:csv():gmatch("([^\n]*)\n") do lines[#lines + 1] = l end
  local header = csv_fields(lines[1])
  local col = {}
  for k, name in ipairs(header) do col[name] = k end
  lu.assertEquals(csv_fields(lines[2])[col.agrees], "true")
  lu.assertEquals(csv_fields(lines[2])[col.stokes], "false")
  for i = 3, 4 do
    local f = csv_fields(lines[i])
    lu.assertEquals(#f, #header, lines[i])
    lu.assertEquals(f[col.agrees], "", "a failed row's agrees field is empty: " .. lines[i])
    lu.assertEquals(f[col.stokes], "", "a failed row's stokes field is empty")
    lu.assertStrContains(f[col.failure], "outside every valley")
  end
  -- the time budget: rows left out are counted apart from failed ones
  local b = J:sweep { x = { from = 2, to = 4, steps = 400 }, order = 1, budget = 1e-3, progress = false }
  lu.assertStrContains(b.status, "rows not computed (time budget of 0.001 s reached)")
end

-- Progress with stderr going to a file (a log): lines, no carriage returns, a last line
-- with the count. A separate lua5.4 runs the sweep (its stderr redirected).
function TestRoutesSweep:test_progress_in_a_log()
  local root = debug.getinfo(1, "S").source:match("^@(.*)/tests/test_routes%.lua$") or "."
  local script, log = os.tmpname(), os.tmpname()
  local f = assert(io.open(script, "w"))
  f:write(string.format([[
package.path = %q .. "/lua/?.lua;" .. %q .. "/lua/?/init.lua;" .. package.path
package.cpath = %q
local steep = require "steep"
local t, x = steep.var "t", steep.param "x"
local J = steep.integral { var = t, exponent = -x * t ^ 2,
  contour = steep.line(steep.inf(math.pi), steep.inf(0)), large = x }
local sw = J:sweep { x = { from = 1, to = 3, steps = 24 }, order = 1, progress = true }
print(#sw.rows, sw.status)
]], root, root, package.cpath))
  f:close()
  local lua = arg and arg[-1] or "lua5.4"
  local p = assert(io.popen(string.format("%s %s 2>%s", lua, script, log)))
  local out = p:read("a")
  p:close()
  local g = assert(io.open(log))
  local err = g:read("a")
  g:close()
  os.remove(script)
  os.remove(log)
  lu.assertEquals(out, "25\tcomplete\n")
  lu.assertNil(err:find("\r", 1, true), "no carriage return in the log: " .. err)
  lu.assertStrContains(err, "sweep: 25/25 values done in ")
  for line in err:gmatch("([^\n]*)\n") do
    lu.assertTrue(line:match("^sweep: %d+/25 values") ~= nil, "a progress line: " .. line)
  end
end

---------------------------------------------------------------------------------------

TestRoutesBadInput = {}

function TestRoutesBadInput:test_rescale_errors()
  local J = family(P)
  H.raises({ "rescale", "not invertible", "x = 0" }, J.rescale, J,
    { var = s, t = x * s, at = { x = 0 } })
  H.raises({ "rescale", "not invertible" }, J.rescale, J,
    { var = s, t = (x - x) * s + 1, at = { x = 2 } })
  -- 0*s folds to 0: t = 1 does not involve s at all
  H.raises({ "rescale", "must be an expression in s" }, J.rescale, J,
    { var = s, t = 0 * s + 1, at = { x = 2 } })
  local u = steep.var "u"
  H.raises({ "rescale", "names the variable 'u'" }, J.rescale, J,
    { var = s, t = x * s + u, at = { x = 2 } })
  -- a variable that shares its name with the parameter x is still a variable
  H.raises({ "rescale", "names the variable 'x'" }, J.rescale, J,
    { var = s, t = steep.var "x" * s, at = { x = 2 } })
  H.raises({ "rescale", "not affine" }, J.rescale, J, { var = s, t = s ^ 2, at = { x = 2 } })
  H.raises({ "rescale", "must differ" }, J.rescale, J, { var = t, t = 2 * t })
end

function TestRoutesBadInput:test_sweep_shard()
  local J = family(P)
  H.raises({ "sweep", "option 'shard' must be {k, n}" }, J.sweep, J,
    { x = { 3, 4 }, shard = { 3, 2 } })
  H.raises({ "sweep", "option 'shard' must be {k, n}", "got {inf, inf}" }, J.sweep, J,
    { x = { 3, 4 }, shard = { math.huge, math.huge } })
end

-- exp(-x A t^2/2 + i B t)/(t - P) along the real line with x = e^(i theta), theta from
-- 0 to pi: the valleys of the Gaussian turn by -theta/2, and past theta = pi/2 the ends of
-- the real line lie in no valley (the integral diverges). crossings reports an "end"
-- event for each end at each such value and goes on (no failure, every value tracked).
function TestRoutesBadInput:test_crossings_end_leaves_valleys()
  local J = steep.integral { var = t, exponent = -x * A * t ^ 2 / 2 + I * B * t,
    amplitude = 1 / (t - P), contour = REAL_LINE, large = x }
  local path, nsteps = {}, 9
  for k = 0, nsteps do path[#path + 1] = steep.exp(C(0, pi * k / nsteps)) end
  local c = J:crossings { x = path }
  lu.assertEquals(#c.track, #path, "every value tracked")
  local ends = {}
  for _, e in ipairs(c.events) do
    lu.assertNotEquals(e.kind, "failure", e.text)
    if e.kind == "end" then
      local th = cx(e.at):arg()
      lu.assertTrue(th > pi / 2, "an end event only past theta = pi/2: " .. e.text)
      ends[#ends + 1] = e
    end
  end
  local past = 0
  for _, v in ipairs(path) do if v:arg() > pi / 2 then past = past + 1 end end
  lu.assertEquals(#ends, 2 * past, c:report())
end

-- Every route compare shows, for poles on both sides and at several heights, against the
-- closed form: a route marked as agreeing lies within its estimate (plus quadrature's),
-- one marked as disagreeing is off beyond it, and a route shown is always marked. The
-- formula continued from its first value had been its saddle part now plus the residues
-- it had then: off by 2 pi i Res wherever a pole had crossed a steepest path but not the
-- held contour (and the formula derived afresh, so off, was left unmarked).
function TestRoutesFamily:test_compare_marks_every_route()
  local values = { 8, 3, 2, 1, 0.5, -0.5, -2, -4 }
  for _, pole in ipairs({ C(1.2, -0.5), C(0.5, 2), C(1.2, 0.5), C(-0.7, 0.3) }) do
    local J = family(pole)
    local cmp = J:compare { x = values, order = 4, rescale = { var = s, t = x * s } }
    for _, row in ipairs(cmp.rows) do
      local want = exact(row.x, pole)
      for _, route in ipairs({ "unrescaled", "rescaled", "formula", "corrected", "fresh" }) do
        local v = row[route]
        if v then
          local msg = string.format("pole %s, x = %g, route %s", tostring(pole), row.x, route)
          local ok = row[route .. "_ok"]
          lu.assertIsBoolean(ok, msg .. ": marked")
          local d = cabs(v - want)
          local bound = (row[route .. "_error"] or 0) + row.quad_error + 1e-12 * cabs(want)
          if ok then
            lu.assertTrue(d <= bound, string.format("%s: %.3g off under %.3g", msg, d, bound))
          end
        end
      end
    end
  end
end

-- A sweep through the value where a pole lies exactly on the steepest path: the
-- expansion is refused there (clearly), but the row keeps its quadrature (it had been
-- lost with the expansion). e^{-t^2 + i x t}/(t - p), p = 0.5 + 2i, on the path Im t =
-- x/2 at x = 4; closed form: with u = t - i x/2 the line Im u = -x/2 lies below
-- q = p - i x/2, so the integral is e^{-x^2/4} i pi w(q) (DLMF 7.7.2, as exact() above).
function TestRoutesFamily:test_sweep_keeps_quadrature_where_expansion_fails()
  local p = C(0.5, 2)
  local J = steep.integral { var = t, exponent = -t ^ 2 + I * x * t, amplitude = 1 / (t - p),
    contour = REAL_LINE, large = x }
  local function closed(xv)
    return steep.exp(-xv * xv / 4) * I * pi * w(p - I * xv / 2)
  end
  local sw = J:sweep { x = { 3.5, 4, 4.5 }, order = 4, progress = false, workers = 1 }
  lu.assertStrContains(sw.status, "1 of 3 rows failed")
  for _, row in ipairs(sw.rows) do
    local want = closed(row.x)
    local msg = "x = " .. row.x
    lu.assertNotNil(row.quad, msg .. ": quadrature kept")
    lu.assertTrue(cabs(row.quad - want) <= row.quad_error + 1e-15, msg .. ": quadrature")
    if row.x == 4 then
      lu.assertStrContains(row.failure, "passes through the pole")
      lu.assertStrContains(sw:report(), "failed (below)")
    else
      lu.assertNil(row.failure, msg)
      lu.assertTrue(cabs(row.expansion - want) <= row.error + 1e-15, msg .. ": expansion")
    end
  end
end
