-- saddlepoint.lua — densities and tail probabilities of a sum (or mean) of n independent
-- copies of a random variable, from its cumulant generating function K(s).
--
-- Methods and sources:
--   density of the mean, leading term          Daniels, Ann. Math. Stat. 25 (1954) 631-650
--   tail probability P(mean >= x)              Lugannani & Rice, Adv. Appl. Prob. 12 (1980)
--   lattice variables (integer valued)         Daniels, Int. Stat. Rev. 55 (1987) 37-48,
--                                              second continuity correction; Butler,
--                                              Saddlepoint Approximations (2007) ch. 1-2
--   full uniform series of the tail            the Bromwich integral
--       P(mean >= x) = (1/2 pi i) * integral over Re s = c > 0 of e^{n (K(s) - s x)} / s ds
--     expanded by steep with the pole at s = 0 treated uniformly (Faddeeva function), which
--     stays accurate as x passes through the mean (where Lugannani-Rice needs its limit).
--
-- Parameters: K (an expression in the variable s), s (that variable), domain = {lo, hi}
-- (the open interval where K is finite), lattice = true for integer-valued variables.
-- Use it as a module:
--     local sp = dofile "recipes/saddlepoint.lua"   (or require with recipes/ on the path)
--     local d = sp.distribution { K = -steep.log(1 - s), s = s, domain = {-math.huge, 1} }
--     print(d:tail { n = 20, x = 1.5 }.p)
-- or run it: lua5.4 recipes/saddlepoint.lua  (prints a table for an invented example).
--
-- CAUTION: these are approximations. Validate them before they inform any decision about
-- money or safety; they are no substitute for the review your profession requires.

local steep = require "steep"
steep.require_version("0.1")

local M = {}
M.caution = "approximation: validate before it informs decisions about money or safety; "
  .. "no substitute for the review your profession requires"

local sqrt, exp, log, abs, pi, huge = math.sqrt, math.exp, math.log, math.abs, math.pi, math.huge
local faddeeva = require("steep.core").cmath.faddeeva

-- Normal distribution: Phi from erfc(x) = e^{-x^2} w(ix) for real x (DLMF 7.2.3, 7.2.2).
local function erfc(x)
  if x < 0 then return 2 - erfc(-x) end
  return exp(-x * x) * faddeeva(steep.complex(0, x)):re()
end
local function Phi_upper(z) return 0.5 * erfc(z / sqrt(2)) end      -- 1 - Phi(z)
local function phi(z) return exp(-0.5 * z * z) / sqrt(2 * pi) end
M.normal_upper = Phi_upper

local Dist = {}
Dist.__index = Dist

local function fail(msg) error("saddlepoint: " .. msg, 3) end

--- M.distribution{K =, s =, domain = {lo, hi}, lattice = false, name = "..."}
function M.distribution(spec)
  if type(spec) ~= "table" then fail("distribution{K =, s =, domain =} expected") end
  local K, s = spec.K, spec.s
  if not steep.is_expr(s) then fail("'s' must be the variable made by steep.var") end
  if not steep.is_expr(K) then fail("'K' must be an expression in " .. tostring(s)) end
  local dom = spec.domain or { -huge, huge }
  if type(dom) ~= "table" or type(dom[1]) ~= "number" or type(dom[2]) ~= "number"
      or not (dom[1] < 0 and dom[2] > 0) then
    fail("'domain' must be {lo, hi} with lo < 0 < hi (K is finite near 0)")
  end
  local d = setmetatable({ K = K, s = s, domain = dom, lattice = spec.lattice or false,
    name = spec.name or tostring(K) }, Dist)
  local K1 = steep.diff(K, s)
  local K2 = steep.diff(K1, s)
  local K3 = steep.diff(K2, s)
  d.tape = steep.compile({ K, K1, K2, K3 }, s)
  -- convexity on the domain, sampled (a CGF is convex: K'' is a variance)
  local lo = dom[1] == -huge and -20 or dom[1]
  local hi = dom[2] == huge and 20 or dom[2]
  for k = 1, 39 do
    local sv = lo + (hi - lo) * k / 40
    local ok, _, _, k2 = pcall(d.tape.eval, d.tape, sv, {})
    if ok then
      local re, im = k2:re(), k2:im()
      if re == re and abs(re) < huge and (re <= 0 or abs(im) > 1e-9 * abs(re)) then
        fail(string.format("K is not convex on its domain: K''(%g) = %s", sv, tostring(k2)))
      end
    end
  end
  local _, k1, k2, k3 = d.tape:eval(0, {})
  d.mean, d.variance, d.k3 = k1:re(), k2:re(), k3:re()
  return d
end

