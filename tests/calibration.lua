-- Families of integrals with published or exact values, for calibrating the error
-- estimates of J:expand: each family has an integral, four values of its large parameter
-- and a reference function. Sources beside each.
local steep = require "steep"
local gsl = require "gslref"
local big = require "bigint"

local t, z, x = steep.var "t", steep.var "z", steep.param "x"
local I, pi, C = steep.I, math.pi, steep.complex
local REAL_LINE = steep.line(steep.inf(pi), steep.inf(0))

local M = {}

local function lngamma(v) return (gsl.lngamma_complex(v, 0)) end   -- gsl_sf_lngamma_complex

-- Ai(z) for complex z by its Maclaurin series (DLMF 9.4.1; Ai(0), Ai'(0) by DLMF
-- 9.2.3-9.2.4 with gsl_sf_gamma): a few digits lost for |z| <= 6.
function M.ai_maclaurin(zv)
  local c1 = 3 ^ (-2 / 3) / gsl.gamma(2 / 3)
  local c2 = 3 ^ (-1 / 3) / gsl.gamma(1 / 3)
  local z3 = zv * zv * zv
  local tf, tg = C(1, 0), zv * 1
  local f, g = tf, tg
  for k = 0, 300 do
    tf = tf * z3 * (3 * (1 / 3 + k)) / ((3 * k + 1) * (3 * k + 2) * (3 * k + 3))
    tg = tg * z3 * (3 * (2 / 3 + k)) / ((3 * k + 2) * (3 * k + 3) * (3 * k + 4))
    f, g = f + tf, g + tg
    if tf:abs() + tg:abs() < 1e-18 * (f:abs() + g:abs()) then break end
  end
  return c1 * f - c2 * g
end

