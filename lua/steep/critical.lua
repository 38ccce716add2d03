-- steep.critical — critical points of an exponent F of several variables (zeros of its
-- gradient in C^n), and which of them an integral over a product of contours picks up.
--
-- Finding them: for a polynomial exponent, every isolated critical point by total-degree
-- homotopy continuation (Sommese & Wampler, The Numerical Solution of Systems of
-- Polynomials, 2005, ch. 8), the number found checked against the paths that converge;
-- otherwise Newton's method with deflation (Farrell, Birkisson & Funke, SIAM J. Sci.
-- Comput. 37 (2015)) from seeds spread over the contours (not exhaustive: it says so).
-- Deciding which contribute, in the cases the theory settles:
--   Laplace type (the contours are intervals of the real axis, F real there): every
--     local maximum of F over the box, interior or on its boundary (Karush-Kuhn-Tucker
--     points, found by an active-set Newton ascent from a grid);
--   stationary phase on R^n (full real lines, Re F = 0 there): the real critical points;
--   a torus |z_k| = r_k (circles about 0, coefficient extraction): the critical point on
--     the positive ray, checked to be the only point of the torus where Re F is maximal.
-- Otherwise the user names the point (at = {...}).

local core = require "steep.core"
local complex = require "steep.complex"
local expr = require "steep.expr"
local cmatrix = require "steep.cmatrix"

local cnew, cparts, hypot = complex.new, complex.parts, complex.hypot
local format, pi, abs, sqrt, huge = string.format, math.pi, math.abs, math.sqrt, math.huge
local min, max, floor = math.min, math.max, math.floor

local M = {}

local function cabs(z) local re, im = cparts(z); return hypot(re, im) end
local function re_of(z) return (cparts(z)) end
local function im_of(z) return select(2, cparts(z)) end

local function norm(x)
  local s = 0
  for _, v in ipairs(x) do s = s + cabs(v) ^ 2 end
  return sqrt(s)
end

local function dist(x, y)
  local s = 0
  for k = 1, #x do s = s + cabs(x[k] - y[k]) ^ 2 end
  return sqrt(s)
end
M.dist = dist

---------------------------------------------------------------------------------------
-- The shape of each contour.
---------------------------------------------------------------------------------------

