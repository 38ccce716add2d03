-- beyond_optimal.lua — what resummation buys at moderate x: for three integrals, the
-- relative error of a plain expansion (a fixed number of terms), of optimal truncation
-- (stopped before the smallest term) and of the resummed value (J:expand{..., resum =
-- true}: Borel-Pade summation or hyperasymptotics, whichever estimates the smaller
-- error), each against quadrature, as the large parameter x falls; a table per integral
-- and one SVG plot (error against x, logarithmic scale).
--
-- The integrals:
--   1. e^x E1(x) = integral_0^inf e^{-x t}/(1 + t) dt: an endpoint; the pole at t = -1
--      governs the late terms of its series (DLMF 6.2.2, 6.12.1).
--   2. Gamma(x)/x^x = integral_0^inf e^{x (log s - s)} ds: Stirling's series at the saddle
--      s = 1 (DLMF 5.2.1, 5.11.3); its series resurges from the saddle's images on the other
--      sheets of the logarithm.
--   3. An invented relaxation response, integral_0^inf e^{-x (t + t^2/4)} / (1 + t^2) dt:
--      an endpoint whose series feels the saddle at t = -2 and the poles at +-i.
-- The resummed value says which method it used and carries its error estimate; the plot
-- draws that estimate too, so one can see it lies above the true error.
--
-- Parameters (as a module): M.analyse{integral =, x = {values}, plain = N, resum = true |
-- "borel" | "hyper"} -> rows, text; M.plot(panels, {title =}) -> SVG text, panels =
-- {{name =, rows =}, ...}; M.cases() -> the three integrals with their x values;
-- M.run{file =} -> the panels and the SVG file written. Swap in your own integrals.
-- Run: lua5.4 recipes/beyond_optimal.lua [file.svg]
-- (default file: $TMPDIR/steep-beyond-optimal.svg, /tmp without TMPDIR)
--
-- Caution: asymptotic approximations with error estimates, not guarantees; check them
-- against quadrature (the table does) before a result informs any engineering,
-- financial or safety decision.

local steep = require "steep"
steep.require_version("0.1")

local M = {}
local format = string.format

local t, s, x = steep.var "t", steep.var "s", steep.param "x"

--- M.cases() -> list of {name, integral, x = {values, falling}, plain = terms}
function M.cases()
  return {
    { name = "e^x E1(x)", plain = 4, x = { 10, 8, 6, 5, 4, 3, 2.5, 2 },
      integral = steep.integral { var = t, exponent = -x * t, amplitude = 1 / (1 + t),
        contour = steep.line(0, steep.inf(0)), large = x } },
    { name = "Gamma(x)/x^x", plain = 4, x = { 6, 5, 4, 3, 2.5, 2, 1.5, 1 },
      integral = steep.integral { var = s, exponent = x * (steep.log(s) - s),
        contour = steep.line(0, steep.inf(0)), large = x } },
    { name = "relaxation response", plain = 4, x = { 12, 10, 8, 6, 5, 4, 3, 2 },
      integral = steep.integral { var = t, exponent = -x * (t + t ^ 2 / 4),
        amplitude = 1 / (1 + t ^ 2), contour = steep.line(0, steep.inf(0)), large = x } },
  }
end

