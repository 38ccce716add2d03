-- Tests of the steep.series type (ext/bind_series.c over ext/series.c): construction,
-- coefficients, arithmetic, powers, elementary functions, composition, reversion,
-- differentiation and integration, printing, and bad input.
local lu = require "luaunit"
local H = require "helpers"
local steep = H.steep

local C, I = steep.complex, steep.I
local series = steep.series

-- Asserts that s has order n and coefficient k equal to want(k) within rtol relative to
-- max(|want(k)|, size(k)) (size optional: the natural size where want(k) may vanish).
local function check(s, n, want, rtol, msg, size)
  lu.assertEquals(s:order(), n, msg .. ": order")
  for k = 0, n do
    H.close(s:coef(k), want(k), rtol, msg .. ", coefficient " .. k, size and size(k))
  end
end

-- The series z + 0 z^2 + ... of order n (the identity map).
local function zed(n)
  local c = { 0, 1 }
  for k = 3, n + 1 do c[k] = 0 end
  return series(c)
end

-- 1/k! by repeated division.
local invfact = { [0] = 1 }
for k = 1, 60 do invfact[k] = invfact[k - 1] / k end

-- Series of the absolute values of the coefficients of a.
local function absseries(a)
  local c = {}
  for k = 0, a:order() do c[k + 1] = a:coef(k):abs() end
  return series(c)
end

local function one(k) return k == 1 and 1 or 0 end

TestSeriesBasics = {}

