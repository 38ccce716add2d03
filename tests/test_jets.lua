-- Tests of Taylor jets (steep.taylor and tape:jet): every tape operation against known
-- Taylor series at several points, an independent check against finite differences and
-- the Cauchy integral, seeded identities to order 30, the order limits and errors.
local lu = require "luaunit"
local H = require "helpers"
local steep = H.steep

local C, I = steep.complex, steep.I
local t, x = steep.var("t"), steep.param("x")

local function cabs(z) return type(z) == "number" and math.abs(z) or z:abs() end
local function tocomplex(z) return steep.is_complex(z) and z or C(z) end

-- Asserts that series s has order n and coefficient k equal to want(k) within rtol
-- relative to max(|want(k)|, size(k)); size (optional) gives the natural size of the
-- k-th coefficient where want(k) may vanish.
local function check(s, n, want, rtol, msg, size)
  lu.assertEquals(s:order(), n, msg .. ": order")
  for k = 0, n do
    H.close(s:coef(k), want(k), rtol, msg .. ", coefficient " .. k, size and size(k))
  end
end

-- 1/k! for k = 0..300 by repeated division (rounding grows like k ulp; underflows
-- to 0 past k ~ 170).
local invfact = { [0] = 1 }
for k = 1, 300 do invfact[k] = invfact[k - 1] / k end

-- Generalized binomial coefficient binom(a, k) = a(a-1)...(a-k+1)/k! for complex a.
local function binom(a, k)
  local b = 1
  for j = 1, k do b = b * (a - (j - 1)) / j end
  return b
end

-- Tangent numbers T_1..T_n, tan z = sum_k T_k z^(2k-1)/(2k-1)!, by the integer recurrence
-- of Brent & Harvey, "Fast computation of Bernoulli, tangent and secant numbers" (2013),
-- Algorithm TangentNumbers (after Knuth and Buckholtz, Math. Comp. 21 (1967); journal
-- details from memory). The first five are checked against DLMF 4.19.3 below.
local function tangent_numbers(n)
  local T = { 1 }
  for k = 2, n do T[k] = (k - 1) * T[k - 1] end
  for k = 2, n do
    for j = k, n do T[j] = (j - k) * T[j - 1] + (j - k + 2) * T[j] end
  end
  return T
end

-- |A| * |B| (Cauchy product of absolute values), coefficient k: the size of the terms
-- that a product's coefficient k sums.
local function absconv(A, B, k)
  local s = 0
  for j = 0, k do s = s + A:coef(j):abs() * B:coef(k - j):abs() end
  return s
end

-- Majorant of a quotient Q = P/D (P a series or nil for 1): the division recurrence
-- q_k = (p_k - sum_{j>=1} d_j q_{k-j}) / d_0 run on absolute values, k = 0..n.
local function quotient_sizes(P, D, n)
  local q = {}
  for k = 0, n do
    local s = P and P:coef(k):abs() or (k == 0 and 1 or 0)
    for j = 1, k do s = s + D:coef(j):abs() * q[k - j] end
    q[k] = s / D:coef(0):abs()
  end
  return q
end

TestJetsKnownSeries = {}

function TestJetsKnownSeries:test_exp()
  -- e^{a+z} = e^a sum z^k/k! (DLMF 4.2.19 with the addition law)
  for _, a in ipairs({ 0, 1, C(-0.5, 2), C(3, -1) }) do
    local ea = steep.exp(a)
    check(steep.taylor(steep.exp(t), t, a, 30), 30, function(k) return ea * invfact[k] end,
      1e-14, "exp at " .. tostring(a))
  end
  -- exp(x t) at 0 with a parameter: x^k/k!
  local xv = C(0.7, -1.3)
  check(steep.taylor(steep.exp(x * t), t, 0, 25, { x = xv }), 25,
    function(k) return xv ^ k * invfact[k] end, 1e-13, "exp(x t)")
end

