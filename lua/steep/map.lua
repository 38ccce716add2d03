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
--
-- The work is split by concern: map_style (colours and text), map_grid (the node grid:
-- shading, level lines, cuts), map_draw (paths, markers, axes), map_legend (legend,
-- colour bar, notes, title).

local complex = require "steep.complex"
local landscape = require "steep.landscape"
local decompose = require "steep.decompose"
local grid = require "steep.map_grid"
local draw = require "steep.map_draw"
local legend = require "steep.map_legend"
local style = require "steep.map_style"
local files = require "steep.files"

local cnew, cparts = complex.new, complex.parts
local cabs = landscape.cabs
local format, concat = string.format, table.concat
local abs, huge, min, max, sqrt = math.abs, math.huge, math.min, math.max, math.sqrt
local FONT, STYLE, esc, finite = style.FONT, style.STYLE, style.esc, style.finite
local height_grid, draw_shading, draw_levels, draw_cuts =
  grid.height_grid, grid.draw_shading, grid.draw_levels, grid.draw_cuts
local draw_rim, draw_deformed, draw_steepest, draw_given = draw.draw_rim, draw.draw_deformed,
  draw.draw_steepest, draw.draw_given
local draw_markers, draw_labels, draw_axes = draw.draw_markers, draw.draw_labels, draw.draw_axes
local draw_legend, title_lines = legend.draw_legend, legend.title_lines

local M = {}
local draw_map

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

-- A window that double precision can draw: its grid nodes, pixels and ticks must be
-- distinct numbers, so the radius may not be too small for the center's size (the grid
-- spacing, at least 2r/600, must stay far above the rounding of |center|, about 2e-16
-- |center|), and nothing may overflow (2r, |center| + r). A window too narrow is refused
-- when the user gave it; a fitted one is widened to the narrowest drawable.
local MIN_RELATIVE_RADIUS = 1e-10
local MAX_EXTENT, MIN_RADIUS = 1e280, 1e-280

local function narrowest(center)
  return max(MIN_RADIUS, MIN_RELATIVE_RADIUS * cabs(center))
end

local function check_drawable(d, name)
  local c = cabs(d.center)
  if c > MAX_EXTENT or d.radius > MAX_EXTENT then
    error(format("map: the %s (center %s, radius %.4g) is too large to draw in double precision "
      .. "(center and radius at most %.0e)", name, tostring(d.center), d.radius, MAX_EXTENT), 4)
  end
  if d.radius < narrowest(d.center) then
    error(format("map: the %s radius %.4g is too small to draw around the center %s: double "
      .. "precision cannot tell its grid points apart (the radius must be at least %.4g here: "
      .. "1e-10 times |center|, and never below 1e-280)", name, d.radius, tostring(d.center),
      narrowest(d.center)), 4)
  end
  return d
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
  local center = cnew(0.5 * (x0 + x1), 0.5 * (y0 + y1))
  if r < narrowest(center) then
    -- features closer together than double precision can draw at their distance from
    -- the origin: the narrowest drawable window, and a note saying why
    return { center = center, radius = narrowest(center), widened = true }
  end
  return { center = center, radius = r }
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
  if view then check_drawable(view, "view") elseif region then check_drawable(region, "region") end
  local W = check_int(o.width, "width", 360, 4000, 720)
  local N = check_int(o.grid, "grid", 8, 600, 120)
  local shade = o.shade or "exponent"
  if shade ~= "exponent" and shade ~= "modulus" then
    error(format("map: option 'shade' must be \"exponent\" or \"modulus\", got %s",
      tostring(shade)), 2)
  end
  local nlevels = check_int(o.levels, "levels", 0, 60, 10)
  -- the file is opened before the work (a bad name fails now, not after it)
  local writer = files.open(o.file, "map", "file", 2)
  local ok, summary = pcall(draw_map, J, params, o, region, view, W, N, shade, nlevels, writer)
  if not ok then
    writer:discard()
    error(summary, 0)
  end
  local done, why = writer:commit()
  if not done then error(files.failure("map: " .. why, { file = o.file, summary = summary }), 2) end
  return o.file, summary
end

-- The drawing itself, into the writer; returns the summary.
function draw_map(J, params, o, region, view, W, N, shade, nlevels, writer)

  local L = J:_landscape(params, region, true)
  local ok, plan = pcall(decompose.decompose, J, params, L, J.contour)
  if not ok then
    plan = { status = "failed", notes = { tostring(plan) }, pieces = {}, residues = {} }
  end
  view = view or region or fitted_view(J, L)
  local notes = {}
  if view.widened then
    notes[#notes + 1] = format("the window was widened to radius %.3g: its features lie closer "
      .. "together than double precision can draw at their distance from the origin",
      view.radius)
  end

  -- layout: the plot is a square P pixels wide; title above, legend below
  local ML, MR, MT = 72, 34, 92
  local P = W - ML - MR
  local ctx = { J = J, L = L, plan = plan, params = params, var = J.var.name, N = N,
    shade = shade, nlevels = nlevels,
    vc = view.center, vr = view.radius, X0 = ML, Y0 = MT, P = P, cw = P / N,
    body = {}, arrows = {}, labels = {}, marks = {}, looped = {}, present = {}, notes = notes,
    sing_label = draw.singularity_labels(L) }
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
    shade = shade, notes = notes, decomposition_notes = plan.notes or {} }
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
  writer:write('<?xml version="1.0" encoding="UTF-8"?>\n', concat(head, "\n"), "\n",
    concat(ctx.body, "\n"), "\n</svg>\n")
  ctx.summary.width, ctx.summary.height = W, H
  return ctx.summary
end

return M
