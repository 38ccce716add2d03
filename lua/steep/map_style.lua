-- steep.map_style — the map's colours, sizes and text: every colour in one place, and
-- the numbers, angles, expressions and contours written the way the map prints them.

local complex = require "steep.complex"
local contour_m = require "steep.contour"

local cparts = complex.parts
local format, concat = string.format, table.concat
local pi, abs, floor, log = math.pi, math.abs, math.floor, math.log
local huge, min, max = math.huge, math.min, math.max

local M = {}

---------------------------------------------------------------------------------------
-- Style: every colour and size in one place.
---------------------------------------------------------------------------------------

local FONT = "DejaVu Sans, Verdana, Arial, sans-serif"

-- The shading ramp: deep sea-green (low: where the integrand is small) through a pale
-- parchment (the level of the dominant saddle) to brick (high).
local RAMP = {
  { 0.00, 0x12, 0x3d, 0x45 },
  { 0.22, 0x3f, 0x80, 0x7e },
  { 0.42, 0xb4, 0xd2, 0xc2 },
  { 0.50, 0xf6, 0xf1, 0xe2 },
  { 0.58, 0xf0, 0xd4, 0xae },
  { 0.78, 0xcf, 0x86, 0x5a },
  { 1.00, 0x7e, 0x2e, 0x22 },
}
local BANDS = 64

local STYLE = {
  given = "#151515",        -- the contour as given: dashed charcoal
  descent = "#1d3fc4",      -- steepest descent paths: cobalt
  ascent = "#b0126a",       -- steepest ascent paths: dashed plum
  deformed = "#ffcc1a",     -- the deformed contour: a wide marigold band ...
  deformed_edge = "#3d2f00",-- ... with a dark edge
  arrow_deformed = "#2a2100",
  cut = "#6a3d0c",          -- branch cuts: dashed umber
  level = "#000000",        -- level lines
  saddle_level = "#3a1050",
  valley = "#0f5661",       -- rim strips: valleys
  hill = "#a2452c",         -- and hills
  frame = "#222222",
  text = "#1a1a1a",
  soft = "#555555",
  halo = "#ffffff",
}

---------------------------------------------------------------------------------------
-- Small helpers.
---------------------------------------------------------------------------------------

local function esc(s)
  return (tostring(s):gsub("&", "&amp;"):gsub("<", "&lt;"):gsub(">", "&gt;"):gsub('"', "&quot;"))
end

local function hex(r, g, b) return format("#%02x%02x%02x", floor(r + 0.5), floor(g + 0.5), floor(b + 0.5)) end