function TestJetsKnownSeries:test_log()
  -- log(1+z) = sum (-1)^(k+1) z^k / k (DLMF 4.6.1)
  check(steep.taylor(steep.log(1 + t), t, 0, 40), 40,
    function(k) return k == 0 and 0 or (-1) ^ (k + 1) / k end, 1e-15, "log(1+t) at 0", 
    function(k) return k == 0 and 1 or 0 end)
  -- log(a+z) = Log a + sum (-1)^(k+1) (z/a)^k / k, Log a = ln|a| + i ph a (DLMF 4.2.3)
  for _, a in ipairs({ 2, C(-1, 0.5), C(0.3, -2), C(-3, -1e-3) }) do
    local A = tocomplex(a)
    local loga = C(math.log(A:abs()), A:arg())
    check(steep.taylor(steep.log(t), t, a, 30), 30, function(k)
      if k == 0 then return loga end
      return (-1) ^ (k + 1) / (k * A ^ k)
    end, 1e-13, "log at " .. tostring(a))
  end
end

function TestJetsKnownSeries:test_binomial_series()
  -- (1+z)^alpha = sum binom(alpha, k) z^k (DLMF 4.6.7), through powc
  for _, alpha in ipairs({ 0.5, -1.5, 1 / 3, C(0.5, 2) }) do
    local s = steep.taylor((1 + t) ^ alpha, t, 0, 30)
    check(s, 30, function(k) return binom(alpha, k) end, 1e-13,
      "(1+t)^" .. tostring(alpha))
  end
  -- (a+z)^alpha = a^alpha sum binom(alpha, k) (z/a)^k, a^alpha = exp(alpha Log a)
  -- (principal power)
  for _, a in ipairs({ 4, C(-2, 1), C(0.5, -0.5) }) do
    for _, alpha in ipairs({ 0.5, -2.5, C(-0.25, 1) }) do
      local A = tocomplex(a)
      local aa = steep.exp(alpha * steep.log(A))
      check(steep.taylor(t ^ alpha, t, a, 25), 25,
        function(k) return aa * binom(alpha, k) / A ^ k end, 1e-13,
        string.format("t^%s at %s", tostring(alpha), tostring(a)))
    end
    -- sqrt has its own kernel: binomial series with alpha = 1/2 and the principal root
    local A = tocomplex(a)
    local ra = steep.sqrt(A)
    check(steep.taylor(steep.sqrt(t), t, a, 25), 25,
      function(k) return ra * binom(0.5, k) / A ^ k end, 1e-13, "sqrt at " .. tostring(a))
  end
end

function TestJetsKnownSeries:test_integer_powers()
  -- (1+z)^7 = sum C(7,k) z^k: integer arithmetic, exact
  local c7 = { [0] = 1, 7, 21, 35, 35, 21, 7, 1 }
  check(steep.taylor((1 + t) ^ 7, t, 0, 10), 10, function(k) return c7[k] or 0 end, 0,
    "(1+t)^7 exactly", function() return 1 end)
  -- (1-z)^-3 = sum C(k+2, 2) z^k (binomial series, DLMF 4.6.7 with alpha = -3)
  check(steep.taylor((1 - t) ^ -3, t, 0, 40), 40, function(k) return (k + 2) * (k + 1) / 2 end,
    1e-15, "(1-t)^-3")
  -- (2+z)^-2 = (1/4) sum (k+1) (-z/2)^k
  check(steep.taylor(t ^ -2, t, 2, 30), 30, function(k) return (k + 1) * (-0.5) ^ k / 4 end,
    1e-15, "t^-2 at 2")
  -- powers of a jet with infinitely many terms: (e^t)^m = e^(mt), [z^k] = m^k e^(ma)/k!
  -- (the squaring path m = 2, binary powering m = 5, and a reciprocal m = -3)
  local a0 = C(0.3, -0.6)
  for _, m in ipairs({ 2, 5 }) do
    local ema = steep.exp(m * a0)
    check(steep.taylor(steep.exp(t) ^ m, t, a0, 30), 30, function(k) return ema * m ^ k * invfact[k] end,
      1e-13, "(e^t)^" .. m)
  end
  -- e^(-3t) = 1/(e^t)^3 by the division recurrence, whose terms cancel (their size grows
  -- like 2^k times the result): measured against the recurrence on absolute values
  local recip, cube = steep.compile({ steep.exp(t) ^ -3, steep.exp(t) ^ 3 }, t):jet(a0, 30)
  local q = quotient_sizes(nil, cube, 30)
  local em3 = steep.exp(-3 * a0)
  check(recip, 30, function(k) return em3 * (-3) ^ k * invfact[k] end, 1e-13, "(e^t)^-3",
    function(k) return q[k] end)
  -- a complex base: (a+z)^5 at a = 1+i, coefficients C(5,k) a^(5-k)
  local a, c5 = C(1, 1), { [0] = 1, 5, 10, 10, 5, 1 }
  check(steep.taylor(t ^ 5, t, a, 8), 8, function(k) return k <= 5 and c5[k] * a ^ (5 - k) or 0 end,
    1e-15, "t^5 at 1+i", function() return 1 end)
