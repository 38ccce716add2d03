-- steep.rescale — the rescaled route: J:rescale (the integral in a new variable s with
-- t = c s + d, its contour mapped and held), the test of homogeneity P(x) psi(s),
-- J:suggest_rescaling (the power law of the saddles' motion), and J:compare (both routes
-- side by side against quadrature, with the crossing corrections).

local complex = require "steep.complex"
local expr = require "steep.expr"
local contour_m = require "steep.contour"
local landscape = require "steep.landscape"
local routes = require "steep.routes"

local cnew, cparts = complex.new, complex.parts
local cabs, carg = landscape.cabs, landscape.carg
local format, pi, abs, log, huge = string.format, math.pi, math.abs, math.log, math.huge
local copy, fmtv, need_table = routes.copy, routes.fmtv, routes.need_table

local M = {}

-- Maps a contour through s = (t - d)/c (an affine map; arg c turns the directions at
-- infinity, and a negative c reverses the order in which the ends are met, which is the
-- orientation being followed).
local function map_contour(C, c, d)
  local pieces = {}
  local turn = carg(c)
  local function pt(z) return (z - d) / c end
  for _, p in ipairs(C.pieces) do
    if p.kind == "segment" then
      pieces[#pieces + 1] = { kind = "segment", a = pt(p.a), b = pt(p.b) }
    elseif p.kind == "ray_out" then
      pieces[#pieces + 1] = { kind = "ray_out", a = pt(p.a),
        angle = contour_m.norm_angle(p.angle - turn) }
    elseif p.kind == "ray_in" then
      pieces[#pieces + 1] = { kind = "ray_in", b = pt(p.b),
        angle = contour_m.norm_angle(p.angle - turn) }
    else
      pieces[#pieces + 1] = { kind = "arc", center = pt(p.center), radius = p.radius / cabs(c),
        from = p.from - turn, to = p.to - turn }
    end
  end
  return contour_m.new(pieces, C.closed)
end

-- Is the contour made of rays from the origin (and lines through it, which are two such
-- rays)? Then t = c s with c real and positive maps it onto itself, orientation kept.
local function rays_from_origin(C)
  if C.closed then return false end
  for _, p in ipairs(C.pieces) do
    if p.kind == "ray_out" then
      if cabs(p.a) ~= 0 then return false end
    elseif p.kind == "ray_in" then
      if cabs(p.b) ~= 0 then return false end
    else
      return false
    end
  end
  return true
end

local SAMPLES = { 0.25, 1, 4, 16 }

-- Without holding values: the values of the parameters for which the map leaves the
-- contour as it is, so that holding it needs no choice. Returns the holding values and a
-- sentence saying for which values of the large parameter they hold, or nil and why not.
local function default_holding(J, T, dT, s)
  if not rays_from_origin(J.contour) then
    return nil, "the contour is not made of rays from the origin, so the map moves it"
  end
  local x = J.large and J.large.name
  for _, name in ipairs(T:symbols()) do
    if name ~= s.name and name ~= x then
      return nil, format("the substitution depends on the parameter '%s'", name)
    end
  end
  local function c_and_d(xv)
    local b = { [s.name] = 0 }
    if x then b[x] = xv end
    local ok1, c = pcall(dT.value, dT, b)
    local ok2, d = pcall(T.value, T, b)
    if ok1 and ok2 then return c, d end
  end
  -- real and positive, with no shift, at every sample value of one sign
  local shifted
  local function holds_for(sign)
    for _, v in ipairs(SAMPLES) do
      local c, d = c_and_d(sign * v)
      if not c then return false end
      if cabs(d) ~= 0 then shifted = d; return false end
      local cr, ci = cparts(c)
      if not (cr > 0 and cr < huge and abs(ci) <= 1e-14 * cr) then return false end
    end
    return true
  end
  local pos, neg = holds_for(1), holds_for(-1)
  local cs = tostring(expr.substitute(dT, { [s] = 0 }))
  if shifted and not (pos or neg) then
    return nil, format("the map moves the origin (%s = 0 is t = %s)", s.name, tostring(shifted))
  end
  local words
  if not x or not T:depends_on(expr.symbol("param", x)) then
    if not pos then return nil, format("dt/d%s = %s is not real and positive", s.name, cs) end
    return {}, format("the contour is held as given: its rays from the origin are unchanged by "
      .. "t = %s (dt/d%s = %s, real and positive)", tostring(T), s.name, cs)
  end
  if pos and neg then words = "every real " .. x .. " other than 0"
  elseif pos then words = x .. " > 0"
  elseif neg then words = x .. " < 0"
  else
    return nil, format("dt/d%s = %s is not real and positive at %s = +-0.25, +-1, +-4, +-16",
      s.name, cs, x)
  end
  return { [x] = pos and 1 or -1 }, format("the contour is held as given for %s: its rays from "
    .. "the origin are unchanged by t = %s where dt/d%s = %s is real and positive (checked at "
    .. "%s = %s0.25, 1, 4, 16)", words, tostring(T), s.name, cs, x,
    pos and neg and "+-" or (pos and "" or "-"))
end

--- J:rescale{var = s, t = <expression in s and parameters>, at = {<params>}}
-- -> K, the same integral in s: exponent F(t(s)), amplitude g(t(s)) t'(s), and the
-- contour mapped at the parameter values `at` (held there: that is the contour a
-- rescaled formula derived at those values assumes). K.rescaling describes the map and
-- K.homogeneity says whether K's exponent is P(x) psi(s). Without `at`, a contour the
-- map leaves unchanged (rays from the origin, for t = c s with c real and positive) is
-- held as given, and K.rescaling.holds says for which values of the large parameter.
function M.rescale(J, opts)
  if type(opts) ~= "table" then error("bad argument #1 to 'rescale' (options table expected)", 2) end
  for k in pairs(opts) do
    if k ~= "var" and k ~= "t" and k ~= "at" then
      error(format("rescale: unknown option '%s' (options: var, t, at)", tostring(k)), 2)
    end
  end
  local s, T = opts.var, opts.t
  if not (expr.is(s) and s.op == "var") then
    error("rescale: option 'var' must be a new variable made by steep.var", 2)
  end
  if s == J.var then error("rescale: the new variable must differ from " .. J.var.name, 2) end
  if not (expr.is(T) and T:depends_on(s)) then
    error("rescale: option 't' must be an expression in " .. s.name .. " (t = x^a * s, ...)", 2)
  end
  -- every symbol of t must be s or a parameter: a variable other than s is unknown here
  -- (a parameter not yet in J is fine: it is bound at evaluation), even one that shares
  -- its name with a parameter
  for _, name in ipairs(T:symbols()) do
    if name ~= s.name and T:depends_on(expr.symbol("var", name)) then
      error(format("rescale: the substitution names the variable '%s', which is neither "
        .. "the new variable %s nor a parameter", name, s.name), 2)
    end
  end
  local dT = expr.diff(T, s)
  local at, holds = opts.at, nil
  if at == nil then
    local why
    at, holds = default_holding(J, T, dT, s)
    if not at then
      why = holds
      error(format("rescale: give the parameter values at which to hold the contour, "
        .. "at = {...}: %s", why), 2)
    end
  elseif type(at) ~= "table" then
    error("rescale: option 'at' must be a table of parameter values, got " .. type(at), 2)
  end
  local Fs = expr.substitute(J.exponent, { [J.var] = T })
  local gs = expr.substitute(expr.lift(J.amplitude), { [J.var] = T }) * dT
  -- affine in s? t'' = 0 at a few points
  local d2 = expr.diff(dT, s)
  local pts = { cnew(0.3, 0.2), cnew(-1.1, 0.5), cnew(2.3, -0.7) }
  local function val(e, sv)
    local b = copy(at)
    b[s.name] = sv
    local ok, v = pcall(e.value, expr.lift(e), b)
    if not ok then
      error("rescale: cannot evaluate the substitution at the holding values ("
        .. tostring(v):gsub("^[^\n]-:%d+: ", "") .. "); give them with at = {...}", 3)
    end
    return v
  end
  for _, z in ipairs(pts) do
    if cabs(val(d2, z)) > 1e-12 * (1 + cabs(val(dT, z))) then
      error("rescale: the substitution is not affine in " .. s.name .. " (t = c*s + d): "
        .. "its contour cannot be mapped", 2)
    end
  end
  local c = val(dT, cnew(0, 0))
  local d = val(T, cnew(0, 0))
  if cabs(c) == 0 or cabs(c) ~= cabs(c) or cabs(c) == huge then
    local ps = {}
    for k, v in pairs(at) do ps[#ps + 1] = k .. " = " .. tostring(v) end
    error(format("rescale: the substitution t = %s is not invertible at %s (dt/d%s = %s)",
      tostring(T), table.concat(ps, ", "), s.name, tostring(c)), 2)
  end
  local K = require("steep.integral").new {
    var = s, exponent = Fs, amplitude = gs, contour = map_contour(J.contour, c, d),
    large = J.large }
  K.rescaling = { from = J, t = T, var = s, at = copy(at), factor = dT, shift = T - dT * s,
    holds = holds }
  K.homogeneity = M.homogeneity(K, at)
  return K
end

--- Is the exponent P(x) psi(s) with psi free of x? Tested numerically over several x
-- (around the holding value) and s; the power p of P = (x/x0)^p is fitted. Also the
-- amplitude's power q (g(s; x) = (x/x0)^q g(s; x0)), so that a series in the standard
-- form has coefficients fixed once for all x.
function M.homogeneity(K, at)
  if not K.large then return { ok = false, why = "no large parameter" } end
  local x = K.large.name
  local x0 = at[x] or 1
  local r0, i0 = cparts(x0)
  if i0 ~= 0 or r0 == 0 then return { ok = false, why = "hold at a real non-zero " .. x } end
  local svals = { cnew(0.37, 0.11), cnew(-0.6, 0.3), cnew(1.4, -0.25), cnew(0.05, 0.9) }
  local xs = { r0 * 1.5, r0 * 2.7, r0 * 5.3 }
  local function eval(xv, sv)
    local p = copy(at)
    p[x] = xv
    for _, name in ipairs(K.params) do if p[name] == nil then return nil end end
    local ok, F, g = pcall(K.tape.eval, K.tape, sv, p)
    if not ok then return nil end
    return F, g
  end
  local base, gbase = {}, {}
  for i, sv in ipairs(svals) do base[i], gbase[i] = eval(x0, sv) end
  if not base[1] then return { ok = false, why = "cannot evaluate at the holding values" } end
  local powers, gpowers = {}, {}
  for _, xv in ipairs(xs) do
    local P = nil
    local Q = nil
    for i, sv in ipairs(svals) do
      local F, g = eval(xv, sv)
      if not F or cabs(base[i]) == 0 then return { ok = false, why = "evaluation failed" } end
      local ratio = F / base[i]
      P = P or ratio
      if cabs(ratio - P) > 1e-9 * cabs(P) then
        return { ok = false, why = format("the exponent is not P(%s)*psi(%s): the ratio "
          .. "F(%s; %s)/F(%s; %s) varies with %s", x, K.var.name, K.var.name, fmtv(xv),
          K.var.name, fmtv(x0), K.var.name) }
      end
      if g and gbase[i] and cabs(gbase[i]) > 0 then
        local gr = g / gbase[i]
        Q = Q or gr
        if cabs(gr - Q) > 1e-9 * cabs(Q) then Q = false end
      end
    end
    powers[#powers + 1] = log(cabs(P)) / log(abs(xv / r0))
    gpowers[#gpowers + 1] = Q and log(cabs(Q)) / log(abs(xv / r0)) or nil
  end
  local p = powers[1]
  for _, v in ipairs(powers) do
    if abs(v - p) > 1e-6 * (1 + abs(p)) then
      return { ok = false, why = "P(" .. x .. ") is not a power of " .. x }
    end
  end
  local q = gpowers[1]
  if q then
    for _, v in ipairs(gpowers) do if abs(v - q) > 1e-6 * (1 + abs(q)) then q = nil end end
  end
  return { ok = true, power = p, amplitude_power = q, at = x0,
    psi = "F(" .. K.var.name .. "; " .. x .. " = " .. fmtv(x0) .. ") / " .. fmtv(r0 ^ p),
    text = format("homogeneous: F = (%s/%s)^%.6g * psi(%s)%s", x, fmtv(x0), p, K.var.name,
      q and format(", amplitude ~ (%s/%s)^%.6g", x, fmtv(x0), q) or
      ", amplitude not a power of " .. x) }
end

--- J:suggest_rescaling{x = {from =, to =}, <other params>} -> proposal
-- Follows each saddle over values of the large parameter spaced geometrically between
-- from and to (same sign), fits |t0(x)| ~ x^a by least squares, and proposes t = x^a s
-- (a rounded to a simple fraction when it is within 0.02 of one).
function M.suggest(J, opts)
  need_table(opts, "suggest_rescaling")
  if not J.large then error("suggest_rescaling: the integral names no large parameter", 2) end
  local x = J.large.name
  local range = opts[x]
  if type(range) ~= "table" or not range.from or not range.to then
    error("suggest_rescaling: give " .. x .. " = {from =, to =}", 2)
  end
  local a, b = range.from, range.to
  if type(a) ~= "number" or type(b) ~= "number" or a * b <= 0 or a == b then
    error("suggest_rescaling: from and to must be distinct numbers of the same sign", 2)
  end
  local fixed = copy(opts)
  fixed[x] = nil
  local n = 7
  local tracks = {}
  local prev
  for k = 0, n - 1 do
    local v = a * (b / a) ^ (k / (n - 1))
    local p = copy(fixed)
    p[x] = v
    local L = J:_landscape(p, nil, false)
    local cur = {}
    for _, sd in ipairs(L.saddles) do cur[#cur + 1] = sd.at end
    if not prev then
      for i, z in ipairs(cur) do tracks[i] = { { x = v, at = z } } end
    else
      for i, tr in ipairs(tracks) do
        local last = tr[#tr].at
        local best, bz = huge, nil
        for _, z in ipairs(cur) do
          local d = cabs(z - last)
          if d < best then best, bz = d, z end
        end
        if bz then tr[#tr + 1] = { x = v, at = bz } end
      end
    end
    prev = cur
  end
  local fits = {}
  for i, tr in ipairs(tracks) do
    local sx, sy, sxx, sxy, m = 0, 0, 0, 0, 0
    for _, pt in ipairs(tr) do
      local r = cabs(pt.at)
      if r > 0 then
        local lx, ly = log(abs(pt.x)), log(r)
        sx, sy, sxx, sxy, m = sx + lx, sy + ly, sxx + lx * lx, sxy + lx * ly, m + 1
      end
    end
    if m >= 3 then
      local slope = (m * sxy - sx * sy) / (m * sxx - sx * sx)
      local resid = 0
      local icpt = (sy - slope * sx) / m
      for _, pt in ipairs(tr) do
        local r = cabs(pt.at)
        if r > 0 then resid = math.max(resid, abs(log(r) - icpt - slope * log(abs(pt.x)))) end
      end
      fits[#fits + 1] = { saddle = i, exponent = slope, spread = resid, track = tr }
    end
  end
  local function result(r)
    r.large, r.integral, r.range = x, J, { from = a, to = b }
    return setmetatable(r, { __index = { report = M.suggest_report } })
  end
  if #fits == 0 then return result { fits = {}, text = "no saddle could be followed over the range" } end
  table.sort(fits, function(u, v) return u.spread < v.spread end)
  local best = fits[1]
  local aexp = best.exponent
  local frac
  for q = 1, 4 do
    local pnum = math.floor(aexp * q + 0.5)
    if abs(aexp - pnum / q) < 0.02 then aexp, frac = pnum / q, format("%d/%d", pnum, q); break end
  end
  local s = expr.symbol("var", "s")
  local tsub = (expr.symbol("param", x) ^ aexp) * s
  return result { exponent = aexp, fitted = best.exponent, fraction = frac, fits = fits,
    t = tsub, var = s,
    text = format("the saddles move like %s^%.4g (fitted %.4g, spread %.2g in log|t0|): "
      .. "try t = %s, i.e. J:rescale{var = steep.var \"s\", t = %s}", x, aexp,
      best.exponent, best.spread, tostring(tsub), tostring(tsub)) }
end

--- suggestion:report{format = "text" | "json" | "csv"}: the proposal and the power law
-- fitted to each saddle followed (CSV: one row per saddle).
function M.suggest_report(sg, opts)
  local report_m = require "steep.report"
  local rows = {}
  for _, f in ipairs(sg.fits) do
    rows[#rows + 1] = { saddle = f.saddle, exponent = f.exponent, spread = f.spread,
      first = f.track[1].at, last = f.track[#f.track].at }
  end
  local other = report_m.format(opts, sg, rows, { "saddle", "exponent", "spread", "first", "last" })
  if other then return other end
  local lines = { report_m.wrap(tostring(sg.integral), "suggested rescaling for ", 4),
    format("%s from %s to %s", sg.large, report_m.num(sg.range.from), report_m.num(sg.range.to)) }
  if #rows > 0 then
    local t = {}
    for _, r in ipairs(rows) do
      t[#t + 1] = { tostring(r.saddle), format("%.4g", r.exponent), format("%.2g", r.spread),
        report_m.num(r.first, nil, 6), report_m.num(r.last, nil, 6) }
    end
    lines[#lines + 1] = report_m.table({ { "saddle", right = true }, { "|t0| ~ x^a: a" },
      { "spread" }, { "at first" }, { "at last" } }, t)
  end
  lines[#lines + 1] = report_m.wrap(sg.text, "", 2)
  return table.concat(lines, "\n")
end

---------------------------------------------------------------------------------------
-- Comparison of the routes.
---------------------------------------------------------------------------------------

--- J:compare{x = {values}, order = N, rescale = {var =, t =}, <other params>}
-- Runs at each value: the unrescaled route (J:expand), the rescaled route on the contour
-- held where the values start (K:expand), the rescaled formula derived at the first
-- value (its saddles followed, the residue terms it had there kept) with the crossing
-- corrections, and quadrature; flags every disagreement beyond the error estimates with
-- the reason found.
function M.compare(J, opts)
  need_table(opts, "compare")
  if not J.large then error("compare: the integral names no large parameter", 2) end
  local x = J.large.name
  local values = routes.parameter_values(opts[x], "compare")
  local order = opts.order or 4
  local resc = opts.rescale
  if type(resc) ~= "table" then error("compare: option 'rescale' = {var =, t =} is required", 2) end
  local fixed = {}
  for k, v in pairs(opts) do
    if k ~= x and k ~= "order" and k ~= "rescale" and k ~= "region" then fixed[k] = v end
  end
  local at = copy(fixed)
  at[x] = values[1]
  local K = M.rescale(J, { var = resc.var, t = resc.t, at = at })
  local cross_opts = copy(fixed)
  cross_opts[x] = values
  local cross = require("steep.crossings").crossings(K, cross_opts)
  local function index_of(v)
    for i, vv in ipairs(values) do if vv == v then return i end end
  end
  -- the structure of the rescaled formula where it is derived: its pole terms, each
  -- with the id J:crossings follows it by
  local function derive(i)
    local p0 = copy(fixed)
    p0[x] = values[i]
    p0.order = order
    local ok, res = pcall(K.expand, K, p0)
    if not ok then return nil end
    local poles = {}
    for _, c in ipairs(res.contributions) do
      if c.kind == "pole" then poles[#poles + 1] = { at = c.at, winding = c.weight } end
    end
    local track
    for _, tr in ipairs(cross.track) do if tr.x == values[i] then track = tr end end
    for _, sp in ipairs(poles) do
      local best = huge
      for _, s in ipairs(track and track.singularities or {}) do
        local d = cabs(s.at - sp.at)
        if d < best then best, sp.id = d, s.id end
      end
    end
    return { index = i, poles = poles }
  end
  -- where the rescaling is singular (dt/ds passes through zero) everything in the
  -- rescaled plane moves through infinity: a formula cannot be continued past that by
  -- residues alone; it is derived afresh at the first value beyond
  local segments = { derive(1) or { index = 1, poles = {} } }
  for _, e in ipairs(cross.events) do
    if e.kind == "rescaling" then
      local i = index_of(e.at)
      if i then segments[#segments + 1] = derive(i) or { index = i, poles = {} } end
    end
  end
  local function segment_of(k)
    local s = segments[1]
    for _, sg in ipairs(segments) do if sg.index <= k then s = sg end end
    return s
  end
  local singular_steps = {}
  for _, sg in ipairs(segments) do if sg.index > 1 then singular_steps[sg.index] = true end end
  local c0 = K.rescaling.factor:value(setmetatable({ [K.var.name] = 0 }, { __index = at }))
  local rows = {}
  for k, v in ipairs(values) do
    local p = copy(fixed)
    p[x] = v
    local row = { x = v, notes = {} }
    local q, qe = J:quad(copy(p))
    row.quad, row.quad_error = q, qe
    local po = copy(p)
    po.order = order
    local ok, u = pcall(J.expand, J, po)
    if ok then row.unrescaled, row.unrescaled_error = u.value, u.error
    else row.notes[#row.notes + 1] = "unrescaled route failed: " .. tostring(u) end
    -- track of singularities at this value
    local tr
    for _, t in ipairs(cross.track) do if t.x == v then tr = t end end
    local function residue_of(id)
      for _, s in ipairs(tr and tr.singularities or {}) do
        if s.id == id then return s.residue, s.residue_error end
      end
    end
    local ok2, kh = pcall(K.expand, K, copy(po))
    if ok2 then
      -- The formula derived at the first value, continued here: its saddle terms and its
      -- residue terms are analytic in the parameter, and equal the held-contour integral
      -- (kh, whose own decomposition settles which residues its steepest paths need)
      -- but for the crossings of the held contour since (each adds a term to the
      -- integral, and the formula misses it; with the terms, it is kh). (Its saddle part alone plus the windings it
      -- had then was off by 2 pi i Res wherever a pole had crossed a steepest path but
      -- not the held contour: 2e-29 stated for an error of 0.7, unflagged.) A crossing at
      -- a step where the rescaling is singular went through infinity with the whole
      -- plane: no residue term applies to it, and past it the formula is derived afresh.
      local function windings(seg, upto, through_singular)
        local w_formula, w_now = {}, {}
        for _, sp in ipairs(seg.poles) do
          if sp.id then
            w_formula[sp.id] = (w_formula[sp.id] or 0) + sp.winding
            w_now[sp.id] = (w_now[sp.id] or 0) + sp.winding
          end
        end
        for _, e in ipairs(cross.events) do
          if e.kind == "side change" and e.id and e.term then
            local idx_e = index_of(e.at)
            if idx_e and idx_e > seg.index and idx_e <= upto
                and (through_singular or not singular_steps[idx_e]) then
              w_now[e.id] = (w_now[e.id] or 0) + (e.before == "left" and -1 or 1)
            end
          end
        end
        return w_formula, w_now
      end
      -- the crossing terms: 2 pi i Res for each winding changed since the formula
      local function crossing_terms(w_formula, w_now)
        local val, err = cnew(0, 0), 0
        for id, w in pairs(w_now) do
          local dw = w - (w_formula[id] or 0)
          if dw ~= 0 then
            local r, re = residue_of(id)
            if r then
              val = val + cnew(0, 2 * pi * dw) * r
              err = err + 2 * pi * abs(dw) * (re or 0)
            else
              row.notes[#row.notes + 1] = "a pole of the formula was not found here"
            end
          end
        end
        return val, err
      end
      -- (the formula from the first value misses every crossing since, those through
      -- infinity at a singular rescaling too; its correction exists only before those)
      local corr, corr_err = crossing_terms(windings(segments[1], k, true))
      -- orientation: past a sign change of dt/ds the held contour runs the other way
      local cf = K.rescaling.factor:value(setmetatable({ [K.var.name] = 0 }, { __index = p }))
      local ratio = cf / c0
      local orient = (cparts(ratio) < 0) and -1 or 1
      row.rescaled, row.rescaled_error = orient * kh.value, kh.error
      row.formula = orient * (kh.value - corr)
      local ferr = kh.error + corr_err
      local seg = segment_of(k)
      if seg.index > 1 then
        -- past a singular rescaling: the crossing terms do not carry the first formula
        -- over; the formula derived afresh at the first value beyond, with the crossings
        -- since then
        row.notes[#row.notes + 1] = format("the rescaling is singular between %s = %s and "
          .. "%s: the formula from %s = %s cannot be carried through that by residues (the "
          .. "poles went through infinity with the plane); it is derived afresh at %s = %s",
          x, tostring(values[seg.index - 1]), tostring(values[seg.index]), x,
          tostring(values[1]), x, tostring(values[seg.index]))
        row.fresh, row.fresh_error, row.fresh_from = orient * kh.value, kh.error,
          values[seg.index]
        row.corrected, row.correction = nil, nil
      else
        row.correction = orient * corr
        row.corrected = orient * kh.value
      end
      row.formula_error = ferr
      row.corrected_error = row.corrected and kh.error or nil
      row.orientation = orient
    else
      row.notes[#row.notes + 1] = "rescaled route failed: " .. tostring(kh)
    end
    -- verdicts
    local scale = math.max(cabs(q), 1e-300)
    local function agrees(val, err)
      -- (within the estimates as stated, 1x; the last term: rounding of the routes)
      return val and cabs(val - q) <= (err or 0) + qe + 1e-12 * scale
    end
    row.unrescaled_ok = agrees(row.unrescaled, row.unrescaled_error)
    row.rescaled_ok = agrees(row.rescaled, row.rescaled_error)
    row.corrected_ok = agrees(row.corrected, row.corrected_error)
    row.formula_ok = agrees(row.formula, row.formula_error)
    if row.fresh then row.fresh_ok = agrees(row.fresh, row.fresh_error) end
    if row.formula and not row.formula_ok and row.corrected_ok then
      row.notes[#row.notes + 1] = "the formula derived at the first value misses a residue "
        .. "after a crossing; with the correction it agrees"
    elseif row.corrected and not row.corrected_ok then
      row.notes[#row.notes + 1] = "the corrected rescaled formula disagrees with quadrature"
    elseif row.fresh and not row.fresh_ok then
      row.notes[#row.notes + 1] = "the formula derived afresh disagrees with quadrature"
    end
    if row.unrescaled and not row.unrescaled_ok then
      row.notes[#row.notes + 1] = "the unrescaled expansion disagrees with quadrature"
    end
    if row.rescaled and not row.rescaled_ok then
      row.notes[#row.notes + 1] = "the rescaled route on the held contour disagrees with quadrature"
    end
    -- an error estimate as large as the value: agreement within it says nothing
    local function accurate(val, err) return val ~= nil and (err or 0) < cabs(val) end
    row.unrescaled_accurate = accurate(row.unrescaled, row.unrescaled_error)
    row.rescaled_accurate = accurate(row.rescaled, row.rescaled_error)
    row.corrected_accurate = accurate(row.corrected, row.corrected_error)
    row.formula_accurate = accurate(row.formula, row.formula_error)
    if row.fresh then row.fresh_accurate = accurate(row.fresh, row.fresh_error) end
    -- every route that gave a value misses quadrature, beyond its estimate or within an
    -- estimate that carries no accuracy: the routes are wrong together
    local any, good = false, false
    for _, k in ipairs({ "unrescaled", "rescaled", "corrected", "fresh" }) do
      if row[k] then
        any = true
        if row[k .. "_ok"] and row[k .. "_accurate"] then good = true end
      end
    end
    row.all_routes_fail = any and not good
    if row.all_routes_fail then
      row.notes[#row.notes + 1] = "no route is accurate here: each misses quadrature beyond its "
        .. "error estimate or has an estimate as large as its value (the expansions fail at "
        .. "this value)"
    end
    rows[#rows + 1] = row
  end
  local out = { rows = rows, crossings = cross, rescaled = K, large = x, order = order,
    integral = J }
  return setmetatable(out, { __index = { report = M.compare_report } })
end

function M.compare_report(c, opts)
  local report_m = require "steep.report"
  local other = report_m.format(opts, c, c.rows,
    { "x", "unrescaled", "unrescaled_error", "rescaled", "rescaled_error", "formula",
      "formula_error", "correction", "corrected", "corrected_error", "fresh", "fresh_error",
      "fresh_from", "quad", "quad_error",
      "unrescaled_ok", "rescaled_ok", "corrected_ok", "formula_ok", "all_routes_fail" })
  if other then return other end
  local num, wrap = report_m.num, report_m.wrap
  local lines = {}
  lines[#lines + 1] = wrap(tostring(c.integral), "routes for ", 4)
  lines[#lines + 1] = wrap(format("%s = %s; %s", c.integral.var.name, tostring(c.rescaled.rescaling.t),
    c.rescaled.homogeneity.ok and c.rescaled.homogeneity.text or
    ("not homogeneous: " .. tostring(c.rescaled.homogeneity.why))), "rescaled: ", 4)
  local x0 = c.rows[1] and num(c.rows[1].x, nil, 6) or "?"
  local routes = {
    { "unrescaled", "unrescaled", "U" },
    { "rescaled, held contour", "rescaled", "H" },
    { "formula from " .. c.large .. " = " .. x0, "formula", "f" },
    { "formula + crossing terms", "corrected", "R" },
    { "formula derived afresh", "fresh", "F" },
  }
  local columns = { { c.large }, { "route" }, { "value" }, { "estimate" }, { "flags" } }
  local groups = {}
  for _, r in ipairs(c.rows) do
    local t = {}
    for _, route in ipairs(routes) do
      local v, e = r[route[2]], r[route[2] .. "_error"]
      if v ~= nil then
        local flags = {}
        if r[route[2] .. "_ok"] == false then flags[#flags + 1] = route[3] end
        if r[route[2] .. "_accurate"] == false then flags[#flags + 1] = route[3] .. "?" end
        local label = route[1]
        if route[2] == "fresh" then
          label = "formula from " .. c.large .. " = " .. num(r.fresh_from, nil, 6) .. " (afresh)"
        end
        t[#t + 1] = { label, num(v, e), e and format("%.2g", e) or "-", table.concat(flags, " ") }
      elseif route[2] == "corrected" and r.fresh then
        t[#t + 1] = { route[1], "not applicable (see notes)", "", "" }
      elseif route[2] ~= "fresh" then
        t[#t + 1] = { route[1], "failed (see notes)", "", route[3] }
      end
    end
    t[#t + 1] = { "quadrature", num(r.quad, r.quad_error), format("%.2g", r.quad_error), "" }
    for k, cells in ipairs(t) do table.insert(cells, 1, k == 1 and num(r.x) or "") end
    groups[#groups + 1] = t
  end
  -- one table, its columns as wide as the widest cell of any value; notes after each value
  local all = {}
  for _, t in ipairs(groups) do for _, cells in ipairs(t) do all[#all + 1] = cells end end
  local widths = report_m.widths(columns, all)
  lines[#lines + 1] = report_m.table(columns, {}, nil, 0, widths)
  for i, r in ipairs(c.rows) do
    lines[#lines + 1] = report_m.table(columns, groups[i], nil, 0, widths, true)
    for _, n in ipairs(r.notes) do lines[#lines + 1] = wrap(n, "  note: ", 8) end
  end
  lines[#lines + 1] = wrap("U, H, f, R, F: the route (unrescaled; rescaled on the held contour; "
    .. "the formula derived at the first value; that formula with the crossing terms; the "
    .. "formula derived afresh past a singular rescaling) disagrees with quadrature beyond the "
    .. "estimates; a letter with ? marks an estimate as large as the value (agreement within "
    .. "it carries no accuracy)", "flags: ", 4)
  lines[#lines + 1] = c.crossings:report()
  return table.concat(lines, "\n")
end

return M
