-- steep.report — machine-readable forms of the results: JSON (through lua-cjson, Debian's
-- lua-cjson package) and CSV for the tables. The text reports live beside each result.

local complex = require "steep.complex"

local M = {}

local function is_integral(v)
  local mt = getmetatable(v)
  return mt and mt.__name == "steep.integral"
end

-- A plain copy: complex values as {re, im}, expressions and integrals as text, no
-- functions or userdata, no cycles; landscapes reduced to what they found.
function M.plain(v, seen)
  seen = seen or {}
  local tv = type(v)
  if tv == "number" then
    if v ~= v then return "nan" end
    if v == math.huge then return "inf" elseif v == -math.huge then return "-inf" end
    return v
  end
  if tv == "string" or tv == "boolean" or tv == "nil" then return v end
  if tv ~= "table" then return tostring(v) end
  if complex.is(v) then
    return { re = M.plain(v[1]), im = M.plain(v[2]) }
  end
  local mt = getmetatable(v)
  if is_integral(v) or (mt and (mt.__name == "steep.expr" or mt.__name == "steep.contour"
      or mt.__name == "steep.inf")) then
    return tostring(v)
  end
  if seen[v] then return nil end
  seen[v] = true
  local out = {}
  for k, x in pairs(v) do
    local tk = type(k)
    if (tk == "string" or tk == "number") and type(x) ~= "function" and type(x) ~= "userdata"
        and k ~= "landscape" and k ~= "paths" and k ~= "J" and k ~= "_lcache"
        and k ~= "tape" and k ~= "full" and k ~= "points" and k ~= "tail" then
      out[k] = M.plain(x, seen)
    end
  end
  seen[v] = nil
  return out
end

--- JSON text of a result.
function M.json(v)
  local ok, cjson = pcall(require, "cjson")
  if not ok then
    error("format = \"json\" needs lua-cjson (Debian package lua-cjson; make deps installs it)", 3)
  end
  cjson.encode_invalid_numbers(true)
  cjson.encode_sparse_array(true)
  return cjson.encode(M.plain(v))
end

local function csv_cell(v)
  if v == nil then return "" end
  if type(v) == "number" then return string.format("%.17g", v) end
  if type(v) == "boolean" then return tostring(v) end
  local s = tostring(v)
  if s:find('[,"\n]') then s = '"' .. s:gsub('"', '""') .. '"' end
  return s
end

--- CSV text of a list of rows (tables of scalars and complex values; complex values take
-- two columns, <name>_re and <name>_im). Columns in the given order.
function M.csv(rows, columns)
  local header = {}
  for _, c in ipairs(columns) do
    local sample
    for _, r in ipairs(rows) do if r[c] ~= nil then sample = r[c]; break end end
    if complex.is(sample) then
      header[#header + 1] = c .. "_re"
      header[#header + 1] = c .. "_im"
    else
      header[#header + 1] = c
    end
  end
  local lines = { table.concat(header, ",") }
  for _, r in ipairs(rows) do
    local cells = {}
    for _, c in ipairs(columns) do
      local v = r[c]
      local sample
      for _, rr in ipairs(rows) do if rr[c] ~= nil then sample = rr[c]; break end end
      if complex.is(sample) then
        local re, im = complex.parts(v or complex.new(0 / 0, 0 / 0))
        cells[#cells + 1] = csv_cell(re)
        cells[#cells + 1] = csv_cell(im)
      else
        cells[#cells + 1] = csv_cell(v)
      end
    end
    lines[#lines + 1] = table.concat(cells, ",")
  end
  return table.concat(lines, "\n") .. "\n"
end

--- Dispatch of a report's format option: nil or "text" -> nil (the caller writes text).
function M.format(opts, result, rows, columns)
  local fmt = type(opts) == "table" and opts.format or opts
  if fmt == nil or fmt == "text" then return nil end
  if fmt == "json" then return M.json(result) end
  if fmt == "csv" then
    if not rows then error("format = \"csv\" is for tables (check, sweep, compare, the "
      .. "contributions of an expansion)", 3) end
    return M.csv(rows, columns)
  end
  error(string.format("report: format must be \"text\", \"json\" or \"csv\", got %s",
    tostring(fmt)), 3)
end

return M
