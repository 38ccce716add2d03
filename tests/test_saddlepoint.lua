-- Tests of recipes/saddlepoint.lua used as a module: densities and tail probabilities of a
-- sum (or mean) of n independent copies of a variable, from its cumulant generating
-- function K(s), against exact laws computed by GSL (tests/ref/gslref.so):
--   * the mean of n exponential(1) variables, K(s) = -log(1 - s): n times the mean is
--     gamma(n, 1), so P(mean >= x) = gsl_cdf_gamma_Q(n x, n, 1) and the density of the
--     mean is n gsl_ran_gamma_pdf(n x, n, 1);
--   * the sum S of n Bernoulli(p) variables, K(s) = log(1 - p + p e^s) (a lattice law):
--     P(S >= k) = P(S > k - 1) = gsl_cdf_binomial_Q(k - 1, p, n).
-- Methods (as the recipe names them): Lugannani & Rice (1980), its limit at the mean and
-- the second continuity correction for lattice variables (Daniels 1987; Butler 2007, from
-- memory), Daniels' density (1954), and the uniform series of the Bromwich integral
-- expanded by steep (the pole at s = 0 through the Faddeeva function).
local lu = require "luaunit"
local H = require "helpers"
local gsl = require "gslref"
local sp = require "saddlepoint"
local steep = H.steep

local s = steep.var "s"
local huge, sqrt, pi, abs = math.huge, math.sqrt, math.pi, math.abs

local EXP = sp.distribution { K = -steep.log(1 - s), s = s, domain = { -huge, 1 },
  name = "exponential(1)" }
