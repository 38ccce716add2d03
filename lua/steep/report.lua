-- steep.report — what every result's report shares: numbers as text (noise below a
-- value's rounding shown as 0), aligned tables and wrapped lines within 100 columns, and
-- the machine-readable forms: JSON (written here: 17 significant digits where fewer do
-- not read back the same, keys in a stable order, empty lists as []) and CSV for the
-- tables. The text reports live beside each result.

local complex = require "steep.complex"

local cparts = complex.parts
local format, concat = string.format, table.concat
local abs, max, huge, floor = math.abs, math.max, math.huge, math.floor

local M = {}

M.WIDTH = 100   -- columns of a text report

---------------------------------------------------------------------------------------
-- Numbers in text reports.
---------------------------------------------------------------------------------------

-- A part of a value below this times its size is rounding, not a digit: a few hundred
-- operations in double precision lose that much (common practice).
local NOISE = 1e-13

local function real_text(x, digits)
  if x ~= x then return "nan" end
  if x == huge then return "inf" elseif x == -huge then return "-inf" end
  if x == 0 then return "0" end
  return format("%." .. digits .. "g", x)
end

--- The text of a number or complex value v with `digits` significant digits (10 unless
-- given). A part below the value's rounding prints as 0 and drops out: below 1e-13 times
-- the value's size, or below a hundredth of its error estimate `err` when one is given
-- (noise such as 1e-32 beside 2.83i, or 1e-18i on a real result). Never "-0". The full
-- values stay in the result tables.
function M.num(v, err, digits)
  digits = digits or 10
  local re, im = cparts(v)
  if re == nil then return tostring(v) end
  local size = max(abs(re), abs(im))
  local tiny = NOISE * (size == huge and 0 or size)
  if type(err) == "number" and err == err and err ~= huge then tiny = max(tiny, 0.01 * err) end
  if abs(re) <= tiny then re = 0 end
  if abs(im) <= tiny then im = 0 end
  if im == 0 then return real_text(re, digits) end
  local imt = real_text(abs(im), digits) .. "i"
  if re == 0 then return (im < 0 and "-" or "") .. imt end
  return real_text(re, digits) .. (im < 0 and "-" or "+") .. imt
end

---------------------------------------------------------------------------------------
-- Text layout.
---------------------------------------------------------------------------------------

local function width_of(s) return utf8.len(s) or #s end

local function pad(s, w, right)
  local fill = string.rep(" ", max(0, w - width_of(s)))
  return right and (fill .. s) or (s .. fill)
end

