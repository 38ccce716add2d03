-- steep.cmatrix — small dense complex matrices (n <= 4, lists of rows) for the
-- several-variable code: solve, inverse, determinant, eigenvalues, Schur complements.
-- Entries are numbers or steep complex values; results are complex values.

local complex = require "steep.complex"

local cnew, cparts = complex.new, complex.parts
local hypot = complex.hypot
local abs, sqrt = math.abs, math.sqrt

local M = {}

local function c(v) return cnew(cparts(v)) end
local function cabs(v) local re, im = cparts(v); return hypot(re, im) end
M.cabs = cabs

local function copy(A)
  local B = {}
  for i, row in ipairs(A) do
    B[i] = {}
    for j, v in ipairs(row) do B[i][j] = c(v) end
  end
  return B
end
M.copy = copy

--- LU factorisation with partial pivoting: returns the factors in place of a copy, the
-- permutation, its sign, and the smallest over the largest pivot modulus (0: singular).
local function lu(A)
  local n = #A
  local B, perm, sign = copy(A), {}, 1
  for i = 1, n do perm[i] = i end
  local pmax, pmin = 0, math.huge
  for k = 1, n do
    local p, best = k, cabs(B[k][k])
    for i = k + 1, n do
      local v = cabs(B[i][k])
      if v > best then p, best = i, v end
    end
    if not (best > 0) then return B, perm, sign, 0 end
    pmax, pmin = math.max(pmax, best), math.min(pmin, best)
    if p ~= k then
      B[p], B[k] = B[k], B[p]
      perm[p], perm[k] = perm[k], perm[p]
      sign = -sign
    end
    for i = k + 1, n do
      local f = B[i][k] / B[k][k]
      B[i][k] = f
      for j = k + 1, n do B[i][j] = B[i][j] - f * B[k][j] end
    end
  end
  return B, perm, sign, pmin / pmax
end

--- det(A), and the pivot ratio (a conditioning indicator; 0 when singular).
function M.det(A)
  local B, _, sign, rc = lu(A)
  local d = cnew(sign, 0)
  for k = 1, #A do d = d * B[k][k] end
  return d, rc
end

--- Solves A x = b; nil, "singular" when a pivot vanishes.
function M.solve(A, b)
  local n = #A
  local B, perm, _, rc = lu(A)
  if rc == 0 then return nil, "singular" end
  local y = {}
  for i = 1, n do
    local s = c(b[perm[i]])
    for j = 1, i - 1 do s = s - B[i][j] * y[j] end
    y[i] = s
  end
  for i = n, 1, -1 do
    local s = y[i]
    for j = i + 1, n do s = s - B[i][j] * y[j] end
    y[i] = s / B[i][i]
  end
  return y, rc
end

--- A^{-1} (nil, "singular" when singular), and the pivot ratio.
function M.inverse(A)
  local n = #A
  local cols = {}
  local rc
  for j = 1, n do
    local e = {}
    for i = 1, n do e[i] = (i == j) and 1 or 0 end
    local x, r = M.solve(A, e)
    if not x then return nil, "singular" end
    rc = r
    cols[j] = x
  end
  local inv = {}
  for i = 1, n do
    inv[i] = {}
    for j = 1, n do inv[i][j] = cols[j][i] end
  end
  return inv, rc
end

--- The submatrix on the index list idx (rows and columns).
function M.sub(A, idx)
  local B = {}
  for a, i in ipairs(idx) do
    B[a] = {}
    for b, j in ipairs(idx) do B[a][b] = A[i][j] end
  end
  return B
end