function TestSeriesBasics:test_construction_and_coefficients()
  local s = series { 1, 2, I, C(1, -1) }
  lu.assertEquals(s:order(), 3)
  lu.assertEquals(#s, 4)
  lu.assertTrue(steep.is_complex(s:coef(0)), "coefficients come back as complex values")
  lu.assertEquals(s:coef(0), C(1, 0))
  lu.assertEquals(s:coef(1), C(2, 0))
  lu.assertEquals(s:coef(2), C(0, 1))
  lu.assertEquals(s:coef(3), C(1, -1))
  local cs = s:coefs()
  lu.assertEquals(#cs, 4)
  lu.assertEquals(cs[3], C(0, 1))
  local z = series { 7 }
  lu.assertEquals(z:order(), 0)
  lu.assertEquals(z:coef(0), C(7, 0))
  -- the largest series: 257 coefficients (order 256)
  local big = {}
  for k = 1, 257 do big[k] = k end
  local b = series(big)
  lu.assertEquals(b:order(), 256)
  lu.assertEquals(b:coef(256), C(257, 0))
end

function TestSeriesBasics:test_tostring()
  lu.assertEquals(tostring(series { 1, 2, 3 }), "1 + 2*z + 3*z^2 + O(z^3)")
  lu.assertEquals(tostring(series { 1, -1 }), "1 - z + O(z^2)")
  lu.assertEquals(tostring(series { 0, 0, -1 }), "-z^2 + O(z^3)")
  lu.assertEquals(tostring(series { -2.5, 0, 1 }), "-2.5 + z^2 + O(z^3)")
  lu.assertEquals(tostring(series { 0 }), "0 + O(z^1)")
  lu.assertEquals(tostring(series { 1, C(1, 2), C(0, -1) }), "1 + (1+2i)*z + (0-1i)*z^2 + O(z^3)")
  lu.assertEquals(tostring(series { 0.5, 1 / 3 }), "0.5 + 0.333333333333333*z + O(z^2)")
end

TestSeriesArithmetic = {}

function TestSeriesArithmetic:test_sum_difference_scaling()
  local s = series { 1, 2, 3 }
  check(s + 1, 2, function(k) return ({ 2, 2, 3 })[k + 1] end, 0, "s + 1")
  check(1 + s, 2, function(k) return ({ 2, 2, 3 })[k + 1] end, 0, "1 + s")
  check(s - 1, 2, function(k) return ({ 0, 2, 3 })[k + 1] end, 0, "s - 1", function() return 1 end)
  check(1 - s, 2, function(k) return ({ 0, -2, -3 })[k + 1] end, 0, "1 - s", function() return 1 end)
  check(-s, 2, function(k) return -(k + 1) end, 0, "-s")
  check(s * 2, 2, function(k) return 2 * (k + 1) end, 0, "s * 2")
  check(I * s, 2, function(k) return I * (k + 1) end, 0, "i * s")
  check(s * I, 2, function(k) return I * (k + 1) end, 0, "s * i")
  check(s / 2, 2, function(k) return (k + 1) / 2 end, 0, "s / 2")
  check(s + series { 1, 1, 1 }, 2, function(k) return k + 2 end, 0, "s + series")
  check(s - s, 2, function() return 0 end, 0, "s - s", function() return 1 end)
end

function TestSeriesArithmetic:test_products_and_quotients()
  -- (1+z)(1-z) = 1 - z^2 (exact)
  check(series { 1, 1, 0, 0 } * series { 1, -1, 0, 0 }, 3, function(k) return ({ 1, 0, -1, 0 })[k + 1] end,
    0, "(1+z)(1-z)", function() return 1 end)
  -- orders differ: the result has the smaller order
  lu.assertEquals((series { 1, 1, 1 } * series { 1, 1 }):order(), 1)
  lu.assertEquals((series { 1, 1, 1 } + series { 1 }):order(), 0)
  -- 1/(1-z) = sum z^k (geometric series, exact)
  check(1 / series { 1, -1, 0, 0, 0, 0, 0, 0, 0, 0, 0 }, 10, function() return 1 end, 0, "1/(1-z)")
  -- (1+z)/(1-z) = 1 + 2 sum_{k>=1} z^k
  local n = 20
  local p, q = { 1, 1 }, { 1, -1 }
  for k = 3, n + 1 do p[k], q[k] = 0, 0 end
  check(series(p) / series(q), n, function(k) return k == 0 and 1 or 2 end, 0, "(1+z)/(1-z)")
  -- 2/s with a complex constant term: s = (1+i)(1 + z) -> 2/s = (1-i) sum (-z)^k
  check(2 / series { C(1, 1), C(1, 1), 0, 0, 0 }, 4, function(k) return C(1, -1) * (-1) ^ k end,
    1e-15, "2/((1+i)(1+z))")
  -- s/s = 1 for a random-looking series
  local s = series { C(0.3, -2), 1.5, C(0, 0.7), -4, C(2, 2) }
  check(s / s, 4, function(k) return k == 0 and 1 or 0 end, 1e-15, "s/s",
    function() return 1 end)
end

function TestSeriesArithmetic:test_powers()
  local onepz = series { 1, 1, 0, 0, 0, 0, 0, 0, 0, 0, 0 }   -- 1 + z, order 10
  -- (1+z)^3 = 1 + 3z + 3z^2 + z^3 (exact)
  check(onepz ^ 3, 10, function(k) return ({ 1, 3, 3, 1 })[k + 1] or 0 end, 0, "(1+z)^3",
    function() return 1 end)
  check(onepz ^ 3.0, 10, function(k) return ({ 1, 3, 3, 1 })[k + 1] or 0 end, 0,
    "(1+z)^3.0 (integral float)", function() return 1 end)
  -- (1+z)^-2 = sum (-1)^k (k+1) z^k (binomial series, DLMF 4.6.7, exact in integers)
  check(onepz ^ -2, 10, function(k) return (-1) ^ k * (k + 1) end, 0, "(1+z)^-2")
  check(onepz ^ 0, 10, function(k) return k == 0 and 1 or 0 end, 0, "(1+z)^0",
    function() return 1 end)
  -- non-integer and complex exponents: sum binom(alpha, k) z^k (DLMF 4.6.7)
  for _, alpha in ipairs({ 0.5, -1 / 3, C(0.5, 1) }) do
    local b = 1
    local want = { [0] = 1 }
    for k = 1, 10 do
      b = b * (alpha - (k - 1)) / k
      want[k] = b
    end
    check(onepz ^ alpha, 10, function(k) return want[k] end, 1e-14, "(1+z)^" .. tostring(alpha))
  end
  -- an integer power of a series with zero constant term is fine: z^2
  check(zed(5) ^ 2, 5, function(k) return k == 2 and 1 or 0 end, 0, "z^2", function() return 1 end)
  -- the principal branch at a negative constant term: (-4(1+z))^(1/2) = 2i (1+z)^(1/2)
  local s = series { -4, -4, 0, 0 } ^ 0.5
  check(s, 3, function(k) return C(0, 2) * ({ 1, 0.5, -0.125, 0.0625 })[k + 1] end, 1e-15,
    "(-4 - 4z)^(1/2)")
end

function TestSeriesArithmetic:test_exp_log_sqrt_and_friends()
  local z = zed(20)
  -- exp z = sum z^k/k! (DLMF 4.2.19)
  check(z:exp(), 20, function(k) return invfact[k] end, 1e-15, "exp z")
  check(steep.exp(z), 20, function(k) return invfact[k] end, 1e-15, "steep.exp on a series")
  -- log(1+z) = sum (-1)^(k+1) z^k/k (DLMF 4.6.1)
  check(steep.log(1 + z), 20, function(k) return k == 0 and 0 or (-1) ^ (k + 1) / k end, 1e-15,
    "log(1+z)", function(k) return k == 0 and 1 or 0 end)
  -- sqrt(1+z) = sum binom(1/2, k) z^k (DLMF 4.6.7)
  local b, want = 1, { [0] = 1 }
  for k = 1, 20 do
    b = b * (0.5 - (k - 1)) / k
    want[k] = b
  end
  check(steep.sqrt(1 + z), 20, function(k) return want[k] end, 1e-14, "sqrt(1+z)")
  -- sin z and cos z (DLMF 4.19.1, 4.19.2); atan z (DLMF 4.24.3)
  check(steep.sin(z), 20, function(k) return k % 2 == 1 and (-1) ^ ((k - 1) // 2) * invfact[k] or 0 end,
    1e-15, "sin z", function(k) return invfact[k] end)
  check(steep.cos(z), 20, function(k) return k % 2 == 0 and (-1) ^ (k // 2) * invfact[k] or 0 end,
    1e-15, "cos z", function(k) return invfact[k] end)
  check(steep.atan(z), 20, function(k) return k % 2 == 1 and (-1) ^ ((k - 1) // 2) / k or 0 end,
    1e-15, "atan z", function(k) return 1 / (k + 1) end)
  -- log(exp(s)) = s and exp(log(s)) = s for a series with a complex constant term whose
  -- imaginary part stays inside (-pi, pi) (principal log, DLMF 4.2.3)
  local s = series { C(0.3, 1.1), C(-0.5, 0.2), 0.25, C(0, -0.1), 0.05, 0, 0, 0 }
  check(steep.log(steep.exp(s)), 7, function(k) return s:coef(k) end, 1e-14, "log(exp(s))",
    function() return 1 end)
  check(steep.exp(steep.log(s)), 7, function(k) return s:coef(k) end, 1e-14, "exp(log(s))",
    function() return 1 end)
  -- sinh, cosh, tanh, tan of a series agree with the tape's jets of the same functions
  local t = steep.var("t")
  for _, name in ipairs({ "sinh", "cosh", "tanh", "tan" }) do
    local a = C(0.2, -0.4)
    local viaseries = steep[name](a + zed(12))
    local viajet = steep.taylor(steep[name](t), t, a, 12)
    check(viaseries, 12, function(k) return viajet:coef(k) end, 1e-15, name .. " series vs jet",
      function() return 1e-3 end)
  end
end

TestSeriesCompose = {}

function TestSeriesCompose:test_compose()
  local z = zed(15)
  -- exp(log(1+z)) = 1 + z: the series exp(w) composed with log(1+z)
  check(z:exp():compose(steep.log(1 + z)), 15, function(k) return k <= 1 and 1 or 0 end, 1e-14,
    "exp o log(1+z)", function() return 1 end)
  -- 1/(1-w) o (z + z^2) = 1/(1 - z - z^2) = sum F_{k+1} z^k (Fibonacci generating
  -- function; F_1 = F_2 = 1, F_{k+1} = F_k + F_{k-1}, exact integers)
  local geo = 1 / (1 - z)
  local fib = { [0] = 1, 1 }
  for k = 2, 15 do fib[k] = fib[k - 1] + fib[k - 2] end
  check(geo:compose(z + z * z), 15, function(k) return fib[k] end, 0, "Fibonacci by composition")
  -- the identity map composes neutrally; orders truncate to the smaller one
  local s = series { 1, C(2, 1), -3, 0.5 }
  check(s:compose(zed(3)), 3, function(k) return s:coef(k) end, 0, "s o z",
    function() return 1 end)
  lu.assertEquals(s:compose(zed(2)):order(), 2)
  lu.assertEquals(zed(2):compose(s - 1):order(), 2)
end

TestSeriesRevert = {}

function TestSeriesRevert:test_lambert_w()
  -- W(z), the inverse of w e^w, has [z^n] W = (-n)^(n-1)/n! (Corless, Gonnet, Hare, Jeffrey,
  -- Knuth, "On the Lambert W function", Adv. Comput. Math. 5 (1996) 329-359, eq. (3.1);
  -- equation number from memory).
  local n = 40
  local t = steep.var("t")
  local wew = steep.taylor(t * steep.exp(t), t, 0, n)       -- via a tape jet
  local z = zed(n)
  local wew2 = z * z:exp()                                  -- via series operations
  check(wew2, n, function(k) return wew:coef(k) end, 1e-15, "w e^w two ways",
    function() return 0 end)
  local function want(k)
    if k == 0 then return 0 end
    local v = 1 / k      -- (-k)^(k-1)/k! = (1/k) prod_{j=1}^{k-1} (-k/j)
    for j = 1, k - 1 do v = v * (-k) / j end
    return v
  end
  check(wew:revert(), n, want, 1e-12, "Lambert W", function(k) return k == 0 and 1 or 0 end)
  check(wew2:revert(), n, want, 1e-12, "Lambert W (series ops)",
    function(k) return k == 0 and 1 or 0 end)
end

function TestSeriesRevert:test_catalan_numbers()
  -- y = z - z^2 has the inverse z = (1 - sqrt(1 - 4y))/2 = sum_{n>=0} C_n y^(n+1) with the
  -- Catalan numbers C_n = binom(2n, n)/(n+1); computed here exactly in integers (Pascal's
  -- triangle), C_29 = 1002242216651368 < 2^53.
  local n = 30
  local pascal = { [0] = { [0] = 1 } }
  for r = 1, 2 * n do
    pascal[r] = { [0] = 1, [r] = 1 }
    for c = 1, r - 1 do pascal[r][c] = pascal[r - 1][c - 1] + pascal[r - 1][c] end
  end
  local catalan = {}
  for m = 0, n - 1 do
    local b = pascal[2 * m][m]
    lu.assertEquals(b % (m + 1), 0, "binom(2n,n) divisible by n+1")
    catalan[m] = b // (m + 1)
  end
  lu.assertEquals(catalan[10], 16796)   -- a spot check (C_10 = 16796, from memory)
  local c = { 0, 1, -1 }
  for k = 4, n + 1 do c[k] = 0 end
  local r = series(c):revert()
  -- (as floats: H.close squares its arguments, which wraps for large Lua integers)
  check(r, n, function(k) return k == 0 and 0 or catalan[k - 1] + 0.0 end, 1e-15, "Catalan numbers",
    function(k) return k == 0 and 1 or 0 end)
end

-- Random series a = z + sum_{k>=2} a_k z^k (complex a_k, |a_k| <= sqrt 2 * 2^(2-k)).
local function random_series(rnd, n)
  local c = { 0, 1 }
  for k = 3, n + 1 do
    c[k] = C(2 * rnd() - 1, 2 * rnd() - 1) * 0.5 ^ (k - 2)
  end
  return series(c)
end

function TestSeriesRevert:test_round_trips_on_random_series()
  H.seeded(function(seed)
    local rnd = H.rng(seed)
    local n = 30
    for _ = 1, 10 do
      local a = random_series(rnd, n)
      -- a random linear coefficient too: (b a) has inverse revert(a)(w/b)
      local b = C(0.5 + rnd(), 2 * rnd() - 1)
      local ba = b * a
      local r = ba:revert()
      -- a(r(z)) = z and r(a(z)) = z; each coefficient relative to the same composition on
      -- absolute values (the size of the terms that cancel)
      local size1 = absseries(ba):compose(absseries(r))
      check(ba:compose(r), n, one, 1e-12, "a o revert(a)", function(k) return size1:coef(k):abs() end)
      local size2 = absseries(r):compose(absseries(ba))
      check(r:compose(ba), n, one, 1e-12, "revert(a) o a", function(k) return size2:coef(k):abs() end)
      -- revert(revert(a)) = a, relative to the majorant of the second inversion: with
      -- r = revert(a) (linear coefficient 1), the coefficients of revert(z - sum_{k>=2}
      -- |r_k| z^k) are non-negative and bound those of revert(r) (Cauchy's method of
      -- majorants), so they are the size of the terms that cancel
      local ra = a:revert()
      local m = { 0, 1 }
      for k = 2, n do m[k + 1] = -ra:coef(k):abs() end
      local major = series(m):revert()
      check(ra:revert(), n, function(k) return a:coef(k) end, 1e-12, "revert(revert(a))",
        function(k) return major:coef(k):abs() end)
    end
  end)
end

TestSeriesCalculus = {}

function TestSeriesCalculus:test_deriv_and_integ()
  local s = series { 1, 1, 1, 1, 1 }
  local d = s:deriv()
  check(d, 3, function(k) return k + 1 end, 0, "d/dz sum z^k")
  local i = s:integ()
  check(i, 5, function(k) return k == 0 and 0 or 1 / k end, 1e-16, "integral of sum z^k",
    function(k) return k == 0 and 1 or 0 end)
  -- integ then deriv is the identity; deriv then integ drops the constant term
  local u = series { C(1, 2), -3, C(0, 0.5), 4, 0.25 }
  check(u:integ():deriv(), 4, function(k) return u:coef(k) end, 1e-15, "deriv(integ(u))")
  check(u:deriv():integ(), 4, function(k) return k == 0 and 0 or u:coef(k) end, 1e-15,
    "integ(deriv(u))", function() return 1 end)
  -- integral of 1/(1+z) from 0 is log(1+z) (DLMF 4.6.1)
  local z = zed(20)
  check((1 / (1 + z)):integ(), 21, function(k) return k == 0 and 0 or (-1) ^ (k + 1) / k end,
    1e-15, "integ 1/(1+z)", function(k) return k == 0 and 1 or 0 end)
  -- derivative of exp z is exp z (one order less)
  check(z:exp():deriv(), 19, function(k) return invfact[k] end, 1e-15, "d/dz exp z")
end

TestSeriesErrors = {}

-- A computation that must succeed after an error: (1+z)^2 = 1 + 2z + z^2.
local function still_works()
  check(series { 1, 1, 0 } ^ 2, 2, function(k) return ({ 1, 2, 1 })[k + 1] end, 0,
    "a computation after an error")
end

function TestSeriesErrors:test_revert_preconditions()
  H.raises({ "series revert: the constant term must be zero" }, function()
    return series { 1, 1, 0 }:revert()
  end)
  still_works()
  H.raises({ "series revert: the linear coefficient is zero (not invertible)" }, function()
    return series { 0, 0, 1 }:revert()
  end)
  still_works()
  H.raises({ "series revert: needs order >= 1" }, function() return series { 0 }:revert() end)
  still_works()
end

function TestSeriesErrors:test_division_by_zero_constant_term()
  H.raises({ "series division: the divisor's constant term is zero" }, function()
    return 1 / series { 0, 1, 2 }
  end)
  still_works()
  H.raises({ "series division: the divisor's constant term is zero" }, function()
    return series { 1, 1 } / series { 0, 1 }
  end)
  still_works()
  H.raises({ "series power: the constant term is zero", "negative power" }, function()
    return series { 0, 1 } ^ -1
  end)
  still_works()
  H.raises({ "series power: the constant term is zero", "branch point" }, function()
    return series { 0, 1 } ^ 0.5
  end)
  still_works()
end

function TestSeriesErrors:test_singular_functions()
  H.raises({ "series log: singular at the constant term 0+0i" }, function()
    return series { 0, 1 }:log()
  end)
  still_works()
  H.raises({ "series sqrt: singular at the constant term 0+0i" }, function()
    return steep.sqrt(series { 0, 1 })
  end)
  still_works()
  H.raises({ "series atan: singular at the constant term 0+1i" }, function()
    return series { I, 1 }:atan()
  end)
  still_works()
end

function TestSeriesErrors:test_compose_with_nonzero_inner_constant()
  H.raises({ "inner series must have a zero constant term" }, function()
    return series { 1, 1 }:compose(series { 1, 1 })
  end)
  still_works()
end

function TestSeriesErrors:test_construction_and_range_errors()
  local big = {}
  for k = 1, 258 do big[k] = 0 end
  H.raises({ "expected 1 to 257 coefficients, got 258" }, series, big)
  still_works()
  H.raises({ "expected 1 to 257 coefficients, got 0" }, series, {})
  still_works()
  H.raises({ "coefficient 2 is a string", "number or complex expected" }, series, { 1, "2" })
  still_works()
  H.raises({ "table expected, got number" }, series, 3)
  still_works()
  local s = series { 1, 2, 3 }
  H.raises({ "coefficient 3 outside 0..2" }, s.coef, s, 3)
  H.raises({ "coefficient -1 outside 0..2" }, s.coef, s, -1)
  still_works()
  big[258] = nil
  local top = series(big)
  H.raises({ "series integ: the order would exceed 256" }, top.integ, top)
  still_works()
  H.raises({ "series deriv: a series of order 0 has no known derivative" }, function()
    return series { 5 }:deriv()
  end)
  still_works()
  H.raises({ "series arithmetic with a string" }, function() return s + "x" end)
  H.raises({ "series arithmetic with a nil" }, function() return s * nil end)
  still_works()
end
