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
  local K4 = steep.diff(K3, s)
  d.tape = steep.compile({ K, K1, K2, K3, K4 }, s)
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
  local k0, k1, k2, k3, k4 = self.tape:eval(sv, {})
  return k0:re(), k1:re(), k2:re(), k3:re(), k4:re()
end

-- The size of the first correction of the saddlepoint approximations at sv, relative to
-- the leading term: Daniels' density is f (1 + c1/n + O(n^-2)) with c1 = lambda4/8 -
-- 5 lambda3^2/24, lambda_r = K^(r)(sv) / K''(sv)^(r/2) (Daniels, Ann. Math. Stat. 25 (1954)
-- 631-650); Lugannani-Rice's tail has a relative error of the same order (Daniels, Int.
-- Stat. Rev. 55 (1987) 37-48). The estimates below are 2 (1 + |c1|) / n of the value: a
-- plain p/n missed by up to 75 times for strongly skewed summands (gamma shape 0.002,
-- Poisson sums of small mean), where |c1| is in the tens.
function Dist:correction_size(sv, n)
  local _, _, k2, k3, k4 = self:cumulants(sv)
  local l3, l4 = k3 / k2 ^ 1.5, k4 / (k2 * k2)
  local c1 = l4 / 8 - 5 * l3 * l3 / 24
  if c1 ~= c1 then return huge end
  return 2 * (1 + abs(c1)) / n
end