--- Words of `text` in lines of at most `width` columns (M.WIDTH unless given), the
-- first after `first` (a prefix), the others after `indent` spaces. A single word
-- longer than a line keeps its own line, whole: no digit is ever cut.
function M.wrap(text, first, indent, width)
  width = width or M.WIDTH
  first = first or ""
  local lead = string.rep(" ", indent or 0)
  local lines, cur = {}, first
  local empty = true
  for word in tostring(text):gmatch("%S+") do
    if not empty and width_of(cur) + 1 + width_of(word) > width then
      lines[#lines + 1] = cur
      cur, empty = lead .. word, false
    else
      cur = empty and (cur .. word) or (cur .. " " .. word)
      empty = false
    end
  end
  lines[#lines + 1] = cur
  return concat(lines, "\n")
end

--- The width of each column: its title's or its widest cell's.
function M.widths(columns, rows)
  local w = {}
  for i, c in ipairs(columns) do
    w[i] = width_of(c[1])
    for _, r in ipairs(rows) do w[i] = max(w[i], width_of(r[i] or "")) end
  end
  return w
end

--- An aligned text table. columns: list of {title, right = true|false}; rows: lists of
-- cell strings (nil prints as empty). Each column is as wide as its widest cell (or as
-- `widths` says, from M.widths over more rows: tables printed in pieces stay aligned). A
-- row wider than `width` (M.WIDTH unless given) is folded: the columns that do not fit go
-- on continuation lines, indented by 4 and aligned among themselves; nothing is cut.
-- `indent` spaces go before every line; `no_header` leaves the titles out. Returns the
-- lines as one string.
function M.table(columns, rows, width, indent, widths, no_header)
  width = width or M.WIDTH
  local lead = string.rep(" ", indent or 0)
  local w = widths or M.widths(columns, rows)
  -- bands of columns that fit in the width
  local bands, cur, used = {}, nil, 0
  for i = 1, #columns do
    local start = cur and used + 2 or (#bands == 0 and #lead or #lead + 4)
    if not cur or start + w[i] > width then
      cur = { first = i, last = i, indent = #bands == 0 and 0 or 4 }
      bands[#bands + 1] = cur
      used = #lead + cur.indent + w[i]
    else
      cur.last = i
      used = start + w[i]
    end
  end
  local function line(cells, band)
    local parts = {}
    for i = band.first, band.last do
      local s = cells[i] or ""
      parts[#parts + 1] = pad(s, w[i], columns[i].right and s ~= "")
    end
    return (lead .. string.rep(" ", band.indent) .. concat(parts, "  ")):gsub("%s+$", "")
  end
  local out = {}
  local titles = {}
  for i, c in ipairs(columns) do titles[i] = c[1] end
  if not no_header then
    for _, b in ipairs(bands) do out[#out + 1] = line(titles, b) end
  end
  for _, r in ipairs(rows) do
    for _, b in ipairs(bands) do out[#out + 1] = line(r, b) end
  end
  return concat(out, "\n")
end

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

---------------------------------------------------------------------------------------
-- JSON (RFC 8259), written here: lua-cjson as shipped by Debian 12 (2.1.0) writes at most
-- 14 significant digits, and neither orders keys nor tells an empty list from an empty
-- object.
---------------------------------------------------------------------------------------

-- Fields that are objects (parameter values by name) even when empty; every other empty
-- table is an empty list.
local OBJECT_FIELDS = { params = true, at = true, fixed = true }

-- The shortest of 15, 16 or 17 significant digits that reads back as the same double
-- (17 always does).
local function json_number(x)
  if math.type(x) == "integer" then return tostring(x) end
  for _, p in ipairs({ 15, 16, 17 }) do
    local s = format("%." .. p .. "g", x)
    if tonumber(s) == x then return s end
  end
  return format("%.17g", x)
end

local ESCAPES = { ['"'] = '\\"', ["\\"] = "\\\\", ["\b"] = "\\b", ["\f"] = "\\f",
  ["\n"] = "\\n", ["\r"] = "\\r", ["\t"] = "\\t" }

local function json_string(s)
  return '"' .. s:gsub('[%c"\\]', function(c)
    return ESCAPES[c] or format("\\u%04x", c:byte())
  end) .. '"'
end

-- Keys in a stable order: numbers ascending, then strings in byte order.
local function sorted_keys(t)
  local keys = {}
  for k in pairs(t) do keys[#keys + 1] = k end
  table.sort(keys, function(a, b)
    local ta, tb = type(a), type(b)
    if ta ~= tb then return ta == "number" end
    return a < b
  end)
  return keys
end

local function is_list(t)
  local n = 0
  for k in pairs(t) do
    if math.type(k) ~= "integer" or k < 1 then return false end
    n = n + 1
  end
  return n == #t
end

local function encode(v, out, field)
  local tv = type(v)
  if tv == "number" then
    out[#out + 1] = json_number(v)
  elseif tv == "string" then
    out[#out + 1] = json_string(v)
  elseif tv == "boolean" then
    out[#out + 1] = tostring(v)
  elseif tv == "table" then
    if next(v) == nil then
      out[#out + 1] = OBJECT_FIELDS[field] and "{}" or "[]"
    elseif is_list(v) then
      out[#out + 1] = "["
      for i = 1, #v do
        if i > 1 then out[#out + 1] = "," end
        encode(v[i], out)
      end
      out[#out + 1] = "]"
    else
      out[#out + 1] = "{"
      for i, k in ipairs(sorted_keys(v)) do
        if i > 1 then out[#out + 1] = "," end
        out[#out + 1] = json_string(tostring(k))
        out[#out + 1] = ":"
        encode(v[k], out, k)
      end
      out[#out + 1] = "}"
    end
  else
    out[#out + 1] = "null"
  end
end

--- JSON text of a result: M.plain's copy, every number with the digits that read back
-- as the same double, object keys sorted, empty lists as [].
function M.json(v)
  local out = {}
  encode(M.plain(v), out)
  return concat(out)
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