-- K and its derivatives at a real s.
function Dist:cumulants(sv)
  local k0, k1, k2, k3 = self.tape:eval(sv, {})
  return k0:re(), k1:re(), k2:re(), k3:re()
end

--- The saddlepoint: K'(s) = x, by Newton's method (bounded), inside the domain.
function Dist:saddlepoint(x)
  if type(x) ~= "number" or x ~= x then fail("threshold must be a number") end
  local sv = 0
  local lo, hi = self.domain[1], self.domain[2]
  for _ = 1, 200 do
    local _, k1, k2 = self:cumulants(sv)
    local step = (k1 - x) / k2
    local nxt = sv - step
    -- stay inside the domain: halve towards the edge instead of jumping out
    if nxt <= lo then nxt = 0.5 * (sv + (lo == -huge and sv - 10 * abs(step) - 1 or lo)) end
    if nxt >= hi then nxt = 0.5 * (sv + (hi == huge and sv + 10 * abs(step) + 1 or hi)) end
    if abs(nxt - sv) <= 1e-14 * (1 + abs(sv)) then sv = nxt; break end
    sv = nxt
    if abs(sv) > 1e6 then break end
  end
  local _, k1 = self:cumulants(sv)
  if not (abs(k1 - x) <= 1e-9 * (1 + abs(x))) or not (sv > lo and sv < hi) then
    fail(string.format("the threshold %g is outside the support: K'(s) = %g has no solution "
      .. "in the domain (%g, %g)", x, x, lo, hi))
  end
  return sv
end

local function check_n(n)
  if type(n) ~= "number" or n < 1 or n ~= math.floor(n) then
    fail("n (the number of summands) must be a whole number >= 1, got " .. tostring(n))
  end
end

local function probability(p, err, method, note)
  if not (p >= 0 and p <= 1) then
    return { p = nil, error = err, method = method, status = "failed",
      note = string.format("the approximation gave %.6g, outside [0, 1]: not a probability", p),
      caution = M.caution }
  end
  return { p = p, error = err, method = method, status = "estimated", note = note,
    caution = M.caution }
end

--- d:density{n =, x =}: density of the mean at x (Daniels 1954, leading term).
function Dist:density(opts)
  check_n(opts.n)
  local n, x = opts.n, opts.x
  local sv = self:saddlepoint(x)
  local k0, _, k2 = self:cumulants(sv)
  local f = sqrt(n / (2 * pi * k2)) * exp(n * (k0 - sv * x))
  -- the next term of Daniels' series is O(1/n): say so as the error scale
  return { density = f, error = f / n, saddlepoint = sv, method = "Daniels (leading term)",
    caution = M.caution }
end