--- Eigenvalues of A: roots of the characteristic polynomial (Faddeev-LeVerrier for its
-- coefficients, Durand-Kerner for the roots, each polished by Newton's method). For the
-- branch of a square root and the signature only: a multiple eigenvalue comes out to
-- about the square root of the rounding.
function M.eigenvalues(A)
  local n = #A
  if n == 1 then return { c(A[1][1]) } end
  -- p(z) = sum_k a[k] z^k, a[n] = 1
  local a = { [n] = cnew(1, 0) }
  local Mk = {}
  for i = 1, n do Mk[i] = {} for j = 1, n do Mk[i][j] = cnew(0, 0) end end
  for k = 1, n do
    local AM = {}
    for i = 1, n do
      AM[i] = {}
      for j = 1, n do
        local s = cnew(0, 0)
        for l = 1, n do s = s + A[i][l] * Mk[l][j] end
        if i == j then s = s + a[n - k + 1] end
        AM[i][j] = s
      end
    end
    Mk = AM
    local tr = cnew(0, 0)
    for i = 1, n do
      for l = 1, n do tr = tr + A[i][l] * Mk[l][i] end
    end
    a[n - k] = -tr / k
  end
  local function p(z)
    local s = a[n]
    for k = n - 1, 0, -1 do s = s * z + a[k] end
    return s
  end
  local function dp(z)
    local s = a[n] * n
    for k = n - 1, 1, -1 do s = s * z + a[k] * k end
    return s
  end
  local scale = 0
  for i = 1, n do for j = 1, n do scale = scale + cabs(A[i][j]) ^ 2 end end
  scale = math.max(sqrt(scale), 1e-300)
  local z = {}
  local seed = cnew(0.4, 0.9)
  for k = 1, n do z[k] = scale * seed ^ k end
  for _ = 1, 500 do
    local moved = 0
    for k = 1, n do
      local den = cnew(1, 0)
      for j = 1, n do if j ~= k then den = den * (z[k] - z[j]) end end
      local d = p(z[k]) / den
      z[k] = z[k] - d
      moved = math.max(moved, cabs(d))
    end
    if moved <= 1e-15 * scale then break end
  end
  for k = 1, n do
    for _ = 1, 3 do
      local d = dp(z[k])
      if cabs(d) == 0 then break end
      local step = p(z[k]) / d
      if not (cabs(step) < 1e-6 * scale) then break end
      z[k] = z[k] - step
    end
  end
  return z
end

--- The branch of det(A)^(1/2) that is the product of the principal square roots of the
-- eigenvalues (Hormander's branch when A has a positive semidefinite real part: the
-- eigenvalues then stay in the closed right half-plane along (1 - t) I + t A). The
-- modulus and phase come from the LU determinant; the eigenvalues only pick the sign.
-- Returns sqrt det, the eigenvalues, and the smallest real part of an eigenvalue
-- relative to the largest modulus.
function M.sqrt_det(A)
  local d = M.det(A)
  local ev = M.eigenvalues(A)
  local prod = cnew(1, 0)
  local minre, maxabs = math.huge, 0
  for _, mu in ipairs(ev) do
    prod = prod * complex.apply("sqrt", mu)
    local re = cparts(mu)
    minre = math.min(minre, re)
    maxabs = math.max(maxabs, cabs(mu))
  end
  local s = complex.apply("sqrt", d)
  if cabs(s - prod) > cabs(s + prod) then s = -s end
  return s, ev, minre / math.max(maxabs, 1e-300)
end

--- cholesky(A) -> L (lower triangular, L L^T = A) for a complex symmetric A (no
-- conjugation: the square roots are principal), or nil where a pivot vanishes against
-- its diagonal entry (1e-14). The whitening of a Gaussian whose covariance is A.
function M.cholesky(A)
  local n, L = #A, {}
  for a = 1, n do
    L[a] = {}
    for b = 1, a do
      local sum = c(A[a][b])
      for k = 1, b - 1 do sum = sum - L[a][k] * L[b][k] end
      if a == b then
        if not (cabs(sum) > 1e-14 * cabs(A[a][a])) then return nil end
        L[a][a] = complex.apply("sqrt", sum)
      else
        L[a][b] = sum / L[b][b]
      end
    end
  end
  return L
end

return M
