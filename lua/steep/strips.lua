-- steep.strips — strip valleys in words: the families of strips of exponents of
-- exponential type (exp, sinh, cosh of the variable), each described once, and the
-- message for a contour end at infinity that lies in no valley (a hill strip, say), which
-- names the strip it is in and the valleys on either side of it, with the end to write
-- instead.

local complex = require "steep.complex"
local infinity = require "steep.infinity"
local landscape = require "steep.landscape"

local cnew, cparts = complex.new, complex.parts
local format, pi, abs, floor = string.format, math.pi, math.abs, math.floor

local M = {}

local function side(th)
  if abs(th) < 1e-12 then return "to the right", 1 end
  if abs(abs(th) - pi) < 1e-12 then return "to the left", -1 end
  if abs(th - pi / 2) < 1e-12 then return "upward", 1 end
  if abs(th + pi / 2) < 1e-12 then return "downward", -1 end
  return format("toward direction %.4g", th), 1
end

-- The coordinate across a strip of direction th in words, and the factor that turns an
-- offset (infinity.strip_coords) into it.
local function across(th, var)
  if abs(th) < 1e-12 then return "Im " .. var, 1 end
  if abs(abs(th) - pi) < 1e-12 then return "Im " .. var, -1 end
  if abs(th - pi / 2) < 1e-12 then return "Re " .. var, -1 end
  if abs(th + pi / 2) < 1e-12 then return "Re " .. var, 1 end
  return "the offset across it", 1
end

-- lo < coordinate < hi from an offset interval (lo, hi) and the factor.
local function interval(lo, hi, f)
  if f < 0 then lo, hi = -hi, -lo end
  return lo, hi
end

local function g4(x)
  if abs(x) < 5e-13 then x = 0 end
  return format("%.4g", x)
end

--- A strip family: "strips to the right where 1.571 < Im t < 4.712 (mod 6.283)".
function M.describe_family(f, var)
  var = var or "t"
  local where = side(f.direction)
  local coord, fac = across(f.direction, var)
  local lo, hi = interval(f.lo, f.hi, fac)
  return format("strips %s where %s < %s < %s (mod %s)", where, g4(lo), coord, g4(hi),
    g4(f.period))
end

--- One strip: "the strip 1.571 < Im t < 4.712 to the right".
function M.describe_strip(v, var)
  var = var or "t"
  local where = side(v.direction)
  local coord, fac = across(v.direction, var)
  local lo, hi = interval(v.lo, v.hi, fac)
  return format("the strip %s < %s < %s %s", g4(lo), coord, g4(hi), where)
end

