-- steep.integral — the integral object: J = integral over a contour C of
-- g(t) exp(F(t)) dt, with a large parameter. Its methods map the landscape at given
-- parameter values and compute the integral by quadrature.

local core = require "steep.core"
local complex = require "steep.complex"
local expr = require "steep.expr"
local contour_m = require "steep.contour"
local landscape = require "steep.landscape"
local decompose = require "steep.decompose"

local cnew, cparts, is_complex = complex.new, complex.parts, complex.is
local cabs, carg, expi = landscape.cabs, landscape.carg, landscape.expi
local format, pi, abs, huge = string.format, math.pi, math.abs, math.huge

local M = {}
local Integral = { __name = "steep.integral" }
local methods = {}
Integral.__index = methods

local function argerror(fname, msg) error(format("bad argument #1 to '%s' (%s)", fname, msg), 3) end

--- steep.integral{var =, exponent =, amplitude =, contour =, large =}
function M.new(spec)
  if type(spec) ~= "table" then argerror("integral", "table expected, got " .. type(spec)) end
  -- several variables (a list): lua/steep/multi.lua
  if type(spec.var) == "table" and not expr.is(spec.var) then return require("steep.multi").new(spec) end
  local known = { var = true, exponent = true, amplitude = true, contour = true, large = true }
  for k in pairs(spec) do
    if not known[k] then
      argerror("integral", format("unknown field '%s' (fields: var, exponent, amplitude, "
        .. "contour, large)", tostring(k)))
    end
  end
  local t = spec.var
  if not (expr.is(t) and t.op == "var") then
    argerror("integral", "field 'var' must be a variable made by steep.var, got "
      .. (expr.is(t) and t.op or type(t)))
  end
  local F = spec.exponent
  if not expr.is(F) then
    argerror("integral", "field 'exponent' must be an expression in " .. t.name .. ", got "
      .. (is_complex(F) and "a complex value" or type(F)))
  end
  if not F:depends_on(t) then
    argerror("integral", "the exponent " .. tostring(F) .. " does not depend on " .. t.name)
  end
  local g = spec.amplitude
  if g == nil then g = 1 end
  if not (expr.is(g) or cparts(g)) then
    argerror("integral", "field 'amplitude' must be an expression, number or complex value, got "
      .. type(g))
  end
  if not contour_m.is(spec.contour) then
    argerror("integral", "field 'contour' must be a contour (steep.line, steep.path, "
      .. "steep.circle), got " .. type(spec.contour))
  end
  local large = spec.large
  if large ~= nil and not (expr.is(large) and large.op == "param") then
    argerror("integral", "field 'large' must be a parameter made by steep.param")
  end
  local J = setmetatable({ var = t, exponent = F, amplitude = g, contour = spec.contour,
    large = large }, Integral)
  J.tape = expr.compile({ F, g }, t, 3)
  J.params = J.tape:params()
  J.critical = landscape.critical(F, g, t)
  return J
end

function methods.critical_tape(J)
  if not J._htape then
    local hs = {}
    for k, c in ipairs(J.critical) do hs[k] = c.h end
    J._htape = expr.compile(hs, J.var)
  end
  return J._htape
end

Integral.__tostring = function(J)
  local g = J.amplitude
  local gs = (g == 1) and "" or ("(" .. tostring(g) .. ")*")
  return format("integral of %sexp(%s) d%s along %s", gs, tostring(J.exponent), J.var.name,
    tostring(J.contour))
end

