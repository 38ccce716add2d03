-- steep.map — a picture of an integral's landscape at fixed parameter values, written
-- as a hand-made SVG file: the height Re F (or log |g e^F|) shaded with level lines,
-- the valleys at infinity on the rim, saddles and singularities with branch cuts, the
-- given contour, the steepest paths of every saddle and the deformed contour that the
-- decomposition uses (with its orientation and residue loops), a legend and axes.
--
-- J:map{<params>, file = "x.svg", region = {center =, radius =}, view = {center =,
-- radius =}, width = 720, grid = 120, shade = "exponent" | "modulus", levels = 10}
-- -> file, summary
--   region: where saddles and singularities are searched (as for J:landscape); it is
--           also the window shown unless `view` is given. Without either, the window is
--           fitted around the saddles, singularities and the contour's finite points.
--   shade:  "exponent" shades Re F (default), "modulus" shades log |g e^F|.
--   levels: about how many level lines to draw (0: none).
-- summary: counts of what was drawn (saddles, poles, branch_points, sinks, hills,
-- essential, valleys, descent_paths, ascent_paths, pieces, residues, cuts, arrows,
-- cells, rects, level_lines), the window (view), the shading range (range) and the
-- decomposition's status; every marker carries a class attribute naming its kind.

local core = require "steep.core"
local complex = require "steep.complex"
local landscape = require "steep.landscape"
local decompose = require "steep.decompose"
local contour_m = require "steep.contour"

local cnew, cparts = complex.new, complex.parts
local cabs = landscape.cabs
local format, concat = string.format, table.concat
local pi, abs, floor, ceil, log, huge = math.pi, math.abs, math.floor, math.ceil, math.log, math.huge
local min, max, sqrt, cos, sin, atan = math.min, math.max, math.sqrt, math.cos, math.sin, math.atan

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

local function tick_label(v, step)
  local d = step_digits(step)
  local s = format("%." .. d .. "f", v)
  if tonumber(s) == 0 then s = format("%." .. d .. "f", 0) end
  return (s:gsub("^%-", "\u{2212}"))
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

---------------------------------------------------------------------------------------
-- Options.
---------------------------------------------------------------------------------------

local function check_disc(d, name)
  if type(d) ~= "table" then
    error(format("map: option '%s' must be a table {center =, radius =}", name), 4)
  end
  local re, im = cparts(d.center or 0)
  if not re or not finite(re) or not finite(im) then
    error(format("map: %s center must be a finite number or complex value", name), 4)
  end
  local r = d.radius
  if type(r) ~= "number" or not (r > 0) or r == huge then
    error(format("map: %s radius must be a positive finite number, got %s", name, tostring(r)), 4)
  end
  return { center = cnew(re, im), radius = r }
end

local function check_int(v, name, lo, hi, default)
  if v == nil then return default end
  if type(v) ~= "number" or math.tointeger(v) == nil or v < lo or v > hi then
    error(format("map: option '%s' must be an integer in %d..%d, got %s", name, lo, hi,
      tostring(v)), 4)
  end
  return math.tointeger(v)
end