--- The valleys of a landscape in words, strip families once each (a list of strings).
function M.valley_words(L)
  local out = {}
  for _, v in ipairs(L.valleys or {}) do
    if v.type ~= "strip" then out[#out + 1] = landscape.describe_valley(v) end
  end
  for _, f in ipairs(L.strip_families or {}) do out[#out + 1] = M.describe_family(f, L.var) end
  return out
end

--- A path's end label in words ("valley k" of a strip: the strip; others as they are).
function M.label_words(L, label)
  local k = tonumber(label:match("^valley (%d+)$"))
  local v = k and L.valleys[k]
  if v and v.type == "strip" then return M.describe_strip(v, L.var) end
  if v then return "the valley " .. landscape.describe_valley(v) end
  return label
end

-- A point on the middle line of the strip instance m of family f, at distance s along it.
local function on_middle(f, m, s)
  local mid = f.lo + m * f.period + 0.5 * (f.hi - f.lo)
  return cnew(s, mid) * landscape.expi(f.direction)
end

--- The message for an end at infinity (the ray from `from` in direction th) that lies in
-- no valley; nil when th is not a strip direction (the caller's own message stands).
-- Names the hill strip the ray runs in and the valley strips on either side, with the
-- steep.inf(...) that ends in each.
function M.wrong_end(L, which, from, th)
  local fam
  for _, f in ipairs(L.strip_families or {}) do
    if abs(landscape.norm_angle(th - f.direction)) <= 1e-9 then fam = f end
  end
  if not fam then return nil end
  local var = L.var or "t"
  local y = infinity.strip_coords(from, fam.direction)
  local m = floor((y - fam.lo) / fam.period)
  -- the hill between the valley strip m (below) and m + 1 (above)
  local hill = { direction = fam.direction, lo = fam.hi + m * fam.period,
    hi = fam.lo + (m + 1) * fam.period }
  local coord, fac = across(fam.direction, var)
  local lo, hi = interval(hill.lo, hill.hi, fac)
  local where = side(fam.direction)
  local lines = {}
  lines[1] = format("the contour's %s end at infinity (the ray from %s in direction %s) runs "
    .. "in a hill strip, %s < %s < %s %s, where |integrand| grows without bound: the "
    .. "integral diverges there.", which, tostring(from), g4(th), g4(lo), coord, g4(hi), where)
  local around = {}
  for _, mm in ipairs({ m, m + 1 }) do
    local v = { direction = fam.direction, lo = fam.lo + mm * fam.period,
      hi = fam.hi + mm * fam.period }
    local p = on_middle(fam, mm, 0)
    -- (the point where the strip's middle line crosses the perpendicular through 0)
    local pr, pim = cparts(p)
    if abs(pr) < 1e-12 * (1 + abs(pim)) then pr = 0 end
    if abs(pim) < 1e-12 * (1 + abs(pr)) then pim = 0 end
    around[#around + 1] = format("%s (e.g. steep.inf(%s, steep.complex(%s, %s)))",
      M.describe_strip(v, var), g4(fam.direction), g4(pr), g4(pim))
  end
  lines[2] = "The valleys on either side of it: " .. table.concat(around, "; and ") .. "."
  lines[3] = "All valleys: " .. table.concat(M.valley_words(L), "; ") .. "."
  return table.concat(lines, "\n")
end

--- links(L, boundary, J, params, Rfar) -> list of link pieces: for each strip instance
-- where the combination's ends and the contour's differ (boundary[label] = c ~= 0: a chain
-- of saddles cut off by the region), the line along the strip's middle, from the strip to
-- the valley its other end runs into, with the weight -c that cancels the difference.
-- Each piece: {kind = "link", weight, ends = {strip label, valley label}, through (the
-- middle line's point nearest the region's center), angle (the strip's direction),
-- points, full (polylines out to Rfar)}. No link where the line's other end is in no
-- valley or passes a singular point.
function M.links(L, boundary, J, params, Rfar)
  local core = require "steep.core"
  local out = {}
  local labels = {}
  for label, c in pairs(boundary) do if c ~= 0 then labels[#labels + 1] = label end end
  table.sort(labels)
  for _, label in ipairs(labels) do
    local k = tonumber(label:match("^valley (%d+)$"))
    local v = k and L.valleys[k]
    if v and v.type == "strip" then
      local th = v.direction
      local u = landscape.expi(th)
      -- the middle line's point nearest the region's center
      local c = L.region.center
      local _, sc = infinity.strip_coords(c, th)
      local through = cnew(sc, v.mid) * u
      local j = landscape.ray_valley(L, through, th + pi)
      local far = Rfar + landscape.cabs(through - c)
      local pts = { through + far * u, through, through - far * u }
      local clear = j ~= nil
      for _, s in ipairs(L.singularities or {}) do
        if core.distance(pts, s.at) <= 1e-6 * L.region.radius then clear = false end
      end
      if clear then
        out[#out + 1] = { kind = "link", weight = -boundary[label],
          ends = { label, "valley " .. j }, through = through, angle = th, points = pts,
          full = core.cvec(pts) }
      end
    end
  end
  local _ = J and params
  return out
end

return M
