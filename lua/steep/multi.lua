-- steep.multi — integrals in several variables over a product of one-variable contours:
--   J = integral over C1 x ... x Cn of g(x) e^{F(x)} dx1 ... dxn   (n <= 4)
-- made by steep.integral{var = {x1, ..., xn}, contour = {C1, ..., Cn}, ...} (the
-- dispatch is in lua/steep/integral.lua). Methods: critical (critical points in C^n),
-- expand (the expansion at the points that contribute, lua/steep/hormander.lua), series
-- (the standard form), quad (iterated quadrature, lua/steep/multiquad.lua), check (the
-- two against each other), map (lua/steep/multimap.lua).
--
-- The tape is compiled with every symbol a parameter; the variables are parameter slots
-- the C kernels set (ext/mjet.c), so the one tape serves values, gradients, Hessians and
-- jets in total degree.

local core = require "steep.core"
local complex = require "steep.complex"
local expr = require "steep.expr"
local contour_m = require "steep.contour"
local integral = require "steep.integral"

local cnew, cparts, hypot = complex.new, complex.parts, complex.hypot
local format, abs, huge = string.format, math.abs, math.huge

local M = {}
local Multi = { __name = "steep.integral" }
local methods = {}
Multi.__index = methods

local function argerror(msg) error("bad argument #1 to 'integral' (" .. msg .. ")", 4) end

local function cabs(z) local re, im = cparts(z); return hypot(re, im) end

