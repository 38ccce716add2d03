-- steep.borel — Borel-Padé summation of one contribution's series, from its coefficients.
--
-- A contribution e^{F0} sum_n t_n whose terms are t_n = c_n Gamma(n + mu) is, term by term,
-- the Laplace integral
--   sum_n t_n  =  integral_0^inf e^{-s} s^(mu - 1) beta(s) ds,   beta(s) = sum_n c_n s^n,
-- where s = F0 - F(t) is the fall of the exponent from the saddle (or endpoint): beta is
-- the Borel transform of the series, and it is singular where s reaches the fall to
-- another saddle or to a pole of the amplitude, at the singulants F0 - F_m (Berry & Howls,
-- Proc. R. Soc. A 434 (1991) 657-675; Ecalle's resurgence). The series diverges; beta
-- converges in the disc up to the nearest singulant, and its analytic continuation along
-- a ray that avoids the singularities gives the value the series stands for (the Borel
-- sum; along the steepest descent path itself it is the integral over that path).
--
-- Continuation: the Pade approximant [n/n] of beta (Baker & Graves-Morris, Pade
-- Approximants, 2nd ed., CUP 1996, ch. 1: the linear system for the denominator).
-- Laplace integral: the exp-sinh rule (Takahasi & Mori, Publ. RIMS 9 (1974) 721-741)
-- along the ray, halving the step until two estimates agree. Poles of the approximant:
-- Aberth's iteration (Math. Comp. 27 (1973) 339-344); those with a residue that is not
-- negligible mark singularities of beta, and are compared with the singulants the
-- landscape knows.
--
-- Error estimate: the approximants of neighbouring degrees (n - 2 .. n + 2, counting only
-- degrees with an approximant of their own) must agree; the degree where they agree best
-- is used, with twice their largest difference from it over n - 3 .. n + 3 and every
-- higher degree as the error (common practice for convergent sequences; it also catches noise in the
-- high coefficients, which makes the high degrees scatter), plus the quadrature's and
-- the rounding's own estimates.
--
-- Complex numbers are kept as pairs of Lua numbers here (a table per value would cost an
-- allocation per operation in the inner loops).

local abs, sqrt, exp, log, cos, sin, atan = math.abs, math.sqrt, math.exp, math.log,
  math.cos, math.sin, math.atan
local huge, pi, max, min, floor = math.huge, math.pi, math.max, math.min, math.floor
local format = string.format

local M = {}

local function asinh(x) return log(x + sqrt(x * x + 1)) end

local EPS = 2.220446049250313e-16

-- Smith's division (as in steep.complex).
local function cdiv(ar, ai, br, bi)
  if abs(br) >= abs(bi) then
    if br == 0 then return 0 / 0, 0 / 0 end
    local r = bi / br
    local d = br + bi * r
    return (ar + ai * r) / d, (ai - ar * r) / d
  end
  local r = br / bi
  local d = bi + br * r
  return (ar * r + ai) / d, (ai * r - ar) / d
end
M.cdiv = cdiv

local function hypot(a, b)
  a, b = abs(a), abs(b)
  if a < b then a, b = b, a end
  if a == 0 then return 0 end
  local r = b / a
  return a * sqrt(1 + r * r)
end
M.hypot = hypot

---------------------------------------------------------------------------------------
-- Pade approximants.
---------------------------------------------------------------------------------------

--- pade(cr, ci, L, m) -> approximant {pr, pi, qr, qi, L, m} or nil: the [L/m] Pade
-- approximant p/q (q(0) = 1) of the series sum c_k z^k (c_k = cr[k] + i ci[k], k = 0 ..
-- L + m), from the linear system sum_{j=1..m} q_j c_(k-j) = -c_k, k = L+1 .. L+m, by
-- Gaussian elimination with partial pivoting (O(m^3)). nil when the system is singular
-- to working accuracy (a pivot below 1e-13 of the largest entry): the series is then a
-- rational function of lower degree, whose approximant the caller already has.
function M.pade(cr, ci, L, m)
  local Ar, Ai, br, bi = {}, {}, {}, {}
  local big = 0
  for i = 1, m do
    local k = L + i
    local rr, ri = {}, {}
    for j = 1, m do
      local idx = k - j
      if idx >= 0 then rr[j], ri[j] = cr[idx], ci[idx] else rr[j], ri[j] = 0, 0 end
      big = max(big, abs(rr[j]) + abs(ri[j]))
    end
    Ar[i], Ai[i] = rr, ri
    br[i], bi[i] = -cr[k], -ci[k]
  end
  for col = 1, m do
    local best, bp = -1, col
    for r = col, m do
      local v = abs(Ar[r][col]) + abs(Ai[r][col])
      if v > best then best, bp = v, r end
    end
    if not (best > 1e-13 * big) then return nil end
    Ar[col], Ar[bp] = Ar[bp], Ar[col]
    Ai[col], Ai[bp] = Ai[bp], Ai[col]
    br[col], br[bp] = br[bp], br[col]
    bi[col], bi[bp] = bi[bp], bi[col]
    local Pr, Pi = Ar[col], Ai[col]
    local pr, pim = Pr[col], Pi[col]
    for r = col + 1, m do
      local Rr, Ri = Ar[r], Ai[r]
      local fr, fi = cdiv(Rr[col], Ri[col], pr, pim)
      if fr ~= 0 or fi ~= 0 then
        for j = col, m do
          local xr, xi = Pr[j], Pi[j]
          Rr[j], Ri[j] = Rr[j] - (fr * xr - fi * xi), Ri[j] - (fr * xi + fi * xr)
        end
        br[r], bi[r] = br[r] - (fr * br[col] - fi * bi[col]), bi[r] - (fr * bi[col] + fi * br[col])
      end
    end
  end
  local qr, qi = { [0] = 1 }, { [0] = 0 }
  for r = m, 1, -1 do
    local sr, si = br[r], bi[r]
    local Rr, Ri = Ar[r], Ai[r]
    for j = r + 1, m do
      sr, si = sr - (Rr[j] * qr[j] - Ri[j] * qi[j]), si - (Rr[j] * qi[j] + Ri[j] * qr[j])
    end
    qr[r], qi[r] = cdiv(sr, si, Rr[r], Ri[r])
    if qr[r] ~= qr[r] or qi[r] ~= qi[r] then return nil end
  end
  local pr, pim = {}, {}
  for k = 0, L do
    local sr, si = 0, 0
    for j = 0, min(k, m) do
      sr, si = sr + qr[j] * cr[k - j] - qi[j] * ci[k - j], si + qr[j] * ci[k - j] + qi[j] * cr[k - j]
    end
    pr[k], pim[k] = sr, si
  end
  return { pr = pr, pi = pim, qr = qr, qi = qi, L = L, m = m }
end

-- Horner's rule for sum a_k z^k (k = 0..deg), with sum |a_k| |z|^k (the scale of its
-- rounding error).
local function horner(ar, ai, deg, zr, zi, az)
  local sr, si, sa = ar[deg], ai[deg], abs(ar[deg]) + abs(ai[deg])
  for k = deg - 1, 0, -1 do
    sr, si = sr * zr - si * zi + ar[k], sr * zi + si * zr + ai[k]
    sa = sa * az + abs(ar[k]) + abs(ai[k])
  end
  return sr, si, sa