--- M.analyse{integral =, x = {values}, plain = N, resum = true} -> rows, text
-- rows: {x, quad, quad_error (relative), plain, optimal, resummed (relative errors),
-- estimate (the resummed value's relative error estimate), method, level}
function M.analyse(spec)
  local J = spec.integral
  local name = J.large.name
  local rows = {}
  local lines = { format("%-6s %-24s %-10s %-10s %-10s %-10s %-10s %s", name, "quadrature",
    "quad.err", format("%d terms", spec.plain or 4), "optimal", "resummed", "estimate",
    "method") }
  for _, xv in ipairs(spec.x) do
    local p = { [name] = xv }
    local q, qe = J:quad(p)
    local scale = q:abs()
    local function rel(v) return (v - q):abs() / scale end
    p.order = spec.plain or 4
    local plain = J:expand(p)
    p.order = "optimal"
    local optimal = J:expand(p)
    p.resum = spec.resum == nil and true or spec.resum
    local r = J:expand(p)
    local row = { x = xv, quad = q, quad_error = qe / scale, plain = rel(plain.value),
      optimal = rel(optimal.value), resummed = rel(r.value), estimate = r.error / scale,
      method = r.resum.method, level = r.resum.level }
    rows[#rows + 1] = row
    lines[#lines + 1] = format("%-6g %-24.16g %-10.2g %-10.2g %-10.2g %-10.2g %-10.2g %s", xv,
      q:re(), row.quad_error, row.plain, row.optimal, row.resummed, row.estimate, row.method)
  end
  return rows, table.concat(lines, "\n")
end

---------------------------------------------------------------------------------------
-- A small SVG writer: one panel per integral, error against x on a log scale.
---------------------------------------------------------------------------------------

local W, HT, PAD = 330, 270, 52      -- panel size and inner margin (pixels)
local YMIN, YMAX = -17, 1            -- log10 of the error axis
local CURVES = {
  { key = "plain", label = "fixed terms", colour = "#8a8a8a", dash = "6 4" },
  { key = "optimal", label = "optimal truncation", colour = "#c76b1a" },
  { key = "resummed", label = "resummed", colour = "#1b7f79" },
  { key = "estimate", label = "its error estimate", colour = "#1b7f79", dash = "2 3", thin = true },
}

local function esc(text)
  return (text:gsub("&", "&amp;"):gsub("<", "&lt;"):gsub(">", "&gt;"))
end

local function log10(v)
  if not (v > 0) then return YMIN end     -- exact (or below the double's reach)
  return math.max(YMIN, math.min(YMAX, math.log(v, 10)))
end

local function panel(out, p, ox, oy)
  local rows = p.rows
  local xlo, xhi = math.huge, -math.huge
  for _, r in ipairs(rows) do xlo, xhi = math.min(xlo, r.x), math.max(xhi, r.x) end
  if xhi == xlo then xhi = xlo + 1 end
  local function px(v) return ox + PAD + (v - xlo) / (xhi - xlo) * (W - PAD - 12) end
  local function py(v) return oy + 28 + (YMAX - log10(v)) / (YMAX - YMIN) * (HT - 28 - PAD + 10) end
  local left, right, top, bottom = ox + PAD, ox + W - 12, oy + 28, py(10 ^ YMIN)
  out[#out + 1] = format('<rect x="%.1f" y="%.1f" width="%.1f" height="%.1f" fill="#fbfaf7" '
    .. 'stroke="#555" stroke-width="0.8"/>', left, top, right - left, bottom - top)
  out[#out + 1] = format('<text x="%.1f" y="%.1f" font-size="13" text-anchor="middle">%s</text>',
    (left + right) / 2, oy + 18, esc(p.name))
  -- decades on the error axis, every other one labelled
  for d = YMIN + 1, YMAX, 2 do
    local y = py(10 ^ d)
    out[#out + 1] = format('<line x1="%.1f" y1="%.1f" x2="%.1f" y2="%.1f" stroke="#ddd" '
      .. 'stroke-width="0.6"/>', left, y, right, y)
    out[#out + 1] = format('<text x="%.1f" y="%.1f" font-size="10" text-anchor="end">1e%d</text>',
      left - 4, y + 3, d)
  end
  -- the x values themselves as ticks
  for _, r in ipairs(rows) do
    out[#out + 1] = format('<line x1="%.1f" y1="%.1f" x2="%.1f" y2="%.1f" stroke="#555"/>',
      px(r.x), bottom, px(r.x), bottom + 4)
    out[#out + 1] = format('<text x="%.1f" y="%.1f" font-size="10" text-anchor="middle">%g</text>',
      px(r.x), bottom + 15, r.x)
  end
  out[#out + 1] = format('<text x="%.1f" y="%.1f" font-size="11" text-anchor="middle">x</text>',
    (left + right) / 2, bottom + 30)
  -- the curves, in order of x
  local sorted = {}
  for i, r in ipairs(rows) do sorted[i] = r end
  table.sort(sorted, function(a, b) return a.x < b.x end)
  for _, c in ipairs(CURVES) do
    local pts = {}
    for _, r in ipairs(sorted) do pts[#pts + 1] = format("%.1f,%.1f", px(r.x), py(r[c.key])) end
    out[#out + 1] = format('<polyline points="%s" fill="none" stroke="%s" stroke-width="%s"%s/>',
      table.concat(pts, " "), c.colour, c.thin and "1" or "1.8",
      c.dash and format(' stroke-dasharray="%s"', c.dash) or "")
    if not c.thin then
      for _, r in ipairs(sorted) do
        out[#out + 1] = format('<circle cx="%.1f" cy="%.1f" r="2.4" fill="%s"/>', px(r.x),
          py(r[c.key]), c.colour)
      end
    end
  end
end

--- M.plot(panels, {title =}) -> SVG text: the panels side by side, a legend below.
function M.plot(panels, opts)
  opts = opts or {}
  local width, height = W * #panels + 20, HT + 70
  local out = { format('<svg xmlns="http://www.w3.org/2000/svg" width="%d" height="%d" '
    .. 'viewBox="0 0 %d %d" font-family="sans-serif">', width, height, width, height),
    format('<rect width="%d" height="%d" fill="white"/>', width, height),
    format('<text x="%d" y="18" font-size="14" text-anchor="middle">%s</text>', width // 2,
      esc(opts.title or "relative error against quadrature")) }
  for i, p in ipairs(panels) do panel(out, p, 10 + (i - 1) * W, 22) end
  local lx, ly = 20, height - 18
  for _, c in ipairs(CURVES) do
    out[#out + 1] = format('<line x1="%d" y1="%d" x2="%d" y2="%d" stroke="%s" stroke-width="%s"%s/>',
      lx, ly, lx + 28, ly, c.colour, c.thin and "1" or "1.8",
      c.dash and format(' stroke-dasharray="%s"', c.dash) or "")
    out[#out + 1] = format('<text x="%d" y="%d" font-size="11">%s</text>', lx + 34, ly + 4,
      esc(c.label))
    lx = lx + 48 + 7 * #c.label
  end
  out[#out + 1] = format('<text x="%d" y="%d" font-size="10" text-anchor="end">errors below '
    .. '1e%d are drawn at 1e%d</text>', width - 10, height - 14, YMIN, YMIN)
  out[#out + 1] = "</svg>"
  return table.concat(out, "\n") .. "\n"
end

--- M.run{file =, cases =} -> panels, file: every case analysed, its table printed, the
-- plot written.
function M.run(opts)
  opts = opts or {}
  local panels = {}
  for _, c in ipairs(opts.cases or M.cases()) do
    local rows, text = M.analyse { integral = c.integral, x = c.x, plain = c.plain,
      resum = opts.resum }
    panels[#panels + 1] = { name = c.name, rows = rows }
    print("== " .. c.name .. " (relative errors against quadrature)")
    print(text)
    print()
  end
  local file = opts.file
  if file then
    local f = assert(io.open(file, "w"))
    assert(f:write(M.plot(panels, { title = "relative error against quadrature as x falls" })))
    assert(f:close())
    print("plot written to " .. file)
  end
  return panels, file
end

if arg and arg[0] and arg[0]:match("beyond_optimal%.lua$") then
  local file = arg[1] or ((os.getenv("TMPDIR") or "/tmp") .. "/steep-beyond-optimal.svg")
  M.run { file = file }
  print("caution: approximations with error estimates; check them (the table does) before "
    .. "they inform any engineering, financial or safety decision")
end

return M