-- lambda3 = K'''(0) / K''(0)^(3/2) = 2 / 1 for the exponential(1) law
local LAMBDA3 = 2

local function bernoulli(p)
  return sp.distribution { K = steep.log(1 - p + p * steep.exp(s)), s = s, lattice = true,
    name = "Bernoulli(" .. p .. ")" }
end

local function exact_tail(n, x) return gsl.cdf_gamma_Q(n * x, n, 1) end   -- gsl_cdf_gamma_Q

-- thresholds for the mean from half the mean to three times it, with points within 1% of
-- the mean (1) and the mean itself
local THRESHOLDS = { 0.5, 0.6, 0.7, 0.8, 0.9, 0.99, 0.995, 1.0, 1.005, 1.01, 1.2, 1.5, 2, 2.5, 3 }

-- d:tail over THRESHOLDS for one n and method, computed once: rows and the largest
-- relative error
local sweeps = {}
local function sweep(n, method)
  local key = n .. method
  if not sweeps[key] then
    local rows, worst, at = {}, 0, nil
    for _, x in ipairs(THRESHOLDS) do
      local r = EXP:tail { n = n, x = x, method = method }
      local want = exact_tail(n, x)
      local rel = r.p and abs(r.p - want) / want or huge
      rows[#rows + 1] = { x = x, r = r, want = want, rel = rel }
      if rel > worst then worst, at = rel, x end
    end
    sweeps[key] = { rows = rows, worst = worst, at = at }
  end
  return sweeps[key]
end

---------------------------------------------------------------------------------------

TestSaddlepointGamma = {}

-- The uniform series against the exact gamma tail: a probability at every threshold,
-- |p - exact| within the reported error, and the relative error at n = 20 far
-- below the 1e-3 the leading-order methods reach (observed: 3.4e-9 at most).
function TestSaddlepointGamma:test_uniform_against_gamma()
  for _, n in ipairs({ 5, 20, 100 }) do
    for _, row in ipairs(sweep(n, "uniform").rows) do
      local r, msg = row.r, string.format("uniform tail, n = %d, x = %g", n, row.x)
      lu.assertEquals(r.status, "estimated", msg .. ": " .. tostring(r.note))
      lu.assertNotNil(r.p, msg)
      lu.assertTrue(r.p >= 0 and r.p <= 1, msg .. ": a probability")
      local d = abs(r.p - row.want)
      if not (d <= r.error) then
        lu.fail(string.format("%s: |p - exact| = %.3g exceeds the reported error %.3g "
          .. "(p %.17g, exact %.17g)", msg, d, r.error, r.p, row.want))
      end
    end
  end
  local w = sweep(20, "uniform")
  lu.assertTrue(w.worst < 1e-6, string.format("n = 20: largest relative error %.3g (at x = %g) "
    .. "should be under 1e-6", w.worst, w.at))
  w = sweep(5, "uniform")
  lu.assertTrue(w.worst < 1e-5, string.format("n = 5: largest relative error %.3g (at x = %g) "
    .. "should be under 1e-5", w.worst, w.at))
end

-- The error of an expansion uniform in x falls as n grows: the largest relative error
-- over the thresholds, n = 5, 20, 100.
function TestSaddlepointGamma:test_uniform_error_falls_with_n()
  local a, b, c = sweep(5, "uniform"), sweep(20, "uniform"), sweep(100, "uniform")
  local msg = string.format("largest relative error of the uniform tail over x in [0.5, 3]: "
    .. "n = 5: %.3g (x = %g), n = 20: %.3g (x = %g), n = 100: %.3g (x = %g)",
    a.worst, a.at, b.worst, b.at, c.worst, c.at)
  lu.assertTrue(b.worst < a.worst, msg)
  lu.assertTrue(c.worst < b.worst, msg)
end

-- Lugannani-Rice against the exact gamma tail: relative error under 1e-3 at n = 20,
-- within its reported error scale (p/n), and falling as n grows.
function TestSaddlepointGamma:test_lugannani_rice_against_gamma()
  for _, n in ipairs({ 5, 20, 100 }) do
    for _, row in ipairs(sweep(n, "lr").rows) do
      local r, msg = row.r, string.format("Lugannani-Rice tail, n = %d, x = %g", n, row.x)
      lu.assertEquals(r.status, "estimated", msg)
      lu.assertEquals(r.method, "Lugannani-Rice", msg)
      local d = abs(r.p - row.want)
      if not (d <= r.error) then
        lu.fail(string.format("%s: |p - exact| = %.3g exceeds the error scale %.3g",
          msg, d, r.error))
      end
    end
  end
  local a, b, c = sweep(5, "lr"), sweep(20, "lr"), sweep(100, "lr")
  local msg = string.format("largest relative error: n = 5: %.3g, n = 20: %.3g, n = 100: %.3g",
    a.worst, b.worst, c.worst)
  lu.assertTrue(b.worst < 1e-3, msg)
  lu.assertTrue(b.worst < a.worst and c.worst < b.worst, msg)
end

-- At the mean Lugannani-Rice is 0/0; the recipe uses its limit 1/2 - lambda3/(6 sqrt(2 pi n))
-- (Daniels 1987, eq. 2.8 as the recipe cites it; from memory). Used exactly there, and
-- its relative error against the exact tail is O(n^-3/2) (observed 1.5e-3 n^-3/2).
function TestSaddlepointGamma:test_lugannani_rice_limit_at_mean()
  for _, n in ipairs({ 5, 20, 100 }) do
    local r = EXP:tail { n = n, x = 1 }
    local limit = 0.5 - LAMBDA3 / (6 * sqrt(2 * pi * n))
    local msg = "Lugannani-Rice at the mean, n = " .. n
    H.close(r.p, limit, 1e-14, msg .. ": the limit is used")
    lu.assertStrContains(r.note, "saddlepoint 0", false)
    H.close(r.p, exact_tail(n, 1), 3e-3 * n ^ -1.5, msg .. ": against gsl_cdf_gamma_Q")
  end
end

-- Near the mean, w and u (both ~ the distance to the mean) must not lose their digits:
-- thresholds 1e-7 to 1e-2 standard errors either side, including both sides of the edge
-- of the window (1e-5) where the limit is used, stay as accurate as the limit itself
-- (relative error 8e-5 at n = 5, 1.6e-5 at n = 20).
function TestSaddlepointGamma:test_lugannani_rice_near_mean()
  for _, c in ipairs({ { 5, 2e-4 }, { 20, 4e-5 } }) do
    local n, tol = c[1], c[2]
    for _, z in ipairs({ 1e-7, 1e-6, 0.99e-5, 1.01e-5, 2e-5, 1e-4, 1e-3, 1e-2 }) do
      for _, sign in ipairs({ -1, 1 }) do
        local x = 1 + sign * z / sqrt(n)
        local r = EXP:tail { n = n, x = x }
        lu.assertNotNil(r.p, string.format("n = %d, x = 1 %+g sd: %s", n, sign * z,
          tostring(r.note)))
        H.close(r.p, exact_tail(n, x), tol, string.format("Lugannani-Rice, n = %d, %+g standard "
          .. "errors from the mean", n, sign * z))
      end
    end
  end
end

-- The uniform tail is continuous across the mean: a step of 1e-4 either side moves it by
-- less than twice density x 1e-4 (and in the right direction), and so do steps across
-- the edge of the small window about the mean where the recipe extrapolates
-- (|sv| sqrt(n K'') < 1e-7, i.e. |x - 1| < 2.2e-8 at n = 20), within the reported errors.
function TestSaddlepointGamma:test_uniform_continuous_across_mean()
  local n = 20
  local f = EXP:density { n = n, x = 1 }.density
  local function tail(x)
    local r = EXP:tail { n = n, x = x, method = "uniform" }
    return r.p, r.error
  end
  local p0 = tail(1)
  local pm, pp = tail(1 - 1e-4), tail(1 + 1e-4)
  lu.assertTrue(pm - p0 > 0 and pm - p0 < 2 * f * 1e-4,
    string.format("p(1 - 1e-4) - p(1) = %.3g, density x 1e-4 = %.3g", pm - p0, f * 1e-4))
  lu.assertTrue(p0 - pp > 0 and p0 - pp < 2 * f * 1e-4,
    string.format("p(1) - p(1 + 1e-4) = %.3g, density x 1e-4 = %.3g", p0 - pp, f * 1e-4))
  for _, sign in ipairs({ -1, 1 }) do
    local a, ea = tail(1 + sign * 2.0e-8)     -- inside the window
    local b, eb = tail(1 + sign * 2.5e-8)     -- outside
    local jump = abs(a - b)
    lu.assertTrue(jump <= 2 * f * 0.5e-8 + 3 * (ea + eb), string.format("across the window "
      .. "edge (%s side): |p(1 %+g) - p(1 %+g)| = %.3g, allowed %.3g", sign > 0 and "upper"
      or "lower", sign * 2e-8, sign * 2.5e-8, jump, 2 * f * 0.5e-8 + 3 * (ea + eb)))
  end
end

-- Larger n: n = 1000 at thresholds 0.95 and 1.1 (exact tails 0.94 and 1.06e-3).
function TestSaddlepointGamma:test_uniform_large_n()
  local n = 1000
  for _, x in ipairs({ 0.95, 1.1 }) do
    local r = EXP:tail { n = n, x = x, method = "uniform" }
    local want = exact_tail(n, x)
    local msg = string.format("uniform tail, n = %d, x = %g (exact %.17g)", n, x, want)
    lu.assertNotNil(r.p, msg .. ": no value: " .. tostring(r.note))
    lu.assertTrue(abs(r.p - want) <= r.error, string.format("%s: got %.17g, error %.3g",
      msg, r.p, r.error))
    H.close(r.p, want, 1e-8, msg)
  end
end

---------------------------------------------------------------------------------------

TestSaddlepointLattice = {}

-- The binomial tail P(S >= k), n = 20, with the second continuity correction, against
-- gsl_cdf_binomial_Q(k - 1, p, n): relative error under 2e-3 within two standard
-- deviations of the mean (in k - 1/2), under 1e-2 within three (observed: 7e-4 and 5e-3).
function TestSaddlepointLattice:test_binomial_tail()
  local n = 20
  for _, p in ipairs({ 0.3, 0.5 }) do
    local d = bernoulli(p)
    local sd = sqrt(n * p * (1 - p))
    local checked = 0
    for k = 1, n do
      local z = (k - 0.5 - n * p) / sd
      if abs(z) <= 3 then
        local r = d:tail { n = n, k = k }
        local msg = string.format("P(S >= %d), n = %d, p = %g (z = %.2f)", k, n, p, z)
        lu.assertEquals(r.status, "estimated", msg)
        lu.assertStrContains(r.method, "continuity correction")
        H.close(r.p, gsl.cdf_binomial_Q(k - 1, p, n), abs(z) <= 2 and 2e-3 or 1e-2, msg)
        checked = checked + 1
      end
    end
    lu.assertTrue(checked >= 10, "thresholds checked for p = " .. p)
  end
end

-- The lattice tail's error estimate (p/n plus the difference between the first and
-- second continuity corrections; p/4 + p/n at the top of a bounded support) bounds the
-- error against exact tails: binomial by gsl_cdf_binomial_Q, and the sum of n
-- Poisson(lambda) variables, Poisson(n lambda), whose tail is summed here term by term
-- (P(X = j + 1) = P(X = j) mu / (j + 1), exact recurrence, in logarithms).
local function poisson_tail(mu, k)
  local lt = -mu
  for j = 1, k do lt = lt + math.log(mu) - math.log(j) end
  local sum, term = 0, lt
  for j = k, k + 4000 do
    sum = sum + math.exp(term)
    term = term + math.log(mu) - math.log(j + 1)
  end
  return sum
end

function TestSaddlepointLattice:test_error_estimate_bounds()
  local checked = 0
  for _, p in ipairs({ 0.05, 0.3, 0.5, 0.9 }) do
    local d = bernoulli(p)
    for _, n in ipairs({ 1, 5, 20, 100 }) do
      for k = 1, n do
        local r = d:tail { n = n, k = k }
        if r.p then
          local exact = gsl.cdf_binomial_Q(k - 1, p, n)
          lu.assertTrue(abs(r.p - exact) <= r.error, string.format("binomial n = %d, p = %g, "
            .. "k = %d: %.6g against %.6g, estimate %.3g", n, p, k, r.p, exact, r.error))
          checked = checked + 1
        end
      end
    end
  end
  for _, lambda in ipairs({ 0.2, 1, 3 }) do
    local d = sp.distribution { K = lambda * (steep.exp(s) - 1), s = s, lattice = true,
      name = "Poisson(" .. lambda .. ")" }
    for _, n in ipairs({ 1, 5, 20 }) do
      for k = 1, math.floor(4 * n * lambda) + 8 do
        local r = d:tail { n = n, k = k }
        local exact = poisson_tail(n * lambda, k)
        lu.assertTrue(abs(r.p - exact) <= r.error, string.format("Poisson n = %d, lambda = %g, "
          .. "k = %d: %.6g against %.6g, estimate %.3g", n, lambda, k, r.p, exact, r.error))
        checked = checked + 1
      end
    end
  end
  lu.assertTrue(checked > 300, "tails checked: " .. checked)
end

-- For p = 1/2 the law is symmetric (K(s) - s/2 is even) and so is the formula: w, u and
-- the saddlepoint change sign between k and n + 1 - k, so P(S >= k) + P(S >= n + 1 - k) = 1
-- exactly (in exact arithmetic).
function TestSaddlepointLattice:test_symmetric_law()
  local d = bernoulli(0.5)
  for _, n in ipairs({ 7, 20 }) do
    for k = 1, n do
      local a, b = d:tail { n = n, k = k }.p, d:tail { n = n, k = n + 1 - k }.p
      H.close(a + b, 1, 1e-12, string.format("P(S >= %d) + P(S >= %d), n = %d", k, n + 1 - k, n))
    end
  end
end

-- When k - 1/2 is the mean (p = 0.325, n = 20, k = 7) the limit is used, and nearby
-- values of p (1e-9 to 1e-4 away, on both sides of the window's edge) stay as accurate:
-- relative error under 1e-3 against the exact tail (observed 5.6e-4).
function TestSaddlepointLattice:test_threshold_at_mean()
  local n, k = 20, 7
  for _, dp in ipairs({ 0, 1e-9, -1e-9, 1e-6, -1e-6, 1e-5, -1e-5, 1e-4, -1e-4 }) do
    local p = 0.325 + dp
    local r = bernoulli(p):tail { n = n, k = k }
    local msg = string.format("P(S >= %d), n = %d, p = 0.325 %+g", k, n, dp)
    lu.assertNotNil(r.p, msg)
    H.close(r.p, gsl.cdf_binomial_Q(k - 1, p, n), 1e-3, msg)
    if dp == 0 then
      local l3 = (1 - 2 * p) / sqrt(p * (1 - p))     -- K''' / K''^(3/2) at 0
      H.close(r.p, 0.5 - l3 / (6 * sqrt(2 * pi * n)), 1e-14, msg .. ": the limit is used")
    end
  end
