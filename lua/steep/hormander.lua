-- steep.hormander — the asymptotic expansion of an integral in several variables at one
-- point, to any order, with its error estimate.
--
-- At a nondegenerate critical point in the interior of the contour (all coordinates
-- "full") this is Hormander's formula (The Analysis of Linear Partial Differential
-- Operators I, Thm 7.7.5):
--   integral of g e^F ~ e^{F0} (2 pi)^{n/2} det(-F'')^{-1/2} sum_j L_j,
-- the square root's branch being the product of the principal square roots of the
-- eigenvalues of -F'' in the coordinates along the contour (continuous from the positive
-- definite case when -F'' has a positive semidefinite real part: Laplace maxima,
-- stationary points, saddles on a torus at the positive ray). At a maximum on the
-- boundary of a box the same sum runs over half-Gaussian coordinates (the point at an
-- end, zero slope) and Watson's lemma coordinates (the point at an end, F falling
-- inward: DLMF 2.3(ii)); ext/mexpand.c computes the terms T_m (order lambda^{-m/2}).
--
-- Counting: order K keeps the terms through lambda^{-(K-1)}: T_0, and T_{2j-1} + T_{2j}
-- for j = 1 .. K-1 (the odd ones vanish at interior points). The error estimate is the
-- first omitted group times a safety factor from the observed ratios of the last groups:
-- the tail as a geometric series at the ratio extrapolated two groups ahead, r = r_max +
-- 2 (r2 - r1)_+, safety 1/(1 - r) and at least 2 (ratios of asymptotic series grow about
-- linearly; the constant-ratio factor 1/(1 - r_max) fell short on the cells of
-- tests/test_multi.lua at lambda = 5 and 8, the extrapolated one bounds them all); when
-- r >= 0.8 the terms are not decreasing usefully: safety 10 and the status says so.
-- Plus a rounding floor.

local core = require "steep.core"
local complex = require "steep.complex"
local cmatrix = require "steep.cmatrix"
local critical = require "steep.critical"

local cnew, cparts, hypot = complex.new, complex.parts, complex.hypot
local format, pi, abs, sqrt, huge, log = string.format, math.pi, math.abs, math.sqrt, math.huge, math.log
local max = math.max

local M = {}

local EPS = 2.220446049250313e-16
local MAX_COST = 3e9     -- as ext/bind_multi.c: monomial products one expansion may take

local function cabs(z) local re, im = cparts(z); return hypot(re, im) end
local function cexp(z) return complex.apply("exp", cnew(cparts(z))) end

local function binom(n, k)
  local c = 1
  for i = 1, k do c = c * (n - k + i) / i end
  return c
end

-- The work of an expansion with M + 1 terms in n variables (as mexpand_cost).
local function cost(n, Mterms)
  return Mterms * binom(n + 3 * Mterms, n) * binom(n + Mterms + 2, n)
end

--- The largest order (number of terms) affordable in n variables.
function M.max_order(n)
  local K = 1
  while K < 28 and cost(n, 2 * (K + 1) + 2) <= MAX_COST do K = K + 1 end
  return K
end

local function check_order(order, n, fname)
  local Kmax = M.max_order(n)
  if type(order) ~= "number" or math.tointeger(order) == nil or order < 1 then
    error(format("%s: option 'order' must be a whole number of terms from 1 to %d, got %s",
      fname, Kmax, tostring(order)), 3)
  end
  if order > Kmax then
    error(format("%s: order %d in %d variables is beyond what this build computes in "
      .. "reasonable time (at most %d terms in %d variables)", fname, order, n, Kmax, n), 3)
  end
  return math.tointeger(order)
end
M.check_order = check_order

local KIND_TEXT = { full = "interior", half = "half-line (end with zero slope)",
  edge = "end (Watson's lemma)" }

-- The local coordinates x_k = x0_k + sum_j lin_kj u_j with the Gaussian coordinates q
-- whitened: lin = D L over q (D = diag(dirs), L L^T = Sigma restricted to q: cmatrix.cholesky,
-- without conjugation, Sigma being complex symmetric), the identity times dirs for the
-- others. nil where a pivot vanishes (the plain coordinates are used then).
local function whitening(n, q, dirs, Sigma)
  if #q < 2 then return nil end
  local L = cmatrix.cholesky(cmatrix.sub(Sigma, q))
  if not L then return nil end
  local lin = {}
  for k = 1, n do
    lin[k] = {}
    for j = 1, n do lin[k][j] = cnew(0, 0) end
    lin[k][k] = dirs[k] * 1
  end
  for a, k in ipairs(q) do
    for b = 1, a do lin[k][q[b]] = dirs[k] * L[a][b] end
    for b = a + 1, #q do lin[k][q[b]] = cnew(0, 0) end
  end
  return lin
