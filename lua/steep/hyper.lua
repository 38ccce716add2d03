-- steep.hyper — hyperasymptotics: the remainder of a contribution's series, truncated
-- beyond its smallest term, re-expanded in terminants and hyperterminants whose
-- coefficients are the series of the adjacent saddles and poles (Berry & Howls, Proc. R.
-- Soc. A 434 (1991) 657-675; Olde Daalhuis, J. Comput. Appl. Math. 89 (1998) 87-95 for the
-- hyperterminants; DLMF 2.11(v)).
--
-- A contribution n = e^{F_n} sum_r t_r (terms t_r ~ lambda^-(r + mu_n) in the family
-- integral g e^{lambda F}, taken at lambda = 1) has the exact remainder (the resurgence
-- relation of Berry & Howls, eq. (14), written for general mu)
--   sum_{r >= N0} t_r = sum_m K_nm/(2 pi i) integral_0^(inf/sigma_m) tau^(N0 + mu_n - 1)
--                        e^{-sigma_m tau} / (1 - tau) I_m(tau) dtau,
-- with sigma_m = F_n - F_m the singulant, K_nm the Stokes constant and I_m(Lambda) = sum_l
-- t^(m)_l Lambda^-(l + mu_m) the adjacent contribution at the large parameter Lambda.
-- Level 1 puts the series of I_m (truncated at N1) inside:
--   (K/2 pi i) sum_{l < N1} t^(m)_l U(N0 + mu_n - l - mu_m, sigma_m),
--   U(M, Z) = Z^-M integral_0^inf v^(M-1) e^{-v} / (1 - v/Z) dv   (the terminant; DLMF
--   2.11.11 up to normalisation),
-- and level 2 re-expands m's own remainder the same way, with the saddles and poles p
-- adjacent to m (one of which is n itself):
--   (K_nm K_mp/(2 pi i)^2) sum_{q < N2} t^(p)_q H(N0 + mu_n - q - mu_p, N1 + mu_m - q - mu_p),
--   H(a, b) = sigma_m^-a integral_0^inf v^(a-1) e^{-v}/(1 - v/sigma_m) U(b, v sigma_mp/sigma_m) dv.
-- Truncations as Olde Daalhuis prescribes for equal singulants, N0 ~ (level+1)|sigma|,
-- N1 ~ N0 - |sigma_m|, N2 ~ N1 - |sigma_mp|; the error at level k is then about
-- e^{-(k+1)|sigma|} relative, against e^{-|sigma|} for optimal truncation.
--
-- Stokes constants: which saddles and poles are adjacent comes from the landscape (the
-- caller traces the steepest descent path at each pair's Stokes phase: a candidate it
-- does not reach has K = 0); the value of K (its sign, its size) is read from the late
-- terms of the series itself (Dingle's rule: t_r = sum_m K_m A_rm with A_rm the
-- resurgence sum above with Gamma(r + mu_n - l - mu_m) sigma_m^-(...)), fitted by least
-- squares over ten late terms for the candidates whose influence there is measurable,
-- and accepted only when every K is an integer (to 0.1), the only one that fits, and the
-- fit then explains those terms (to 1e-4). Late terms that the landscape's saddles and
-- poles do not explain (singulants on other sheets of a logarithm, branch points) stop
-- the method: it says so.
--
-- Terminant integrals: the exp-sinh rule (Takahasi & Mori 1974) along a ray turned away
-- from the pole v = Z (borel.choose_ray); on a Stokes line (Z on the positive axis) the
-- mean of the two lateral rays, i.e. the principal value, as Berry's smoothing has it.

local complex = require "steep.complex"
local borel = require "steep.borel"

local cnew, cparts = complex.new, complex.parts
local abs, sqrt, exp, log, cos, sin, atan = math.abs, math.sqrt, math.exp, math.log,
  math.cos, math.sin, math.atan
local huge, pi, max, min, floor = math.huge, math.pi, math.max, math.min, math.floor
local format = string.format
local hypot = borel.hypot

local M = {}

local EPS = 2.220446049250313e-16

