-- special_functions.lua — special functions from their integral representations: a small
-- family of representations, each an integral with a large parameter, analysed the same
-- way (landscape, expansion, check against quadrature). Swap in your own integrand: a
-- representation is just {exponent =, amplitude =, contour =, prefactor =}.
--
-- The representations (sources named beside each):
--   airy     Ai(x)      = (1/2 pi) int_R exp(i (t^3/3 + x t)) dt            (DLMF 9.5.1)
--   gamma    Gamma(x+1) = x^(x+1) int_0^inf exp(x (log s - s)) ds           (DLMF 5.2.1)
--   expint   e^x E1(x)  = int_0^inf e^{-x t} / (1 + t) dt                    (DLMF 6.2.2)
--   hankel   1/Gamma(z) = (1/2 pi i) int_{-inf}^{(0+)} e^t t^{-z} dt         (DLMF 5.9.2)
--   bessel   J_n(x)     = (1/2 pi) int_{-pi}^{pi} exp(i (x sin t - n t)) dt  (DLMF 10.9.2)
-- Where an expansion cannot be made (a contour the steepest-descent decomposition does not
-- settle, say), the table says "failed" and prints the reason below it, with quadrature's
-- value: the expansion says why instead of guessing.
--
-- Use it as a module:
--     local sf = dofile "recipes/special_functions.lua"
--     local r = sf.analyse("gamma", { x = 20 }, 6)     -- expansion, quadrature, agreement
--     sf.add("mine", { var =, exponent =, amplitude =, contour =, large =, prefactor = })
--     print(sf.table { "gamma", "mine" })              -- the table, as the script prints it
-- Run: lua5.4 recipes/special_functions.lua (a table of every representation).

local steep = require "steep"
steep.require_version("0.1")

local M = {}
local t, s = steep.var "t", steep.var "s"
local x, z, n = steep.param "x", steep.param "z", steep.param "n"
local I, pi = steep.I, math.pi

-- Each representation: the integral, the factor in front (a function of the parameters),
-- and sample parameter values for the script.
M.family = {
  airy = {
    integral = steep.integral { var = t, exponent = I * (t ^ 3 / 3 + x * t),
      contour = steep.line(steep.inf(pi), steep.inf(0)), large = x },
    prefactor = function() return 1 / (2 * pi) end,
    sample = { x = 6 },
  },
  gamma = {
    integral = steep.integral { var = s, exponent = x * (steep.log(s) - s),
      contour = steep.line(0, steep.inf(0)), large = x },
    prefactor = function(p) return p.x ^ (p.x + 1) end,
    sample = { x = 12 },
  },
  expint = {
    integral = steep.integral { var = t, exponent = -x * t, amplitude = 1 / (1 + t),
      contour = steep.line(0, steep.inf(0)), large = x },
    prefactor = function() return 1 end,
    sample = { x = 15 },
  },
  hankel = {
    integral = steep.integral { var = t, exponent = t - z * steep.log(t),
      contour = steep.path { steep.inf(pi), -1 - 1 * I, 1 - 1 * I, 1 + 1 * I, -1 + 1 * I,
        steep.inf(pi) }, large = z },
    prefactor = function() return 1 / (2 * pi * I) end,
    sample = { z = 8.5 },
  },
  bessel = {
    integral = steep.integral { var = t, exponent = I * (x * steep.sin(t) - n * t),
      contour = steep.line(-pi, pi), large = x },
    prefactor = function() return 1 / (2 * pi) end,
    sample = { x = 30, n = 2 },
  },
}

--- M.add(name, spec): a representation of your own. spec holds steep.integral's fields
-- plus prefactor = function(params) -> number or complex (default 1), sample = {params}.
function M.add(name, spec)
  if type(name) ~= "string" or type(spec) ~= "table" then
    error("bad argument to 'add' (name and representation expected)", 2)
  end
  local prefactor = spec.prefactor or function() return 1 end
  local fields = {}
  for k, v in pairs(spec) do
    if k ~= "prefactor" and k ~= "sample" then fields[k] = v end
  end
  M.family[name] = { integral = steep.integral(fields), prefactor = prefactor,
    sample = spec.sample or {} }
