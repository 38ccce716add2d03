-- steep — asymptotic analysis of integrals with a large parameter.
--
-- The public table. Expressions are built from symbols with ordinary Lua arithmetic,
-- compiled to tapes in C, and evaluated as values, batches or Taylor jets.

local core = require "steep.core"
local complex = require "steep.complex"
local expr = require "steep.expr"
local contour = require "steep.contour"
local integral = require "steep.integral"

local steep = {}

steep.version = "0.1.0"

--- steep.require_version("0.1"): a recipe states the API version it was written for
-- (semantic versioning: same major version, at least that minor version); a mismatch is
-- a loud error rather than a silently wrong analysis.
function steep.require_version(wanted)
  if type(wanted) ~= "string" or not wanted:match("^%d+%.%d+") then
    error("bad argument #1 to 'require_version' (version string like \"0.1\" expected)", 2)
  end
  local wmaj, wmin = wanted:match("^(%d+)%.(%d+)")
  local hmaj, hmin = steep.version:match("^(%d+)%.(%d+)")
  wmaj, wmin, hmaj, hmin = tonumber(wmaj), tonumber(wmin), tonumber(hmaj), tonumber(hmin)
  if wmaj ~= hmaj or hmin < wmin then
    error(string.format("this script needs steep %s (API %d.%d or a later %d.x); the "
      .. "installed steep is %s", wanted, wmaj, wmin, wmaj, steep.version), 2)
  end
  return true
end
steep.max_order = core.max_order

-- symbols and values
function steep.var(name) return expr.symbol("var", name) end
function steep.param(name) return expr.symbol("param", name) end

function steep.complex(re, im)
  if type(re) ~= "number" then
    error(string.format("bad argument #1 to 'complex' (number expected, got %s)", type(re)), 2)
  end
  if im ~= nil and type(im) ~= "number" then
    error(string.format("bad argument #2 to 'complex' (number expected, got %s)", type(im)), 2)
  end
  return complex.new(re, im or 0)
end
steep.I = complex.I
steep.is_complex = complex.is
steep.is_expr = expr.is

-- elementary functions on numbers, complex values and expressions (principal branches);
-- on a steep.series they apply the series kernel.
local series_mt = getmetatable(core.series { 0 })
for _, name in ipairs(complex.function_names) do
  steep[name] = function(v)
    if getmetatable(v) == series_mt then return v[name](v) end
    return expr.fn(name, v)
  end
end

--- steep.diff(e, sym): derivative; steep.substitute(e, {[sym] = value, ...})
function steep.diff(e, sym)
  if not (expr.is(sym) and (sym.op == "var" or sym.op == "param")) then
    error("bad argument #2 to 'diff' (symbol expected)", 2)
  end
  return expr.diff(e, sym)
end
function steep.substitute(e, map)
  if type(map) ~= "table" then error("bad argument #2 to 'substitute' (table expected)", 2) end
  return expr.substitute(e, map)
end

-- tapes and series
--- steep.compile(exprs, var) -> tape (see lua/steep/expr.lua).
function steep.compile(exprs, var) return expr.compile(exprs, var) end

steep.series = core.series
steep.cvec = core.cvec
steep.cvec_range = core.cvec_range

--- steep.taylor(e, var, at, order, params) -> series: the Taylor coefficients of e in
-- var about `at` to the given order (params binds every other symbol by name).
function steep.taylor(e, var, at, order, params)
  if not expr.is(var) then
    error("bad argument #2 to 'taylor' (symbol expected, got " .. type(var) .. ")", 2)
  end
  if type(order) ~= "number" or math.tointeger(order) == nil or order < 0
      or order > core.max_order then
    error(string.format("bad argument #4 to 'taylor' (order in 0..%d expected, got %s)",
      core.max_order, tostring(order)), 2)
  end
  local re, im = complex.parts(at)
  if not re or re ~= re or im ~= im or math.abs(re) == math.huge or math.abs(im) == math.huge then
    error("bad argument #3 to 'taylor' (finite number or complex point expected, got "
      .. (re and tostring(at) or type(at)) .. ")", 2)
  end
  if params ~= nil and type(params) ~= "table" then
    error("bad argument #5 to 'taylor' (table of parameter values expected, got "
      .. type(params) .. ")", 2)
  end
  local tape = expr.compile(e, var, 3)
  local ok, s = pcall(tape.jet, tape, at, math.tointeger(order), params or {})
  if not ok then
    -- the jet's own message (unbound parameter, singular point), blamed on the caller
    error("taylor: " .. tostring(s):gsub("^[^\n]-:%d+: ", ""), 2)
  end
  return s
end

-- contours and integrals
steep.inf = contour.inf
steep.line = contour.line
steep.path = contour.path
steep.circle = contour.circle
steep.is_contour = contour.is
steep.integral = integral.new

--- steep.airy(z) -> Ai(z), Ai'(z), their error estimates and a status (complex z);
-- steep.airy_bi(z) the same for Bi
function steep.airy(z) return require("steep.special").airy(z) end
function steep.airy_bi(z) return require("steep.special").airy_bi(z) end

--- steep.show(v [, err [, digits]]) -> text: a number or complex value as the reports print
-- it: `digits` significant digits (10), and a part below the value's rounding (1e-13 of
-- its size, or a hundredth of its error estimate err) shown as 0, never as -0.
function steep.show(v, err, digits)
  if not complex.parts(v) then
    error("bad argument #1 to 'show' (number or complex value expected, got " .. type(v) .. ")", 2)
  end
  if err ~= nil and type(err) ~= "number" then
    error("bad argument #2 to 'show' (error estimate expected, got " .. type(err) .. ")", 2)
  end
  if digits ~= nil and (math.tointeger(digits) == nil or digits < 1 or digits > 17) then
    error("bad argument #3 to 'show' (a whole number of digits from 1 to 17 expected)", 2)
  end
  return require("steep.report").num(v, err, digits)
end

return steep