end

---------------------------------------------------------------------------------------

TestSaddlepointDensity = {}

-- Daniels' density of the mean against the exact gamma density n gsl_ran_gamma_pdf(n x, n, 1).
-- For the gamma law the ratio does not depend on x: it is Stirling's ratio
-- Gamma(n) e^n n^(1/2 - n) / sqrt(2 pi) = 1 + 1/(12 n) + 1/(288 n^2) + ... (DLMF 5.11.3,
-- from memory), so the relative error is 1/(12 n) to within 1/(100 n^2); the reported
-- error (f/n) covers it.
function TestSaddlepointDensity:test_daniels_gamma()
  for _, n in ipairs({ 5, 20, 100 }) do
    for _, x in ipairs({ 0.5, 0.8, 1, 1.5, 2, 3 }) do
      local r = EXP:density { n = n, x = x }
      local want = n * gsl.gamma_pdf(n * x, n, 1)
      local rel = (r.density - want) / want
      local msg = string.format("density of the mean, n = %d, x = %g: got %.17g, exact %.17g",
        n, x, r.density, want)
      lu.assertTrue(abs(rel - 1 / (12 * n)) <= 1 / (100 * n * n), string.format("%s: relative "
        .. "error %.6g, expected 1/(12n) = %.6g", msg, rel, 1 / (12 * n)))
      lu.assertTrue(abs(r.density - want) <= r.error, msg .. ": within the reported error")
      lu.assertEquals(r.caution, sp.caution)
    end
  end