--- Splits an options table into parameter values (by the integral's parameter names)
-- and options (names in `allowed`); anything else is an error naming it.
function M.split_options(J, opts, allowed, fname)
  if opts ~= nil and type(opts) ~= "table" then
    error(format("bad argument #1 to '%s' (options table expected, got %s)", fname, type(opts)), 3)
  end
  opts = opts or {}
  local params, o = {}, {}
  local is_param = {}
  for _, name in ipairs(J.params) do is_param[name] = true end
  for k, v in pairs(opts) do
    if is_param[k] then
      local re, im = cparts(v)
      if not re then
        error(format("%s: parameter '%s' must be a number or complex value, got %s", fname, k,
          type(v)), 3)
      end
      if re ~= re or im ~= im or abs(re) == huge or abs(im) == huge then
        error(format("%s: parameter '%s' is not finite (%s)", fname, k, tostring(v)), 3)
      end
      params[k] = v
    elseif allowed[k] then
      o[k] = v
    else
      local names = {}
      for n in pairs(allowed) do names[#names + 1] = n end
      table.sort(names)
      error(format("%s: unknown option '%s' (parameters: %s; options: %s)", fname,
        tostring(k), #J.params > 0 and table.concat(J.params, ", ") or "none",
        table.concat(names, ", ")), 3)
    end
  end
  for _, name in ipairs(J.params) do
    if params[name] == nil then
      error(format("%s: unbound parameter '%s' (give %s = <value>)", fname, name, name), 3)
    end
  end
  return params, o
end

-- The default region: a disc about 0 holding the contour's finite points and, found by
-- the argument principle on doubling circles, every saddle: the count of zeros of F'
-- (less its poles) must be the same on three circles in a row, and show a saddle: be
-- positive, or differ from the count on the first circle (a log point makes it -1 until
-- the saddle is enclosed, as for t - z log t). With no saddle at all the region stays at
-- the contour's scale; exponents with infinitely many saddles stop at a bound (and the
-- landscape says so).
local function default_region(J, params)
  local R0 = 1
  for _, z in ipairs(J.contour:finite_points()) do R0 = math.max(R0, 1.5 * cabs(z)) end
  local counts = {}
  local any, first = false, nil
  for k = 0, 11 do
    local st, n = core.count(J.tape, params, { out = 1, deriv = 1 }, cnew(0, 0), R0 * 2 ^ k, 20000)
    counts[k] = st == "ok" and n or nil
    first = first or counts[k]
    local saddle = counts[k] and (counts[k] > 0 or counts[k] ~= first)
    if saddle then any = true end
    if k >= 2 and saddle and counts[k] == counts[k - 1] and counts[k] == counts[k - 2] then
      return { center = cnew(0, 0), radius = R0 * 2 ^ (k - 1) }
    end
  end
  if not any then return { center = cnew(0, 0), radius = 2 * R0 } end
  return { center = cnew(0, 0), radius = 4 * R0, bounded = true }
end

-- The largest region radius, relative to the problem's scale (1, |center| and the
-- contour's finite points): beyond it the contour's points cannot be told apart from the
-- center in double precision, and the rings sampled for the valleys overflow.
local MAX_REGION_RATIO = 1e15

-- Checks a user's region (level: the error level to blame). With J, also that it is
-- usable for J: not absurdly large, and (except for J:landscape), when the contour has an
-- end at infinity, near enough the contour for the valleys (sampled on rings of 4 to 16
-- radii about the center) to describe the directions in which its ends leave.
local function check_region(region, fname, J, level)
  level = level or 3
  if type(region) ~= "table" then
    error(format("%s: option 'region' must be a table {center =, radius =}", fname), level)
  end
  local c = region.center or 0
  local re, im = cparts(c)
  if not re or re ~= re or im ~= im or abs(re) == huge or abs(im) == huge then
    error(format("%s: region center must be a finite number or complex value", fname), level)
  end
  local r = region.radius
  if type(r) ~= "number" or not (r > 0) or r == huge then
    error(format("%s: region radius must be a positive finite number, got %s", fname,
      tostring(r)), level)
  end
  local center = cnew(re, im)
  if J then
    local scale = math.max(1, cabs(center))
    for _, z in ipairs(J.contour:finite_points()) do scale = math.max(scale, cabs(z)) end
    if r > MAX_REGION_RATIO * scale then
      error(format("%s: region radius %.4g is too large for this problem (at most %.0e "
        .. "times its scale %.4g, from the center and the contour's finite points): "
        .. "give the radius at the scale of the saddles and the contour", fname, r,
        MAX_REGION_RATIO, scale), level)
    end
    -- (J:landscape may look at any region: it does not use the contour)
    if not J.contour.closed and fname ~= "landscape" then
      for _, p in ipairs(J.contour.pieces) do
        local a = (p.kind == "ray_out" and p.a) or (p.kind == "ray_in" and p.b) or nil
        if a and cabs(a - center) > 4 * r then
          error(format("%s: the region (center %s, radius %.4g) is too far from the "
            .. "contour: its end at infinity in direction %.6g leaves from %s, %.3g radii "
            .. "from the center, and the valleys at infinity are seen from 4 to 16 radii "
            .. "about the center; center the region nearer (or enlarge it)", fname,
            tostring(center), r, p.angle, tostring(a), cabs(a - center) / r), level)
        end
      end
    end
  end
  return { center = center, radius = r }
end
M.check_region = check_region

--- J:landscape{<params>, region = {center =, radius =}} -> landscape
function methods.landscape(J, opts)
  local params, o = M.split_options(J, opts, { region = true, paths = true }, "landscape")
  return J:_landscape(params, o.region and check_region(o.region, "landscape", J), o.paths ~= false)
end

-- A key for the landscape cache: parameter values and region, exactly.
local function landscape_key(params, region, with_paths)
  local parts = {}
  for k, v in pairs(params) do
    local re, im = cparts(v)
    parts[#parts + 1] = format("%s=%a,%a", k, re, im)
  end
  table.sort(parts)
  if region then
    local re, im = cparts(region.center)
    parts[#parts + 1] = format("region=%a,%a,%a", re, im, region.radius)
  end
  parts[#parts + 1] = with_paths and "paths" or ""
  return table.concat(parts, ";")
end

function methods._landscape(J, params, region, with_paths, cont)
  -- the same parameters give the same landscape: keep the last few (expand and quad at
  -- one point, as J:check does, map it once)
  local key = not cont and landscape_key(params, region, with_paths)
  J._lcache = J._lcache or {}
  if key then
    for _, e in ipairs(J._lcache) do if e.key == key then return e.L end end
  end
  local L = J:_landscape_uncached(params, region, with_paths, cont)
  if key then
    table.insert(J._lcache, 1, { key = key, L = L })
    J._lcache[5] = nil
  end
  return L
end

function methods._landscape_uncached(J, params, region, with_paths, cont)
  region = region or default_region(J, params)
  local L = { region = region, params = params, notes = {} }
  if cont and cont.fast then
    -- continuation: the previous step's saddles seed Newton; no search of the region
    local sing = landscape.singularities(J, params, region,
      { fast = true, seeds = cont.sing_seeds or {}, radii = cont.sing_radii })
    L.singularities = sing
    L.saddles, L.saddle_count = landscape.saddles(J, params, region, sing, cont.seeds, true)
    L.valleys, L.growth = landscape.valleys(J, params, region, { fast = true })
    return setmetatable(L, { __index = { report = M.landscape_report } })
  end
  if region.bounded then
    L.notes[#L.notes + 1] = "the number of saddles keeps growing with the region (infinitely "
      .. "many?): the region was limited to radius " .. format("%.4g", region.radius)
      .. " (four times the contour's scale); give region = {...} to choose"
  end
  local sing, sinfo = landscape.singularities(J, params, region)
  L.singularities, L.singularity_info = sing, sinfo
  local seeds = {}
  for _, z in ipairs(J.contour:finite_points()) do seeds[#seeds + 1] = z end
  local saddles, info = landscape.saddles(J, params, region, sing, seeds)
  L.saddles, L.saddle_count = saddles, info
  L.valleys, L.growth = landscape.valleys(J, params, region)
  if with_paths then
    L.paths = {}
    for j = 1, #saddles do L.paths[j] = landscape.saddle_paths(J, params, L, j) end
  end
  return setmetatable(L, { __index = { report = M.landscape_report } })
end

function M.landscape_report(L, opts)
  local other = require("steep.report").format(opts, { region = L.region, saddles = L.saddles,
    singularities = L.singularities, valleys = L.valleys, notes = L.notes,
    saddle_count = L.saddle_count })
  if other then return other end
  local lines = {}
  local function add(...) lines[#lines + 1] = format(...) end
  add("region: center %s, radius %.4g", tostring(L.region.center), L.region.radius)
  add("saddles (%s):", L.saddle_count.status)
  for j, s in ipairs(L.saddles) do
    add("  %d. t = %-28s order %d   F = %s   F'' = %s", j, tostring(s.at), s.order,
      tostring(s.F), tostring(s.F2))
  end
  add("singularities:")
  if #L.singularities == 0 then add("  none found") end
  for j, s in ipairs(L.singularities) do
    local extra = s.residue and ("   residue " .. tostring(s.residue)) or ""
    if s.order then extra = format("   order %d", s.order) .. extra end
    add("  %d. %-9s at %s%s   (%s)", j, s.kind, tostring(s.at), extra, s.source)
  end
  add("valleys at infinity:")
  for k, v in ipairs(L.valleys) do add("  %d. %s", k, landscape.describe_valley(v)) end
  if L.paths then
    add("steepest paths:")
    for j, p in pairs(L.paths) do
      local d, a = {}, {}
      for _, q in ipairs(p.descent) do d[#d + 1] = q.ends end
      for _, q in ipairs(p.ascent) do a[#a + 1] = q.ends end
      add("  saddle %d: descent to %s; ascent to %s", j, table.concat(d, ", "),
        table.concat(a, ", "))
    end
  end
  for _, n in ipairs(L.notes) do add("note: %s", n) end
  return table.concat(lines, "\n")
end

---------------------------------------------------------------------------------------
-- Quadrature.
---------------------------------------------------------------------------------------

local QUAD_REL = 1e-13

-- Is z (nearly) at a singularity where the integrand may blow up integrably or vanish?
local function singular_at(L, z)
  for _, s in ipairs(L.singularities) do
    if cabs(s.at - z) <= 1e-9 * L.region.radius then return s end
  end
end

-- A ray from a in direction th, as pieces [0, L0], [L0, 2 L0], ... until the tail is
-- negligible; a ray on the edge of a valley is turned by a small angle into the valley.
local function quad_ray(J, params, L, a, th, sign, singular_start, notes)
  local k, boundary = landscape.valley_of(L.valleys, th)
  if boundary then
    local v = L.valleys[k]
    local inward = (abs(landscape.norm_angle(th - v.from)) < 1e-6) and 1 or -1
    local width = v.to - v.from
    local tilt = math.min(0.05, 0.25 * width) * inward
    -- the wedge swept must hold no singularity
    for _, s in ipairs(L.singularities) do
      local d = landscape.norm_angle(carg(s.at - a) - th)
      if d * inward > 0 and abs(d) < abs(tilt) then tilt = 0.5 * d end
    end
    th = th + tilt
    notes[#notes + 1] = format("the end in direction %.4g lies on the edge of its valley "
      .. "(the integrand oscillates without decaying); its ray was turned by %.3g rad into "
      .. "the valley", th - tilt, tilt)
  end
  local dir = expi(th)
  local scale = math.max(1, 0.1 * L.region.radius, 0.1 * cabs(a))
  local total, err, evals = cnew(0, 0), 0, 0
  local s0, len = 0, scale
  local status = "ok"
  local small = 0
  for piece = 1, 200 do
    local p0, p1 = a + s0 * dir, a + (s0 + len) * dir
    local v, e, ev, st = core.quad_polyline(J.tape, params, { p0, p1 },
      { reltol = QUAD_REL, abstol = 0, singular_start = singular_start and piece == 1 })
    evals = evals + ev
    if st ~= "ok" then status = st end
    total, err = total + v, err + e
    if cabs(v) <= 1e-16 * cabs(total) or cabs(v) == 0 then
      small = small + 1
      if small >= 2 then break end
    else
      small = 0
    end
    if piece == 200 then
      status = "limit"
      notes[#notes + 1] = format("the ray in direction %.4g did not converge", th)
    end
    s0 = s0 + len
    len = len * 2
  end
  if sign < 0 then total = -total end
  return total, err, evals, status
end

-- A full circle by the trapezoidal rule, doubling the number of points until two
-- estimates agree (exponentially convergent for an integrand analytic near the circle)
-- to 1e-14 relative, or to the rounding floor: a few units in the last place of the
-- integral of |integrand| (when the value is much smaller, as a Cauchy coefficient on a
-- small circle, rounding leaves that much noise).
local function quad_circle(J, params, p)
  local n, prev = 64, nil
  local evals = 0
  while n <= 2 ^ 17 do
    local pts = {}
    for k = 0, n - 1 do pts[k + 1] = p.center + p.radius * expi(2 * pi * k / n) end
    local vals = core.integrand_many(J.tape, params, pts)
    evals = evals + n
    local s, l1 = cnew(0, 0), 0
    for k = 0, n - 1 do
      local v = vals:get(k + 1)
      s = s + v * expi(2 * pi * k / n)
      l1 = l1 + cabs(v)
    end
    local dir = p.to > p.from and 1 or -1
    s = s * cnew(0, 2 * pi * p.radius / n) * dir
    local floor = 8 * 2.2e-16 * l1 * 2 * pi * p.radius / n
    if prev then
      local d = cabs(s - prev)
      if d <= 1e-14 * math.max(cabs(s), 1e-300) + floor + 1e-300 then
        return s, d + floor, evals, "ok"
      end
      if n >= 2 ^ 17 then return s, d + floor, evals, "limit" end
    end
    prev = s
    n = n * 2
  end
  return prev, cabs(prev), evals, "limit"
end

-- Along the user's contour, piece by piece.
local function quad_given(J, params, L)
  local total, err, evals, status = cnew(0, 0), 0, 0, "ok"
  local notes = {}
  local R = L.region.radius
  decompose.check_contour(L, J.contour, J.contour:sample { radius = 8 * R, n = 64 })
  -- an end at infinity outside every valley: the integral diverges there. Said before
  -- integrating where the valleys are exact (polynomial growth); said after, from the
  -- value, where they are indicative (found by sampling).
  local function diverges(p)
    local vs = {}
    for _, v in ipairs(L.valleys) do vs[#vs + 1] = landscape.describe_valley(v) end
    error(format("quad: the contour's %s end at infinity in direction %.6g is outside every "
      .. "valley: the integral diverges there (valleys: %s)",
      p.kind == "ray_in" and "starting" or "finishing", p.angle,
      #vs > 0 and table.concat(vs, ", ") or "none"), 0)
  end
  local exact = #L.valleys > 0
  for _, v in ipairs(L.valleys) do
    if v.type ~= "polynomial" and v.type ~= "edge" then exact = false end
  end
  for _, p in ipairs(J.contour.pieces) do
    if (p.kind == "ray_in" or p.kind == "ray_out") and exact
        and not landscape.valley_of(L.valleys, p.angle) then
      diverges(p)
    end
  end
  for _, p in ipairs(J.contour.pieces) do
    local v, e, ev, st
    if p.kind == "segment" then
      v, e, ev, st = core.quad_polyline(J.tape, params, { p.a, p.b }, { reltol = QUAD_REL,
        singular_start = singular_at(L, p.a) ~= nil, singular_end = singular_at(L, p.b) ~= nil })
    elseif p.kind == "ray_out" then
      v, e, ev, st = quad_ray(J, params, L, p.a, p.angle, 1, singular_at(L, p.a) ~= nil, notes)
    elseif p.kind == "ray_in" then
      v, e, ev, st = quad_ray(J, params, L, p.b, p.angle, -1, singular_at(L, p.b) ~= nil, notes)
    else
      v, e, ev, st = quad_circle(J, params, p)
    end
    if (p.kind == "ray_in" or p.kind == "ray_out") and not landscape.valley_of(L.valleys, p.angle)
        and not (cabs(v) < huge) then
      diverges(p)
    end
    total, err, evals = total + v, err + e, evals + ev
    if st ~= "ok" then status = st end
  end
  return total, err, { status = status, evals = evals, notes = notes, along = "given" }
end

-- Along the steepest descent decomposition, plus residues.
local function quad_deformed(J, params, L)
  local plan = decompose.decompose(J, params, L, J.contour)
  local info = { along = "deformed", status = plan.status, notes = plan.notes,
    evals = plan.evals, pieces = {}, residues = {} }
  if plan.status ~= "ok" then return nil, nil, info end
  local total, err = cnew(0, 0), 0
  for _, piece in ipairs(plan.pieces) do
    if #piece.points >= 2 then
      local singular_end = piece.reason == "singular" or piece.reason == "stop"
      local v, e, ev, st = core.quad_polyline(J.tape, params, piece.points,
        { reltol = QUAD_REL, singular_start = piece.kind == "endpoint" and singular_at(L, piece.at) ~= nil,
          singular_end = singular_end })
      info.evals = info.evals + ev
      if st ~= "ok" then info.status = "quadrature " .. st end
      total = total + piece.weight * v
      err = err + abs(piece.weight) * e
      info.pieces[#info.pieces + 1] = { kind = piece.kind, index = piece.index, at = piece.at,
        weight = piece.weight, value = v, error = e, ends = piece.ends }
    end
  end
  -- poles very close to a piece of the path (relative to the region)
  for _, s in ipairs(L.singularities) do
    if s.kind == "pole" then
      for _, piece in ipairs(plan.pieces) do
        if #piece.points >= 2 then
          local d = core.distance(piece.points, s.at)
          if d < 1e-3 * L.region.radius and (not info.near_pole or d < info.near_pole) then
            info.near_pole = d
          end
        end
      end
    end
  end
  for _, r in ipairs(plan.residues) do
    local s = L.singularities[r.index]
    local v = cnew(0, 2 * pi * r.winding) * s.residue
    total = total + v
    err = err + 2 * pi * abs(r.winding) * s.residue_error
    info.residues[#info.residues + 1] = { at = s.at, winding = r.winding, residue = s.residue,
      value = v }
  end
  return total, err, info
end

--- J:quad{<params>, along = "deformed" | "given", region = {...}}
-- -> value, error estimate, info {status, evals, along, notes, pieces, residues}
function methods.quad(J, opts)
  local params, o = M.split_options(J, opts, { along = true, region = true }, "quad")
  local along = o.along or "deformed"
  if along ~= "deformed" and along ~= "given" then
    error(format("quad: option 'along' must be \"deformed\" or \"given\", got %s",
      tostring(along)), 2)
  end
  local L = J:_landscape(params, o.region and check_region(o.region, "quad", J), false)
  return M.quad_with(J, params, L, along)
end

--- The quadrature on a landscape already mapped (sweeps reuse theirs).
function M.quad_with(J, params, L, along)
  local v, e, info
  if along == "given" then
    v, e, info = quad_given(J, params, L)
  else
    v, e, info = quad_deformed(J, params, L)
    if v == nil then
      -- the decomposition could not be completed: say so, and integrate as given
      local why = info.status .. ": " .. table.concat(info.notes, "; ")
      v, e, info = quad_given(J, params, L)
      table.insert(info.notes, 1, "the steepest-descent deformation was not used (" .. why .. ")")
    elseif info.near_pole then
      -- Gauss-Kronrod's estimate is not to be trusted with a pole this close to the
      -- path: compare with the given contour where that converges
      local ok, v2, e2, info2 = pcall(quad_given, J, params, L)
      if ok and info2.status == "ok" then
        e = math.max(e, cabs(v - v2))
        info.notes[#info.notes + 1] = format("a pole lies %.2g from the deformed path; the "
          .. "error estimate includes the difference from quadrature along the given "
          .. "contour (%.2g)", info.near_pole, cabs(v - v2))
        if e2 < e then v, e = v2, math.max(e2, 0) end
      else
        info.notes[#info.notes + 1] = format("a pole lies %.2g from the deformed path: "
          .. "the quadrature error estimate may be optimistic", info.near_pole)
        info.status = "suspect"
      end
    end
  end
  -- rounding floor: exp(F) inherits the absolute rounding error of F itself, about
  -- eps |F| relative, where |F| is largest among the points that dominate (saddles,
  -- finite contour points); plus a few units in the last place of the result
  local Fmax = 0
  for _, s in ipairs(L.saddles) do Fmax = math.max(Fmax, cabs(s.F)) end
  for _, z in ipairs(J.contour:finite_points()) do
    local ok, F = pcall(J.tape.eval, J.tape, z, params)
    if ok and cabs(F) == cabs(F) and cabs(F) < huge then Fmax = math.max(Fmax, cabs(F)) end
  end
  e = math.max(e, (4 + Fmax) * 2.2e-16 * cabs(v))
  info.landscape = L
  return v, e, info
end

---------------------------------------------------------------------------------------
-- Expansions (lua/steep/asymptotics.lua does the work).
---------------------------------------------------------------------------------------

--- J:expand{<params>, order = N | "optimal", region = {...}} -> result
function methods.expand(J, opts)
  local params, o = M.split_options(J, opts, { order = true, region = true, verify = true },
    "expand")
  o.order = require("steep.asymptotics").check_order(o.order or 1, "expand")
  if o.region then o.region = check_region(o.region, "expand", J) end
  return require("steep.asymptotics").expand(J, params, o)
end

--- J:series{order = N, <params>} -> list of contributions in the standard form
-- (the large parameter may be left out: the coefficients do not depend on it)
function methods.series(J, opts)
  opts = opts or {}
  local full = {}
  for k, v in pairs(opts) do full[k] = v end
  if J.large and full[J.large.name] == nil then full[J.large.name] = 1 end
  local params, o = M.split_options(J, full, { order = true, region = true }, "series")
  if o.region then o.region = check_region(o.region, "series", J) end
  return require("steep.asymptotics").series(J, params, o)
end

--- J:check{<large> = {values}, <other params>, order = N} -> verification table
function methods.check(J, opts)
  if type(opts) ~= "table" then error("bad argument #1 to 'check' (options table expected)", 2) end
  if not J.large then error("check: the integral names no large parameter (large = ...)", 2) end
  local values = opts[J.large.name]
  if type(values) ~= "table" or #values == 0 then
    error(format("check: give the values of the large parameter as a list, %s = {...}",
      J.large.name), 2)
  end
  local rest = {}
  for k, v in pairs(opts) do rest[k] = v end
  rest[J.large.name] = values[1]
  local params, o = M.split_options(J, rest, { order = true, region = true }, "check")
  params[J.large.name] = nil
  if o.region then o.region = check_region(o.region, "check", J) end
  return require("steep.asymptotics").check(J, params, values, o)
end

---------------------------------------------------------------------------------------
-- Routes (lua/steep/routes.lua).
---------------------------------------------------------------------------------------

function methods.rescale(J, opts) return require("steep.routes").rescale(J, opts) end
function methods.crossings(J, opts) return require("steep.routes").crossings(J, opts) end
function methods.compare(J, opts) return require("steep.routes").compare(J, opts) end
function methods.sweep(J, opts) return require("steep.routes").sweep(J, opts) end
function methods.suggest_rescaling(J, opts) return require("steep.routes").suggest(J, opts) end

--- J:map{<params>, file = "x.svg", ...} -> file, summary: a picture of the landscape
-- (lua/steep/map.lua).
function methods.map(J, opts) return require("steep.map").map(J, opts) end

M.Integral = Integral
return M
