-- steep.multimap — J:map for an integral in several variables: a picture of Re F over a
-- pair of the variables (a slice through the dominant point for the others), written as
-- a hand-made SVG: Re F shaded in bands below its largest value with level lines, the
-- box of the contours, the real critical points in view (maxima, minima, saddles, by the
-- signs of the Hessian's eigenvalues), the points that contribute ringed, axes, a
-- legend and a title. Intervals of the real axis are drawn in x; circles about 0 in their
-- angle (the torus unrolled).
--
-- J:map{<params>, file = "x.svg", pair = {i, j}, width = 640, grid = 96, levels = 10,
-- depth = 30} -> file, summary
--   pair:  the two variables drawn (default {1, 2});
--   depth: how far below the largest Re F in view the shading runs (the integrand is
--          e^{-depth} of its peak at the darkest band);
-- summary: the window, the slice values of the other variables, counts of cells (shaded
-- rectangles, runs of one band merged), level lines, markers by kind, and the problem's
-- kind; every marker has a class attribute
-- (critical maximum / minimum / saddle, contributing).

local complex = require "steep.complex"
local critical = require "steep.critical"
local integral = require "steep.integral"

local cnew, cparts, hypot = complex.new, complex.parts, complex.hypot
local format, concat = string.format, table.concat
local pi, abs, floor, huge, sqrt = math.pi, math.abs, math.floor, math.huge, math.sqrt
local min, max = math.min, math.max

local M = {}

local FONT = "DejaVu Sans, Verdana, Arial, sans-serif"

-- The shading: from a deep indigo (far below the peak, where the integrand is
-- negligible) through teal to a warm ivory at the peak.
local RAMP = {
  { 0.00, 0x1b, 0x1a, 0x3a },
  { 0.35, 0x2c, 0x5f, 0x7a },
  { 0.65, 0x5f, 0xa8, 0x8f },
  { 0.85, 0xc9, 0xdb, 0x9a },
  { 1.00, 0xfb, 0xf6, 0xe4 },
}
local STYLE = {
  level = "#10121a", box = "#c2410c", maximum = "#b91c1c", minimum = "#1d4ed8",
  saddle = "#6d28d9", ring = "#f59e0b", text = "#161616", soft = "#4b5563", frame = "#202020",
}

local function hex(r, g, b)
  return format("#%02x%02x%02x", floor(r + 0.5), floor(g + 0.5), floor(b + 0.5))
end

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

local function esc(s)
  return (tostring(s):gsub("&", "&amp;"):gsub("<", "&lt;"):gsub(">", "&gt;"):gsub('"', "&quot;"))
end

local function num(v)
  local s = format("%.4g", v)
  if s:match("^%-0%.?0*$") then s = s:sub(2) end
  return (s:gsub("^%-", "\u{2212}"))
end

-- One axis: how a coordinate of the variable maps to a point of its contour, and the
-- window drawn. Real intervals: x itself; circles: the angle (x = r e^{i theta}).
local function axis(J, cp, k, shape, centre_pt, width_k)
  if shape.shape == "circle" then
    local c, r = shape.center, shape.radius
    local th0 = 0
    if centre_pt then th0 = math.atan(select(2, cparts(centre_pt[k] - c)), (cparts(centre_pt[k] - c))) end
    return { lo = th0 - pi, hi = th0 + pi, label = "arg " .. J.vars[k].name,
      point = function(th) return c + r * cnew(math.cos(th), math.sin(th)) end,
      coord = function(z) local w = z - c; return math.atan(select(2, cparts(w)), (cparts(w))) end }
  end
  local lo, hi = shape.lo, shape.hi
  local m = centre_pt and cparts(centre_pt[k]) or 0
  local w = width_k or 1
  if lo == -huge then lo = math.min(m - 8 * w, hi == huge and m - 8 * w or hi - 16 * w) end
  if hi == huge then hi = math.max(m + 8 * w, lo + 16 * w) end
  return { lo = lo, hi = hi, label = J.vars[k].name, point = function(v) return cnew(v, 0) end,
    coord = function(z) return (cparts(z)) end }
end

-- Level lines by marching squares (common practice): segments where the bilinear
-- interpolant of a cell crosses the level.
local function level_segments(V, G, level)
  local segs = {}
  for i = 1, G - 1 do
    for j = 1, G - 1 do
      local v00, v10, v01, v11 = V[i][j], V[i + 1][j], V[i][j + 1], V[i + 1][j + 1]
      local pts = {}
      local function edge(xa, ya, xb, yb, va, vb)
        if (va < level) ~= (vb < level) and va == va and vb == vb then
          local t = (level - va) / (vb - va)
          pts[#pts + 1] = { xa + t * (xb - xa), ya + t * (yb - ya) }
        end
      end
      edge(i, j, i + 1, j, v00, v10)
      edge(i + 1, j, i + 1, j + 1, v10, v11)
      edge(i + 1, j + 1, i, j + 1, v11, v01)
      edge(i, j + 1, i, j, v01, v00)
      if #pts >= 2 then segs[#segs + 1] = { pts[1], pts[2] } end
      if #pts == 4 then segs[#segs + 1] = { pts[3], pts[4] } end
    end
  end
  return segs
end

--- J:map{...} (see the header)
function M.map(J, opts)
  local params, o = integral.split_options(J, opts, { file = true, pair = true, width = true,
    grid = true, levels = true, depth = true }, "map")
  if J.n < 2 then error("map: the several-variable map draws pairs of variables (n >= 2)", 3) end
  local pair = o.pair or { 1, 2 }
  if type(pair) ~= "table" or #pair ~= 2 or not math.tointeger(pair[1]) or not math.tointeger(pair[2])
      or pair[1] == pair[2] or pair[1] < 1 or pair[2] < 1 or pair[1] > J.n or pair[2] > J.n then
    error(format("map: option 'pair' must list two different variables among 1..%d", J.n), 3)
  end
  local file = o.file or "steep-map.svg"
  if type(file) ~= "string" then error("map: option 'file' must be a file name", 3) end
  local W = o.width or 640
  local G = o.grid or 96
  local nlev = o.levels or 10
  local depth = o.depth or 30
  for name, v in pairs({ width = W, grid = G, levels = nlev, depth = depth }) do
    if type(v) ~= "number" or v ~= v or v < 0 or v == huge then
      error(format("map: option '%s' must be a non-negative number", name), 3)
    end
  end
  if G < 8 or G > 400 then error("map: option 'grid' must be from 8 to 400", 3) end
  local cp = J:_cparams(params)
  local kind, shapes = critical.classify(J, cp)
  -- the points that contribute (when settled) and the real critical points
  local pts = {}
  local ok, contributing = pcall(critical.contributing, J, cp, {})
  if ok then pts = contributing end
  local crit = {}
  local okc, found = pcall(critical.find, J, cp, {})
  if okc then crit = found end
  local top = pts[1] and pts[1].x
  local widths = {}
  if top then
    local _, _, Hm = critical.derivs(J, cp, top)
    for k = 1, J.n do widths[k] = 1 / sqrt(max(abs((cparts(Hm[k][k]))), 1e-300)) end
  end
  local i, j = pair[1], pair[2]
  for _, k in ipairs({ i, j }) do
    if shapes[k].shape ~= "real" and shapes[k].shape ~= "circle" then
      error(format("map: contour %d is neither an interval of the real axis nor a circle", k), 3)
    end
  end
  local ax, ay = axis(J, cp, i, shapes[i], top, widths[i]), axis(J, cp, j, shapes[j], top, widths[j])
  -- the slice: the other variables at the dominant point (or 0 / the circle's positive point)
  local base = {}
  for k = 1, J.n do
    if top then base[k] = top[k]
    elseif shapes[k].shape == "circle" then base[k] = shapes[k].center + shapes[k].radius
    else base[k] = cnew(0, 0) end
  end
  local pts_grid = {}
  for a = 1, G do
    for b = 1, G do
      local p = { table.unpack(base) }
      p[i] = ax.point(ax.lo + (ax.hi - ax.lo) * (a - 0.5) / G)
      p[j] = ay.point(ay.lo + (ay.hi - ay.lo) * (b - 0.5) / G)
      pts_grid[#pts_grid + 1] = p
    end
  end
  local Fs = critical.eval_many(J, cp, pts_grid)
  local V, vmax = {}, -huge
  for a = 1, G do
    V[a] = {}
    for b = 1, G do
      local v = cparts(Fs:get((a - 1) * G + b))
      if not (v == v) or v == huge then v = -huge end
      V[a][b] = v
      if v > vmax then vmax = v end
    end
  end
  if vmax == -huge then error("map: Re F is not finite anywhere in the window", 3) end
  local vmin = vmax - depth
  -- geometry
  local margin_l, margin_t, margin_b, legend_w = 64, 40, 56, 150
  local plot = W - margin_l - legend_w - 24
  local H = margin_t + plot + margin_b
  local function px(u) return margin_l + (u - ax.lo) / (ax.hi - ax.lo) * plot end
  local function py(v) return margin_t + plot - (v - ay.lo) / (ay.hi - ay.lo) * plot end
  local out = {}
  local function add(...) out[#out + 1] = format(...) end
  add('<?xml version="1.0" encoding="UTF-8"?>')
  add('<svg xmlns="http://www.w3.org/2000/svg" width="%d" height="%d" viewBox="0 0 %d %d" '
    .. 'font-family="%s">', W, H, W, H, FONT)
  add('<rect x="0" y="0" width="%d" height="%d" fill="#ffffff"/>', W, H)
  add('<text x="%d" y="24" font-size="14" fill="%s">%s</text>', margin_l, STYLE.text,
    esc(format("Re F over (%s, %s): %s", ax.label, ay.label, ({ laplace = "Laplace type",
      torus = "a torus (angles)" })[kind] or kind)))
  -- shading in BANDS bands, runs of one band along a column merged into one rectangle
  local BANDS = 48
  local cell = plot / G
  add('<g class="shading" shape-rendering="crispEdges">')
  local cells = 0
  local function band(v)
    if v == -huge then return 0 end
    return min(BANDS - 1, max(0, floor((v - vmin) / depth * BANDS)))
  end
  for a = 1, G do
    local b = 1
    while b <= G do
      local k, e = band(V[a][b]), b
      while e < G and band(V[a][e + 1]) == k do e = e + 1 end
      add('<rect x="%.2f" y="%.2f" width="%.2f" height="%.2f" fill="%s"/>',
        margin_l + (a - 1) * cell, margin_t + plot - e * cell, cell + 0.3,
        (e - b + 1) * cell + 0.3, ramp((k + 0.5) / BANDS))
      cells = cells + 1
      b = e + 1
    end
  end
  add('</g>')
  -- level lines (grid coordinates: cell centres)
  local nlines = 0
  if nlev > 0 then
    add('<g class="levels" stroke="%s" stroke-width="0.6" stroke-opacity="0.55" fill="none">',
      STYLE.level)
    for k = 1, nlev do
      local level = vmax - depth * k / (nlev + 1)
      local segs = level_segments(V, G, level)
      if #segs > 0 then
        local d = {}
        for _, s in ipairs(segs) do
          d[#d + 1] = format("M%.2f %.2fL%.2f %.2f", margin_l + (s[1][1] - 0.5) * cell,
            margin_t + plot - (s[1][2] - 0.5) * cell, margin_l + (s[2][1] - 0.5) * cell,
            margin_t + plot - (s[2][2] - 0.5) * cell)
        end
        add('<path class="level" d="%s"/>', concat(d))
        nlines = nlines + 1
      end
    end
    add('</g>')
  end
  -- the box of the contours (real intervals: their ends, where finite and in view)
  local function vline(xv) add('<line class="box" x1="%.2f" y1="%d" x2="%.2f" y2="%d" stroke="%s" '
    .. 'stroke-width="2"/>', px(xv), margin_t, px(xv), margin_t + plot, STYLE.box) end
  local function hline(yv) add('<line class="box" x1="%d" y1="%.2f" x2="%d" y2="%.2f" stroke="%s" '
    .. 'stroke-width="2"/>', margin_l, py(yv), margin_l + plot, py(yv), STYLE.box) end
  if shapes[i].shape == "real" then
    for _, e in ipairs({ shapes[i].lo, shapes[i].hi }) do if e >= ax.lo and e <= ax.hi then vline(e) end end
  end
  if shapes[j].shape == "real" then
    for _, e in ipairs({ shapes[j].lo, shapes[j].hi }) do if e >= ay.lo and e <= ay.hi then hline(e) end end
  end
  -- critical points in view (on the slice: the other coordinates at the base point)
  local counts = { maximum = 0, minimum = 0, saddle = 0, contributing = 0 }
  local function in_view(p)
    for k = 1, J.n do
      if k ~= i and k ~= j and hypot(cparts(p[k] - base[k])) > 1e-6 * (1 + hypot(cparts(base[k]))) then
        return false
      end
    end
    for _, k in ipairs({ i, j }) do
      if shapes[k].shape == "real" and abs(select(2, cparts(p[k]))) > 1e-9 * (1 + hypot(cparts(p[k]))) then
        return false
      end
      if shapes[k].shape == "circle"
          and abs(hypot(cparts(p[k] - shapes[k].center)) - shapes[k].radius) > 1e-9 * shapes[k].radius then
        return false
      end
    end
    local u, v = ax.coord(p[i]), ay.coord(p[j])
    return u >= ax.lo and u <= ax.hi and v >= ay.lo and v <= ay.hi, u, v
  end
  add('<g class="critical">')
  for _, c in ipairs(crit) do
    local vis, u, v = in_view(c.x)
    if vis then
      -- the shape of Re F in the drawn (real) coordinates s, x_k = x_k(s_k) with tangent
      -- t_k: its Hessian there is Re(t_a t_b F_ab) (F holomorphic, the gradient zero)
      local _, _, Hc = critical.derivs(J, cp, c.x)
      local t = {}
      for _, k in ipairs({ i, j }) do
        t[k] = shapes[k].shape == "circle" and cnew(0, 1) * (c.x[k] - shapes[k].center) or 1
      end
      local hii = cparts(t[i] * t[i] * Hc[i][i])
      local hjj = cparts(t[j] * t[j] * Hc[j][j])
      local hij = cparts(t[i] * t[j] * Hc[i][j])
      local det = hii * hjj - hij * hij
      local what = (det <= 0 and "saddle") or (hii < 0 and "maximum") or "minimum"
      counts[what] = counts[what] + 1
      local X, Y = px(u), py(v)
      if what == "maximum" then
        add('<circle class="critical maximum" cx="%.2f" cy="%.2f" r="5" fill="%s" stroke="#ffffff" '
          .. 'stroke-width="1.5"/>', X, Y, STYLE.maximum)
      elseif what == "minimum" then
        add('<circle class="critical minimum" cx="%.2f" cy="%.2f" r="5" fill="none" stroke="%s" '
          .. 'stroke-width="2"/>', X, Y, STYLE.minimum)
      else
        add('<path class="critical saddle" d="M%.2f %.2fl10 10m0 -10l-10 10" stroke="%s" '
          .. 'stroke-width="2.2"/>', X - 5, Y - 5, STYLE.saddle)
      end
    end
  end
  for _, p in ipairs(pts) do
    local vis, u, v = in_view(p.x)
    if vis then
      counts.contributing = counts.contributing + 1
      add('<circle class="contributing" cx="%.2f" cy="%.2f" r="9" fill="none" stroke="%s" '
        .. 'stroke-width="2.5"/>', px(u), py(v), STYLE.ring)
    end
  end
  add('</g>')
  -- frame and axes
  add('<rect class="frame" x="%d" y="%d" width="%.2f" height="%.2f" fill="none" stroke="%s"/>',
    margin_l, margin_t, plot, plot, STYLE.frame)
  add('<g class="axes" font-size="11" fill="%s">', STYLE.soft)
  for t = 0, 4 do
    local u = ax.lo + (ax.hi - ax.lo) * t / 4
    local v = ay.lo + (ay.hi - ay.lo) * t / 4
    add('<text x="%.2f" y="%d" text-anchor="middle">%s</text>', px(u), margin_t + plot + 16, num(u))
    add('<text x="%d" y="%.2f" text-anchor="end">%s</text>', margin_l - 6, py(v) + 4, num(v))
  end
  add('<text x="%.2f" y="%d" text-anchor="middle" font-size="13">%s</text>',
    margin_l + plot / 2, margin_t + plot + 38, esc(ax.label))
  add('<text x="16" y="%.2f" font-size="13" transform="rotate(-90 16 %.2f)" '
    .. 'text-anchor="middle">%s</text>', margin_t + plot / 2, margin_t + plot / 2, esc(ay.label))
  add('</g>')
  -- legend
  local lx = margin_l + plot + 20
  add('<g class="legend" font-size="11" fill="%s">', STYLE.text)
  for t = 0, 20 do
    add('<rect x="%d" y="%.2f" width="14" height="%.2f" fill="%s"/>', lx,
      margin_t + (20 - t) * plot / 42, plot / 42 + 0.5, ramp(t / 20))
  end
  add('<text x="%d" y="%d">max Re F %s</text>', lx + 18, margin_t + 8, num(vmax))
  add('<text x="%d" y="%.2f">%s below</text>', lx + 18, margin_t + plot / 2, num(depth))
  local ly = margin_t + plot / 2 + 30
  add('<circle cx="%d" cy="%d" r="5" fill="%s"/><text x="%d" y="%d">maximum</text>', lx + 6, ly,
    STYLE.maximum, lx + 18, ly + 4)
  add('<circle cx="%d" cy="%d" r="5" fill="none" stroke="%s" stroke-width="2"/><text x="%d" '
    .. 'y="%d">minimum</text>', lx + 6, ly + 20, STYLE.minimum, lx + 18, ly + 24)
  add('<path d="M%d %dl10 10m0 -10l-10 10" stroke="%s" stroke-width="2"/><text x="%d" '
    .. 'y="%d">saddle</text>', lx + 1, ly + 35, STYLE.saddle, lx + 18, ly + 44)
  add('<circle cx="%d" cy="%d" r="8" fill="none" stroke="%s" stroke-width="2.5"/><text x="%d" '
    .. 'y="%d">contributes</text>', lx + 6, ly + 62, STYLE.ring, lx + 18, ly + 66)
  add('<line x1="%d" y1="%d" x2="%d" y2="%d" stroke="%s" stroke-width="2"/><text x="%d" '
    .. 'y="%d">box edge</text>', lx, ly + 84, lx + 14, ly + 84, STYLE.box, lx + 18, ly + 88)
  add('</g>')
  if J.n > 2 then
    local others = {}
    for k = 1, J.n do
      if k ~= i and k ~= j then others[#others + 1] = J.vars[k].name .. " = " .. critical.point_text({ base[k] }):sub(2, -2) end
    end
    add('<text x="%d" y="%d" font-size="11" fill="%s">slice: %s</text>', margin_l, H - 8,
      STYLE.soft, esc(concat(others, ", ")))
  end
  add('</svg>')
  local f, why = io.open(file, "w")
  if not f then error("map: cannot write " .. tostring(file) .. ": " .. tostring(why), 3) end
  f:write(concat(out, "\n"), "\n")
  f:close()
  return file, { window = { x = { ax.lo, ax.hi }, y = { ay.lo, ay.hi } }, slice = base,
    cells = cells, level_lines = nlines, maxima = counts.maximum, minima = counts.minimum,
    saddles = counts.saddle, contributing = counts.contributing, kind = kind, range = { vmin, vmax } }
end

return M