-- {shape = "real", lo, hi (numbers, -inf/inf at infinite ends), dir = +1 (lo to hi) or -1}
-- {shape = "circle", center, radius, dir = +1 (counter-clockwise) or -1}
-- {shape = "other"}
function M.shape(C)
  local pieces = C.pieces
  if C.closed and #pieces == 1 and pieces[1].kind == "arc"
      and abs(abs(pieces[1].to - pieces[1].from) - 2 * pi) < 1e-12 then
    local p = pieces[1]
    return { shape = "circle", center = p.center, radius = p.radius,
      dir = p.to > p.from and 1 or -1 }
  end
  -- a monotone run along the real axis
  local pts = {}
  local function real_point(z)
    local re, im = cparts(z)
    if im ~= 0 then return nil end
    return re
  end
  for i, p in ipairs(pieces) do
    local a, b
    if p.kind == "segment" then a, b = real_point(p.a), real_point(p.b)
    elseif p.kind == "ray_out" then
      a = real_point(p.a)
      b = (abs(p.angle) < 1e-15 and huge) or (abs(abs(p.angle) - pi) < 1e-15 and -huge) or nil
    elseif p.kind == "ray_in" then
      b = real_point(p.b)
      a = (abs(p.angle) < 1e-15 and huge) or (abs(abs(p.angle) - pi) < 1e-15 and -huge) or nil
    end
    if not (a and b) then return { shape = "other" } end
    if i == 1 then pts[1] = a end
    pts[#pts + 1] = b
  end
  local dir = pts[#pts] > pts[1] and 1 or -1
  for i = 2, #pts do
    if (pts[i] - pts[i - 1]) * dir <= 0 then return { shape = "other" } end
  end
  local lo, hi = pts[1], pts[#pts]
  if dir < 0 then lo, hi = hi, lo end
  return { shape = "real", lo = lo, hi = hi, dir = dir }
end

-- The unit tangent of contour C (in its direction) at the point z on it or nearest it.
function M.tangent(C, z)
  local best, dir = huge, cnew(1, 0)
  for _, p in ipairs(C.pieces) do
    local d, t
    if p.kind == "arc" then
      local w = z - p.center
      d = abs(cabs(w) - p.radius)
      t = cnew(0, p.to > p.from and 1 or -1) * w / cabs(w)
    else
      local a = p.a or p.b
      local u
      if p.kind == "segment" then u = (p.b - p.a) / cabs(p.b - p.a)
      else
        u = cnew(math.cos(p.angle), math.sin(p.angle))
        if p.kind == "ray_in" then u = -u end
      end
      local s = re_of((z - a) * u:conj())
      if p.kind == "segment" then s = max(0, min(s, cabs(p.b - p.a)))
      elseif p.kind == "ray_out" then s = max(0, s)
      else s = min(0, s) end
      d = cabs(z - (a + s * u))
      t = u
    end
    if d < best then best, dir = d, t end
  end
  return dir, best
end

---------------------------------------------------------------------------------------
-- Evaluation helpers (the integral's tape has every symbol as a parameter).
---------------------------------------------------------------------------------------

local function derivs(J, cp, x)
  return core.multi_derivs(J.tape, cp, J.varslot, x)
end
M.derivs = derivs

--- F (and g) at a list of points (lists of n coordinates): cvecs.
function M.eval_many(J, cp, pts)
  return core.multi_eval(J.tape, cp, J.varslot, pts)
end

---------------------------------------------------------------------------------------
-- Polynomial exponents: degree by structure.
---------------------------------------------------------------------------------------

-- The total degree of e in the symbols of `isvar` (a set of nodes), or nil when e is not
-- a polynomial in them (parameters and constants count as degree 0).
local function poly_degree(e, isvar)
  local memo = {}
  local function deg(n)
    if memo[n] ~= nil then return memo[n] or nil end
    local op, r = n.op, nil
    if op == "const" or op == "param" then r = 0
    elseif op == "var" then r = isvar[n] and 1 or 0
    else
      local a = n.a and deg(n.a)
      local b = n.b and deg(n.b)
      if op == "add" or op == "sub" then r = a and b and max(a, b)
      elseif op == "mul" then r = a and b and a + b
      elseif op == "neg" then r = a
      elseif op == "div" then r = a and b == 0 and a or nil
      elseif op == "powi" then
        if a and n.k >= 0 then r = a * n.k elseif a == 0 then r = 0 end
      else r = (a == 0) and 0 or nil end
    end
    memo[n] = r or false
    return r
  end
  return deg(expr.lift(e))
end
M.poly_degree = poly_degree

---------------------------------------------------------------------------------------
-- Finding critical points.
---------------------------------------------------------------------------------------

-- Points along each contour to seed Newton's method and to sample on: its finite
-- points, midpoints, and points out along its rays at the problem's scale.
local function contour_samples(C, count)
  local out = {}
  local function add(z) out[#out + 1] = z end
  for _, p in ipairs(C.pieces) do
    if p.kind == "segment" then
      for j = 0, count - 1 do add(p.a + (p.b - p.a) * (j / (count - 1))) end
    elseif p.kind == "arc" then
      for j = 0, count - 1 do
        local th = p.from + (p.to - p.from) * (j / count)
        add(p.center + p.radius * cnew(math.cos(th), math.sin(th)))
      end
    else
      local a = p.a or p.b
      local u = cnew(math.cos(p.angle), math.sin(p.angle))
      local L = max(1, cabs(a))
      for _, s in ipairs({ 0, 0.5, 1, 2, 4 }) do add(a + s * L * u) end
    end
  end
  -- unique, in order
  local uniq = {}
  for _, z in ipairs(out) do
    local dup = false
    for _, w in ipairs(uniq) do if cabs(z - w) <= 1e-12 * (1 + cabs(z)) then dup = true end end
    if not dup then uniq[#uniq + 1] = z end
  end
  return uniq
end
M.contour_samples = contour_samples

-- The product of per-coordinate lists (at most `cap` points, thinning evenly).
local function product(lists, cap)
  local out = { {} }
  for _, list in ipairs(lists) do
    local nxt = {}
    for _, pre in ipairs(out) do
      for _, z in ipairs(list) do
        local p = { table.unpack(pre) }
        p[#p + 1] = z
        nxt[#nxt + 1] = p
      end
    end
    out = nxt
  end
  if cap and #out > cap then
    local thin, step = {}, #out / cap
    for i = 0, cap - 1 do thin[#thin + 1] = out[floor(i * step) + 1] end
    out = thin
  end
  return out
end
M.product = product

local function problem_scale(J)
  local s = 1
  for _, C in ipairs(J.contours) do
    for _, z in ipairs(C:finite_points()) do s = max(s, cabs(z)) end
  end
  return s
end
M.problem_scale = problem_scale

local function same_point(x, y, tol)
  return dist(x, y) <= (tol or 1e-8) * (1 + norm(x))
end

-- A pseudo-random complex gamma for the homotopy (fixed, so results repeat; a second,
-- different one when the first run's count does not check).
local GAMMAS = { cnew(0.8109, 0.5852), cnew(-0.3923, 0.9198) }

local MAX_PATHS = 20000

-- All isolated critical points of a polynomial exponent by homotopy continuation.
local function by_homotopy(J, cp, degs)
  local paths = 1
  for _, d in ipairs(degs) do paths = paths * d end
  local info = { method = "homotopy", paths = paths, degrees = degs }
  if paths > MAX_PATHS then return nil, info end
  local scale = problem_scale(J)
  local best
  for attempt, gamma in ipairs(GAMMAS) do
    local res = core.multi_homotopy(J.tape, cp, J.varslot, degs, gamma,
      { first = 1, count = paths, diverge = 1e8 * scale })
    local roots, singular = {}, {}
    local counts = { ok = 0, noconv = 0, singular = 0, nonfinite = 0, diverged = 0, failed = 0 }
    for _, r in ipairs(res) do
      counts[r.status] = (counts[r.status] or 0) + 1
      local into = (r.status == "ok" and roots) or (r.status == "singular" and singular) or nil
      if into then
        local dup = false
        for _, q in ipairs(into) do if same_point(q, r.x, 1e-7) then dup = true end end
        if not dup then into[#into + 1] = r.x end
      end
    end
    local run = { roots = roots, singular = singular, counts = counts, attempt = attempt,
      consistent = (#roots == counts.ok) and counts.failed == 0 and counts.noconv == 0
        and counts.nonfinite == 0 }
    if not best or (run.consistent and not best.consistent) then best = run end
    if run.consistent then break end
  end
  info.converged = best.counts.ok
  info.distinct = #best.roots
  info.diverged = best.counts.diverged
  info.singular = best.counts.singular
  info.failed = best.counts.failed + best.counts.noconv + best.counts.nonfinite
  info.status = best.consistent and "complete" or "incomplete"
  info.note = format("homotopy: %d paths (Bezout number of the degrees %s): %d converge to "
    .. "%d distinct nonsingular critical points, %d go to infinity, %d end at singular "
    .. "(multiple) points, %d failed%s", paths, table.concat(degs, "x"), info.converged,
    info.distinct, info.diverged, info.singular, info.failed,
    best.consistent and "" or "; the count does not check (paths jumped or failed): "
      .. "some critical points may be missing")
  return best.roots, info, best.singular
end

--- find(J, cp, opts) -> list of critical points {x =, F =, gradient =, hessian =,
-- real =, degenerate =}, info {method, status, note, ...}. opts.seeds: extra seeds.
function M.find(J, cp, opts)
  opts = opts or {}
  local isvar = {}
  for _, v in ipairs(J.vars) do isvar[v] = true end
  local degs = {}
  local polynomial = poly_degree(J.exponent, isvar) ~= nil
  if polynomial then
    for k, v in ipairs(J.vars) do
      degs[k] = max(1, poly_degree(expr.diff(J.exponent, v), isvar) or 1)
    end
  end
  local roots, info, singular
  if polynomial then roots, info, singular = by_homotopy(J, cp, degs) end
  if not roots then
    local lists = {}
    local per = ({ 7, 7, 5, 4 })[J.n] or 3
    for k, C in ipairs(J.contours) do lists[k] = contour_samples(C, per) end
    local seeds = product(lists, 800)
    for _, s in ipairs(opts.seeds or {}) do table.insert(seeds, 1, s) end
    local found, ninfo = core.multi_newton(J.tape, cp, J.varslot, seeds,
      { maxstep = problem_scale(J), tol = 1e-14, maxit = 80 })
    roots = found
    local why = info and format("the homotopy would need %d paths (more than %d); ",
      info.paths, MAX_PATHS) or ""
    info = { method = "newton", seeds = #seeds, status = "not exhaustive",
      note = format("%sNewton's method with deflation from %d seeds on the contours found "
        .. "%d critical points (not exhaustive: a critical point far from the contours "
        .. "can be missed)", why, #seeds, #found) }
  end
  local out = {}
  for _, x in ipairs(roots) do out[#out + 1] = M.describe(J, cp, x) end
  for _, x in ipairs(singular or {}) do
    local d = M.describe(J, cp, x)
    d.degenerate = true
    out[#out + 1] = d
  end
  table.sort(out, function(a, b) return re_of(a.F) > re_of(b.F) end)
  return out, info
end

--- F, gradient, Hessian, eigenvalues of -F'' and realness at x.
function M.describe(J, cp, x)
  local F, g, H = derivs(J, cp, x)
  local real = true
  for _, v in ipairs(x) do
    if abs(im_of(v)) > 1e-9 * (1 + cabs(v)) then real = false end
  end
  local negH = {}
  for i = 1, J.n do
    negH[i] = {}
    for j = 1, J.n do negH[i][j] = -H[i][j] end
  end
  local _, rc = cmatrix.det(negH)
  return { x = x, F = F, gradient = g, hessian = H, real = real,
    degenerate = rc < 1e-12, eigenvalues = cmatrix.eigenvalues(negH) }
end

---------------------------------------------------------------------------------------
-- Which problem this is.
---------------------------------------------------------------------------------------

-- Samples of F over the product of the contours (a grid of up to ~600 points); with
-- `real`, the samples' rounding off the real axis is dropped (a ray from steep.inf(pi)
-- runs at sin(pi) = 1.2e-16, and a sample where F cancels to about 0 then has an
-- imaginary part above 1e-12 of it: stationary phase over R^2 was refused as "neither
-- real nor imaginary").
local function sample_box(J, cp, real)
  local lists = {}
  local per = ({ 9, 9, 7, 5 })[J.n] or 5
  for k, C in ipairs(J.contours) do
    lists[k] = contour_samples(C, per)
    if real then
      for i, z in ipairs(lists[k]) do lists[k][i] = (cparts(z)) end
    end
  end
  local pts = product(lists, 700)
  local Fs = M.eval_many(J, cp, pts)
  return pts, Fs
end

--- The kind of problem: "laplace", "stationary phase", "torus" or "other", with the
-- shapes of the contours and a reason when "other".
function M.classify(J, cp)
  local shapes, all_real, all_lines, all_circles = {}, true, true, true
  for k, C in ipairs(J.contours) do
    shapes[k] = M.shape(C)
    local s = shapes[k]
    all_real = all_real and s.shape == "real"
    all_lines = all_lines and s.shape == "real" and s.lo == -huge and s.hi == huge
    all_circles = all_circles and s.shape == "circle" and cabs(s.center) == 0
  end
  if all_circles then return "torus", shapes end
  if not all_real then
    return "other", shapes, "the contours are neither intervals of the real axis nor "
      .. "circles about 0"
  end
  local pts, Fs = sample_box(J, cp, true)
  local realF, imagF = true, true
  for i = 1, #pts do
    local re, im = cparts(Fs:get(i))
    if re == re and im == im and abs(re) < huge then
      local tol = 1e-12 * (1 + hypot(re, im))
      if abs(im) > tol then realF = false end
      if abs(re) > tol then imagF = false end
    end
  end
  if realF then return "laplace", shapes end
  if imagF and all_lines then return "stationary phase", shapes end
  if imagF then
    return "other", shapes, "a stationary-phase integral over a bounded box (its corners "
      .. "and edges contribute too): name the point with at = {...}"
  end
  return "other", shapes, "the exponent is neither real nor imaginary on the real box"
end

---------------------------------------------------------------------------------------
-- Laplace type: local maxima over the box.
---------------------------------------------------------------------------------------

local function real_vec(x)
  local r = {}
  for k, v in ipairs(x) do r[k] = re_of(v) end
  return r
end

-- Cholesky of a real symmetric matrix: true if positive definite.
local function positive_definite(A)
  local n = #A
  local L = {}
  for i = 1, n do
    L[i] = {}
    for j = 1, i do
      local s = A[i][j]
      for k = 1, j - 1 do s = s - L[i][k] * L[j][k] end
      if i == j then
        if not (s > 0) then return false end
        L[i][i] = sqrt(s)
      else
        L[i][j] = s / L[j][j]
      end
    end
  end
  return true
end

local function realF(J, cp, x)
  local F = derivs(J, cp, x)
  return re_of(F)
end

-- Active-set Newton ascent to a local maximum of F over the box (a KKT point).
local function ascend(J, cp, shapes, x0)
  local n = J.n
  local x = real_vec(x0)
  local function clip(k, v)
    return max(shapes[k].lo, min(shapes[k].hi, v))
  end
  for k = 1, n do x[k] = clip(k, x[k]) end
  local Fx = realF(J, cp, x)
  for _ = 1, 200 do
    local _, gc, Hc = derivs(J, cp, x)
    local g, H = real_vec(gc), {}
    for i = 1, n do H[i] = real_vec(Hc[i]) end
    local free = {}
    for k = 1, n do
      local s = shapes[k]
      local held = (x[k] <= s.lo and g[k] <= 0) or (x[k] >= s.hi and g[k] >= 0)
      if not held then free[#free + 1] = k end
    end
    if #free == 0 then return x, Fx end
    local negHf, gf = {}, {}
    for a, i in ipairs(free) do
      negHf[a] = {}
      for b, j in ipairs(free) do negHf[a][b] = -H[i][j] end
      gf[a] = g[i]
    end
    local step
    if positive_definite(negHf) then
      local d = cmatrix.solve(negHf, gf)
      if d then
        step = {}
        for a = 1, #free do step[a] = re_of(d[a]) end
      end
    end
    if not step then   -- not concave here: a gradient step at the curvature's scale
      local hmax = 0
      for a = 1, #free do hmax = max(hmax, abs(negHf[a][a])) end
      local t = hmax > 0 and 1 / hmax or 1
      step = {}
      for a = 1, #free do step[a] = t * gf[a] end
    end
    local tlen = 1
    local moved = false
    for _ = 1, 40 do
      local y = { table.unpack(x) }
      for a, k in ipairs(free) do y[k] = clip(k, x[k] + tlen * step[a]) end
      -- (a step clipped onto an end where the exponent is singular, log x at x = 0: not
      -- taken, the step halves)
      local okF, Fy = pcall(realF, J, cp, y)
      if not okF then Fy = 0 / 0 end
      if Fy == Fy and Fy >= Fx - 1e-15 * abs(Fx) then
        local change = 0
        for k = 1, n do change = max(change, abs(y[k] - x[k]) / (1 + abs(x[k]))) end
        x, Fx = y, Fy
        moved = change > 1e-15
        break
      end
      tlen = tlen / 2
    end
    if not moved then return x, Fx end
  end
  return x, Fx
end

local ZERO_SLOPE = 1e-7   -- |dF/dx| times the width below which an end is a half-Gaussian

-- The kinds of the coordinates at a KKT point x: "full" (interior), "half" (at an end
-- with zero slope), "edge" (at an end, F falling inward); local directions (inward or
-- along the contour) and Jacobians (the contour's direction).
local function kkt_kinds(J, cp, shapes, x)
  local _, gc, Hc = derivs(J, cp, x)
  local kinds, dirs, jac, notes = {}, {}, {}, {}
  for k = 1, J.n do
    local s = shapes[k]
    local g = re_of(gc[k])
    local hkk = abs(re_of(Hc[k][k]))
    local width = hkk > 0 and 1 / sqrt(hkk) or 1
    jac[k] = s.dir
    local at_lo, at_hi = x[k] <= s.lo, x[k] >= s.hi
    if at_lo or at_hi then
      dirs[k] = at_lo and 1 or -1
      if abs(g) * width <= ZERO_SLOPE then kinds[k] = "half"
      else
        kinds[k] = "edge"
        if abs(g) * width < 3 then
          notes[#notes + 1] = format("coordinate %d: the maximum sits at an end where the "
            .. "slope is small (%.3g widths): neither Watson's lemma nor a half-Gaussian "
            .. "is accurate there", k, abs(g) * width)
        end
      end
    else
      kinds[k], dirs[k] = "full", s.dir
    end
  end
  return kinds, dirs, jac, notes
end

-- The faces of the box next to the point: both ends of an interior coordinate, the far
-- end of one the point sits at an end of (half-Gaussian or Watson there: the expansion
-- runs that coordinate to infinity). On each face the largest F (an ascent with that
-- coordinate held at the end) and the slope there. The expansion at x ignores them;
-- hormander.lua adds their size to the error estimate: a face's part of the integral,
-- about e^{F_face} min(1/|slope|, width_face sqrt(pi/2)) in that coordinate, against the
-- point's, e^{F0} times width sqrt(2 pi) (interior), width sqrt(pi/2) (half) or 1/|F'|
-- (edge); widths from F''.
local function face_sizes(J, cp, shapes, x, kinds)
  local out = {}
  local F0 = realF(J, cp, x)
  local _, g0, Hc = derivs(J, cp, x)
  for k = 1, J.n do
    local ends
    if kinds[k] == "full" then ends = { shapes[k].lo, shapes[k].hi }
    elseif x[k] <= shapes[k].lo then ends = { shapes[k].hi }
    else ends = { shapes[k].lo } end
    local hkk = abs(re_of(Hc[k][k]))
    local width = 1 / sqrt(max(hkk, 1e-300))
    local own = kinds[k] == "full" and width * sqrt(2 * pi)
      or kinds[k] == "half" and width * sqrt(pi / 2)
      or 1 / max(abs(re_of(g0[k])), 1e-300)
    for _, e in ipairs(ends) do
      if e > -huge and e < huge then
        local pinned = {}
        for j = 1, J.n do pinned[j] = shapes[j] end
        pinned[k] = { lo = e, hi = e, dir = shapes[k].dir }
        local y = { table.unpack(x) }
        y[k] = e
        local ok, yb, Fb = pcall(ascend, J, cp, pinned, y)
        if ok and Fb == Fb and Fb > -huge then
          local _, gb, Hb = derivs(J, cp, yb)
          local slope = abs(re_of(gb[k]))
          local wb = 1 / sqrt(max(abs(re_of(Hb[k][k])), 1e-300))
          local part = min(slope > 0 and 1 / slope or huge, wb * sqrt(pi / 2))
          local rel = math.exp(Fb - F0) * part / own
          out[#out + 1] = { coordinate = k, at = yb, F = Fb, relative = rel,
            widths = abs(x[k] - e) / width }
        end
      end
    end
  end
  return out
end

local function laplace_points(J, cp, shapes, crit)
  local n = J.n
  -- seeds: the grid's local maxima (neighbours along each coordinate) and the real
  -- critical points inside the box
  local lists = {}
  local per = ({ 17, 11, 7, 5 })[n] or 5
  for k, s in ipairs(shapes) do
    local lo, hi = s.lo, s.hi
    if lo == -huge and hi == huge then lo, hi = -4, 4
    elseif lo == -huge then lo = hi - 8 * max(1, abs(hi))
    elseif hi == huge then hi = lo + 8 * max(1, abs(lo)) end
    lists[k] = {}
    for j = 0, per - 1 do lists[k][j + 1] = lo + (hi - lo) * j / (per - 1) end
  end
  local pts = product(lists)
  local Fs = M.eval_many(J, cp, pts)
  local val = {}
  for i = 1, #pts do
    local v = re_of(Fs:get(i))
    val[i] = (v == v) and v or -huge
  end
  local seeds = {}
  local stride = {}
  stride[n] = 1
  for k = n - 1, 1, -1 do stride[k] = stride[k + 1] * per end
  for i = 1, #pts do
    local idx, r = {}, i - 1
    for k = 1, n do idx[k] = floor(r / stride[k]); r = r % stride[k] end
    local is_max = true
    for k = 1, n do
      for _, dk in ipairs({ -1, 1 }) do
        local j = idx[k] + dk
        if j >= 0 and j < per and val[i + dk * stride[k]] > val[i] then is_max = false end
      end
    end
    if is_max and val[i] > -huge then seeds[#seeds + 1] = { x = pts[i], F = val[i] } end
  end
  table.sort(seeds, function(a, b) return a.F > b.F end)
  while #seeds > 24 do seeds[#seeds] = nil end
  for _, c in ipairs(crit) do
    if c.real then
      local inside = true
      for k, s in ipairs(shapes) do
        local v = re_of(c.x[k])
        if v < s.lo or v > s.hi then inside = false end
      end
      if inside then table.insert(seeds, 1, { x = c.x }) end
    end
  end
  local found = {}
  for _, s in ipairs(seeds) do
    local x, Fx = ascend(J, cp, shapes, s.x)
    local dup = false
    for _, f in ipairs(found) do
      if same_point(f.xr, x, 1e-7) then dup = true end
    end
    if not dup then found[#found + 1] = { xr = x, F = Fx } end
  end
  -- where the box reaches infinity, F must fall below its largest maximum far out: probe
  -- along the axes and the diagonals from the best point (a divergent integral, or a
  -- higher maximum beyond the grid, would otherwise pass unnoticed)
  table.sort(found, function(a, b) return a.F > b.F end)
  if found[1] then
    local x0, F0 = found[1].xr, found[1].F
    local dirs = {}
    for k = 1, n do
      local d = {}
      for j = 1, n do d[j] = (j == k) and 1 or 0 end
      dirs[#dirs + 1] = d
    end
    for mask = 0, 2 ^ n - 1 do
      local d = {}
      for j = 1, n do d[j] = ((mask >> (j - 1)) & 1 == 1) and -1 or 1 end
      dirs[#dirs + 1] = d
    end
    local probes, where = {}, {}
    for _, d in ipairs(dirs) do
      for _, sgn in ipairs({ 1, -1 }) do
        for e = 2, 12 do
          local p, inside = {}, true
          for j = 1, n do
            local v = x0[j] + sgn * d[j] * 2 ^ e * max(1, abs(x0[j]))
            if v < shapes[j].lo or v > shapes[j].hi then inside = false end
            p[j] = v
          end
          if inside then probes[#probes + 1] = p; where[#where + 1] = p end
        end
      end
    end
    if #probes > 0 then
      local Fs = M.eval_many(J, cp, probes)
      for i = 1, #probes do
        local v = re_of(Fs:get(i))
        if v == v and v > F0 then
          error(format("expand: F reaches %.6g at %s, above its largest maximum found (%.6g at "
            .. "%s): the integral diverges towards infinity, or a higher maximum lies outside "
            .. "the search", v, M.point_text(where[i]), F0, M.point_text(x0)), 0)
        end
      end
    end
  end
  local out = {}
  for _, f in ipairs(found) do
    local kinds, dirs, jac, notes = kkt_kinds(J, cp, shapes, f.xr)
    -- a strict local maximum: -F'' positive definite over the Gaussian coordinates
    local _, _, Hc = derivs(J, cp, f.xr)
    local q = {}
    for k = 1, n do if kinds[k] ~= "edge" then q[#q + 1] = k end end
    local negH = {}
    for a, i in ipairs(q) do
      negH[a] = {}
      for b, j in ipairs(q) do negH[a][b] = -re_of(Hc[i][j]) end
    end
    local ok = #q == 0 or positive_definite(negH)
    if ok then
      local x = {}
      for k = 1, n do x[k] = cnew(f.xr[k], 0) end
      local nedge = 0
      for k = 1, n do if kinds[k] ~= "full" then nedge = nedge + 1 end end
      out[#out + 1] = { x = x, kinds = kinds, dirs = dirs, jac = jac, notes = notes,
        faces = face_sizes(J, cp, shapes, f.xr, kinds),
        why = nedge == 0 and "interior maximum" or "maximum on the boundary of the box" }
    elseif #q > 0 then
      local _, rc = cmatrix.det(negH)
      if rc < 1e-12 then
        error(format("expand: F has a degenerate maximum at %s (its Hessian is singular): "
          .. "not supported", M.point_text(f.xr)), 0)
      end
    end
  end
  table.sort(out, function(a, b) return re_of(derivs(J, cp, a.x)) > re_of(derivs(J, cp, b.x)) end)
  return out
end

function M.point_text(x)
  local parts = {}
  for k, v in ipairs(x) do
    local re, im = cparts(v)
    parts[k] = im == 0 and format("%.10g", re) or format("%.10g%+.10gi", re, im)
  end
  return "(" .. table.concat(parts, ", ") .. ")"
end

---------------------------------------------------------------------------------------
-- The torus: the critical point on the positive ray, alone on its torus.
---------------------------------------------------------------------------------------

local function torus_point(J, cp, shapes, opts)
  local n = J.n
  local r = {}
  for k, s in ipairs(shapes) do r[k] = cnew(s.radius, 0) end
  local roots = core.multi_newton(J.tape, cp, J.varslot, { r }, { tol = 1e-15, maxit = 100 })
  local x = roots[1]
  local positive = x ~= nil
  if x then
    for k = 1, n do
      local re, im = cparts(x[k])
      if not (re > 0) or abs(im) > 1e-10 * re then positive = false end
    end
  end
  if not positive then
    local list = {}
    for _, c in ipairs((M.find(J, cp, opts))) do list[#list + 1] = M.point_text(c.x) end
    error(format("expand: no critical point on the positive ray near the torus radii %s "
      .. "(critical points found: %s); name the point with at = {...}", M.point_text(r),
      #list > 0 and table.concat(list, ", ") or "none"), 0)
  end
  for k = 1, n do
    x[k] = cnew(re_of(x[k]), 0)
    if abs(re_of(x[k]) - shapes[k].radius) > 1e-7 * shapes[k].radius then
      error(format("expand: the torus (radii %s) does not pass through the critical point "
        .. "%s on the positive ray: use circles of those radii (moving the torus is "
        .. "legitimate when no singularity lies in between)", M.point_text(r),
        M.point_text(x)), 0)
    end
  end
  if M.describe(J, cp, x).degenerate then
    error(format("expand: the critical point %s is degenerate (its Hessian is singular: "
      .. "the critical points form a curve or worse, as for an integrand invariant under "
      .. "a rotation of the torus): not supported", M.point_text(x)), 0)
  end
  -- strict maximality of Re F on the torus: a grid, then ascent from its best points
  local F0, _, H = derivs(J, cp, x)
  local ReF0 = re_of(F0)
  local per = ({ 96, 48, 24, 12 })[n]
  local lists = {}
  for k = 1, n do
    lists[k] = {}
    for j = 0, per - 1 do lists[k][j + 1] = 2 * pi * j / per end
  end
  local angles = product(lists)
  local pts = {}
  for i, th in ipairs(angles) do
    local p = {}
    for k = 1, n do p[k] = shapes[k].center + shapes[k].radius * cnew(math.cos(th[k]), math.sin(th[k])) end
    pts[i] = p
  end
  local Fs = M.eval_many(J, cp, pts)
  -- the widths in angle: Re F ~ Re F0 - (1/2) sum r_k^2 |F''_kk| th_k^2 near the point
  local width = {}
  for k = 1, n do
    local h = cabs(H[k][k]) * shapes[k].radius ^ 2
    width[k] = h > 0 and 1 / sqrt(h) or pi
  end
  local function near_point(th)
    for k = 1, n do
      local a = abs(((th[k] + pi) % (2 * pi)) - pi)
      if a > 4 * width[k] then return false end
    end
    return true
  end
  local function torus_at(th)
    local p = {}
    for j = 1, n do p[j] = shapes[j].center + shapes[j].radius * cnew(math.cos(th[j]), math.sin(th[j])) end
    return p
  end
  -- the grid's local maxima (periodic neighbours) away from the point, best first
  local val = {}
  for i = 1, #angles do
    local v = re_of(Fs:get(i))
    val[i] = v == v and v or -huge
  end
  local stride = {}
  stride[n] = 1
  for k = n - 1, 1, -1 do stride[k] = stride[k + 1] * per end
  local cands = {}
  for i, th in ipairs(angles) do
    if not near_point(th) then
      local idx, r = {}, i - 1
      for k = 1, n do idx[k] = floor(r / stride[k]); r = r % stride[k] end
      local is_max = true
      for k = 1, n do
        for _, dk in ipairs({ -1, 1 }) do
          local j = i + (((idx[k] + dk) % per) - idx[k]) * stride[k]
          if val[j] > val[i] then is_max = false end
        end
      end
      if is_max then cands[#cands + 1] = i end
    end
  end
  table.sort(cands, function(a, b) return val[a] > val[b] end)
  local margin = 1e-9 * (1 + abs(ReF0))
  local best_far = -huge
  for c = 1, math.min(8, #cands) do
    -- ascend Re F in the angles (compass steps, halving)
    local th = { table.unpack(angles[cands[c]]) }
    local best = val[cands[c]]
    local step = pi / per
    for _ = 1, 400 do
      local improved = false
      for k = 1, n do
        for _, sgn in ipairs({ 1, -1 }) do
          local t2 = { table.unpack(th) }
          t2[k] = t2[k] + sgn * step
          local v = re_of((derivs(J, cp, torus_at(t2))))
          if v > best then best, th, improved = v, t2, true end
        end
      end
      if not improved then
        step = step / 2
        if step < 1e-10 then break end
      end
    end
    if not near_point(th) then
      best_far = max(best_far, best)
      if best >= ReF0 - margin then
        error(format("expand: the critical point %s is not the only point of its torus "
          .. "where |g e^F| is largest: Re F reaches %.12g at %s too (periodic or not "
          .. "minimal); name the points with at = {...}", M.point_text(x), best,
          M.point_text(torus_at(th))), 0)
      end
    end
  end
  local dirs, jac, kinds = {}, {}, {}
  for k = 1, n do
    local t = cnew(0, shapes[k].dir)
    kinds[k], dirs[k], jac[k] = "full", t, t
  end
  return { x = x, kinds = kinds, dirs = dirs, jac = jac, notes = {},
    why = "critical point on the positive ray, alone on its torus",
    margin = best_far > -huge and (ReF0 - best_far) or nil }
end

---------------------------------------------------------------------------------------
-- Which points contribute.
---------------------------------------------------------------------------------------

--- contributing(J, cp, opts) -> list of points {x, kinds, dirs, jac, why, notes}, the
-- problem's kind, and the critical-point search info. opts.at: a named point.
function M.contributing(J, cp, opts)
  opts = opts or {}
  local kind, shapes, why = M.classify(J, cp)
  if opts.at then
    local x0 = opts.at
    local roots = core.multi_newton(J.tape, cp, J.varslot, { x0 }, { tol = 1e-15, maxit = 100 })
    if not roots[1] then
      error(format("expand: Newton's method from the named point %s does not converge to a "
        .. "critical point", M.point_text(x0)), 0)
    end
    local x = roots[1]
    local dirs, jac, kinds = {}, {}, {}
    for k, C in ipairs(J.contours) do
      local t = M.tangent(C, x[k])
      kinds[k], dirs[k], jac[k] = "full", t, t
    end
    return { { x = x, kinds = kinds, dirs = dirs, jac = jac, named = true,
      why = "named point (which points contribute was not decided)",
      notes = { "at a named point: the square root's branch follows the contours' "
        .. "directions nearest the point (the product of the principal roots of the "
        .. "eigenvalues of -F'' in those directions); check the result against quadrature" } } },
      kind, nil
  end
  if kind == "other" then
    error("expand: which critical points contribute is not settled here (" .. why
      .. "); name the point with at = {...}", 0)
  end
  if kind == "torus" then return { torus_point(J, cp, shapes, opts) }, kind, nil end
  local crit, info = M.find(J, cp, opts)
  if kind == "laplace" then
    local pts = laplace_points(J, cp, shapes, crit)
    if #pts == 0 then error("expand: no local maximum of F found over the box", 0) end
    return pts, kind, info
  else   -- stationary phase
    local pts = {}
    for _, c in ipairs(crit) do
      if c.real then
        if c.degenerate then
          error(format("expand: the stationary point %s is degenerate (Hessian singular): "
            .. "not supported", M.point_text(c.x)), 0)
        end
        local x, dirs, jac, kinds = {}, {}, {}, {}
        for k = 1, J.n do
          x[k] = cnew(re_of(c.x[k]), 0)
          kinds[k], dirs[k], jac[k] = "full", 1, shapes[k].dir
        end
        pts[#pts + 1] = { x = x, kinds = kinds, dirs = dirs, jac = jac, notes = {},
          why = "real stationary point" }
      end
    end
    if #pts == 0 then
      error("expand: no real stationary point found (" .. info.note .. "): the integral "
        .. "is smaller than any power of the large parameter, or the search missed it", 0)
    end
    return pts, kind, info
  end
end

return M
