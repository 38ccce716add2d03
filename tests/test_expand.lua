-- Tests of the asymptotic expansions (J:expand, J:series, J:check) against published
-- expansions: Stirling's series for Gamma (coefficients to order 20 against exact rationals
-- computed here by an independent route), Airy's function for large |x| on both sides,
-- Watson's lemma at an endpoint (the exponential integral, algebraic endpoint factors),
-- a saddle at an endpoint, degenerate saddles; every truncated value is compared with a
-- GSL reference (tests/ref/gslref.so) and must lie within the reported error.
-- Then bad input: the errors, and the process still usable after them.
local lu = require "luaunit"
local H = require "helpers"
local gsl = require "gslref"
local steep = H.steep
local expand_m = require "steep.expand"

local C, I = steep.complex, steep.I
local t, x = steep.var("t"), steep.param("x")
local pi = math.pi

local function cabs(z) return type(z) == "number" and math.abs(z) or z:abs() end

-- |value - reference| <= 3 * (reported error) + (the reference's own error)
local function within(v, err, ref, ref_err, msg)
  local d = cabs(v - ref)
  if not (d <= err + (ref_err or 0)) then
    lu.fail(string.format("%s: |expansion - reference| = %.3g exceeds the reported error "
      .. "%.3g (expansion %s, reference %s)", msg, d, err, tostring(v), tostring(ref)))
  end
end

---------------------------------------------------------------------------------------
-- Exact rationals, for the Stirling coefficients: a small bignum (magnitudes as little-
-- endian limbs of 24 bits, so a limb product and carries fit a 64-bit Lua integer) and
-- reduced fractions {s = sign, p = numerator, q = denominator}. Reduction by the binary
-- gcd; exact division by bit-by-bit long division.
---------------------------------------------------------------------------------------

local BITS = 24
local BASE, MASK = 1 << BITS, (1 << BITS) - 1

local function bn_trim(a)
  while #a > 0 and a[#a] == 0 do a[#a] = nil end
  return a
end

local function bn(n)   -- from a non-negative Lua integer
  n = assert(math.tointeger(n))
  assert(n >= 0)
  local r = {}
  while n > 0 do r[#r + 1] = n & MASK; n = n >> BITS end
  return r
end

local function bn_cmp(a, b)
  if #a ~= #b then return #a < #b and -1 or 1 end
  for i = #a, 1, -1 do
    if a[i] ~= b[i] then return a[i] < b[i] and -1 or 1 end
  end
  return 0
end

local function bn_add(a, b)
  local r, c = {}, 0
  for i = 1, math.max(#a, #b) do
    local v = (a[i] or 0) + (b[i] or 0) + c
    r[i], c = v & MASK, v >> BITS
  end
  if c > 0 then r[#r + 1] = c end
  return r
end

local function bn_sub(a, b)   -- a >= b
  local r, c = {}, 0
  for i = 1, #a do
    local v = a[i] - (b[i] or 0) - c
    if v < 0 then v, c = v + BASE, 1 else c = 0 end
    r[i] = v
  end
  return bn_trim(r)
end

local function bn_mul(a, b)
  if #a == 0 or #b == 0 then return {} end
  local r = {}
  for i = 1, #a + #b do r[i] = 0 end
  for i = 1, #a do
    local c, ai = 0, a[i]
    for j = 1, #b do
      local v = r[i + j - 1] + ai * b[j] + c
      r[i + j - 1], c = v & MASK, v >> BITS
    end
    local k = i + #b
    while c > 0 do
      local v = r[k] + c
      r[k], c = v & MASK, v >> BITS
      k = k + 1
    end
  end
  return bn_trim(r)
end

local function bn_bits(a)
  if #a == 0 then return 0 end
  local top, n = a[#a], 0
  while top > 0 do n, top = n + 1, top >> 1 end
  return (#a - 1) * BITS + n
end

local function bn_shr1(a)
  local r = {}
  for i = 1, #a do r[i] = (a[i] >> 1) | (((a[i + 1] or 0) & 1) << (BITS - 1)) end
  return bn_trim(r)
end

local function bn_shl1(a, bit)   -- 2 a + bit
  local r, c = {}, bit or 0
  for i = 1, #a do
    local v = (a[i] << 1) | c
    r[i], c = v & MASK, v >> BITS
  end
  if c > 0 then r[#r + 1] = c end
  return r
end

local function bn_div(a, b)   -- quotient and remainder, b > 0
  local q, r = {}, {}
  for i = 1, #a do q[i] = 0 end
  for i = bn_bits(a) - 1, 0, -1 do
    local limb, off = i // BITS + 1, i % BITS
    r = bn_shl1(r, (a[limb] >> off) & 1)
    if bn_cmp(r, b) >= 0 then
      r = bn_sub(r, b)
      q[limb] = q[limb] | (1 << off)
    end
  end
  return bn_trim(q), r
end

local function bn_gcd(a, b)   -- binary gcd (Stein)
  if #a == 0 then return b end
  if #b == 0 then return a end
  local shift = 0
  while (a[1] & 1) == 0 and (b[1] & 1) == 0 do a, b, shift = bn_shr1(a), bn_shr1(b), shift + 1 end
  while (a[1] & 1) == 0 do a = bn_shr1(a) end
  repeat
    while (b[1] & 1) == 0 do b = bn_shr1(b) end
    if bn_cmp(a, b) > 0 then a, b = b, a end
    b = bn_sub(b, a)
  until #b == 0
  for _ = 1, shift do a = bn_shl1(a) end
  return a
end

local function bn_tonumber(a)
  local v = 0.0
  for i = #a, 1, -1 do v = v * BASE + a[i] end
  return v
end

local function rnorm(s, p, q)
  if #p == 0 then return { s = 0, p = {}, q = { 1 } } end
  local g = bn_gcd(p, q)
  if not (#g == 1 and g[1] == 1) then p, q = bn_div(p, g), bn_div(q, g) end
  return { s = s, p = p, q = q }
end

local function rat(n, d)   -- n/d from Lua integers
  d = d or 1
  if d < 0 then n, d = -n, -d end
  return rnorm(n > 0 and 1 or (n < 0 and -1 or 0), bn(math.abs(n)), bn(d))
end

local function radd(x1, y1)
  if x1.s == 0 then return y1 end
  if y1.s == 0 then return x1 end
  local a, b, q = bn_mul(x1.p, y1.q), bn_mul(y1.p, x1.q), bn_mul(x1.q, y1.q)
  if x1.s == y1.s then return rnorm(x1.s, bn_add(a, b), q) end
  local c = bn_cmp(a, b)
  if c == 0 then return rat(0) end
  if c > 0 then return rnorm(x1.s, bn_sub(a, b), q) end
  return rnorm(y1.s, bn_sub(b, a), q)
end

local function rmul(x1, y1) return rnorm(x1.s * y1.s, bn_mul(x1.p, y1.p), bn_mul(x1.q, y1.q)) end
local function req(x1, y1)
  return x1.s == y1.s and bn_cmp(x1.p, y1.p) == 0 and bn_cmp(x1.q, y1.q) == 0
end
local function rtonumber(r) return r.s * (bn_tonumber(r.p) / bn_tonumber(r.q)) end

local function binomial(n, k)   -- exact in Lua integers for n <= 60
  local c = 1
  for j = 1, k do c = c * (n - j + 1) // j end
  return c
end

-- Bernoulli numbers B_0..B_n by the recurrence sum_{k=0}^{n} C(n+1, k) B_k = 0 (n >= 1),
-- the one that follows from t/(e^t - 1) = sum B_n t^n/n! (DLMF 24.2.1, from memory).
local function bernoulli(n)
  local B = { [0] = rat(1) }
  for m = 1, n do
    local s = rat(0)
    for k = 0, m - 1 do s = radd(s, rmul(rat(binomial(m + 1, k)), B[k])) end
    B[m] = rmul(s, rat(-1, m + 1))
  end
  return B
end

-- Stirling's coefficients gamma_0..gamma_n of Gamma(z) ~ e^{-z} z^z (2 pi/z)^{1/2}
-- sum gamma_k z^-k (DLMF 5.11.3; from memory), by exponentiating the Bernoulli-number
-- series of ln Gamma (DLMF 5.11.1, from memory):
--   sum_k gamma_k w^k = exp(A(w)),  A(w) = sum_{j>=1} B_2j/(2j(2j-1)) w^(2j-1),
-- through E' = A' E: n gamma_n = sum_{m=1}^{n} m a_m gamma_{n-m} (a_m the coefficients
-- of A). Exact rationals throughout: nothing here shares code with the library.
local stirling_cache
local function stirling(n)
  if stirling_cache and #stirling_cache >= n then return stirling_cache end
  local B = bernoulli(n + 1)
  local a = {}
  for m = 1, n do
    if m % 2 == 1 then
      local j = (m + 1) // 2
      a[m] = rmul(B[2 * j], rat(1, 2 * j * (2 * j - 1)))
    else
      a[m] = rat(0)
    end
  end
  local g = { [0] = rat(1) }
  for k = 1, n do
    local s = rat(0)
    for m = 1, k do
      if a[m].s ~= 0 then s = radd(s, rmul(rmul(rat(m), a[m]), g[k - m])) end
    end
    g[k] = rmul(s, rat(1, k))
  end
  stirling_cache = g
  return g
end

---------------------------------------------------------------------------------------

TestExpandExactArithmetic = {}

-- The bignum rationals themselves: identities that need more than 64 bits.
function TestExpandExactArithmetic:test_bignum_rationals()
  -- (2^40 + 1)^3 = 2^120 + 3 2^80 + 3 2^40 + 1, and back by exact division
  local u = bn((1 << 40) + 1)
  local c = bn_mul(bn_mul(u, u), u)
  local want = bn_add(bn_add(bn_mul(bn(1 << 60), bn(1 << 60)), bn_mul(bn(3 << 40), bn(1 << 40))),
    bn(3 * (1 << 40) + 1))
  lu.assertEquals(bn_cmp(c, want), 0, "(2^40+1)^3")
  local q, r = bn_div(c, u)
  lu.assertEquals(bn_cmp(q, bn_mul(u, u)), 0, "(2^40+1)^3 / (2^40+1)")
  lu.assertEquals(#r, 0, "remainder 0")
  -- gcd(2^70 3^5, 2^65 3^9 7) = 2^65 3^5
  local p1 = bn_mul(bn_mul(bn(1 << 35), bn(1 << 35)), bn(243))
  local p2 = bn_mul(bn_mul(bn_mul(bn(1 << 35), bn(1 << 30)), bn(19683)), bn(7))
  local g = bn_gcd(p1, p2)
  lu.assertEquals(bn_cmp(g, bn_mul(bn_mul(bn(1 << 35), bn(1 << 30)), bn(243))), 0, "gcd")
  -- 1/3 + 1/6 = 1/2; 1/12 - 1/12 = 0; (7/10)(10/7) = 1
  lu.assertTrue(req(radd(rat(1, 3), rat(1, 6)), rat(1, 2)), "1/3 + 1/6")
  lu.assertEquals(radd(rat(1, 12), rat(-1, 12)).s, 0, "1/12 - 1/12")
  lu.assertTrue(req(rmul(rat(7, 10), rat(10, 7)), rat(1)), "7/10 * 10/7")
  H.close(rtonumber(rat(-139, 51840)), -139 / 51840, 1e-15, "to number")
end

-- B_2..B_20 against DLMF Table 24.2.1 (values from memory).
function TestExpandExactArithmetic:test_bernoulli_numbers()
  local B = bernoulli(20)
  lu.assertTrue(req(B[1], rat(-1, 2)), "B_1")
  local want = { [2] = { 1, 6 }, [4] = { -1, 30 }, [6] = { 1, 42 }, [8] = { -1, 30 },
    [10] = { 5, 66 }, [12] = { -691, 2730 }, [14] = { 7, 6 }, [16] = { -3617, 510 },
    [18] = { 43867, 798 }, [20] = { -174611, 330 } }
  for n = 2, 20 do
    if n % 2 == 1 then
      lu.assertEquals(B[n].s, 0, "B_" .. n .. " = 0")
    else
      lu.assertTrue(req(B[n], rat(want[n][1], want[n][2])), "B_" .. n)
    end
  end
end

-- The first Stirling coefficients against DLMF 5.11.4 (equation number from memory):
-- 1, 1/12, 1/288, -139/51840, -571/2488320, 163879/209018880, 5246819/75246796800.
function TestExpandExactArithmetic:test_stirling_coefficients_exact()
  local g = stirling(20)
  local dlmf = { [0] = { 1, 1 }, { 1, 12 }, { 1, 288 }, { -139, 51840 }, { -571, 2488320 },
    { 163879, 209018880 }, { 5246819, 75246796800 } }
  for k = 0, 6 do
    lu.assertTrue(req(g[k], rat(dlmf[k][1], dlmf[k][2])),
      string.format("gamma_%d: exact route gives %.17g", k, rtonumber(g[k])))
  end
  -- gamma_20 needs more than 64 bits: its denominator is past 2^63
  lu.assertTrue(bn_bits(g[20].q) > 63, "gamma_20's denominator exceeds 64 bits")
end

---------------------------------------------------------------------------------------

TestExpandStirling = {}

-- int_0^inf s^lam e^{-lam s} ds = Gamma(lam + 1)/lam^(lam+1) (Euler's integral, DLMF 5.2.1,
-- from memory, with s = u/lam) = lam^(-1/2) e^{-lam} sqrt(2 pi) sum gamma_k lam^-k by
-- Stirling's series (DLMF 5.11.3): the saddle at s = 1 gives c_k = sqrt(2 pi) gamma_(k-1)
-- on powers lam^-(k - 1/2).
local s, lam = steep.var "s", steep.param "lam"
local function stirling_integral()
  return steep.integral { var = s, exponent = lam * (steep.log(s) - s),
    contour = steep.line(0, steep.inf(0)), large = lam }
end

function TestExpandStirling:test_series_coefficients_to_order_20()
  local J = stirling_integral()
  local out = J:series { order = 21 }
  lu.assertEquals(#out, 1, "one contribution")
  local c = out[1]
  lu.assertEquals(c.kind, "saddle")
  lu.assertEquals(c.order, 2)
  H.close(c.at, 1, 1e-12, "saddle at s = 1")
  H.close(c.phi, -1, 1e-14, "phi(1) = -1")
  lu.assertEquals(#c.coefficients, 21, "21 coefficients")
  H.close(c.coefficients[1], math.sqrt(2 * pi), 1e-13, "c_1 = sqrt(2 pi)")
  local g = stirling(20)
  for k = 1, 21 do
    lu.assertEquals(c.powers[k], k - 0.5, "power of coefficient " .. k)
    H.close(c.coefficients[k] / c.coefficients[1], rtonumber(g[k - 1]), 1e-10,
      string.format("c_%d/c_1 = Stirling gamma_%d", k, k - 1))
  end
end

-- To order 200: the coefficients against exact rationals again, now from the test module's
-- GMP route (gslref.stirling_gamma: the same recurrence, DLMF 5.11.1 and 24.5.3, in
-- exact rational arithmetic), itself checked against the bignum rationals above to order
-- 20. Every coefficient must lie within its reported error (errors[k]); the errors must
-- say something (at most 1e-7 relative; 7e-9 at the worst here) and, to order 100, the
-- coefficients be good to
-- 1e-10 relative. The Cauchy circle is sized by the nearest singularity of G(w), the
-- saddle's own image on the neighbouring sheets of log at |w| = sqrt(2 pi) (F(1) +- 2 pi i).
function TestExpandStirling:test_series_coefficients_to_order_200()
  local exact = gsl.stirling_gamma(200)
  local g = stirling(20)
  for k = 0, 20 do
    H.close(exact[k + 1], rtonumber(g[k]), 1e-15, "GMP and bignum routes agree at gamma_" .. k)
  end
  local J = stirling_integral()
  local c = J:series { order = 200 }[1]
  lu.assertEquals(#c.coefficients, 200, "200 coefficients")
  lu.assertEquals(#c.errors, 200, "an error estimate for each")
  local radius = tonumber(c.method:match("|w| = ([%d.e+-]+)"))
  lu.assertNotNil(radius, "a Cauchy circle: " .. tostring(c.method))
  lu.assertTrue(radius > 0.95 * math.sqrt(2 * pi) and radius < math.sqrt(2 * pi),
    "the circle just inside |w| = sqrt(2 pi): " .. c.method)
  for k = 1, 200 do
    local want = math.sqrt(2 * pi) * exact[k]
    local d = cabs(c.coefficients[k] - want)
    local msg = string.format("c_%d = sqrt(2 pi) gamma_%d", k, k - 1)
    lu.assertTrue(d <= c.errors[k], string.format("%s: error %.3g beyond the reported %.3g",
      msg, d, c.errors[k]))
    lu.assertTrue(c.errors[k] <= 1e-7 * math.abs(want), string.format("%s: reported error "
      .. "%.3g is more than 1e-7 relative", msg, c.errors[k]))
    if k <= 101 then H.close(c.coefficients[k], want, 1e-10, msg) end
  end
end

function TestExpandStirling:test_values_against_gsl()
  local J = stirling_integral()
  local out = J:series { order = 8 }
  for _, L in ipairs({ 10, 20, 40 }) do
    -- Gamma(L + 1)/L^(L+1) from gsl_sf_lngamma_complex_e
    local lnr = gsl.lngamma_complex(L + 1, 0)
    local ref = math.exp(lnr - (L + 1) * math.log(L))
    -- 8 terms: the error is about the 9th, gamma_8 L^-8.5 e^-L
    H.close(out[1]:value(L, 8), ref, 3 * math.abs(rtonumber(stirling(8)[8])) * L ^ -8 + 1e-13,
      "series value at lam = " .. L)
    for n = 1, 6 do
      local r = J:expand { lam = L, order = n }
      lu.assertEquals(#r.contributions, 1, "one contribution")
      within(r.value, r.error, ref, 1e-13 * ref,
        string.format("J:expand{lam = %d, order = %d}", L, n))
    end
  end
end

---------------------------------------------------------------------------------------

TestExpandAiry = {}

-- Ai(x) = (1/2 pi) int exp(i (t^3/3 + x t)) dt along the real line (DLMF 9.5.4, number
-- from memory). For x > 0 the saddle t = i sqrt(x) gives DLMF 9.7.5 (from memory):
--   Ai(x) ~ e^{-zeta}/(2 sqrt(pi) x^(1/4)) sum (-1)^k u_k zeta^-k,  zeta = (2/3) x^(3/2),
-- with u_k = (2k+1)(2k+3)...(6k-1)/(216^k k!) (DLMF 9.7.2, from memory), i.e. the ratio
-- u_k/u_(k-1) = (6k-5)(6k-3)(6k-1)/(216 k (2k-1)), which gives u_1 = 5/72 and
-- u_2 = 385/10368 as DLMF lists them (checked below). For x < 0 the saddles -+sqrt|x|
-- (F = +-i zeta) give DLMF 9.7.9: Ai(-|x|) ~ (1/(sqrt(pi)|x|^(1/4))) [cos(zeta - pi/4)
-- sum (-1)^k u_2k zeta^-2k + sin(zeta - pi/4) sum (-1)^k u_(2k+1) zeta^-(2k+1)], the real
-- part of twice the contribution with F = +i zeta, whose terms are then
--   sqrt(pi) |x|^(-1/4) e^{i (zeta - pi/4)} u_k (-i)^k zeta^-k   (times 2 pi for J).
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

function TestExpandAiry:test_u_coefficients()
  local u = airy_u(2)
  H.close(u[1], 5 / 72, 1e-15, "u_1 = 5/72 (DLMF 9.7.2)")
  H.close(u[2], 385 / 10368, 1e-15, "u_2 = 385/10368 (DLMF 9.7.2)")
end

function TestExpandAiry:test_positive_x_terms()
  local J = airy_integral()
  local u = airy_u(8)
  for _, xv in ipairs({ 8, 15 }) do
    local zeta = 2 / 3 * xv ^ 1.5
    local r = J:expand { x = xv, order = 8 }
    lu.assertEquals(#r.contributions, 1, "x = " .. xv .. ": one contribution")
    local c = r.contributions[1]
    lu.assertEquals(c.kind, "saddle")
    H.close(c.at, C(0, math.sqrt(xv)), 1e-12, "saddle at i sqrt(x)")
    lu.assertEquals(c.used, 8, "terms used")
    H.close(c.terms[1], math.sqrt(pi) * xv ^ -0.25 * math.exp(-zeta), 1e-12,
      "x = " .. xv .. ": leading term")
    for k = 1, 7 do
      H.close(c.terms[k + 1] / c.terms[1], (-1) ^ k * u[k] / zeta ^ k, 1e-11,
        string.format("x = %g: term ratio %d (DLMF 9.7.5)", xv, k))
    end
  end
end

function TestExpandAiry:test_negative_x_terms()
  local J = airy_integral()
  local u = airy_u(8)
  for _, xv in ipairs({ -8, -15 }) do
    local ax = -xv
    local zeta = 2 / 3 * ax ^ 1.5
    local r = J:expand { x = xv, order = 8 }
    lu.assertEquals(#r.contributions, 2, "x = " .. xv .. ": two contributions")
    for _, c in ipairs(r.contributions) do
      lu.assertEquals(c.kind, "saddle")
      local sign = c.F:im() > 0 and 1 or -1      -- F = sign * i zeta
      H.close(c.F, C(0, sign * zeta), 1e-13, "F at the saddle")
      H.close(c.at, -sign * math.sqrt(ax), 1e-12, "saddle at -+sqrt|x|")
      H.close(c.terms[1], math.sqrt(pi) * ax ^ -0.25 * steep.exp(C(0, sign * (zeta - pi / 4))),
        1e-11, string.format("x = %g, saddle %s: leading term", xv, tostring(c.at)))
      for k = 1, 7 do
        H.close(c.terms[k + 1] / c.terms[1], u[k] * C(0, -sign) ^ k / zeta ^ k, 1e-11,
          string.format("x = %g, saddle %s: term ratio %d (DLMF 9.7.9)", xv, tostring(c.at), k))
      end
    end
  end
end

function TestExpandAiry:test_values_against_gsl()
  local J = airy_integral()
  for _, xv in ipairs({ 8, 15, -8, -15 }) do
    local ref, ref_err = gsl.airy_Ai(xv)   -- gsl_sf_airy_Ai_e
    local prev
    for n = 1, 6 do
      local r = J:expand { x = xv, order = n }
      lu.assertEquals(#r.contributions, xv > 0 and 1 or 2, "contributions")
      local v, e = r.value / (2 * pi), r.error / (2 * pi)
      within(v, e, ref, ref_err, string.format("Ai(%g) with %d terms", xv, n))
      lu.assertTrue(e < ref_err + 0.05 * math.abs(ref), "error estimate small")
      if xv > 0 and prev then lu.assertTrue(e < prev, "error estimate falls with n") end
      prev = e
    end
  end
end

---------------------------------------------------------------------------------------

TestExpandEndpoint = {}

-- e^x E1(x) = int_0^inf e^{-x t}/(1 + t) dt (DLMF 6.2.2, number from memory) and its
-- expansion e^x E1(x) ~ sum (-1)^n n!/x^(n+1) (DLMF 6.12.1, number from memory).
local function expint_integral()
  return steep.integral { var = t, exponent = -x * t, amplitude = 1 / (1 + t),
    contour = steep.line(0, steep.inf(0)), large = x }
end

local function factorial(n)
  local f = 1
  for k = 2, n do f = f * k end
  return f
end

function TestExpandEndpoint:test_optimal_truncation()
  local J = expint_integral()
  local X = 10
  local ref, ref_err = gsl.expint_E1(X)     -- gsl_sf_expint_E1_e
  ref, ref_err = math.exp(X) * ref, math.exp(X) * ref_err
  local r = J:expand { x = X, order = "optimal" }
  lu.assertEquals(#r.contributions, 1, "one contribution")
  local c = r.contributions[1]
  lu.assertEquals(c.kind, "endpoint")
  lu.assertEquals(c.at, C(0, 0))
  lu.assertTrue(c.used >= 9 and c.used <= 11, "stops near n = x: used " .. c.used)
  for n = 0, math.min(8, c.used - 1) do
    H.close(c.terms[n + 1], (-1) ^ n * factorial(n) / X ^ (n + 1), 1e-12, "term " .. n)
  end
  -- the smallest term 9!/10^10 = 10!/10^11, and half again (the terms alternate: a
  -- Stieltjes series, whose remainder is below the smallest term; expand.truncate)
  H.close(r.error, 1.5 * factorial(9) / X ^ 10, 1e-10, "reported error = 1.5 x the smallest term")
  local d = cabs(r.value - ref)
  within(r.value, r.error, ref, ref_err, "e^10 E1(10), optimal")
  lu.assertTrue(d >= r.error / 4.5, string.format("actual error %.3g within a factor 3 of the "
    .. "smallest term %.3g", d, r.error / 1.5))
end

-- (x = 50..200: the coefficients come from Cauchy's formula on a circle in w, and the
-- pole of 1/(1 + t) at w = -x must stay outside it)
function TestExpandEndpoint:test_fixed_orders_against_gsl()
  local J = expint_integral()
  for _, X in ipairs({ 10, 20, 50, 100, 200 }) do
    local ref, ref_err = gsl.expint_E1(X)
    ref, ref_err = math.exp(X) * ref, math.exp(X) * ref_err
    for n = 1, 8 do
      local r = J:expand { x = X, order = n }
      within(r.value, r.error, ref, ref_err, string.format("e^x E1(x), x = %g, %d terms", X, n))
      -- the reported error is at least the next term (k!/x^(k+1), exact) and at most a
      -- few of the next terms' sum (expand.remainder: three of them and a geometric rest,
      -- at most doubled), or the rounding floor where that is larger, plus the
      -- coefficients' own error estimates (below 1e-12 of the value here)
      local nxt = factorial(n) / X ^ (n + 1)
      local three = nxt * (1 + (n + 1) / X + (n + 1) * (n + 2) / X ^ 2)
      lu.assertTrue(r.error >= nxt * (1 - 1e-10) and
        r.error <= math.max(4 * three, 1e-13 * ref) + 1e-12 * ref, string.format("reported "
        .. "error %.6g: between the next term %.6g and four times the next three", r.error, nxt))
    end
  end
end

-- Watson's lemma to order 150: G(w) = 1/(1 + w) (the pole of the amplitude at t = -1 is
-- the nearest singularity, |w| = 1), so c_k = (-1)^k k! exactly (DLMF 6.12.1 for
-- e^x E1(x), from memory), within the reported errors, and to 1e-10 relative up to
-- order 100.
function TestExpandEndpoint:test_series_coefficients_to_order_150()
  local c = expint_integral():series { order = 150 }[1]
  local kfact = 1.0   -- (in floating point: 21! is past the 64-bit integers)
  for k = 0, 149 do
    if k > 0 then kfact = kfact * k end
    local want = (-1) ^ k * kfact
    local d = cabs(c.coefficients[k + 1] - want)
    lu.assertTrue(d <= c.errors[k + 1], string.format("c_%d: error %.3g beyond the reported "
      .. "%.3g", k, d, c.errors[k + 1]))
    lu.assertTrue(c.errors[k + 1] <= 1e-8 * math.abs(want), "a meaningful estimate at " .. k)
    if k <= 100 then H.close(c.coefficients[k + 1], want, 1e-10, "c_" .. k .. " = (-1)^k k!") end
  end
end

function TestExpandEndpoint:test_series_coefficients()
  local J = expint_integral()
  local out = J:series { order = 12 }
  lu.assertEquals(#out, 1, "one contribution")
  local c = out[1]
  lu.assertEquals(c.kind, "endpoint")
  H.close(c.phi, 0, 1e-15, "phi(0)", 1)
  for k = 0, 11 do
    lu.assertEquals(c.powers[k + 1], k + 1, "power")
    H.close(c.coefficients[k + 1], (-1) ^ k * factorial(k), 1e-12, "c_" .. k .. " = (-1)^k k!")
  end
end

---------------------------------------------------------------------------------------

TestExpandAlgebraicEndpoint = {}

-- int_0^inf t^(-1/2) e^{-x t} dt = Gamma(1/2) x^(-1/2) = sqrt(pi/x) (DLMF 5.2.1 with
-- t = u/x, and Gamma(1/2) = sqrt(pi), DLMF 5.4.6; numbers from memory): Watson's lemma
-- (DLMF 2.3.2, from memory) is exact here with one term. The amplitude written three ways.
local function sqrt_amplitudes()
  return { { "t^(-0.5)", t ^ (-0.5) }, { "1/sqrt(t)", 1 / steep.sqrt(t) },
    { "sqrt(t)^-1", steep.sqrt(t) ^ -1 } }
end

function TestExpandAlgebraicEndpoint:test_inverse_square_root()
  for _, a in ipairs(sqrt_amplitudes()) do
    local J = steep.integral { var = t, exponent = -x * t, amplitude = a[2],
      contour = steep.line(0, steep.inf(0)), large = x }
    for _, X in ipairs({ 3, 50 }) do
      local msg = string.format("amplitude %s, x = %g", a[1], X)
      local r = J:expand { x = X, order = 1 }
      lu.assertEquals(#r.contributions, 1, msg .. ": one contribution")
      local c = r.contributions[1]
      lu.assertStrContains(c.kind, "endpoint", false, msg)
      lu.assertEquals(c.beta, -0.5, msg .. ": beta")
      H.close(r.value, math.sqrt(pi / X), 1e-13, msg)
      within(r.value, r.error, math.sqrt(pi / X), 0, msg)
    end
  end
end

-- int_0^inf t^(a-1) e^{-x t}/(1 + t) dt ~ sum (-1)^n Gamma(n + a) x^-(n+a): the geometric
-- series 1/(1+t) = sum (-t)^n (DLMF 4.6.7 with alpha = -1) term by term, Watson's lemma.
local function watson_integral(a)
  return steep.integral { var = t, exponent = -x * t, amplitude = t ^ (a - 1) / (1 + t),
    contour = steep.line(0, steep.inf(0)), large = x }
end

function TestExpandAlgebraicEndpoint:test_watson_terms()
  for _, a in ipairs({ 0.5, 1.5 }) do
    local J = watson_integral(a)
    local X = 10
    local r = J:expand { x = X, order = 8 }
    lu.assertEquals(#r.contributions, 1, "one contribution")
    local c = r.contributions[1]
    lu.assertEquals(c.beta, a - 1, "beta")
    for n = 0, 7 do
      H.close(c.terms[n + 1], (-1) ^ n * gsl.gamma(n + a) / X ^ (n + a), 1e-12,
        string.format("a = %g, term %d", a, n))
    end
    -- the reference value by quadrature along the real axis (the integrand is positive)
    local q, qe = J:quad { x = X, along = "given" }
    within(r.value, r.error, q, qe, string.format("a = %g, x = %g, 8 terms", a, X))
  end
end

-- The same Watson coefficients from steep.expand's endpoint series directly (the part of
-- the expansion that does not depend on how the contour is decomposed).
function TestExpandAlgebraicEndpoint:test_endpoint_series_directly()
  for _, a in ipairs({ 0.5, 1.5 }) do
    local J = watson_integral(a)
    local X = 10
    local b, Fa, beta = expand_m.endpoint_series(J, { x = X }, C(0, 0), 12)
    lu.assertEquals(beta, a - 1, "beta")
    H.close(Fa, 0, 1e-15, "F(0)", 1)
    local terms = expand_m.endpoint_terms(b, beta, 12)
    for n = 0, 11 do
      H.close(terms[n + 1], (-1) ^ n * gsl.gamma(n + a) / X ^ (n + a), 1e-12,
        string.format("a = %g, term %d", a, n))
    end
  end
  for _, a in ipairs(sqrt_amplitudes()) do
    local J = steep.integral { var = t, exponent = -x * t, amplitude = a[2],
      contour = steep.line(0, steep.inf(0)), large = x }
    local b, _, beta = expand_m.endpoint_series(J, { x = 3 }, C(0, 0), 4)
    lu.assertEquals(beta, -0.5, a[1] .. ": beta")
    local terms = expand_m.endpoint_terms(b, beta, 4)
    H.close(terms[1], math.sqrt(pi / 3), 1e-13, a[1] .. ": first term")
    for n = 1, 3 do H.close(terms[n + 1], 0, 1e-14, a[1] .. ": term " .. n, 1) end
  end
end

---------------------------------------------------------------------------------------

TestExpandSaddleAtEndpoint = {}

-- int_0^inf e^{-x t^2} dt = (1/2) sqrt(pi/x) (half of the Gaussian integral, DLMF 7.4.1
-- with erfc(0) = 1, from memory): the contour starts at the saddle, one descent ray.
function TestExpandSaddleAtEndpoint:test_half_gaussian()
  local J = steep.integral { var = t, exponent = -x * t ^ 2,
    contour = steep.line(0, steep.inf(0)), large = x }
  for _, X in ipairs({ 3, 40 }) do
    local ref = 0.5 * math.sqrt(pi / X)
    for _, n in ipairs({ 1, 3 }) do
      local msg = string.format("x = %g, %d terms", X, n)
      local r = J:expand { x = X, order = n }
      lu.assertEquals(#r.contributions, 1, msg .. ": one contribution")
      lu.assertStrContains(r.contributions[1].kind, "endpoint", false, msg)
      lu.assertStrContains(r.contributions[1].kind, "saddle", false, msg)
      H.close(r.value, ref, 1e-13, msg)
      within(r.value, r.error, ref, 0, msg)
    end
  end
end

---------------------------------------------------------------------------------------

TestExpandDegenerateSaddle = {}

-- int along the real line of exp(-x t^m), m even, = 2 Gamma(1 + 1/m) x^(-1/m) (DLMF 5.2.1
-- with t^m = u/x; 5.5.1 for Gamma(1 + 1/m) = Gamma(1/m)/m; from memory).
local function even_power(m)
  return steep.integral { var = t, exponent = -x * t ^ m,
    contour = steep.line(steep.inf(pi), steep.inf(0)), large = x }
end

function TestExpandDegenerateSaddle:test_quartic_and_sextic()
  for _, m in ipairs({ 4, 6 }) do
    local J = even_power(m)
    for _, X in ipairs({ 3, 30 }) do
      local ref, ref_err = gsl.gamma(1 + 1 / m)
      ref, ref_err = 2 * ref * X ^ (-1 / m), 2 * ref_err * X ^ (-1 / m)
      local msg = string.format("exp(-x t^%d), x = %g", m, X)
      local r = J:expand { x = X, order = 1 }
      lu.assertEquals(#r.contributions, 1, msg .. ": one contribution")
      lu.assertEquals(r.contributions[1].kind, "saddle of order " .. m, msg)
      lu.assertEquals(r.contributions[1].order, m, msg)
      H.close(r.value, ref, 1e-13, msg)
      within(r.value, r.error, ref, ref_err, msg)
    end
  end
end

-- The largest order the expansions support (steep.expand.MAX_SADDLE_ORDER = 8).
function TestExpandDegenerateSaddle:test_order_8()
  local J = even_power(8)
  local ref = 2 * gsl.gamma(1 + 1 / 8) * 3 ^ (-1 / 8)
  local r = J:expand { x = 3, order = 1 }
  lu.assertEquals(r.contributions[1].kind, "saddle of order 8")
  H.close(r.value, ref, 1e-13, "exp(-3 t^8)")
  within(r.value, r.error, ref, 0, "exp(-3 t^8)")
end

-- Rays out of the saddle of exp(-x t^m) at 0: along the ray of angle th (m th = 0 mod 2 pi)
-- the integral is e^{i th} Gamma(1 + 1/m) x^(-1/m) (as above). From the valley at 2 pi/3
-- to the one at -2 pi/3 through 0 (cubic): -i sqrt(3) Gamma(4/3) x^(-1/3).
local function ray(m, th, X) return steep.exp(C(0, th)) * gsl.gamma(1 + 1 / m) * X ^ (-1 / m) end

function TestExpandDegenerateSaddle:test_cubic_rays()
  local J = steep.integral { var = t, exponent = -x * t ^ 3,
    contour = steep.path { steep.inf(2 * pi / 3), 0, steep.inf(-2 * pi / 3) }, large = x }
  for _, X in ipairs({ 3, 30 }) do
    local ref = ray(3, -2 * pi / 3, X) - ray(3, 2 * pi / 3, X)
    H.close(ref, C(0, -math.sqrt(3) * gsl.gamma(4 / 3) * X ^ (-1 / 3)), 1e-14, "reference")
    local r = J:expand { x = X, order = 2 }
    lu.assertEquals(#r.contributions, 1, "one contribution")
    lu.assertEquals(r.contributions[1].kind, "saddle of order 3")
    H.close(r.value, ref, 1e-13, "cubic, x = " .. X)
    within(r.value, r.error, ref, 0, "cubic, x = " .. X)
  end
end

-- The contour turns through a right angle (quartic) or 120 degrees (cubic) at the saddle.
function TestExpandDegenerateSaddle:test_contour_turning_at_the_saddle()
  local cases = {
    { 3, steep.path { steep.inf(2 * pi / 3), 0, steep.inf(0) }, 2 * pi / 3, 0 },
    { 4, steep.path { steep.inf(pi / 2), 0, steep.inf(0) }, pi / 2, 0 },
    { 4, steep.path { steep.inf(pi / 2), C(1, 1), steep.inf(0) }, pi / 2, 0 } }
  for _, cs in ipairs(cases) do
    local m, contour, from, to = cs[1], cs[2], cs[3], cs[4]
    local J = steep.integral { var = t, exponent = -x * t ^ m, contour = contour, large = x }
    local X = 3
    local ref = ray(m, to, X) - ray(m, from, X)
    local msg = string.format("exp(-x t^%d) along %s", m, tostring(contour))
    local ok, r = pcall(J.expand, J, { x = X, order = 1 })
    if not ok then lu.fail(msg .. ": " .. tostring(r)) end
    lu.assertEquals(r.contributions[1].kind, "saddle of order " .. m, msg)
    H.close(r.value, ref, 1e-13, msg)
    within(r.value, r.error, ref, 0, msg)
  end
end

---------------------------------------------------------------------------------------

TestExpandCheck = {}

-- J:check against quadrature on the Airy integral: verified, and the relative error falls
-- with x (the observed order is negative; 1.5 k for k terms, since zeta ~ x^(3/2)).
function TestExpandCheck:test_airy_check()
  local J = airy_integral()
  for _, n in ipairs({ 1, 2, 4 }) do
    local c = J:check { x = { 4, 8, 16 }, order = n }
    lu.assertTrue(c.verified, "verified with " .. n .. " terms:\n" .. c:report())
    lu.assertEquals(#c.rows, 3)
    lu.assertNotNil(c.observed_order, "observed order")
    lu.assertTrue(c.observed_order < 0, "observed order negative: " .. c.observed_order)
    -- the k-th term is O(zeta^-k) = O(x^(-3k/2)): the slope is near -1.5 n
    lu.assertTrue(c.observed_order < -1.2 * n and c.observed_order > -1.8 * n,
      string.format("observed order %.3g near %.3g", c.observed_order, -1.5 * n))
    for i, row in ipairs(c.rows) do
      H.close(row.quad / (2 * pi), gsl.airy_Ai(row.x), 1e-10, "quadrature at x = " .. row.x)
      if i > 1 then lu.assertTrue(row.relative_error < c.rows[i - 1].relative_error) end
    end
  end
end

---------------------------------------------------------------------------------------

TestExpandDecomposition = {}

-- Where the ends of the descent paths decide the saddles' weights, the decomposition
-- takes them from the ends without tracing ascent paths; they must equal the crossing
-- numbers with the ascent paths (the classical rule, e.g. Berry & Howls 1991). Cases, on
-- contours that pass through no saddle (through a saddle the contour's own directions
-- decide): Airy's integral with one contributing saddle (complex x) and with two, a
-- Gaussian with a crossed pole, Stirling's integral from its endpoint (a sink), a quartic
-- (degenerate) saddle, and an exponent with three saddles.
function TestExpandDecomposition:test_weights_from_ends_equal_crossing_numbers()
  local decompose = require "steep.decompose"
  local tv, xv = steep.var "t", steep.param "x"
  local line = steep.line(steep.inf(pi), steep.inf(0))
  local above = steep.path { steep.inf(pi), -3 + 0.5 * I, 3 + 0.5 * I, steep.inf(0) }
  local cases = {
    -- (at real x > 0 Airy's integral lies on a Stokes line, and at x < 0 the real line
    -- runs through both saddles: neither is a case for the ends)
    { steep.integral { var = tv, exponent = I * (tv ^ 3 / 3 + xv * tv), contour = line },
      { x = C(4 * math.cos(0.3), 4 * math.sin(0.3)) } },
    { steep.integral { var = tv, exponent = I * (tv ^ 3 / 3 + xv * tv), contour = above }, { x = -4 } },
    { steep.integral { var = tv, exponent = -xv * tv ^ 2 / 2 + I * tv, amplitude = 1 / (tv - 0.5 * I),
        contour = line }, { x = 3 } },
    { steep.integral { var = tv, exponent = xv * (steep.log(tv) - tv),
        contour = steep.path { 0, 1 + I, steep.inf(0) } }, { x = 5 } },
    { steep.integral { var = tv, exponent = -xv * tv ^ 4, contour = above }, { x = 2 } },
    { steep.integral { var = tv, exponent = -xv * (tv ^ 4 / 4 - tv ^ 2 / 2), contour = above },
      { x = C(3 * math.cos(0.2), 3 * math.sin(0.2)) } },   -- (real x: saddle connections)
  }
  for n, case in ipairs(cases) do
    local J, p = case[1], case[2]
    local L = J:_landscape(p, nil, false)
    local a = decompose.decompose_uncached(J, p, L, J.contour)
    local b = decompose.decompose_uncached(J, p, L, J.contour, { by_crossings = true })
    local msg = "case " .. n
    lu.assertEquals(a.status, "ok", msg)
    lu.assertEquals(b.status, "ok", msg)
    local function weights(plan)
      local w = {}
      for _, piece in ipairs(plan.pieces) do
        w[#w + 1] = string.format("%s %s %s %d", piece.kind, tostring(piece.index),
          tostring(piece.ray), piece.weight)
      end
      for _, r in ipairs(plan.residues) do w[#w + 1] = "residue " .. r.index .. " " .. r.winding end
      return table.concat(w, "; ")
    end
    lu.assertEquals(weights(a), weights(b), msg)
    lu.assertEquals(a.weights_by, "ends", msg .. ": weights found from the ends")
    lu.assertEquals(b.weights_by, "crossings", msg)
  end
end

TestExpandErrors = {}

-- After an error the module must still work: a quick expansion that is exact.
local function still_usable()
  local J = steep.integral { var = t, exponent = -x * t ^ 2,
    contour = steep.line(0, steep.inf(0)), large = x }
  H.close(J:expand { x = 2, order = 1 }.value, 0.5 * math.sqrt(pi / 2), 1e-13, "still usable")
end

function TestExpandErrors:test_bad_order()
  local J = airy_integral()
  local JS = stirling_integral()
  for _, o in ipairs({ 0, 1.5, "many", -3, 201 }) do
    local frag = { "option 'order' must be a whole number of terms from 1 to 200",
      "got " .. tostring(o) }
    H.raises({ "expand:", table.unpack(frag) }, J.expand, J, { x = 8, order = o })
    H.raises({ "series:", table.unpack(frag) }, JS.series, JS, { order = o })
    H.raises({ "check:", table.unpack(frag) }, J.check, J, { x = { 4, 8 }, order = o })
    still_usable()
  end
end

function TestExpandErrors:test_not_standard_form()
  local J = steep.integral { var = t, exponent = x * t - t ^ 2,
    contour = steep.line(steep.inf(pi), steep.inf(0)), large = x }
  H.raises({ "series:", "standard form", "not x times a function of t" }, J.series, J,
    { order = 3 })
  local J2 = steep.integral { var = t, exponent = -x * t ^ 2, amplitude = 1 + x * t,
    contour = steep.line(steep.inf(pi), steep.inf(0)), large = x }
  H.raises({ "standard form", "amplitude depends on the large parameter x" }, J2.series, J2,
    { order = 3 })
  still_usable()
end

-- exp(-x (t + 1/t)) on (0, inf): an essential singularity of the exponent at the endpoint
-- 0 (the integrand vanishes there, but the library does not take such ends).
function TestExpandErrors:test_essential_singularity_at_endpoint()
  local J = steep.integral { var = t, exponent = -x * (t + 1 / t),
    contour = steep.line(0, steep.inf(0)), large = x }
  H.raises({ "essential", "lies on the contour at 0" }, J.expand, J, { x = 3, order = 2 })
  H.raises({ "essential", "lies on the contour at 0" }, J.series, J, { order = 2 })
  still_usable()
end

function TestExpandErrors:test_saddle_order_above_8()
  -- order 10 at 0 (F' has a 9-fold zero)
  local J = steep.integral { var = t, exponent = -x * t ^ 10,
    contour = steep.line(steep.inf(pi), steep.inf(0)), large = x }
  H.raises({ "saddle of order 10", "orders above 8 are not supported" }, J.expand, J,
    { x = 3, order = 1 })
  H.raises({ "saddle of order 10", "orders above 8 are not supported" }, J.series, J,
    { order = 2 })
  -- order 9 at 0, between the valleys at -+2 pi/9
  local J9 = steep.integral { var = t, exponent = -x * t ^ 9,
    contour = steep.path { steep.inf(-2 * pi / 9), 0, steep.inf(2 * pi / 9) }, large = x }
  H.raises({ "saddle of order 9", "orders above 8 are not supported" }, J9.expand, J9,
    { x = 3, order = 1 })
  still_usable()
end