--- The saddlepoint: K'(s) = x, by Newton's method safeguarded by a bracket, inside the
-- domain. K' increases (K is convex), so each evaluation narrows the bracket [a, b] with
-- K'(a) < x < K'(b). A Newton step that leaves the bracket, or that is not at most half
-- the previous step (no quadratic progress: K'' can be badly rounded where e^s is huge),
-- is replaced by bisection, or, while an end is still unbounded, by a step that doubles
-- the distance from 0. A point where K' is not a number (overflow, far from 0) bounds the
-- bracket on its side of 0.
function Dist:saddlepoint(x)
  if type(x) ~= "number" or x ~= x then fail("threshold must be a number") end
  local sv = 0
  local lo, hi = self.domain[1], self.domain[2]
  local a, b, dxold = lo, hi, huge
  for _ = 1, 400 do
    local _, k1, k2 = self:cumulants(sv)
    if k1 == x then break end
    if k1 < x then a = sv
    elseif k1 > x then b = sv
    elseif sv > 0 then b = sv else a = sv end   -- K' not a number: overflow, far out
    local step = (k1 - x) / k2
    local nxt = sv - step
    if not (nxt > a and nxt < b) or not (abs(step) <= 0.5 * dxold) then
      if a > -huge and b < huge then nxt = 0.5 * (a + b)
      elseif b == huge then nxt = math.max(2 * a, a + 1)
      else nxt = math.min(2 * b, b - 1) end
    end
    dxold = abs(nxt - sv)
    sv = nxt
    if dxold <= 1e-14 * (1 + abs(sv)) or abs(sv) > 1e15 then break end
  end
  -- (the tolerance relative to x and to the spread at sv: with |sv| allowed out to 1e15,
  -- an absolute one took K' -> 0 at the end of a support for a solution)
  local _, k1, k2 = self:cumulants(sv)
  if not (abs(k1 - x) <= 1e-9 * abs(x) + 1e-12 * sqrt(abs(k2))) or not (sv > lo and sv < hi) then
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
  -- (a value beyond [0, 1] by no more than its error is the end itself)
  -- (rounding only: a larger excursion says the approximation failed)
  local tiny = math.min(err, 1e-12)
  if p > 1 and p - 1 <= tiny then p = 1 elseif p < 0 and -p <= tiny then p = 0 end
  if not (p >= 0 and p <= 1) then
    return { p = nil, error = err, method = method, status = "failed",
      note = string.format("the approximation gave %.6g, outside [0, 1]: not a probability", p),
      caution = M.caution }
  end
  return { p = p, error = err, method = method, status = err < p and "estimated" or
    "suspect: the error estimate is not smaller than the value (too few or too skewed "
    .. "summands for the approximation)", note = note, caution = M.caution }
end

--- d:density{n =, x =}: density of the mean at x (Daniels 1954, leading term).
function Dist:density(opts)
  check_n(opts.n)
  local n, x = opts.n, opts.x
  local sv = self:saddlepoint(x)
  local k0, _, k2 = self:cumulants(sv)
  local f = sqrt(n / (2 * pi * k2)) * exp(n * (k0 - sv * x))
  -- the next term of Daniels' series is c1/n of it (correction_size)
  local err = f * self:correction_size(sv, n)
  return { density = f, error = err, saddlepoint = sv, method = "Daniels (leading term)",
    status = err < f and "estimated" or "suspect: the first correction is not smaller "
      .. "than the value (too few or too skewed summands for the approximation)",
    caution = M.caution }
end

-- Gauss-Legendre nodes and weights on [-1, 1] (Newton's method on the Legendre
-- polynomial from the usual first guesses).
local function gauss_legendre(m)
  local xs, ws = {}, {}
  for i = 1, m do
    local z = math.cos(pi * (i - 0.25) / (m + 0.5))
    local function legendre(v)
      local p1, p2 = 1, 0
      for j = 1, m do p1, p2 = ((2 * j - 1) * v * p1 - (j - 1) * p2) / j, p1 end
      return p1, m * (v * p1 - p2) / (v * v - 1)
    end
    for _ = 1, 100 do
      local p1, dp = legendre(z)
      local step = p1 / dp
      z = z - step
      if abs(step) < 1e-16 then break end
    end
    local _, dp = legendre(z)
    xs[i], ws[i] = z, 2 / ((1 - z * z) * dp * dp)
  end
  return xs, ws
end
local GL = { { gauss_legendre(8) }, { gauss_legendre(16) } }

-- sv x - K(sv) with x = K'(sv) (half of w^2 / n). Near the mean the plain difference
-- cancels: both terms are ~ sv, their difference ~ sv^2 K''/2, and K carries an absolute
-- rounding error ~ u (log(1 - s) rounds 1 - s), so w loses digits as 1/sv^2 and
-- 1/u - 1/w loses everything (n = 5, 1e-5 standard errors above the mean: a tail of 0.37
-- for 0.44). It equals the integral from 0 to sv of t K''(t) dt, which has no
-- cancellation: taken by Gauss-Legendre with 8 and 16 points, used when they agree (a
-- short interval, i.e. near the mean); otherwise the difference is accurate anyway.
function Dist:half_w2(sv, x, k0)
  local r = {}
  for q, rule in ipairs(GL) do
    local xs, ws = rule[1], rule[2]
    local sum = 0
    for i = 1, #xs do
      local t = 0.5 * sv * (1 + xs[i])
      local _, _, k2 = self:cumulants(t)
      sum = sum + ws[i] * t * k2
    end
    r[q] = 0.5 * sv * sum
  end
  if abs(r[1] - r[2]) <= 1e-13 * abs(r[2]) then return r[2] end
  return sv * x - k0
end

-- Lugannani-Rice with w^2 = 2 n (sv x - K) and the given u; within 1e-5 standard errors
-- of the mean (where 1/u - 1/w is 0/0) its limit there (Daniels 1987, (2.8)),
-- 1/2 - lambda3 / (6 sqrt(2 pi n)), lambda3 = K'''/K''^(3/2), continued linearly with the
-- slope -f (f the density of the mean there, leading term) so that the tail does not
-- jump at the edge of that window.
local function lugannani_rice(d, n, x, sv, u_of)
  local k0, _, k2, k3 = d:cumulants(sv)
  if abs(sv) * sqrt(n * k2) < 1e-5 then
    local l3 = k3 / k2 ^ 1.5
    local f = sqrt(n / (2 * pi * k2))
    return 0.5 - l3 / (6 * sqrt(2 * pi * n)) - f * (x - d.mean)
  end
  local w = (sv > 0 and 1 or -1) * sqrt(2 * n * d:half_w2(sv, x, k0))
  local u = u_of(sv, k2)
  return Phi_upper(w) + phi(w) * (1 / u - 1 / w)
end

-- Lugannani-Rice for the mean of a continuous variable: u = sv sqrt(n K''(sv)).
function Dist:tail_lr(n, x)
  local sv = self:saddlepoint(x)
  return lugannani_rice(self, n, x, sv, function(s, k2) return s * sqrt(n * k2) end), sv
end

-- Lattice (integer) variables: P(S >= k) for the sum S with the second continuity
-- correction (Daniels 1987; Butler 2007 sec. 1.2): saddlepoint at k - 1/2,
-- u = 2 sinh(s/2) sqrt(n K''(s)). From memory of those sources: the formula below.
function Dist:tail_lattice(n, k)
  local x = (k - 0.5) / n
  local sv = self:saddlepoint(x)
  return lugannani_rice(self, n, x, sv,
    function(s, k2) return 2 * math.sinh(s / 2) * sqrt(n * k2) end), sv
end

-- The first continuity correction (Daniels 1987; Butler 2007 sec. 1.2, from memory):
-- saddlepoint at k itself, u = (1 - e^{-s}) sqrt(n K''(s)). Used beside the second one:
-- their difference is this recipe's error indicator for lattice tails.
function Dist:tail_lattice_first(n, k)
  local x = k / n
  local sv = self:saddlepoint(x)
  return lugannani_rice(self, n, x, sv,
    function(s, k2) return (1 - math.exp(-s)) * sqrt(n * k2) end), sv
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
-- Returns p, error, the expansion; or nil, nil, expansion, reason when it gave nothing.
--
-- The error adds to the series' own estimate the rounding that the uniform pole term
-- amplifies near the mean: steep computes the pole's image from b^2 = F(saddle) - F(0)
-- = n (sv x - K(sv)), a difference of values of F that each carry an absolute rounding
-- error delta of about n u (1 + |K| + |sv x|) (u = 2^-53). The pole term is about
-- erfc(|b|)/2, so that moves the tail by up to 0.3 e^{-|b|^2} delta / |b| (and by delta
-- relative through e^{F(saddle)}), which dominates once the threshold is within about
-- 1e-4 standard errors of the mean (b -> 0). Seen: exponential(1), n = 100,
-- x = 1 - 1e-7: error 4.4e-9 against a series estimate of 3.5e-13.
local EPS = 2.220446049250313e-16
function Dist:tail_uniform(n, x, order)
  if self.lattice then fail("the uniform series is built for continuous variables here") end
  local sv = self:saddlepoint(x)   -- the threshold must be inside the support
  local J = self:bromwich()
  if abs(sv) * sqrt(n * self.variance) < 1e-7 then
    -- at the mean the pole sits on the saddle itself (the expansion does not exist there);
    -- the tail is smooth, so extrapolate from thresholds either side: the symmetric means
    -- A(d) of x +- d and A(2d) of x +- 2d combine as (4 A(d) - A(2d)) / 3 (Richardson),
    -- which cancels the d^2 term. d = 1e-3 standard errors: the d^4 term left is about
    -- |A(d) - A(2d)| (1e-3)^2, far below the rounding error at those thresholds.
    local d = 1e-3 * sqrt(self.variance / n)
    local ps, emax = {}, 0
    for i, h in ipairs({ -2 * d, -d, d, 2 * d }) do
      local p, e, r, why = self:tail_uniform(n, x + h, order)
      if not p then return nil, nil, r, why end
      ps[i], emax = p, math.max(emax, e)
    end
    local A, B = 0.5 * (ps[2] + ps[3]), 0.5 * (ps[1] + ps[4])
    return (4 * A - B) / 3, 5 / 3 * emax + abs(A - B) * 1e-6
  end
  local r = J:expand { n = n, xbar = x, order = order or 4 }
  if #r.contributions == 0 then
    -- nothing was found to expand (steep's landscape missed a singularity?): a value of
    -- 0 here would be silently wrong
    return nil, nil, r, "the expansion found no contributions (status: " .. tostring(r.status)
      .. "); no value is given"
  end
  local v = r.value / (2 * pi * steep.I)
  local k0 = self:cumulants(sv)
  local b2 = n * self:half_w2(sv, x, k0)
  local delta = n * EPS * (1 + abs(k0) + abs(sv * x))
  local rounding = delta * (0.3 * exp(-b2) / math.max(sqrt(b2), 1e-300) + abs(v:re()))
  return v:re(), r.error / (2 * pi) + rounding, r
end

--- d:tail{n =, x = (threshold for the mean; for lattice: k = threshold for the sum),
--- method = "lr" | "uniform", order = 4} -> {p, error, method, status, note, caution}
function Dist:tail(opts)
  if type(opts) ~= "table" then fail("tail{n =, x = (or k =), method =} expected") end
  check_n(opts.n)
  local method = opts.method or (self.lattice and "lattice" or "lr")
  if method ~= "lr" and method ~= "uniform" and method ~= "lattice" then
    fail("method must be \"lr\" or \"uniform\" (\"lattice\" for lattice variables), got "
      .. tostring(method))
  end
  if self.lattice then
    if method == "uniform" then
      fail("the uniform series is built for continuous variables here")
    end
    local k = opts.k or (opts.x and opts.x * opts.n)
    if type(k) ~= "number" or k ~= k then fail("give the threshold for the sum as k =") end
    -- (the sum is whole: P(S >= k) = P(S >= ceil(k)); a threshold between integers had
    -- been taken as it was, 7 % off under an estimate of 0.05 %)
    local k_given = k
    k = math.ceil(k - 1e-9 * math.max(1, abs(k)))
    local p, sv = self:tail_lattice(opts.n, k)
    -- error estimate: the relative O(1/n) of Lugannani-Rice (Daniels 1987), plus the
    -- difference between the first and second continuity corrections (both
    -- approximate the same tail; checked against exact binomial and Poisson tails in
    -- tests/test_saddlepoint.lua). At the top point of a bounded support the first
    -- correction does not exist (k/n is the support's end) and the relative error stays
    -- near 7% however large n is (Bernoulli sums): a quarter of the value is the scale.
    local ok, p1 = pcall(self.tail_lattice_first, self, opts.n, k)
    local err, note
    local rel = self:correction_size(sv, opts.n)
    if ok and p1 == p1 then
      err = abs(p) * rel + abs(p1 - p)
      note = string.format("saddlepoint %.6g; error: 2 (1 + |c1|) p/n plus the difference "
        .. "from the first continuity correction", sv)
    else
      err = abs(p) * rel + 0.25 * abs(p)
      note = string.format("saddlepoint %.6g; at the top of the support: error p/4 + "
        .. "2 (1 + |c1|) p/n", sv)
    end
    if k ~= k_given then
      note = note .. string.format("; threshold %.17g taken as %d (the sum is whole)", k_given, k)
    end
    return probability(p, err, "Lugannani-Rice, second continuity correction", note)
  end
  if type(opts.x) ~= "number" then fail("give the threshold for the mean as x =") end
  if method == "uniform" then
    local p, err, _, why = self:tail_uniform(opts.n, opts.x, opts.order)
    if not p then
      return { p = nil, error = nil, method = "uniform series (Bromwich integral, Faddeeva)",
        status = "failed", note = why, caution = M.caution }
    end
    return probability(p, err, "uniform series (Bromwich integral, Faddeeva)", nil)
  end
  local p, sv = self:tail_lr(opts.n, opts.x)
  -- Lugannani-Rice's relative error is O(1/n) (Daniels 1987), its size c1/n
  -- (correction_size): an estimate calibrated in tests/test_saddlepoint.lua, not a bound
  return probability(p, abs(p) * self:correction_size(sv, opts.n), "Lugannani-Rice",
    string.format("saddlepoint %.6g; error ~ 2 (1 + |c1|) p/n", sv))
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
    "P(tail >= threshold)", "error", "status") }
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
