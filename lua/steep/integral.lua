-- steep.integral — the integral object: J = integral over a contour C of
-- g(t) exp(F(t)) dt, with a large parameter. Its methods map the landscape at given
-- parameter values and compute the integral by quadrature.

local core = require "steep.core"
local complex = require "steep.complex"
local expr = require "steep.expr"
local contour_m = require "steep.contour"
local landscape = require "steep.landscape"
local decompose = require "steep.decompose"
local periodic = require "steep.periodic"
local strips = require "steep.strips"

local cnew, cparts, is_complex = complex.new, complex.parts, complex.is
local cabs, carg, expi = landscape.cabs, landscape.carg, landscape.expi
local format, pi, abs, huge = string.format, math.pi, math.abs, math.huge
local EPS = 2.220446049250313e-16

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
  -- (points beyond 1e150 leave no room for the squares and differences every geometric
  -- step takes: an end that far is an end at infinity)
  for _, z in ipairs(spec.contour:finite_points()) do
    if not (cabs(z) <= 1e150) then
      argerror("integral", format("the contour's point %s is too far out to compute with "
        .. "(|t| > 1e150): give that end as steep.inf(angle), or rescale the variable",
        tostring(z)))
    end
  end
  local large = spec.large
  if large ~= nil and not (expr.is(large) and large.op == "param") then
    argerror("integral", "field 'large' must be a parameter made by steep.param")
  end
  local J = setmetatable({ var = t, exponent = F, amplitude = g, contour = spec.contour,
    large = large }, Integral)
  -- an amplitude that is the constant 0: every method returns exactly 0
  local gr, gi = cparts(expr.is(g) and g.op == "const" and complex.new(g.re, g.im) or g)
  J.zero_amplitude = gr == 0 and gi == 0
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
-- landscape says so). Past the 12 circles, one count on a far circle (FAR_DOUBLINGS
-- doublings out) says whether saddles lie beyond: then the doubling goes on until the
-- count settles there (the Gamma integral x log t - t - x log x + x has its saddle at
-- t = x: at x = 520 it lay past the 12 circles, and quadrature returned 0).
local FAR_DOUBLINGS = 40
local function default_region(J, params, poly_saddles)
  local R0 = 1
  for _, z in ipairs(J.contour:finite_points()) do R0 = math.max(R0, 1.5 * cabs(z)) end
  if poly_saddles then
    -- a polynomial exponent: its saddles are all known. (A power of 2: neighbouring
    -- parameter values then share the region, and a sweep's rows do not depend on where
    -- it started.)
    for _, s in ipairs(poly_saddles) do R0 = math.max(R0, 1.25 * cabs(s.at)) end
    return { center = cnew(0, 0), radius = 2 ^ math.ceil(math.log(R0, 2)) }
  end
  local counts = {}
  local function count(k)
    if counts[k] == nil then
      local st, n = core.count(J.tape, params, { out = 1, deriv = 1 }, cnew(0, 0), R0 * 2 ^ k,
        20000)
      counts[k] = st == "ok" and n or false
    end
    return counts[k] or nil
  end
  local any, first = false, nil
  local function settled(k)
    local n = count(k)
    first = first or n
    local saddle = n and (n > 0 or n ~= first)
    if saddle then any = true end
    return k >= 2 and saddle and n == count(k - 1) and n == count(k - 2)
  end
  local last
  for k = 0, 11 do
    if settled(k) then last = k; break end
  end
  -- (a count that changed at the last circles: let it settle)
  for k = 12, any and not last and 15 or 0 do
    if settled(k) then last = k; break end
  end
  if not last and any then
    -- (the count still moving at the last circle: infinitely many saddles, as for
    -- e^{e^t}-like exponents; the landscape says so)
    return { center = cnew(0, 0), radius = 4 * R0, bounded = true }
  end
  -- the far circle: the same count, or saddles beyond (go on doubling until it settles)
  local far = count(FAR_DOUBLINGS)
  local here = last and count(last) or first
  if far and here and far ~= here then
    for k = (last or 11) + 1, FAR_DOUBLINGS do
      if count(k) == far and settled(k) then
        return { center = cnew(0, 0), radius = R0 * 2 ^ (k - 1) }
      end
    end
  end
  if last then return { center = cnew(0, 0), radius = R0 * 2 ^ (last - 1) } end
  return { center = cnew(0, 0), radius = 2 * R0 }
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

-- Whether two parameter tables hold the same values (numbers or complex values).
local function same_values(a, b)
  local n = 0
  for k, v in pairs(a) do
    local w = b[k]
    if w == nil then return false end
    local ar, ai = cparts(v)
    local br, bi = cparts(w)
    if ar ~= br or ai ~= bi then return false end
    n = n + 1
  end
  for _ in pairs(b) do n = n - 1 end
  return n == 0
end

function methods._landscape(J, params, region, with_paths, cont)
  -- the same parameters give the same landscape: keep the last few (expand and quad at
  -- one point, as J:check does, map it once); the last call's key is reused when its
  -- values are the same (formatting the key costs more than comparing)
  local key
  if not cont then
    local last = J._last_key
    if last and last.region == region and last.with_paths == with_paths
        and same_values(params, last.params) then
      key = last.key
    else
      key = landscape_key(params, region, with_paths)
      local copy = {}
      for k, v in pairs(params) do copy[k] = v end
      J._last_key = { params = copy, region = region, with_paths = with_paths, key = key }
    end
  end
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

