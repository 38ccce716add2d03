-- steep.map_grid — the map's node grid: the height (Re F or log |g e^F|) sampled on it,
-- its range and colours, the shading, level lines by marching squares, and branch cuts
-- as level sets on a shifted grid. Each section appends SVG lines through ctx.out and
-- counts what it drew in ctx.summary.

local core = require "steep.core"
local complex = require "steep.complex"
local landscape = require "steep.landscape"
local style = require "steep.map_style"

local cnew, cparts = complex.new, complex.parts
local cabs = landscape.cabs
local format, concat = string.format, table.concat
local abs, floor, ceil, log, huge = math.abs, math.floor, math.ceil, math.log, math.huge
local min, max, sqrt, atan = math.min, math.max, math.sqrt, math.atan
local BANDS, STYLE, esc, ramp = style.BANDS, style.STYLE, style.esc, style.ramp
local finite, num, nice_step = style.finite, style.num, style.nice_step

local M = {}

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

-- The heights' extent about the pivot, in units of the saddles' spread, beyond which the
-- colour scale is symmetric-log.
local SYMLOG_RATIO = 30

-- Level values: round ones (multiples of a nice step) on a linear scale; on a
-- symmetric-log scale 0 and +-{1, 2, 5} x 10^k, kept where they lie at least 1/(2n) of
-- the ramp apart.
local function level_values(ctx)
  local n = ctx.nlevels
  if not ctx.symlog then
    local step = nice_step(ctx.hi - ctx.lo, n)
    return style.multiples(ctx.lo, ctx.hi, step, 4 * n + 4)
  end
  return style.symlog_values(ctx.lo, ctx.hi, ctx.unit, 0.5 / n)
end
M.level_values = level_values

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
  -- a range the doubles can resolve at its size (heights of 1e20 that differ by 1
  -- would give level steps that vanish against them), and finite
  lo, hi = max(lo, -1e300), min(hi, 1e300)
  local least = 1e-9 * max(1, abs(hi), abs(lo))
  if hi - lo < least then lo, hi = lo - least, hi + least end
  local span = hi - lo
  lo, hi = min(lo, pivot - 0.15 * span), max(hi, pivot + 0.15 * span)
  ctx.lo, ctx.hi, ctx.pivot, ctx.pivot_saddle = lo, hi, pivot, pivot_saddle
  ctx.saddle_levels = saddle_levels
  ctx.summary.range = { lo, hi, pivot = pivot }
  -- the ramp position of a value: piecewise linear, lo -> 0, pivot -> 1/2, hi -> 1; where
  -- the heights span far more than the saddles' levels (exp, sinh, cosh of the variable:
  -- Re F grows exponentially), symmetric-log about the pivot instead, linear within c of
  -- it (c: a quarter of the saddles' spread about the pivot, at least 1), logarithmic
  -- beyond: position ~ asinh((v - pivot)/c)
  local spread = 0
  for _, v in pairs(saddle_levels) do spread = max(spread, abs(v - pivot)) end
  local c = max(1, 0.25 * spread)
  local extent = max(hi - pivot, pivot - lo)
  if extent > SYMLOG_RATIO * max(1, spread) then
    ctx.symlog = c
    local function asinh(x) return x >= 0 and log(x + sqrt(x * x + 1)) or -log(-x + sqrt(x * x + 1)) end
    local down, up = asinh((pivot - lo) / c), asinh((hi - pivot) / c)
    ctx.unit = function(v)
      if v ~= v or v == huge then return 1 end
      if v == -huge then return 0 end
      local a = asinh((v - pivot) / c)
      if a < 0 then return max(0, 0.5 + 0.5 * a / down) end
      return min(1, 0.5 + 0.5 * a / up)
    end
    ctx.summary.range.symlog = c
  else
    ctx.unit = function(v)
      if v ~= v or v == huge then return 1 end
      if v == -huge then return 0 end
      if v < pivot then return max(0, 0.5 * (v - lo) / (pivot - lo)) end
      return min(1, 0.5 + 0.5 * (v - pivot) / (hi - pivot))
    end
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
  -- |g e^F| grows without bound at a pole, above any clipping: in modulus shading each
  -- pole in view is a disc of the top colour (on a coarse grid it would show as a cell or
  -- two of moderate colour, under its marker)
  if ctx.shade == "modulus" then
    for _, s in ipairs(ctx.L.singularities) do
      if s.kind == "pole" and ctx.in_view(s.at) then
        local x, y = ctx.tf(s.at)
        out(format('<circle class="pole-peak" cx="%.1f" cy="%.1f" r="19" fill="%s" '
          .. 'fill-opacity="0.9"/>', x, y, ctx.palette[BANDS - 1]))
      end
    end
  end
  out("</g>")
end

-- Level lines at round values, and the level of each saddle in view (dotted).
local function draw_levels(ctx)
  local out, H, N = ctx.out, ctx.H, ctx.N
  out('<g id="levels" fill="none" clip-path="url(#plot-area)">')
  if ctx.nlevels > 0 then
    for _, c in ipairs(level_values(ctx)) do
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

M.node_path, M.height_grid, M.draw_shading, M.draw_levels, M.draw_cuts =
  node_path, height_grid, draw_shading, draw_levels, draw_cuts

return M