--- new(spec): spec.var a list of 1 to 4 variables, spec.contour a list of as many
-- contours (called by steep.integral, which has checked that spec is a table).
function M.new(spec)
  local known = { var = true, exponent = true, amplitude = true, contour = true, large = true }
  for k in pairs(spec) do
    if not known[k] then
      argerror(format("unknown field '%s' (fields: var, exponent, amplitude, contour, large)",
        tostring(k)))
    end
  end
  local vars = spec.var
  local n = #vars
  if n < 1 or n > core.multi_max_vars then
    argerror(format("field 'var' lists %d variables (1 to %d supported)", n,
      core.multi_max_vars))
  end
  local seen = {}
  for k = 1, n do
    local v = vars[k]
    if not (expr.is(v) and v.op == "var") then
      argerror(format("field 'var' entry %d must be a variable made by steep.var, got %s", k,
        expr.is(v) and v.op or type(v)))
    end
    if seen[v] then argerror(format("field 'var' names %s twice", v.name)) end
    seen[v] = true
  end
  local F = spec.exponent
  if not expr.is(F) then
    argerror("field 'exponent' must be an expression, got "
      .. (complex.is(F) and "a complex value" or type(F)))
  end
  for _, v in ipairs(vars) do
    if not F:depends_on(v) then
      argerror("the exponent " .. tostring(F) .. " does not depend on " .. v.name)
    end
  end
  local g = spec.amplitude
  if g == nil then g = 1 end
  if not (expr.is(g) or cparts(g)) then
    argerror("field 'amplitude' must be an expression, number or complex value, got " .. type(g))
  end
  local C = spec.contour
  if type(C) ~= "table" or contour_m.is(C) then
    argerror(format("field 'contour' must be a list of %d contours (one per variable), got %s",
      n, contour_m.is(C) and "one contour" or type(C)))
  end
  if #C ~= n then
    argerror(format("field 'contour' lists %d contours for %d variables", #C, n))
  end
  for k = 1, n do
    if not contour_m.is(C[k]) then
      argerror(format("field 'contour' entry %d must be a contour (steep.line, steep.path, "
        .. "steep.circle), got %s", k, type(C[k])))
    end
  end
  local large = spec.large
  if large ~= nil and not (expr.is(large) and large.op == "param") then
    argerror("field 'large' must be a parameter made by steep.param")
  end
  local J = setmetatable({ vars = vars, n = n, exponent = F, amplitude = g, contours = C,
    large = large }, Multi)
  J.tape = expr.compile({ F, g }, nil, 4)
  local names = J.tape:params()
  local slot = {}
  for i, name in ipairs(names) do slot[name] = i end
  J.varslot, J.params = {}, {}
  local isvar = {}
  for k, v in ipairs(vars) do
    J.varslot[k] = slot[v.name]
    isvar[v.name] = true
  end
  for _, name in ipairs(names) do
    if not isvar[name] then J.params[#J.params + 1] = name end
  end
  return J
end

Multi.__tostring = function(J)
  local names, cs = {}, {}
  for k, v in ipairs(J.vars) do names[k] = v.name; cs[k] = tostring(J.contours[k]) end
  local g = J.amplitude
  local gs = (g == 1) and "" or ("(" .. tostring(g) .. ")*")
  return format("integral of %sexp(%s) d%s over %s", gs, tostring(J.exponent),
    table.concat(names, " d"), table.concat(cs, " x "))
end

--- The parameter table the kernels read: the user's parameters and the variables (0).
function methods._cparams(J, params)
  local cp = {}
  for k, v in pairs(params) do cp[k] = v end
  for _, v in ipairs(J.vars) do cp[v.name] = 0 end
  return cp
end

-- (level: the error level of the method's caller, counted from here)
local function check_point(J, p, fname, what, level)
  level = level or 3
  if type(p) ~= "table" or complex.is(p) or #p ~= J.n then
    error(format("%s: option %s must be a list of %d coordinates", fname, what, J.n), level)
  end
  local out = {}
  for k = 1, J.n do
    local re, im = cparts(p[k])
    if not re or re ~= re or im ~= im or abs(re) == huge or abs(im) == huge then
      error(format("%s: option %s coordinate %d must be a finite number or complex value",
        fname, what, k), level)
    end
    out[k] = cnew(re, im)
  end
  return out
end

local function check_seeds(J, seeds, fname)
  if seeds == nil then return nil end
  if type(seeds) ~= "table" then
    error(format("%s: option 'seeds' must be a list of points", fname), 3)
  end
  local out = {}
  for i, s in ipairs(seeds) do out[i] = check_point(J, s, fname, format("'seeds' entry %d", i), 4) end
  return out
end

--- J:critical{<params>, seeds = {...}} -> list of critical points {x, F, gradient,
-- hessian, eigenvalues (of -F''), real, degenerate}, and the search's info (method,
-- status, note; for the homotopy the counts of paths).
function methods.critical(J, opts)
  local params, o = integral.split_options(J, opts, { seeds = true }, "critical")
  local cp = J:_cparams(params)
  return require("steep.critical").find(J, cp, { seeds = check_seeds(J, o.seeds, "critical") })
end

--- J:expand{<params>, order = K, at = {...}, seeds = {...}} -> result {value, error,
-- scaled_value, scaled_error, log_value, contributions, status, notes, :report()}
function methods.expand(J, opts)
  local params, o = integral.split_options(J, opts, { order = true, at = true, seeds = true },
    "expand")
  local hormander = require "steep.hormander"
  local K = hormander.check_order(o.order or 1, J.n, "expand")
  local at = o.at and check_point(J, o.at, "expand", "'at'")
  local cp = J:_cparams(params)
  local r = hormander.expand(J, cp, { order = K, at = at, seeds = check_seeds(J, o.seeds, "expand") })
  r.integral, r.params = J, params
  return setmetatable(r, { __index = { report = M.report } })
end

--- J:series{order = K, at =} -> per contribution the coefficients of the standard form
-- e^{lambda phi0} sum_m c_m lambda^{-(p + m/2)} (the exponent must be lambda phi).
function methods.series(J, opts)
  opts = opts or {}
  if not J.large then error("series: the integral names no large parameter (large = ...)", 2) end
  local full = {}
  for k, v in pairs(opts) do full[k] = v end
  if full[J.large.name] == nil then full[J.large.name] = 1 end
  local params, o = integral.split_options(J, full, { order = true, at = true }, "series")
  local ok, why = M.homogeneous(J, params)
  if not ok then error("series: the standard form does not apply: " .. why, 2) end
  local hormander = require "steep.hormander"
  local K = hormander.check_order(o.order or 4, J.n, "series")
  params[J.large.name] = 1
  return hormander.series(J, J:_cparams(params), { order = K,
    at = o.at and check_point(J, o.at, "series", "'at'") })
end

--- Is the exponent large * phi(x) with phi and the amplitude free of the large parameter?
function M.homogeneous(J, params)
  local x = J.large
  local F, g = J.exponent, J.amplitude
  if expr.is(g) and g:depends_on(x) then
    return false, "the amplitude depends on the large parameter " .. x.name
  end
  if F.op == "mul" and ((F.a == x and not F.b:depends_on(x)) or
      (F.b == x and not F.a:depends_on(x))) then
    return true
  end
  local pt = {}
  for k = 1, J.n do pt[k] = cnew(0.3 + 0.17 * k, 0.05 * k) end
  local p1, p2 = J:_cparams(params), J:_cparams(params)
  p1[x.name], p2[x.name] = 1.7, 3.1
  local ok1, F1 = pcall(core.multi_eval, J.tape, p1, J.varslot, { pt })
  local ok2, F2 = pcall(core.multi_eval, J.tape, p2, J.varslot, { pt })
  if ok1 and ok2 then
    local a, b = F1:get(1) / 1.7, F2:get(1) / 3.1
    if cabs(a - b) > 1e-12 * (1 + cabs(a)) then
      return false, "the exponent is not " .. x.name .. " times a function of the variables"
    end
  end
  return true
end

--- J:quad{<params>, along = "deformed" | "given"} -> value, error estimate, info
function methods.quad(J, opts)
  local params, o = integral.split_options(J, opts, { along = true }, "quad")
  local along = o.along or "deformed"
  if along ~= "deformed" and along ~= "given" then
    error(format("quad: option 'along' must be \"deformed\" or \"given\", got %s",
      tostring(along)), 2)
  end
  return require("steep.multiquad").quad(J, params, { along = along })
end

--- J:check{<large> = {values}, order = K, <other params>} -> rows, verified, :report()
function methods.check(J, opts)
  local values, rest = integral.check_values(J, opts)
  local params, o = integral.split_options(J, rest, { order = true, at = true, along = true },
    "check")
  local rows = {}
  local all = true
  for _, v in ipairs(values) do
    local p = {}
    for k, val in pairs(params) do p[k] = val end
    p[J.large.name] = v
    local eopts = { order = o.order or 4, at = o.at }
    for k, val in pairs(p) do eopts[k] = val end
    local r = J:expand(eopts)
    local qopts = { along = o.along }
    for k, val in pairs(p) do qopts[k] = val end
    local q, qe, qinfo = J:quad(qopts)
    local diff = cabs(r.value - q)
    local scale = math.max(cabs(q), 1e-300)
    -- (within the two estimates as stated, 1x, as the one-variable J:check)
    local agrees = diff <= r.error + qe and qinfo.status == "ok"
    all = all and agrees
    rows[#rows + 1] = { x = v, expansion = r.value, quad = q, quad_error = qe,
      relative_error = diff / scale, estimated = r.error / scale, agrees = agrees,
      quad_status = qinfo.status, status = r.status }
  end
  local sx, sy, sxx, sxy, n = 0, 0, 0, 0, 0
  for _, row in ipairs(rows) do
    local ax = cabs(row.x)
    if row.relative_error > 0 and ax > 0 then
      local lx, ly = math.log(ax), math.log(row.relative_error)
      sx, sy, sxx, sxy, n = sx + lx, sy + ly, sxx + lx * lx, sxy + lx * ly, n + 1
    end
  end
  local slope
  if n >= 2 and (n * sxx - sx * sx) > 0 then slope = (n * sxy - sx * sy) / (n * sxx - sx * sx) end
  local result = { rows = rows, observed_order = slope, verified = all, order = o.order or 4,
    integral = J, large = J.large.name }
  return setmetatable(result, { __index = { report = require("steep.asymptotics").check_report } })
end

--- J:map{<params>, file =, pair = {i, j}, ...} -> file, summary (lua/steep/multimap.lua)
function methods.map(J, opts) return require("steep.multimap").map(J, opts) end

local function fmtc(z)
  local re, im = cparts(z)
  if im == 0 then return format("%.12g", re) end
  return format("%.12g%+.12gi", re, im)
end

--- result:report{format = "text" | "json" | "csv"}
function M.report(r, opts)
  local other = require("steep.report").format(opts, r, r.contributions,
    { "kind", "F", "value", "error", "used", "ratio" })
  if other then return other end
  local lines = {}
  local function add(...) lines[#lines + 1] = format(...) end
  add("integral: %s", tostring(r.integral))
  local ps = {}
  for k, v in pairs(r.params) do ps[#ps + 1] = k .. " = " .. tostring(v) end
  table.sort(ps)
  add("parameters: %s%s", #ps > 0 and table.concat(ps, ", ") or "none",
    r.integral.large and ("   (large parameter: " .. r.integral.large.name .. ")") or "")
  add("problem: %s; terms per contribution: %d (through 1/%s^%d)", r.kind, r.order,
    r.integral.large and r.integral.large.name or "lambda", r.order - 1)
  add("contributions (most dominant first):")
  for i, c in ipairs(r.contributions) do
    add("  %d. %s at %s", i, c.kind, require("steep.critical").point_text(c.at))
    add("     coordinates: %s", table.concat(c.coordinates, ", "))
    add("     F = %s; value %s, error %.3g (%d terms; last ratio %.3g, safety %.3g)", fmtc(c.F),
      fmtc(c.value), c.error, c.used, c.ratio, c.safety)
    if c.signature then add("     signature %+d: phase factor e^(i pi %d/4)", c.signature, c.signature) end
    local ts = {}
    for k, t in ipairs(c.terms) do ts[k] = fmtc(t) end
    add("     terms: %s", table.concat(ts, "; "))
  end
  add("total: %s   estimated error %.3g (relative %.3g)", fmtc(r.value), r.error,
    r.relative_error)
  add("log of the total: %s", fmtc(r.log_value))
  add("status: %s", r.status)
  for _, n in ipairs(r.notes or {}) do add("note: %s", n) end
  add("caution: an asymptotic approximation; check it (J:check) before it informs any "
    .. "engineering, financial or safety decision")
  return table.concat(lines, "\n")
end

-- The one-variable methods that have no several-variable form yet: a clear error.
for _, name in ipairs({ "landscape", "rescale", "suggest_rescaling", "crossings", "compare",
    "sweep" }) do
  methods[name] = function()
    error(format("%s: not available for integrals in several variables (available: critical, "
      .. "expand, series, quad, check, map)", name), 2)
  end
end

M.Multi = Multi
return M
