-- steep.decompose — the given contour rewritten as an integer combination of steepest
-- descent paths (through saddles and from finite endpoints) plus residues of the poles
-- that the deformation sweeps over.
--
-- Weights come from intersection numbers: the weight of a simple saddle is the signed
-- number of crossings of the contour with the saddle's steepest ascent path, oriented so
-- that its own descent path meets it with +1 (Picard-Lefschetz theory; e.g. Witten,
-- "Analytic continuation of Chern-Simons theory", 2010, sec. 3; Berry & Howls, Proc. R.
-- Soc. A 434 (1991) 657-675). A descent path from an endpoint has constant Im F equal to
-- Im F there, so it meets no ascent path of a saddle at another level: the weights are
-- unchanged by adding the endpoint paths. The combination must end where the contour
-- does; where that condition has a single integer solution (the saddles' descent paths
-- join independent sets of valleys), it gives the weights without the ascent paths.
-- What remains between the contour and the combination is a closed cycle; its winding
-- number about each pole gives the residue term, and it must not wind about a branch
-- point or an essential singularity.

local core = require "steep.core"
local complex = require "steep.complex"
local landscape = require "steep.landscape"
local contour_m = require "steep.contour"
local infinity = require "steep.infinity"
local strips = require "steep.strips"
local periodic = require "steep.periodic"

local cnew, cparts = complex.new, complex.parts
local cabs, carg, expi = landscape.cabs, landscape.carg, landscape.expi
local format, pi, abs, floor, huge = string.format, math.pi, math.abs, math.floor, math.huge

local M = {}
local saddle_under, stokes_rule

-- A path's full polyline (a cvec): the part used for quadrature followed by the coarse
-- tail.
local function full(path) return core.cvec_join(path.points, path.tail) end

