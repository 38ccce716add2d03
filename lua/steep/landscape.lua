-- steep.landscape — where an exponent's saddles, singularities and valleys are, and
-- where its steepest paths go. The numerical kernels are in C (ext/roots.c, path.c);
-- this file decides where to look and what the findings mean.
--
-- Everything here works at fixed parameter values, on a compiled integrand tape whose
-- output 1 is the exponent F and output 2 the amplitude g.

local core = require "steep.core"
local complex = require "steep.complex"
local expr = require "steep.expr"
local infinity = require "steep.infinity"

local cnew, cparts = complex.new, complex.parts
local format, pi, abs, log, huge = string.format, math.pi, math.abs, math.log, math.huge
local cos, sin, atan, floor = math.cos, math.sin, math.atan, math.floor

local M = {}
local essential_sectors

-- |z| and arg z of a number or complex value (the complex case read inline: these run
-- in most loops of the library)
local cmt, hypot = complex.metatable, complex.hypot
local function cabs(z)
  local re, im
  if getmetatable(z) == cmt then re, im = z[1], z[2] else re, im = cparts(z) end
  return hypot(re, im)
end
local function carg(z)
  local re, im
  if getmetatable(z) == cmt then re, im = z[1], z[2] else re, im = cparts(z) end
  return atan(im, re)
end
local function expi(th) return setmetatable({ cos(th), sin(th) }, cmt) end

-- Angles in (-pi, pi].
local function norm_angle(th)
  th = th % (2 * pi)
  if th > pi then th = th - 2 * pi end
  return th
end

---------------------------------------------------------------------------------------
-- Critical subexpressions: where the integrand can be singular.
---------------------------------------------------------------------------------------

-- Each entry: {h = expression whose zeros matter, what = "denominator" | "log" | "root"
-- | "power" | "tan" | "atan", where = "exponent" | "amplitude", node = the operation}.
-- Walking the DAG finds them by construction: denominators of divisions and negative
-- powers, arguments of log, sqrt and non-integer powers, cos of tan's argument (its
-- poles), cosh of tanh's, and 1 + a^2 for atan (its branch points at a = +-i).
function M.critical(F, g, var)
  local out, seen = {}, {}
  local function add(h, what, where, n)
    if not expr.is(h) or not h:depends_on(var) then return end
    local key = where .. ":" .. what .. ":" .. tostring(h)
    if seen[key] then return end
    seen[key] = true
    out[#out + 1] = { h = h, what = what, where = where, node = n }
  end
  local function walk(root, where)
    local visited = {}
    local function visit(n)
      if visited[n] or not expr.is(n) then return end
      visited[n] = true
      if n.a then visit(n.a) end
      if n.b then visit(n.b) end
      local op = n.op
      if op == "div" then add(n.b, "denominator", where, n)
      elseif op == "powi" and n.k < 0 then add(n.a, "denominator", where, n)
      elseif op == "log" then add(n.a, "log", where, n)
      elseif op == "sqrt" then add(n.a, "root", where, n)
      elseif op == "powc" then add(n.a, "power", where, n)
      elseif op == "tan" then add(expr.fn("cos", n.a), "tan", where, n)
      elseif op == "tanh" then add(expr.fn("cosh", n.a), "tan", where, n)
      elseif op == "atan" then add(1 + n.a ^ 2, "atan", where, n)
      end
    end
    visit(root)
  end
  walk(expr.lift(F), "exponent")
  if g ~= nil then walk(expr.lift(g), "amplitude") end
  for _, c in ipairs(out) do c.degree = M.poly_degree(c.h, var) end
  return out
end

--- poly_degree(e, var) -> d when the expression e is, by its form, a polynomial in var of
-- degree at most d (sums, products, whole powers and quotients by what does not depend on
-- var; anything free of var counts as a constant), else nil. At most 64.
function M.poly_degree(e, var)
  local memo = {}
  local function deg(n)
    if not expr.is(n) then return 0 end
    local m = memo[n]
    if m ~= nil then return m or nil end
    local op, r = n.op, nil
    if op == "const" or op == "param" then r = 0
    elseif op == "var" then r = (n == var) and 1 or 0
    else
      local a = n.a and deg(n.a)
      local b = n.b and deg(n.b)
      local free = (n.a == nil or a == 0) and (n.b == nil or b == 0)
      if free then r = 0
      elseif op == "add" or op == "sub" then r = a and b and math.max(a, b)
      elseif op == "neg" then r = a
      elseif op == "mul" then r = a and b and a + b
      elseif op == "div" then r = (b == 0) and a or nil
      elseif op == "powi" and n.k >= 0 then r = a and a * n.k
      end
    end
    if r and r > 64 then r = nil end
    memo[n] = r or false
    return r
  end
  return deg(expr.lift(e))
end

---------------------------------------------------------------------------------------
-- Zeros in a disc.
---------------------------------------------------------------------------------------

--- zeros(tape, params, spec, region, opts) -> list of {at, mult}, info
-- spec = {out =, deriv =}: the zeros of the deriv-th derivative of tape output `out`.
-- region = {center =, radius =}. opts.seeds: extra seed points; opts.poles: the number
-- of poles of h inside (for the argument-principle count), or false if h is not
-- meromorphic there (then no count is made). info: {count =, found =, status =, evals =}.
-- Newton's method runs in C (core.zeros: the seeds are a grid of 169 points, then the
-- extra ones; where the count says zeros are missing, up to 4 rounds of 150 random seeds,
-- the same for the same disc; following a sweep from seeds only, a shortfall is
-- reported, not searched for: the caller falls back to a full search).
function M.zeros(tape, params, spec, region, opts)
  opts = opts or {}
  local c, R = region.center, region.radius
  local found, evals, count_status, count
  if opts.degree and opts.poles == false and not opts.seeds_only and spec.deriv == 0 then
    found, evals = M.polynomial_zeros(tape, params, spec, region, opts.degree)
  end
  if not found then
    local roots, mults
    roots, mults, evals, count_status, count = core.zeros(tape, params, spec, c, R,
      { grid = not opts.seeds_only, seeds = opts.seeds,
        count = opts.poles ~= false and 40000 or 0, poles = opts.poles or 0 })
    found = {}
    for k = 1, #roots do found[k] = { at = roots:get(k), mult = mults[k] } end
  end
  local info = { found = 0, evals = evals }
  local function total()
    local n = 0
    for _, z in ipairs(found) do if cabs(z.at - c) < R then n = n + z.mult end end
    return n
  end
  if opts.poles ~= false then
    info.count_status = count_status
    if count_status == "ok" then info.count = count + (opts.poles or 0) end
  end
  -- keep the zeros inside the disc, nearest the center first
  local inside = {}
  for _, z in ipairs(found) do if cabs(z.at - c) < R then inside[#inside + 1] = z end end
  table.sort(inside, function(a, b)
    local da, db = cabs(a.at - c), cabs(b.at - c)
    if abs(da - db) > 1e-9 * R then return da < db end
    return carg(a.at - c) < carg(b.at - c)
  end)
  info.found = total()
  info.evals = evals
  if info.count == nil then
    info.status = opts.poles == false and "not counted (not meromorphic in the region)"
      or ("not counted (" .. tostring(info.count_status) .. " on the boundary)")
  elseif info.count == info.found then
    info.status = "complete"
  else
    info.status = format("mismatch: the argument principle counts %d, %d found",
      info.count, info.found)
  end
  return inside, info
end

--- polynomial_zeros(tape, params, spec, region, d) -> list of {at, mult}, evaluations: the
-- zeros in the disc of tape output spec.out, a polynomial of degree at most d (its form
-- says so: M.poly_degree): its Taylor coefficients about the center by one jet, every
-- root by poly_roots, each polished by Newton's method on the tape (the multiplicity from
-- its jet; roots of a multiple zero polish to one), as zeros() keeps them. Nil when the
-- jet cannot be taken at the center (an earlier output of the tape is singular there).
function M.polynomial_zeros(tape, params, spec, region, d)
  local c, R = region.center, region.radius
  local ok, s = pcall(function() return select(spec.out, tape:jet(c, d, params, spec.out)) end)
  if not ok then return nil end
  local a = {}
  for j = 0, d do a[j] = s:coef(j) end
  while d > 0 and cabs(a[d]) == 0 do d = d - 1 end
  local found, evals = {}, 1
  if d == 0 then return found, evals end
  for _, u in ipairs((M.poly_roots(a, d))) do
    local st, root, mult, ev = core.zero(tape, params, spec, c + u, c, R, R / 10, 60)
    evals = evals + ev
    if st == "ok" then
      local dup = false
      for _, z in ipairs(found) do
        if cabs(z.at - root) <= 1e-8 * R then dup = true; break end
      end
      if not dup then found[#found + 1] = { at = root, mult = mult } end
    end
  end
  return found, evals
end

--- poly_roots(c, d) -> list of the d roots of sum_{k<=d} c[k] z^k (complex values), by
-- the Aberth-Ehrlich iteration (O. Aberth, Math. Comp. 27 (1973) 339-344) on the monic
-- polynomial, started on a circle of the Fujiwara bound's radius (M. Fujiwara, Tohoku
-- Math. J. 10 (1916) 167-171: every root has |z| <= 2 max |c_{d-j}/c_d|^(1/j), the last
-- one halved). Coefficients are divided by the leading one first (no overflow of huge
-- ones). Returns the roots and the bound.
function M.poly_roots(c, d)
  local a = {}
  for k = 0, d do a[k] = c[k] / c[d] end
  -- (degrees 1 and 2 in closed form, the quadratic without cancellation)
  if d == 1 then return { -a[0] }, 2 * cabs(a[0]) end
  if d == 2 then
    local disc = complex.apply("sqrt", a[1] * a[1] - 4 * a[0])
    local q = a[1] + disc
    if cabs(a[1] - disc) > cabs(q) then q = a[1] - disc end
    q = -0.5 * q
    local z2 = cabs(q) > 0 and a[0] / q or cnew(0, 0)
    return { q, z2 }, 2 * math.max(cabs(a[1]), math.sqrt(cabs(a[0])))
  end
  local bound = 0
  for j = 1, d do
    local v = cabs(a[d - j])
    if v > 0 then
      local b = (j == d and v / 2 or v) ^ (1 / j)
      bound = math.max(bound, 2 * b)
    end
  end
  if d == 0 then return {}, 0 end
  if bound == 0 then
    local z = {}
    for k = 1, d do z[k] = cnew(0, 0) end
    return z, 0
  end
  -- the iteration in C (core.aberth: started at z_k = bound e^{i (2 pi (k-1)/d + 0.4)},
  -- Gauss-Seidel sweeps until no root moves by 1e-15 relative, at most 500)
  local coefs = {}
  for k = 0, d do coefs[k + 1] = a[k] end
  return core.aberth(coefs, bound):totable(), bound