end

---------------------------------------------------------------------------------------

-- Strongly skewed summands: the error estimates 2 (1 + |c1|) p / n (c1 from the
-- standardized third and fourth cumulants at the saddlepoint, Daniels 1954) bound the
-- error where p/n had missed by up to 75 times; the status says when the estimate is not
-- smaller than the value. Gamma(k) summands (K = -k log(1 - s)): n k times the mean is
-- gamma(n k, 1), so P(mean >= x) = gsl_cdf_gamma_Q(n x, n k, 1) and the density of the
-- mean is n gsl_ran_gamma_pdf(n x, n k, 1); Poisson(lambda) sums by poisson_tail above.
-- And a threshold between the lattice's integers is the next integer (the sum is whole).
function TestSaddlepointLattice:test_skewed_summands()
  for _, c in ipairs({ { 0.002, 50 }, { 0.05, 13 }, { 0.5, 20 }, { 2, 200 } }) do
    local k, n = c[1], c[2]
    local G = sp.distribution { K = -k * steep.log(1 - s), s = s, domain = { -huge, 1 } }
    for _, m in ipairs({ 0.2, 1.5, 5, 30 }) do
      local x = m * k
      local r = G:tail { n = n, x = x }
      local exact = gsl.cdf_gamma_Q(n * x, n * k, 1)
      lu.assertTrue(r.p and abs(r.p - exact) <= r.error, string.format("gamma(%g), n = %d, "
        .. "x = %g: %s against %.6g, estimate %s", k, n, x, tostring(r.p), exact,
        tostring(r.error)))
      local f = G:density { n = n, x = x }
      local fexact = n * gsl.gamma_pdf(n * x, n * k, 1)
      lu.assertTrue(abs(f.density - fexact) <= f.error, string.format("density gamma(%g), "
        .. "n = %d, x = %g: %.6g against %.6g, estimate %.3g", k, n, x, f.density, fexact,
        f.error))
    end
  end
  for _, c in ipairs({ { 0.001, 200 }, { 0.01, 50 }, { 0.2, 10 } }) do
    local lambda, n = c[1], c[2]
    local P = sp.distribution { K = lambda * (steep.exp(s) - 1), s = s, lattice = true }
    for kk = 1, 4 do
      local r = P:tail { n = n, k = kk }
      local exact = poisson_tail(n * lambda, kk)
      lu.assertTrue(r.p and abs(r.p - exact) <= r.error, string.format("Poisson(%g), n = %d, "
        .. "k = %d: %s against %.6g, estimate %s", lambda, n, kk, tostring(r.p), exact,
        tostring(r.error)))
    end
  end
  local b = bernoulli(0.3)
  local r1, r2 = b:tail { n = 2000, k = 650.5 }, b:tail { n = 2000, k = 651 }
  lu.assertEquals(r1.p, r2.p)
  lu.assertStrContains(r1.note, "taken as 651")
  local exact = gsl.cdf_binomial_Q(650, 0.3, 2000)
  lu.assertTrue(abs(r1.p - exact) <= r1.error)