end

function TestJetsKnownSeries:test_tan_and_tanh_via_tangent_numbers()
  local T = tangent_numbers(11)   -- to z^21
  -- The first five against DLMF 4.19.3 (equation number from memory; 4.19.1 and 4.19.2
  -- are sin and cos): tan z = z + z^3/3 + 2z^5/15 + 17z^7/315 + 62z^9/2835 + ...
  local dlmf = { 1, 1 / 3, 2 / 15, 17 / 315, 62 / 2835 }
  for k = 1, 5 do
    H.close(T[k] * invfact[2 * k - 1], dlmf[k], 1e-15, "tangent number " .. k .. " vs DLMF 4.19.3")
  end
  local function tan_coef(k) -- [z^k] tan z
    if k % 2 == 0 then return 0 end
    return T[(k + 1) // 2] * invfact[k]
  end
  -- size of an even (zero) coefficient: its odd neighbour
  local function size(k) return k % 2 == 0 and k > 0 and tan_coef(k - 1) or 0 end
  check(steep.taylor(steep.tan(t), t, 0, 21), 21, tan_coef, 1e-14, "tan at 0", size)
  -- tanh z = -i tan(iz): [z^(2k-1)] tanh z = (-1)^(k-1) T_k/(2k-1)! (exact identity)
  check(steep.taylor(steep.tanh(t), t, 0, 21), 21, function(k)
    return k % 2 == 1 and (-1) ^ ((k - 1) // 2) * tan_coef(k) or 0
  end, 1e-14, "tanh at 0", size)
end

function TestJetsKnownSeries:test_atan()
  -- arctan z = sum (-1)^k z^(2k+1)/(2k+1) (DLMF 4.24.3)
  check(steep.taylor(steep.atan(t), t, 0, 41), 41, function(k)
    if k % 2 == 0 then return 0 end
    return (-1) ^ ((k - 1) // 2) / k
  end, 1e-15, "atan at 0", function(k) return 1 / (k + 1) end)
  -- at a point a: atan' = 1/(1+w^2) = (1/2i)(1/(w-i) - 1/(w+i)) (partial fractions),
  -- so [z^k] atan(a+z) = (-1)^(k-1)/(2ik) ((a-i)^-k - (a+i)^-k) for k >= 1
  for _, a in ipairs({ 1, C(0.5, 0.5), -2, C(0.3, -3) }) do
    local A = tocomplex(a)
    local am, ap = A - I, A + I
    check(steep.taylor(steep.atan(t), t, a, 30), 30, function(k)
      if k == 0 then return steep.atan(A) end
      return (-1) ^ (k - 1) / (2 * I * k) * (am ^ -k - ap ^ -k)
    end, 1e-13, "atan at " .. tostring(a), function(k)
      -- the size of the two terms (at a = 1 every fourth coefficient vanishes)
      if k == 0 then return 0 end
      return math.max(cabs(am ^ -k), cabs(ap ^ -k)) / (2 * k)
    end)
  end
end

function TestJetsKnownSeries:test_sin_cos_sinh_cosh()
  -- derivatives cycle: sin^(k) = sin, cos, -sin, -cos, ...; sinh^(k) = sinh, cosh, ...
  -- so [z^k] f(a+z) = f^(k)(a)/k! (Taylor's theorem)
  for _, a in ipairs({ 0, 0.7, C(-1, 0.8), C(2, -1.5) }) do
    local s, c = steep.sin(a), steep.cos(a)
    local sh, ch = steep.sinh(a), steep.cosh(a)
    local cyc_sin = { s, c, -s, -c }
    local cyc_cos = { c, -s, -c, s }
    local function size(k) return math.max(cabs(s), cabs(c)) * invfact[k] end
    local function hsize(k) return math.max(cabs(sh), cabs(ch)) * invfact[k] end
    check(steep.taylor(steep.sin(t), t, a, 25), 25,
      function(k) return cyc_sin[k % 4 + 1] * invfact[k] end, 1e-14, "sin at " .. tostring(a), size)
    check(steep.taylor(steep.cos(t), t, a, 25), 25,
      function(k) return cyc_cos[k % 4 + 1] * invfact[k] end, 1e-14, "cos at " .. tostring(a), size)
    check(steep.taylor(steep.sinh(t), t, a, 25), 25,
      function(k) return (k % 2 == 0 and sh or ch) * invfact[k] end, 1e-14,
      "sinh at " .. tostring(a), hsize)
    check(steep.taylor(steep.cosh(t), t, a, 25), 25,
      function(k) return (k % 2 == 0 and ch or sh) * invfact[k] end, 1e-14,
      "cosh at " .. tostring(a), hsize)
  end
end

function TestJetsKnownSeries:test_arithmetic_operations()
  -- p(t) = 3 - 2t + x t^3 - (-t^2) via const, var, param, add, sub, mul, neg, powi:
  -- exact Taylor shift at a: p(a), p'(a), p''(a)/2, p'''(a)/6 = x, then zeros
  local p = 3 - 2 * t + x * t ^ 3 - (-t ^ 2)
  local a, xv = C(0.5, -1), C(2, 0.25)
  local want = {
    [0] = 3 - 2 * a + xv * a ^ 3 + a ^ 2,
    -2 + 3 * xv * a ^ 2 + 2 * a,
    3 * xv * a + 1,
    xv,
  }
  check(steep.taylor(p, t, a, 6, { x = xv }), 6, function(k) return want[k] or 0 end, 1e-15,
    "cubic polynomial", function() return 1 end)
  -- 1/(1-t) = sum t^k (geometric series): constant / varying division
  check(steep.taylor(1 / (1 - t), t, 0, 50), 50, function() return 1 end, 1e-15, "1/(1-t)")
  -- t/(x - t) = sum_{k>=1} (t/x)^k: varying / varying division
  check(steep.taylor(t / (x - t), t, 0, 20, { x = xv }), 20,
    function(k) return k == 0 and 0 or xv ^ -k end, 1e-14, "t/(x-t)",
    function(k) return k == 0 and 1 or 0 end)
  -- varying / constant and a parameter-only subexpression (a constant jet):
  -- t/x + exp(x) at a = [a/x + e^x, 1/x, 0, ...]
  check(steep.taylor(t / x + steep.exp(x), t, a, 4, { x = xv }), 4, function(k)
    if k == 0 then return a / xv + steep.exp(xv) end
    return k == 1 and 1 / xv or 0
  end, 1e-15, "t/x + exp(x)", function() return 1 end)
  -- a jet of an expression that does not involve the variable at all
  check(steep.taylor(steep.sin(x) * 2, t, a, 3, { x = xv }), 3,
    function(k) return k == 0 and 2 * steep.sin(xv) or 0 end, 1e-15, "2 sin x",
    function() return 1 end)
end

TestJetsIndependent = {}

-- A function using every operation, analytic in |t| < 0.9 (nearest singularities:
-- the poles of 1/(1+t^2) at +-i).
local F = steep.exp(steep.sin(t) * x) / (1 + t ^ 2) + steep.log(2 + steep.cos(t))
  + steep.sqrt(3 + t) + steep.tanh(t) * t - steep.atan(t / 2) + steep.sinh(t) ^ 3 * steep.cosh(t)
  + steep.tan(t / 3) + (1 + t) ^ 2.5 + (t + 2) ^ -2 + t ^ 7 - 1 / (x - t)
local FP = { x = 1.7 }

function TestJetsIndependent:test_against_finite_differences()
  H.seeded(function(seed)
    local rnd = H.rng(seed)
    local tape = steep.compile(F, t)
    for _ = 1, 5 do
      local a = C(0.4 * rnd() - 0.2, 0.4 * rnd() - 0.2)
      local J = tape:jet(a, 2, FP)
      local f0 = tape:eval(a, FP)
      local size = cabs(f0)
      -- central differences: c1 = f'(a) ~ (f(a+h) - f(a-h))/2h, error ~ h^2 f'''/6;
      -- c2 = f''(a)/2 ~ (f(a+h) - 2f(a) + f(a-h))/2h^2, error ~ h^2 f''''/24 + eps f/h^2
      local h = 1e-4
      local d1 = (tape:eval(a + h, FP) - tape:eval(a - h, FP)) / (2 * h)
      H.close(J:coef(1), d1, 1e-6, "c1 vs central difference at " .. tostring(a), size)
      h = 5e-4
      local d2 = (tape:eval(a + h, FP) - 2 * f0 + tape:eval(a - h, FP)) / (2 * h * h)
      H.close(J:coef(2), d2, 1e-5, "c2 vs second difference at " .. tostring(a), size)
      H.close(J:coef(0), f0, 1e-15, "c0 vs eval at " .. tostring(a))
    end
  end)
end

function TestJetsIndependent:test_against_the_cauchy_integral()
  -- c_k = (1/2 pi i) oint f(a + w) w^(-k-1) dw on |w| = r by the N-point trapezoidal rule,
  -- c_k ~ (1/N) sum_j f(a + r W^j) W^(-jk) r^-k, W = e^(2 pi i/N); the aliasing error is
  -- ~ (r/R)^(N-k) (R >= 0.6 the radius of convergence at a), negligible for N = 64,
  -- r = 0.25. Errors are measured against the Cauchy bound M r^-k, M = max |f| on the
  -- circle: the natural size of c_k.
  H.seeded(function(seed)
    local rnd = H.rng(seed)
    local tape = steep.compile(F, t)
    local N, r, K = 64, 0.25, 12
    for _ = 1, 3 do
      local a = C(0.4 * rnd() - 0.2, 0.4 * rnd() - 0.2)
      local pts = {}
      for j = 0, N - 1 do
        pts[j + 1] = a + r * C(math.cos(2 * math.pi * j / N), math.sin(2 * math.pi * j / N))
      end
      local vals = tape:eval_many(steep.cvec(pts), FP)
      local M = 0
      for j = 1, N do M = math.max(M, vals:get(j):abs()) end
      local J = tape:jet(a, K, FP)
      for k = 0, K do
        local sum = C(0, 0)
        for j = 0, N - 1 do
          local ang = -2 * math.pi * j * k / N
          sum = sum + vals:get(j + 1) * C(math.cos(ang), math.sin(ang))
        end
        local ck = sum / N / r ^ k
        local bound = M / r ^ k
        H.close(J:coef(k), ck, 1e-11, string.format("c%d vs Cauchy integral at %s", k, tostring(a)),
          bound)
      end
    end
  end)
end

TestJetsIdentities = {}

-- Seeded identities at random complex points to order 30, with random quadratic inner
-- functions s(t) = c0 + c1 t + c2 t^2. Each coefficient is compared relative to the size
-- of the computation that produced it: the coefficient of the same recurrence run on
-- absolute values (a running error bound), so a vanishing coefficient is still checked
-- relative to the terms that cancel in it.
local N = 30
local RTOL = 1e-12
local c0, c1, c2 = steep.param("c0"), steep.param("c1"), steep.param("c2")
local S = c0 + c1 * t + c2 * t ^ 2

local function compare(L, R, size, msg)
  for k = 0, N do
    local want = type(R) == "table" and (R[k] or 0) or R:coef(k)
    H.close(L:coef(k), want, RTOL, msg .. ", coefficient " .. k, size(k))
  end
end

local function random_point(rnd)
  local function cr(r) return C((2 * rnd() - 1) * r, (2 * rnd() - 1) * r) end
  return cr(0.7), { c0 = cr(0.5), c1 = cr(0.5), c2 = cr(0.5) }, cr
end

function TestJetsIdentities:test_sin2_plus_cos2()
  H.seeded(function(seed)
    local rnd = H.rng(seed)
    local tape = steep.compile({ steep.sin(S) ^ 2 + steep.cos(S) ^ 2, steep.sin(S), steep.cos(S) }, t)
    for _ = 1, 10 do
      local a, p = random_point(rnd)
      local L, Sn, Cs = tape:jet(a, N, p)
      compare(L, { [0] = 1 }, function(k) return absconv(Sn, Sn, k) + absconv(Cs, Cs, k) end,
        "sin^2 + cos^2 = 1 at " .. tostring(a))
    end
  end)
end

function TestJetsIdentities:test_cosh2_minus_sinh2()
  H.seeded(function(seed)
    local rnd = H.rng(seed)
    local tape = steep.compile({ steep.cosh(S) ^ 2 - steep.sinh(S) ^ 2, steep.cosh(S), steep.sinh(S) }, t)
    for _ = 1, 10 do
      local a, p = random_point(rnd)
      local L, Ch, Sh = tape:jet(a, N, p)
      compare(L, { [0] = 1 }, function(k) return absconv(Ch, Ch, k) + absconv(Sh, Sh, k) end,
        "cosh^2 - sinh^2 = 1 at " .. tostring(a))
    end
  end)
end

function TestJetsIdentities:test_exp_of_a_sum()
  H.seeded(function(seed)
    local rnd = H.rng(seed)
    local d0, d1 = steep.param("d0"), steep.param("d1")
    local B = d0 + d1 * t
    local tape = steep.compile({ steep.exp(S + B), steep.exp(S), steep.exp(B) }, t)
    for _ = 1, 10 do
      local a, p, cr = random_point(rnd)
      p.d0, p.d1 = cr(1), cr(1)
      local L, EA, EB = tape:jet(a, N, p)
      compare(L, EA * EB, function(k) return absconv(EA, EB, k) end,
        "exp(a+b) = exp(a) exp(b) at " .. tostring(a))
    end
  end)
end

function TestJetsIdentities:test_log_of_exp()
  H.seeded(function(seed)
    local rnd = H.rng(seed)
    local tape = steep.compile({ steep.log(steep.exp(S)), S, steep.exp(S) }, t)
    for _ = 1, 10 do
      local a, p = random_point(rnd)
      local L, Sv, E = tape:jet(a, N, p)
      -- |c0| + |c1 a| + |c2 a^2| < 0.71 (1 + 0.99 + 0.98) < 2.2 < pi: the principal
      -- log does not wrap, so log(exp(s)) = s exactly (DLMF 4.2.3)
      lu.assertTrue(math.abs(Sv:coef(0):im()) < math.pi - 0.5, "Im s(a) well inside (-pi, pi)")
      -- majorant of the log recurrence l_k = (e_k - (1/k) sum_{j<k} j l_j e_{k-j}) / e_0;
      -- the constant term is absolutely conditioned, its size max(|s0|, 1)
      local lbar = { [0] = math.max(Sv:coef(0):abs(), 1) }
      for k = 1, N do
        local s = E:coef(k):abs()
        for j = 1, k - 1 do s = s + j / k * lbar[j] * E:coef(k - j):abs() end
        lbar[k] = s / E:coef(0):abs()
      end
      compare(L, Sv, function(k) return lbar[k] end, "log(exp(s)) = s at " .. tostring(a))
    end
  end)
end

function TestJetsIdentities:test_tan_is_sin_over_cos()
  H.seeded(function(seed)
    local rnd = H.rng(seed)
    local tape = steep.compile({ steep.tan(S), steep.sin(S), steep.cos(S),
      steep.tanh(S), steep.sinh(S), steep.cosh(S) }, t)
    for _ = 1, 10 do
      local a, p = random_point(rnd)
      local Tn, Sn, Cs, Th, Sh, Ch = tape:jet(a, N, p)
      local q = quotient_sizes(Sn, Cs, N)
      compare(Tn, Sn / Cs, function(k) return q[k] end, "tan = sin/cos at " .. tostring(a))
      local qh = quotient_sizes(Sh, Ch, N)
      compare(Th, Sh / Ch, function(k) return qh[k] end, "tanh = sinh/cosh at " .. tostring(a))
    end
  end)
end

TestJetsOrders = {}

function TestJetsOrders:test_order_zero()
  local s = steep.taylor(steep.exp(t), t, 0.5, 0)
  lu.assertEquals(s:order(), 0)
  lu.assertEquals(#s, 1)
  H.close(s:coef(0), math.exp(0.5), 1e-15, "exp(0.5) as an order-0 jet")
end

function TestJetsOrders:test_order_256()
  lu.assertEquals(steep.max_order, 256)
  -- geometric series: every coefficient 1 (exact)
  check(steep.taylor(1 / (1 - t), t, 0, 256), 256, function() return 1 end, 0, "1/(1-t) to 256")
  -- log(1+z) (DLMF 4.6.1) and (1+z)^-2 = sum (-1)^k (k+1) z^k (DLMF 4.6.7) to 256
  local tape = steep.compile({ steep.log(1 + t), (1 + t) ^ -2 }, t)
  local L, P = tape:jet(0, 256)
  check(L, 256, function(k) return k == 0 and 0 or (-1) ^ (k + 1) / k end, 1e-15, "log(1+t) to 256",
    function(k) return k == 0 and 1 or 0 end)
  check(P, 256, function(k) return (-1) ^ k * (k + 1) end, 1e-15, "(1+t)^-2 to 256")
end

function TestJetsOrders:test_bad_orders()
  local e = steep.exp(t)
  H.raises({ "bad argument #4 to 'taylor'", "order in 0..256 expected, got 257" },
    steep.taylor, e, t, 0, 257)
  H.raises({ "bad argument #4 to 'taylor'", "got -1" }, steep.taylor, e, t, 0, -1)
  H.raises({ "bad argument #4 to 'taylor'", "got 1.5" }, steep.taylor, e, t, 0, 1.5)
  H.raises({ "bad argument #4 to 'taylor'", "got 3" }, steep.taylor, e, t, 0, "3")
  H.raises({ "bad argument #2 to 'taylor'", "symbol expected, got string" },
    steep.taylor, e, "t", 0, 3)
  local tape = steep.compile(e, t)
  H.raises({ "order 257 outside 0..256" }, tape.jet, tape, 0, 257)
  H.raises({ "order -1 outside 0..256" }, tape.jet, tape, 0, -1)
  H.raises({ "integer order expected" }, tape.jet, tape, 0, 1.5)
  -- still usable
  H.close(steep.taylor(e, t, 0, 3):coef(3), 1 / 6, 1e-15, "a jet after the errors")
end

-- The instruction number n named in a jet error; asserts the dump's line n is that op.
local function assert_names_instruction(err, tape, op)
  local n = tonumber(err:match("%(instruction (%d+)%)"))
  lu.assertNotNil(n, "the error names an instruction: " .. err)
  local line = 0
  for l in tape:dump():gmatch("[^\n]+") do
    line = line + 1
    if line == n then lu.assertStrContains(l, " " .. op .. " ") end
  end
end

function TestJetsOrders:test_errors_name_the_failing_instruction()
  local cases = {
    { 1 / t, 0, "div", "is singular there", "jet at 0+0i" },
    { steep.log(t), 0, "log", "is singular there" },
    { steep.sqrt(t), 0, "sqrt", "has a branch point there" },
    { t ^ 0.5, 0, "powc", "has a branch point there" },
    { t ^ -2, 0, "powi", "is singular there" },
    { steep.atan(t), I, "atan", "is singular there", "jet at 0+1i" },
    { 1 / (t - I) + 2, I, "div", "is singular there" },
    { steep.exp(t), 800, "exp", "gives a non-finite value there", "jet at 800+0i" },
    -- a parameter-only subexpression: log(x + 2) = log 0 with x = -2
    { steep.exp(t) * steep.log(x + 2), 2, "log", "gives a non-finite value there" },
  }
  for _, c in ipairs(cases) do
    local e, at, op, why, where = c[1], c[2], c[3], c[4], c[5]
    local err = H.raises({ op .. " (instruction", why, where }, steep.taylor, e, t, at, 4, { x = -2 })
    assert_names_instruction(err, steep.compile(e, t), op)
  end
  -- the pole of 1/t: instruction 3 (1: const 1, 2: var, 3: div)
  H.raises({ "jet at 0+0i: div (instruction 3) is singular there" }, steep.taylor, 1 / t, t, 0, 5)
  -- and the process is fine afterwards
  check(steep.taylor(1 / t, t, 1, 5), 5, function(k) return (-1) ^ k end, 1e-15, "1/t at 1")
end
