-- Tests of torus integrals in several variables (coefficient extraction): the critical
-- point on the positive ray, expansions against exact integers computed here by
-- recurrence in exact arithmetic, iterated quadrature, the recipe
-- recipes/diagonal_coefficients.lua (two routes), and the refusals (a torus that does not
-- pass through the point, a point not alone on its torus, a degenerate critical set).
local lu = require "luaunit"
local H = require "helpers"
local steep = H.steep

local pi, abs = math.pi, math.abs
local x, y, z = steep.var "x", steep.var "y", steep.var "z"
local n = steep.param "n"
local log = steep.log

---------------------------------------------------------------------------------------
-- Exact integers: nonnegative big integers as little-endian lists of base-10^7 limbs.
---------------------------------------------------------------------------------------

local BASE = 10000000

local function big(v) return { v } end

local function mul_small(a, m)   -- a * m, m a positive integer below 2^40
  local out, carry = {}, 0
  for i = 1, #a do
    local t = a[i] * m + carry
    out[i] = t % BASE
    carry = t // BASE
  end
  while carry > 0 do
    out[#out + 1] = carry % BASE
    carry = carry // BASE
  end
  return out
end

local function div_small(a, d)   -- a / d, exact (asserted)
  local out, rem = {}, 0
  for i = #a, 1, -1 do
    local t = rem * BASE + a[i]
    out[i] = t // d
    rem = t % d
  end
  assert(rem == 0, "inexact division")
  while #out > 1 and out[#out] == 0 do out[#out] = nil end
  return out
end

local function add(a, b)
  local out, carry = {}, 0
  for i = 1, math.max(#a, #b) do
    local t = (a[i] or 0) + (b[i] or 0) + carry
    out[i] = t % BASE
    carry = t // BASE
  end
  if carry > 0 then out[#out + 1] = carry end
  return out
end

local function to_float(a)
  local v = 0.0
  for i = #a, 1, -1 do v = v * BASE + a[i] end
  return v
end

-- (3n)!/(n!)^3 by c(n+1) = c(n) (3n+1)(3n+2)(3n+3)/(n+1)^3 (exact: the ratio of
-- factorials), and (4n)!/(n!)^4 likewise.
local function multinomial(m, nmax)
  local c, out = big(1), {}
  for k = 0, nmax - 1 do
    for j = 1, m do c = mul_small(c, m * k + j) end
    for _ = 1, m do c = div_small(c, k + 1) end
    out[k + 1] = c
  end
  return function(k) return to_float(out[k]) end
end

-- binomial(2n, n) likewise; central Delannoy numbers by the lattice-path recurrence
-- D(i, j) = D(i-1, j) + D(i, j-1) + D(i-1, j-1), D(0, j) = D(i, 0) = 1 (the number of
-- paths with steps (1,0), (0,1), (1,1): the coefficients of 1/(1 - x - y - xy)).
local function central_binomial(k) return multinomial(2, k)(k) end

local function delannoy(N)
  local prev = {}
  for j = 0, N do prev[j] = big(1) end
  for _ = 1, N do
    local cur = { [0] = big(1) }
    for j = 1, N do cur[j] = add(add(prev[j], cur[j - 1]), prev[j - 1]) end
    prev = cur
  end
  return to_float(prev[N])
end

TestMultiTorus = {}

function TestMultiTorus:test_exact_integers()
  -- the recurrences against small values computed by hand: (3n)!/(n!)^3 = 1, 6, 90, 1680;
  -- C(2n, n) = 2, 6, 20; D(n) = 3, 13, 63, 321 (by the recurrence on a 4 x 4 grid)
  local m3 = multinomial(3, 3)
  lu.assertEquals({ m3(1), m3(2), m3(3) }, { 6, 90, 1680 })
  lu.assertEquals({ central_binomial(1), central_binomial(2), central_binomial(3) }, { 2, 6, 20 })
  lu.assertEquals({ delannoy(1), delannoy(2), delannoy(3), delannoy(4) }, { 3, 13, 63, 321 })
end

-- [x^n y^n z^n] (1 + x + y + z)^{4n} = (4n)!/(n!)^4 (multinomial theorem): the three-
-- variable torus integral of (1 + x + y + z)^{4n} (x y z)^{-n-1} over |x| = |y| = |z| = 1,
-- through the critical point (1, 1, 1) of 4 log(1 + x + y + z) - log x - log y - log z;
-- n = 10, 50, 100, orders 1 to 4: within the estimate on every cell.
local function four_nomial()
  local c = steep.circle(0, 1)
  return steep.integral { var = { x, y, z },
    exponent = n * (4 * log(1 + x + y + z) - log(x) - log(y) - log(z)),
    amplitude = 1 / (x * y * z), contour = { c, c, c }, large = n }
end

function TestMultiTorus:test_three_variable_torus_orders()
  local J = four_nomial()
  local exact = multinomial(4, 100)
  local norm = (2 * pi * steep.I) ^ 3
  for _, N in ipairs({ 10, 50, 100 }) do
    local want = exact(N)
    local last = math.huge
    for K = 1, 4 do
      local r = J:expand { n = N, order = K }
      lu.assertEquals(#r.contributions, 1)
      lu.assertStrContains(r.contributions[1].kind, "positive ray")
      local got = r.value / norm
      local err = (got - want):abs()
      local est = r.error / norm:abs()
      local msg = string.format("n = %d, order %d: relative error %.3g, estimate %.3g", N, K,
        err / want, est / want)
      lu.assertTrue(err <= est, msg)
      lu.assertTrue(err < last, msg .. ": falls with the order")
      lu.assertTrue(abs(got:im()) <= 1e-14 * want, msg .. ": real")
      last = err
    end
  end
end

-- Iterated quadrature of the same to 1e-8 (n = 3), its estimate bounding its error (at
-- n = 10: 0.4 s; n = 20 takes 2 s and n = 50 15 s, 256 points a circle).
function TestMultiTorus:test_three_variable_quadrature()
  local J = four_nomial()
  local exact = multinomial(4, 10)
  local norm = (2 * pi * steep.I) ^ 3
  for _, N in ipairs({ 10 }) do
    local want = exact(N)
    local v, e, info = J:quad { n = N }
    lu.assertEquals(info.status, "ok")
    local err = (v / norm - want):abs()
    local est = e / norm:abs()
    lu.assertTrue(err <= 1e-8 * want, string.format("n = %d: error %.3g", N, err / want))
    lu.assertTrue(est <= 1e-8 * want, string.format("n = %d: estimate %.3g", N, est / want))
    lu.assertTrue(err <= est, string.format("n = %d: error %.3g > estimate %.3g", N, err / want,
      est / want))
  end
end

-- The homogeneous form [x^n y^n z^n] (x + y + z)^{3n} (x y z)^{-n-1} on the 3-torus is
-- invariant under the diagonal rotation: its critical points form a curve, the Hessian is
-- singular, and the expansion says so.
function TestMultiTorus:test_degenerate_refused()
  local c = steep.circle(0, 1)
  local J = steep.integral { var = { x, y, z },
    exponent = n * (3 * log(x + y + z) - log(x) - log(y) - log(z)),
    amplitude = 1 / (x * y * z), contour = { c, c, c }, large = n }
  H.raises({ "expand", "(1, 1, 1)", "degenerate" }, J.expand, J, { n = 10 })
end

-- (1 + x^2)(1 + y^2) on the torus through (1, 1): the point (-1, 1) has the same
-- |integrand|; the expansion refuses to pick one.
function TestMultiTorus:test_not_alone_on_its_torus()
  local c = steep.circle(0, 1)
  local J = steep.integral { var = { x, y },
    exponent = n * (log(1 + x ^ 2) + log(1 + y ^ 2) - log(x) - log(y)),
    amplitude = 1 / (x * y), contour = { c, c }, large = n }
  H.raises({ "expand", "not the only point of its torus" }, J.expand, J, { n = 10 })
end

-- A torus off the critical point: a clear error naming the radii to use.
function TestMultiTorus:test_torus_off_the_point()
  local c, c2 = steep.circle(0, 1), steep.circle(0, 0.5)
  local J = steep.integral { var = { x, y },
    exponent = n * (3 * log(1 + x + y) - log(x) - log(y)),
    amplitude = 1 / (x * y), contour = { c, c2 }, large = n }
  H.raises({ "expand", "does not pass through the critical point" }, J.expand, J, { n = 10 })
end

---------------------------------------------------------------------------------------
-- The recipe recipes/diagonal_coefficients.lua.
---------------------------------------------------------------------------------------

TestMultiDiagonal = {}

local dg = require "diagonal_coefficients"

-- Central binomial coefficients as the diagonal of 1/(1 - x - y) and central Delannoy
-- numbers as that of 1/(1 - x - y - xy) (exact integers above), n = 10, 50, 200, orders 1
-- to 4: the several-variable route within its estimate, and the one-variable route
-- (residue, then steep.integral{var = x} on a circle) giving the same numbers.
function TestMultiDiagonal:test_bivariate_exact()
  local cases = {
    { name = "binomial", H = 1 - dg.x - dg.y, exact = central_binomial, point = 0.5 },
    { name = "Delannoy", H = 1 - dg.x - dg.y - dg.x * dg.y, exact = delannoy,
      point = math.sqrt(2) - 1 },
  }
  for _, case in ipairs(cases) do
    local D = dg.diagonal { H = case.H }
    H.close(D.point[1], case.point, 1e-14, case.name .. ": the minimal critical point")
    for _, N in ipairs({ 10, 50, 200 }) do
      local want = case.exact(N)
      for K = 1, 4 do
        local v, e = D:expand(N, K)
        local w, f = D:cross(N, K)
        local msg = string.format("%s, n = %d, order %d: relative error %.3g, estimate %.3g",
          case.name, N, K, (v - want):abs() / want, e / want)
        lu.assertTrue((v - want):abs() <= e, msg)
        lu.assertTrue((w - want):abs() <= f, msg .. " (one-variable route)")
        H.close(v, w, 1e-12, msg .. ": the two routes")
      end
    end
  end
end

-- Central multinomial coefficients (3n)!/(n!)^3 = [x^n y^n z^n] (x + y + z)^{3n} =
-- [x^n y^n z^n] 1/(1 - x - y - z) (the multinomial theorem on the geometric series): the
-- recipe's three-variable route (a residue in z, then the two-variable torus integral),
-- n = 10, 50, 200, orders 1 to 4, within the estimate; and at n = 50 the torus integral by
-- iterated quadrature to 1e-10.
function TestMultiDiagonal:test_trivariate_exact()
  local D = dg.diagonal { H = 1 - dg.x - dg.y - dg.z, vars = { dg.x, dg.y, dg.z } }
  H.close(D.point[1], 1 / 3, 1e-14, "the minimal critical point")
  local exact = multinomial(3, 200)
  for _, N in ipairs({ 10, 50, 200 }) do
    local want = exact(N)
    for K = 1, 4 do
      local v, e = D:expand(N, K)
      lu.assertTrue((v - want):abs() <= e, string.format("n = %d, order %d: relative error "
        .. "%.3g, estimate %.3g", N, K, (v - want):abs() / want, e / want))
    end
  end
  local q, qe, info = D:quad(50)
  lu.assertEquals(info.status, "ok")
  local want = exact(50)
  lu.assertTrue((q - want):abs() <= 1e-10 * want, "quadrature error " .. (q - want):abs() / want)
  lu.assertTrue((q - want):abs() <= qe, "quadrature within its estimate")
end

-- The standard form: the coefficients from J:series evaluated at n agree with J:expand.
function TestMultiDiagonal:test_series_form()
  local D = dg.diagonal { H = 1 - dg.x - dg.y - dg.x * dg.y, order = 3 }
  local s, norm = D:series(3)
  for _, N in ipairs({ 20, 80 }) do
    local v = D:expand(N, 3)
    H.close(s:value(N) / norm, v, 1e-12, "series at n = " .. N)
  end
end