local function ramp(u)
  u = min(1, max(0, u))
  for k = 2, #RAMP do
    local a, b = RAMP[k - 1], RAMP[k]
    if u <= b[1] then
      local s = (u - a[1]) / (b[1] - a[1])
      return hex(a[2] + s * (b[2] - a[2]), a[3] + s * (b[3] - a[3]), a[4] + s * (b[4] - a[4]))
    end
  end
  local e = RAMP[#RAMP]
  return hex(e[2], e[3], e[4])
end

local function finite(v) return v == v and v ~= huge and v ~= -huge end

-- A number for axis labels and legends, with a proper minus sign.
local function num(v, digits)
  local s = format("%." .. (digits or 4) .. "g", v)
  if s:match("^%-0%.?0*$") then s = s:sub(2) end
  return (s:gsub("^%-", "\u{2212}"))
end

local function cnum(z)
  local re, im = cparts(z)
  if abs(im) <= 1e-12 * max(1, abs(re)) then return num(re) end
  if abs(re) <= 1e-12 * max(1, abs(im)) then
    if abs(im - 1) < 1e-12 then return "i" end
    if abs(im + 1) < 1e-12 then return "\u{2212}i" end
    return num(im) .. "i"
  end
  return num(re) .. (im < 0 and " \u{2212} " or " + ") .. num(abs(im)) .. "i"
end

-- An angle as a multiple of pi where it is a simple one.
local function angle_text(th)
  local r = th / pi
  if abs(r) < 1e-12 then return "0" end
  for _, d in ipairs({ 1, 2, 3, 4, 6, 8, 12 }) do
    local n = r * d
    if abs(n - floor(n + 0.5)) < 1e-9 then
      n = floor(n + 0.5)
      local sign = n < 0 and "\u{2212}" or ""
      local a = abs(n) == 1 and "\u{3c0}" or (abs(n) .. "\u{3c0}")
      return sign .. a .. (d > 1 and ("/" .. d) or "")
    end
  end
  return num(th, 4)
end

local function expr_text(e)
  local s = tostring(e):gsub("%*", "\u{b7}"):gsub(" %- ", " \u{2212} "):gsub("^%-", "\u{2212}")
  return s
end

local function contour_text(c, var)
  local function point(p)
    if contour_m.is_inf(p) then return "\u{221e}\u{2220}" .. angle_text(p.angle) end
    return cnum(p)
  end
  if c.closed and #c.pieces == 1 and c.pieces[1].kind == "arc" then
    local p = c.pieces[1]
    local re, im = cparts(p.center)
    local at = (re == 0 and im == 0) and var or format("%s \u{2212} (%s)", var, cnum(p.center))
    return format("circle |%s| = %s, counter-clockwise", at, num(p.radius))
  end
  local parts = { point(c:start()) }
  for _, p in ipairs(c.pieces) do
    if p.kind == "arc" then parts[#parts + 1] = "(arc)" end
    if p.kind == "segment" or p.kind == "ray_in" then parts[#parts + 1] = point(p.b)
    elseif p.kind == "ray_out" then parts[#parts + 1] = point(contour_m.inf(p.angle)) end
  end
  return concat(parts, " \u{2192} ")
end

local function nice_step(span, n)
  local raw = span / n
  local p = 10 ^ floor(math.log(raw, 10))
  local m = raw / p
  local s = m < 1.5 and 1 or m < 3 and 2 or m < 7 and 5 or 10
  return s * p
end

local function step_digits(step)
  return max(0, -floor(math.log(step, 10) + 1e-9))
end

-- A tick's label: fixed point with as many decimals as the step needs, or (for steps
-- below 1e-12 or values from 1e15 up, where that would run long) scientific notation with
-- as many significant digits as the step needs at the value's size.
local function tick_label(v, step)
  local d = step_digits(step)
  local big = max(abs(v), step)
  local s
  if d <= 12 and big < 1e15 then
    s = format("%." .. d .. "f", v)
    if tonumber(s) == 0 then s = format("%." .. d .. "f", 0) end
  elseif v == 0 or abs(v) < 1e-9 * step then
    s = "0"
  else
    local sig = min(17, max(1, floor(math.log(big, 10)) - floor(math.log(step, 10) + 1e-9) + 1))
    s = format("%." .. (sig - 1) .. "e", v)
  end
  return (s:gsub("^%-", "\u{2212}"))
end

-- The multiples k*step (k whole) from lo to hi, at most max_count of them, each larger
-- than the one before: a loop `for v = lo, hi, step` never ends where the doubles cannot
-- resolve the step at the values' size (v + step == v), and fails on a zero step.
local function multiples(lo, hi, step, max_count)
  local out = {}
  if not (finite(lo) and finite(hi) and finite(step) and step > 0 and hi >= lo) then return out end
  local k0, k1 = math.ceil(lo / step - 1e-9), floor(hi / step + 1e-9)
  if not (finite(k0) and finite(k1)) or k1 - k0 + 1 > max_count then return out end
  for i = 0, floor(k1 - k0) do
    local v = (k0 + i) * step
    if #out == 0 or v > out[#out] then out[#out + 1] = v end
  end
  return out
end

--- Round values for a symmetric-log scale on [lo, hi]: 0 and +-{1, 2, 5} x 10^k, kept
-- (in that order of preference: 0, the powers of ten, then the rest) where their ramp
-- positions unit(v) lie at least `gap` from every value kept before; sorted.
local function symlog_values(lo, hi, unit, gap)
  local cand = {}
  if lo <= 0 and hi >= 0 then cand[#cand + 1] = 0 end
  local top = max(abs(lo), abs(hi))
  if not (finite(top) and top > 0) then return cand end
  local k1 = floor(math.log(top, 10))
  local k0 = k1 - 12
  for _, m in ipairs({ 1, 2, 5 }) do
    for k = k1, k0, -1 do
      for _, sgn in ipairs({ 1, -1 }) do
        local v = sgn * m * 10.0 ^ k
        if v >= lo and v <= hi then cand[#cand + 1] = v end
      end
    end
  end
  local kept = {}
  for _, v in ipairs(cand) do
    local u, ok = unit(v), true
    for _, w in ipairs(kept) do if abs(unit(w) - u) < gap then ok = false; break end end
    if ok then kept[#kept + 1] = v end
  end
  table.sort(kept)
  return kept
end

--- Ticks whose labels do not overlap: from about n ticks on [lo, hi] (a linear scale of
-- `pixels` length, labels `font` px high), the step grows (1, 2, 5 x 10^k) until every
-- label (about 0.62 font px a character, 8 px apart; vertical: a line height apart) fits
-- between its neighbours. -> values, step
local function fitting_ticks(lo, hi, n, pixels, font, vertical)
  local step = nice_step(hi - lo, n)
  for _ = 1, 30 do
    local vals = multiples(lo, hi, step, 400)
    local room = step / (hi - lo) * pixels
    local need = 0
    for _, v in ipairs(vals) do
      local w = vertical and (font + 4) or (0.62 * font * utf8.len(tick_label(v, step)) + 8)
      need = max(need, w)
    end
    if #vals <= 1 or need <= room then return vals, step end
    step = nice_step(hi - lo, max(1, (hi - lo) / step / 2))
    if step <= 0 then break end
  end
  return {}, step
end

-- Wraps text to lines of at most n characters (by words).
local function wrap(text, n)
  local lines, cur = {}, ""
  for word in text:gmatch("%S+") do
    if utf8.len(cur) + utf8.len(word) + 1 > n and cur ~= "" then
      lines[#lines + 1] = cur
      cur = word
    else
      cur = cur == "" and word or (cur .. " " .. word)
    end
  end
  if cur ~= "" then lines[#lines + 1] = cur end
  return lines
end

M.FONT, M.RAMP, M.BANDS, M.STYLE = FONT, RAMP, BANDS, STYLE
M.esc, M.hex, M.ramp, M.finite, M.num, M.cnum = esc, hex, ramp, finite, num, cnum
M.angle_text, M.expr_text, M.contour_text = angle_text, expr_text, contour_text
M.nice_step, M.step_digits, M.tick_label, M.wrap = nice_step, step_digits, tick_label, wrap
M.multiples, M.symlog_values, M.fitting_ticks = multiples, symlog_values, fitting_ticks

return M