M.families = {
  -- Gamma(x + 1) = integral_0^inf t^x e^-t dt (DLMF 5.2.1): a saddle at t = x
  { name = "gamma", values = { 5, 10, 20, 50 },
    integral = steep.integral { var = t, exponent = x * steep.log(t) - t,
      contour = steep.line(0, steep.inf(0)), large = x },
    ref = function(v)   -- x! exactly (integers by the product)
      local f = big.new(1)
      for k = 2, v do f = f:mul(k) end
      return C(f:tonumber(), 0), 0
    end },
  -- e^x E1(x) = integral_0^inf e^{-x t}/(1 + t) dt (DLMF 6.7.1 with t -> x(1 + t)):
  -- Watson's lemma at the endpoint; gsl_sf_expint_E1
  { name = "expint", values = { 5, 10, 20, 40 },
    integral = steep.integral { var = t, exponent = -x * t, amplitude = 1 / (1 + t),
      contour = steep.line(0, steep.inf(0)), large = x },
    ref = function(v)
      local e1, err = gsl.expint_E1(v)
      return C(math.exp(v) * e1, 0), math.exp(v) * err * 2
    end },
  -- 2 pi Ai(x) = integral over the real line of exp(i(t^3/3 + x t)) (DLMF 9.5.1): on a
  -- Stokes line for x > 0; gsl_sf_airy_Ai
  { name = "airy+", values = { 2, 4, 8, 16 },
    integral = steep.integral { var = t, exponent = I * (t ^ 3 / 3 + x * t), contour = REAL_LINE,
      large = x },
    ref = function(v)
      local ai, err = gsl.airy_Ai(v)
      return C(2 * pi * ai, 0), 2 * pi * err
    end },
  -- the same for x < 0: two real saddles on the contour
  { name = "airy-", values = { -2, -4, -8, -16 },
    integral = steep.integral { var = t, exponent = I * (t ^ 3 / 3 + x * t), contour = REAL_LINE,
      large = x },
    ref = function(v)
      local ai, err = gsl.airy_Ai(v)
      return C(2 * pi * ai, 0), 2 * pi * err
    end },
  -- amplitude 1 + t^2: 2 pi (1 - x) Ai(x), since the integral of t^2 e^{...} is
  -- -d^2/dx^2 of 2 pi Ai and Ai'' = x Ai (DLMF 9.2.1)
  { name = "airy t^2", values = { 3, 6, 12, 24 },
    integral = steep.integral { var = t, exponent = I * (t ^ 3 / 3 + x * t), amplitude = 1 + t ^ 2,
      contour = REAL_LINE, large = x },
    ref = function(v)
      local ai, err = gsl.airy_Ai(v)
      return C(2 * pi * (1 - v) * ai, 0), 2 * pi * (1 + math.abs(v)) * err
    end },
  -- complex x next to Ai's Stokes line arg x = 2 pi/3 (DLMF 9.7) and on it; the
  -- contour through the middle of the valleys; Maclaurin sum (DLMF 9.4.1)
  { name = "airy complex", values = { 4 * C(math.cos(2.0), math.sin(2.0)),
      4 * C(math.cos(2 * pi / 3), math.sin(2 * pi / 3)), 5 * C(math.cos(2.2), math.sin(2.2)),
      6 * C(math.cos(1.8), math.sin(1.8)) },
    integral = steep.integral { var = t, exponent = I * (t ^ 3 / 3 + x * t),
      contour = steep.path { steep.inf(5 * pi / 6), 0, steep.inf(pi / 6) }, large = x },
    ref = function(v) return 2 * pi * M.ai_maclaurin(v) end },
  -- Bessel's circle integral J_n(x) (DLMF 10.12.1) at x = n/2 (one real saddle of two
  -- counts); gsl_sf_bessel_Jn
  { name = "bessel circle", values = { 10, 20, 40, 80 },
    integral = steep.integral { var = z, exponent = (x / 4) * (z - 1 / z) - (x + 1) * steep.log(z),
      amplitude = 1 / (2 * pi * I), contour = steep.circle(0, 1), large = x },
    ref = function(v)
      local j, err = gsl.bessel_Jn(math.tointeger(v), v / 2)
      return C(j, 0), err
    end },
  -- the same at x = 2n (two complex saddles on the unit circle)
  { name = "bessel oscillatory", values = { 10, 20, 40, 80 },
    integral = steep.integral { var = z, exponent = x * (z - 1 / z) - (x + 1) * steep.log(z),
      amplitude = 1 / (2 * pi * I), contour = steep.circle(0, 1), large = x },
    ref = function(v)
      local j, err = gsl.bessel_Jn(math.tointeger(v), 2 * v)
      return C(j, 0), err
    end },
  -- K_nu(x) = integral_0^inf e^{-x cosh t} cosh(nu t) dt (DLMF 10.32.9), nu = 1/3: an
  -- exponent of exponential type, a saddle at the endpoint; gsl_sf_bessel_Knu_scaled
  { name = "bessel K", values = { 5, 10, 25, 50 },
    integral = steep.integral { var = t, exponent = -x * steep.cosh(t), amplitude = steep.cosh(t / 3),
      contour = steep.line(0, steep.inf(0)), large = x },
    ref = function(v)
      local k, err = gsl.bessel_Knu_scaled(1 / 3, v)
      return C(k * math.exp(-v), 0), err * math.exp(-v)
    end },
  -- Catalan numbers C_n = [z^n] (1+z)^(2n)/(n+1) = binom(2n, n)/(n+1) (exact integers)
  { name = "catalan", values = { 10, 20, 50, 100 },
    integral = steep.integral { var = z, exponent = 2 * x * steep.log(1 + z) - (x + 1) * steep.log(z),
      amplitude = 1 / ((x + 1) * 2 * pi * I), contour = steep.circle(0, 0.5), large = x },
    ref = function(v) return C(big.binomial(2 * v, v):div(v + 1):tonumber(), 0), 0 end },
  -- central Delannoy numbers sum_k C(n,k) C(n+k,k) = [z^n] (1+z)^n (1-z)^(-n-1) (exact sum)
  { name = "delannoy", values = { 10, 20, 50, 100 },
    integral = steep.integral { var = z, exponent = x * steep.log(1 + z) - (x + 1) * steep.log(1 - z)
      - (x + 1) * steep.log(z), amplitude = 1 / (2 * pi * I), contour = steep.circle(0, 0.3),
      large = x },
    ref = function(v)   -- exact integers
      local s = big.new(0)
      for k = 0, v do
        s = s + big.binomial(v, k):mul_big(big.binomial(v + k, k))
      end
      return C(s:tonumber(), 0), 0
    end },
  -- the Poisson probability at its mode, e^{-k} k^k/k! = [z^k] e^{k(z - 1)} (k^k and k!
  -- exact integers, e^-k to rounding: 4e-16 relative)
  { name = "poisson", values = { 10, 20, 50, 100 },
    integral = steep.integral { var = z, exponent = x * (z - 1) - (x + 1) * steep.log(z),
      amplitude = 1 / (2 * pi * I), contour = steep.circle(0, 0.5), large = x },
    ref = function(v)
      local p, f = big.new(1), big.new(1)
      for k = 1, v do p, f = p:mul(v), f:mul(k) end
      local r = p:tonumber() / f:tonumber() * math.exp(-v)
      return C(r, 0), 4e-16 * r
    end },
  -- a pole near the saddle: integral of e^{-x t^2}/(t - i) over the real line = i pi w(i sqrt x)
  -- (DLMF 7.7.2 with t -> t sqrt x; w from libcerf)
  { name = "pole near saddle", values = { 4, 16, 64, 256 },
    integral = steep.integral { var = t, exponent = -x * t ^ 2, amplitude = 1 / (t - I),
      contour = REAL_LINE, large = x },
    ref = function(v)
      local re, im = gsl.faddeeva_w(0, math.sqrt(v))
      return C(0, pi) * C(re, im)
    end },
  -- an algebraic endpoint factor: integral_0^inf t^(-1/2) e^{-x t}/(1 + t) dt =
  -- pi e^x erfc(sqrt x) (from memory; at x -> 0 it is pi = integral of t^(-1/2)/(1+t))
  { name = "endpoint t^-1/2", values = { 5, 10, 20, 40 },
    integral = steep.integral { var = t, exponent = -x * t, amplitude = steep.sqrt(t) ^ -1 / (1 + t),
      contour = steep.line(0, steep.inf(0)), large = x },
    ref = function(v)
      local re, im = gsl.faddeeva_w(0, math.sqrt(v))   -- w(iy) = e^{y^2} erfc(y)
      return C(pi * re, 0)
    end },
  -- two saddles together (Airy-type uniform form): the t^2 family near its coalescence
  { name = "coalescing", values = { 0.25, 0.5, 1, 2 },
    integral = steep.integral { var = t, exponent = I * (t ^ 3 / 3 + x * t), amplitude = 1 + t ^ 2,
      contour = REAL_LINE, large = x },
    ref = function(v) return C(2 * pi * (1 - v) * gsl.airy_Ai(v), 0) end },
}

--- cells(orders) -> list of {family, x, order, value, error, ref, ratio = true/stated,
-- status}; failures as {family, x, order, failure = message}.
function M.cells(orders, families)
  local out = {}
  for _, f in ipairs(families or M.families) do
    for _, v in ipairs(f.values) do
      local ref, ref_err = f.ref(v)
      ref_err = ref_err or 0
      for _, order in ipairs(orders) do
        local ok, r = pcall(f.integral.expand, f.integral, { x = v, order = order })
        if ok then
          local d = (r.value - ref):abs()
          out[#out + 1] = { family = f.name, x = v, order = order, value = r.value,
            error = r.error, ref = ref, ref_error = ref_err, true_error = d,
            ratio = d / (r.error + ref_err), status = r.status, result = r }
        else
          out[#out + 1] = { family = f.name, x = v, order = order, failure = tostring(r) }
        end
      end
    end
  end
  return out
end

return M