end

-- Ends of the range: a uniform-series tail of 1 + 2e-16 (within its error of 3e-14) is 1,
-- not "not a probability" (Q(50, 10) = 1 to doubles, gsl_sf_gamma_inc_Q); a threshold at
-- 1e-7 of the mean of exponentials has its saddlepoint near s = -1e7, which the search had
-- not reached ("outside the support"); P(mean >= 1e-7) = Q(10, 1e-6) = 1 to doubles.
function TestSaddlepointLattice:test_ends_of_the_range()
  local r = EXP:tail { n = 50, x = 0.2, method = "uniform" }
  lu.assertEquals(r.status, "estimated")
  lu.assertTrue(r.p <= 1 and abs(r.p - gsl.gamma_inc_Q(50, 10)) <= r.error)
  local q = EXP:tail { n = 10, x = 1e-7 }
  lu.assertTrue(q.p and abs(q.p - gsl.gamma_inc_Q(10, 1e-6)) <= q.error)
end

TestSaddlepointBadInput = {}

function TestSaddlepointBadInput:test_not_convex()
  H.raises({ "saddlepoint: K is not convex on its domain", "K''(" }, sp.distribution,
    { K = -s ^ 2, s = s, domain = { -1, 1 } })
  H.raises({ "saddlepoint: K is not convex on its domain" }, sp.distribution,
    { K = s ^ 3, s = s, domain = { -1, 1 } })
  H.raises({ "saddlepoint: 'domain' must be {lo, hi} with lo < 0 < hi" }, sp.distribution,
    { K = -steep.log(1 - s), s = s, domain = { 0.5, 1 } })
  H.raises({ "saddlepoint: 's' must be the variable made by steep.var" }, sp.distribution,
    { K = -steep.log(1 - s), s = "s" })
  H.raises({ "saddlepoint: 'K' must be an expression in s" }, sp.distribution, { K = 2, s = s })
