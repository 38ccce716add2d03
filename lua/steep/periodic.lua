-- steep.periodic — exponents whose derivative is periodic: F'(t) a sum of c_m e^{m r t}
-- (whole m, one rate r) and a constant, as with exp, sinh and cosh of the variable at
-- commensurate rates plus a linear part (Bessel's and Hankel's exponents z sinh t - t,
-- z cosh t - t). Their saddles form lattices t_j + k P, P = 2 pi i / r: infinitely many,
-- and a disc that grows until it holds them all never stops.
--
-- With u = e^{r t}, F'(t) = G(u) = sum_m c_m u^m, a Laurent polynomial: every family is
-- one zero u_j of u^(-m_min) G(u), found by Aberth's iteration (landscape.poly_roots) and
-- polished by Newton on the tape, t_j = log(u_j) / r. Coinciding zeros are one saddle of
-- higher order. The landscape takes the copies in the band of periods the contour visits
-- (its finite points and the lines of its ends, one period more on each side) and reports
-- each family once: a representative, the period, and F's change over a period
-- (F(t + P) - F(t), a constant since F' is periodic).

local core = require "steep.core"
local complex = require "steep.complex"
local expr = require "steep.expr"
local infinity = require "steep.infinity"
local landscape = require "steep.landscape"

local cnew, cparts = complex.new, complex.parts
local cabs, carg = landscape.cabs, landscape.carg
local format, pi, abs, floor, ceil = string.format, math.pi, math.abs, math.floor, math.ceil

local M = {}

local MAX_DEGREE = 64   -- beyond this spread of powers m the roots are not sought this way

-- F' as an expression, made once per integral.
local function derivative(J)
  if not J._dexponent then J._dexponent = expr.diff(J.exponent, J.var) end
  return J._dexponent
end

--- detect(J, params) -> {rate, period, coef = {[m] = c}, mmin, mmax} or nil: whether F'
-- is a Laurent polynomial in u = e^{rate t} (read exactly from the expression).
function M.detect(J, params)
  local list = infinity.list(derivative(J), J.var, params, 0)
  if not list or list.rest or #list.terms == 0 then return nil end
  local rates, consts = {}, cnew(0, 0)
  for _, t in ipairs(list.terms) do
    if t.pr ~= 0 or t.pi ~= 0 or t.q ~= 0 or #t.E > 1 then return nil end
    if #t.E == 0 then consts = consts + t.c
    else
      if t.E[1].k ~= 1 then return nil end
      rates[#rates + 1] = { a = t.E[1].e, c = t.c }
    end
  end
  if #rates == 0 then return nil end
  -- the common rate: the smallest, divided by the least q <= 12 making every ratio whole
  local base = rates[1].a
  for _, x in ipairs(rates) do if cabs(x.a) < cabs(base) then base = x.a end end
  local q
  for qq = 1, 12 do
    local ok = true
    for _, x in ipairs(rates) do
      local rho = x.a / base * qq
      local re, im = cparts(rho)
      if abs(im) > 1e-9 * cabs(rho) or abs(re - floor(re + 0.5)) > 1e-9 * math.max(1, abs(re)) then
        ok = false
        break
      end
    end
    if ok then q = qq; break end
  end
  if not q then return nil end
  local rate = base / q
  local coef, mmin, mmax = {}, 0, 0
  if cabs(consts) > 0 then coef[0] = consts end
  for _, x in ipairs(rates) do
    local m = floor(cparts(x.a / rate) + 0.5)
    coef[m] = (coef[m] or cnew(0, 0)) + x.c
  end
  local any = false
  for m, c in pairs(coef) do
    if cabs(c) == 0 then coef[m] = nil
    else
      if not any then mmin, mmax, any = m, m, true end
      mmin, mmax = math.min(mmin, m), math.max(mmax, m)
    end
  end
  if not any or mmax - mmin < 1 or mmax - mmin > MAX_DEGREE then return nil end
  return { rate = rate, period = cnew(0, 2 * pi) / rate, coef = coef, mmin = mmin, mmax = mmax }
end

-- The coordinate of t along the period (where t lies among the periods).
local function along(P, t)
  return cparts(t * complex.new(cparts(P)):conj()) / cabs(P)
end
M.along = along

--- The band of the contour along the period: the least and largest coordinate of its
-- finite points and of the points its ends at infinity run from.
function M.contour_band(P, contour)
  local lo, hi = math.huge, -math.huge
  local function see(z)
    local s = along(P, z)
    lo, hi = math.min(lo, s), math.max(hi, s)
  end
  for _, z in ipairs(contour:finite_points()) do see(z) end
  for _, p in ipairs(contour.pieces) do
    if p.kind == "ray_in" then see(p.b) elseif p.kind == "ray_out" then see(p.a) end
  end
  if lo > hi then lo, hi = 0, 0 end
  return lo, hi
end

--- families(J, params, D) -> list of {at = t_j (the representative: the principal log),
-- mult}: one per distinct zero u_j of G, polished on the tape.
function M.families(J, params, D)
  local c, d = {}, D.mmax - D.mmin
  for k = 0, d do c[k] = D.coef[k + D.mmin] or cnew(0, 0) end
  local roots = landscape.poly_roots(c, d)
  local P = D.period
  local out = {}
  for _, u in ipairs(roots) do
    if cabs(u) > 0 then
      local t = complex.apply("log", cnew(cparts(u))) / D.rate
      -- polish on the tape (the multiplicity from the jet), in a disc well inside a period
      local st, root = core.zero(J.tape, params, { out = 1, deriv = 1 }, t, t, 0.25 * cabs(P),
        1e-3 * cabs(P), 60)
      if st == "ok" then
        -- back to the copy of the principal log's period
        local k = floor((along(P, root) - along(P, t)) / cabs(P) + 0.5)
        t = root - k * P
      end
      local dup = false
      for _, f in ipairs(out) do
        local dk = floor((along(P, t) - along(P, f.at)) / cabs(P) + 0.5)
        if cabs(t - dk * P - f.at) <= 1e-7 * cabs(P) then f.mult = f.mult + 1; dup = true; break end
      end
      if not dup then out[#out + 1] = { at = t, mult = 1 } end
    end
  end
  table.sort(out, function(a, b)
    local sa, sb = along(P, a.at), along(P, b.at)
    if abs(sa - sb) > 1e-9 * cabs(P) then return sa < sb end
    return cparts(a.at) < cparts(b.at)
  end)
  return out
end

--- saddles(J, params, D, band) -> saddle list (landscape.saddle_at records with .family,
-- .copy), info, families. band = {lo =, hi =} along the period (the copies with their
-- coordinate inside), or {region =} (the copies inside a disc).
function M.saddles(J, params, D, band)
  local P = D.period
  local lenP = cabs(P)
  local fams = M.families(J, params, D)
  local list, groups = {}, {}
  for f, fam in ipairs(fams) do
    local s0 = along(P, fam.at)
    local lo, hi
    if band.region then
      local sc = along(P, band.region.center)
      lo, hi = sc - band.region.radius, sc + band.region.radius
    else
      lo, hi = band.lo, band.hi
    end
    local k1, k2 = ceil((lo - s0) / lenP - 1e-12), floor((hi - s0) / lenP + 1e-12)
    local g = { members = {}, copies = {}, mult = fam.mult }
    -- k = 0: the copy nearest the middle of the band
    local kmid = floor(((lo + hi) / 2 - s0) / lenP + 0.5)
    for k = k1, k2 do
      local t = fam.at + k * P
      if not band.region or cabs(t - band.region.center) < band.region.radius then
        local s = landscape.saddle_at(J, params, t, fam.mult)
        s.family, s.copy = f, k - kmid
        list[#list + 1] = s
        g.members[#g.members + 1] = s
        g.copies[#g.copies + 1] = k - kmid
      end
    end
    g.first, g.last = k1 - kmid, k2 - kmid
    groups[f] = g
  end
  table.sort(list, function(a, b)
    local da, db = abs(a.copy), abs(b.copy)
    if da ~= db then return da < db end
    if a.copy ~= b.copy then return a.copy < b.copy end
    return a.family < b.family
  end)
  local total = 0
  for _, s in ipairs(list) do total = total + (s.order - 1) end
  local info = { status = "complete", count = total, found = total,
    method = "every saddle family of the periodic F' (zeros of a polynomial in e^{rt}), the "
      .. "copies in the band searched", periodic = true }
  return list, info, groups
end

--- The change of F over one period, F(t + P) - F(t) (constant: F' is periodic).
function M.shift(J, params, D)
  local t = cnew(0.3, 0.1)
  local F1 = J.tape:eval(t, params)
  local F2 = J.tape:eval(t + D.period, params)
  return F2 - F1
end

--- The landscape's periodic part for J at params and the contour's band (or a region
-- the user chose): L.saddles, L.saddle_count and L.periodic = {period, shift, rate,
-- lo, hi, families = {members, copies, first, last}}; nil when F' is not periodic.
function M.landscape_saddles(J, params, region)
  local D = M.detect(J, params)
  if not D then return nil end
  local P = D.period
  local lenP = cabs(P)
  local band
  if region then band = { region = region }
  else
    local lo, hi = M.contour_band(P, J.contour)
    band = { lo = lo - lenP, hi = hi + lenP }
  end
  local list, info, groups = M.saddles(J, params, D, band)
  local per = { period = P, rate = D.rate, shift = M.shift(J, params, D), families = groups,
    lo = band.lo, hi = band.hi }
  return list, info, per
end

--- A region (disc about 0, a power of 2 as for polynomial exponents) that holds the
-- contour's finite points and the saddles.
function M.region_for(J, saddles)
  local R0 = 1
  for _, z in ipairs(J.contour:finite_points()) do R0 = math.max(R0, 1.5 * cabs(z)) end
  for _, p in ipairs(J.contour.pieces) do
    if p.kind == "ray_in" then R0 = math.max(R0, 1.5 * cabs(p.b))
    elseif p.kind == "ray_out" then R0 = math.max(R0, 1.5 * cabs(p.a)) end
  end
  for _, s in ipairs(saddles) do R0 = math.max(R0, 1.25 * cabs(s.at)) end
  return { center = cnew(0, 0), radius = 2 ^ math.ceil(math.log(R0, 2)) }
end

--- After a decomposition: a weighted saddle within half a period of the band's edge (more
-- than half a period beyond the contour) means the band may be too narrow (a needed copy
-- beyond it would be missing): the plan is then not trusted. Returns a note or nil.
function M.edge_note(L, plan)
  local per = L.periodic
  if not per or not per.lo then return nil end
  local half = 0.5 * cabs(per.period)
  for _, piece in ipairs(plan.pieces) do
    if piece.kind == "saddle" and piece.weight ~= 0 then
      local s = L.saddles[piece.index]
      local y = along(per.period, s.at)
      if y < per.lo + half or y > per.hi - half then
        return format("the decomposition uses a copy of a periodic saddle family at the edge "
          .. "of the band of periods searched (%s): a copy beyond it may be needed", tostring(s.at))
      end
    end
  end
  return nil
end

--- The note for saddle j's descent path running into `target` ("saddle k"): once per
-- pair of families and their offset when the saddles are copies of periodic families
-- (`seen` remembers), else as for any saddle connection.
function M.connection_note(L, j, target, seen)
  local k = tonumber(target:match("^saddle (%d+)$"))
  local a, b = L.saddles[j], k and L.saddles[k]
  if L.periodic and a and b and a.family and b.family then
    local key = format("%d:%d:%d", a.family, b.family, b.copy - a.copy)
    if seen[key] then return nil end
    seen[key] = true
    return format("saddle %d (family %d, and each of its copies): its descent path runs into "
      .. "saddle %d (family %d, %s) (a saddle connection: the parameters are on a Stokes line)",
      j, a.family, k, b.family, b.copy == a.copy and "the same copy"
      or format("%+d period%s along", b.copy - a.copy, abs(b.copy - a.copy) == 1 and "" or "s"))
  end
  return format("saddle %d: its descent path runs into %s (a saddle connection: the parameters "
    .. "are on a Stokes line)", j, target)
end

---------------------------------------------------------------------------------------
-- Words for reports.
---------------------------------------------------------------------------------------

local function name_of(L) return L.var or "t" end

-- "Im t" for a vertical period, else the coordinate along it in words.
local function coordinate(L)
  local P = L.periodic.period
  local re, im = cparts(P)
  if abs(re) <= 1e-12 * abs(im) then return "Im " .. name_of(L) end
  return format("the coordinate along %s", tostring(P))
end

--- Lines for a report: each saddle family once (representative, its copies, F's change
-- per period), in the caller's number format. nil when the landscape is not periodic.
function M.saddle_lines(L, num)
  local per = L.periodic
  if not per then return nil end
  local var = name_of(L)
  local lines = {}
  local nf = #per.families
  lines[1] = format("%d saddle famil%s, period %s (%s_k = %s_0 + k*%s, F changes by %s per "
    .. "period); copies taken where %s lies in [%.4g, %.4g]", nf, nf == 1 and "y" or "ies",
    num(per.period), var, var, num(per.period), num(per.shift), coordinate(L),
    per.lo or -math.huge, per.hi or math.huge)
  for f, g in ipairs(per.families) do
    local rep
    for _, s in ipairs(g.members) do if s.copy == 0 then rep = s end end
    rep = rep or g.members[1]
    if rep then
      lines[#lines + 1] = format("family %d: %s_0 = %s, order %d, F = %s, F'' = %s; copies k = "
        .. "%d..%d", f, var, num(rep.at), rep.order, num(rep.F), num(rep.F2), g.copies[1],
        g.copies[#g.copies])
    end
  end
  return lines
end

--- The periodic part of a landscape for machine-readable reports: {period, shift, lo, hi,
-- families = {{at (the copy k = 0), order, copies = {first, last}}}}, or nil.
function M.summary(L)
  local per = L.periodic
  if not per then return nil end
  local fams = {}
  for _, g in ipairs(per.families) do
    local rep
    for _, s in ipairs(g.members) do if s.copy == 0 then rep = s end end
    rep = rep or g.members[1]
    if rep then
      fams[#fams + 1] = { at = rep.at, order = rep.order, F = rep.F,
        copies = { g.copies[1], g.copies[#g.copies] } }
    end
  end
  return { period = per.period, shift = per.shift, lo = per.lo, hi = per.hi, families = fams }
end

return M