--- The valleys in words, for messages: the list and the strip families.
function M.valleys_text(L)
  local vs = {}
  for _, v in ipairs(L.valleys) do
    if v.type ~= "strip" then vs[#vs + 1] = landscape.describe_valley(v) end
  end
  for _, f in ipairs(L.strip_families or {}) do
    local th = f.direction
    local where = abs(th) < 1e-12 and "to the right, Im t in"
      or abs(abs(th) - pi) < 1e-12 and "to the left, -Im t in"
      or format("toward direction %.4g, offset in", th)
    vs[#vs + 1] = format("strips %s (%.4g, %.4g) + k*%.4g", where, f.lo, f.hi, f.period)
  end
  return #vs > 0 and table.concat(vs, "; ") or "none"
end

--- The label of a contour end: a finite point (nil), a sink, or a valley; for an end at
-- infinity the ray that reaches it starts at `from`.
local function contour_end_label(L, e, which, from, tol)
  if contour_m.is_inf(e) then
    local k, boundary = landscape.ray_valley(L, from or e.through or cnew(0, 0), e.angle, tol)
    if not k then
      error(strips.wrong_end(L, which, from or e.through or cnew(0, 0), e.angle) or format("the contour's %s end at infinity (the ray from %s in direction %.6g) is "
        .. "outside every valley: the integral diverges there (valleys: %s)", which,
        tostring(from or e.through or 0), e.angle, M.valleys_text(L)), 0)
    end
    -- on a valley's edge the integrand does not decay exponentially: it may not be
    -- integrable there at all (t^2 e^{i t^3}, e^{i x t}): the value is then the one the
    -- deformation into the valley continues to (Abel's sense), and the plan says so
    local abel, decays
    if boundary and L.analysis then
      -- (on the edge, the other terms may still make it decay: e^{i x cosh t - p t^2})
      local _, cl = L.analysis.converges(e.angle)
      decays = cl.class == "valley"
    end
    if boundary and not tol and L.analysis and L.valleys[k].type ~= "strip" then
      local ok, cl = L.analysis.converges(e.angle)
      if not ok and cl.class ~= "unknown" then
        local size = cl.class == "hill" and format("|integrand| grows like e^(c r^%g), c > 0",
          cl.degree or 1) or format("|integrand| ~ r^%g", cl.kappa or 0)
        abel = format("the contour's %s end (direction %.6g) runs along the edge of a valley "
          .. "where the integrand does not decay (%s): the integral exists there only in "
          .. "Abel's sense, the value continued by turning the end into the valley", which,
          e.angle, size)
      end
    end
    return "valley " .. k, boundary and not decays, abel
  end
  for j, s in ipairs(L.singularities) do
    if s.kind == "sink" and cabs(s.at - e) <= 1e-9 * L.region.radius then return "sink " .. j end
  end
  return nil
end

--- The distance below which a singular point p counts as lying on a contour: 1e-9 of the
-- length over which the integrand changes near p (the nearest saddle's distance plus its
-- width, 1/|F'(p)|, the region's radius: a Gaussian of width 1e-8 with a pole 1e-9 off the
-- line is not a pole on it), and no less than p's own rounding.
function M.on_contour_tolerance(J, params, L, p)
  local scale = L.region.radius
  for _, sd in ipairs(L.saddles or {}) do
    if sd.width and sd.width < huge then scale = math.min(scale, cabs(p - sd.at) + sd.width) end
  end
  if J and params then
    local ok, Fs = pcall(J.tape.jet, J.tape, p, 1, params, 1)
    local d = ok and cabs(Fs:coef(1)) or 0
    if d > 0 and d < huge then scale = math.min(scale, 1 / d) end
  end
  return math.max(1e-9 * scale, 1e-13 * cabs(p))
end

--- Checks that no singularity lies on the contour (except integrable ones at its ends).
function M.check_contour(L, contour, pts, J, params, finite_part)
  local R = L.region.radius
  for _, s in ipairs(L.singularities) do
    local d = core.distance(pts, s.at)
    if d <= 1e-9 * R and d <= M.on_contour_tolerance(J, params, L, s.at) then
      local at_end = false
      if not contour.closed then
        for _, e in ipairs({ contour:start(), contour:finish() }) do
          if not contour_m.is_inf(e) and cabs(e - s.at) <= 1e-9 * R then at_end = true end
        end
      end
      -- allowed: a sink where the integrand is single-valued (it just vanishes there),
      -- and at an end a branch point or a log point whose power is integrable
      local integrable_end = at_end and (s.kind == "sink" or s.kind == "branch"
        or (s.kind == "hill" and (s.power or s.coefficient)
          and cparts(s.power or s.coefficient) > -1))
      local harmless = s.kind == "sink" and not s.branch
      if not (integrable_end or harmless) then
        error(format("a %s of the integrand lies on the contour at %s (%s)", s.kind,
          tostring(s.at), s.source), 0)
      end
      -- a branch point of the amplitude at an end: its power must be integrable
      if at_end and s.kind == "branch" and J and not finite_part then
        local fac = require("steep.expand").endpoint_factors(J, params, s.at)
        if fac and fac.pbase and fac.beta <= -1 then
          error(format("the integrand behaves like (t - %s)^%g at the contour's end %s: not "
            .. "integrable there (a power <= -1); the integral diverges", tostring(s.at),
            fac.beta, tostring(s.at)), 0)
        end
      end
    end
  end
end

-- The closure from a far end point z to valley k's reference point, as two polylines:
-- radially out to radius Rref, then along the arc inside the valley (a steep.cvec).
local function closure_to_valley(L, z, k, Rref, ref_dir)
  local v = L.valleys[k]
  if v.type == "strip" then
    -- across to the strip's middle line, then along it to the reference point
    local y, s = infinity.strip_coords(z - 0, v.direction)
    local _ = y
    local on_mid = cnew(s, v.mid) * expi(v.direction)
    return { { z, on_mid, landscape.valley_point(L, k, Rref) } }
  end
  local mid = (v.type == "edge" or v.type == "line") and v.from or 0.5 * (v.from + v.to)
  local c = L.region.center
  local th = carg(z - c)
  if ref_dir then
    -- a valley all around (algebraic decay everywhere): the shorter arc to a reference
    -- direction chosen where the ends are, so that the cycle does not go round the
    -- whole plane (that would ask for every finite singular point's residue)
    mid = ref_dir
    while th < mid - pi do th = th + 2 * pi end
    while th > mid + pi do th = th - 2 * pi end
  else
    -- the turn of th nearest the valley's middle (an end on the valley's edge at -pi/2
    -- must meet the valley (pi/2, 3pi/2) at 3pi/2, not go round through 0)
    th = mid + landscape.norm_angle(th - mid)
  end
  return { { z, c + Rref * expi(th) }, core.cvec_arc(c, Rref, th, mid, 64) }
end

-- The contour as a polyline out to radius R (64 pieces per segment or ray): kept per
-- contour, since a sweep decomposes the same contour at every step in the same region.
local samples = setmetatable({}, { __mode = "k" })
local function sampled(contour, R)
  local kept = samples[contour]
  if not (kept and kept.radius == R) then
    local pts = contour:sample { radius = R, n = 64 }
    kept = { radius = R, points = pts, cvec = core.cvec(pts) }
    samples[contour] = kept
  end
  return kept.points, kept.cvec
end

--- If the contour passes through z (not at an end): its incoming and outgoing directions
-- there, {din =, dout =}; else nil.
function M.passes_through(contour, z, R)
  local tol = 1e-9 * R
  local pieces = contour.pieces
  local function dir_of(p)
    if p.kind == "segment" then return carg(p.b - p.a) end
    if p.kind == "ray_out" then return p.angle end
    if p.kind == "ray_in" then return p.angle + pi end
  end
  for i, p in ipairs(pieces) do
    if p.kind == "arc" then
      local d = cabs(z - p.center)
      if abs(d - p.radius) <= tol then
        local sign = p.to > p.from and 1 or -1
        local th = carg(z - p.center) + sign * pi / 2
        return { din = th, dout = th }
      end
    else
      -- interior of the piece
      local a = p.a or p.b
      local dir = expi(dir_of(p))
      local rel = (z - a) / dir
      local along, off = cparts(rel)
      local len = p.kind == "segment" and cabs(p.b - p.a) or huge
      if p.kind == "ray_in" then along = -along end
      if abs(off) <= tol and along > tol and along < len - tol then
        return { din = dir_of(p), dout = dir_of(p) }
      end
      -- a vertex between this piece and the next
      local nextp = pieces[i + 1]
      local finish = p.kind == "segment" and p.b or (p.kind == "ray_in" and p.b) or nil
      if nextp and finish and cabs(finish - z) <= tol then
        return { din = dir_of(p), dout = dir_of(nextp) }
      end
    end
  end
  return nil
end

-- The weights of the saddles `free` from the ends alone, or nil. The contour is an
-- integer combination of descent rays (sum c_k = 0 per saddle) whose ends must cancel
-- `boundary` (the contour's ends less the endpoint paths) together with the rays of the
-- saddles already weighted (`fixed`). When the ends of the free saddles' combinations are
-- linearly independent (no combination of them is closed) that linear system has at most
-- one solution; if it has an integer one, those are the weights (the crossing numbers
-- with the ascent paths would give the same). Rays that end anywhere but a valley or a
-- sink make it give up.
local function solve_by_ends(L, boundary, fixed, free)
  if #free == 0 then return {} end
  local target = {}   -- label -> what the free rays must take away
  for label, n in pairs(boundary) do target[label] = n end
  for j, w in pairs(fixed) do
    for k, c in ipairs(w) do
      local e = L.paths[j].descent[k].ends
      target[e] = (target[e] or 0) - c
    end
  end
  -- unknowns: c_(j,k) for k < m, with c_(j,m) = -(the others)
  local cols = {}
  for _, j in ipairs(free) do
    local d = L.paths[j].descent
    for k = 1, #d do
      if not (d[k].ends:match("^valley %d+$") or d[k].ends:match("^sink %d+$")
          or d[k].ends:match("^essential ")) then return nil end
    end
    for k = 1, #d - 1 do cols[#cols + 1] = { j = j, k = k, plus = d[#d].ends, minus = d[k].ends } end
  end
  -- rows: labels; equations: sum_col u_col (e(plus) - e(minus)) = -target... i.e. the
  -- free rays remove target: ray (j,k) with weight c bumps its end by -c
  local rows, index = {}, {}
  local function row(label)
    if not index[label] then rows[#rows + 1] = label; index[label] = #rows end
    return index[label]
  end
  for label in pairs(target) do row(label) end
  for _, c in ipairs(cols) do row(c.plus); row(c.minus) end
  table.sort(rows)
  for i, label in ipairs(rows) do index[label] = i end
  local nr, nc = #rows, #cols
  if nc > nr then return nil end
  local A = {}
  for i = 1, nr do
    A[i] = {}
    for c = 1, nc + 1 do A[i][c] = 0 end
    A[i][nc + 1] = target[rows[i]] or 0
  end
  -- ray (j,k), k < m, with weight u: boundary[minus] -= u; ray m with -u: boundary[plus] += u;
  -- the ends cancel when sum_u u (e(minus) - e(plus)) = target
  for c, col in ipairs(cols) do
    A[index[col.minus]][c] = A[index[col.minus]][c] + 1
    A[index[col.plus]][c] = A[index[col.plus]][c] - 1
  end
  -- Gaussian elimination with partial pivoting on a copy; full column rank required
  local M2 = {}
  for i = 1, nr do M2[i] = table.move(A[i], 1, nc + 1, 1, {}) end
  local piv_rows = {}
  local r = 1
  for c = 1, nc do
    local best, bi = 0, nil
    for i = r, nr do if abs(M2[i][c]) > best then best, bi = abs(M2[i][c]), i end end
    if not bi or best < 1e-9 then return nil end   -- dependent: not decided by the ends
    M2[r], M2[bi] = M2[bi], M2[r]
    for i = 1, nr do
      if i ~= r and M2[i][c] ~= 0 then
        local f = M2[i][c] / M2[r][c]
        for cc = c, nc + 1 do M2[i][cc] = M2[i][cc] - f * M2[r][cc] end
      end
    end
    piv_rows[c] = r
    r = r + 1
  end
  local u = {}
  for c = 1, nc do
    local v = M2[piv_rows[c]][nc + 1] / M2[piv_rows[c]][c]
    u[c] = floor(v + 0.5)
    if abs(v - u[c]) > 1e-9 then return nil end
  end
  -- the integer solution must satisfy every equation exactly (the system may be
  -- inconsistent: then the ends cannot be matched at all, and the crossings say why)
  for i = 1, nr do
    local sum = 0
    for c = 1, nc do sum = sum + A[i][c] * u[c] end
    if sum ~= A[i][nc + 1] then return nil end
  end
  local out = {}
  for c, col in ipairs(cols) do
    local w = out[col.j]
    if not w then
      w = {}
      for k = 1, #L.paths[col.j].descent do w[k] = 0 end
      out[col.j] = w
    end
    w[col.k] = u[c]
    local m = #w
    w[m] = w[m] - u[c]
  end
  return out
end

-- The largest log |g e^F| among the saddles (the level the result is measured against).
local function top_level(L)
  local top = -huge
  for _, s in ipairs(L.saddles) do
    local gm = cabs(s.g)
    top = math.max(top, cparts(s.F) + (gm > 0 and math.log(gm) or -huge))
  end
  return top
end

--- An endpoint whose integrand is below what doubles hold, next to the largest saddle
-- (or where |F| is so large that Im F cannot be followed to the rounding of F): its
-- steepest path contributes nothing a double can show, and only the valley it ends in
-- matters. That is read from a straight ray in the steepest descent direction, which
-- must end in a valley; else nil (trace it).
function M.negligible_end(J, params, L, point, ref, d1)
  if not complex.is(d1) or not (cabs(d1) > 0) then return nil end
  local F = J.tape:eval(point, params)
  local tiny = ref < top_level(L) - 745 or ref < -745
  if not (tiny or cabs(F) > 1e13) then return nil end
  if ref > -745 and ref >= top_level(L) - 745 then return nil end
  local dir = -complex.new(cparts(d1)):conj()
  dir = dir / cabs(dir)
  local far = point + dir * (8 * L.region.radius + 2 * cabs(point - L.region.center))
  local k = landscape.point_valley(L, far, 0.02)
  if not k then return nil end
  local pts = core.cvec { point, far }
  return { points = { point, far }, traced = pts, F = core.cvec { F, F }, reason = "low",
    tail = core.cvec {}, ends = "valley " .. k, evals = 0, straight = true }
end

-- The Stokes rule: weights (all 0) for every saddle in `sources` when each has weight 0
-- (its own ascent paths, which run into no saddle, cross the sampled contour `cvec` to a
-- net 0 between every pair of descent rays; a weight fixed already must be 0), else nil.
stokes_rule = function(L, cvec, sources, fixed)
  local out = {}
  for _, j in ipairs(sources) do
    local m = L.saddles[j].order
    if fixed[j] then
      for _, c in ipairs(fixed[j]) do if c ~= 0 then return nil end end
      out[j] = fixed[j]
    else
      local asc = L.paths[j].ascent
      local n = {}
      for k, a in ipairs(asc) do
        if a.ends:match("^saddle") then return nil end
        n[k] = core.crossings(cvec, core.cvec_join(a.points, a.tail))
      end
      local w = {}
      for k = 1, m do
        w[k] = n[k % m + 1] - n[k]
        if w[k] ~= 0 then return nil end
      end
      out[j] = w
    end
  end
  return out
end

-- The saddle (index) whose rays in the plan start at z, and the direction the
-- combined path leaves it in (along the ray of positive weight), or nil.
saddle_under = function(plan, L, z)
  for _, p in ipairs(plan.pieces) do
    if p.kind == "saddle" and p.weight > 0 then
      local s = L.saddles[p.index]
      if cabs(s.at - z) <= 1e-9 * math.max(s.width or 0, 1e-300) + 1e-13 * math.max(1, cabs(z)) then
        local d = p.points[2] - s.at
        return p.index, d / cabs(d), p.ray
      end
    end
  end
end

---------------------------------------------------------------------------------------
-- Stokes lines.
---------------------------------------------------------------------------------------

-- The name of the hidden parameter that turns the exponent's phase (F -> e^{i eps} F).
local PHASE = "steep_phase__"
local renumber_rays

-- The integral with exponent e^{i eps} F (the phase a parameter), built once per integral.
local function turned(J)
  if not J._turned then
    local expr = require "steep.expr"
    local rho = expr.symbol("param", PHASE)
    local F = J.exponent * rho
    local K = setmetatable({ exponent = F, tape = expr.compile({ F, J.amplitude }, J.var, 3),
      _acache = {}, _lcache = {} }, { __index = J })
    J._turned = K
  end
  return J._turned
end

-- The landscape of e^{i eps} F from L: the same saddles (F' vanishes where it did) with
-- their values turned, the same singular points, the valleys of the turned exponent.
local function turned_landscape(K, params, L)
  local rho = params[PHASE]
  local Lr = { region = L.region, params = params, notes = {}, singularities = L.singularities,
    saddle_count = L.saddle_count, analysis = L.analysis }
  Lr.saddles = {}
  for j, s in ipairs(L.saddles) do
    Lr.saddles[j] = { at = s.at, order = s.order, F = s.F * rho, F2 = s.F2 * rho,
      coef = s.coef * rho, g = s.g, width = s.width }
  end
  local A = L.analysis
  if A and A.polynomial and A.degree >= 1 and #(L.strip_families or {}) == 0 then
    -- a polynomial exponent: every sector and edge turns by -arg(rho)/degree (they are
    -- where Re(c_d e^{i d theta}) changes sign)
    local shift = -carg(rho) / A.degree
    Lr.valleys = {}
    for k, v in ipairs(L.valleys) do
      local c = {}
      for key, val in pairs(v) do c[key] = val end
      c.from, c.to = v.from + shift, v.to + shift
      Lr.valleys[k] = c
    end
    Lr.growth, Lr.strip_families = L.growth, {}
    return Lr
  end
  -- (the original integral's analysis with F scaled: the same walks of the expression)
  local base = {}
  for k, v in pairs(params) do if k ~= PHASE then base[k] = v end end
  local info
  Lr.valleys, info = landscape.valleys(getmetatable(K).__index, base, L.region, { rho = rho })
  Lr.growth, Lr.strip_families = info, info.families
  return Lr
end

-- The angle of descent ray k (1-based) of a saddle of order m with F - F0 ~ c h^m, as
-- core.saddle_starts numbers them (and expand.saddle_series orients its map).
local function ray_angle(c, m, k) return (pi - carg(c) + 2 * pi * (k - 1)) / m end

-- The turned exponent's rays are numbered from arg(e^{i eps} c), which may wrap past pi:
-- give each piece the number of the original ray it lies along (the expansion orients its
-- series by the original numbering).
renumber_rays = function(plan, L, Lr)
  for _, p in ipairs(plan.pieces) do
    if p.kind == "saddle" then
      local s, sr = L.saddles[p.index], Lr.saddles[p.index]
      local a = ray_angle(sr.coef, sr.order, p.ray)
      local best, bk = huge, p.ray
      for k = 1, s.order do
        local d = abs(landscape.norm_angle(ray_angle(s.coef, s.order, k) - a))
        if d < best then best, bk = d, k end
      end
      p.ray = bk
    end
  end
end

-- Weights per saddle (lists over its rays) from a plan's saddle pieces.
local function weights_of(plan, L)
  local w = {}
  for j, s in ipairs(L.saddles) do
    w[j] = {}
    for k = 1, s.order do w[j][k] = 0 end
  end
  for _, p in ipairs(plan.pieces) do
    if p.kind == "saddle" then w[p.index][p.ray] = w[p.index][p.ray] + p.weight end
  end
  return w
end

--- across_stokes_line(J, params, L, contour, notes) -> plan or nil. On a Stokes line two
-- saddles have equal Im F and a descent path of the higher runs into the lower; the
-- lower one's weight may jump there by (intersection number) x (the higher one's
-- weight). Turning the exponent's phase by +-eps keeps the saddles where they are and
-- separates them; the contour is decomposed on both sides. Equal weights: the
-- decomposition is settled (the usual case: the higher saddle's weight is 0). Different
-- weights: a genuine Stokes jump; the plan carries both sides (plan.stokes.minus) and the
-- expansion takes Berry's multiplier 1/2 on the line (M. V. Berry, Proc. R. Soc. A 422
-- (1989) 7-21). Either side's paths are an exact deformation of the contour for
-- quadrature (they end in the same valleys: the turn is far smaller than any sector).
function M.across_stokes_line(J, params, L, contour, notes)
  local K = turned(J)
  for _, eps in ipairs({ 1e-2, 2e-3, 4e-2 }) do
    local sides = {}
    for _, sign in ipairs({ 1, -1 }) do
      local p = {}
      for k, v in pairs(params) do p[k] = v end
      p[PHASE] = cnew(math.cos(sign * eps), math.sin(sign * eps))
      local Lr = turned_landscape(K, p, L)
      local ok, plan = pcall(M.decompose_uncached, K, p, Lr, contour,
        { rotated = true, end_tol = 4 * eps })
      if not ok or plan.stokes or plan.status ~= "ok" then sides = nil; break end
      renumber_rays(plan, L, Lr)
      sides[#sides + 1] = { plan = plan, L = Lr, weights = weights_of(plan, Lr) }
    end
    if sides then
      local plus, minus = sides[1], sides[2]
      local same = true
      for j = 1, #L.saddles do
        for k = 1, L.saddles[j].order do
          if plus.weights[j][k] ~= minus.weights[j][k] then same = false end
        end
      end
      local plan = plus.plan
      if same then
        -- the saddles' own paths, where every weighted one ends in a valley (the higher
        -- saddle's path into the lower one then carries weight 0): truly steepest, and
        -- symmetric where the problem is
        local ok, own = pcall(M.decompose_uncached, J, params, L, contour,
          { weights = plus.weights })
        if ok and own.status == "ok" then plan = own end
      end
      plan.notes = {}
      for _, n in ipairs(notes) do plan.notes[#plan.notes + 1] = n end
      if same then
        plan.notes[#plan.notes + 1] = format("on the Stokes line the weights are the same on "
          .. "both sides of it (exponent's phase turned by +-%g): the decomposition is "
          .. "settled", eps)
        plan.stokes = { settled = true, eps = eps }
      else
        local changed = {}
        for j = 1, #L.saddles do
          for k = 1, L.saddles[j].order do
            if plus.weights[j][k] ~= minus.weights[j][k] then
              changed[#changed + 1] = format("saddle %d ray %d: %+d / %+d", j, k,
                plus.weights[j][k], minus.weights[j][k])
            end
          end
        end
        plan.notes[#plan.notes + 1] = format("a genuine Stokes jump: the weights differ on "
          .. "the two sides of the line (%s); the expansion takes the mean of the two "
          .. "sides (Berry's multiplier 1/2 on the line)", table.concat(changed, "; "))
        plan.stokes = { settled = false, eps = eps, minus = minus.plan, plus_weights = plus.weights,
          minus_weights = minus.weights }
      end
      plan.turned = K
      return plan
    end
  end
  return nil
end

--- decompose(J, params, L, contour) -> plan
-- plan.pieces: list of {kind = "saddle" | "endpoint", index (saddle), ray (its descent
-- ray), weight, points (for quadrature, outward), ends = {from label, to label}};
-- plan.residues: list of {index (into
-- L.singularities), winding}; plan.status: "ok" or the reason it is incomplete;
-- plan.notes: list of strings; plan.weights_by: "ends" or "crossings" (how the weights
-- of saddles off the contour were found).
function M.decompose(J, params, L, contour)
  return M.copy_plan(M.kept_plan(J, params, L, contour))
end

--- The plan itself, kept with the landscape: read-only for the caller (decompose gives a
-- copy to change).
function M.kept_plan(J, params, L, contour)
  -- a landscape belongs to one set of parameter values, so its plan for a contour is
  -- kept with it (an expansion and its quadrature check decompose the same contour)
  L._plans = L._plans or setmetatable({}, { __mode = "k" })
  local kept = L._plans[contour]
  if not kept then
    kept = M.decompose_uncached(J, params, L, contour)
    -- (a periodic family's copy at the edge of the band searched: a copy beyond it may
    -- be needed, so the plan is not trusted)
    local edge = kept.status == "ok" and periodic.edge_note(L, kept)
    if edge then
      kept.status = "incomplete"
      kept.notes[#kept.notes + 1] = edge
    end
    L._plans[contour] = kept
  end
  return kept
end

--- A copy that callers may change (residue windings, notes, the fields of a piece)
-- without touching the kept plan; the traced paths and polylines are shared (read-only).
-- (Contours are immutable, so a plan kept for one stays right; plan.evals counts the
-- evaluations that made it.)
function M.copy_plan(plan)
  local out = {}
  for k, v in pairs(plan) do out[k] = v end
  out.notes = table.move(plan.notes, 1, #plan.notes, 1, {})
  out.residues = {}
  for i, r in ipairs(plan.residues) do out.residues[i] = { index = r.index, winding = r.winding } end
  out.pieces = {}
  for i, piece in ipairs(plan.pieces) do
    local p = {}
    for k, v in pairs(piece) do p[k] = v end
    p.ends = { piece.ends[1], piece.ends[2] }
    out.pieces[i] = p
  end
  return out
end

-- (opts.by_crossings: weights from the ascent paths' crossings even where the ends
-- would decide them; the tests compare the two)
function M.decompose_uncached(J, params, L, contour, opts)
  local R = L.region.radius
  local plan = { pieces = {}, residues = {}, notes = {}, status = "ok", evals = 0 }
  local Rfar = 8 * R
  local cpts, cvec = sampled(contour, Rfar)
  M.check_contour(L, contour, cpts, J, params, opts and opts.finite_part)

  -- boundary of the contour
  -- label -> multiplicity in (boundary of the contour) - (boundary of the combination),
  -- counting ends +1 and starts -1; it must vanish
  local boundary = {}
  local function bump(label, by) boundary[label] = (boundary[label] or 0) + by end
  local start_label, finish_label
  local endpoint_saddle = {}
  local function saddle_at(z)
    for j, sd in ipairs(L.saddles) do
      if cabs(sd.at - z) <= 1e-8 * R then return j end
    end
  end
  if not contour.closed then
    local s, f = contour:start(), contour:finish()
    local boundary_s, boundary_f
    local first, last = contour.pieces[1], contour.pieces[#contour.pieces]
    local tol = opts and opts.end_tol
    local abel_s, abel_f
    start_label, boundary_s, abel_s = contour_end_label(L, s, "starting", first.b, tol)
    finish_label, boundary_f, abel_f = contour_end_label(L, f, "finishing", last.a, tol)
    for _, a in ipairs({ abel_s or false, abel_f or false }) do
      if a then plan.notes[#plan.notes + 1] = a; plan.abel = true end
    end
    if (boundary_s and not abel_s) or (boundary_f and not abel_f) then
      plan.notes[#plan.notes + 1] = "an end lies on the edge of its valley: the integrand "
        .. "oscillates there without decaying (convergent only conditionally)"
    end
    -- finite ends that are not sinks get descent paths (a saddle at an end: its ray)
    for _, e in ipairs({ { s, start_label, 1 }, { f, finish_label, -1 } }) do
      local point, label, sign = e[1], e[2], e[3]
      local sj = not label and saddle_at(point)
      if label then
        bump(label, sign == 1 and -1 or 1)
      elseif sj then
        if endpoint_saddle[sj] then
          error(format("both ends of the contour lie at the saddle at %s (within %.2g): the "
            .. "contour is too short to expand about it; integrate it with "
            .. "J:quad{along = \"given\"}", tostring(L.saddles[sj].at), 1e-8 * R), 0)
        end
        -- (the direction the contour leaves the saddle in, from its first or last piece:
        -- a piece may be shorter than the sampling resolution)
        local p = sign == 1 and contour.pieces[1] or contour.pieces[#contour.pieces]
        local dir
        if p.kind == "segment" then dir = sign == 1 and carg(p.b - p.a) or carg(p.a - p.b)
        elseif p.kind == "ray_out" then dir = p.angle
        elseif p.kind == "ray_in" then dir = p.angle
        else dir = carg((sign == 1 and cpts[2] or cpts[#cpts - 1]) - point) end
        endpoint_saddle[sj] = { sign = sign, direction = dir }
      else
        local F = J.tape:eval(point, params)
        local ref = cparts(F)
        local _, g = J.tape:eval(point, params)
        -- (an amplitude that vanishes or blows up at the end itself, as log t at 0, gives
        -- no level to measure from: F alone; an infinite reference had made every point
        -- negligible, and the path stopped at its first step, 0.026 for -0.577, "ok")
        local g_regular = not g or (cabs(g) > 0 and cabs(g) < huge)
        if g and g_regular then ref = ref + math.log(cabs(g)) end
        local d1 = select(2, pcall(function() return J.tape:jet(point, 1, params, 1):coef(1) end))
        local w = complex.is(d1) and cabs(d1) > 0 and 1 / cabs(d1) or nil
        if not g_regular and w and w < huge then
          -- g 0 or infinite at the end: F's level there says nothing; the level the
          -- integrand reaches a few scales down the descent direction does, where an
          -- amplitude that vanishes at the end (t^4 at 0) has grown: measured from the end
          -- alone, the path was "negligible" at its first step (t^4 e^{-x t} at x = 1e4:
          -- 2e-31 for 2.4e-19, "ok"). (Only probes below the end's F: the straight line
          -- leaves the path farther out, and a probe past a saddle or a sink read a level
          -- the path never reaches.)
          local dir = -complex.new(cparts(d1)):conj() * (1 / cabs(d1))
          local probe = {}
          for k, m in ipairs({ 1, 4, 16 }) do probe[k] = point + dir * (m * w) end
          local okp, Fs, gs = pcall(J.tape.eval_many, J.tape, core.cvec(probe), params)
          local best = -huge
          for k = 1, okp and #probe or 0 do
            local Fk = cparts(Fs:get(k))
            local gm = gs and cabs(gs:get(k)) or 1
            local lv = Fk + (gm > 0 and math.log(gm) or -huge)
            if Fk <= ref and lv == lv and lv < huge then best = math.max(best, lv) end
          end
          if best > -huge then ref = best end
        end
        local path = M.negligible_end(J, params, L, point, ref, d1)
          or landscape.trace(J, params, L, point, F, true, { ref = ref, scale = w })
        plan.evals = plan.evals + path.evals
        plan.pieces[#plan.pieces + 1] = { kind = "endpoint", at = point, weight = sign,
          path = path, points = path.points, full = full(path), ends = { "point", path.ends },
          reason = path.reason }
        bump(path.ends, -sign)   -- its finite start cancels the contour's own end
      end
    end
  end

  -- saddles: the contour near a saddle of order m is an integer combination of its m
  -- outward descent rays, sum c_k ray_k with sum c_k = 0. Descent ray k lies between
  -- ascent rays k and k+1 (angles increase with k), and sweeping from ray j to ray l
  -- crosses the ascent rays in between with sign -1 each; so with n_k the crossing number
  -- of the contour with ascent ray k, c_k = n_(k+1) - n_k (indices cyclic). For a simple
  -- saddle this is the classical intersection number with the whole ascent path.
  --
  -- Where the ends of the descent paths decide the weights alone (the boundaries of the
  -- saddles' descent combinations are independent), they are found from the ends and the
  -- ascent paths are not traced: the combination must end where the contour does, and
  -- that has one solution then (solve_by_ends). Otherwise, and always for saddles the
  -- contour runs through or starts at, as above.
  L.paths = L.paths or {}
  for _, s in ipairs(L.saddles) do
    if s.order > 8 then
      plan.status = "unsupported"
      plan.notes[#plan.notes + 1] = format("a saddle of order %d at %s: orders above 8 are "
        .. "not supported", s.order, tostring(s.at))
      return plan
    end
  end
  local fixed, free = {}, {}   -- saddle index -> weights; list of saddle indices
  local connections = {}       -- (the copies of a periodic family's connection: noted once)
  local sources = {}           -- saddles whose descent path runs into another
  for j, s in ipairs(L.saddles) do
    local paths = L.paths[j] or landscape.saddle_paths(J, params, L, j)
    L.paths[j] = paths
    for _, p in ipairs(paths.descent) do
      if p.ends:match("^saddle") then
        local note = periodic.connection_note(L, j, p.ends, connections)
        if note then plan.notes[#plan.notes + 1] = note end
        sources[#sources + 1] = j
        plan.stokes = true
      end
    end
    local m = s.order
    local weights = {}
    local at_end = endpoint_saddle[j]
    local through = not at_end and M.passes_through(contour, s.at, R)
    local function nearest_ray(direction)
      local best, bk = huge, 1
      for k, p in ipairs(paths.descent) do
        local d = abs(landscape.norm_angle(carg(p.points[2] - s.at) - direction))
        if d < best then best, bk = d, k end
      end
      return bk
    end
    if through then
      -- the contour runs through the saddle itself: in along the ray opposite to its
      -- incoming direction, out along the ray nearest its outgoing one (crossings with
      -- ascent paths that start on the contour would be fragile)
      for k = 1, m do weights[k] = 0 end
      local kin, kout = nearest_ray(through.din + pi), nearest_ray(through.dout)
      weights[kout] = weights[kout] + 1
      weights[kin] = weights[kin] - 1
      fixed[j] = weights
    elseif at_end then
      -- the contour starts (or ends) at this saddle: it leaves along the descent ray
      -- nearest its own direction there
      weights = {}
      for k = 1, m do weights[k] = 0 end
      weights[nearest_ray(at_end.direction)] = at_end.sign
      fixed[j] = weights
    else
      free[#free + 1] = j
    end
  end
  -- weights decided elsewhere (on a Stokes line, from its two sides)
  if opts and opts.weights then
    for j in ipairs(L.saddles) do fixed[j] = opts.weights[j] end
    free = {}
    plan.stokes = nil
  end
  -- on a Stokes line, the rule first: a jump of the lower saddle's weight is the
  -- intersection number times the higher saddle's weight, so where every saddle whose
  -- descent path runs into another has weight 0 (its ascent paths, complete since it is
  -- the higher, cross the contour to a net 0) nothing jumps
  if plan.stokes and not (opts and (opts.rotated or opts.weights)) then
    local zero = stokes_rule(L, cvec, sources, fixed)
    if zero then
      local keep = {}
      for _, j in ipairs(free) do if zero[j] then fixed[j] = zero[j] else keep[#keep + 1] = j end end
      free = keep
      plan.stokes = { settled = true, by_rule = true }
      plan.notes[#plan.notes + 1] = "on the Stokes line the saddles whose descent paths run into "
        .. "others have weight 0 (their ascent paths cross the contour to a net 0): nothing "
        .. "jumps, the decomposition is settled"
    end
  end
  -- otherwise decide the weights on both sides of the line
  if plan.stokes and plan.stokes ~= true and plan.stokes.by_rule then
    -- (settled by the rule)
  elseif plan.stokes and not (opts and opts.rotated) then
    local sp = M.across_stokes_line(J, params, L, contour, plan.notes)
    if sp then sp.abel = plan.abel; return sp end
    plan.notes[#plan.notes + 1] = "the weights could not be decided on either side of the "
      .. "Stokes line (turning the exponent's phase did not separate the saddles)"
  end
  -- (with infinitely many saddles, those of the region are not all of them: a solution
  -- from their ends alone need not be the right one, while crossing numbers are decided
  -- saddle by saddle)
  local by_ends = (not plan.stokes or (plan.stokes ~= true and plan.stokes.by_rule))
    and not (opts and opts.by_crossings)
    and not L.region.bounded and solve_by_ends(L, boundary, fixed, free)
  if #free > 0 then plan.weights_by = by_ends and "ends" or "crossings" end
  for _, j in ipairs(free) do
    local weights = by_ends and by_ends[j]
    if not weights then
      local m, n, paths = L.saddles[j].order, {}, L.paths[j]
      weights = {}
      for k, a in ipairs(paths.ascent) do n[k] = core.crossings(cvec, full(a)) end
      for k = 1, m do weights[k] = n[k % m + 1] - n[k] end
    end
    fixed[j] = weights
  end
  for j, s in ipairs(L.saddles) do
    local paths = L.paths[j]
    for _, p in ipairs(paths.descent) do plan.evals = plan.evals + p.evals end
    for _, p in ipairs(rawget(paths, "ascent") or {}) do plan.evals = plan.evals + p.evals end
    local at_end = endpoint_saddle[j]
    for k, c in ipairs(fixed[j]) do
      if c ~= 0 then
        local d = paths.descent[k]
        plan.pieces[#plan.pieces + 1] = { kind = "saddle", index = j, ray = k, weight = c,
          order = s.order, path = d, points = d.points, full = full(d),
          ends = { "saddle " .. j, d.ends }, at_endpoint = at_end ~= nil, reason = d.reason }
        bump(d.ends, -c)
      end
    end
  end

  -- the integrand is evaluated on the principal branch, while the paths are traced by F'
  -- (single-valued across a cut of log or of a power): a path that crosses a branch cut
  -- of the exponent (as one spiralling into t^c at 0 with complex c) would be integrated
  -- on the wrong sheet there. Along the path Im F keeps its level unless it does.
  for _, piece in ipairs(plan.pieces) do
    local level = piece.kind == "saddle" and L.saddles[piece.index].F
      or J.tape:eval(piece.at, params)
    local k, at, jump
    if not piece.path.straight then
      -- (an exponent turned onto or past a Stokes line: its jumps measured in the
      -- integral's own exponent, where 2 pi i n across a cut of log is harmless)
      k, at, jump = core.branch_jump(J.tape, params, piece.path.traced, piece.path.F, level,
        opts and opts.rotated and params[PHASE] or nil)
    end
    if k then
      plan.status = "incomplete"
      plan.notes[#plan.notes + 1] = format("a steepest descent path of the %s %s crosses "
        .. "a branch cut of the exponent near %s (F jumps by %s)", piece.kind,
        piece.index or tostring(piece.at), tostring(at), tostring(jump))
    end
  end

  -- every path must end somewhere definite
  for _, piece in ipairs(plan.pieces) do
    for _, label in ipairs(piece.ends) do
      if label ~= "point" and not (label:match("^valley") or label:match("^sink")
          or label:match("^saddle") or label:match("^essential")) then
        plan.status = plan.status == "ok" and "incomplete" or plan.status
        plan.notes[#plan.notes + 1] = format("a steepest descent path of the %s %s ends at "
          .. "'%s', not in a valley or a sink: the deformation is not settled",
          piece.kind, piece.index or tostring(piece.at), label)
      end
    end
  end
  if plan.status ~= "ok" then return plan end

  -- the combination must have the same ends as the contour; with infinitely many saddles
  -- a chain of them cut off by the region ends in strips: each such strip is joined to
  -- the valley its middle line runs into (a line between two valleys, integrated by
  -- quadrature: it stands for the saddles beyond the region)
  if L.region.bounded then
    for _, link in ipairs(strips.links(L, boundary, J, params, Rfar)) do
      plan.pieces[#plan.pieces + 1] = link
      bump(link.ends[1], link.weight)
      bump(link.ends[2], -link.weight)
    end
  end
  local missing = {}
  for label, n in pairs(boundary) do
    if n ~= 0 then
      local k = tonumber(label:match("^valley (%d+)$"))
      local words = k and landscape.describe_valley(L.valleys[k]) or label
      missing[#missing + 1] = format("%s (%+d)", words, n)
    end
  end
  if #missing > 0 then
    table.sort(missing)
    plan.status = plan.status == "ok" and "incomplete" or plan.status
    plan.notes[#plan.notes + 1] = "the steepest-descent combination does not end where the "
      .. "contour does: " .. table.concat(missing, ", ")
      .. " (a contributing saddle may lie outside the region, or paths end at its edge)"
    return plan
  end

  -- residues: winding of (contour - combination), closed through the valleys
  local Rref = 16 * R
  -- the cycle as polylines with signs (closures as lists of polylines)
  -- (a valley all around: its reference direction is the mean direction of the ends
  -- that close into it)
  local ref_dirs = {}
  do
    local sums = {}
    local function note(z, label)
      local k = label and tonumber(label:match("^valley (%d+)$"))
      local v = k and L.valleys[k]
      if v and v.type ~= "strip" and v.to - v.from >= 2 * pi - 1e-9 then
        local u = (z - L.region.center) / math.max(cabs(z - L.region.center), 1e-300)
        sums[k] = sums[k] or { s = cnew(0, 0), first = u }
        sums[k].s = sums[k].s + u
      end
    end
    if not contour.closed then
      note(cpts[1], start_label)
      note(cpts[#cpts], finish_label)
    end
    for _, piece in ipairs(plan.pieces) do note(piece.full:get(#piece.full), piece.ends[2]) end
    for k, s in pairs(sums) do
      ref_dirs[k] = carg(cabs(s.s) > 1e-6 and s.s or s.first)
    end
  end
  local function closure(z, label)
    local k = label:match("^valley (%d+)$")
    if k then return closure_to_valley(L, z, tonumber(k), Rref, ref_dirs[tonumber(k)]) end
    local sj = label:match("^sink (%d+)$")
    if sj then return { { z, L.singularities[tonumber(sj)].at } } end
    -- a path that stopped next to a saddle: into the saddle itself (its own rays start
    -- there exactly; a gap would leave the winding numbers short of an integer)
    local dj = label:match("^saddle (%d+)$")
    if dj then return { { z, L.saddles[tonumber(dj)].at } } end
    -- into an essential singularity through one of its valley sectors
    local ej = label:match("^essential (%d+):")
    if ej then return { { z, L.singularities[tonumber(ej)].at } } end
    return nil
  end
  local cycle = { { cvec, 1 } }
  local function close(z, label, sign)
    local c = label and closure(z, label)
    for _, poly in ipairs(c or {}) do cycle[#cycle + 1] = { poly, sign } end
  end
  if not contour.closed then
    close(cpts[1], start_label, -1)     -- run backwards into the start
    close(cpts[#cpts], finish_label, 1)
  end
  for _, piece in ipairs(plan.pieces) do
    local poly = piece.full
    cycle[#cycle + 1] = { poly, -piece.weight }
    close(poly:get(#poly), piece.ends[2], -piece.weight)
    -- (a link starts at infinity too)
    if piece.kind == "link" then close(poly:get(1), piece.ends[1], piece.weight) end
  end
  for idx, s in ipairs(L.singularities) do
    -- a singular point at a finite end of the contour is an integrable endpoint
    -- singularity (checked by check_contour); the endpoint's path starts there
    local at_contour_end = false
    if not contour.closed then
      for _, e in ipairs({ contour:start(), contour:finish() }) do
        if not contour_m.is_inf(e) and cabs(e - s.at) <= 1e-9 * R then at_contour_end = true end
      end
    end
    if at_contour_end then goto next_singularity end
    -- its winding number: the turnings of the pieces (a reversed piece turns back)
    local w, ok = 0, true
    -- a simple pole of the amplitude exactly at a saddle the path runs through: counted
    -- as if it lay just to the right of the path there (the uniform pole-near-saddle form
    -- then takes the same side: nearpole.fix_side reads `displaced`)
    local where, displaced = s.at, nil
    if s.kind == "pole" then
      local j, dir, ray = saddle_under(plan, L, s.at)
      if j then
        where = s.at + 1e-6 * (L.saddles[j].width or R) * cnew(0, -1) * dir
        -- (the side as the uniform form reads it: relative to ray 1's direction, w
        -- increasing; right of the path is left of that when the path leaves by ray 2)
        displaced = ray == 1 and -1 or 1
        plan.displaced = plan.displaced or {}
        plan.displaced[idx] = displaced
      end
    end
    for _, item in ipairs(cycle) do
      local t = core.turning(item[1], where)
      if t == nil then ok = false; break end
      w = w + item[2] * t
    end
    local n = floor(w + 0.5)
    if not ok and (s.kind == "sink" or (s.kind == "essential" and s.sectors)) then
      -- a path ends at the sink, or at an essential singularity through a valley sector
      -- (the integrand vanishes there): no residue
    elseif not ok then
      plan.status = "incomplete"
      plan.notes[#plan.notes + 1] = format("a steepest path passes through the %s at %s",
        s.kind, tostring(s.at))
    elseif abs(w - n) > 1e-6 then
      plan.status = "incomplete"
      plan.notes[#plan.notes + 1] = format("the winding number about %s is not an integer "
        .. "(%.6g): the closure is ambiguous", tostring(s.at), w)
    elseif n ~= 0 then
      if s.kind == "pole" and s.residue_unknown then
        plan.status = "unsupported"
        plan.notes[#plan.notes + 1] = format("the deformation sweeps over the pole at %s "
          .. "(order %s) whose residue could not be computed", tostring(s.at), tostring(s.order))
      elseif s.kind == "pole" then
        plan.residues[#plan.residues + 1] = { index = idx, winding = n }
      elseif s.kind ~= "sink" or s.branch then
        -- a sink with a non-integer coefficient is a branch point: the deformation must
        -- not sweep over it (Hankel's loop for 1/Gamma(z) with Re z < 0)
        plan.status = "unsupported"
        plan.notes[#plan.notes + 1] = format("the deformation sweeps over the %s point at %s "
          .. "(%s); only poles can be crossed", s.kind, tostring(s.at), s.source)
      end
    end
    ::next_singularity::
  end
  return plan
end

--- stokes_jump(J, params, L, n, m) -> jump or nil, reason. Near (not on) a Stokes line
-- of the simple saddles n (above) and m (below): the exponent turned to the line's phase
-- (e^{i phi} (F_n - F_m) real and positive), one of n's descent paths runs into m; turned
-- a little past the line either way it passes m and follows m's descent ray k_plus
-- (phase beyond the line in the direction of Im(F_n - F_m) > 0) or k_minus. n's outward ray
-- r then differs between the two sides by m's descent path from valley(k_minus) to
-- valley(k_plus) (Picard-Lefschetz; Berry & Howls, Proc. R. Soc. A 434 (1991) 657-675):
-- the contour being the same, with n's weight w on ray r, m's ray weights from the minus
-- side to the plus side change by -w on k_plus and +w on k_minus.
-- jump = {ray = r, plus = k_plus, minus = k_minus} in the original rays' numbering.
function M.stokes_jump(J, params, L, n, m)
  local sn, sm = L.saddles[n], L.saddles[m]
  if sn.order ~= 2 or sm.order ~= 2 then return nil, "not two simple saddles" end
  local sr, si = cparts(sn.F - sm.F)
  if not (sr > 0) then return nil, "the lower saddle is not subdominant" end
  local phi = -math.atan(si, sr)
  if abs(phi) > pi / 2 then return nil, "the line is too far in phase" end
  local K = turned(J)
  local function side(rho)
    local p = {}
    for k, v in pairs(params) do p[k] = v end
    p[PHASE] = rho
    local Lr = turned_landscape(K, p, L)
    return p, Lr
  end
  -- which ray of n runs into m on the line
  local p0, L0 = side(expi(phi))
  local ok, paths0 = pcall(landscape.saddle_paths, K, p0, L0, n)
  if not ok then return nil, tostring(paths0) end
  local r
  for k, path in ipairs(paths0.descent) do
    if path.ends == "saddle " .. m then r = k end
  end
  if not r then return nil, "no descent path of the upper saddle runs into the lower one" end
  -- ray k of saddle j in landscape A, renumbered for landscape B (the numbering starts
  -- from the argument of the turned coefficient: match by direction)
  local function ray_in(A, B, j, k)
    local a = ray_angle(A.saddles[j].coef, 2, k)
    local best, bk = huge, k
    for i = 1, 2 do
      local d = abs(landscape.norm_angle(ray_angle(B.saddles[j].coef, 2, i) - a))
      if d < best then best, bk = d, i end
    end
    return bk
  end
  for _, eps in ipairs({ 0.02, 0.06, 0.15 }) do
    local rays = {}
    for i, sign in ipairs({ 1, -1 }) do
      local p, Lr = side(expi(phi + sign * eps))
      local okn, pn = pcall(landscape.saddle_paths, K, p, Lr, n)
      local okm, pm = pcall(landscape.saddle_paths, K, p, Lr, m)
      if not (okn and okm) then return nil, tostring(okn and pm or pn) end
      local via = pn.descent[ray_in(L0, Lr, n, r)].ends
      for k = 1, 2 do
        if pm.descent[k].ends == via and via:match("^valley") then
          rays[i] = ray_in(Lr, L, m, k)
        end
      end
      if not rays[i] then rays = nil; break end
    end
    if rays and rays[1] ~= rays[2] then
      return { ray = ray_in(L0, L, n, r), plus = rays[1], minus = rays[2], phase = phi }
    end
  end
  return nil, "the turned paths did not settle into m's valleys"
end

return M