-- log Gamma(x) for x > 0: shifted up to 20, then Stirling's series (as expand.gamma).
local function lgamma(x)
  local shift = 0
  while x < 20 do shift = shift + log(x); x = x + 1 end
  local inv2 = 1 / (x * x)
  local s = 1 / 12 - inv2 * (1 / 360 - inv2 * (1 / 1260 - inv2 * (1 / 1680 - inv2 * (1 / 1188
    - inv2 * (691 / 360360 - inv2 * (1 / 156 - inv2 * 3617 / 122400))))))
  return (x - 0.5) * log(x) - x + 0.5 * log(2 * pi) + s / x - shift
end
M.lgamma = lgamma

local function asinh(x) return log(x + sqrt(x * x + 1)) end

---------------------------------------------------------------------------------------
-- Terminants.
---------------------------------------------------------------------------------------

-- The exp-sinh nodes for integral_0^(inf e^{i phi}) f(v) dv with an integrand like
-- v^(M-1) e^{-v}, M in [mlo, mhi]: r = exp((pi/2) sinh t), v = r e^{i phi}, step h.
local function nodes(phi, mlo, mhi, h)
  local cp = cos(phi)
  local rlo = exp(max(-700, log(1e-18) / max(mlo, 0.05)))
  local rhi = (mhi + 12 * sqrt(max(mhi, 1)) + 50) / cp
  local tlo, thi = -asinh(-log(rlo) * 2 / pi), asinh(log(rhi) * 2 / pi)
  local list = { logr = {}, r = {}, w = {} }
  for k = floor(tlo / h), math.ceil(thi / h) do
    local t = k * h
    local r = exp(pi / 2 * math.sinh(t))
    list.r[#list.r + 1] = r
    list.logr[#list.logr + 1] = log(r)
    list.w[#list.w + 1] = h * (pi / 2) * math.cosh(t) * r   -- dr
    list.even = list.even or (k % 2 == 0 and 1 or 2)
  end
  return list
end

-- U(M, Z) for every M of the list at once along the ray phi, on nodes of step h: the sums
-- on all nodes and on every other one (the rule of step 2h), as pairs, and the sum of
-- |integrand| (the rounding scale). theta: the argument of Z for the power Z^-M, when it
-- is not the principal one (a level-2 argument sigma_mp/sigma_m keeps the angle it has
-- as a difference of two principal arguments, which can lie outside (-pi, pi]: for a
-- half-integer M the branch matters).
local function terminant_sums(Ms, zr, zi, phi, h, theta)
  local lz, az = log(hypot(zr, zi)), theta or atan(zi, zr)
  local mlo, mhi = huge, 0
  for _, m in ipairs(Ms) do mlo, mhi = min(mlo, m), max(mhi, m) end
  local nd = nodes(phi, mlo, mhi, h)
  local cp, sp = cos(phi), sin(phi)
  local out = {}
  for i = 1, #Ms do out[i] = { 0, 0, 0, 0, 0 } end
  for k = 1, #nd.r do
    local r, lr = nd.r[k], nd.logr[k]
    -- 1/(1 - v/Z), v = r e^{i phi}
    local vr, vi = r * cp, r * sp
    local qr, qi = borel.cdiv(vr, vi, zr, zi)
    local br, bi = borel.cdiv(1, 0, 1 - qr, -qi)
    local half = (k - nd.even) % 2 == 0
    for i, m in ipairs(Ms) do
      -- v^(M-1) e^{-v} Z^-M dv, dv = e^{i phi} dr: in logs
      local lm = (m - 1) * lr - vr - m * lz + log(nd.w[k])
      local ph = (m - 1) * phi - vi - m * az + phi
      if lm > -745 then
        local e = exp(lm)
        local er, ei = e * cos(ph), e * sin(ph)
        local tr, ti = er * br - ei * bi, er * bi + ei * br
        local o = out[i]
        o[1], o[2] = o[1] + tr, o[2] + ti
        if half then o[3], o[4] = o[3] + tr, o[4] + ti end
        o[5] = o[5] + hypot(tr, ti)
      end
    end
  end
  return out
end

--- terminants(Ms, Z [, cache, median]) -> values (list of complex), errors (list):
-- U(M, Z) = Z^-M integral_0^inf v^(M-1) e^{-v} / (1 - v/Z) dv for each M of the list
-- (M > 0, Z != 0, principal powers), along a ray turned away from the pole v = Z; for Z on
-- the positive axis the principal value (the mean of the two lateral rays) where median
-- (on a Stokes line), else the lateral ray below Z's side (borel.choose_ray). The step is
-- halved from 1/16 (to 1/64 at most) until the rule agrees with the one of twice the
-- step to 1e-15 of the sum of |integrand|; that difference is the quadrature error (plus
-- rounding).
function M.terminants(Ms, Z, cache, median)
  if cache then
    -- (the truncations tried share most of their terminants: compute the new ones only)
    local kr, ki = cparts(Z)
    local key = string.format("%a,%a,%s", kr, ki, tostring(median))
    local kept = cache[key] or {}
    cache[key] = kept
    local missing = {}
    for _, m in ipairs(Ms) do if not kept[m] then missing[#missing + 1] = m end end
    if #missing > 0 then
      local v, e = M.terminants(missing, Z, nil, median)
      for i, m in ipairs(missing) do kept[m] = { v[i], e[i] } end
    end
    local vals, errs = {}, {}
    for i, m in ipairs(Ms) do vals[i], errs[i] = kept[m][1], kept[m][2] end
    return vals, errs
  end
  local zr, zi = cparts(Z)
  local rays = borel.choose_ray({ { r = 0, arg = atan(zi, zr) } }, median)
  local vals, errs = {}, {}
  for i = 1, #Ms do vals[i], errs[i] = cnew(0, 0), 0 end
  for _, phi in ipairs(rays) do
    local s, h = nil, 1 / 8
    repeat
      -- halve the step until every sum agrees with the one of twice the step
      h = h / 2
      s = terminant_sums(Ms, zr, zi, phi, h)
      local worst = 0
      for _, o in ipairs(s) do
        worst = max(worst, hypot(o[1] - 2 * o[3], o[2] - 2 * o[4]) / max(o[5], 1e-300))
      end
    until worst <= 1e-15 or h <= 1 / 64
    for i, o in ipairs(s) do
      local w = 1 / #rays
      vals[i] = vals[i] + cnew(o[1] * w, o[2] * w)
      errs[i] = errs[i] + w * (hypot(o[1] - 2 * o[3], o[2] - 2 * o[4]) + 16 * EPS * o[5])
    end
  end
  return vals, errs
end

--- hyperterminants(list of {a, b}, sigma_m, sigma_mp) -> values, errors:
-- H(a, b) = sigma_m^-a integral_0^inf v^(a-1) e^{-v}/(1 - v/sigma_m) U(b, v sigma_mp/sigma_m) dv,
-- the outer integral along a ray that keeps clear of the pole v = sigma_m and of the
-- ray where U's argument crosses the positive axis; the inner U on one set of nodes
-- (its argument keeps its angle along the outer ray). Outer and inner steps 1/16; the
-- error is the difference from steps 1/8 (plus rounding).
function M.hyperterminants(pairs_, sm, smp, median)
  local smr, smi = cparts(sm)
  local spr, spi = cparts(smp)
  local asm, asp = atan(smi, smr), atan(spi, spr)
  local lsm = log(hypot(smr, smi))
  local outer_rays = borel.choose_ray({ { r = 0, arg = asm }, { r = 0, arg = asm - asp } },
    median)
  local vals, errs = {}, {}
  for i = 1, #pairs_ do vals[i], errs[i] = cnew(0, 0), 0 end
  local amin, amax, bmin, bmax = huge, 0, huge, 0
  for _, ab in ipairs(pairs_) do
    amin, amax = min(amin, ab[1]), max(amax, ab[1])
    bmin, bmax = min(bmin, ab[2]), max(bmax, ab[2])
  end
  local function once(phi, h)
    local nd = nodes(phi, amin, amax, h)
    local cp, sp = cos(phi), sin(phi)
    -- the inner argument Z = v sigma_mp / sigma_m: its angle is fixed along the ray
    local zang = phi + asp - asm
    local inner_rays = borel.choose_ray({ { r = 0, arg = zang } }, median)
    local sums = {}
    for i = 1, #pairs_ do sums[i] = { 0, 0, 0 } end
    for k = 1, #nd.r do
      local r, lr = nd.r[k], nd.logr[k]
      local vr, vi = r * cp, r * sp
      local qr, qi = borel.cdiv(vr, vi, smr, smi)
      local br, bi = borel.cdiv(1, 0, 1 - qr, -qi)
      -- the inner terminants at Z = v sigma_mp/sigma_m for every b
      local zr, zi = qr * spr - qi * spi, qr * spi + qi * spr
      local Bs = {}
      for i, ab in ipairs(pairs_) do Bs[i] = ab[2] end
      local U = {}
      for i = 1, #pairs_ do U[i] = { 0, 0 } end
      for _, psi in ipairs(inner_rays) do
        local s = terminant_sums(Bs, zr, zi, psi, h, zang)
        for i, o in ipairs(s) do
          U[i][1], U[i][2] = U[i][1] + o[1] / #inner_rays, U[i][2] + o[2] / #inner_rays
        end
      end
      for i, ab in ipairs(pairs_) do
        local a = ab[1]
        local lm = (a - 1) * lr - vr - a * lsm + log(nd.w[k])
        local ph = (a - 1) * phi - vi - a * asm + phi
        if lm > -745 then
          local e = exp(lm)
          local er, ei = e * cos(ph), e * sin(ph)
          local tr, ti = er * br - ei * bi, er * bi + ei * br
          local ur, ui = U[i][1], U[i][2]
          local xr, xi = tr * ur - ti * ui, tr * ui + ti * ur
          sums[i][1], sums[i][2] = sums[i][1] + xr, sums[i][2] + xi
          sums[i][3] = sums[i][3] + hypot(xr, xi)
        end
      end
    end
    return sums
  end
  for _, phi in ipairs(outer_rays) do
    local fine, coarse = once(phi, 1 / 16), once(phi, 1 / 8)
    local w = 1 / #outer_rays
    for i = 1, #pairs_ do
      local f, c = fine[i], coarse[i]
      vals[i] = vals[i] + cnew(f[1] * w, f[2] * w)
      errs[i] = errs[i] + w * (hypot(f[1] - c[1], f[2] - c[2]) + 64 * EPS * f[3])
    end
  end
  return vals, errs
end

---------------------------------------------------------------------------------------
-- Stokes constants from the late terms.
---------------------------------------------------------------------------------------

-- A_r for one candidate: (1/2 pi i) sum_l t_l Gamma(r + mu_n - l - mu_c) sigma^-(r + mu_n -
-- l - mu_c), the inner sum stopped at its smallest term (it is itself asymptotic).
local function late_term(r, mun, c)
  local sr, si = cparts(c.sigma)
  local lsig, asig = log(hypot(sr, si)), atan(si, sr)
  local total = cnew(0, 0)
  local prev = huge
  for l = 0, min(c.count - 1, r - 1) do
    local tl = c.terms[l]
    local tr, ti = cparts(tl)
    local mag = hypot(tr, ti)
    if mag > 0 then
      local a = r + mun - l - c.mu
      if a <= 0 then break end
      local lm = log(mag) + lgamma(a) - a * lsig
      if lm > prev + 1e-9 and l >= 2 then break end
      prev = lm
      local ph = atan(ti, tr) - a * asig
      total = total + cnew(exp(lm) * cos(ph), exp(lm) * sin(ph))
    end
    if c.exact then break end
  end
  return total / cnew(0, 2 * pi)
end

-- Solves the small complex system A x = b (n x n, lists of complex) by elimination with
-- partial pivoting; nil if singular.
local function solve(A, b, n)
  for col = 1, n do
    local best, bp = 0, col
    for r = col, n do
      local v = A[r][col]:abs()
      if v > best then best, bp = v, r end
    end
    if best == 0 then return nil end
    A[col], A[bp], b[col], b[bp] = A[bp], A[col], b[bp], b[col]
    for r = col + 1, n do
      local f = A[r][col] / A[col][col]
      for j = col, n do A[r][j] = A[r][j] - f * A[col][j] end
      b[r] = b[r] - f * b[col]
    end
  end
  local x = {}
  for r = n, 1, -1 do
    local s = b[r]
    for j = r + 1, n do s = s - A[r][j] * x[j] end
    x[r] = s / A[r][r]
  end
  return x
end

local WINDOW = 10           -- late terms used for the fit
local INFLUENCE = 1e-6      -- a candidate's share of the last term below which it cannot be fitted
local FIT_TOL = 1e-4        -- relative residual of the fit with integer K

--- stokes_constants(terms, count, mu, candidates) -> {K per candidate (integer, or nil
-- where it could not be determined)}, residual, why (when the late terms are not explained)
function M.stokes_constants(terms, count, mu, cands)
  -- the window: past the terms the truncations use (about 3 |sigma|), where the late-term
  -- form is accurate, but not at the very end, where the coefficients are least accurate;
  -- if that fails, the last terms
  local near = huge
  for _, c in ipairs(cands) do near = min(near, c.sigma:abs()) end
  local top = min(count - 1, max(24, floor(3.5 * near + 0.5) + 6))
  local K2, res2, why2 = M.stokes_constants_at(terms, count - 1, mu, cands)
  if top < count - 1 then
    local K, res, why = M.stokes_constants_at(terms, top, mu, cands)
    if K and not why then
      if K2 and not why2 then
        for j in pairs(cands) do
          if (K[j] == nil) ~= (K2[j] == nil) or (K[j] and K[j] ~= K2[j]) then
            if K[j] and K2[j] then
              return nil, nil, "the late terms give different Stokes constants at different orders"
            end
          end
        end
        -- the residual bounds the terms' error where the late-term form is accurate: the
        -- smaller of the two is the better bound for the terms before both windows
        return K, min(res, res2)
      end
      return K, res
    end
  end
  return K2, res2, why2
end

function M.stokes_constants_at(terms, top, mu, cands)
  local lo = max(2, top - WINDOW + 1)
  if top - lo < 3 then return nil, nil, "too few terms to read the late terms" end
  local Ks = {}
  -- the candidates that show in the last term, grouped by singulant: points at the same
  -- singulant (a pair of poles symmetric about the saddle, say) give proportional
  -- columns, so only their combination can be fitted; its integer split is found below
  local groups = {}
  for j, c in ipairs(cands) do
    -- (a point the landscape's steepest paths do not reach at the pair's Stokes phase is
    -- not adjacent: its Stokes constant is 0, and it stays out of the fit)
    if c.connected == false then Ks[j] = cnew(0, 0); goto next_candidate end
    do
    local a_top = late_term(top, mu, c)
    local share = a_top:abs() / max(terms[top]:abs(), 1e-300)
    if share >= INFLUENCE and share < huge then
      local g
      for _, h in ipairs(groups) do
        local c0 = cands[h[1]]
        if c0.mu == c.mu and (c0.sigma - c.sigma):abs() <= 1e-9 * c.sigma:abs() then g = h end
      end
      if g then g[#g + 1] = j else groups[#groups + 1] = { j } end
    end
    end
    ::next_candidate::
  end
  local n = #groups
  if n == 0 then
    return Ks, huge, "the late terms are not governed by any saddle or pole the landscape "
      .. "knows (another sheet of a logarithm, a branch point?)"
  end
  -- columns: every member's late terms; the fit uses each group's first member
  local A = {}
  for r = lo, top do
    local row = {}
    for _, g in ipairs(groups) do
      for _, j in ipairs(g) do row[j] = late_term(r, mu, cands[j]) end
    end
    A[r] = row
  end
  -- weighted normal equations: rows scaled by 1/|t_r|
  local N, rhs = {}, {}
  for i = 1, n do
    N[i], rhs[i] = {}, cnew(0, 0)
    for k = 1, n do N[i][k] = cnew(0, 0) end
  end
  for r = lo, top do
    local w = 1 / max(terms[r]:abs(), 1e-300)
    local row = A[r]
    for i = 1, n do
      local ai = row[groups[i][1]]:conj() * w
      for k = 1, n do N[i][k] = N[i][k] + ai * row[groups[k][1]] * w end
      rhs[i] = rhs[i] + ai * terms[r] * w
    end
  end
  local x = solve(N, rhs, n)
  if not x then return nil, nil, "the late-term fit is singular" end
  for i, g in ipairs(groups) do
    -- integers K_j (|K_j| <= 2) with sum_j K_j A_j = x A_first at the last term
    local ratio = {}
    for k, j in ipairs(g) do ratio[k] = A[top][j] / A[top][g[1]] end
    local best, bestK = huge, nil
    local K = {}
    local function search(k)
      if k > #g then
        local s, size = cnew(0, 0), 0
        for m = 1, #g do s = s + K[m] * ratio[m]; size = size + abs(K[m]) end
        -- (ties, as for points at one singulant: the smallest constants, so that
        -- every window of terms makes the same choice)
        local big = 0
        for m = 1, #g do big = max(big, abs(K[m])) end
        local d = (s - x[i]):abs() + 1e-3 * size + 1e-4 * big
        if d < best then best, bestK = d, { table.unpack(K, 1, #g) } end
        return
      end
      for v = -2, 2 do K[k] = v; search(k + 1) end
    end
    if #g <= 4 then search(1) end
    if not bestK or best > 0.1 * max(1, x[i]:abs()) then
      return nil, nil, format("the Stokes constant read from the late terms for the %s "
        .. "is %s, not an integer: the late terms are not those of the landscape's saddles "
        .. "and poles alone", cands[g[1]].what, tostring(x[i]))
    end
    for k, j in ipairs(g) do Ks[j] = cnew(bestK[k], 0) end
  end
  local function misfit(K)
    local worst = 0
    for r = lo, top do
      local model = cnew(0, 0)
      for _, g in ipairs(groups) do
        for _, j in ipairs(g) do model = model + K[j] * A[r][j] end
      end
      worst = max(worst, (terms[r] - model):abs() / max(terms[r]:abs(), 1e-300))
    end
    return worst
  end
  local residual = misfit(Ks)
  if residual > FIT_TOL then
    return nil, residual, format("the landscape's saddles and poles explain the late terms "
      .. "only to %.2g (relative): another singularity governs them", residual)
  end
  -- the integers must be the only ones that fit: changing any one by +-1 must spoil the
  -- fit (singulants of nearly equal size give nearly equal columns, and then the split
  -- between them cannot be read from these terms)
  for _, g in ipairs(groups) do
    for _, j in ipairs(g) do
      for _, d in ipairs({ -1, 1 }) do
        local K2 = {}
        for k, v in pairs(Ks) do K2[k] = v end
        K2[j] = Ks[j] + d
        if misfit(K2) <= 10 * FIT_TOL then
          return nil, residual, format("the late terms cannot tell the Stokes constant of "
            .. "the %s apart from its neighbours' (their singulants are too alike at these "
            .. "orders)", cands[j].what)
        end
      end
    end
  end
  return Ks, residual
end

---------------------------------------------------------------------------------------
-- The levels.
---------------------------------------------------------------------------------------

local function sum_terms(terms, n)
  local s, a = cnew(0, 0), 0
  for r = 0, n - 1 do s = s + terms[r]; a = a + terms[r]:abs() end
  return s, a
end

local function round(x) return floor(x + 0.5) end

-- The level-1 pieces with N0 terms of n: the value, the error that stays at any level
-- (quadrature of the terminants, the terms' own accuracy), the level-1 truncation error
-- (twice the first omitted level-1 term of each adjacent series), and the truncations.
local function level1(n, adj, N0)
  local value, absum = sum_terms(n.terms, N0)
  local fixed, trunc = n.eps * absum, 0
  local used = {}
  for _, c in ipairs(adj) do
    local N1 = c.exact and 1 or min(c.count - 1, max(1, round(N0 - c.sigma:abs())))
    local Ms = {}
    for l = 0, N1 + 1 do
      local m = N0 + n.mu - l - c.mu
      if m > 0 then Ms[#Ms + 1] = m end
    end
    if #Ms < N1 + 1 then return nil end
    local U, Ue = M.terminants(Ms, c.sigma, n.cache, n.median)
    local kf = c.K / cnew(0, 2 * pi)
    local kabs = kf:abs()
    for l = 0, N1 - 1 do
      local piece = kf * c.terms[l] * U[l + 1]
      value = value + piece
      fixed = fixed + kabs * c.terms[l]:abs() * Ue[l + 1] + c.eps * piece:abs()
    end
    if not c.exact then
      -- twice the first omitted level-1 term, or the next one: terms from singulants at
      -- several angles oscillate in size, and one of them can dip far below the envelope
      local t1 = (c.terms[N1] * U[N1 + 1]):abs()
      local t2 = (c.terms[N1 + 1] and U[N1 + 2]) and (c.terms[N1 + 1] * U[N1 + 2]):abs() or t1
      trunc = trunc + 2 * kabs * max(t1, t2)
    end
    used[#used + 1] = { c = c, N1 = N1 }
  end
  return value, fixed, trunc, used
end

-- The level-2 pieces on top of level1(n, adj, N0): each adjacent series' remainder
-- re-expanded with its own adjacent saddles and poles. Returns the value to add, its
-- fixed and truncation errors, or nil and why.
local function level2(n, used, N0)
  local value, fixed, trunc = cnew(0, 0), 0, 0
  for _, u in ipairs(used) do
    local c, N1 = u.c, u.N1
    if not c.exact then
      if not c.Kp then return nil, "the Stokes constants of the " .. c.what .. " are unknown"
        .. (c.why and (" (" .. c.why .. ")") or "") end
      local kf = c.K / cnew(0, 2 * pi)
      for j, p in ipairs(c.cands) do
        local K2 = c.Kp[j]
        if K2 and K2:abs() > 0 then
          local k2 = kf * K2 / cnew(0, 2 * pi)
          local N2 = p.exact and 1 or min(p.count - 1, max(1, round(N1 - p.sigma:abs())))
          local ab = {}
          local last = p.exact and N2 or min(N2 + 1, p.count - 1)
          for q = 0, last do ab[#ab + 1] = { N0 + n.mu - q - p.mu, N1 + c.mu - q - p.mu } end
          if ab[#ab][2] <= 0 then return nil, "no room for level 2" end
          local H, He = M.hyperterminants(ab, c.sigma, p.sigma, n.median)
          for q = 0, N2 - 1 do
            local piece = k2 * p.terms[q] * H[q + 1]
            value = value + piece
            fixed = fixed + k2:abs() * p.terms[q]:abs() * He[q + 1] + (p.eps or c.eps) * piece:abs()
          end
          if not p.exact then
            local t1 = (p.terms[N2] * H[N2 + 1]):abs()
            local t2 = H[N2 + 2] and (p.terms[N2 + 1] * H[N2 + 2]):abs() or t1
            trunc = trunc + 2 * k2:abs() * max(t1, t2)
          end
        end
      end
    end
  end
  return value, fixed, trunc
end

--- sum(n, cands, opts) -> result or nil, why.
-- n = {terms (0-based list of complex), count, mu}; cands = list of {sigma, terms, count, mu,
-- exact, what, cands (m's own candidates, with sigma = F_m - F_p, for level 2)}.
-- result = {value, error, level, N0, adjacent (list of {what, K, sigma}), notes}
-- (value and error without the factor e^{F_n}).
function M.sum(n, cands, opts)
  opts = opts or {}
  local notes = {}
  local Ks, residual, why = M.stokes_constants(n.terms, n.count, n.mu, cands)
  if not Ks or why then return nil, why end
  -- the terms' accuracy, as far as the late-term fit can tell: no worse than its residual
  n.eps = max(residual, 1e-15)
  n.cache = {}
  local adj = {}
  local sigma_min = huge
  for j, c in ipairs(cands) do
    if Ks[j] and Ks[j]:abs() > 0 then
      c.K = Ks[j]
      adj[#adj + 1] = c
      sigma_min = min(sigma_min, c.sigma:abs())
      -- the adjacent series' own Stokes constants (for level 2) and accuracy
      c.eps = c.exact and 1e-15 or n.eps
      if not c.exact and c.cands then
        local Kp, res, w = M.stokes_constants(c.terms, c.count, c.mu, c.cands)
        if Kp and not w then c.Kp, c.eps = Kp, max(res, 1e-15) else c.why = w end
      end
    end
  end
  if #adj == 0 then return nil, "no adjacent saddle or pole: nothing to re-expand" end
  -- candidates whose K could not be read (too far to show in the late terms): their
  -- leading level-1 term with |K| = 1 is added to the error (common practice: the Stokes
  -- constants of simple saddles and poles are 0 or +-1)
  local undetermined = {}
  for j, c in ipairs(cands) do if not Ks[j] then undetermined[#undetermined + 1] = c end end
  local function far_bound(N0)
    local b = 0
    for _, c in ipairs(undetermined) do
      local m0 = N0 + n.mu - c.mu
      if m0 > 0 then
        local U = M.terminants({ m0 }, c.sigma, n.cache, n.median)
        b = b + (c.terms[0] * U[1]):abs() / (2 * pi)
      end
    end
    return b
  end
  if #undetermined > 0 then
    notes[#notes + 1] = format("%d more saddle(s) or pole(s) too far to show in the late "
      .. "terms: their possible share is in the error estimate", #undetermined)
  end
  -- level 1: N0 about 2|sigma|, the best of those around it
  local best
  local top = n.count
  local tried = {}
  for N0 = max(2, round(1.5 * sigma_min)), min(top - 1, round(2.5 * sigma_min) + 2) do
    local v, fixed, trunc, used = level1(n, adj, N0)
    if v then
      local e = fixed + trunc + far_bound(N0)
      tried[#tried + 1] = { v, e }
      if not best or e < best.error then
        best = { value = v, error = e, level = 1, N0 = N0, used = used }
      end
    end
  end
  if not best then return nil, "no truncation left room for the adjacent series" end
  -- each N0 gives the same number up to its own estimate: a truncation whose value lies
  -- outside the chosen one's estimate plus its own shows that one of them is optimistic
  -- (common practice: independent estimates must agree); the error is widened to cover it
  for _, tv in ipairs(tried) do
    local d = (tv[1] - best.value):abs()
    if d > tv[2] + best.error then best.error = d end
  end
  -- level 2: N0 about 3|sigma|
  if opts.level2 ~= false then
    local N0 = min(top, max(best.N0, round(3 * sigma_min)))
    local v1, fixed1, _, used = level1(n, adj, N0)
    local v2, fixed2, trunc2
    if v1 then v2, fixed2, trunc2 = level2(n, used, N0) end
    if v2 then
      local e = fixed1 + fixed2 + trunc2 + far_bound(N0)
      -- level 1 estimates the same number: beyond both estimates, the difference counts
      local d = (v1 + v2 - best.value):abs()
      if d > e + best.error then e = d end
      if e < best.error then
        best = { value = v1 + v2, error = e, level = 2, N0 = N0, used = used }
      end
    else
      -- (level2 returns nil and why)
      notes[#notes + 1] = "level 2 not reached: "
        .. (v1 and tostring(fixed2) or "no room for the adjacent series at that truncation")
    end
  end
  local adjacent = {}
  for _, c in ipairs(adj) do
    adjacent[#adjacent + 1] = { what = c.what, K = c.K, sigma = c.sigma, connected = c.connected }
  end
  best.adjacent, best.notes, best.residual = adjacent, notes, residual
  return best
end

return M
