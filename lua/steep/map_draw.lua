-- steep.map_draw — the map's drawing in pixels: clipping polylines to the plot, the rim
-- with its valleys, the deformed contour with its orientation and residue loops, the
-- steepest paths, the given contour, the markers and their labels, and the axes. Each
-- section appends SVG lines through ctx.out and counts what it drew in ctx.summary.

local core = require "steep.core"
local landscape = require "steep.landscape"
local contour_m = require "steep.contour"
local style = require "steep.map_style"

local cabs = landscape.cabs
local format, concat = string.format, table.concat
local pi, abs, ceil, huge, min = math.pi, math.abs, math.ceil, math.huge, math.min
local max, sqrt, cos, sin = math.max, math.sqrt, math.cos, math.sin
local FONT, STYLE, esc, finite = style.FONT, style.STYLE, style.esc, style.finite
local cnum, nice_step, tick_label = style.cnum, style.nice_step, style.tick_label

local M = {}

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

-- Strip valleys (exponents with exp, sinh, cosh of the variable) on the rim: along each
-- side of the frame that rays in a family's direction leave through, a wide sea-green
-- band where the side's points lie in one of the family's valley strips (their offset
-- across the direction in lo + m period .. hi + m period), the brick rim between them;
-- the strip instances the decomposition named are labelled V_k at their middle.
local function draw_strips(ctx)
  local families = ctx.L.strip_families or {}
  if #families == 0 then return end
  local out, X0, Y0, P = ctx.out, ctx.X0, ctx.Y0, ctx.P
  local vcx, vcy, vr = ctx.vcx, ctx.vcy, ctx.vr
  local off = 6.5
  -- the four sides: outward normal, and the plane point and pixel at parameter t in [0, 1]
  local sides = {
    { 1, 0, function(t) return vcx + vr, vcy - vr + 2 * vr * t end,
      function(t) return X0 + P + off, Y0 + P - P * t end },
    { -1, 0, function(t) return vcx - vr, vcy - vr + 2 * vr * t end,
      function(t) return X0 - off, Y0 + P - P * t end },
    { 0, 1, function(t) return vcx - vr + 2 * vr * t, vcy + vr end,
      function(t) return X0 + P * t, Y0 - off end },
    { 0, -1, function(t) return vcx - vr + 2 * vr * t, vcy - vr end,
      function(t) return X0 + P * t, Y0 + P + off end },
  }
  local n = 400
  for _, f in ipairs(families) do
    ctx.summary.valleys = ctx.summary.valleys + 1
    local cth, sth = cos(f.direction), sin(f.direction)
    local w = f.hi - f.lo
    for _, side in ipairs(sides) do
      if side[1] * cth + side[2] * sth > 0.5 then
        local runs, cur = {}, nil
        for k = 0, n do
          local t = k / n
          local x, y = side[3](t)
          -- the offset across the direction: Im((x + iy) e^{-i th})
          local yo = y * cth - x * sth
          local u = (yo - f.lo) % f.period
          if u > 0 and u < w then
            if not cur then cur = {}; runs[#runs + 1] = cur end
            cur[#cur + 1] = { side[4](t) }
          else
            cur = nil
          end
        end
        for _, run in ipairs(runs) do
          if #run >= 2 then
            out(format('<path class="valley-strip" data-direction="%.6g" d="%s" stroke="%s" '
              .. 'stroke-width="8"/>', f.direction, path_d({ run }), STYLE.valley))
          end
        end
      end
    end
  end
  -- labels of the strip instances the decomposition named, at their middle on the rim
  for k, v in ipairs(ctx.L.valleys) do
    if v.type == "strip" then
      local cth, sth = cos(v.direction), sin(v.direction)
      for _, side in ipairs(sides) do
        if side[1] * cth + side[2] * sth > 0.5 then
          -- where the middle line meets this side
          local x0, y0 = side[3](0)
          local x1, y1 = side[3](1)
          local a0, a1 = y0 * cth - x0 * sth, y1 * cth - x1 * sth
          if a1 ~= a0 then
            local t = (v.mid - a0) / (a1 - a0)
            if t >= 0 and t <= 1 then
              local px, py = side[4](t)
              ctx.labels[#ctx.labels + 1] = { px - 20 * side[1], py + 20 * side[2] + 4,
                "V" .. k, size = 11, color = STYLE.valley }
            end
          end
        end
      end
    end
  end
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
    local n = min(1440, max(2, ceil((b - a) / (pi / 720))))
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
  draw_strips(ctx)
  for k, v in ipairs(ctx.L.valleys) do
    if v.type == "strip" then goto next_valley end   -- (drawn with their families)
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
    ::next_valley::
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

--- The label of each singularity of the landscape, numbered within its kind (the first
-- pole is P1 whatever comes before it in the landscape's list): label[j] for
-- L.singularities[j].
function M.singularity_labels(L)
  local count, label = {}, {}
  for j, s in ipairs(L.singularities) do
    local letter = LETTER[s.kind] or "X"
    count[letter] = (count[letter] or 0) + 1
    label[j] = letter .. count[letter]
  end
  return label
end
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
      local desc = format("%s %s at %s = %s%s (%s)", s.kind, ctx.sing_label[j], var, cnum(s.at),
        s.order and format(", order %d", s.order) or "", s.source)
      if s.residue then desc = desc .. ", residue " .. cnum(s.residue) end
      out(format('<g class="%s" id="%s-%d"><title>%s</title>%s</g>', s.kind, s.kind, j,
        esc(desc), marker(s.kind, x, y)))
      local off = ctx.looped[j] and 17 or 9
      ctx.labels[#ctx.labels + 1] = { x + off, y - off, ctx.sing_label[j], anchor = "start" }
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
  -- (ticks whose labels do not overlap: the step grows until they fit)
  local xs, step = style.fitting_ticks(vcx - vr, vcx + vr, 7, P, 12)
  local ys, ystep = style.fitting_ticks(vcy - vr, vcy + vr, 7, P, 12, true)
  out(format('<g id="axes" font-family="%s" font-size="12" fill="%s">', FONT, STYLE.text))
  local ticks = {}
  for _, v in ipairs(xs) do
    local x = X0 + (v - (vcx - vr)) / (2 * vr) * P
    ticks[#ticks + 1] = format("M%.1f %.1fv-6M%.1f %.1fv6", x, Y0 + P, x, Y0)
    out(format('<text class="tick" x="%.1f" y="%.1f" text-anchor="middle">%s</text>', x,
      Y0 + P + 28, tick_label(v, step)))
  end
  -- (the labels of the vertical axis share the left margin with the axis name: a long
  -- one is set smaller so that it stays on the page)
  local widest = 0
  for _, v in ipairs(ys) do widest = max(widest, utf8.len(tick_label(v, ystep))) end
  local ysize = max(7, min(12, (X0 - 22) / (0.62 * max(1, widest))))
  for _, v in ipairs(ys) do
    local y = Y0 + ((vcy + vr) - v) / (2 * vr) * P
    ticks[#ticks + 1] = format("M%.1f %.1fh6M%.1f %.1fh-6", X0, y, X0 + P, y)
    out(format('<text class="tick" x="%.1f" y="%.1f" text-anchor="end" font-size="%.1f">%s'
      .. '</text>', X0 - 16, y + 4, ysize, tick_label(v, ystep)))
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

M.visible_runs, M.path_d, M.point_at, M.longest, M.arrowhead, M.marker =
  visible_runs, path_d, point_at, longest, arrowhead, marker
M.draw_rim, M.draw_deformed, M.draw_steepest, M.draw_given, M.draw_markers =
  draw_rim, draw_deformed, draw_steepest, draw_given, draw_markers
M.draw_labels, M.draw_axes = draw_labels, draw_axes

return M