end

--- eval(P, zr, zi) -> value (re, im) and a bound on its rounding error.
function M.eval(P, zr, zi)
  local az = hypot(zr, zi)
  local nr, ni, na = horner(P.pr, P.pi, P.L, zr, zi, az)
  local dr, di, da = horner(P.qr, P.qi, P.m, zr, zi, az)
  local vr, vi = cdiv(nr, ni, dr, di)
  local d = hypot(dr, di)
  -- relative rounding of numerator and denominator: 2 (degree + 1) u times their scales
  local rel = 2 * (P.L + P.m + 2) * EPS * (na / max(hypot(nr, ni), 1e-300) + da / d)
  return vr, vi, rel * hypot(vr, vi) + 2 * (P.L + 2) * EPS * na / d
end

--- roots(ar, ai, deg) -> lists of real and imaginary parts of the zeros of the polynomial
-- sum a_k z^k, by Aberth's simultaneous iteration (Aberth, Math. Comp. 27 (1973)
-- 339-344), started on a circle of the geometric-mean radius; nil if it does not settle.
function M.roots(ar, ai, deg)
  while deg > 0 and ar[deg] == 0 and ai[deg] == 0 do deg = deg - 1 end
  if deg < 1 then return {}, {} end
  local lead = hypot(ar[deg], ai[deg])
  local c0 = hypot(ar[0], ai[0])
  local rad = (c0 > 0) and (c0 / lead) ^ (1 / deg) or 1
  local zr, zi = {}, {}
  for k = 1, deg do
    local th = 2 * pi * (k - 0.25) / deg + 0.4
    zr[k], zi[k] = rad * cos(th), rad * sin(th)
  end
  -- derivative coefficients
  local dr, di = {}, {}
  for k = 1, deg do dr[k - 1], di[k - 1] = k * ar[k], k * ai[k] end
  local done = {}
  for _ = 1, 300 do
    local moved = 0
    for k = 1, deg do
      if done[k] then goto next_root end
      do
      local x, y = zr[k], zi[k]
      local az = hypot(x, y)
      local pr, pim = horner(ar, ai, deg, x, y, az)
      local qr, qim = horner(dr, di, deg - 1, x, y, az)
      local nr, ni = cdiv(pr, pim, qr, qim)          -- Newton step p/p'
      local sr, si = 0, 0                             -- sum 1/(z_k - z_j)
      for j = 1, deg do
        if j ~= k then
          local ur, ui = cdiv(1, 0, x - zr[j], y - zi[j])
          sr, si = sr + ur, si + ui
        end
      end
      -- w = N / (1 - N S)
      local er, ei = 1 - (nr * sr - ni * si), -(nr * si + ni * sr)
      local wr, wi = cdiv(nr, ni, er, ei)
      if wr == wr and wi == wi then
        zr[k], zi[k] = x - wr, y - wi
        local step = hypot(wr, wi) / max(az, 1e-300)
        if step < 1e-12 then done[k] = true end
        moved = max(moved, step)
      end
      end
      ::next_root::
    end
    if moved < 1e-12 then return zr, zi end
  end
  -- not every root settled (clusters converge slowly): keep those where the polynomial is
  -- small against the size of its terms
  local or_, oi = {}, {}
  for k = 1, deg do
    local az = hypot(zr[k], zi[k])
    local pr, pim, pa = horner(ar, ai, deg, zr[k], zi[k], az)
    if hypot(pr, pim) <= 1e-8 * pa then or_[#or_ + 1], oi[#oi + 1] = zr[k], zi[k] end
  end
  if #or_ == 0 then return nil end
  return or_, oi, true
end

---------------------------------------------------------------------------------------
-- The Laplace integral along a ray.
---------------------------------------------------------------------------------------

--- rule(mu, theta, h) -> the exp-sinh rule with step h for
-- integral_0^(inf e^{i theta}) e^{-s} s^(mu - 1) f(s) ds (mu > 0, |theta| < pi/2):
-- s = e^{i theta} exp((pi/2) sinh t), trapezoidal in t (Takahasi & Mori 1974). The range
-- of t stops where s^mu (below) or e^{-s cos theta} (above) falls under 1e-18. Nodes
-- s_k and complex weights w_k = h e^{-s} s^(mu-1) ds/dt, with |w_k| kept.
local function rule(mu, theta, h)
  local ct, st = cos(theta), sin(theta)
  local slo = exp(max(-700, log(1e-18) / mu))
  local shi = (45 + 8 * abs(mu - 1)) / ct
  local tlo, thi = -asinh(-log(slo) * 2 / pi), asinh(log(shi) * 2 / pi)
  local R = { sr = {}, si = {}, wr = {}, wi = {}, wa = {}, h = h }
  local k0, k1 = floor(tlo / h), math.ceil(thi / h)
  for k = k0, k1 do
    local t = k * h
    local r = exp(pi / 2 * math.sinh(t))
    local mag = exp(-r * ct) * r ^ (mu - 1) * (pi / 2) * math.cosh(t) * r * h
    local ph = -r * st + theta * mu
    local i = #R.sr + 1
    R.sr[i], R.si[i] = r * ct, r * st
    R.wr[i], R.wi[i], R.wa[i] = mag * cos(ph), mag * sin(ph), mag
    R.even = R.even or (k % 2 == 0 and 1 or 2)   -- first index on the rule of step 2h
  end
  return R
end

-- The rule applied to f (returning value and rounding bound): the sum, the difference
-- from the sum on every other node (the rule of step 2h: it converges geometrically, so
-- the difference bounds the error of the finer sum), the summed rounding, and the sum of
-- |integrand|.
local function apply(R, f)
  local vr, vi, va, ve, hr, hi = 0, 0, 0, 0, 0, 0
  local sr, si, wr, wi, wa = R.sr, R.si, R.wr, R.wi, R.wa
  local even = R.even
  for k = 1, #sr do
    local fr, fi, fe = f(sr[k], si[k])
    local ar, ai = wr[k] * fr - wi[k] * fi, wr[k] * fi + wi[k] * fr
    vr, vi = vr + ar, vi + ai
    va, ve = va + wa[k] * hypot(fr, fi), ve + wa[k] * fe
    if (k - even) % 2 == 0 then hr, hi = hr + ar, hi + ai end
  end
  local diff = hypot(2 * hr - vr, 2 * hi - vi)
  return vr, vi, diff, ve + 8 * EPS * va, va
end

--- laplace(f, mu, theta [, hmin]) -> re, im, error estimate, h:
-- integral_0^(inf e^{i theta}) e^{-s} s^(mu - 1) f(s) ds by the exp-sinh rule, the step
-- halved from 1/8 until the rule agrees with the one of twice the step to 1e-15 of the
-- sum of |integrand| (down to hmin, 1/256 by default). f(sr, si) returns the value and
-- a bound on its rounding error. The estimate adds that difference and the rounding.
function M.laplace(f, mu, theta, hmin)
  hmin = hmin or 1 / 256
  local h = 1 / 4
  local vr, vi, diff, round, va
  repeat
    h = h / 2
    vr, vi, diff, round, va = apply(rule(mu, theta, h), f)
  until diff <= 1e-15 * va or h <= hmin
  return vr, vi, diff + round, h
end
M.rule, M.apply_rule = rule, apply

---------------------------------------------------------------------------------------
-- The Borel-Pade sum of a contribution.
---------------------------------------------------------------------------------------

local function angle_between(a, b)
  local d = (a - b) % (2 * pi)
  if d > pi then d = d - 2 * pi end
  return d
end

-- The rays tried, in order of preference: the real one, then turned by up to 1 radian.
local RAYS = { 0, 0.25, -0.25, 0.5, -0.5, 0.75, -0.75, 1.0, -1.0 }
local CLEARANCE = 0.2      -- radians between the ray and any singularity near it
local NEAR = 80            -- singularities farther than this (in s) do not matter

-- The ray for the Laplace integral: the first of RAYS that keeps CLEARANCE from every
-- obstacle within NEAR and sweeps, on its way from the real axis, over none of those
-- that mark true singularities (o.sweep: turning the ray across one changes the value;
-- the poles by which a Pade approximant draws the cut of a known singulant only need
-- clearance). An obstacle of that kind on the real axis itself (within 1e-6 rad) cannot
-- be avoided: on a Stokes line (median true: the caller's decomposition takes the mean of
-- the two sides there) the two lateral rays are returned, for their mean; off it, the
-- one lateral ray that gives the sum along the real axis itself, on the side away from
-- the obstacle (a singulant at arg +1e-7 lies above the axis: the ray below), as the
-- steepest descent decomposition at those parameters has it.
function M.choose_ray(obstacles, median)
  local on_line, line_arg = false, 0
  for _, o in ipairs(obstacles) do
    if o.r < NEAR and o.sweep ~= false and abs(o.arg) < 1e-6 then
      on_line = true
      if abs(o.arg) > abs(line_arg) then line_arg = o.arg end
    end
  end
  local function ok(theta, ignore_line)
    for _, o in ipairs(obstacles) do
      local on = abs(o.arg) < 1e-6
      if o.r < NEAR and not (ignore_line and on) then
        if abs(angle_between(o.arg, theta)) < CLEARANCE and not (ignore_line and on) then
          return false
        end
        local lo, hi = min(0, theta), max(0, theta)
        if o.sweep ~= false and o.arg >= lo and o.arg <= hi then return false end
      end
    end
    return true
  end
  if on_line then
    local plus, minus
    for _, th in ipairs(RAYS) do
      if th > 0 and not plus and ok(th, true) then plus = th end
      if th < 0 and not minus and ok(th, true) then minus = th end
    end
    if plus and minus and not median and line_arg ~= 0 then
      return { line_arg > 0 and minus or plus }, false
    end
    if plus and minus then return { plus, minus }, true end
    return { 0 }, true, "no clear ray on either side of the singularity on the real axis"
  end
  for _, th in ipairs(RAYS) do
    if ok(th) then return { th }, false end
  end
  return { 0 }, false, "every ray tried passes near a singularity of the Borel transform"
end

--- sum(spec) -> result: the Borel-Pade sum of sum_j factor_j sum_n c_jn Gamma(n + mu_j),
-- spec = { classes = { {fr =, fi =, mu =, cr = {[0] = ...}, ci = {...}, count = K}, ... },
--          singulants = { {re =, im =, what = "saddle 2"}, ... } (in the s plane),
--          max_degree = 30 }.
-- result = { re, im, error, degree (of the first class), theta (list of rays), lateral,
--            poles (genuine poles of the highest approximant, in s), nearest, matched,
--            notes }.
function M.sum(spec)
  local notes = {}
  local classes = spec.classes
  local sing = spec.singulants or {}
  local maxdeg = spec.max_degree or 30
  -- the scale of s: the nearest singulant, or the coefficients' root test
  local R
  for _, s in ipairs(sing) do
    local r = hypot(s.re, s.im)
    if r > 0 and (not R or r < R) then R = r end
  end
  local main = classes[1]
  if not R then
    local c0 = 0
    for k = 0, 2 do c0 = max(c0, hypot(main.cr[k] or 0, main.ci[k] or 0)) end
    local K = main.count - 1
    local cK = hypot(main.cr[K], main.ci[K])
    R = (c0 > 0 and cK > 0) and (cK / c0) ^ (-1 / K) or 1
  end
  if not (R > 1e-300 and R < 1e300) then R = 1 end
  -- scaled coefficients and their approximants of every degree
  for _, cl in ipairs(classes) do
    local sr, si = {}, {}
    local f = 1
    for k = 0, cl.count - 1 do
      sr[k], si[k] = cl.cr[k] * f, cl.ci[k] * f
      f = f * R
    end
    cl.sr, cl.si = sr, si
    cl.top = min(maxdeg, (cl.count - 1) // 2)
    cl.approx = {}
    local last
    for n = 0, cl.top do
      local P = n == 0 and { pr = { [0] = sr[0] }, pi = { [0] = si[0] }, qr = { [0] = 1 },
        qi = { [0] = 0 }, L = 0, m = 0 } or M.pade(sr, si, n, n)
      if P then last = P; P.degree = n else P = last end
      cl.approx[n] = P
    end
  end
  -- poles of the main class's approximant of degree 20 (or its highest), in s; genuine
  -- when the residue is not negligible (a pole paired with a nearby zero, from noise, has
  -- a tiny one)
  local poles = {}
  local P = main.approx[min(main.top, 20)]
  if P and P.m > 0 then
    local zr, zi = M.roots(P.qr, P.qi, P.m)
    if zr then
      local dqr, dqi = {}, {}
      for k = 1, P.m do dqr[k - 1], dqi[k - 1] = k * P.qr[k], k * P.qi[k] end
      local scale = 0
      for k = 0, main.count - 1 do scale = max(scale, hypot(main.sr[k], main.si[k])) end
      for k = 1, #zr do
        local az = hypot(zr[k], zi[k])
        local nr, ni = horner(P.pr, P.pi, P.L, zr[k], zi[k], az)
        local dr, di = horner(dqr, dqi, P.m - 1, zr[k], zi[k], az)
        local res = hypot(nr, ni) / max(hypot(dr, di), 1e-300)
        if res > 1e-8 * scale * max(1, az) then
          poles[#poles + 1] = { re = zr[k] * R, im = zi[k] * R, r = az * R,
            arg = atan(zi[k], zr[k]) }
        end
      end
      table.sort(poles, function(a, b) return a.r < b.r end)
    else
      notes[#notes + 1] = "the poles of the Pade approximant could not be located"
    end
  end
  -- the obstacles: the singulants the landscape knows, and the approximant's poles; a
  -- pole nearer the origin than every known singulant (or any, when none is known) marks
  -- a singularity the landscape does not know, the others may draw a known one's cut
  local obstacles = {}
  local nearest_known = huge
  for _, s in ipairs(sing) do
    local r = hypot(s.re, s.im)
    obstacles[#obstacles + 1] = { r = r, arg = atan(s.im, s.re) }
    nearest_known = min(nearest_known, r)
  end
  for _, p in ipairs(poles) do
    obstacles[#obstacles + 1] = { r = p.r, arg = p.arg, sweep = p.r < 0.9 * nearest_known }
  end
  local rays, lateral, why = M.choose_ray(obstacles, spec.median)
  if why then notes[#notes + 1] = why end
  -- the sums, class by class and degree by degree
  local total_r, total_i, total_e = 0, 0, 0
  local degrees = {}
  for ci, cl in ipairs(classes) do
    -- one rule per ray for every degree: its step is the one the highest degree needs
    local rules = {}
    for k, theta in ipairs(rays) do
      local top = cl.approx[cl.top]
      local _, _, _, h = M.laplace(function(a, b) return M.eval(top, a / R, b / R) end,
        cl.mu, theta)
      rules[k] = rule(cl.mu, theta, h)
    end
    local values = {}
    for n = 0, cl.top do
      local A = cl.approx[n]
      if A and (n == 0 or A ~= cl.approx[n - 1]) then
        local vr, vi, ve = 0, 0, 0
        local function f(a, b) return M.eval(A, a / R, b / R) end
        for _, Rk in ipairs(rules) do
          local ar, ai, diff, round = apply(Rk, f)
          vr, vi, ve = vr + ar / #rays, vi + ai / #rays, ve + (diff + round) / #rays
        end
        values[n] = { vr, vi, ve }
      else
        values[n] = values[n - 1]
      end
    end
    -- the degree whose neighbours (two either side where they exist) agree best with it,
    -- among the degrees with an approximant of their own (where the linear system of a
    -- degree fails, the one below stands in: repeated, it agreed with itself exactly, and
    -- Gamma(-4.5, 1.2) came out 1.4e-10 off under 7.9e-12)
    local own = {}
    for n = 1, cl.top do
      if cl.approx[n] and cl.approx[n].degree == n then own[#own + 1] = n end
    end
    local best, bn = huge, own[#own] or cl.top
    for i, n in ipairs(own) do
      local v = values[n]
      local spread, count = 0, 0
      for j = max(1, i - 2), min(#own, i + 2) do
        if j ~= i then
          local w = values[own[j]]
          spread = max(spread, hypot(w[1] - v[1], w[2] - v[2]))
          count = count + 1
        end
      end
      if count >= min(4, #own - 1) and v[1] == v[1] and v[2] == v[2] and spread < best then
        best, bn = spread, n
      end
    end
    if best == huge then
      -- too few coefficients (or approximants) for a comparison
      local w = values[own[#own - 1] or max(0, bn - 1)]
      local v = values[bn]
      best = hypot(v[1] - w[1], v[2] - w[2])
      if bn == 0 then best = huge end
    end
    local v = values[bn]
    -- the degree was chosen where its neighbours happen to agree best: where the
    -- approximants scatter about a floor (coefficients' noise, |singulant| < 1) that
    -- choice understates the scatter (Gamma(0.5, 0.5): 6e-8 off under 3e-8), so the
    -- spread is read again over three degrees either side
    for i, n in ipairs(own) do
      if n == bn then
        for j = max(1, i - 3), min(#own, i + 3) do
          local w = values[own[j]]
          if w[1] == w[1] and w[2] == w[2] then best = max(best, hypot(w[1] - v[1], w[2] - v[2])) end
        end
      end
    end
    -- with the nearest singulant inside the unit disc the Laplace integral reaches far
    -- past it, and the approximants settle on a value off by a bias their neighbours
    -- share (Gamma(1.5, 0.9): 9e-9 off under 5e-9): the spread over the upper half of
    -- the degrees, all of them
    if R < 1 then
      for _, n in ipairs(own) do
        local w = values[n]
        if n >= cl.top // 2 and w[1] == w[1] and w[2] == w[2] then
          best = max(best, hypot(w[1] - v[1], w[2] - v[2]))
        end
      end
    end
    -- every higher degree uses more of the series: where they still move away from the
    -- chosen value (slow convergence, or rounding that the linear system amplifies), the
    -- error is at least that large
    for j = bn + 1, cl.top do
      local w = values[j]
      if w[1] == w[1] and w[2] == w[2] then best = max(best, hypot(w[1] - v[1], w[2] - v[2])) end
    end
    local vr, vi = v[1] * cl.fr - v[2] * cl.fi, v[1] * cl.fi + v[2] * cl.fr
    local fa = hypot(cl.fr, cl.fi)
    total_r, total_i = total_r + vr, total_i + vi
    total_e = total_e + fa * (2 * best + v[3])
    degrees[ci] = bn
  end
  -- what the approximant says about the nearest singularity of beta, against the
  -- singulants the landscape knows
  local nearest, matched = poles[1], nil
  if nearest then
    for _, s in ipairs(sing) do
      local d = hypot(s.re - nearest.re, s.im - nearest.im)
      if d <= 0.25 * hypot(s.re, s.im) then matched = s.what; break end
    end
  end
  return { re = total_r, im = total_i, error = total_e, degree = degrees[1], degrees = degrees,
    theta = rays, lateral = lateral, poles = poles, nearest = nearest, matched = matched,
    notes = notes, scale = R }
end

return M