-- The window fitted around the landscape's features: the bounding box of the saddles,
-- singularities and finite contour points, widened so that the paths leaving the
-- saddles show their course (at least a few of each saddle's natural lengths
-- |F''|^(-1/2)).
local function fitted_view(J, L)
  local pts = {}
  local R = L.region.radius
  local inside = function(z) return cabs(z - L.region.center) < R end
  for _, s in ipairs(L.saddles) do pts[#pts + 1] = s.at end
  for _, s in ipairs(L.singularities) do if inside(s.at) then pts[#pts + 1] = s.at end end
  for _, z in ipairs(J.contour:finite_points()) do pts[#pts + 1] = z end
  if #pts == 0 then return { center = L.region.center, radius = 0.5 * R } end
  local x0, x1, y0, y1 = huge, -huge, huge, -huge
  for _, z in ipairs(pts) do
    local x, y = cparts(z)
    x0, x1, y0, y1 = min(x0, x), max(x1, x), min(y0, y), max(y1, y)
  end
  local half = max(x1 - x0, y1 - y0) / 2
  local r = 1.6 * half
  for _, s in ipairs(L.saddles) do
    local f2 = cabs(s.F2 or 0)
    if f2 > 0 then r = max(r, half + 3 / sqrt(f2)) end
  end
  if r <= 0 then r = 1 end
  r = max(r, half + 0.25 * r, 1e-3 * R)
  return { center = cnew(0.5 * (x0 + x1), 0.5 * (y0 + y1)), radius = r }
end

---------------------------------------------------------------------------------------
-- Geometry in pixels.
---------------------------------------------------------------------------------------

-- Liang-Barsky: the part of segment (ax,ay)-(bx,by) inside the box, or nil.
local function clip_segment(ax, ay, bx, by, x0, y0, x1, y1)
  local t0, t1 = 0, 1
  local dx, dy = bx - ax, by - ay
  local p = { -dx, dx, -dy, dy }
  local q = { ax - x0, x1 - ax, ay - y0, y1 - ay }
  for k = 1, 4 do
    if p[k] == 0 then
      if q[k] < 0 then return nil end
    else
      local r = q[k] / p[k]
      if p[k] < 0 then
        if r > t1 then return nil end
        if r > t0 then t0 = r end
      else
        if r < t0 then return nil end
        if r < t1 then t1 = r end
      end
    end
  end
  return ax + t0 * dx, ay + t0 * dy, ax + t1 * dx, ay + t1 * dy, t0 > 0, t1 < 1
end

-- The visible runs of a polyline of complex points: lists of {x, y} pixel pairs.
local function visible_runs(points, tf, box)
  local runs, cur = {}, nil
  local px, py
  for k, z in ipairs(points) do
    local x, y = tf(z)
    if k > 1 and finite(x) and finite(y) and finite(px) and finite(py) then
      local ax, ay, bx, by, cut_a, cut_b = clip_segment(px, py, x, y, box[1], box[2], box[3], box[4])
      if ax then
        if not cur or cut_a then
          cur = { { ax, ay } }
          runs[#runs + 1] = cur
        end
        cur[#cur + 1] = { bx, by }
        if cut_b then cur = nil end
      else
        cur = nil
      end
    end
    px, py = x, y
  end
  local out = {}
  for _, r in ipairs(runs) do if #r >= 2 then out[#out + 1] = r end end
  return out
end

local function run_length(run)
  local s = 0
  for k = 2, #run do s = s + math.sqrt((run[k][1] - run[k - 1][1]) ^ 2 + (run[k][2] - run[k - 1][2]) ^ 2) end
  return s
end

local function path_d(runs)
  local parts = {}
  for _, run in ipairs(runs) do
    parts[#parts + 1] = format("M%.1f %.1f", run[1][1], run[1][2])
    local lx, ly = run[1][1], run[1][2]
    for k = 2, #run do
      local x, y = run[k][1], run[k][2]
      if abs(x - lx) + abs(y - ly) >= 0.3 or k == #run then
        parts[#parts + 1] = format("L%.1f %.1f", x, y)
        lx, ly = x, y
      end
    end
  end
  return concat(parts)
end

-- The point at arc-length fraction f of a run, and the unit tangent there.
local function point_at(run, f)
  local total = run_length(run)
  local target, s = f * total, 0
  for k = 2, #run do
    local ax, ay, bx, by = run[k - 1][1], run[k - 1][2], run[k][1], run[k][2]
    local l = math.sqrt((bx - ax) ^ 2 + (by - ay) ^ 2)
    if l > 0 and s + l >= target then
      local t = (target - s) / l
      return ax + t * (bx - ax), ay + t * (by - ay), (bx - ax) / l, (by - ay) / l
    end
    s = s + l
  end
  local a, b = run[#run - 1], run[#run]
  local l = math.sqrt((b[1] - a[1]) ^ 2 + (b[2] - a[2]) ^ 2)
  if l == 0 then return b[1], b[2], 1, 0 end
  return b[1], b[2], (b[1] - a[1]) / l, (b[2] - a[2]) / l
end

local function longest(runs)
  local best, br = -1, nil
  for _, r in ipairs(runs) do
    local l = run_length(r)
    if l > best then best, br = l, r end
  end
  return br, best
end

-- An arrowhead with its tip just ahead of (x, y), pointing along (dx, dy).
local function arrowhead(x, y, dx, dy, size, fill, edge, cls)
  local nx, ny = -dy, dx
  local tx, ty = x + dx * size * 0.6, y + dy * size * 0.6
  local bx, by = x - dx * size * 0.6, y - dy * size * 0.6
  return format('<path class="%s" d="M%.1f %.1fL%.1f %.1fL%.1f %.1fZ" fill="%s" stroke="%s" '
    .. 'stroke-width="1" stroke-linejoin="round"/>', cls, tx, ty, bx + nx * size * 0.5,
    by + ny * size * 0.5, bx - nx * size * 0.5, by - ny * size * 0.5, fill, edge)
end

---------------------------------------------------------------------------------------
-- Level lines by marching squares on a node grid.
---------------------------------------------------------------------------------------

-- vals[j][i]: the value at node column i (0..n), row j (0..n). Returns the segments of
-- the level curve, {x1, y1, x2, y2} in node coordinates, each end carrying the grid
-- edge it lies on (k1, k2: exact keys for chaining) and `aux` (an optional second grid)
-- interpolated there (a1, a2).
local function march(vals, n, level, aux)
  local segs = {}
  local cx, cy, cv, ca, up, pts = {}, {}, {}, {}, {}, {}
  for j = 0, n - 1 do
    local row0, row1 = vals[j], vals[j + 1]
    for i = 0, n - 1 do
      local v0, v1, v2, v3 = row0[i], row0[i + 1], row1[i + 1], row1[i]
      if finite(v0) and finite(v1) and finite(v2) and finite(v3) then
        local b0, b1, b2, b3 = v0 >= level, v1 >= level, v2 >= level, v3 >= level
        if not (b0 == b1 and b1 == b2 and b2 == b3) then
          -- corners (i,j) (i+1,j) (i+1,j+1) (i,j+1); edge k runs from corner k to k+1:
          -- 1 bottom, 2 right, 3 top, 4 left
          cx[1], cx[2], cx[3], cx[4] = i, i + 1, i + 1, i
          cy[1], cy[2], cy[3], cy[4] = j, j, j + 1, j + 1
          cv[1], cv[2], cv[3], cv[4] = v0, v1, v2, v3
          up[1], up[2], up[3], up[4] = b0, b1, b2, b3
          if aux then
            ca[1], ca[2], ca[3], ca[4] = aux[j][i], aux[j][i + 1], aux[j + 1][i + 1], aux[j + 1][i]
          end
          local keys = { 2 * (j * (n + 1) + i), 2 * (j * (n + 1) + i + 1) + 1,
            2 * ((j + 1) * (n + 1) + i), 2 * (j * (n + 1) + i) + 1 }
          local crossing = {}
          for k = 1, 4 do
            local k2 = k % 4 + 1
            if up[k] ~= up[k2] then
              local t = (level - cv[k]) / (cv[k2] - cv[k])
              pts[k] = { cx[k] + t * (cx[k2] - cx[k]), cy[k] + t * (cy[k2] - cy[k]),
                aux and (ca[k] + t * (ca[k2] - ca[k])), keys[k] }
              crossing[#crossing + 1] = k
            end
          end
          local pairs_
          if #crossing == 2 then
            pairs_ = { { crossing[1], crossing[2] } }
          else
            -- a saddle cell: the mean decides which opposite corners connect
            if ((v0 + v1 + v2 + v3) / 4 >= level) == b0 then
              pairs_ = { { 1, 2 }, { 3, 4 } }   -- corners 1 and 3 joined: 2 and 4 cut off
            else
              pairs_ = { { 4, 1 }, { 2, 3 } }   -- corners 2 and 4 joined: 1 and 3 cut off
            end
          end
          for _, pr in ipairs(pairs_) do
            local a, b = pts[pr[1]], pts[pr[2]]
            segs[#segs + 1] = { a[1], a[2], b[1], b[2], a1 = a[3], a2 = b[3], k1 = a[4], k2 = b[4] }
          end
        end
      end
    end
  end
  return segs
end

-- Joins segments that share a grid edge into polylines (so that dash patterns run on).
local function chain(segs)
  local at = {}
  for k, s in ipairs(segs) do
    for _, key in ipairs({ s.k1, s.k2 }) do
      local l = at[key]
      if not l then l = {}; at[key] = l end
      l[#l + 1] = k
    end
  end
  local used, lines = {}, {}
  local function extend(line, key, k)
    while true do
      local m
      for _, c in ipairs(at[key]) do if c ~= k and not used[c] then m = c; break end end
      if not m then return end
      used[m] = true
      local s = segs[m]
      if s.k1 == key then line[#line + 1] = { s[3], s[4] }; key = s.k2
      else line[#line + 1] = { s[1], s[2] }; key = s.k1 end
      k = m
    end
  end
  for k, s in ipairs(segs) do
    if not used[k] then
      used[k] = true
      local fwd, back = { { s[1], s[2] }, { s[3], s[4] } }, {}
      extend(fwd, s.k2, k)
      extend(back, s.k1, k)
      local line = {}
      for i = #back, 1, -1 do line[#line + 1] = back[i] end
      for _, p in ipairs(fwd) do line[#line + 1] = p end
      lines[#lines + 1] = line
    end
  end
  return lines
end

---------------------------------------------------------------------------------------
-- The drawing, section by section. Each section appends SVG lines to ctx.body through
-- ctx.out and counts what it drew in ctx.summary.
---------------------------------------------------------------------------------------

-- polylines in node coordinates (plus a shift in cells) -> path data in pixels
local function node_path(ctx, lines, shift)
  shift = shift or 0
  local parts = {}
  for _, line in ipairs(lines) do
    for k, p in ipairs(line) do
      parts[#parts + 1] = format("%s%.1f %.1f", k == 1 and "M" or "L",
        ctx.X0 + (p[1] + shift) * ctx.cw, ctx.Y0 + ctx.P - (p[2] + shift) * ctx.cw)
    end
  end
  return concat(parts)
end

-- The height on the node grid, its range, and the colour of each value.
local function height_grid(ctx)
  local J, params, N = ctx.J, ctx.params, ctx.N
  local vcx, vcy, vr = ctx.vcx, ctx.vcy, ctx.vr
  local nodes = {}
  for j = 0, N do
    local y = vcy - vr + 2 * vr * j / N
    for i = 0, N do nodes[#nodes + 1] = cnew(vcx - vr + 2 * vr * i / N, y) end
  end
  local Fv, gv = J.tape:eval_many(core.cvec(nodes), params)
  local Ft, gt = Fv:totable(), gv and gv:totable()
  local modulus = ctx.shade == "modulus"
  local H, samples = {}, {}
  for j = 0, N do
    local row = {}
    H[j] = row
    for i = 0, N do
      local k = j * (N + 1) + i + 1
      local v = Ft[k][1]
      if modulus and gt then
        local m = cabs(gt[k])
        v = v + (m > 0 and log(m) or -huge)
      end
      row[i] = v
      if finite(v) then samples[#samples + 1] = v end
    end
  end
  ctx.H = H

  -- the range: the central 92% of the values, widened to hold the level of every saddle
  -- in view; the ramp's pale middle (the pivot) sits at the level of the dominant
  -- saddle, the highest one that the deformed contour passes through
  local function level_of(s)
    local v = cparts(s.F)
    if modulus then
      local m = cabs(s.g or 1)
      v = v + (m > 0 and log(m) or -huge)
    end
    return v
  end
  table.sort(samples)
  local lo, hi = -1, 1
  if #samples > 0 then
    lo = samples[floor(0.04 * #samples) + 1]
    hi = samples[max(1, ceil(0.96 * #samples))]
  end
  local saddle_levels = {}
  for j, s in ipairs(ctx.L.saddles) do
    if ctx.in_view(s.at) then
      local v = level_of(s)
      if finite(v) then
        saddle_levels[j] = v
        lo, hi = min(lo, v), max(hi, v)
      end
    end
  end
  local pivot, pivot_saddle
  for _, piece in ipairs(ctx.plan.pieces) do
    if piece.kind == "saddle" and piece.weight ~= 0 then
      local v = level_of(ctx.L.saddles[piece.index])
      if finite(v) and (not pivot or v > pivot) then pivot, pivot_saddle = v, piece.index end
    end
  end
  if not pivot then
    for j, v in pairs(saddle_levels) do
      if not pivot or v > pivot then pivot, pivot_saddle = v, j end
    end
  end
  if not pivot then pivot = #samples > 0 and samples[floor(#samples / 2) + 1] or 0 end
  if hi - lo < 1e-9 * max(1, abs(hi)) then lo, hi = lo - 1, hi + 1 end
  local span = hi - lo
  lo, hi = min(lo, pivot - 0.15 * span), max(hi, pivot + 0.15 * span)
  ctx.lo, ctx.hi, ctx.pivot, ctx.pivot_saddle = lo, hi, pivot, pivot_saddle
  ctx.saddle_levels = saddle_levels
  ctx.summary.range = { lo, hi, pivot = pivot }
  -- the ramp position of a value: piecewise linear, lo -> 0, pivot -> 1/2, hi -> 1
  ctx.unit = function(v)
    if v ~= v or v == huge then return 1 end
    if v == -huge then return 0 end
    if v < pivot then return max(0, 0.5 * (v - lo) / (pivot - lo)) end
    return min(1, 0.5 + 0.5 * (v - pivot) / (hi - pivot))
  end
  ctx.palette = {}
  for b = 0, BANDS - 1 do ctx.palette[b] = ramp((b + 0.5) / BANDS) end
end

-- Cells coloured by the mean ramp position of their corners; runs of one colour along a
-- row are one rectangle.
local function draw_shading(ctx)
  local out, N, H, unit, cw = ctx.out, ctx.N, ctx.H, ctx.unit, ctx.cw
  out('<g id="shading" shape-rendering="crispEdges">')
  for j = 0, N - 1 do
    local y = ctx.Y0 + ctx.P - (j + 1) * cw
    local row0, row1 = H[j], H[j + 1]
    local bands = {}
    for i = 0, N - 1 do
      local u = 0.25 * (unit(row0[i]) + unit(row0[i + 1]) + unit(row1[i + 1]) + unit(row1[i]))
      bands[i] = min(BANDS - 1, floor(u * BANDS))
    end
    local i = 0
    while i < N do
      local i2 = i + 1
      while i2 < N and bands[i2] == bands[i] do i2 = i2 + 1 end
      out(format('<rect x="%.2f" y="%.2f" width="%.2f" height="%.2f" fill="%s"/>',
        ctx.X0 + i * cw, y, (i2 - i) * cw, cw, ctx.palette[bands[i]]))
      ctx.summary.rects = ctx.summary.rects + 1
      i = i2
    end
  end
  out("</g>")
end

-- Level lines at round values, and the level of each saddle in view (dotted).
local function draw_levels(ctx)
  local out, H, N = ctx.out, ctx.H, ctx.N
  out('<g id="levels" fill="none" clip-path="url(#plot-area)">')
  if ctx.nlevels > 0 then
    local step = nice_step(ctx.hi - ctx.lo, ctx.nlevels)
    for c = ceil(ctx.lo / step) * step, ctx.hi, step do
      local lines = chain(march(H, N, c))
      if #lines > 0 then
        ctx.summary.level_lines = ctx.summary.level_lines + 1
        out(format('<path class="level" data-level="%s" d="%s" stroke="%s" stroke-opacity="0.28" '
          .. 'stroke-width="0.7"/>', num(c), node_path(ctx, lines), STYLE.level))
      end
    end
  end
  local drawn = {}
  for j, v in pairs(ctx.saddle_levels) do
    local dup = false
    for _, w in ipairs(drawn) do if abs(w - v) <= 1e-9 * max(1, abs(v)) then dup = true end end
    if not dup then
      drawn[#drawn + 1] = v
      local lines = chain(march(H, N, v))
      if #lines > 0 then
        out(format('<path class="saddle-level" data-saddle="%d" d="%s" stroke="%s" '
          .. 'stroke-opacity="0.8" stroke-width="1.2" stroke-dasharray="0.1 3.2" '
          .. 'stroke-linecap="round"/>', j, node_path(ctx, lines), STYLE.saddle_level))
      end
    end
  end
  out("</g>")
end

local BRANCH_WHAT = { log = true, root = true, power = true, atan = true }

-- Branch cuts: where the argument h of log, sqrt, a power or atan's factor is real and
-- not positive (principal branches), as the zero set of Im h where Re h <= 0, on a node
-- grid shifted off the window's centre lines (cuts often lie on the axes). A log of the
-- exponent is cut only where the integrand is not single-valued (a non-integer
-- coefficient: a sink or hill that is also a branch point).
local function draw_cuts(ctx)
  local J, L, N, out = ctx.J, ctx.L, ctx.N, ctx.out
  local entries = {}
  for k, c in ipairs(J.critical) do
    if BRANCH_WHAT[c.what] then
      local label = format("%s of %s in the %s", tostring(c.h), c.what, c.where)
      local draw = not (c.what == "log" and c.where == "exponent")
      for _, s in ipairs(L.singularities) do
        for _, src in ipairs(s.sources or {}) do
          if src == label and (s.kind == "branch" or s.branch) then draw = true end
        end
      end
      if draw then entries[#entries + 1] = k end
    end
  end
  if #entries == 0 then return end
  local SHIFT = 0.377
  local vcx, vcy, vr = ctx.vcx, ctx.vcy, ctx.vr
  local pts = {}
  for j = 0, N do
    local y = vcy - vr + 2 * vr * (j + SHIFT) / N
    for i = 0, N do pts[#pts + 1] = cnew(vcx - vr + 2 * vr * (i + SHIFT) / N, y) end
  end
  local outs = table.pack(J:critical_tape():eval_many(core.cvec(pts), ctx.params))
  out(format('<g id="cuts" fill="none" clip-path="url(#plot-area)" stroke="%s" '
    .. 'stroke-width="1.8" stroke-dasharray="5 3">', STYLE.cut))
  for _, k in ipairs(entries) do
    local ht = outs[k]:totable()
    local IM, RE = {}, {}
    for j = 0, N do
      IM[j], RE[j] = {}, {}
      for i = 0, N do
        local z = ht[j * (N + 1) + i + 1]
        IM[j][i], RE[j][i] = z[2], z[1]
      end
    end
    local keep = {}
    for _, s in ipairs(march(IM, N, 0, RE)) do
      if s.a1 and s.a2 and s.a1 <= 0 and s.a2 <= 0 then keep[#keep + 1] = s end
    end
    if #keep > 0 then
      ctx.summary.cuts = ctx.summary.cuts + 1
      out(format('<path class="cut" data-of="%s" d="%s"/>', esc(tostring(J.critical[k].h)),
        node_path(ctx, chain(keep), SHIFT)))
    end
  end
  out("</g>")
end

-- The rim: a thin brick strip all round (hills), a wide sea-green one over each valley
-- interval, and a small wedge for a valley that is a single direction.
local function draw_rim(ctx)
  local out, P = ctx.out, ctx.P
  local pcx, pcy = ctx.X0 + P / 2, ctx.Y0 + P / 2
  local function rim_point(th, off)
    local c, s = cos(th), -sin(th)
    local f = (P / 2 + off) / max(abs(c), abs(s))
    return pcx + f * c, pcy + f * s
  end
  local function rim_path(a, b, off)
    local n = max(2, ceil((b - a) / (pi / 720)))
    local parts = {}
    for k = 0, n do
      local x, y = rim_point(a + (b - a) * k / n, off)
      parts[#parts + 1] = format("%s%.1f %.1f", k == 0 and "M" or "L", x, y)
    end
    return concat(parts)
  end
  out('<g id="rim" fill="none">')
  out(format('<path class="rim-hill" d="%sZ" stroke="%s" stroke-width="3"/>',
    rim_path(-pi, pi, 6.5), STYLE.hill))
  for k, v in ipairs(ctx.L.valleys) do
    ctx.summary.valleys = ctx.summary.valleys + 1
    local mid
    if v.to - v.from > 1e-9 then
      out(format('<path class="valley" id="valley-%d" d="%s" stroke="%s" stroke-width="8"/>',
        k, rim_path(v.from, v.to, 6.5), STYLE.valley))
      mid = 0.5 * (v.from + v.to)
    else
      local x, y = rim_point(v.from, 3)
      local xo, yo = rim_point(v.from, 14)
      local dx, dy = xo - x, yo - y
      local l = sqrt(dx * dx + dy * dy)
      dx, dy = dx / l, dy / l
      out(format('<path class="valley" id="valley-%d" d="M%.1f %.1fL%.1f %.1fL%.1f %.1fZ" '
        .. 'fill="%s" stroke="%s" stroke-width="1"/>', k, x, y, xo - dy * 5, yo + dx * 5,
        xo + dy * 5, yo - dx * 5, STYLE.valley, STYLE.halo))
      mid = v.from
    end
    local x, y = rim_point(mid, -14)
    ctx.labels[#ctx.labels + 1] = { x, y, "V" .. k, size = 11, color = STYLE.valley }
  end
  out("</g>")
end

-- A path's whole polyline: the part used for quadrature, then its coarse tail.
local function full(path)
  return path.tail and core.cvec_join(path.points, path.tail):totable() or path.points
end

-- The fraction near f (within +-w) of a run whose point lies farthest from the markers
-- (up to 40 px; beyond that, the nearest to f): arrows should not hide a marker.
local function clear_spot(ctx, run, f, w)
  local best, bf = -huge, f
  for k = -8, 8 do
    local g = f + w * k / 8
    local x, y = point_at(run, g)
    local d = 40
    for _, m in ipairs(ctx.marks) do d = min(d, sqrt((x - m[1]) ^ 2 + (y - m[2]) ^ 2)) end
    local score = d - 0.01 * abs(k)
    if score > best then best, bf = score, g end
  end
  return bf
end

-- The deformed contour: a marigold band with a dark edge under each path it uses, an
-- arrow for its orientation (the sign of the weight), the multiplicity where it is not
-- one, and a loop round each pole whose residue it picks up.
local function draw_deformed(ctx)
  local out, plan = ctx.out, ctx.plan
  if plan.status ~= "ok" then return end
  local used = {}
  for _, piece in ipairs(plan.pieces) do
    if piece.weight ~= 0 then
      local runs = visible_runs(piece.full and piece.full:totable() or piece.points, ctx.tf,
        ctx.box)
      if #runs > 0 then
        ctx.summary.pieces = ctx.summary.pieces + 1
        used[#used + 1] = { runs = runs, piece = piece }
      end
    end
  end
  out('<g id="deformed" fill="none" stroke-linecap="round" stroke-linejoin="round" '
    .. 'clip-path="url(#plot-area)">')
  for _, d in ipairs(used) do
    out(format('<path class="piece-edge" d="%s" stroke="%s" stroke-opacity="0.55" '
      .. 'stroke-width="11"/>', path_d(d.runs), STYLE.deformed_edge))
  end
  for _, d in ipairs(used) do
    out(format('<path class="piece" data-kind="%s" data-weight="%d" d="%s" stroke="%s" '
      .. 'stroke-width="8"/>', d.piece.kind, d.piece.weight, path_d(d.runs), STYLE.deformed))
  end
  for _, r in ipairs(plan.residues) do
    local s = ctx.L.singularities[r.index]
    if ctx.in_view(s.at) then
      ctx.summary.residues = ctx.summary.residues + 1
      local x, y = ctx.tf(s.at)
      local rad = 15
      out(format('<circle class="residue-loop-edge" cx="%.1f" cy="%.1f" r="%d" stroke="%s" '
        .. 'stroke-opacity="0.55" stroke-width="7"/>', x, y, rad, STYLE.deformed_edge))
      out(format('<circle class="residue-loop" data-winding="%d" cx="%.1f" cy="%.1f" r="%d" '
        .. 'stroke="%s" stroke-width="4.5"/>', r.winding, x, y, rad, STYLE.deformed))
      -- counter-clockwise in the plane is clockwise on the screen (y grows downwards): at
      -- the left of the loop a positive winding runs down the screen
      local dir = r.winding > 0 and 1 or -1
      ctx.arrows[#ctx.arrows + 1] = arrowhead(x - rad, y, 0, dir, 11, STYLE.arrow_deformed,
        STYLE.halo, "arrow-deformed")
      ctx.looped[r.index] = true
      if abs(r.winding) > 1 then
        ctx.labels[#ctx.labels + 1] = { x - rad - 6, y - rad, "\u{d7}" .. abs(r.winding),
          anchor = "end", color = STYLE.arrow_deformed }
      end
    end
  end
  out("</g>")
  for _, d in ipairs(used) do
    local run = longest(d.runs)
    local x, y, dx, dy = point_at(run, clear_spot(ctx, run, 0.55, 0.2))
    if d.piece.weight < 0 then dx, dy = -dx, -dy end
    ctx.arrows[#ctx.arrows + 1] = arrowhead(x, y, dx, dy, 13, STYLE.arrow_deformed, STYLE.halo,
      "arrow-deformed")
    if abs(d.piece.weight) > 1 then
      ctx.labels[#ctx.labels + 1] = { x + 10, y - 10, "\u{d7}" .. abs(d.piece.weight),
        anchor = "start", color = STYLE.arrow_deformed }
    end
  end
end

-- The steepest ascent, then descent paths of every saddle, each on a white casing.
local function draw_steepest(ctx)
  local out, L = ctx.out, ctx.L
  out('<g id="steepest" fill="none" stroke-linecap="round" stroke-linejoin="round" '
    .. 'clip-path="url(#plot-area)">')
  for _, which in ipairs({ "ascent", "descent" }) do
    for j = 1, #L.saddles do
      local paths = L.paths and L.paths[j]
      for k, p in ipairs(paths and paths[which] or {}) do
        local runs = visible_runs(full(p), ctx.tf, ctx.box)
        if #runs > 0 then
          ctx.summary[which .. "_paths"] = ctx.summary[which .. "_paths"] + 1
          local d = path_d(runs)
          out(format('<path d="%s" stroke="%s" stroke-opacity="0.8" stroke-width="%s"/>', d,
            STYLE.halo, which == "descent" and "4.4" or "3.4"))
          if which == "descent" then
            out(format('<path class="descent" data-saddle="%d" data-ray="%d" data-ends="%s" '
              .. 'd="%s" stroke="%s" stroke-width="2.5"/>', j, k, esc(p.ends), d, STYLE.descent))
          else
            out(format('<path class="ascent" data-saddle="%d" data-ray="%d" data-ends="%s" '
              .. 'd="%s" stroke="%s" stroke-width="1.6" stroke-dasharray="6 3.5"/>', j, k,
              esc(p.ends), d, STYLE.ascent))
          end
        end
      end
    end
  end
  out("</g>")
end

-- The contour as given: dashed, with arrows for its direction and squares at its
-- finite ends.
local function draw_given(ctx)
  local out, J = ctx.out, ctx.J
  local cpts = J.contour:sample { radius = cabs(ctx.vc) + 4 * ctx.vr, n = 256 }
  local runs = visible_runs(cpts, ctx.tf, ctx.box)
  out('<g id="given" fill="none" clip-path="url(#plot-area)">')
  if #runs > 0 then
    local d = path_d(runs)
    out(format('<path d="%s" stroke="%s" stroke-opacity="0.8" stroke-width="4.6"/>', d, STYLE.halo))
    out(format('<path class="contour" d="%s" stroke="%s" stroke-width="2.4" '
      .. 'stroke-dasharray="9 5"/>', d, STYLE.given))
    local run = longest(runs)
    local fr = J.contour.closed and { 0.125, 0.375, 0.625, 0.875 } or { 0.25, 0.75 }
    for _, f in ipairs(fr) do
      local x, y, dx, dy = point_at(run, clear_spot(ctx, run, f, 0.12))
      ctx.arrows[#ctx.arrows + 1] = arrowhead(x, y, dx, dy, 12, STYLE.given, STYLE.halo,
        "arrow-given")
    end
  end
  if not J.contour.closed then
    for _, e in ipairs({ J.contour:start(), J.contour:finish() }) do
      if not contour_m.is_inf(e) and ctx.in_view(e) then
        local x, y = ctx.tf(e)
        out(format('<rect class="contour-end" x="%.1f" y="%.1f" width="7" height="7" fill="%s" '
          .. 'stroke="%s" stroke-width="1.2"/>', x - 3.5, y - 3.5, STYLE.given, STYLE.halo))
      end
    end
  end
  out("</g>")
end

-- The symbols: a white diamond with a bar (saddle), a ringed dot (pole), an umber square
-- (branch point), a sea-green triangle pointing down (sink), a brick one pointing up
-- (hill), an eight-armed star (essential singularity).
local function marker(kind, x, y)
  if kind == "saddle" then
    return format('<path d="M%.1f %.1fl6.5 6.5l-6.5 6.5l-6.5 -6.5Z" fill="#ffffff" stroke="%s" '
      .. 'stroke-width="2"/><path d="M%.1f %.1fh5" stroke="%s" stroke-width="1.6"/>',
      x, y - 6.5, STYLE.frame, x - 2.5, y, STYLE.frame)
  elseif kind == "pole" then
    return format('<circle cx="%.1f" cy="%.1f" r="6" fill="#ffffff" stroke="#000000" '
      .. 'stroke-width="2.2"/><circle cx="%.1f" cy="%.1f" r="2.3" fill="#000000"/>', x, y, x, y)
  elseif kind == "branch" then
    return format('<rect x="%.1f" y="%.1f" width="10" height="10" fill="%s" stroke="#ffffff" '
      .. 'stroke-width="1.5"/>', x - 5, y - 5, STYLE.cut)
  elseif kind == "sink" then
    return format('<path d="M%.1f %.1fl-7 -11h14Z" fill="%s" stroke="#ffffff" '
      .. 'stroke-width="1.5" stroke-linejoin="round"/>', x, y + 6, STYLE.valley)
  elseif kind == "hill" then
    return format('<path d="M%.1f %.1fl-7 11h14Z" fill="%s" stroke="#ffffff" '
      .. 'stroke-width="1.5" stroke-linejoin="round"/>', x, y - 6, STYLE.hill)
  end
  local parts = {}
  for k = 0, 3 do
    local a = k * pi / 4
    parts[#parts + 1] = format("M%.1f %.1fL%.1f %.1f", x - 7 * cos(a), y - 7 * sin(a),
      x + 7 * cos(a), y + 7 * sin(a))
  end
  local d = concat(parts)
  return format('<path d="%s" stroke="#ffffff" stroke-width="4.5" stroke-linecap="round"/>'
    .. '<path d="%s" stroke="#000000" stroke-width="2" stroke-linecap="round"/>', d, d)
end

local LETTER = { pole = "P", branch = "B", sink = "K", hill = "H", essential = "E" }
local COUNT = { pole = "poles", branch = "branch_points", sink = "sinks", hill = "hills",
  essential = "essential" }

-- Markers for the singularities and saddles in view, each a group with a class naming
-- its kind, an id with its index in the landscape, and a tooltip.
local function draw_markers(ctx)
  local out, L, var, summary = ctx.out, ctx.L, ctx.var, ctx.summary
  out('<g id="markers">')
  for j, s in ipairs(L.singularities) do
    if ctx.in_view(s.at) and COUNT[s.kind] then
      summary[COUNT[s.kind]] = summary[COUNT[s.kind]] + 1
      ctx.present[s.kind] = true
      local x, y = ctx.tf(s.at)
      local desc = format("%s %d at %s = %s%s (%s)", s.kind, j, var, cnum(s.at),
        s.order and format(", order %d", s.order) or "", s.source)
      if s.residue then desc = desc .. ", residue " .. cnum(s.residue) end
      out(format('<g class="%s" id="%s-%d"><title>%s</title>%s</g>', s.kind, s.kind, j,
        esc(desc), marker(s.kind, x, y)))
      local off = ctx.looped[j] and 17 or 9
      ctx.labels[#ctx.labels + 1] = { x + off, y - off, LETTER[s.kind] .. j, anchor = "start" }
    end
  end
  for j, s in ipairs(L.saddles) do
    if ctx.in_view(s.at) then
      summary.saddles = summary.saddles + 1
      local x, y = ctx.tf(s.at)
      local desc = format("saddle %d at %s = %s, order %d, F = %s", j, var, cnum(s.at),
        s.order, cnum(s.F))
      out(format('<g class="saddle" id="saddle-%d"><title>%s</title>%s</g>', j, esc(desc),
        marker("saddle", x, y)))
      ctx.labels[#ctx.labels + 1] = { x + 10, y - 8,
        "S" .. j .. (s.order > 2 and format(" (order %d)", s.order) or ""), anchor = "start" }
    end
  end
  out("</g>")
end

-- Text on a white halo (drawn twice: the halo, then the letters).
local function halo_text(ctx, x, y, text, size, anchor, color)
  local a = format('x="%.1f" y="%.1f" font-size="%s" text-anchor="%s" font-weight="bold"', x, y,
    size, anchor or "middle")
  ctx.out(format('<text %s fill="none" stroke="%s" stroke-width="3.2" stroke-linejoin="round" '
    .. 'stroke-opacity="0.9">%s</text>', a, STYLE.halo, esc(text)))
  ctx.out(format('<text %s fill="%s">%s</text>', a, color or STYLE.text, esc(text)))
end

local function draw_labels(ctx)
  ctx.out('<g id="arrows">')
  for _, a in ipairs(ctx.arrows) do ctx.out(a) end
  ctx.out("</g>")
  ctx.summary.arrows = #ctx.arrows
  ctx.out(format('<g id="labels" font-family="%s">', FONT))
  for _, l in ipairs(ctx.labels) do
    halo_text(ctx, l[1], l[2] + 4, l[3], l.size or 12, l.anchor, l.color)
  end
  ctx.out("</g>")
end

-- The frame, ticks pointing inwards (the rim strips lie just outside), tick labels and
-- the axis names.
local function draw_axes(ctx)
  local out, X0, Y0, P = ctx.out, ctx.X0, ctx.Y0, ctx.P
  local vcx, vcy, vr = ctx.vcx, ctx.vcy, ctx.vr
  out(format('<rect x="%.1f" y="%.1f" width="%.1f" height="%.1f" fill="none" stroke="%s" '
    .. 'stroke-width="1.2"/>', X0, Y0, P, P, STYLE.frame))
  local step = nice_step(2 * vr, 7)
  out(format('<g id="axes" font-family="%s" font-size="12" fill="%s">', FONT, STYLE.text))
  local ticks = {}
  for v = ceil((vcx - vr) / step - 1e-9) * step, vcx + vr + 1e-9 * step, step do
    local x = X0 + (v - (vcx - vr)) / (2 * vr) * P
    ticks[#ticks + 1] = format("M%.1f %.1fv-6M%.1f %.1fv6", x, Y0 + P, x, Y0)
    out(format('<text class="tick" x="%.1f" y="%.1f" text-anchor="middle">%s</text>', x,
      Y0 + P + 28, tick_label(v, step)))
  end
  for v = ceil((vcy - vr) / step - 1e-9) * step, vcy + vr + 1e-9 * step, step do
    local y = Y0 + ((vcy + vr) - v) / (2 * vr) * P
    ticks[#ticks + 1] = format("M%.1f %.1fh6M%.1f %.1fh-6", X0, y, X0 + P, y)
    out(format('<text class="tick" x="%.1f" y="%.1f" text-anchor="end">%s</text>', X0 - 16,
      y + 4, tick_label(v, step)))
  end
  out(format('<path d="%s" stroke="%s" stroke-width="1.1" fill="none"/>', concat(ticks),
    STYLE.frame))
  out(format('<text class="axis-label" x="%.1f" y="%.1f" text-anchor="middle" font-size="13" '
    .. 'font-style="italic">Re %s</text>', X0 + P / 2, Y0 + P + 48, esc(ctx.var)))
  out(format('<text class="axis-label" x="%.1f" y="%.1f" text-anchor="middle" font-size="13" '
    .. 'font-style="italic" transform="rotate(-90 %.1f %.1f)">Im %s</text>', X0 - 52,
    Y0 + P / 2, X0 - 52, Y0 + P / 2, esc(ctx.var)))
  out("</g>")
end

-- The legend under the plot (symbols in two columns), the colour bar with its scale,
-- and notes on the deformation; returns the height used.
local function draw_legend(ctx, LY)
  local out, X0, P, plan = ctx.out, ctx.X0, ctx.P, ctx.plan
  local legend = {}
  local function entry(glyph, text) legend[#legend + 1] = { glyph, text } end
  local GW = 40
  local function line_glyph(attrs, casing)
    return function(x, y)
      local d = format("M%.1f %.1fh%d", x, y, GW - 6)
      return (casing and format('<path d="%s" stroke="%s" stroke-width="%s" fill="none"/>', d,
        casing[1], casing[2]) or "") .. format('<path d="%s" %s fill="none"/>', d, attrs)
    end
  end
  local function symbol(kind)
    return function(x, y) return '<g class="legend-glyph">' .. marker(kind, x + 17, y) .. "</g>" end
  end
  entry(line_glyph(format('stroke="%s" stroke-width="2.4" stroke-dasharray="9 5"', STYLE.given)),
    "contour as given (arrows: direction)")
  if plan.status == "ok" then
    entry(function(x, y)
      return line_glyph(format('stroke="%s" stroke-width="8"', STYLE.deformed),
        { STYLE.deformed_edge, 11 })(x, y) .. arrowhead(x + (GW - 6) / 2, y, 1, 0, 11,
          STYLE.arrow_deformed, STYLE.halo, "legend-glyph")
    end, "deformed contour (arrows: orientation)")
  end
  entry(line_glyph(format('stroke="%s" stroke-width="2.5"', STYLE.descent)),
    "steepest descent path (Im F fixed)")
  entry(line_glyph(format('stroke="%s" stroke-width="1.6" stroke-dasharray="6 3.5"',
    STYLE.ascent)), "steepest ascent path")
  entry(symbol("saddle"), "saddle S\u{2096} (F\u{2032} = 0)")
  local names = {
    pole = "pole P\u{2096} of the integrand",
    branch = "branch point B\u{2096}",
    sink = "sink K\u{2096} (integrand \u{2192} 0)",
    hill = "hill H\u{2096} (integrand \u{2192} \u{221e})",
    essential = "essential singularity E\u{2096}",
  }
  for _, kind in ipairs({ "pole", "branch", "sink", "hill", "essential" }) do
    if ctx.present[kind] then entry(symbol(kind), names[kind]) end
  end
  if ctx.summary.residues > 0 then
    entry(function(x, y)
      return format('<circle cx="%.1f" cy="%.1f" r="7" fill="none" stroke="%s" '
        .. 'stroke-width="3.5"/>', x + 17, y, STYLE.deformed)
    end, "loop round a pole: 2\u{3c0}i \u{b7} residue")
  end
  if ctx.summary.cuts > 0 then
    entry(line_glyph(format('stroke="%s" stroke-width="1.8" stroke-dasharray="5 3"', STYLE.cut)),
      "cut: argument of log, \u{221a}, power \u{2264} 0")
  end
  entry(function(x, y)
    return format('<path d="M%.1f %.1fh15" stroke="%s" stroke-width="8"/>', x, y, STYLE.valley)
      .. format('<path d="M%.1f %.1fh17" stroke="%s" stroke-width="3"/>', x + 17, y, STYLE.hill)
  end, "rim: valleys V\u{2096} (decay at \u{221e}) / hills")
  entry(line_glyph(format('stroke="%s" stroke-opacity="0.8" stroke-width="1.2" '
    .. 'stroke-dasharray="0.1 3.2" stroke-linecap="round"', STYLE.saddle_level)),
    "level of a saddle (Re F = Re F(S\u{2096}))")

  -- two columns where the longest entry fits in half the width (about 6.4 px a
  -- character at 12 px), else one
  local widest = 0
  for _, e in ipairs(legend) do widest = max(widest, GW + 4 + 6.4 * utf8.len(e[2])) end
  local ncol = widest <= P / 2 - 8 and 2 or 1
  local rows = ceil(#legend / ncol)
  out(format('<g id="legend" font-family="%s" font-size="12" fill="%s">', FONT, STYLE.text))
  for k, e in ipairs(legend) do
    local col, row = (k - 1) // rows, (k - 1) % rows
    local x, y = X0 + col * P / 2, LY + row * 21
    out(e[1](x, y))
    out(format('<text x="%.1f" y="%.1f">%s</text>', x + GW + 4, y + 4, esc(e[2])))
  end
  out("</g>")

  -- the colour bar: linear in the value, coloured as the map is
  local lo, hi, pivot = ctx.lo, ctx.hi, ctx.pivot
  local CY, CH = LY + rows * 21 + 14, 12
  out(format('<g id="colourbar" font-family="%s" font-size="11" fill="%s">', FONT, STYLE.text))
  out('<g shape-rendering="crispEdges">')
  local nb = 160
  for b = 0, nb - 1 do
    local u = ctx.unit(lo + (hi - lo) * (b + 0.5) / nb)
    out(format('<rect x="%.2f" y="%.1f" width="%.2f" height="%d" fill="%s"/>', X0 + P * b / nb,
      CY, P / nb + 0.05, CH, ctx.palette[min(BANDS - 1, floor(u * BANDS))]))
  end
  out("</g>")
  out(format('<rect x="%.1f" y="%.1f" width="%.1f" height="%d" fill="none" stroke="%s" '
    .. 'stroke-width="0.8"/>', X0, CY, P, CH, STYLE.frame))
  local cstep = nice_step(hi - lo, 8)
  local cticks = {}
  for v = ceil(lo / cstep - 1e-9) * cstep, hi + 1e-9 * cstep, cstep do
    local x = X0 + (v - lo) / (hi - lo) * P
    cticks[#cticks + 1] = format("M%.1f %.1fv4", x, CY + CH)
    out(format('<text x="%.1f" y="%.1f" text-anchor="middle">%s</text>', x, CY + CH + 15,
      tick_label(v, cstep)))
  end
  local px = X0 + (pivot - lo) / (hi - lo) * P
  out(format('<path d="%sM%.1f %.1fv%d" stroke="%s" stroke-width="1" fill="none"/>',
    concat(cticks), px, CY - 4, CH + 4, STYLE.saddle_level))
  out(format('<path d="M%.1f %.1fl-4 -6h8Z" fill="%s"/>', px, CY - 1, STYLE.saddle_level))
  local var = ctx.var
  local quantity = ctx.shade == "exponent" and ("Re F(" .. var .. ")")
    or ("log |g(" .. var .. ") e^F(" .. var .. ")|")
  local caption = wrap(format("shading: %s, clipped to [%s, %s]; pale middle (\u{25be}) at "
    .. "the level of %s", quantity, num(lo, 3), num(hi, 3),
    ctx.pivot_saddle and ("saddle S" .. ctx.pivot_saddle) or "the median value"), floor(P / 6.8))
  for k, l in ipairs(caption) do
    out(format('<text x="%.1f" y="%.1f" font-size="12">%s</text>', X0, CY + CH + 33 + (k - 1) * 16,
      esc(l)))
  end
  out("</g>")

  -- notes: the deformation in words, and the landscape's own notes
  local notes = {}
  if plan.status == "ok" then
    local parts = {}
    for _, piece in ipairs(plan.pieces) do
      if piece.weight ~= 0 then
        local who = piece.kind == "saddle" and ("S" .. piece.index) or ("end " .. cnum(piece.at))
        parts[#parts + 1] = format("%s%s \u{2192} %s", piece.weight > 0 and "+" or "\u{2212}",
          abs(piece.weight) > 1 and (abs(piece.weight) .. "\u{b7}" .. who) or who, piece.ends[2])
      end
    end
    for _, r in ipairs(plan.residues) do
      parts[#parts + 1] = format("%s%s2\u{3c0}i\u{b7}Res at P%d", r.winding > 0 and "+" or "\u{2212}",
        abs(r.winding) > 1 and (abs(r.winding) .. "\u{b7}") or "", r.index)
    end
    notes[#notes + 1] = "deformed contour: " .. (#parts > 0 and concat(parts, ", ") or "empty")
  else
    notes[#notes + 1] = "deformed contour not drawn (" .. plan.status .. "): "
      .. concat(plan.notes or {}, "; ")
  end
  for _, n in ipairs(ctx.L.notes or {}) do notes[#notes + 1] = "note: " .. n end
  local NY = CY + CH + 54 + (#caption - 1) * 16
  local lines = {}
  for _, n in ipairs(notes) do
    for _, l in ipairs(wrap(n, floor(P / 6.6))) do lines[#lines + 1] = l end
  end
  out(format('<g id="notes" font-family="%s" font-size="11.5" fill="%s">', FONT, STYLE.soft))
  for k, l in ipairs(lines) do
    out(format('<text x="%.1f" y="%.1f">%s</text>', X0, NY + (k - 1) * 16, esc(l)))
  end
  out("</g>")
  return floor(NY + #lines * 16 + 12)
end

-- The title: the integral, then the parameter values and the contour.
local function title_lines(ctx)
  local J, var = ctx.J, ctx.var
  local g = J.amplitude
  local integrand = (g == 1) and format("exp(%s)", expr_text(J.exponent))
    or format("(%s) \u{b7} exp(%s)", expr_text(g), expr_text(J.exponent))
  local title = format("\u{222b} %s d%s", integrand, var)
  local pv = {}
  for _, name in ipairs(J.params) do pv[#pv + 1] = format("%s = %s", name, cnum(ctx.params[name])) end
  local sub = concat(pv, ", ")
  sub = (sub ~= "" and (sub .. "   \u{2022}   ") or "") .. "along " .. contour_text(J.contour, var)
  return title, sub
end

---------------------------------------------------------------------------------------
-- The map.
---------------------------------------------------------------------------------------

function M.map(J, opts)
  local integral = require "steep.integral"
  local params, o = integral.split_options(J, opts, { file = true, region = true, view = true,
    width = true, grid = true, shade = true, levels = true }, "map")
  if type(o.file) ~= "string" or o.file == "" then
    error("map: option 'file' must name the SVG file to write (file = \"landscape.svg\")", 2)
  end
  local region = o.region and check_disc(o.region, "region")
  local view = o.view and check_disc(o.view, "view")
  local W = check_int(o.width, "width", 360, 4000, 720)
  local N = check_int(o.grid, "grid", 8, 600, 120)
  local shade = o.shade or "exponent"
  if shade ~= "exponent" and shade ~= "modulus" then
    error(format("map: option 'shade' must be \"exponent\" or \"modulus\", got %s",
      tostring(shade)), 2)
  end

  local L = J:_landscape(params, region, true)
  local ok, plan = pcall(decompose.decompose, J, params, L, J.contour)
  if not ok then
    plan = { status = "failed", notes = { tostring(plan) }, pieces = {}, residues = {} }
  end
  view = view or region or fitted_view(J, L)

  -- layout: the plot is a square P pixels wide; title above, legend below
  local ML, MR, MT = 72, 34, 92
  local P = W - ML - MR
  local ctx = { J = J, L = L, plan = plan, params = params, var = J.var.name, N = N,
    shade = shade, nlevels = check_int(o.levels, "levels", 0, 60, 10),
    vc = view.center, vr = view.radius, X0 = ML, Y0 = MT, P = P, cw = P / N,
    body = {}, arrows = {}, labels = {}, marks = {}, looped = {}, present = {} }
  ctx.vcx, ctx.vcy = cparts(view.center)
  ctx.out = function(s) ctx.body[#ctx.body + 1] = s end
  local vcx, vcy, vr = ctx.vcx, ctx.vcy, ctx.vr
  ctx.tf = function(z)
    local x, y = cparts(z)
    return ML + (x - (vcx - vr)) / (2 * vr) * P, MT + ((vcy + vr) - y) / (2 * vr) * P
  end
  ctx.in_view = function(z)
    local x, y = cparts(z)
    return abs(x - vcx) <= vr and abs(y - vcy) <= vr
  end
  local m = 0.02 * P
  ctx.box = { ML - m, MT - m, ML + P + m, MT + P + m }
  ctx.summary = { file = o.file, view = { center = view.center, radius = vr },
    status = plan.status, saddles = 0, poles = 0, branch_points = 0, sinks = 0, hills = 0,
    essential = 0, valleys = 0, descent_paths = 0, ascent_paths = 0, pieces = 0,
    residues = 0, cuts = 0, arrows = 0, cells = N * N, rects = 0, level_lines = 0,
    shade = shade }
  for _, s in ipairs(L.saddles) do
    if ctx.in_view(s.at) then ctx.marks[#ctx.marks + 1] = { ctx.tf(s.at) } end
  end
  for _, s in ipairs(L.singularities) do
    if ctx.in_view(s.at) then ctx.marks[#ctx.marks + 1] = { ctx.tf(s.at) } end
  end

  ctx.out(format('<clipPath id="plot-area"><rect x="%.1f" y="%.1f" width="%.1f" '
    .. 'height="%.1f"/></clipPath>', ML, MT, P, P))
  height_grid(ctx)
  draw_shading(ctx)
  draw_levels(ctx)
  draw_cuts(ctx)
  draw_rim(ctx)
  draw_deformed(ctx)
  draw_steepest(ctx)
  draw_given(ctx)
  draw_markers(ctx)
  draw_labels(ctx)
  draw_axes(ctx)
  local H = draw_legend(ctx, MT + P + 70)

  local title, sub = title_lines(ctx)
  local head = {
    format('<svg xmlns="http://www.w3.org/2000/svg" width="%d" height="%d" viewBox="0 0 %d %d">',
      W, H, W, H),
    format("<title>%s</title>", esc(title .. " \u{2014} " .. sub)),
    format('<rect width="%d" height="%d" fill="#fdfcf8"/>', W, H),
    format('<g id="title" font-family="%s" fill="%s">', FONT, STYLE.text),
    format('<text x="%.1f" y="32" font-size="%.1f" font-weight="bold">%s</text>', ML,
      min(17, (W - ML - 10) / max(20, utf8.len(title)) * 1.65), esc(title)),
    format('<text x="%.1f" y="55" font-size="%.1f" fill="%s">%s</text>', ML,
      min(13, (W - ML - 10) / max(20, utf8.len(sub)) * 1.8), STYLE.soft, esc(sub)),
    "</g>",
  }
  local f, err = io.open(o.file, "w")
  if not f then error("map: cannot write " .. tostring(err), 2) end
  f:write('<?xml version="1.0" encoding="UTF-8"?>\n', concat(head, "\n"), "\n",
    concat(ctx.body, "\n"), "\n</svg>\n")
  f:close()
  ctx.summary.width, ctx.summary.height = W, H
  return o.file, ctx.summary
end

return M