end

--- contribution(J, cp, pt, K) -> the contribution of the point pt (from
-- critical.contributing) with K terms: {kind, at, F, value, error, terms, raw, ...};
-- value and error are also given relative to e^{F0} (scaled_value, scaled_error) so
-- that a contribution beyond the range of doubles keeps its digits (log_value).
function M.contribution(J, cp, pt, K, opts)
  opts = opts or {}
  local n = J.n
  local x, kinds, dirs, jac = pt.x, pt.kinds, pt.dirs, pt.jac
  local F0, grad, H = critical.derivs(J, cp, x)
  -- the Hessian in the local coordinates x_k = x0_k + dirs_k s_k
  local Hs = {}
  for i = 1, n do
    Hs[i] = {}
    for j = 1, n do Hs[i][j] = dirs[i] * H[i][j] * dirs[j] end
  end
  local q, edges = {}, {}
  for k = 1, n do
    if kinds[k] == "edge" then edges[#edges + 1] = k else q[#q + 1] = k end
  end
  local A = {}
  for a, i in ipairs(q) do
    A[a] = {}
    for b, j in ipairs(q) do A[a][b] = -Hs[i][j] end
  end
  local Sigma = {}
  for i = 1, n do
    Sigma[i] = {}
    for j = 1, n do Sigma[i][j] = 0 end
  end
  local sqrtdet, eig, minre, rc = cnew(1, 0), {}, 1, 1
  if #q > 0 then
    for a, i in ipairs(q) do
      if kinds[i] == "half" then
        for b, j in ipairs(q) do
          if j ~= i and cabs(A[a][b]) > 1e-12 * sqrt(cabs(A[a][a]) * cabs(A[b][b])) then
            error(format("expand: the maximum at %s sits at an end of coordinate %d with zero "
              .. "slope, and the Hessian couples that coordinate to coordinate %d: the "
              .. "expansion over a quadrant of a correlated Gaussian is not supported",
              critical.point_text(x), i, j), 0)
          end
        end
      end
    end
    local inv, r = cmatrix.inverse(A)
    if not inv then
      error(format("expand: the critical point %s is degenerate (Hessian singular): not "
        .. "supported", critical.point_text(x)), 0)
    end
    rc = r
    if rc < 1e-13 then
      error(format("expand: the critical point %s is degenerate (Hessian condition %.2g): "
        .. "not supported", critical.point_text(x), 1 / rc), 0)
    end
    for a, i in ipairs(q) do
      for b, j in ipairs(q) do Sigma[i][j] = inv[a][b] end
    end
    sqrtdet, eig, minre = cmatrix.sqrt_det(A)
  end
  local notes = {}
  for _, s in ipairs(pt.notes or {}) do notes[#notes + 1] = s end
  -- (eigenvalues of a double root carry about sqrt(eps) of error: hence 1e-6)
  if minre < -1e-6 and not pt.named then
    notes[#notes + 1] = format("-F'' along the contour has an eigenvalue with negative "
      .. "real part (%.3g relative): the contour does not pass the point in a descent "
      .. "direction", minre)
  end
  local pre = cnew(1, 0)
  for k = 1, n do pre = pre * jac[k] end
  for _, k in ipairs(edges) do
    local c = -(dirs[k] * grad[k])
    pre = pre / c
  end
  pre = pre * (2 * pi) ^ (#q / 2) / sqrtdet
  local Mterms = 2 * K + 2
  -- The terms do not depend on the linear coordinates of the Gaussian: in whitened ones,
  -- s = L u with L L^T = Sigma (a Cholesky factor, complex symmetric), the jets are
  -- balanced and their sums cancel far less (a logistic model in 3 correlated parameters:
  -- the fourth group's moduli summed to 1e17 times the group in the plain coordinates).
  -- Edge coordinates keep their own (their slope is read per coordinate).
  local lin = whitening(n, q, dirs, Sigma)
  local uSigma = Sigma
  if lin then
    uSigma = {}
    for i = 1, n do
      uSigma[i] = {}
      for j = 1, n do uSigma[i][j] = cnew(0, 0) end
    end
    for _, i in ipairs(q) do uSigma[i][i] = cnew(1, 0) end
  end
  local T, B = core.multi_expand(J.tape, cp, J.varslot, x, dirs, kinds, uSigma, Mterms, lin)
  -- groups by whole powers of 1/lambda
  -- (with each group's rounding bound: a group not above it is noise)
  local G, mag, rnd = {}, {}, {}
  for j = 0, K + 1 do
    if j == 0 then G[0], mag[0], rnd[0] = T[1], cabs(T[1]), B[1]
    else
      G[j] = T[2 * j] + T[2 * j + 1]
      mag[j] = cabs(T[2 * j]) + cabs(T[2 * j + 1])
      rnd[j] = B[2 * j] + B[2 * j + 1]
    end
  end
  local sum, absum, rounding = cnew(0, 0), 0, 0
  for j = 0, K - 1 do sum, absum, rounding = sum + G[j], absum + mag[j], rounding + rnd[j] end
  if mag[K] <= rnd[K] then
    notes[#notes + 1] = format("the terms past order %d are below their own rounding here "
      .. "(the jets' sums cancel): fewer terms are as accurate", K - 1)
  end
  -- the tail beyond the first omitted group, as a geometric series at the ratio the
  -- terms will have two groups on (ratios of asymptotic series grow roughly linearly)
  local r, r1, r2 = 0, 0, 0
  if mag[K] > 0 then
    r1 = mag[K - 1] > 0 and mag[K] / mag[K - 1] or huge
    r2 = mag[K + 1] / mag[K]
    -- (a next group that is noise says nothing of the ratio)
    if mag[K + 1] <= rnd[K + 1] and mag[K] > rnd[K] then r2 = r1 end
    r = max(r1, r2) + 2 * max(0, r2 - r1)
  end
  local safety, decreasing = 2, true
  if r >= 0.8 then
    safety, decreasing = 10, false
  else
    safety = max(2, 1 / (1 - r))
  end
  local apre = cabs(pre)
  -- (a group may vanish by a cancellation of the amplitude's terms, 1 + x^2 - y^2 on a
  -- symmetric Gaussian: the next group counts too, and where both vanish two more are
  -- computed to tell a series that ends from one that only skips)
  local omitted = max(mag[K], rnd[K]) + max(mag[K + 1], rnd[K + 1])
  if omitted == 0 then
    local T2 = core.multi_expand(J.tape, cp, J.varslot, x, dirs, kinds, uSigma, Mterms + 4, lin)
    for m = Mterms + 2, Mterms + 5 do omitted = omitted + cabs(T2[m] or cnew(0, 0)) end
  end
  local trunc = safety * omitted * apre
  local floor = (((128 + cabs(F0)) * EPS + EPS / rc) * absum + rounding) * apre
  local scaled_value = pre * sum
  -- the faces of a box next to the point (Laplace type): their size goes into the error
  local face_err = 0
  for _, f in ipairs(pt.faces or {}) do
    -- (twice the face's estimated part: its size is read at the face's highest point)
    local e = 2 * f.relative * cabs(scaled_value)
    face_err = face_err + e
    if e > 0.1 * max(trunc, floor) then
      notes[#notes + 1] = format("coordinate %d: the end of the box %.3g widths from the "
        .. "point is not negligible (relative size %.2g, added to the error): the "
        .. "expansion is not uniform here", f.coordinate, f.widths, f.relative)
    end
  end
  local scaled_error = trunc + floor + face_err
  local F0r = cparts(F0)
  local efac = math.exp(F0r)
  local terms, raw = {}, {}
  local eF0 = cexp(F0)
  for j = 0, K - 1 do terms[j + 1] = G[j] * pre * eF0 end
  for m = 0, Mterms do raw[m + 1] = T[m + 1] * pre * eF0 end
  local desc = {}
  for k = 1, n do desc[k] = KIND_TEXT[kinds[k]] end
  local kind = pt.why
  local signature
  if pt.problem == "stationary phase" and not pt.named then
    -- F = i phi: phi'' = -i F'', so an eigenvalue mu of -F'' is -i times one of phi''
    signature = 0
    for _, mu in ipairs(eig) do
      local _, im = cparts(mu)
      signature = signature + (im < 0 and 1 or (im > 0 and -1 or 0))
    end
    kind = format("stationary point, signature %+d", signature)
  end
  if not decreasing then
    notes[#notes + 1] = format("the terms do not decrease at this order (ratio %.3g): the "
      .. "large parameter is too small for %d terms", r, K)
  end
  return {
    kind = kind, at = x, F = F0, coordinates = desc, kinds = kinds,
    value = scaled_value * eF0, error = scaled_error * efac,
    scaled_value = scaled_value, scaled_error = scaled_error,
    log_value = F0 + complex.apply("log", scaled_value),
    terms = terms, raw = raw, used = K, ratio = r, safety = safety,
    decreasing = decreasing, prefactor = pre, eigenvalues = eig, signature = signature,
    named = pt.named or false, notes = notes, dominance = F0r,
  }
end

-- The points that contribute depend on the parameters (and a named point or seeds), not
-- on the order: the last few are kept on the integral (J:check and a table of orders
-- ask for them repeatedly).
local function contributing_cached(J, cp, opts)
  local parts = {}
  for k, v in pairs(cp) do
    local re, im = cparts(v)
    parts[#parts + 1] = format("%s=%a,%a", k, re, im)
  end
  table.sort(parts)
  for _, key in ipairs({ "at", "seeds" }) do
    local list = opts[key]
    if list then
      local pts = list[1] and type(list[1]) == "table" and not complex.is(list[1]) and list or { list }
      for _, pt in ipairs(pts) do
        for _, v in ipairs(pt) do
          local re, im = cparts(v)
          parts[#parts + 1] = format("%s:%a,%a", key, re, im)
        end
      end
    end
  end
  local key = table.concat(parts, ";")
  J._pcache = J._pcache or {}
  for _, e in ipairs(J._pcache) do
    if e.key == key then return e.pts, e.kind, e.info end
  end
  local pts, kind, info = critical.contributing(J, cp, opts)
  table.insert(J._pcache, 1, { key = key, pts = pts, kind = kind, info = info })
  J._pcache[5] = nil
  return pts, kind, info
end

--- expand(J, cp, opts) -> result: every contributing point's expansion summed.
function M.expand(J, cp, opts)
  local K = opts.order
  local pts, kind, info = contributing_cached(J, cp, { at = opts.at, seeds = opts.seeds })
  local contributions = {}
  for _, pt in ipairs(pts) do
    pt.problem = kind
    contributions[#contributions + 1] = M.contribution(J, cp, pt, K)
  end
  table.sort(contributions, function(a, b) return a.dominance > b.dominance end)
  -- sums relative to the dominant point's e^{F0}, so huge values keep their digits
  local top = contributions[1]
  local F0 = top.F
  local sum, err = cnew(0, 0), 0
  local notes, suspect = {}, {}
  for _, c in ipairs(contributions) do
    local rel = cexp(c.F - F0)
    sum = sum + c.scaled_value * rel
    err = err + c.scaled_error * cabs(rel)
    for _, s in ipairs(c.notes) do notes[#notes + 1] = s end
    if not c.decreasing then suspect[#suspect + 1] = "terms not decreasing" end
  end
  if info and info.note then notes[#notes + 1] = info.note end
  if info and info.status == "incomplete" then
    suspect[#suspect + 1] = "the critical-point count does not check"
  end
  local eF0 = cexp(F0)
  local value = sum * eF0
  local status
  if top.named then status = "estimated at a named point"
  else status = "estimated" end
  if not (err < cabs(sum)) then suspect[#suspect + 1] = "the error estimate is not smaller than the value" end
  for _, c in ipairs(contributions) do
    for _, s in ipairs(c.notes) do
      if s:find("widths") or s:find("negative real part") then
        suspect[#suspect + 1] = "the expansion is not uniform here (see notes)"
        break
      end
    end
  end
  if #suspect > 0 then status = "suspect: " .. table.concat(suspect, "; ") end
  return {
    value = value, error = err * math.exp((cparts(F0))),
    scaled_value = sum, scaled_error = err, log_value = F0 + complex.apply("log", sum),
    relative_error = err / cabs(sum), contributions = contributions, order = K,
    kind = kind, critical = info, status = status, notes = notes,
  }
end

--- series(J, cp1, opts) -> per contribution: c_m (coefficients of lambda^{-(p + m/2)}),
-- p, phi0, :value(lambda): the standard form when the exponent is lambda phi. cp1: the
-- parameters with lambda = 1.
function M.series(J, cp1, opts)
  local K = opts.order
  local pts, kind = critical.contributing(J, cp1, { at = opts.at })
  local out = {}
  for _, pt in ipairs(pts) do
    pt.problem = kind
    local c = M.contribution(J, cp1, pt, K)
    local nedge, nq = 0, 0
    for _, k in ipairs(c.kinds) do if k == "edge" then nedge = nedge + 1 else nq = nq + 1 end end
    local coefs = {}
    for m = 0, 2 * K - 2 do coefs[m + 1] = c.raw[m + 1] / cexp(c.F) end
    out[#out + 1] = setmetatable({ kind = c.kind, at = c.at, phi = c.F, coefficients = coefs,
      power = nedge + nq / 2 }, { __index = { value = function(s, lambda, nterms)
        local total = cnew(0, 0)
        for m = 1, math.min(nterms or #s.coefficients, #s.coefficients) do
          total = total + s.coefficients[m] * lambda ^ (-(s.power + (m - 1) / 2))
        end
        return cexp(s.phi * lambda) * total
      end } })
  end
  table.sort(out, function(a, b) return cparts(a.phi) > cparts(b.phi) end)
  return out
end

return M
