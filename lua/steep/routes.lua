-- steep.routes — the two routes to the asymptotics of an integral whose exponent is not
-- homogeneous in the large parameter: directly (saddles followed as the parameter moves)
-- and after rescaling the integration variable, with the check that makes the second
-- route safe: does a singularity cross the contour as the parameter moves?
--
-- The entry points of J:rescale, J:suggest_rescaling, J:compare (steep.rescale),
-- J:crossings (steep.crossings) and J:sweep (steep.sweep), and what they share: parameter
-- paths, time budgets, option checks.

local complex = require "steep.complex"
local contour_m = require "steep.contour"

local cparts = complex.parts
local format, abs, huge = string.format, math.abs, math.huge

local M = {}

function M.copy(t)
  local o = {}
  for k, v in pairs(t or {}) do o[k] = v end
  return o
end

function M.is_real(v)
  local _, im = cparts(v)
  return im == 0
end

-- A value in a message or report, 6 significant digits, rounding noise shown as 0.
function M.fmtv(v, err) return require("steep.report").num(v, err, 6) end

--- An optional time budget in seconds (CPU time, os.clock) for long analyses.
function M.check_budget(b, fname)
  if b == nil then return nil end
  if type(b) ~= "number" or not (b > 0) or b ~= b then
    error(format("%s: option 'budget' must be a positive number of seconds, got %s", fname,
      tostring(b)), 3)
  end
  return b
end

-- Parameter values as a table (by name) with the large parameter set to v.
function M.with_large(J, params, v)
  local p = M.copy(params)
  p[J.large.name] = v
  return p
end

-- The options argument must be a table (the error points at the caller's caller).
function M.need_table(opts, fname)
  if type(opts) ~= "table" then
    error(format("bad argument #1 to '%s' (options table expected, got %s)", fname,
      type(opts)), 3)
  end
end

-- Parameter path: a list of values from {from =, to =, steps =}, a list, or a
-- steep.path in the complex parameter plane (sampled evenly along its polyline).
function M.parameter_values(spec, fname)
  if contour_m.is(spec) then
    local pts = spec:sample { radius = 1, n = 24 }
    return pts
  end
  if type(spec) ~= "table" then
    error(fname .. ": give the large parameter as {from =, to =, steps =}, a list, or "
      .. "a steep.path of values", 3)
  end
  if spec.from ~= nil or spec.to ~= nil then
    local a, b, n = spec.from, spec.to, spec.steps or 50
    if not (cparts(a) and cparts(b)) then error(fname .. ": 'from' and 'to' must be numbers", 3) end
    if type(n) ~= "number" or n < 1 or n ~= math.floor(n) or n > 1e6 then
      error(fname .. ": 'steps' must be a whole number from 1 to 10^6", 3)
    end
    local out = {}
    for k = 0, n do out[#out + 1] = a + (b - a) * (k / n) end
    return out
  end
  if #spec == 0 then error(fname .. ": the list of parameter values is empty", 3) end
  for i, v in ipairs(spec) do
    local re, im = cparts(v)
    if not re or re ~= re or im ~= im or abs(re) == huge or abs(im) == huge then
      error(format("%s: parameter value %d is not a finite number", fname, i), 3)
    end
  end
  return spec
end

function M.rescale(J, opts) return require("steep.rescale").rescale(J, opts) end
function M.homogeneity(K, at) return require("steep.rescale").homogeneity(K, at) end
function M.suggest(J, opts) return require("steep.rescale").suggest(J, opts) end
function M.compare(J, opts) return require("steep.rescale").compare(J, opts) end
function M.crossings(J, opts) return require("steep.crossings").crossings(J, opts) end
function M.sweep(J, opts) return require("steep.sweep").sweep(J, opts) end

return M
