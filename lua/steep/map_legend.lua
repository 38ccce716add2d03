-- steep.map_legend — the map's legend (symbols in two columns), the colour bar with its
-- scale, the notes on the deformation, and the title lines.

local style = require "steep.map_style"
local draw = require "steep.map_draw"

local format, concat = string.format, table.concat
local abs, floor, ceil = math.abs, math.floor, math.ceil
local min, max = math.min, math.max
local FONT, BANDS, STYLE, esc, num = style.FONT, style.BANDS, style.STYLE, style.esc, style.num
local cnum, nice_step, tick_label, wrap = style.cnum, style.nice_step, style.tick_label, style.wrap
local expr_text, contour_text = style.expr_text, style.contour_text
local arrowhead, marker = draw.arrowhead, draw.marker

local M = {}

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
  if ctx.shade == "modulus" and ctx.present.pole then
    entry(function(x, y)
      return format('<circle cx="%.1f" cy="%.1f" r="8" fill="%s" fill-opacity="0.9"/>', x + 17, y,
        ctx.palette[BANDS - 1])
    end, "|g e^F| \u{2192} \u{221e} at a pole (top of the scale)")
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

  -- the colour bar, coloured as the map is: linear in the value, or (a symmetric-log
  -- scale) linear in the ramp position, its ticks at round values placed by it
  local lo, hi, pivot = ctx.lo, ctx.hi, ctx.pivot
  local CY, CH = LY + rows * 21 + 14, 12
  local symlog = ctx.symlog
  local function xpos(v)
    if symlog then return X0 + ctx.unit(v) * P end
    return X0 + (v - lo) / (hi - lo) * P
  end
  out(format('<g id="colourbar" font-family="%s" font-size="11" fill="%s">', FONT, STYLE.text))
  out('<g shape-rendering="crispEdges">')
  local nb = 160
  for b = 0, nb - 1 do
    local u = symlog and (b + 0.5) / nb or ctx.unit(lo + (hi - lo) * (b + 0.5) / nb)
    out(format('<rect x="%.2f" y="%.1f" width="%.2f" height="%d" fill="%s"/>', X0 + P * b / nb,
      CY, P / nb + 0.05, CH, ctx.palette[min(BANDS - 1, floor(u * BANDS))]))
  end
  out("</g>")
  out(format('<rect x="%.1f" y="%.1f" width="%.1f" height="%d" fill="none" stroke="%s" '
    .. 'stroke-width="0.8"/>', X0, CY, P, CH, STYLE.frame))
  -- ticks whose labels do not overlap (about 0.62 font px a character, 8 px apart)
  local ticks = {}
  if symlog then
    -- round values by preference (0, the powers of ten, then 2 and 5 times them), each
    -- kept where its label clears those kept before
    local spans = {}
    for _, v in ipairs(style.symlog_values(lo, hi, ctx.unit, 0)) do
      local text = (math.abs(v) < 1e6 and v == math.floor(v)) and format("%d", v) or num(v, 3)
      text = text:gsub("^%-", "\u{2212}")
      local x, half = xpos(v), 0.5 * (0.62 * 11 * utf8.len(text)) + 4
      local ok = x - half >= X0 - 20 and x + half <= X0 + P + 20
      for _, sp in ipairs(spans) do if x + half > sp[1] and x - half < sp[2] then ok = false end end
      if ok then spans[#spans + 1] = { x - half, x + half }; ticks[#ticks + 1] = { x, text } end
    end
  else
    local vals, cstep = style.fitting_ticks(lo, hi, 8, P, 11)
    for _, v in ipairs(vals) do ticks[#ticks + 1] = { xpos(v), tick_label(v, cstep) } end
  end
  local cticks = {}
  for _, t in ipairs(ticks) do
    cticks[#cticks + 1] = format("M%.1f %.1fv4", t[1], CY + CH)
    out(format('<text class="colour-tick" x="%.1f" y="%.1f" text-anchor="middle">%s</text>',
      t[1], CY + CH + 15, t[2]))
  end
  local px = xpos(pivot)
  out(format('<path d="%sM%.1f %.1fv%d" stroke="%s" stroke-width="1" fill="none"/>',
    concat(cticks), px, CY - 4, CH + 4, STYLE.saddle_level))
  out(format('<path d="M%.1f %.1fl-4 -6h8Z" fill="%s"/>', px, CY - 1, STYLE.saddle_level))
  local var = ctx.var
  local quantity = ctx.shade == "exponent" and ("Re F(" .. var .. ")")
    or ("log |g(" .. var .. ") e^F(" .. var .. ")|")
  local scale = symlog and format(" on a symmetric-log scale (linear within %s of the pale "
    .. "middle, logarithmic beyond)", num(symlog, 3)) or ""
  local caption = wrap(format("shading: %s%s, clipped to [%s, %s]; pale middle (\u{25be}) at "
    .. "the level of %s", quantity, scale, num(lo, 3), num(hi, 3),
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
        local who = piece.kind == "saddle" and ("S" .. piece.index)
          or piece.kind == "link" and ("link from " .. piece.ends[1])
          or ("end " .. cnum(piece.at))
        parts[#parts + 1] = format("%s%s \u{2192} %s", piece.weight > 0 and "+" or "\u{2212}",
          abs(piece.weight) > 1 and (abs(piece.weight) .. "\u{b7}" .. who) or who, piece.ends[2])
      end
    end
    for _, r in ipairs(plan.residues) do
      parts[#parts + 1] = format("%s%s2\u{3c0}i\u{b7}Res at %s", r.winding > 0 and "+" or "\u{2212}",
        abs(r.winding) > 1 and (abs(r.winding) .. "\u{b7}") or "", ctx.sing_label[r.index])
    end
    notes[#notes + 1] = "deformed contour: " .. (#parts > 0 and concat(parts, ", ") or "empty")
  else
    -- one short line here; the reasons in full are in the summary (decomposition_notes)
    -- and in J:expand's error message
    notes[#notes + 1] = "deformed contour not drawn: the contour could not be decomposed ("
      .. plan.status .. "); the summary's decomposition_notes and J:expand say why"
  end
  for _, n in ipairs(ctx.notes or {}) do notes[#notes + 1] = "note: " .. n end
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

M.draw_legend, M.title_lines = draw_legend, title_lines

return M