-- The lengths the problem itself sets: each saddle's width |c|^(-1/m) (c the leading
-- Taylor coefficient of F - F0, m its order) and each finite end's 1/|F'| (the length
-- over which Watson's lemma's exponential falls by e). The region must see them: a saddle
-- of width 1e20 (x = 1e-40 in e^{-x t^2}) is not resolved by a region of radius 4.
local function needed_radius(J, params, saddles, center, R)
  local need = 0
  for _, s in ipairs(saddles) do
    -- (a saddle found inside the region, narrow next to it, is seen by it already)
    local w = s.width or 0
    if w < huge and w > 0.25 * R then need = math.max(need, cabs(s.at - center) + 4 * w) end
  end
  if not J.contour.closed then
    for _, e in ipairs({ J.contour:start(), J.contour:finish() }) do
      if not contour_m.is_inf(e) then
        -- (the length over which F changes by about 1: 1/|F'|, or 1/sqrt|F''/2| where
        -- the end sits next to a saddle and F' is small)
        local ok, Fs = pcall(J.tape.jet, J.tape, e, 2, params, 1)
        local w = huge
        if ok then
          local d1, d2 = cabs(Fs:coef(1)), cabs(Fs:coef(2))
          if d1 > 0 then w = math.min(w, 1 / d1) end
          if d2 > 0 then w = math.min(w, 1 / math.sqrt(d2)) end
        end
        if w < huge then need = math.max(need, cabs(e - center) + 4 * w) end
      end
    end
  end
  return need
end

-- With infinitely many saddles the region is limited. About a closed contour (a
-- coefficient integral: the chain of saddles its deformation runs through goes round a
-- hill, and is cut off by the region, the rest joined by lines between valleys) the region
-- doubles, at most RIM_GROWTH times, while a saddle in its outer half still lies within
-- e^RIM_DROP of the largest |g e^F| at a saddle, so that the parts beyond it are
-- negligible against the largest contribution.
local RIM_DROP, RIM_GROWTH = 20, 3
local function rim_matters(saddles, region)
  local top, levels = -huge, {}
  for k, s in ipairs(saddles) do
    local gm = cabs(s.g)
    levels[k] = cparts(s.F) + (gm > 0 and math.log(gm) or -huge)
    top = math.max(top, levels[k])
  end
  for k, s in ipairs(saddles) do
    if cabs(s.at - region.center) > 0.5 * region.radius and levels[k] > top - RIM_DROP then
      return true
    end
  end
  return false
end

function methods._landscape_uncached(J, params, region, with_paths, cont)
  local A = landscape.analysis(J, params)
  local poly = A and A.polynomial and A.degree >= 2
  -- (a sweep's continuation passes the previous step's region: not the user's choice)
  local given = region ~= nil and not (cont and cont.fast)
  local psaddles, pinfo
  if poly then psaddles, pinfo = landscape.polynomial_saddles(J, params, A) end
  if poly and not given then region = nil end   -- the saddles are known: fit them anew
  -- a periodic F' (exp, sinh, cosh of the variable): every saddle family exactly, its
  -- copies in the band of periods the contour visits (or in the user's region)
  local per
  if not poly then
    local list, info
    list, info, per = periodic.landscape_saddles(J, params, given and region or nil)
    if per then
      psaddles, pinfo = list, info
      if not given then region = periodic.region_for(J, list) end
    end
  end
  region = region or default_region(J, params, psaddles)
  local L = { region = region, params = params, notes = {}, analysis = A, var = J.var.name,
    periodic = per }
  local function find_saddles(sing, seeds, seeds_only)
    if per then return psaddles, pinfo end
    if poly and not given then return psaddles, pinfo end
    if poly then
      -- a region of the user's: the saddles inside it
      local inside = {}
      for _, s in ipairs(psaddles) do
        if cabs(s.at - L.region.center) < L.region.radius then inside[#inside + 1] = s end
      end
      return inside, { status = "complete", count = #inside, found = #inside,
        method = pinfo.method }
    end
    return landscape.saddles(J, params, L.region, sing, seeds, seeds_only)
  end
  if cont and cont.fast then
    -- continuation: the previous step's saddles seed Newton; no search of the region
    local sing, sinfo = landscape.singularities(J, params, region,
      { fast = true, seeds = cont.sing_seeds or {}, radii = cont.sing_radii,
        residue_radii = cont.sing_residue_radii })
    L.singularities, L.singularity_info = sing, sinfo
    L.saddles, L.saddle_count = find_saddles(sing, cont.seeds, true)
    local need = not given and needed_radius(J, params, L.saddles, L.region.center, L.region.radius) or 0
    if need > L.region.radius then
      L.region = { center = L.region.center, radius = 2 ^ math.ceil(math.log(need, 2)) }
      region = L.region
    end
    local info
    L.valleys, info = landscape.valleys(J, params, region, { fast = true })
    L.growth, L.strip_families = info, info.families
    return setmetatable(L, { __index = { report = M.landscape_report } })
  end
  -- the contour's finite points seed Newton too; of a path of many points, 64 spread
  -- along it (the search of the region finds the rest)
  local seeds, fp = {}, J.contour:finite_points()
  local stride = math.max(1, #fp // 64)
  for k = 1, #fp, stride do seeds[#seeds + 1] = fp[k] end
  if #fp > 0 and seeds[#seeds] ~= fp[#fp] then seeds[#seeds + 1] = fp[#fp] end
  local sing, sinfo, saddles, info
  local grown = 0
  for round = 1, 3 + RIM_GROWTH do
    sing, sinfo = landscape.singularities(J, params, L.region)
    saddles, info = find_saddles(sing, seeds)
    -- a region chosen here must hold the saddles' and the ends' own scales
    local need = not given and needed_radius(J, params, saddles, L.region.center, L.region.radius) or 0
    local grow = L.region.bounded and not given and J.contour.closed and grown < RIM_GROWTH
      and rim_matters(saddles, L.region)
    if grow then
      need = math.max(need, 2 * L.region.radius)
      grown = grown + 1
    end
    if need <= L.region.radius or (round >= 3 and not grow) then break end
    L.region = { center = L.region.center, radius = 2 ^ math.ceil(math.log(need, 2)),
      bounded = L.region.bounded }
  end
  if L.region.bounded then
    L.notes[#L.notes + 1] = "the number of saddles keeps growing with the region (infinitely "
      .. "many?): the region was limited to radius " .. format("%.4g", L.region.radius)
      .. (J.contour.closed and format(" (the saddles in its outer half lie below e^-%d times "
      .. "the largest, or it was doubled %d times)", RIM_DROP, RIM_GROWTH)
      or " (four times the contour's scale)") .. "; give region = {...} to choose"
  end
  L.singularities, L.singularity_info = sing, sinfo
  L.saddles, L.saddle_count = saddles, info
  local vinfo
  L.valleys, vinfo = landscape.valleys(J, params, L.region)
  L.growth, L.strip_families = vinfo, vinfo.families
  if with_paths then
    L.paths = {}
    for j = 1, #saddles do L.paths[j] = landscape.saddle_paths(J, params, L, j) end
  end
  return setmetatable(L, { __index = { report = M.landscape_report } })
end

function M.landscape_report(L, opts)
  local report_m = require "steep.report"
  local other = report_m.format(opts, { region = L.region, saddles = L.saddles,
    singularities = L.singularities, valleys = L.valleys, notes = L.notes,
    saddle_count = L.saddle_count, var = L.var, strip_families = L.strip_families,
    periodic = periodic.summary(L) })
  if other then return other end
  local num, wrap = report_m.num, report_m.wrap
  local var = L.var or "t"
  local lines = {}
  local function add(...) lines[#lines + 1] = format(...) end
  add("region: center %s, radius %.4g", num(L.region.center), L.region.radius)
  add("saddles (%s):", L.saddle_count.status)
  local families = periodic.saddle_lines(L, num)
  if families then
    -- a periodic F': each family once
    lines[#lines + 1] = wrap(families[1], "  ", 4)
    for k = 2, #families do lines[#lines + 1] = wrap(families[k], "  ", 6) end
  else
    for j, s in ipairs(L.saddles) do
      lines[#lines + 1] = wrap(format("%s = %s, order %d, F = %s, F'' = %s", var, num(s.at),
        s.order, num(s.F), num(s.F2)), format("  %d. ", j), 6)
    end
  end
  add("singularities:")
  if #L.singularities == 0 then add("  none found") end
  for j, s in ipairs(L.singularities) do
    local extra = s.residue and (", residue " .. num(s.residue, s.residue_error)) or ""
    if s.order then extra = format(", order %d", s.order) .. extra end
    lines[#lines + 1] = wrap(format("%s at %s = %s%s (%s)", s.kind, var, num(s.at), extra, s.source),
      format("  %d. ", j), 6)
  end
  add("valleys at infinity:")
  -- (strips: each family once; the instances paths reach are named where they end)
  local families_of_strips = #(L.strip_families or {}) > 0
  for k, v in ipairs(L.valleys) do
    if not (families_of_strips and v.type == "strip") then
      add("  %d. %s", k, landscape.describe_valley(v))
    end
  end
  for _, f in ipairs(L.strip_families or {}) do
    lines[#lines + 1] = wrap(strips.describe_family(f, var), "  ", 4)
  end
  if L.paths then
    add("steepest paths%s:", families and " (one copy of each family)" or "")
    local function words(label)
      return families_of_strips and strips.label_words(L, label) or label
    end
    for j, p in ipairs(L.paths) do
      local s = L.saddles[j]
      if not (families and s.copy ~= 0) then
        local d, a = {}, {}
        for _, q in ipairs(p.descent) do d[#d + 1] = words(q.ends) end
        for _, q in ipairs(p.ascent) do a[#a + 1] = words(q.ends) end
        local name = families and format("family %d at %s = %s", s.family, var, num(s.at))
          or format("saddle %d", j)
        lines[#lines + 1] = wrap(format("descent to %s; ascent to %s", table.concat(d, ", "),
          table.concat(a, ", ")), format("  %s: ", name), 4)
      end
    end
  end
  for _, n in ipairs(L.notes) do lines[#lines + 1] = wrap(n, "note: ", 4) end
  return table.concat(lines, "\n")
end

---------------------------------------------------------------------------------------
-- Quadrature.
---------------------------------------------------------------------------------------

local QUAD_REL = 1e-13
local noise_tol

-- Is z (nearly) at a singularity where the integrand may blow up integrably or vanish?
local function singular_at(L, z)
  for _, s in ipairs(L.singularities) do
    if cabs(s.at - z) <= 1e-9 * L.region.radius then return s end
  end
end

-- The relative tolerance quadrature can reach near z: QUAD_REL, or the rounding of
-- e^F where |F| is large (its phase carries eps |F| of noise). (F: F(z) when known.)
noise_tol = function(J, params, z, F)
  local ok = true
  if F == nil then ok, F = pcall(J.tape.eval, J.tape, z, params) end
  local f = ok and cabs(F) or 0
  if not (f < huge) then f = 0 end
  return math.max(QUAD_REL, 8 * 2.2e-16 * (f + 1))
end

-- The length over which the integrand changes near z: the width of the nearest saddle
-- (its distance plus its width), 1/|F'(z)|, and a tenth of the region, the smallest.
local function local_scale(J, params, L, z)
  local s = 0.1 * math.max(L.region.radius, cabs(z - L.region.center))
  for _, sd in ipairs(L.saddles) do
    if sd.width and sd.width < huge then s = math.min(s, cabs(z - sd.at) + sd.width) end
  end
  local ok, Fs = pcall(J.tape.jet, J.tape, z, 1, params, 1)
  local d = ok and cabs(Fs:coef(1)) or 0
  if d > 0 and d < huge then s = math.min(s, math.max(1 / d, 1e-3 * s)) end
  return s
end

-- A ray inside a strip valley: along it the integrand falls off like exp(-c e^{r s}) (s the
-- distance from a, r the strip family's rate), faster than any power. After the change of
-- variable s = ell log(1 + exp((pi/2) sinh u)) the integrand vanishes doubly exponentially
-- as u -> -infinity (s and ds/du do, at the start a) and at least triply as u -> +infinity
-- (s grows like e^u there), so the trapezoidal rule in u converges geometrically as its
-- step halves (the double-exponential idea of Takahasi & Mori, Publ. RIMS 9 (1974)
-- 721-741). ell: the distance along the ray over which F changes by 1 (the integrand by a
-- factor e), so that the nodes resolve the start and the decay alike. The step halves from
-- 1/2 until two levels agree to tol; the rule runs right until its terms are negligible.
-- -> value, error, evaluations, or nil (a value not finite, or no convergence: the caller
-- integrates piece by piece instead).
local DE_UMIN, DE_UMAX, DE_LEVELS = -5.5, 12, 8

-- The distance along the ray from a in direction th over which F changes by 1: from
-- 1/|F'(a)|, doubled or halved (at most 60 times).
local function change_length(J, params, a, th)
  local dir = expi(th)
  local ok0, F0 = pcall(J.tape.eval, J.tape, a, params)
  if not ok0 then return 1 end
  local function moved(s)
    local ok, F = pcall(J.tape.eval, J.tape, a + s * dir, params)
    local d = ok and cabs(F - F0) or huge
    return d == d and d or huge
  end
  local ok, Fs = pcall(J.tape.jet, J.tape, a, 1, params, 1)
  local d1 = ok and cabs(Fs:coef(1)) or 0
  local s = (d1 > 0 and d1 < huge) and 1 / d1 or 1
  if moved(s) < 1 then
    for _ = 1, 60 do
      if moved(2 * s) >= 1 then return 2 * s end
      s = 2 * s
    end
  else
    for _ = 1, 60 do
      s = 0.5 * s
      if moved(s) < 1 then return s end
    end
  end
  return s
end
local function quad_strip_ray(J, params, a, th, ell, tol)
  local dir = expi(th)
  local function node(u)
    local x = 0.5 * pi * math.sinh(u)
    local s, ds
    if x > 30 then s = x + math.exp(-x); ds = 0.5 * pi * math.cosh(u)
    else
      local e = math.exp(x)
      s = e < 1e-8 and e * (1 - 0.5 * e) or math.log(1 + e)
      ds = 0.5 * pi * math.cosh(u) * e / (1 + e)
    end
    return ell * s, ell * ds
  end
  local evals = 0
  -- the terms of the rule at the nodes u = u0 + k h, k = 0, 1, ..., up to umax (found at
  -- the first level, where the terms become negligible)
  local function terms(u0, h, umax)
    local us, pts, ws = {}, {}, {}
    local u = u0
    while u <= (umax or DE_UMAX) + 1e-12 do
      local s, ds = node(u)
      us[#us + 1], pts[#pts + 1], ws[#ws + 1] = u, a + s * dir, ds
      u = u + h
    end
    local vals = core.integrand_many(J.tape, params, pts)
    evals = evals + #pts
    local sum, abs_sum, last, small = cnew(0, 0), 0, DE_UMAX, 0
    for k = 1, #pts do
      local t = vals:get(k) * ws[k]
      local m = cabs(t)
      if not (m < huge) then return nil end
      sum, abs_sum = sum + t, abs_sum + m
      if not umax and us[k] > 0 and cabs(sum) > 0 then
        -- (far out the terms die faster than any geometric sequence: two in a row below
        -- 1e-18 of the sum so far end the rule)
        if m <= 1e-18 * cabs(sum) then
          small = small + 1
          if small >= 2 then last = us[k]; break end
        else small = 0 end
      end
    end
    return sum * dir, abs_sum, last
  end
  local h = 0.5
  local sum, abs_sum, umax = terms(DE_UMIN, h, nil)
  if not sum then return nil end
  local T = h * sum
  for _ = 1, DE_LEVELS do
    local s2, a2 = terms(DE_UMIN + 0.5 * h, h, umax)
    if not s2 then return nil end
    h = 0.5 * h
    sum, abs_sum = sum + s2, abs_sum + a2
    local T2 = h * sum
    local diff = cabs(T2 - T)
    local floor = 8 * 2.2e-16 * h * abs_sum
    T = T2
    if diff <= tol * cabs(T2) + floor then return T2, diff + floor, evals end
  end
  return nil
end

-- A ray from a in direction th, as pieces [0, L0], [L0, 3 L0], ... (doubling) until the
-- tail is negligible. Where the pieces shrink geometrically without becoming negligible
-- (algebraic decay, |integrand| ~ r^kappa: the ratio tends to 2^(kappa + 1)), the rest
-- is summed as the geometric series, with the change of the ratio as its error. A ray on
-- the edge of a sector valley is turned by a small angle into the valley. A ray inside a
-- strip valley: the double-exponential rule above.
local function quad_ray(J, params, L, a, th, sign, singular_start, notes, L0)
  local k, boundary = landscape.ray_valley(L, a, th)
  if k and not boundary and not singular_start and L.valleys[k].type == "strip" then
    local v, e, ev = quad_strip_ray(J, params, a, th, change_length(J, params, a, th),
      noise_tol(J, params, a))
    if v then
      if sign < 0 then v = -v end
      return v, e, ev, "ok"
    end
  end
  if boundary and L.valleys[k].type ~= "strip" then
    local v = L.valleys[k]
    local inward = (abs(landscape.norm_angle(th - v.from)) < 1e-6) and 1 or -1
    local width = v.to - v.from
    local tilt = math.min(0.05, 0.25 * width) * inward
    -- the wedge swept must hold no singularity
    for _, s in ipairs(L.singularities) do
      local d = landscape.norm_angle(carg(s.at - a) - th)
      if d * inward > 0 and abs(d) < abs(tilt) then tilt = 0.5 * d end
    end
    -- the valley is the sector's only far out: at moderate distances the tilted ray may
    -- cross a hill of the lower-order terms (i x t^3 under the t^4 that sets the sectors),
    -- where the integrand grows enormously before it decays; tilt less until the ray
    -- stays within e^8 of the start's level
    local function level(z)
      local ok, F, g = pcall(J.tape.eval, J.tape, z, params)
      if not ok then return huge end
      local gm = g and cabs(g) or 1
      local l = cparts(F) + (gm > 0 and math.log(gm) or -huge)
      return l == l and l or huge
    end
    local start = math.max(level(a), level(a + local_scale(J, params, L, a) * expi(th)))
    local s0 = local_scale(J, params, L, a)
    for _ = 1, 40 do
      local d, worst = expi(th + tilt), -huge
      for j = 0, 80 do
        local l = level(a + s0 * 2 ^ (j / 2) * d)
        worst = math.max(worst, l)
        if l < start - 60 then break end
      end
      if worst <= start + 8 then break end
      tilt = 0.5 * tilt
    end
    th = th + tilt
    notes[#notes + 1] = format("the end in direction %.4g lies on the edge of its valley "
      .. "(the integrand oscillates without decaying); its ray was turned by %.3g rad into "
      .. "the valley", th - tilt, tilt)
  end
  local dir = expi(th)
  local total, err, evals = cnew(0, 0), 0, 0
  local s0, len = 0, L0 or local_scale(J, params, L, a)
  local status = "ok"
  local small = 0
  local v1, v2   -- the last two pieces
  for piece = 1, 400 do
    local p0, p1 = a + s0 * dir, a + (s0 + len) * dir
    local v, e, ev, st = core.quad_polyline(J.tape, params, { p0, p1 },
      { reltol = noise_tol(J, params, p0), abstol = 0,
        singular_start = singular_start and piece == 1 })
    evals = evals + ev
    if st ~= "ok" then status = st end
    total, err = total + v, err + e
    if cabs(v) <= 1e-17 * cabs(total) or cabs(v) == 0 then
      small = small + 1
      if small >= 2 then break end
    else
      small = 0
      if v1 and v2 and piece >= 8 then
        local r1, r0 = v / v1, v1 / v2
        local q = cabs(r1)
        if q < 0.97 and cabs(r1 - r0) < 1e-7 * q then
          -- geometric from here on: sum_{j>=1} v r^j = v r/(1 - r); the ratio still
          -- drifts like 1/s (the next terms of the power law): twice the change it made
          -- between the last two pieces bounds that
          local rest = v * r1 / (1 - r1)
          local rest0 = v * r0 / (1 - r0)
          total = total + rest
          err = err + 2 * cabs(rest - rest0) + 1e-12 * cabs(rest)
          break
        end
      end
    end
    v2, v1 = v1, v
    if piece == 400 then
      status = "limit"
      notes[#notes + 1] = format("the ray in direction %.4g from %s did not converge",
        th, tostring(a))
    end
    s0 = s0 + len
    if piece > 1 then len = len * 2 end
  end
  if sign < 0 then total = -total end
  return total, err, evals, status
end

-- Points along the segment a -> b graded toward both ends and toward the largest peak of
-- |integrand| on it: pieces start at the local scale there and double, so that a peak of
-- width 1 on a segment of length 1e9 is seen.
local function graded_segment(J, params, L, a, b)
  local len = cabs(b - a)
  local function grade(from, toward, w, out)
    -- from `from` toward `toward` (excluded), pieces w, w, 2w, 4w, ... up to halfway
    local d, dist = (toward - from) / cabs(toward - from), cabs(toward - from)
    local s, step = 0, w
    while s + step < 0.5 * dist do
      s = s + step
      out[#out + 1] = from + s * d
      if s > w then step = step * 2 end
    end
  end
  local wa, wb = local_scale(J, params, L, a), local_scale(J, params, L, b)
  if len <= 16 * math.min(wa, wb) then return { a, b } end
  -- the peak of log |integrand| on a coarse grid, refined by golden sections
  local n = 64
  local best, bu = -huge, nil
  local function level(u)
    local z = a + (b - a) * u
    local ok, F, g = pcall(J.tape.eval, J.tape, z, params)
    if not ok then return -huge end
    local gm = g and cabs(g) or 1
    local l = cparts(F) + (gm > 0 and math.log(gm) or -huge)
    return l == l and l or -huge
  end
  for k = 1, n - 1 do
    local l = level(k / n)
    if l > best then best, bu = l, k / n end
  end
  local pts = { a }
  local mid
  if bu and best > math.max(level(0), level(1)) then
    local lo, hi = bu - 1 / n, bu + 1 / n
    for _ = 1, 60 do
      local m1, m2 = lo + 0.382 * (hi - lo), lo + 0.618 * (hi - lo)
      if level(m1) < level(m2) then lo = m1 else hi = m2 end
    end
    mid = a + (b - a) * (0.5 * (lo + hi))
  end
  if mid then
    local wm = local_scale(J, params, L, mid)
    local left, right = {}, {}
    grade(a, mid, wa, pts)
    grade(mid, a, wm, left)
    for k = #left, 1, -1 do pts[#pts + 1] = left[k] end
    pts[#pts + 1] = mid
    grade(mid, b, wm, right)
    for _, z in ipairs(right) do pts[#pts + 1] = z end
    local back = {}
    grade(b, mid, wb, back)
    for k = #back, 1, -1 do pts[#pts + 1] = back[k] end
  else
    grade(a, b, wa, pts)
    local back = {}
    grade(b, a, wb, back)
    for k = #back, 1, -1 do pts[#pts + 1] = back[k] end
  end
  pts[#pts + 1] = b
  return pts
end

-- A full circle by the trapezoidal rule, doubling the number of points until two
-- estimates agree (exponentially convergent for an integrand analytic near the circle)
-- to 1e-14 relative, or to the rounding floor: a few units in the last place of the
-- integral of |integrand| (when the value is much smaller, as a Cauchy coefficient on a
-- small circle, rounding leaves that much noise).
local function quad_circle(J, params, p, L)
  -- (points: at least four times the order of the highest pole inside, plus one: the
  -- rule on N points adds the Laurent coefficients N apart, and with fewer than the pole's
  -- order two levels could alias the same large one and agree: a pole of order 150 gave
  -- 2.7e38 for 0.13, "ok")
  local n, prev = 64, nil
  for _, s in ipairs(L and L.singularities or {}) do
    if s.kind == "pole" and s.order and cabs(s.at - p.center) < p.radius then
      while n < 4 * (s.order + 1) and n < 2 ^ 16 do n = 2 * n end
    end
  end
  local evals = 0
  -- each value carries the rounding of its F (bounded through the tape on 64 points of the
  -- circle): with much cancellation, against the sum of |f| (L_n(x) at x = -202 by its
  -- Cauchy integral: 1e31 times the value, and the estimate 1.6 times short)
  local function rounding_floor(l1)
    local pts = {}
    for k = 0, 63 do pts[k + 1] = p.center + p.radius * expi(2 * pi * k / 64) end
    local eF = J.tape:rounding(core.cvec(pts), params)
    local worst = 0
    for k = 1, 64 do if eF[k] == eF[k] then worst = math.max(worst, eF[k]) end end
    return worst * l1 * 2 * pi * p.radius / n
  end
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
        return s, d + floor + rounding_floor(l1), evals, "ok"
      end
      if n >= 2 ^ 17 then return s, d + floor + rounding_floor(l1), evals, "limit" end
    end
    prev = s
    n = n * 2
  end
  return prev, cabs(prev), evals, "limit"
end

-- The stretches of a run of segments (points run.from..run.to of the polyline) whose
-- segments are all short against the local scale (local_scale, computed in C).
local function short_stretches(J, params, L, poly, run)
  local at, widths = {}, {}
  for k, sd in ipairs(L.saddles) do
    at[k] = sd.at
    widths[k] = (sd.width and sd.width < huge) and sd.width or huge
  end
  return core.short_stretches(J.tape, params, poly, { first = run.from, last = run.to,
    center = L.region.center, radius = L.region.radius, saddles = core.cvec(at),
    widths = core.cvec(widths) })
end

-- Along the user's contour, piece by piece.
local function quad_given(J, params, L)
  local total, err, evals, status = cnew(0, 0), 0, 0, "ok"
  local notes = {}
  local R = L.region.radius
  local poly, runs = J.contour:polyline(8 * R)
  decompose.check_contour(L, J.contour, poly, J, params)
  local run_at = {}
  for _, run in ipairs(runs) do run_at[run.first] = run end
  -- an end at infinity outside every valley: the integral diverges there. Said before
  -- integrating where the valleys are exact (read from the expression); said after, from
  -- the value, where they are indicative (found by sampling).
  local function diverges(p)
    local from = p.kind == "ray_in" and p.b or p.a
    local which = p.kind == "ray_in" and "starting" or "finishing"
    local words = strips.wrong_end(L, which, from, p.angle)
    if words then error("quad: " .. words, 0) end
    error(format("quad: the contour's %s end at infinity (the ray from %s in direction %.6g) "
      .. "is outside every valley: the integral diverges there (valleys: %s)",
      p.kind == "ray_in" and "starting" or "finishing", tostring(from), p.angle,
      decompose.valleys_text(L)), 0)
  end
  local exact = #L.valleys > 0 or #(L.strip_families or {}) > 0
  for _, v in ipairs(L.valleys) do if not v.exact and v.type ~= "edge" then exact = false end end
  local function in_valley(p)
    return landscape.ray_valley(L, p.kind == "ray_in" and p.b or p.a, p.angle) ~= nil
  end
  for _, p in ipairs(J.contour.pieces) do
    if (p.kind == "ray_in" or p.kind == "ray_out") and exact and not in_valley(p) then
      diverges(p)
    end
  end
  local pieces = J.contour.pieces
  local i = 1
  while i <= #pieces do
    local p = pieces[i]
    local v, e, ev, st
    if p.kind == "segment" then
      -- a run of consecutive segments goes to C as stretches of the polyline, with no
      -- Lua value per point: where each segment is short against the local scale at its
      -- ends (core.short_stretches), one call integrates the stretch segment by segment
      -- (check_contour has made sure no singular point lies between its ends); a long
      -- segment is graded as alone
      local run = run_at[i]
      st = "ok"
      local stretches = run.to - run.from > 1 and short_stretches(J, params, L, poly, run) or {}
      local at = run.from
      local function add(v1, e1, ev1, st1)
        v, e, ev = (v or 0) + v1, (e or 0) + e1, (ev or 0) + ev1
        if st1 ~= "ok" then st = st1 end
      end
      local function long_segment(j)   -- the segment from point j to j + 1
        local q = pieces[run.first + (j - run.from)]
        add(core.quad_polyline(J.tape, params, graded_segment(J, params, L, q.a, q.b),
          { reltol = QUAD_REL, singular_start = singular_at(L, q.a) ~= nil,
            singular_end = singular_at(L, q.b) ~= nil }))
      end
      for _, stretch in ipairs(stretches) do
        for j = at, stretch[1] - 1 do long_segment(j) end
        local qa = pieces[run.first + (stretch[1] - run.from)].a
        local qb = pieces[run.first + (stretch[2] - 1 - run.from)].b
        add(core.quad_polyline(J.tape, params, poly, { reltol = QUAD_REL,
          first = stretch[1], last = stretch[2],
          singular_start = singular_at(L, qa) ~= nil, singular_end = singular_at(L, qb) ~= nil,
          budget = 2000000 + 64 * (stretch[2] - stretch[1]) }))
        at = stretch[2]
      end
      for j = at, run.to - 1 do long_segment(j) end
      i = run.last
    elseif p.kind == "ray_out" then
      v, e, ev, st = quad_ray(J, params, L, p.a, p.angle, 1, singular_at(L, p.a) ~= nil, notes)
    elseif p.kind == "ray_in" then
      v, e, ev, st = quad_ray(J, params, L, p.b, p.angle, -1, singular_at(L, p.b) ~= nil, notes)
    else
      v, e, ev, st = quad_circle(J, params, p, L)
    end
    if (p.kind == "ray_in" or p.kind == "ray_out") and not in_valley(p)
        and not (cabs(v) < huge) then
      diverges(p)
    end
    total, err, evals = total + v, err + e, evals + ev
    -- (the rules' own words, "limit" and "nonfinite", as the deformed route says them)
    if st ~= "ok" then status = st:match("^quadrature ") and st or "quadrature " .. st end
    i = i + 1
  end
  return total, err, { status = status, evals = evals, notes = notes, along = "given" }
end

-- The tail of a descent path that stopped before its integrand became negligible (it
-- left the tracing region: algebraic decay, or a very wide saddle): the ray from its last
-- point into the valley it reached (along a strip's own direction; in a sector, along
-- the path's last direction when that lies in the sector, else the sector's middle).
local function path_tail(J, params, L, piece, notes)
  local pts = piece.points
  local last, before = pts[#pts], pts[#pts - 1]
  local k = tonumber(piece.ends[2]:match("^valley (%d+)$"))
  if not k or not before then return nil end
  local v = L.valleys[k]
  local th
  if v.type == "strip" then th = v.direction
  else
    th = carg(last - before)
    if not landscape.valley_of({ v }, th) then
      th = (v.from == v.to) and v.from or 0.5 * (v.from + v.to)
    end
  end
  local v0, e0, ev, st = quad_ray(J, params, L, last, th, 1, false, notes, cabs(last - before))
  return v0, e0, ev, st
end

--- A link between two valleys (strips.links): the line through piece.through along
-- piece.angle, from the strip at that end to the valley at the other, by quadrature along
-- its two rays. -> value, error, evaluations, status
function M.quad_link(J, params, L, piece, notes)
  local v1, e1, n1, s1 = quad_ray(J, params, L, piece.through, piece.angle, 1, false, notes)
  local v2, e2, n2, s2 = quad_ray(J, params, L, piece.through, piece.angle + pi, 1, false, notes)
  return v2 - v1, e1 + e2, n1 + n2, (s1 ~= "ok" and s1) or s2
end

local saddle_pairs, floor_points, subtracted_poles, singular_end_rounding

-- The singular points of L (a cvec, kept with L): chords joined along a path keep clear.
local function singular_points(L)
  if not L._singular_points then
    local pts = {}
    for k, s in ipairs(L.singularities) do pts[k] = s.at end
    L._singular_points = core.cvec(pts)
  end
  return L._singular_points
end

-- A simple saddle passed through (its two descent rays weighted +w and -w, each traced
-- until its integrand is negligible) of an exponent without branch cuts: the path in along
-- one ray and out along the other is integrated at once by the trapezoidal rule in the
-- saddle's own variable u, F0 - F = u^2 (core.saddle_quad: geometric convergence, a few
-- dozen nodes where Gauss-Kronrod on the traced polyline takes hundreds). Returns a table
-- piece -> {value = the path's integral in along b, out along a; weight (of ray a);
-- error; part (that piece's own integral); first (the piece that adds the value)}; a pair
-- whose rule does not settle is left to the polylines.
saddle_pairs = function(J, params, L, plan, info)
  local out = {}
  if landscape.may_jump(J) then return out end
  local by = {}
  for _, piece in ipairs(plan.pieces) do
    if piece.kind == "saddle" then
      by[piece.index] = by[piece.index] or {}
      table.insert(by[piece.index], piece)
    end
  end
  for j, list in pairs(by) do
    local s = L.saddles[j]
    local a, b = list[1], list[2]
    if #list == 2 and s.order == 2 and a.weight == -b.weight and a.ray ~= b.ray
        and a.path.reason == "low" and b.path.reason == "low"
        and not a.path.straight and not b.path.straight then
      local v, e, ev, pa, pb = core.saddle_quad(J.tape, params, s.at, s.F, s.F2,
        a.path.traced, a.path.F, b.path.traced, b.path.F,
        { reltol = noise_tol(J, params, s.at, s.F) })
      info.evals = info.evals + (v and ev or e)   -- (a failed rule returns nil, evaluations)
      if v then
        local pair = { value = v, weight = a.weight, error = e }
        out[a] = setmetatable({ part = pa, first = true }, { __index = pair })
        out[b] = setmetatable({ part = -pb }, { __index = pair })
      end
    end
  end
  return out
end

-- The simple poles within NEAR_POLE of a piece's polyline (relative to the region), whose
-- parts r / (t - p) core.quad_polyline takes out of the integrand and adds back in closed
-- form: next to a pole the rule's own error estimate fails (a pole 3e-7 from the path:
-- 3.6e-11 off under an estimate of 2.5e-13) and the nodes' rounding is magnified by
-- |p| / distance. Returns {poles, residues (cvecs), error} or nil; the error carries each
-- residue's own error times the integral of |dt / (t - p)| along the piece (its
-- logarithms plus pi for the near pass). Records the poles in subtracted[piece].
local NEAR_POLE = 1e-2
function subtracted_poles(J, params, L, piece, subtracted)
  local poles, residues, err = {}, {}, 0
  local R = L.region.radius
  for _, s in ipairs(L.singularities) do
    -- (a pole on the path itself, as one at a saddle or an end, is not beside it: the
    -- piece's own treatment stands)
    local d = s.kind == "pole" and s.order == 1 and #piece.points >= 2
      and core.distance(piece.points, s.at)
    if d and d < NEAR_POLE * R and d > decompose.on_contour_tolerance(J, params, L, s.at)
        and s.residue then
      poles[#poles + 1], residues[#residues + 1] = s.at, s.residue
      local pts, size = piece.points, pi
      for k = 1, #pts - 1 do
        size = size + cabs(complex.apply("log", (pts[k + 1] - s.at) / (pts[k] - s.at)))
      end
      err = err + s.residue_error * size
      subtracted[piece] = subtracted[piece] or {}
      subtracted[piece][s] = true
    end
  end
  if #poles == 0 then return nil end
  return { poles = core.cvec(poles), residues = core.cvec(residues), error = err }
end

-- Along the steepest descent decomposition, plus residues.
local function quad_deformed(J, params, L)
  -- (the kept plan, read here and not changed: its notes are copied into info)
  local ok, plan = pcall(decompose.kept_plan, J, params, L, J.contour)
  if not ok then
    -- (the decomposition refuses: the caller integrates along the given contour)
    return nil, nil, { along = "deformed", status = "failed", notes = { tostring(plan) },
      evals = 0, pieces = {}, residues = {} }
  end
  local info = { along = "deformed", status = plan.status,
    notes = table.move(plan.notes, 1, #plan.notes, 1, {}), evals = plan.evals, pieces = {},
    residues = {} }
  if plan.status ~= "ok" then return nil, nil, info end
  local total, err = cnew(0, 0), 0
  local subtracted = {}   -- piece -> set of the poles taken out of its integrand
  local paired = saddle_pairs(J, params, L, plan, info)
  -- the nodes' own rounding: a node near a saddle at t0 sits u |t0| off, a relative
  -- u |t0| / width of the saddle's scale (a Gaussian of width 1e-15 centred at 1e-8 was
  -- 2.7e-10 relative off under an estimate of 3e-14); counted per saddle piece, and per
  -- endpoint piece with the scale 1/|F'| there
  local function placement(piece, v)
    if piece.kind == "endpoint" then
      -- (an endpoint's scale is 1/|F'| there; the exponent's own tape: the amplitude may
      -- be singular at the end)
      if not J._exponent_tape then J._exponent_tape = expr.compile({ J.exponent }, J.var) end
      local ok, Fj = pcall(J._exponent_tape.jet, J._exponent_tape, piece.at, 1, params)
      if not ok then return 0 end
      local slope = cabs(Fj:coef(1))
      return slope < huge and 4 * EPS * cabs(piece.at) * slope * cabs(v) or 0
    end
    if piece.kind ~= "saddle" then return 0 end
    local s = L.saddles[piece.index]
    if not (s and s.width and s.width > 0) then return 0 end
    return 4 * EPS * cabs(s.at) / s.width * cabs(v)
  end
  for _, piece in ipairs(plan.pieces) do
    local pair = paired[piece]
    if pair then
      -- (integrated with its partner ray: saddle_pairs)
      if pair.first then
        total = total + pair.weight * pair.value
        err = err + abs(pair.weight) * (pair.error + placement(piece, pair.value))
      end
      info.pieces[#info.pieces + 1] = { kind = piece.kind, index = piece.index, at = piece.at,
        weight = piece.weight, value = pair.part, error = 0.5 * pair.error, ends = piece.ends,
        method = "trapezoidal rule in the saddle's variable" }
    elseif piece.kind == "link" then
      local v, e, ev, st = M.quad_link(J, params, L, piece, info.notes)
      info.evals = info.evals + ev
      if st ~= "ok" then info.status = "quadrature " .. st end
      total = total + piece.weight * v
      err = err + abs(piece.weight) * e
      info.pieces[#info.pieces + 1] = { kind = "link", weight = piece.weight, value = v,
        error = e, ends = piece.ends, at = piece.through }
    elseif #piece.points >= 2 then
      local singular_end = piece.reason == "singular" or piece.reason == "stop"
      -- (a traced path's segments are joined where F falls by at most 1 across them:
      -- the tracer's first steps off a saddle are tiny, its later ones fall by about 2)
      local path, levels = piece.path, nil
      if path and not path.straight and path.F and #path.F > 0 then
        -- (a saddle's path starts at the saddle itself, then its traced points: the join
        -- shares b's first point, so a ends with it)
        levels = piece.kind == "saddle"
          and core.cvec_join({ L.saddles[piece.index].F, path.F:get(1) }, path.F) or path.F
      end
      local near = subtracted_poles(J, params, L, piece, subtracted)
      local v, e, ev, st = core.quad_polyline(J.tape, params, piece.points,
        { reltol = noise_tol(J, params, piece.points[1]),
          singular_start = piece.kind == "endpoint" and singular_at(L, piece.at) ~= nil,
          singular_end = singular_end, levels = levels, merge = levels and 1,
          avoid = levels and singular_points(L), poles = near and near.poles,
          residues = near and near.residues })
      if near then e = e + near.error end
      info.evals = info.evals + ev
      if st ~= "ok" then info.status = "quadrature " .. st end
      local why = piece.path and piece.path.reason
      if why == "edge" or why == "bound" or why == "flat" then
        -- the path stopped before its integrand was negligible: integrate on to infinity
        local tv, te, tev, tst = path_tail(J, params, L, piece, info.notes)
        if tv then
          v, e = v + tv, e + te
          info.evals = info.evals + tev
          if tst ~= "ok" then info.status = "quadrature " .. tst end
        else
          info.status = "incomplete tail"
          info.notes[#info.notes + 1] = format("a steepest path of the %s %s stops (%s) "
            .. "before its integrand is negligible, away from any valley: its tail is "
            .. "missing", piece.kind, piece.index or tostring(piece.at), why)
        end
      end
      e = e + placement(piece, v)
      total = total + piece.weight * v
      err = err + abs(piece.weight) * e
      info.pieces[#info.pieces + 1] = { kind = piece.kind, index = piece.index, at = piece.at,
        weight = piece.weight, value = v, error = e, ends = piece.ends }
    end
  end
  for _, piece in ipairs(plan.pieces) do
    for _, label in ipairs(piece.ends or {}) do
      if label:match("^essential") then info.through_essential = true end
    end
  end
  -- poles very close to a piece of the path (relative to the region), but for those
  -- whose parts were taken out of that piece's integrand
  for _, s in ipairs(L.singularities) do
    if s.kind == "pole" then
      for _, piece in ipairs(plan.pieces) do
        if #piece.points >= 2 and not (subtracted[piece] and subtracted[piece][s]) then
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
  local v, e, info = M.quad_with(J, params, L, along)
  -- an estimate as large as the value: no accuracy for the user (the integrand cancels
  -- along the contour to below its rounding, as a Cauchy integral on a circle far larger
  -- than the saddle's). (Inside, the uniform forms' model integrals use absolute
  -- accuracy: quad_with leaves this to the caller.)
  if info.status == "ok" and e >= cabs(v) and cabs(v) > 0 then
    info.status = "suspect"
    info.notes[#info.notes + 1] = "the error estimate is not smaller than the value: the "
      .. "integrand cancels to below its rounding here (a contour through the saddles, or "
      .. "the deformed one, does better)"
  end
  return v, e, info
end

-- The points whose |F| sets the rounding floor of a quadrature: the saddles its path
-- passes (along the deformed contour: those with pieces; along the given one: those
-- within four widths of it) and the contour's finite points (of a path of many points,
-- 4096 spread along it and its ends), as {|F|, log |g e^F|, the relative rounding of
-- g e^F there (tape:rounding: F's absolute bound plus g's relative one)}. (A saddle
-- the path does not pass, as the periodic copies of -x cosh t at i pi k off the real
-- line, does not round the value.) Kept with the landscape: they depend on the
-- parameters only.
function floor_points(J, params, L, info)
  L._floor_points = L._floor_points or setmetatable({}, { __mode = "k" })
  local kept = L._floor_points[J.contour]
  if not kept then
    local pts = {}
    for _, s in ipairs(L.saddles) do pts[#pts + 1] = s.at end
    local fp = J.contour:finite_points()
    local stride = math.max(1, #fp // 4096)
    for k = 1, #fp, stride do pts[#pts + 1] = fp[k] end
    if #fp > 0 and pts[#pts] ~= fp[#fp] then pts[#pts + 1] = fp[#fp] end
    kept = {}
    if #pts > 0 then
      -- (in one batch, singular points giving no finite F)
      local cv = core.cvec(pts)
      local Fs, gs = J.tape:eval_many(cv, params)
      local eF, eg = J.tape:rounding(cv, params)
      for k = 1, #pts do
        local F, g = Fs:get(k), gs and gs:get(k)
        local gm = g and cabs(g) or 1
        local r = eF[k] + (gs and gm > 0 and eg[k] / gm or 0)
        kept[k] = { cabs(F), cparts(F) + (gm > 0 and math.log(gm) or -huge), r == r and r or 0 }
      end
    end
    L._floor_points[J.contour] = kept
  end
  -- the saddles passed (along the deformed contour, the kept plan's pieces: the list is
  -- kept with the landscape too, for the next call at these values)
  L._floor_lists = L._floor_lists or setmetatable({}, { __mode = "k" })
  local lists = L._floor_lists[J.contour] or {}
  L._floor_lists[J.contour] = lists
  if lists[info.along] then return lists[info.along] end
  local passed = {}
  if info.along == "deformed" then
    for _, piece in ipairs(info.pieces or {}) do
      if piece.kind == "saddle" then passed[piece.index] = true end
    end
  else
    -- (a contour of few pieces sampled; a path of many points is its own polyline: sampling
    -- each of 10^5 segments had cost 25 kB a point)
    local contour = J.contour
    local line = #contour.pieces <= 64
      and core.cvec(contour:sample { radius = 8 * L.region.radius, n = 64 })
      or core.cvec(contour:finite_points())
    for j, s in ipairs(L.saddles) do
      local w = (s.width and s.width < huge) and s.width or 0
      passed[j] = core.distance(line, s.at) <= math.max(4 * w, 1e-9 * L.region.radius)
    end
  end
  -- (each point with whether the path passes it; every one counts for `top` below)
  local out = {}
  for k, pt in ipairs(kept) do out[k] = { pt[1], pt[2], pt[3], k > #L.saddles or passed[k] } end
  if info.along == "deformed" then lists.deformed = out end
  return out
end

-- A singular end a != 0 of the contour (an integrable power (t - a)^beta there): nodes
-- closer to a than its rounding u |a| cannot be told from it, and those just beyond carry
-- relative errors of u |a| / |t - a| in the integrand, whatever the rule. Their share,
-- about the integral of |f| over the first eps = 4 u |a|, is eps |f(a + eps)| (1/(beta + 1)
-- + 1) for f ~ (t - a)^beta (beta from the amplitude's factors; -0.9 when not read). The
-- upper end of (1 - t)^-0.7 e^{20 (t - 1)} on [0, 1]: 4.6e-5 off under 2e-7 before.
function singular_end_rounding(J, params, L)
  if J.contour.closed then return 0 end
  -- (it depends on the parameters only: kept with the landscape, per contour)
  L._end_rounding = L._end_rounding or setmetatable({}, { __mode = "k" })
  local kept = L._end_rounding[J.contour]
  if kept then return kept end
  local total = 0
  for i, a in ipairs({ J.contour:start(), J.contour:finish() }) do
    if not contour_m.is_inf(a) and cabs(a) > 0 and singular_at(L, a) then
      local piece = i == 1 and J.contour.pieces[1] or J.contour.pieces[#J.contour.pieces]
      local other = i == 1 and (piece.b or piece.a) or piece.a
      local dir
      if piece.kind == "segment" then dir = (other - a) / cabs(other - a)
      elseif piece.angle then dir = complex.new(math.cos(piece.angle), math.sin(piece.angle))
        * (i == 1 and 1 or -1)
      end
      if dir then
        local eps = 4 * 2.220446049250313e-16 * cabs(a)
        local ok, F, g = pcall(J.tape.eval, J.tape, a + dir * eps, params)
        local f = ok and cabs(complex.apply("exp", F)) * (g and cabs(g) or 1) or huge
        local fac = require("steep.expand").endpoint_factors(J, params, a)
        local beta = fac and fac.pbase and fac.beta or -0.9
        total = total + eps * f * (1 / math.max(beta + 1, 0.05) + 1)
      end
    end
  end
  total = total == total and total or huge
  L._end_rounding[J.contour] = total
  return total
end

--- The quadrature on a landscape already mapped (sweeps reuse theirs).
function M.quad_with(J, params, L, along)
  if J.zero_amplitude then
    return cnew(0, 0), 0, { status = "ok", evals = 0, along = along, pieces = {}, residues = {},
      notes = { "exact: the amplitude is identically zero" }, landscape = L, exact = true }
  end
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
    elseif info.through_essential and #info.residues > 0 then
      -- paths into an essential singularity close the cycle through its valley sectors,
      -- and the residues follow from that closure: a closure on the wrong side of a pole
      -- counted its residue on top of paths that already carried it (a Cauchy integral
      -- about e^{-x t/(1-t)}: exactly twice the value, "ok"). The given contour decides
      -- where it converges.
      local ok, v2, e2, info2 = pcall(quad_given, J, params, L)
      -- (the given contour can judge only where its own estimate is well below the value:
      -- a Cauchy integral of order 150 cancels to 1e-46 of its integrand)
      if ok and info2.status == "ok" and e2 < 0.1 * math.max(cabs(v), cabs(v2)) then
        if cabs(v - v2) > 2 * (e + e2) then
          info.notes[#info.notes + 1] = format("the deformation through the essential "
            .. "singularity and its residues disagree with quadrature along the given contour "
            .. "(by %.3g): the given contour's value is taken", cabs(v - v2))
          v, e = v2, e2 + 0.0
          info.along = "given"
        elseif e2 < e then
          -- (they agree, the given contour's value the more precise: a Cauchy integral of
          -- order 1000 about e^{z/(1-z)} was -4.3e33 with an estimate of 8.3e34 along the
          -- deformed contour, 2.8e24 within 9e12 along the given one)
          info.notes[#info.notes + 1] = format("quadrature along the given contour agrees "
            .. "and is more precise (%.3g against %.3g): its value is taken", e2, e)
          v, e = v2, e2 + 0.0
          info.along = "given"
        end
      else
        info.status = "suspect"
        info.notes[#info.notes + 1] = "paths end in an essential singularity and residues were "
          .. "added: not confirmed along the given contour"
      end
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
  -- (points whose integrand is negligible against the result carry no weight)
  -- (and, where F is a small difference of large terms, F's own rounding there: a
  -- running error bound through the tape, as x (1 + log s - s) near s = 1 at x = 3e15,
  -- whose rounding of about 1 was missed)
  local Fmax, rel = 0, 0
  local level = math.log(math.max(cabs(v), 1e-308)) - 40
  local top = -huge   -- the largest log |g e^F| seen at a saddle or a contour point
  for _, pt in ipairs(floor_points(J, params, L, info)) do
    local absF, lv, r, passed = pt[1], pt[2], pt[3], pt[4]
    if passed and absF < huge and lv > level then
      Fmax, rel = math.max(Fmax, absF), math.max(rel, r)
    end
    if lv == lv then top = math.max(top, lv) end
  end
  e = math.max(e, ((4 + Fmax) * 2.2e-16 + rel) * cabs(v))
  e = e + singular_end_rounding(J, params, L)
  if rel > 1e-10 then
    info.notes[#info.notes + 1] = format("the exponent is a small difference of large "
      .. "terms near the saddles (its rounding there is %.2g): the value cannot be more "
      .. "accurate than that; an exponent written to cancel less (a shift or a scaling of "
      .. "the variable) does better", rel)
  end
  -- a value beyond doubles: no number at all
  local vr, vi = cparts(v)
  if not (abs(vr) < huge and abs(vi) < huge) then
    info.status, e = "failed", huge
    info.notes[#info.notes + 1] = format("the integrand overflows: log |g e^F| reaches %.6g "
      .. "at a saddle or on the contour (doubles end near 709.78); subtract a constant from "
      .. "the exponent (J:expand gives the value as a scale times a number)", top)
  end
  -- a value below the normal range of doubles (subnormal): its digits are gone, and it
  -- is known only to within the smallest normal double (as steep.airy says of one); it
  -- had been "ok" with an error of 0 (B(300, 900) I_0.15(300, 900): 1.7e-313)
  if cabs(v) > 0 and cabs(v) < 2.2250738585072014e-308 then
    info.status = "underflow"
    e = math.max(e, 2.2250738585072014e-308)
    info.notes[#info.notes + 1] = "the value is below the normal range of doubles (1e-308): "
      .. "it is known to within that only"
  end
  -- a value of exactly 0 with no error: say why, or distrust it
  if cabs(v) == 0 and e == 0 then
    if info.along == "deformed" and #(info.pieces or {}) == 0 and #(info.residues or {}) == 0 then
      info.notes[#info.notes + 1] = "the deformed contour has no pieces (no saddle, endpoint or "
        .. "pole lies between the contour's ends, which share one valley): the integral is 0"
    elseif top > math.log(1e-300) then
      -- the integrand is not small everywhere (at a saddle or on the contour it is
      -- e^top): the pieces missed it; no number is better than a wrong 0
      info.status = "failed"
      e = huge
      info.notes[#info.notes + 1] = format("quadrature found only underflowing values, yet "
        .. "the integrand reaches e^%.4g at a saddle or on the contour: the pieces missed "
        .. "it (the region, radius %.3g, may be far too large): the value is not known", top,
        L.region.radius)
    else
      info.status = "underflow"
      info.notes[#info.notes + 1] = "the integrand underflows (below 1e-308) wherever it was "
        .. "evaluated: the value is below what doubles hold, not known to be 0"
    end
  end
  info.landscape = L
  return v, e, info
end

---------------------------------------------------------------------------------------
-- Expansions (lua/steep/asymptotics.lua does the work).
---------------------------------------------------------------------------------------

--- J:expand{<params>, order = N | "optimal", region = {...}} -> result
function methods.expand(J, opts)
  local params, o = M.split_options(J, opts, { order = true, region = true, verify = true,
    resum = true, finite_part = true }, "expand")
  if o.finite_part ~= nil and type(o.finite_part) ~= "boolean" then
    error("expand: option 'finite_part' must be true or false, got " .. type(o.finite_part), 2)
  end
  o.resum = require("steep.resum").check_option(o.resum, "expand", o.order)
  o.order = require("steep.asymptotics").check_order(o.order or (o.resum and "optimal" or 1),
    "expand")
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

--- check_values(J, opts) -> the list of values of the large parameter J:check was given,
-- and a copy of opts with the first of them in its place (for option parsing); errors
-- name the caller's J:check (level 3). Shared by the one- and several-variable J:check.
function M.check_values(J, opts)
  if type(opts) ~= "table" then error("bad argument #1 to 'check' (options table expected)", 3) end
  if not J.large then error("check: the integral names no large parameter (large = ...)", 3) end
  local values = opts[J.large.name]
  if type(values) ~= "table" or #values == 0 then
    error(format("check: give the values of the large parameter as a list, %s = {...}",
      J.large.name), 3)
  end
  local rest = {}
  for k, v in pairs(opts) do rest[k] = v end
  rest[J.large.name] = values[1]
  return values, rest
end

--- J:check{<large> = {values}, <other params>, order = N} -> verification table
function methods.check(J, opts)
  local values, rest = M.check_values(J, opts)
  local params, o = M.split_options(J, rest, { order = true, region = true, resum = true },
    "check")
  o.resum = require("steep.resum").check_option(o.resum, "check", o.order)
  if o.resum then o.order = "optimal" end
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