end

--- M.analyse(name, params, order) -> {value, error, quad, quad_error, agrees, status,
-- result (J:expand's)}: the function's value by expansion and by quadrature.
function M.analyse(name, params, order)
  local rep = M.family[name]
  if not rep then error("special_functions: no representation named " .. tostring(name), 2) end
  local o = { order = order or 4 }
  for k, v in pairs(params) do o[k] = v end
  local res = rep.integral:expand(o)
  local q, qe = rep.integral:quad(params)
  local f = rep.prefactor(params)
  local fa = steep.is_complex(f) and f:abs() or math.abs(f)
  local diff = (res.value - q):abs()
  return { value = res.value * f, error = res.error * fa, quad = q * f, quad_error = qe * fa,
    agrees = diff <= res.error + qe, status = res.status, result = res }
end

-- Words wrapped to lines of at most `width` columns, continuation lines indented.
local function wrap(text, width, indent)
  local lines, cur = {}, ""
  for word in text:gmatch("%S+") do
    if cur ~= "" and #cur + 1 + #word > width then
      lines[#lines + 1] = cur
      cur = string.rep(" ", indent) .. word
    else
      cur = cur == "" and word or (cur .. " " .. word)
    end
  end
  lines[#lines + 1] = cur
  return table.concat(lines, "\n")
end

--- M.table(names) -> text: each representation's sample by expansion and by quadrature,
-- aligned; an expansion that failed is marked and its reason printed below the table.
function M.table(names)
  local rows, why = {}, {}
  for _, name in ipairs(names) do
    local rep = M.family[name]
    if not rep then error("special_functions: no representation named " .. tostring(name), 2) end
    local ps = {}
    for k, v in pairs(rep.sample) do ps[#ps + 1] = k .. "=" .. tostring(v) end
    table.sort(ps)
    local ok, r = pcall(M.analyse, name, rep.sample, 4)
    if ok then
      rows[#rows + 1] = { name, table.concat(ps, ","), steep.show(r.value, r.error),
        string.format("%.2g", r.error), steep.show(r.quad, r.quad_error),
        string.format("%.3g", (r.value - r.quad):abs() / r.quad:abs()), tostring(r.agrees),
        tostring(r.status):match("^[^:]*") }
    else
      -- the expansion failed: say why (below the table), and give quadrature's value
      local qok, q, qe = pcall(rep.integral.quad, rep.integral, rep.sample)
      local f = rep.prefactor(rep.sample)
      local fa = steep.is_complex(f) and f:abs() or math.abs(f)
      rows[#rows + 1] = { name, table.concat(ps, ","), "failed (see below)", "",
        qok and steep.show(q * f, qe * fa) or "failed", "", "", "failed" }
      why[#why + 1] = wrap(name .. ": the expansion failed: "
        .. tostring(r):gsub("^.-expand: ", ""), 100, 4)
      if not qok then why[#why + 1] = wrap(name .. ": quadrature failed too: " .. tostring(q), 100, 4) end
    end
  end
  local head = { "name", "parameters", "expansion", "error", "quadrature", "rel.err", "agrees",
    "status" }
  local width = {}
  for c, h in ipairs(head) do
    width[c] = #h
    for _, r in ipairs(rows) do width[c] = math.max(width[c], #r[c]) end
  end
  local function line(cells)
    local out = {}
    for c, v in ipairs(cells) do out[c] = v .. string.rep(" ", width[c] - #v) end
    return (table.concat(out, "  "):gsub("%s+$", ""))
  end
  local lines = { line(head) }
  for _, r in ipairs(rows) do lines[#lines + 1] = line(r) end
  for _, w in ipairs(why) do lines[#lines + 1] = w end
  return table.concat(lines, "\n")
end

if arg and arg[0] and arg[0]:match("special_functions%.lua$") then
  print(M.table { "airy", "gamma", "expint", "hankel", "bessel" })
end

return M