end

function TestSaddlepointBadInput:test_threshold_outside_support()
  for _, x in ipairs({ 0, -1 }) do
    local frag = string.format("the threshold %g is outside the support", x)
    H.raises({ frag, "K'(s) = " }, EXP.tail, EXP, { n = 5, x = x })
    H.raises({ frag }, EXP.tail, EXP, { n = 5, x = x, method = "uniform" })
    H.raises({ frag }, EXP.density, EXP, { n = 5, x = x })
  end
  -- the sum of 3 Bernoulli variables is at most 3: P(S >= 4) has its threshold (3.5) outside
  H.raises({ "the threshold 1.16667 is outside the support" }, function()
    return bernoulli(0.5):tail { n = 3, k = 4 }
  end)
end

function TestSaddlepointBadInput:test_bad_n_and_options()
  for _, n in ipairs({ 0, 0.5, 2.5, -3 }) do
    H.raises({ "n (the number of summands) must be a whole number >= 1, got " .. tostring(n) },
      EXP.tail, EXP, { n = n, x = 1.2 })
    H.raises({ "must be a whole number >= 1" }, EXP.density, EXP, { n = n, x = 1.2 })
  end
  H.raises({ "must be a whole number >= 1, got 20" }, EXP.tail, EXP, { n = "20", x = 1.2 })
  local b = bernoulli(0.3)
  H.raises({ "saddlepoint: give the threshold for the sum as k =" }, b.tail, b, { n = 20 })
  H.raises({ "saddlepoint: give the threshold for the mean as x =" }, EXP.tail, EXP, { n = 20 })
  H.raises({ "saddlepoint: method must be \"lr\" or \"uniform\"", "got saddle" },
    EXP.tail, EXP, { n = 20, x = 1.2, method = "saddle" })
  H.raises({ "the uniform series is built for continuous variables here" },
    b.tail, b, { n = 20, k = 5, method = "uniform" })
  H.raises({ "threshold must be a number" }, EXP.saddlepoint, EXP, 0 / 0)
end