-- Lugannani-Rice for the mean of a continuous variable; the limit at the mean
-- (Daniels 1987, (2.8)): 1/2 - lambda3 / (6 sqrt(2 pi n)), lambda3 = K'''/K''^(3/2).
function Dist:tail_lr(n, x)
  local sv = self:saddlepoint(x)
  local k0, _, k2, k3 = self:cumulants(sv)
  if abs(sv) * sqrt(n * k2) < 1e-5 then
    local l3 = k3 / k2 ^ 1.5
    return 0.5 - l3 / (6 * sqrt(2 * pi * n)), sv
  end
  local w = (sv > 0 and 1 or -1) * sqrt(2 * n * (sv * x - k0))
  local u = sv * sqrt(n * k2)
  return Phi_upper(w) + phi(w) * (1 / u - 1 / w), sv
end

-- Lattice (integer) variables: P(S >= k) for the sum S with the second continuity
-- correction (Daniels 1987; Butler 2007 sec. 1.2): saddlepoint at k - 1/2,
-- u = 2 sinh(s/2) sqrt(n K''(s)). From memory of those sources: the formula below.
function Dist:tail_lattice(n, k)
  local x = (k - 0.5) / n
  local sv = self:saddlepoint(x)
  local k0, _, k2, k3 = self:cumulants(sv)
  if abs(sv) * sqrt(n * k2) < 1e-5 then
    local l3 = k3 / k2 ^ 1.5
    return 0.5 - l3 / (6 * sqrt(2 * pi * n)), sv
  end
  local w = (sv > 0 and 1 or -1) * sqrt(2 * n * (sv * x - k0))
  local u = 2 * math.sinh(sv / 2) * sqrt(n * k2)
  return Phi_upper(w) + phi(w) * (1 / u - 1 / w), sv
end

-- The Bromwich integral as a steep integral (built once per distribution) along the
-- vertical line Re s = c with 0 < c < hi: any such line gives the same value, and steep
-- deforms it onto the steepest path through the saddlepoint (adding the residue at 0
-- when the saddlepoint is negative, i.e. below the mean).
function Dist:bromwich()
  if not self.J then
    local n, xb = steep.param "n", steep.param "xbar"
    local s = self.s
    local hi = self.domain[2]
    local c = hi == huge and 1 or 0.5 * hi
    self.J = steep.integral { var = s, exponent = n * (self.K - s * xb), amplitude = 1 / s,
      contour = steep.path { steep.inf(-pi / 2), c, steep.inf(pi / 2) }, large = n }
  end
  return self.J
end

-- Uniform series of the tail: J:expand of the Bromwich integral, order terms.
function Dist:tail_uniform(n, x, order)
  if self.lattice then fail("the uniform series is built for continuous variables here") end
  local sv = self:saddlepoint(x)   -- the threshold must be inside the support
  local J = self:bromwich()
  if abs(sv) * sqrt(n * self.variance) < 1e-7 then
    -- at the mean the pole sits on the saddle itself; the tail is smooth there, so take
    -- the mean of two thresholds just either side (the error is of second order)
    local d = 1e-5 * sqrt(self.variance / n)
    local p1, e1 = self:tail_uniform(n, x - d, order)
    local p2, e2 = self:tail_uniform(n, x + d, order)
    return 0.5 * (p1 + p2), 3 * math.max(e1, e2)
  end
  local r = J:expand { n = n, xbar = x, order = order or 4 }
  local v = r.value / (2 * pi * steep.I)
  return v:re(), r.error / (2 * pi), r
end

--- d:tail{n =, x = (threshold for the mean; for lattice: k = threshold for the sum),
--- method = "lr" | "uniform", order = 4} -> {p, error, method, status, note, caution}
function Dist:tail(opts)
  check_n(opts.n)
  local method = opts.method or (self.lattice and "lattice" or "lr")
  if self.lattice then
    local k = opts.k or (opts.x and opts.x * opts.n)
    if type(k) ~= "number" then fail("give the threshold for the sum as k =") end
    local p, sv = self:tail_lattice(opts.n, k)
    return probability(p, nil, "Lugannani-Rice, second continuity correction",
      string.format("saddlepoint %.6g", sv))
  end
  if type(opts.x) ~= "number" then fail("give the threshold for the mean as x =") end
  if method == "uniform" then
    local p, err = self:tail_uniform(opts.n, opts.x, opts.order)
    return probability(p, err, "uniform series (Bromwich integral, Faddeeva)", nil)
  end
  local p, sv = self:tail_lr(opts.n, opts.x)
  -- Lugannani-Rice's relative error is O(1/n) (Daniels 1987): an error scale, not a bound
  return probability(p, abs(p) / opts.n, "Lugannani-Rice",
    string.format("saddlepoint %.6g; error scale ~ p/n", sv))
end

--- d:table{n =, from =, to =, steps =, method =, csv = file} -> rows, text
function Dist:table(opts)
  local rows = {}
  local steps = opts.steps or 10
  for k = 0, steps do
    local x = opts.from + (opts.to - opts.from) * k / steps
    local ok, r = pcall(self.tail, self, { n = opts.n, x = x, k = x, method = opts.method,
      order = opts.order })
    rows[#rows + 1] = { x = x, p = ok and r.p or nil, error = ok and r.error or nil,
      status = ok and r.status or ("failed: " .. tostring(r)) }
  end
  local lines = { string.format("%-14s %-24s %-12s %s", self.lattice and "k" or "x",
    "P(tail >= threshold)", "error scale", "status") }
  for _, r in ipairs(rows) do
    lines[#lines + 1] = string.format("%-14.6g %-24s %-12s %s", r.x,
      r.p and string.format("%.12g", r.p) or "-", r.error and string.format("%.2g", r.error) or "-",
      r.status)
  end
  lines[#lines + 1] = "caution: " .. M.caution
  if opts.csv then
    local f = assert(io.open(opts.csv, "w"))
    f:write("threshold,p,error,status\n")
    for _, r in ipairs(rows) do
      f:write(string.format("%.17g,%s,%s,%s\n", r.x, r.p and string.format("%.17g", r.p) or "",
        r.error and string.format("%.3g", r.error) or "", r.status))
    end
    f:close()
  end
  return rows, table.concat(lines, "\n")
end

-- Run as a script: an invented example (claim sizes in a made-up portfolio, each
-- exponential with mean 1; the total of 20 claims).
if arg and arg[0] and arg[0]:match("saddlepoint%.lua$") then
  local s = steep.var "s"
  local d = M.distribution { K = -steep.log(1 - s), s = s, domain = { -huge, 1 },
    name = "exponential(1)" }
  print("Invented example: total of n = 20 exponential claims with mean 1")
  local _, text = d:table { n = 20, from = 0.5, to = 3, steps = 10 }
  print(text)
end

return M