end

---------------------------------------------------------------------------------------
-- Singularities.
---------------------------------------------------------------------------------------

-- Trapezoidal rule on a circle (exponentially accurate for analytic periodic integrands):
-- the Laurent coefficients a_n rho^n, n = -depth..1, of the integrand about p.
local function laurent(tape, params, p, rho, n, depth)
  local c, vmax, c_half = core.laurent(tape, params, p, rho, n, depth)
  local coef, half = {}, {}
  for m = -depth, 1 do coef[m], half[m] = c:get(m + depth + 1), c_half:get(m + depth + 1) end
  return coef, vmax, half
end

-- The spread of log |integrand| on the circle of radius rho about p (32 points): small
-- when the circle is close enough to a pole for the pole to dominate.
local function log_spread(tape, params, p, rho)
  return core.log_spread(tape, params, p, rho, 32)
end

-- The coefficient c of c*log(t - p) in F at a log point: (1/2 pi i) times the integral of
-- F' around p, by the trapezoidal rule on 64 points (in C: core.log_coefficient).
local function log_coefficient(tape, params, p, rho)
  return core.log_coefficient(tape, params, p, rho, 64)
end

local function near_integer(x, tol) return abs(x - floor(x + 0.5)) <= tol end

-- At an essential singularity p of the integrand made by a pole of the exponent,
-- F ~ c (t - p)^(-k): the integrand vanishes as t -> p from the k sectors where
-- cos(arg c - k phi) < 0, phi = arg(t - p) (valleys at p, as at infinity under t - p = 1/u).
-- k and c from the Laurent coefficients of F' (single-valued even where F has a log
-- there) by the trapezoidal rule on a circle: F' ~ -k c (t - p)^(-k-1). Sets s.pole_order,
-- s.lead, s.sectors ({from, to} angles) when the leading term is clear.
essential_sectors = function(J, params, s, p, rho)
  local n, depth = 64, 12
  -- b_m = (1/n) sum F'_j u_j^(-m) rho^(-m): the coefficient of (t - p)^m, on n points (in
  -- C: core.dF_laurent; nil where F' is not finite on the circle)
  local b = core.dF_laurent(J.tape, params, p, rho, n, depth)
  if not b then return end
  local lead, order, big = nil, nil, 0
  local coef = {}
  for m = -depth - 1, 0 do
    coef[m] = b:get(m + depth + 2)
    big = math.max(big, cabs(coef[m]) * rho ^ m)
  end
  for m = -depth - 1, -2 do
    if cabs(coef[m]) * rho ^ m > 1e-8 * big then order = -m - 1; lead = coef[m]; break end
  end
  if not order or order == depth then return end
  local c = lead / (-order)
  s.pole_order, s.lead = order, c
  s.sectors = {}
  local a = carg(c)
  for j = 0, order - 1 do
    local from = (a + pi / 2 + 2 * pi * j) / order
    s.sectors[#s.sectors + 1] = { from = norm_angle(from), width = pi / order }
  end
end

--- relative_rounding(J, params, pts) -> list: at each point, the relative rounding of
-- g e^F by the running error bound through the tape (tape:rounding): F's absolute bound
-- plus g's relative one; 0 where it cannot be had (a singular point).
function M.relative_rounding(J, params, pts)
  local out = {}
  for k = 1, #pts do out[k] = 0 end
  if #pts == 0 then return out end
  local cv = core.cvec(pts)
  local ok, eF, eg = pcall(J.tape.rounding, J.tape, cv, params)
  if not ok then return out end
  local okv, _, gs = pcall(J.tape.eval_many, J.tape, cv, params)
  for k = 1, #pts do
    local r = eF[k] or 0
    local g = okv and gs and gs:get(k)
    if g and eg and eg[k] and cabs(g) > 0 then r = r + eg[k] / cabs(g) end
    out[k] = (r == r and r < huge) and r or 0
  end
  return out
end

-- The relative rounding of g e^F on the circle |t - p| = rho: the running error bound
-- through the tape (tape:rounding) at 16 points, its largest (F's absolute bound plus g's
-- relative one), and at least 8 u. Where F is a sum of large terms (n log(e^z - 1) - m
-- log z) the values carry far more than a few units of rounding: a residue of order 31
-- was 2e18 off under 1.5e18.
local function circle_rounding(J, params, p, rho)
  local pts = {}
  for k = 0, 15 do
    pts[#pts + 1] = p + rho * cnew(math.cos(2 * math.pi * k / 16), math.sin(2 * math.pi * k / 16))
  end
  local rel = 0
  for _, r in ipairs(M.relative_rounding(J, params, pts)) do rel = math.max(rel, r) end
  return rel + 8 * 2.2e-16
end

--- residue(J, params, p, nearest, order [, hint]) -> residue, error estimate, radius (or nil): the
-- residue of the integrand at the pole p by the trapezoidal rule on the circle where it is
-- best conditioned. The rule's rounding is about r max|f| rho on the circle (r the
-- values' relative rounding, at least 8 u: circle_rounding), against a
-- residue that for a pole of high order (t^-30 e^{x t}, made by -30 log t in the
-- exponent) may be far smaller than |f| near the pole: the radius minimizing
-- max|f| rho is found on a geometric grid below 0.9 times the distance to the next
-- singular point (the circle's own saddle point; for a coefficient integral it is the
-- saddle of the coefficient's Cauchy integral). The points p + rho e^{i theta} themselves
-- carry u |p| of rounding, which moves f by a relative u |p| / rho near a pole: a circle
-- much smaller than |p| loses digits (1e-12 at rho = 1.7e-6), so the radius minimizes
-- max|f| (|p| + 2 rho), both parts together. Points: enough for the rule on every other
-- point to agree (their difference is the error estimate, with both roundings).
function M.residue(J, params, p, nearest, order, hint)
  -- radii 0.9 nearest 2^(-i/3), i = 0..60, 64 points each (in C: core.ring_quietest;
  -- best is log(max|f| rho) at the radius chosen). Following a sweep, the radius the
  -- point had at the last step (hint) narrows that to the 13 radii nearest it: the score
  -- moves little between steps, and 3904 evaluations a step were a fifth of a sweep
  local r0, count = 0.9 * nearest, 61
  if hint and hint > 0 and hint <= r0 then
    local i0 = math.floor(3 * math.log(r0 / hint, 2) + 0.5)
    local lo, hi = math.max(0, i0 - 6), math.min(60, i0 + 6)
    r0, count = r0 * 2 ^ (-lo / 3), hi - lo + 1
  end
  local brho, best, bspread = core.ring_quietest(J.tape, params, p, r0, count, 64)
  if not brho or not (best < 700) then return nil end
  -- (the function's variation around the circle sets how many points the rule needs)
  local N = 256
  while N < 16 * (order + 4) or N < 8 * math.min(bspread, 1e4) do N = 2 * N end
  local r, e
  local rel = circle_rounding(J, params, p, brho)
  for _ = 1, 4 do
    local b, vmax, a = laurent(J.tape, params, p, brho, N, 2)
    r = b[-1] * brho
    e = cabs(b[-1] - a[-1]) * brho + rel * vmax * (brho + cabs(p)) + 1e-15 * cabs(r)
    if not (cabs(r) < huge) then return nil end
    if e <= 1e-12 * cabs(r) or N >= 16384 then break end
    N = 2 * N
  end
  return r, e, brho
end

--- The valley sector of an essential singularity s that the direction phi (of t - p)
-- lies in, or nil.
function M.essential_sector(s, phi)
  for k, v in ipairs(s.sectors or {}) do
    local d = (phi - v.from) % (2 * pi)
    if d > 0 and d < v.width then return k end
  end
end

local MAX_LAURENT_DEPTH = 1024   -- core.laurent's deepest Laurent coefficient

-- A pole's residue refined when first read: s.residue, residue_error, residue_radius
-- and residue_unknown stay off the table until one of them is asked for, then refine()
-- sets them (from the first estimate it improves on). rawget(s, "residue_radius") tells
-- whether it has run without running it.
local LAZY_RESIDUE = { residue = true, residue_error = true, residue_radius = true,
  residue_unknown = true }
local function refine_later(s, refine)
  local first = {}
  for k in pairs(LAZY_RESIDUE) do first[k] = s[k]; s[k] = nil end
  setmetatable(s, { __index = function(_, k)
    if not LAZY_RESIDUE[k] then return nil end
    setmetatable(s, nil)
    for name, v in pairs(first) do s[name] = v end
    refine()
    return rawget(s, k)
  end })
end

--- singularities(J, params, region) -> list of {at, kind, order, residue, error, where,
-- source, coefficient}, info. kind: "pole" (of the integrand, with its residue),
-- "branch" (branch point), "sink" / "hill" (log point of the exponent where the
-- integrand vanishes / blows up), "essential".
function M.singularities(J, params, region, opts)
  local crit = J.critical
  local list, info = {}, { evals = 0, counts = {} }
  if #crit == 0 then return list, info end
  local hs = {}
  for k, c in ipairs(crit) do hs[k] = c.h end
  local htape = J:critical_tape()
  for k, c in ipairs(crit) do
    local zs, zi = M.zeros(htape, params, { out = k, deriv = 0 }, region,
      { poles = false, seeds = opts and opts.seeds, seeds_only = opts and opts.fast,
        degree = c.degree })
    info.evals = info.evals + zi.evals
    local found = 0
    for _, z in ipairs(zs) do
      list[#list + 1] = { at = z.at, mult = z.mult, crit = c }
      found = found + z.mult
    end
    if opts and opts.fast then
      -- following a sweep from the last step's points only: a point that entered the
      -- region since is counted by the argument principle (zeros less poles of h), and the
      -- caller searches again
      local st, count = core.count(htape, params, { out = k, deriv = 0 }, region.center,
        region.radius, 20000)
      if st == "ok" and count > found then info.missing = true end
    end
  end
  -- merge the same point found through several subexpressions
  local merged = {}
  for _, s in ipairs(list) do
    local dup
    for _, m in ipairs(merged) do
      if cabs(m.at - s.at) <= 1e-8 * region.radius then dup = m end
    end
    if dup then dup.sources[#dup.sources + 1] = s.crit
    else merged[#merged + 1] = { at = s.at, mult = s.mult, sources = { s.crit } } end
  end
  -- classify each point
  local out = {}
  for idx, m in ipairs(merged) do
    local nearest = region.radius
    for j, o in ipairs(merged) do
      if j ~= idx then nearest = math.min(nearest, cabs(o.at - m.at)) end
    end
    local rho = 0.25 * nearest
    -- following a sweep: start from twice the radius the same point needed at the last
    -- step (opts.radii, parallel to opts.seeds), when that is smaller, so that the halving
    -- below finds it again in a step or two and the circle can also grow back
    local seeds, radii = opts and opts.seeds, opts and opts.radii
    if seeds and radii then
      for k, z in ipairs(seeds) do
        if radii[k] and cabs(z - m.at) < radii[k] then rho = math.min(rho, 2 * radii[k]) end
      end
    end
    local s = { at = m.at, sources = {} }
    local in_exponent, kinds = false, {}
    for _, c in ipairs(m.sources) do
      s.sources[#s.sources + 1] = format("%s of %s in the %s", tostring(c.h), c.what, c.where)
      if c.where == "exponent" then in_exponent = true end
      kinds[c.what .. ":" .. c.where] = true
    end
    s.source = table.concat(s.sources, "; ")
    if kinds["denominator:exponent"] or kinds["tan:exponent"] then
      s.kind = "essential"
      essential_sectors(J, params, s, m.at, rho)
    elseif kinds["log:exponent"] and not (kinds["root:exponent"] or kinds["power:exponent"]) then
      local c = log_coefficient(J.tape, params, m.at, rho)
      s.coefficient = c
      local cr, ci = cparts(c)
      -- the amplitude singular there too (a pole of 1/(t (1 - t)) at a log point of the
      -- exponent): the integrand's own power is c plus the amplitude's, read from the
      -- slope of log |g| between two small circles (the log point alone had made t = 1 of
      -- t^10 (1 - t)^(1/2) / (t (1 - t)) a sink, and quadrature gave 3e7 for 0.57)
      local amp = false
      for k in pairs(kinds) do if k:match(":amplitude$") then amp = true end end
      if amp then
        local r1, r2, slope, nd = 1e-3 * rho, 1e-2 * rho, 0, 0
        for _, th in ipairs({ 0.3, 2.4, 4.5 }) do
          local d = expi(th)
          local ok1, _, g1 = pcall(J.tape.eval, J.tape, m.at + d * r1, params)
          local ok2, _, g2 = pcall(J.tape.eval, J.tape, m.at + d * r2, params)
          if ok1 and ok2 and g1 and g2 and cabs(g1) > 0 and cabs(g2) > 0 then
            slope, nd = slope + math.log(cabs(g2) / cabs(g1)) / math.log(r2 / r1), nd + 1
          end
        end
        if nd > 0 then
          slope = slope / nd
          if near_integer(slope, 1e-3) then slope = floor(slope + 0.5) end
          cr = cr + slope
          s.power = cnew(cr, ci)   -- (the integrand's power; s.coefficient stays F's)
        end
      end
      -- F ~ c log(t - p): the integrand behaves like (t - p)^c. Re c > 0: it vanishes
      -- there (a sink: descent paths end there, contours may start there); a negative
      -- integer c: a pole of order -c; otherwise it blows up (a hill), and a
      -- non-integer c makes p a branch point as well.
      local integer = abs(ci) < 1e-8 * (1 + abs(cr)) and near_integer(cr, 1e-8)
      if cr > 0 then
        s.kind = "sink"
        s.branch = not integer
      elseif integer then
        local n = floor(cr + 0.5)
        if n == 0 then s.kind = "regular" else s.kind = "pole"; s.order = -n end
      else
        s.kind = "hill"
        s.branch = true
      end
    elseif kinds["root:exponent"] or kinds["power:exponent"] or kinds["root:amplitude"]
        or kinds["power:amplitude"] or kinds["log:amplitude"] or kinds["atan:amplitude"]
        or kinds["atan:exponent"] then
      s.kind = "branch"
    else
      s.kind = "pole"
    end
    if s.kind == "pole" and s.order and s.order + 4 > MAX_LAURENT_DEPTH then
      -- (a log point of order beyond what the Laurent sums take, as -n log(1 - s) at
      -- n >= 1021: a pole of that order whose residue is not computed; a deformation that
      -- sweeps over it is refused, saying so)
      s.residue_unknown = true
    elseif s.kind == "pole" then
      -- a log point with coefficient -n is a pole of order n: look that deep, and more
      local depth = math.max(8, (s.order or 0) + 4)
      -- where the integrand changes by large factors around the circle (a fast exponent),
      -- the sums alias its large Taylor coefficients into the Laurent ones (a simple pole
      -- then looks like a high-order or essential one): halve rho while that helps
      local spread = log_spread(J.tape, params, m.at, rho)
      for _ = 1, 40 do
        if spread <= 4 then break end
        local half = log_spread(J.tape, params, m.at, 0.5 * rho)
        if spread < huge and not (half < 0.75 * spread) then break end
        rho, spread = 0.5 * rho, half
      end
      s.radius = rho   -- the circle its Laurent coefficients were taken on
      -- b on 8 depth + 64 points, a on every other one (their difference estimates b's
      -- error)
      local b, vmax, a = laurent(J.tape, params, m.at, rho, 8 * depth + 64, depth)
      local big, finite = 0, true
      for k = -depth, 1 do
        local v = cabs(b[k])
        if not (v < huge) then finite = false end   -- inf or NaN
        big = math.max(big, v)
      end
      if not finite then big = huge end
      local order = 0
      for k = -depth, -1 do if cabs(b[k]) > 1e-10 * big then order = math.max(order, -k) end end
      if not (big < huge) or big ~= big then
        -- the sums overflowed (a pole of very high order): it is still a pole, of the order
        -- its log coefficient says; its residue is unknown, which matters only if a
        -- deformation sweeps over it (the decomposition then says so)
        s.residue, s.residue_error = nil, nil
        s.order = s.order or depth
        s.residue_unknown = true
      elseif order == 0 then
        s.kind = "removable"
      else
        s.order = order
        -- a_{-1} = (a_{-1} rho^{-1}) * rho
        s.residue = b[-1] * rho
        -- the difference of the two sums, and their rounding (terms up to vmax)
        s.residue_error = cabs(b[-1] - a[-1]) * rho + 1e-15 * cabs(s.residue)
          + circle_rounding(J, params, m.at, rho) * vmax * (rho + cabs(m.at))
        if cabs(b[-depth]) > 1e-6 * big then s.kind = "essential"; s.order = nil end
      end
      if s.kind == "pole" and s.order then
        -- the residue again on the circle where it is best conditioned (the same point
        -- at the last step of a sweep: the seed nearest it, closer than a quarter of the
        -- distance to the next singular point); only when read: most poles are never
        -- crossed, and this search was most of a cold landscape (C(200,100): 2.8 of 7 ms)
        local hint, closest = nil, 0.25 * nearest
        local rr = opts and opts.residue_radii
        for k, z in ipairs(rr and seeds or {}) do
          if rr[k] and cabs(z - m.at) < closest then hint, closest = rr[k], cabs(z - m.at) end
        end
        local at, order = m.at, s.order
        refine_later(s, function()
          local r, e, rho2 = M.residue(J, params, at, nearest, order, hint)
          if r and (not s.residue or e < s.residue_error) then
            s.residue, s.residue_error, s.residue_radius = r, e, rho2
            s.residue_unknown = nil
          end
        end)
      end
    end
    if s.kind ~= "regular" and s.kind ~= "zero" and s.kind ~= "removable" then
      out[#out + 1] = s
    end
  end
  return out, info
end

---------------------------------------------------------------------------------------
-- Valleys at infinity.
---------------------------------------------------------------------------------------

local RING_ANGLES = 360   -- angles on each ring (fewer when following a sweep: see valleys)

-- log |g e^F| (and F) on the circle of radius r about c at NANG angles.
local function ring(tape, params, c, r, NANG)
  local pts = {}
  for k = 0, NANG - 1 do pts[k + 1] = c + r * expi(2 * pi * k / NANG) end
  local F, g = tape:eval_many(core.cvec(pts), params)
  local ell, Fv = {}, {}
  for k = 1, NANG do
    local f = F:get(k)
    Fv[k] = f
    local re = f[1]
    local gm = g and cabs(g:get(k)) or 1
    if re ~= re then re = huge end          -- NaN from overflow: treat as growth
    ell[k] = re + (gm > 0 and log(gm) or -huge)
  end
  return ell, Fv
end

-- Groups a boolean per angle into intervals {from, to} (radians, from < to, may exceed pi).
local function intervals(flags)
  local n = #flags
  local all = true
  for k = 1, n do if not flags[k] then all = false end end
  if all then return { { from = -pi, to = pi } } end
  local out = {}
  -- start scanning just after a false entry so wrapped intervals stay whole
  local s0
  for k = 1, n do if not flags[k] then s0 = k; break end end
  if not s0 then return out end
  local k, step = s0, 2 * pi / n
  local start
  for _ = 1, n do
    k = k % n + 1
    local th = (k - 1) * step
    if k <= s0 then th = th + 2 * pi end
    if flags[k] and not start then start = th end
    if not flags[k] and start then
      out[#out + 1] = { from = start - 0.5 * step, to = th - 0.5 * step }
      start = nil
    end
  end
  if start then out[#out + 1] = { from = start - 0.5 * step, to = s0 * step - 0.5 * step + 2 * pi } end
  for _, v in ipairs(out) do
    local shift = norm_angle(v.from) - v.from
    v.from, v.to = v.from + shift, v.to + shift
  end
  return out
end

--- valleys(J, params, region) -> list of {from, to, type, note}: the directions in which
-- the integrand decays at infinity, as angle intervals (from < to, radians; an interval
-- may reach past pi). type: "polynomial" (exact sectors of c t^n), "edge" (a single
-- direction where only a power of |t| makes it decay), "exponential" or "numerical"
-- (found by sampling, indicative).
-- Polynomial-type growth seen on rings of radius f*4R, f*8R, f*16R: the sectors of the
-- leading term a t^n, or nil when the growth is not (yet) that of a power.
local function polynomial_valleys(J, params, c, R, f, NANG)
  local R1, R2, R3 = f * 4 * R, f * 8 * R, f * 16 * R
  -- growth exponent: median over the angles of log2 |F(R3)| / |F(R2)|; when it is a
  -- whole n, F ~ a t^n with a fitted on each ring (core.ring_power)
  local _, n, s2, s3 = core.ring_power(J.tape, params, c, R2, R3, NANG)
  local valleys = {}
  if n >= 1 then
    -- polynomial type: F ~ a t^n; check that the leading coefficient is stable
    if cabs(s3) > 0 and cabs(s2 - s3) < 0.05 * cabs(s3) then
      -- the fitted phase carries the lower-order terms' share (log R / R, say); a
      -- phase within 5e-3 of a multiple of pi/12 is taken to be it exactly (real and
      -- imaginary leading coefficients are the rule)
      local phi = carg(s3)
      local k12 = math.floor(phi / (pi / 12) + 0.5)
      if abs(phi - k12 * pi / 12) < 5e-3 then phi = k12 * pi / 12 end
      for k = 0, n - 1 do
        local from = (pi / 2 - phi + 2 * pi * k) / n
        local to = (3 * pi / 2 - phi + 2 * pi * k) / n
        local shift = norm_angle(from) - from
        valleys[#valleys + 1] = { from = from + shift, to = to + shift, type = "polynomial",
          leading = s3, degree = n }
      end
      -- boundary directions where a power of |t| still makes the integrand integrable
      for k = 0, 2 * n - 1 do
        local th = norm_angle((pi / 2 - phi + pi * k) / n)
        local cr, ci = cparts(c)
        local ct, st = math.cos(th), math.sin(th)
        local pts = { cnew(cr + R1 * ct, ci + R1 * st), cnew(cr + R2 * ct, ci + R2 * st),
          cnew(cr + R3 * ct, ci + R3 * st) }
        local Fv, gv = J.tape:eval_many(pts, params)
        local ell = {}
        for j = 1, 3 do
          local gm = gv and cabs(gv[j]) or 1
          ell[j] = Fv[j][1] + (gm > 0 and log(gm) or -huge)
        end
        local slope = (ell[3] - ell[2]) / log(2)
        local slope1 = (ell[2] - ell[1]) / log(2)
        if slope < -1.05 and slope1 < -1.05 then
          valleys[#valleys + 1] = { from = th, to = th, type = "edge",
            decay = -slope }
        end
      end
      table.sort(valleys, function(a, b) return a.from < b.from end)
      return valleys, { growth = n, leading = s3 }
    end
  end
  return nil
end

-- The analysis of the integrand at infinity (lua/steep/infinity.lua) for these parameter
-- values, kept per integral for the last few parameter sets (false: not decided).
local function params_key(params)
  local parts = {}
  for k, v in pairs(params) do
    local re, im = cparts(v)
    parts[#parts + 1] = format("%s=%a,%a", k, re, im)
  end
  table.sort(parts)
  return table.concat(parts, ";")
end
M.params_key = params_key

function M.analysis(J, params, rho)
  local key = params_key(params)
  if rho then key = key .. format(";rho=%a,%a", cparts(rho)) end
  J._acache = J._acache or {}
  for _, e in ipairs(J._acache) do if e.key == key then return e.A or nil, e.why end end
  local A, why = infinity.analyze(J.exponent, J.amplitude, J.var, params, rho)
  table.insert(J._acache, 1, { key = key, A = A or false, why = why })
  J._acache[5] = nil
  return A, why
end

--- valleys(J, params, region, opts) -> list, info. From the analysis of the expression
-- where it decides every direction (exact sectors, edges, and strip families in
-- info.families, whose instances are added to the list as ends and paths reach them);
-- otherwise by sampling rings (indicative).
function M.valleys(J, params, region, opts)
  -- (opts.rho: the valleys of the exponent turned by the factor rho)
  local A = M.analysis(J, params, opts and opts.rho)
  if A then
    local list, families = {}, {}
    for _, v in ipairs(A.valleys) do
      local copy = {}
      for k, x in pairs(v) do copy[k] = x end
      if v.type == "strip" then families[#families + 1] = copy else list[#list + 1] = copy end
    end
    return list, { growth = A.degree, leading = A.polynomial and A.polynomial[A.degree],
      families = families, analysis = true }
  end
  return M.sampled_valleys(J, params, region, opts)
end

function M.sampled_valleys(J, params, region, opts)
  local c, R = region.center, region.radius
  -- following a sweep, 72 angles fix the sectors well enough (they move little)
  local NANG = (opts and opts.fast) and 72 or RING_ANGLES
  -- lower-order terms (a log, say) can hide the power at first: look further out too
  for _, f in ipairs({ 1, 16, 256 }) do
    local v, info = polynomial_valleys(J, params, c, R, f, NANG)
    if v then return v, info end
  end
  local R1, R2, R3
  local l1, l2, l3
  local valleys = {}
  -- otherwise by sampling, just outside the region (far out, exponential growth
  -- overflows): decaying from R1 to R3 and far below the level at R1
  local nest = 0
  do
    nest = core.ring_power(J.tape, params, c, 8 * R, 16 * R, NANG)
    if nest ~= nest then nest = huge end   -- no finite ratio at all
  end
  R1, R2, R3 = 1.25 * R, 1.6 * R, 2 * R
  l1 = ring(J.tape, params, c, R1, NANG)
  l2 = ring(J.tape, params, c, R2, NANG)
  l3 = ring(J.tape, params, c, R3, NANG)
  local flags = {}
  local ref = -huge
  for k = 1, NANG do ref = math.max(ref, math.min(l1[k], 1e300)) end
  for k = 1, NANG do
    local decays = l3[k] < l2[k] and l2[k] < l1[k]
    local algebraic = (l3[k] - l2[k]) / log(2) < -1.05 and (l2[k] - l1[k]) / log(2) < -1.05
    flags[k] = decays and (l3[k] < math.min(ref, l1[k]) - 10 or algebraic)
  end
  local kind = nest > 6 and "exponential" or "numerical"
  for _, v in ipairs(intervals(flags)) do
    v.type = kind
    v.note = kind == "exponential"
      and "exponential growth: valleys are strips; the directions are indicative"
      or "found by sampling at radii " .. format("%.3g..%.3g", R1, R3)
    valleys[#valleys + 1] = v
  end
  table.sort(valleys, function(a, b) return a.from < b.from end)
  return valleys, { growth = nest }
end

--- The valley containing direction th (index), and whether th lies on its boundary.
-- An end on a boundary between a valley and a hill belongs to that valley (oscillatory
-- but convergent, as e^{i t^3} on the real line).
function M.valley_of(valleys, th, tol)
  tol = tol or 1e-9
  local boundary, edge
  for k, v in ipairs(valleys) do
    if v.type == "strip" then goto next_valley end
    do
      local width = v.to - v.from
      local t2 = math.max(tol, 1e-6)
      -- the angle past the sector's start, in [0, 2 pi)
      local d = (th - v.from) % (2 * pi)
      if v.type == "edge" or v.type == "line" then
        if d <= t2 or d >= 2 * pi - t2 then edge = edge or k end
      elseif width >= 2 * pi - tol or (d > tol and d < width - tol) then
        return k, false
      elseif d <= t2 or d >= 2 * pi - t2 or abs(d - width) <= t2 then
        boundary = boundary or k
      end
    end
    ::next_valley::
  end
  -- an end on the edge of a sector belongs to that sector: where the integrand still
  -- decays along the edge (an "edge" valley) the end swings into the sector across an
  -- arc on which it decays, so both name the same end (Jordan's lemma)
  if boundary then return boundary, edge == nil end
  if edge then return edge, false end
  return nil
end

--- The strip instance m of a strip family in L's valley list (added when first met):
-- its index.
local function strip_valley(L, family, m)
  for k, v in ipairs(L.valleys) do
    if v.family == family and v.m == m then return k end
  end
  local w = family.hi - family.lo
  L.valleys[#L.valleys + 1] = { type = "strip", family = family, m = m,
    direction = family.direction, from = family.direction, to = family.direction,
    lo = family.lo + m * family.period, hi = family.lo + m * family.period + w,
    mid = family.lo + m * family.period + 0.5 * w, exact = true }
  return #L.valleys
end

-- The strip family whose direction is th (within tol), if any.
local function family_at(L, th, tol)
  for _, f in ipairs(L.strip_families or {}) do
    if abs(norm_angle(th - f.direction)) <= (tol or 1e-9) then return f end
  end
end

--- ray_valley(L, a, th) -> index, boundary: the valley in which the ray from a in
-- direction th ends (a sector: by th alone; a strip: the one holding the ray's line),
-- and whether the ray runs along the valley's edge; nil when it ends in none.
function M.ray_valley(L, a, th, tol)
  local k, boundary = M.valley_of(L.valleys, th)
  if k then return k, boundary end
  if tol then
    -- (a contour end on the edge of a valley whose edge moved a little: the phase of the
    -- exponent turned on a Stokes line) the nearest sector edge within tol
    local best, bk = tol, nil
    for j, v in ipairs(L.valleys) do
      if v.type ~= "strip" then
        for _, e in ipairs({ v.from, v.to }) do
          local d = abs(norm_angle(th - e))
          if d <= best then best, bk = d, j end
        end
      end
    end
    if bk then return bk, true end
  end
  local f = family_at(L, th)
  if not f then return nil end
  local y = infinity.strip_coords(a, f.direction)
  local m, inside, edge = infinity.strip_instance(f, y)
  if inside then return strip_valley(L, f, m), false end
  if edge then return strip_valley(L, f, m), true end
  return nil
end

--- point_valley(L, z, tol) -> index or nil: the valley a far point z of a descent path
-- has reached: a sector by its direction from the region's center, else the strip whose
-- direction is nearest and which holds z.
function M.point_valley(L, z, tol)
  local th = carg(z - L.region.center)
  local k = M.valley_of(L.valleys, th, tol)
  if k and L.valleys[k].type ~= "strip" then return k end
  local best, bf = huge, nil
  for _, f in ipairs(L.strip_families or {}) do
    local d = abs(norm_angle(th - f.direction))
    if d < best then best, bf = d, f end
  end
  if bf and best < pi / 2 then
    local y, s = infinity.strip_coords(z, bf.direction)
    if s > 0 then
      local m, inside = infinity.strip_instance(bf, y)
      if inside then return strip_valley(L, bf, m) end
    end
  end
  return nil
end

--- A point deep in valley k, seen from the region (for closing cycles): the middle of a
-- sector at radius Rref, or far along the middle line of a strip.
function M.valley_point(L, k, Rref)
  local v = L.valleys[k]
  if v.type == "strip" then
    return (cnew(Rref, v.mid)) * expi(v.direction)
  end
  local mid = (v.from == v.to) and v.from or 0.5 * (v.from + v.to)
  return L.region.center + Rref * expi(mid)
end

function M.describe_valley(v)
  if v.type == "strip" then
    local th = v.direction
    if abs(th) < 1e-12 then
      return format("strip %.4g < Im t < %.4g to the right", v.lo, v.hi)
    elseif abs(abs(th) - pi) < 1e-12 then
      return format("strip %.4g < Im t < %.4g to the left", -v.hi, -v.lo)
    end
    return format("strip toward direction %.4g, offset %.4g..%.4g", th, v.lo, v.hi)
  end
  if v.from == v.to then
    return format("direction %.4g (%s)", v.from, v.type)
  end
  return format("(%.4g, %.4g) (%s)", v.from, v.to, v.type)
end

---------------------------------------------------------------------------------------
-- Saddles.
---------------------------------------------------------------------------------------

--- saddles(J, params, region, singularities, seeds) -> list of {at, order, F, F2,
-- coef (leading coefficient of F - F0), g}, info
function M.saddles(J, params, region, singularities, seeds, seeds_only)
  -- poles of F' inside: a log point is a simple pole of F'; an essential singularity
  -- (a pole of F of order k) gives k + 1; a branch point of F makes F' non-meromorphic.
  local poles = 0
  for _, s in ipairs(singularities) do
    if cabs(s.at - region.center) < region.radius then
      if s.kind == "sink" or s.kind == "hill" or (s.coefficient and s.kind == "pole") then
        poles = poles + 1
      elseif s.kind == "branch" then
        local of_exponent = false
        for _, src in ipairs(s.sources) do if src:find("in the exponent") then of_exponent = true end end
        if of_exponent then poles = false; break end
      elseif s.kind == "essential" and s.pole_order then
        poles = poles + s.pole_order + 1   -- F ~ c (t - p)^-k: F' has a pole of order k + 1
      elseif s.kind == "essential" then
        poles = false   -- the order of F's pole is not known: no count
        break
      end
    end
  end
  -- saddles crowd next to singular points (where F' is large and Newton from a grid
  -- overshoots): seeds on small rings about each one, at fractions of the distance to
  -- its nearest neighbour
  local all_seeds = {}
  for _, z in ipairs(seeds or {}) do all_seeds[#all_seeds + 1] = z end
  if not seeds_only then
    for i, s in ipairs(singularities) do
      local near = region.radius
      for j, o in ipairs(singularities) do
        if j ~= i then near = math.min(near, cabs(o.at - s.at)) end
      end
      for _, f in ipairs({ 1e-3, 4e-3, 0.015, 0.05, 0.15, 0.4 }) do
        for k = 0, 7 do all_seeds[#all_seeds + 1] = s.at + f * near * expi(2 * pi * (k + 0.5) / 8) end
      end
    end
  end
  local zs, info = M.zeros(J.tape, params, { out = 1, deriv = 1 }, region,
    { poles = poles, seeds = all_seeds, seeds_only = seeds_only })
  local out = {}
  for _, z in ipairs(zs) do out[#out + 1] = M.saddle_at(J, params, z.at, z.mult) end
  return out, info
end

--- A saddle record at the zero z of F' of multiplicity mult (order mult + 1). Its width is
-- the length over which F changes by about 1: |c_m|^(-1/m) from the leading coefficient,
-- or less where the next two terms take over sooner (two saddles 2e-4 apart in a quartic:
-- c_2 ~ 1e-8 alone would call the saddle 1e4 wide where the integrand's scale is 1).
local function saddle_at(J, params, z, mult)
  local m = mult + 1
  -- the exponent's jet alone: the amplitude may be singular at a saddle
  local Fs = J.tape:jet(z, m + 2, params, 1)
  local _, gv = J.tape:eval(z, params)
  local coef = Fs:coef(m)
  local width = cabs(coef) ^ (-1 / m)
  for k = m + 1, m + 2 do
    local ck = cabs(Fs:coef(k))
    if ck > 0 then width = math.min(width, ck ^ (-1 / k)) end
  end
  return { at = z, order = m, F = Fs:coef(0), F2 = 2 * Fs:coef(2), coef = coef,
    g = gv or cnew(1, 0), width = width }
end
M.saddle_at = saddle_at

--- polynomial_saddles(J, params, A) -> every saddle of a polynomial exponent (A from
-- M.analysis): the d - 1 zeros of F' with multiplicity, all of them wherever they lie
-- (Aberth's iteration, then Newton on the tape with the multiplicity read from the
-- jet), and info {count, found, status, bound}.
function M.polynomial_saddles(J, params, A)
  local c, d = A.polynomial, A.degree
  local out, info = {}, { count = d - 1, found = 0, evals = 0 }
  if d < 2 then info.status = "complete"; info.bound = 0; return out, info end
  local dc = {}
  for k = 1, d do dc[k - 1] = k * c[k] end
  local roots, bound = M.poly_roots(dc, d - 1)
  info.bound = bound
  -- (all zeros at 0 give no bound: the unit length then tells zeros apart)
  local scale = bound > 0 and bound or 1
  local found = {}
  for _, r in ipairs(roots) do
    -- polish on the tape (the multiplicity from the jet: clustered roots of a multiple
    -- zero come out as one); R: a disc that surely holds the root
    local R = 2 * math.max(cabs(r), scale) + scale
    local st, root, mult, ev = core.zero(J.tape, params, { out = 1, deriv = 1 }, r, cnew(0, 0),
      R, 1e-3 * scale, 60)
    info.evals = info.evals + ev
    if st ~= "ok" then root = r end
    -- Aberth's iterates of a zero of multiplicity m are m points that polish to one: the
    -- multiplicity is how many met there (the jet's own count can fail beyond 8)
    local dup = false
    for _, f in ipairs(found) do
      if cabs(f.at - root) <= 1e-7 * scale then f.mult = f.mult + 1; dup = true; break end
    end
    if not dup then found[#found + 1] = { at = root, mult = 1 } end
  end
  local total = 0
  for _, f in ipairs(found) do total = total + f.mult end
  table.sort(found, function(a, b)
    local da, db = cabs(a.at), cabs(b.at)
    if abs(da - db) > 1e-9 * scale then return da < db end
    return carg(a.at) < carg(b.at)
  end)
  for _, f in ipairs(found) do out[#out + 1] = saddle_at(J, params, f.at, f.mult) end
  info.found = total
  info.status = total == d - 1 and "complete"
    or format("mismatch: F' has degree %d, %d zeros found", d - 1, total)
  info.method = "every zero of the polynomial F'"
  return out, info
end

---------------------------------------------------------------------------------------
-- Steepest paths.
---------------------------------------------------------------------------------------

-- Each saddle's distance to its nearest other saddle (huge for a lone one), kept with the
-- landscape: read for every path traced, it would otherwise cost (saddles)^2 complex
-- subtractions each time (the parts are read directly: the same numbers).
local function nearest_saddle(L)
  local kept = L._nearest_saddle
  if kept and kept.saddles == L.saddles and kept.n == #L.saddles then return kept.d end
  local n, re, im, d = #L.saddles, {}, {}, {}
  for j, s in ipairs(L.saddles) do re[j], im[j] = cparts(s.at) end
  for j = 1, n do
    local m = huge
    for k = 1, n do
      if k ~= j then m = math.min(m, hypot(re[k] - re[j], im[k] - im[j])) end
    end
    d[j] = m
  end
  L._nearest_saddle = { saddles = L.saddles, n = n, d = d }
  return d
end

-- Stop points for tracing: singularities of the exponent (paths end there), branch
-- points of the amplitude on descent paths (quadrature must not cross their cuts), and
-- saddles (a path that reaches another saddle is a saddle connection). Poles of the
-- amplitude do not bend the paths of F: they are not stops.
-- Kept with the landscape, per kind of path, all saddles included (a saddle's own paths
-- leave it out by index): {points = cvec, radii, what, saddle = saddle index -> stop index}.
local function stop_points(L, descent)
  local R = L.region.radius
  L._stops = L._stops or {}
  local kept = L._stops[descent and 1 or 2]
  if kept and kept.R == R then return kept end
  local stops, radii, what, saddle = {}, {}, {}, {}
  local near = nearest_saddle(L)
  for j, s in ipairs(L.singularities) do
    local of_exponent = s.source:find("in the exponent", 1, true) ~= nil
    if of_exponent or (descent and s.kind == "branch") then
      stops[#stops + 1], radii[#radii + 1], what[#what + 1] = s.at, 1e-7 * R, { "singularity", j }
    end
  end
  for j, s in ipairs(L.saddles) do
    -- (a twentieth of its width at most: a path that passes that close to a saddle has
    -- Im F within about 1e-3 of the saddle's: a connection, to the rounding of F)
    -- (and well inside the distance to its nearest neighbour, which the first step
    -- off that neighbour stays inside: saddles closer than their widths stay apart)
    local r = math.min(1e-4 * R, 0.05 * (s.width or huge), 0.05 * near[j])
    stops[#stops + 1], radii[#radii + 1], what[#what + 1] = s.at, r, { "saddle", j }
    saddle[j] = #stops
  end
  kept = { R = R, points = core.cvec(stops), radii = radii, what = what, saddle = saddle }
  L._stops[descent and 1 or 2] = kept
  return kept
end

local function cvec_list(v) return v:totable() end

-- What a trace ended at, in words the decomposition compares: "valley k", "hill",
-- "sink k" (a log point where the integrand vanishes), "singularity k", "saddle k",
-- "edge", "bound", "flat".
-- A descent path that ends at an essential singularity from inside one of its valley
-- sectors: "essential j:k" (or nil).
local function essential_end(L, last)
  for j, s in ipairs(L.singularities) do
    if s.kind == "essential" and s.sectors then
      local d = cabs(last - s.at)
      local near = huge
      for i, o in ipairs(L.singularities) do
        if i ~= j then near = math.min(near, cabs(o.at - s.at)) end
      end
      for _, o in ipairs(L.saddles) do near = math.min(near, cabs(o.at - s.at)) end
      if d < 0.05 * math.min(near, L.region.radius) then
        local k = M.essential_sector(s, carg(last - s.at))
        if k then return format("essential %d:%d", j, k) end
      end
    end
  end
end

local function end_label(L, descent, reason, which, what, last)
  if descent and (reason == "stop" or reason == "singular" or reason == "low") then
    local e = essential_end(L, last)
    if e then return e end
  end
  if reason == "stop" then
    local w = what[which]
    if w[1] == "singularity" then
      local s = L.singularities[w[2]]
      if s.kind == "sink" then return "sink " .. w[2] end
      return "singularity " .. w[2]
    end
    return "saddle " .. w[2]
  end
  -- (the coarse continuation ends "low" where the integrand underflows altogether: far
  -- out in a valley)
  if reason == "edge" or (reason == "low" and descent) then
    if not descent then return "hill" end
    local k = M.point_valley(L, last, 0.02)
    return k and ("valley " .. k) or "edge"
  end
  if reason == "singular" then
    local best, bj = huge, nil
    for j, s in ipairs(L.singularities) do
      local d = cabs(s.at - last)
      if d < best then best, bj = d, j end
    end
    if bj and best < 1e-3 * L.region.radius then
      return L.singularities[bj].kind == "sink" and ("sink " .. bj) or ("singularity " .. bj)
    end
    return "singular"
  end
  return reason
end

--- may_jump(J) -> whether J's exponent has a branch cut (a log, root, non-integer power or
-- atan in it), across which its principal value jumps.
function M.may_jump(J)
  for _, c in ipairs(J.critical) do
    if c.where == "exponent" and (c.what == "log" or c.what == "root" or c.what == "power"
        or c.what == "atan") then
      return true
    end
  end
  return false
end

--- trace(J, params, L, start, level, descent, opts) -> path
-- path = {points = list (for quadrature: up to where the integrand is negligible),
--         traced, F = cvecs of the traced points and of F followed along them,
--         tail = cvec (followed on, coarsely, to classify the end), ends = label,
--         reason = why phase one stopped, evals}
function M.trace(J, params, L, start, level, descent, opts)
  opts = opts or {}
  local R = L.region.radius
  -- the stops but the saddle whose paths these are; a path that starts at a stop point
  -- (an endpoint on a branch point) must leave it: core.trace leaves out the stops within
  -- twice their radius of `near`, and names a stop by its index in the whole list
  local st = stop_points(L, descent)
  local stops, radii, what = st.points, st.radii, st.what
  local skip = opts.skip_saddle and st.saddle[opts.skip_saddle]
  -- (F single-valued: no log, root or non-integer power in it, so its change over a step
  -- need not be checked for a branch jump)
  local jumps = M.may_jump(J)
  local ref = opts.ref or cparts(level)
  -- the length steps start from: the region's, or the start's own (a saddle's width, an
  -- endpoint's 1/|F'|) where that is smaller
  local scale = math.min(R / 10, opts.scale or huge)
  local pts, Fs, reason, which, evals = core.trace(J.tape, params, start, level, {
    descent = descent, cutoff = opts.cutoff or 50, ref = ref, center = L.region.center,
    radius = 1000 * R, scale = scale, maxsteps = 6000, maxpts = 6000,
    stops = stops, stop_r = radii, skip = skip, near = start, jumps = jumps })
  -- points as a list (quadrature pieces, maps); the traced points and the values of F
  -- followed by continuity along them stay in C (cvecs) for the branch check
  local path = { points = cvec_list(pts), traced = pts, F = Fs, reason = reason, evals = evals,
    level = level, descent = descent }
  if #path.points == 0 then
    -- F or F' is not finite at the start itself (a log point of the exponent, say)
    path.points, path.tail, path.ends, path.tail_reason = { start }, core.cvec {}, "singular",
      reason
    return path
  end
  local last = path.points[#path.points]
  local tail_reason, tail_which = reason, which
  path.tail = core.cvec {}   -- the coarse continuation (a cvec), to classify the end
  if reason == "low" or reason == "high" or reason == "edge" then
    -- follow on coarsely, well outside the region, to see where it goes
    local far = math.max(8 * R, 2 * cabs(last - L.region.center))
    local tp, _, r2, w2, ev2 = core.trace(J.tape, params, last, Fs:get(#Fs), {
      descent = descent, coarse = true, cutoff = 1e300, ref = -1e300,
      center = L.region.center, radius = far, scale = scale, maxsteps = 3000,
      maxpts = 3000, stops = stops, stop_r = radii, skip = skip, near = start, jumps = jumps })
    path.tail = tp
    path.evals = path.evals + ev2
    tail_reason, tail_which = r2, w2
    if #tp > 0 then last = tp:get(#tp) end
  end
  path.ends = end_label(L, descent, tail_reason, tail_which, what, last)
  path.tail_reason = tail_reason
  -- a descent path stopped next to a sink: run it into the sink itself, so that quadrature
  -- covers the last stretch (as t^c there; it matters when Re c is small)
  local sj = reason == "stop" and path.ends:match("^sink (%d+)$")
  if sj then path.points[#path.points + 1] = L.singularities[tonumber(sj)].at end
  return path
end

--- saddle_paths(J, params, L, j) -> {descent = {p1, p2, ...}, ascent = {...}} for saddle j:
-- the m descent and m ascent paths out of a saddle of order m, in the order of
-- core.saddle_starts (angles increasing). The ascent paths are traced when first read
-- (the decomposition often needs only the descent paths' ends).
function M.saddle_paths(J, params, L, j)
  local s = L.saddles[j]
  if s.order > 8 then
    error(format("a saddle of order %d at %s: orders above 8 are not supported", s.order,
      tostring(s.at)), 0)
  end
  local R = L.region.radius
  local gm = cabs(s.g)
  -- (an amplitude that vanishes or blows up at the saddle itself: measure from F alone)
  local ref = cparts(s.F) + ((gm > 0 and gm < huge) and log(gm) or 0)
  -- the first step off the saddle stays well inside the distance to the nearest other
  -- saddle or singular point (two saddles close together: a longer one lands past the
  -- other saddle, on a path to the wrong valley)
  local width = math.min(R / 10, s.width or huge)
  local step = math.min(width, nearest_saddle(L)[j] / 8)
  -- (singular points of the exponent only: an amplitude's pole does not bend the paths,
  -- and one at the saddle itself would leave no room at all)
  for _, o in ipairs(L.singularities or {}) do
    if o.source:find("in the exponent", 1, true) then
      step = math.min(step, cabs(o.at - s.at) / 8)
    end
  end
  local function traced(descent)
    local out = {}
    local starts = core.saddle_starts(J.tape, params, s.at, s.F, s.order, s.coef, descent,
      step)
    for k, st in ipairs(starts) do
      local p = M.trace(J, params, L, st, s.F, descent, { skip_saddle = j, ref = ref,
        scale = width })
      table.insert(p.points, 1, s.at)
      out[k] = p
    end
    return out
  end
  return setmetatable({ descent = traced(true) }, { __index = function(t, key)
    if key ~= "ascent" then return nil end
    local a = traced(false)
    rawset(t, "ascent", a)
    return a
  end })
end

M.norm_angle = norm_angle
M.cabs, M.carg, M.expi = cabs, carg, expi
return M