-- Nothing outside [0, 1] is returned as a probability. Lugannani-Rice with the continuity
-- correction goes past 1 for a single Bernoulli(0.9999) variable: in the lower tail it is
-- 1 - Q(|w|) + phi(w) (1/|w| - 1/|u|), and with |w| = 2.8 but |u| = 50 the last term
-- exceeds Q(|w|) (p = 1.00012); by symmetry it goes below 0 for Bernoulli(0.0001). The
-- recipe returns p = nil with status "failed" and says why.
function TestSaddlepointBadInput:test_not_a_probability()
  for _, c in ipairs({ { 0.9999, "1.00012" }, { 0.0001, "-0.000115098" } }) do
    local r = bernoulli(c[1]):tail { n = 1, k = 1 }
    local msg = "Bernoulli(" .. c[1] .. "), n = 1, P(S >= 1)"
    lu.assertNil(r.p, msg)
    lu.assertEquals(r.status, "failed", msg)
    lu.assertStrContains(r.note, "the approximation gave " .. c[2] .. ", outside [0, 1]")
    lu.assertEquals(r.caution, sp.caution)
  end
  -- every value returned over a sweep of small, skewed cases is a probability
  local returned = 0
  for _, p in ipairs({ 1e-4, 0.01, 0.3, 0.9, 0.9999 }) do
    local d = bernoulli(p)
    for n = 1, 4 do
      for k = 1, n do
        local r = d:tail { n = n, k = k }
        if r.p ~= nil then
          returned = returned + 1
          lu.assertTrue(r.p >= 0 and r.p <= 1, string.format("p = %g, n = %d, k = %d: %.17g",
            p, n, k, r.p))
        else
          lu.assertEquals(r.status, "failed")
        end
      end
    end
  end
  lu.assertTrue(returned >= 40, "values returned: " .. returned)
end

-- Extreme thresholds inside the support: the saddlepoint equation K'(s) = x is solved
-- (Newton safeguarded by a bracket) where e^s overflows on the way, against the closed
-- forms s = log(x (1 - p) / (p (1 - x))) (Bernoulli) and s = 1 - 1/x (exponential).
function TestSaddlepointBadInput:test_extreme_saddlepoints()
  for _, c in ipairs({ { 1e-4, 0.5 }, { 0.01, 0.5 }, { 0.5, 0.999 }, { 0.9999, 0.5 },
      { 0.3, 1e-3 } }) do
    local p, x = c[1], c[2]
    H.close(bernoulli(p):saddlepoint(x), math.log(x * (1 - p) / (p * (1 - x))), 1e-12,
      string.format("Bernoulli(%g) saddlepoint at x = %g", p, x))
  end
  for _, x in ipairs({ 1e-3, 0.2, 5, 1e3 }) do
    H.close(EXP:saddlepoint(x), 1 - 1 / x, 1e-12, "exponential saddlepoint at x = " .. x)
  end
end

---------------------------------------------------------------------------------------

TestSaddlepointCaution = {}

-- The caution travels with every result and with the table.
function TestSaddlepointCaution:test_caution_everywhere()
  lu.assertStrContains(sp.caution, "validate")
  local results = {
    EXP:tail { n = 20, x = 1.3 },
    EXP:tail { n = 20, x = 1.3, method = "uniform" },
    EXP:tail { n = 20, x = 1 },
    bernoulli(0.3):tail { n = 20, k = 8 },
    bernoulli(0.9999):tail { n = 1, k = 1 },     -- a failed one
    EXP:density { n = 20, x = 1.3 },
  }
  for i, r in ipairs(results) do lu.assertEquals(r.caution, sp.caution, "result " .. i) end
  for _, method in ipairs({ "lr", "uniform" }) do
    local rows, text = EXP:table { n = 20, from = 0.8, to = 1.6, steps = 4, method = method }
    lu.assertEquals(#rows, 5)
    lu.assertStrContains(text, "caution: " .. sp.caution)
    for _, row in ipairs(rows) do
      H.close(row.p, exact_tail(20, row.x), method == "lr" and 1e-3 or 1e-6,
        "table row x = " .. row.x .. " (" .. method .. ")")
    end
  end
  local _, text = bernoulli(0.3):table { n = 20, from = 4, to = 9, steps = 5 }
  lu.assertStrContains(text, "caution: " .. sp.caution)
end
