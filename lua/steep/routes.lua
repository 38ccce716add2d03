-- steep.routes — the two routes to the asymptotics of an integral whose exponent is not
-- homogeneous in the large parameter: directly (saddles followed as the parameter moves)
-- and after rescaling the integration variable, with the check that makes the second
-- route safe: does a singularity cross the contour as the parameter moves?
--
-- J:rescale, J:suggest_rescaling, J:crossings, J:compare and J:sweep live here.

local core = require "steep.core"
local complex = require "steep.complex"
local expr = require "steep.expr"
local contour_m = require "steep.contour"
local landscape = require "steep.landscape"

local cnew, cparts = complex.new, complex.parts
local cabs, carg, expi = landscape.cabs, landscape.carg, landscape.expi
local format, pi, abs, log, huge = string.format, math.pi, math.abs, math.log, math.huge

local M = {}

local function copy(t)
  local o = {}
  for k, v in pairs(t or {}) do o[k] = v end
  return o
end

local function is_real(v)
  local _, im = cparts(v)
  return im == 0
end

local function fmtv(v)
  local re, im = cparts(v)
  if im == 0 then return format("%.6g", re) end
  return format("%.6g%+.6gi", re, im)
end

--- An optional time budget in seconds (CPU time, os.clock) for long analyses.
function M.check_budget(b, fname)
  if b == nil then return nil end
  if type(b) ~= "number" or not (b > 0) or b ~= b then
    error(format("%s: option 'budget' must be a positive number of seconds, got %s", fname,
      tostring(b)), 3)
  end
  return b
end

---------------------------------------------------------------------------------------
-- Rescaling.
---------------------------------------------------------------------------------------

-- Maps a contour through s = (t - d)/c (an affine map; arg c turns the directions at
-- infinity, and a negative c reverses the order in which the ends are met, which is the
-- orientation being followed).
local function map_contour(C, c, d)
  local pieces = {}
  local turn = carg(c)
  local function pt(z) return (z - d) / c end
  for _, p in ipairs(C.pieces) do
    if p.kind == "segment" then
      pieces[#pieces + 1] = { kind = "segment", a = pt(p.a), b = pt(p.b) }
    elseif p.kind == "ray_out" then
      pieces[#pieces + 1] = { kind = "ray_out", a = pt(p.a),
        angle = contour_m.norm_angle(p.angle - turn) }
    elseif p.kind == "ray_in" then
      pieces[#pieces + 1] = { kind = "ray_in", b = pt(p.b),
        angle = contour_m.norm_angle(p.angle - turn) }
    else
      pieces[#pieces + 1] = { kind = "arc", center = pt(p.center), radius = p.radius / cabs(c),
        from = p.from - turn, to = p.to - turn }
    end
  end
  return contour_m.new(pieces, C.closed)
end

-- Parameter values as a table (by name) with the large parameter set to v.
local function with_large(J, params, v)
  local p = copy(params)
  p[J.large.name] = v
  return p
end

--- J:rescale{var = s, t = <expression in s and parameters>, at = {<params>}}
-- -> K, the same integral in s: exponent F(t(s)), amplitude g(t(s)) t'(s), and the
-- contour mapped at the parameter values `at` (held there: that is the contour a
-- rescaled formula derived at those values assumes). K.rescaling describes the map and
-- K.homogeneity says whether K's exponent is P(x) psi(s).
function M.rescale(J, opts)
  if type(opts) ~= "table" then error("bad argument #1 to 'rescale' (options table expected)", 2) end
  for k in pairs(opts) do
    if k ~= "var" and k ~= "t" and k ~= "at" then
      error(format("rescale: unknown option '%s' (options: var, t, at)", tostring(k)), 2)
    end
  end
  local s, T = opts.var, opts.t
  if not (expr.is(s) and s.op == "var") then
    error("rescale: option 'var' must be a new variable made by steep.var", 2)
  end
  if s == J.var then error("rescale: the new variable must differ from " .. J.var.name, 2) end
  if not (expr.is(T) and T:depends_on(s)) then
    error("rescale: option 't' must be an expression in " .. s.name .. " (t = x^a * s, ...)", 2)
  end
  -- every symbol of t must be s or a parameter: a variable other than s is unknown here
  -- (a parameter not yet in J is fine: it is bound at evaluation), even one that shares
  -- its name with a parameter
  for _, name in ipairs(T:symbols()) do
    if name ~= s.name and T:depends_on(expr.symbol("var", name)) then
      error(format("rescale: the substitution names the variable '%s', which is neither "
        .. "the new variable %s nor a parameter", name, s.name), 2)
    end
  end
  local at = opts.at or {}
  local dT = expr.diff(T, s)
  local Fs = expr.substitute(J.exponent, { [J.var] = T })
  local gs = expr.substitute(expr.lift(J.amplitude), { [J.var] = T }) * dT
  -- affine in s? t'' = 0 at a few points
  local d2 = expr.diff(dT, s)
  local pts = { cnew(0.3, 0.2), cnew(-1.1, 0.5), cnew(2.3, -0.7) }
  local function val(e, sv)
    local b = copy(at)
    b[s.name] = sv
    local ok, v = pcall(e.value, expr.lift(e), b)
    if not ok then
      error("rescale: cannot evaluate the substitution at the holding values ("
        .. tostring(v):gsub("^[^\n]-:%d+: ", "") .. "); give them with at = {...}", 3)
    end
    return v
  end
  for _, z in ipairs(pts) do
    if cabs(val(d2, z)) > 1e-12 * (1 + cabs(val(dT, z))) then
      error("rescale: the substitution is not affine in " .. s.name .. " (t = c*s + d): "
        .. "its contour cannot be mapped", 2)
    end
  end
  local c = val(dT, cnew(0, 0))
  local d = val(T, cnew(0, 0))
  if cabs(c) == 0 or cabs(c) ~= cabs(c) or cabs(c) == huge then
    local ps = {}
    for k, v in pairs(at) do ps[#ps + 1] = k .. " = " .. tostring(v) end
    error(format("rescale: the substitution t = %s is not invertible at %s (dt/d%s = %s)",
      tostring(T), table.concat(ps, ", "), s.name, tostring(c)), 2)
  end
  local K = require("steep.integral").new {
    var = s, exponent = Fs, amplitude = gs, contour = map_contour(J.contour, c, d),
    large = J.large }
  K.rescaling = { from = J, t = T, var = s, at = copy(at), factor = dT, shift = T - dT * s }
  K.homogeneity = M.homogeneity(K, at)
  return K
end

--- Is the exponent P(x) psi(s) with psi free of x? Tested numerically over several x
-- (around the holding value) and s; the power p of P = (x/x0)^p is fitted. Also the
-- amplitude's power q (g(s; x) = (x/x0)^q g(s; x0)), so that a series in the standard
-- form has coefficients fixed once for all x.
function M.homogeneity(K, at)
  if not K.large then return { ok = false, why = "no large parameter" } end
  local x = K.large.name
  local x0 = at[x] or 1
  local r0, i0 = cparts(x0)
  if i0 ~= 0 or r0 == 0 then return { ok = false, why = "hold at a real non-zero " .. x } end
  local svals = { cnew(0.37, 0.11), cnew(-0.6, 0.3), cnew(1.4, -0.25), cnew(0.05, 0.9) }
  local xs = { r0 * 1.5, r0 * 2.7, r0 * 5.3 }
  local function eval(xv, sv)
    local p = copy(at)
    p[x] = xv
    for _, name in ipairs(K.params) do if p[name] == nil then return nil end end
    local ok, F, g = pcall(K.tape.eval, K.tape, sv, p)
    if not ok then return nil end
    return F, g
  end
  local base, gbase = {}, {}
  for i, sv in ipairs(svals) do base[i], gbase[i] = eval(x0, sv) end
  if not base[1] then return { ok = false, why = "cannot evaluate at the holding values" } end
  local powers, gpowers = {}, {}
  for _, xv in ipairs(xs) do
    local P = nil
    local Q = nil
    for i, sv in ipairs(svals) do
      local F, g = eval(xv, sv)
      if not F or cabs(base[i]) == 0 then return { ok = false, why = "evaluation failed" } end
      local ratio = F / base[i]
      P = P or ratio
      if cabs(ratio - P) > 1e-9 * cabs(P) then
        return { ok = false, why = format("the exponent is not P(%s)*psi(%s): the ratio "
          .. "F(%s; %s)/F(%s; %s) varies with %s", x, K.var.name, K.var.name, fmtv(xv),
          K.var.name, fmtv(x0), K.var.name) }
      end
      if g and gbase[i] and cabs(gbase[i]) > 0 then
        local gr = g / gbase[i]
        Q = Q or gr
        if cabs(gr - Q) > 1e-9 * cabs(Q) then Q = false end
      end
    end
    powers[#powers + 1] = log(cabs(P)) / log(abs(xv / r0))
    gpowers[#gpowers + 1] = Q and log(cabs(Q)) / log(abs(xv / r0)) or nil
  end
  local p = powers[1]
  for _, v in ipairs(powers) do
    if abs(v - p) > 1e-6 * (1 + abs(p)) then
      return { ok = false, why = "P(" .. x .. ") is not a power of " .. x }
    end
  end
  local q = gpowers[1]
  if q then
    for _, v in ipairs(gpowers) do if abs(v - q) > 1e-6 * (1 + abs(q)) then q = nil end end
  end
  return { ok = true, power = p, amplitude_power = q, at = x0,
    psi = "F(" .. K.var.name .. "; " .. x .. " = " .. fmtv(x0) .. ") / " .. fmtv(r0 ^ p),
    text = format("homogeneous: F = (%s/%s)^%.6g * psi(%s)%s", x, fmtv(x0), p, K.var.name,
      q and format(", amplitude ~ (%s/%s)^%.6g", x, fmtv(x0), q) or
      ", amplitude not a power of " .. x) }
end

---------------------------------------------------------------------------------------
-- Following the landscape along a path of parameter values.
---------------------------------------------------------------------------------------

-- Parameter path: a list of values from {from =, to =, steps =}, a list, or a
-- steep.path in the complex parameter plane (sampled evenly along its polyline).
function M.parameter_values(spec, fname)
  if contour_m.is(spec) then
    local pts = spec:sample { radius = 1, n = 24 }
    return pts
  end
  if type(spec) ~= "table" then
    error(fname .. ": give the large parameter as {from =, to =, steps =}, a list, or "
      .. "a steep.path of values", 3)
  end
  if spec.from ~= nil or spec.to ~= nil then
    local a, b, n = spec.from, spec.to, spec.steps or 50
    if not (cparts(a) and cparts(b)) then error(fname .. ": 'from' and 'to' must be numbers", 3) end
    if type(n) ~= "number" or n < 1 or n ~= math.floor(n) or n > 1e6 then
      error(fname .. ": 'steps' must be a whole number from 1 to 10^6", 3)
    end
    local out = {}
    for k = 0, n do out[#out + 1] = a + (b - a) * (k / n) end
    return out
  end
  if #spec == 0 then error(fname .. ": the list of parameter values is empty", 3) end
  for i, v in ipairs(spec) do
    local re, im = cparts(v)
    if not re or re ~= re or im ~= im or abs(re) == huge or abs(im) == huge then
      error(format("%s: parameter value %d is not a finite number", fname, i), 3)
    end
  end
  return spec
end

-- Which side of the held contour z lies on: 1 left (inside the contour closed by a
-- counter-clockwise arc at large radius from its end back to its start), 0 right.
local function side_of(poly, closed, z, Rfar)
  local w
  if closed then
    w = core.turning(poly, z)
  else
    local pts = {}
    for _, p in ipairs(poly) do pts[#pts + 1] = p end
    local th0 = carg(poly[#poly])
    local th1 = carg(poly[1])
    while th1 <= th0 do th1 = th1 + 2 * pi end
    for k = 0, 64 do pts[#pts + 1] = Rfar * expi(th0 + (th1 - th0) * k / 64) end
    pts[#pts + 1] = poly[1]
    w = core.turning(pts, z)
  end
  if w == nil then return nil end
  return math.floor(w + 0.5) ~= 0 and 1 or 0
end

--- J:crossings{x = {from =, to =, steps =} | list | steep.path{...}, <other params>}
-- -> {events = {...}, track = {...}, report = function}. Follows the singularities and
-- saddles of J (with its contour held fixed) along the parameter path.
local function need_table(opts, fname)
  if type(opts) ~= "table" then
    error(format("bad argument #1 to '%s' (options table expected, got %s)", fname,
      type(opts)), 3)
  end
end

function M.crossings(J, opts)
  need_table(opts, "crossings")
  if not J.large then error("crossings: the integral names no large parameter", 2) end
  local x = J.large.name
  local values = M.parameter_values(opts[x], "crossings")
  local rest = copy(opts)
  rest[x] = values[1]
  local params, o = require("steep.integral").split_options(J, rest, { region = true }, "crossings")
  if o.region then o.region = require("steep.integral").check_region(o.region, "crossings", J) end
  local poly0 = J.contour:sample { radius = 50, n = 32 }
  local scale = 1
  for _, z in ipairs(J.contour:finite_points()) do scale = math.max(scale, cabs(z)) end
  local Rbig = 1e3 * scale          -- beyond this a singularity counts as gone to infinity
  local region = { center = cnew(0, 0), radius = 20 * scale }
  local poly = J.contour:sample { radius = 40 * scale, n = 64 }
  local events, track = {}, {}
  local prev_sing, prev_saddles, prev_valleys = nil, nil, nil
  local factor = J.rescaling and J.rescaling.factor
  local prev_factor
  local function add_event(e) events[#events + 1] = e end
  for step, v in ipairs(values) do
    local p = with_large(J, params, v)
    local ok, L = pcall(J._landscape, J, p, o.region or region, false)
    if not ok then
      add_event({ kind = "failure", at = v, text = format("at %s = %s the landscape could not "
        .. "be mapped: %s", x, fmtv(v), tostring(L)) })
      goto continue
    end
    -- the rescaling's own singular points: where dt/ds passes through zero
    if factor then
      local f = factor:value(setmetatable({ [J.var.name] = 0 }, { __index = p }))
      if prev_factor and (cabs(f) < 1e-12 or
          (is_real(f) and is_real(prev_factor) and cparts(f) * cparts(prev_factor) < 0)) then
        add_event({ kind = "rescaling", at = v, text = format("between %s = %s and %s the "
          .. "rescaling's factor dt/d%s passes through zero (%s -> %s): the rescaling is "
          .. "singular there and everything in %s moves through infinity",
          x, fmtv(values[step - 1]), fmtv(v), J.var.name, fmtv(prev_factor), fmtv(f), J.var.name) })
      end
      prev_factor = f
    end
    -- singularities: match to the previous step's by nearest position and kind
    local cur = {}
    for _, s in ipairs(L.singularities) do
      cur[#cur + 1] = { at = s.at, kind = s.kind, residue = s.residue, source = s.source,
        residue_error = s.residue_error,
        side = side_of(poly, J.contour.closed, s.at, 1e4 * scale) }
    end
    if prev_sing then
      local used = {}
      for _, ps in ipairs(prev_sing) do
        local best, bi = huge, nil
        for i, cs in ipairs(cur) do
          if not used[i] and cs.source == ps.source then
            local d = cabs(cs.at - ps.at)
            if d < best then best, bi = d, i end
          end
        end
        if bi then
          used[bi] = true
          local cs = cur[bi]
          cs.id = ps.id
          if ps.side ~= nil and cs.side ~= nil and ps.side ~= cs.side then
            -- crossed between the steps: through the contour, or round through infinity
            local n = core.crossings(poly, { ps.at, cs.at })
            local via = (n == 0) and " (round through infinity)" or ""
            local before = ps.side == 1 and "left" or "right"
            local after = cs.side == 1 and "left" or "right"
            local term, words
            if cs.kind == "pole" and cs.residue then
              -- the integral over the held contour changes by -2 pi i Res when the pole
              -- goes from its left (inside the contour closed counter-clockwise) to its
              -- right, +2 pi i Res the other way: a formula derived before the crossing
              -- needs this term added to stay equal to the held-contour integral
              local sign = (ps.side == 1) and -1 or 1
              term = cnew(0, 2 * pi * sign) * cs.residue
              words = format("a formula derived at %s = %s needs %s2*pi*i*Res = %s added "
                .. "(Res = %s here), or the contour must be bent round the pole with a %s "
                .. "loop to keep it on its original side", x, fmtv(values[1]),
                sign > 0 and "+" or "-", fmtv(term), fmtv(cs.residue),
                sign > 0 and "clockwise" or "counter-clockwise")
            else
              words = "a " .. cs.kind .. " point cannot be crossed: the held contour is no "
                .. "longer equivalent; bend it to keep the point on its original side"
            end
            add_event({ kind = "side change", at = v, from_at = values[step - 1],
              singularity = cs.source, position = cs.at, term = term, before = before,
              after = after, id = cs.id,
              text = format("between %s = %s and %s the %s at %s (%s) moved from the %s of the "
                .. "contour to its %s%s; %s", x, fmtv(values[step - 1]), fmtv(v), cs.kind,
                fmtv(cs.at), cs.source, before, after, via, words) })
          end
        else
          add_event({ kind = "lost", at = v, text = format("at %s = %s the %s (%s) last seen at "
            .. "%s left the region (towards infinity?)", x, fmtv(v), ps.kind, ps.source,
            fmtv(ps.at)), id = ps.id, side = ps.side })
          ps.lost = true
        end
      end
      for i, cs in ipairs(cur) do
        if not cs.id then
          -- the most recently lost singularity of the same source returns
          for k = #events, 1, -1 do
            local e = events[k]
            if e.kind == "lost" and not e.returned and e.text:find(cs.source, 1, true) then
              cs.id = e.id
              break
            end
          end
          cs.id = cs.id or (1000 + step * 100 + i)
          -- back from infinity: compare with the side it had when it was lost
          for k = #events, 1, -1 do
            local e = events[k]
            if e.kind == "lost" and not e.returned and e.id == cs.id and e.side ~= nil
                and cs.side ~= nil and e.side ~= cs.side then
              e.returned = true
              add_event({ kind = "side change", at = v, singularity = cs.source,
                position = cs.at, via_infinity = true, id = cs.id, before = e.side == 1 and "left" or "right",
                after = cs.side == 1 and "left" or "right",
                term = cs.kind == "pole" and cs.residue and
                  cnew(0, 2 * pi * (e.side == 1 and -1 or 1)) * cs.residue or nil,
                text = format("at %s = %s the %s (%s) came back from infinity at %s on the "
                  .. "other side of the contour (%s before, %s now)", x, fmtv(v), cs.kind,
                  cs.source, fmtv(cs.at), e.side == 1 and "left" or "right",
                  cs.side == 1 and "left" or "right") })
              break
            end
          end
        end
      end
    else
      for i, cs in ipairs(cur) do cs.id = i end
    end
    prev_sing = cur
    -- saddles: coalescence (F'' small on the saddle's own scale) and Stokes lines
    local sad = L.saddles
    for i = 1, #sad do
      for j = i + 1, #sad do
        local d = cabs(sad[i].at - sad[j].at)
        local width = 1 / math.sqrt(math.max(cabs(sad[i].F2), 1e-300))
        if d < 2 * width then
          add_event({ kind = "coalescence", at = v, text = format("at %s = %s saddles %s and %s "
            .. "are %.3g apart, within %.3g saddle widths: plain expansions fail there "
            .. "(coalescing saddles)", x, fmtv(v), fmtv(sad[i].at), fmtv(sad[j].at), d, d / width) })
        end
      end
      if sad[i].order > 2 then
        add_event({ kind = "coalescence", at = v, text = format("at %s = %s the saddle at %s "
          .. "has order %d (saddles merged)", x, fmtv(v), fmtv(sad[i].at), sad[i].order) })
      end
    end
    if prev_saddles and #prev_saddles == #sad then
      for i = 1, #sad do
        for j = i + 1, #sad do
          local a = select(2, cparts(prev_saddles[i].F - prev_saddles[j].F))
          local b = select(2, cparts(sad[i].F - sad[j].F))
          if a * b < 0 then
            add_event({ kind = "stokes", at = v, text = format("between %s = %s and %s, Im F "
              .. "of saddles %d and %d became equal: a Stokes line (where the subdominant "
              .. "saddle may switch on or off) was crossed", x, fmtv(values[step - 1]),
              fmtv(v), i, j) })
          end
        end
      end
    end
    prev_saddles = sad
    -- contour ends and their valleys
    if not J.contour.closed then
      for _, which in ipairs({ "start", "finish" }) do
        local e = J.contour[which](J.contour)
        if contour_m.is_inf(e) then
          local k = landscape.valley_of(L.valleys, e.angle)
          if not k then
            add_event({ kind = "end", at = v, text = format("at %s = %s the contour's %s end "
              .. "(direction %.4g) is in no valley: the integral diverges there unless the "
              .. "end is turned", x, fmtv(v), which, e.angle) })
          end
        end
      end
    end
    track[#track + 1] = { x = v, singularities = cur, saddles = sad }
    ::continue::
  end
  local out = { events = events, track = track, large = x, values = values, integral = J }
  return setmetatable(out, { __index = { report = M.crossings_report } })
end

function M.crossings_report(c, opts)
  local other = require("steep.report").format(opts, { events = c.events, large = c.large,
    values = c.values }, c.events, { "kind", "at", "position", "term", "before", "after", "text" })
  if other then return other end
  local lines = { format("crossing check of %s along %s = %s .. %s (%d values)",
    tostring(c.integral), c.large, fmtv(c.values[1]), fmtv(c.values[#c.values]), #c.values) }
  if #c.events == 0 then
    lines[#lines + 1] = "no events: no singularity changed side of the contour, no saddles "
      .. "merged, no Stokes line was crossed"
  end
  for i, e in ipairs(c.events) do lines[#lines + 1] = format("%d. [%s] %s", i, e.kind, e.text) end
  return table.concat(lines, "\n")
end

--- J:suggest_rescaling{x = {from =, to =}, <other params>} -> proposal
-- Follows each saddle over values of the large parameter spaced geometrically between
-- from and to (same sign), fits |t0(x)| ~ x^a by least squares, and proposes t = x^a s
-- (a rounded to a simple fraction when it is within 0.02 of one).
function M.suggest(J, opts)
  need_table(opts, "suggest_rescaling")
  if not J.large then error("suggest_rescaling: the integral names no large parameter", 2) end
  local x = J.large.name
  local range = opts[x]
  if type(range) ~= "table" or not range.from or not range.to then
    error("suggest_rescaling: give " .. x .. " = {from =, to =}", 2)
  end
  local a, b = range.from, range.to
  if type(a) ~= "number" or type(b) ~= "number" or a * b <= 0 or a == b then
    error("suggest_rescaling: from and to must be distinct numbers of the same sign", 2)
  end
  local fixed = copy(opts)
  fixed[x] = nil
  local n = 7
  local tracks = {}
  local prev
  for k = 0, n - 1 do
    local v = a * (b / a) ^ (k / (n - 1))
    local p = copy(fixed)
    p[x] = v
    local L = J:_landscape(p, nil, false)
    local cur = {}
    for _, sd in ipairs(L.saddles) do cur[#cur + 1] = sd.at end
    if not prev then
      for i, z in ipairs(cur) do tracks[i] = { { x = v, at = z } } end
    else
      for i, tr in ipairs(tracks) do
        local last = tr[#tr].at
        local best, bz = huge, nil
        for _, z in ipairs(cur) do
          local d = cabs(z - last)
          if d < best then best, bz = d, z end
        end
        if bz then tr[#tr + 1] = { x = v, at = bz } end
      end
    end
    prev = cur
  end
  local fits = {}
  for i, tr in ipairs(tracks) do
    local sx, sy, sxx, sxy, m = 0, 0, 0, 0, 0
    for _, pt in ipairs(tr) do
      local r = cabs(pt.at)
      if r > 0 then
        local lx, ly = log(abs(pt.x)), log(r)
        sx, sy, sxx, sxy, m = sx + lx, sy + ly, sxx + lx * lx, sxy + lx * ly, m + 1
      end
    end
    if m >= 3 then
      local slope = (m * sxy - sx * sy) / (m * sxx - sx * sx)
      local resid = 0
      local icpt = (sy - slope * sx) / m
      for _, pt in ipairs(tr) do
        local r = cabs(pt.at)
        if r > 0 then resid = math.max(resid, abs(log(r) - icpt - slope * log(abs(pt.x)))) end
      end
      fits[#fits + 1] = { saddle = i, exponent = slope, spread = resid, track = tr }
    end
  end
  if #fits == 0 then return { text = "no saddle could be followed over the range" } end
  table.sort(fits, function(u, v) return u.spread < v.spread end)
  local best = fits[1]
  local aexp = best.exponent
  local frac
  for q = 1, 4 do
    local pnum = math.floor(aexp * q + 0.5)
    if abs(aexp - pnum / q) < 0.02 then aexp, frac = pnum / q, format("%d/%d", pnum, q); break end
  end
  local s = expr.symbol("var", "s")
  local tsub = (expr.symbol("param", x) ^ aexp) * s
  return { exponent = aexp, fitted = best.exponent, fraction = frac, fits = fits,
    t = tsub, var = s,
    text = format("the saddles move like %s^%.4g (fitted %.4g, spread %.2g in log|t0|): "
      .. "try t = %s, i.e. J:rescale{var = steep.var \"s\", t = %s}", x, aexp,
      best.exponent, best.spread, tostring(tsub), tostring(tsub)) }
end

---------------------------------------------------------------------------------------
-- Comparison of the routes.
---------------------------------------------------------------------------------------

--- J:compare{x = {values}, order = N, rescale = {var =, t =}, <other params>}
-- Runs at each value: the unrescaled route (J:expand), the rescaled route on the contour
-- held where the values start (K:expand), the rescaled formula derived at the first
-- value (its saddles followed, the residue terms it had there kept) with the crossing
-- corrections, and quadrature; flags every disagreement beyond the error estimates with
-- the reason found.
function M.compare(J, opts)
  need_table(opts, "compare")
  if not J.large then error("compare: the integral names no large parameter", 2) end
  local x = J.large.name
  local values = M.parameter_values(opts[x], "compare")
  local order = opts.order or 4
  local resc = opts.rescale
  if type(resc) ~= "table" then error("compare: option 'rescale' = {var =, t =} is required", 2) end
  local fixed = {}
  for k, v in pairs(opts) do
    if k ~= x and k ~= "order" and k ~= "rescale" and k ~= "region" then fixed[k] = v end
  end
  local at = copy(fixed)
  at[x] = values[1]
  local K = M.rescale(J, { var = resc.var, t = resc.t, at = at })
  local cross_opts = copy(fixed)
  cross_opts[x] = values
  local cross = M.crossings(K, cross_opts)
  -- the structure of the rescaled formula at the first value
  local p0 = copy(fixed)
  p0[x] = values[1]
  p0.order = order
  local first = K:expand(p0)
  local start_poles = {}
  for _, c in ipairs(first.contributions) do
    if c.kind == "pole" then start_poles[#start_poles + 1] = { at = c.at, winding = c.weight } end
  end
  -- pole ids at the first value, by position
  local track0 = cross.track[1] and cross.track[1].singularities or {}
  for _, sp in ipairs(start_poles) do
    local best = huge
    for _, s in ipairs(track0) do
      local d = cabs(s.at - sp.at)
      if d < best then best, sp.id = d, s.id end
    end
  end
  local c0 = K.rescaling.factor:value(setmetatable({ [K.var.name] = 0 }, { __index = at }))
  local rows = {}
  for k, v in ipairs(values) do
    local p = copy(fixed)
    p[x] = v
    local row = { x = v, notes = {} }
    local q, qe = J:quad(copy(p))
    row.quad, row.quad_error = q, qe
    local po = copy(p)
    po.order = order
    local ok, u = pcall(J.expand, J, po)
    if ok then row.unrescaled, row.unrescaled_error = u.value, u.error
    else row.notes[#row.notes + 1] = "unrescaled route failed: " .. tostring(u) end
    -- track of singularities at this value
    local tr
    for _, t in ipairs(cross.track) do if t.x == v then tr = t end end
    local function residue_of(id)
      for _, s in ipairs(tr and tr.singularities or {}) do
        if s.id == id then return s.residue, s.residue_error end
      end
    end
    local ok2, kh = pcall(K.expand, K, copy(po))
    if ok2 then
      -- the formula derived at the first value: saddle terms now, plus the residue
      -- terms it had then, evaluated where those poles are now
      local saddle_part, serr = cnew(0, 0), 0
      for _, c in ipairs(kh.contributions) do
        if c.kind ~= "pole" then saddle_part, serr = saddle_part + c.value, serr + c.error end
      end
      -- residue terms per pole: the windings the formula had at the first value, and
      -- those after the crossings so far (combined per pole, so that a term and its
      -- correction cancel exactly instead of leaving rounding behind)
      local w_formula, w_now = {}, {}
      for _, sp in ipairs(start_poles) do
        if sp.id then
          w_formula[sp.id] = (w_formula[sp.id] or 0) + sp.winding
          w_now[sp.id] = (w_now[sp.id] or 0) + sp.winding
        end
      end
      for _, e in ipairs(cross.events) do
        if e.kind == "side change" and e.id and e.term then
          local idx_e, idx_v
          for i, vv in ipairs(values) do
            if vv == e.at then idx_e = i end
            if vv == v then idx_v = i end
          end
          if idx_e and idx_v and idx_e <= idx_v then
            w_now[e.id] = (w_now[e.id] or 0) + (e.before == "left" and -1 or 1)
          end
        end
      end
      local function with_residues(windings)
        local val, err = saddle_part, serr
        for id, w in pairs(windings) do
          if w ~= 0 then
            local r, re = residue_of(id)
            if r then
              val = val + cnew(0, 2 * pi * w) * r
              err = err + 2 * pi * abs(w) * (re or 0)
            else
              row.notes[#row.notes + 1] = "a pole of the formula was not found here"
            end
          end
        end
        return val, err
      end
      local formula, ferr = with_residues(w_formula)
      local corrected, cerr = with_residues(w_now)
      local corr = corrected - formula
      -- orientation: past a sign change of dt/ds the held contour runs the other way
      local cf = K.rescaling.factor:value(setmetatable({ [K.var.name] = 0 }, { __index = p }))
      local ratio = cf / c0
      local orient = (cparts(ratio) < 0) and -1 or 1
      row.rescaled, row.rescaled_error = orient * kh.value, kh.error
      row.formula = orient * formula
      row.correction = orient * corr
      row.corrected = orient * corrected
      row.formula_error = ferr
      row.corrected_error = cerr
      row.orientation = orient
    else
      row.notes[#row.notes + 1] = "rescaled route failed: " .. tostring(kh)
    end
    -- verdicts
    local scale = math.max(cabs(q), 1e-300)
    local function agrees(val, err)
      return val and cabs(val - q) <= 3 * (err or 0) + 3 * qe + 1e-12 * scale
    end
    row.unrescaled_ok = agrees(row.unrescaled, row.unrescaled_error)
    row.rescaled_ok = agrees(row.rescaled, row.rescaled_error)
    row.corrected_ok = agrees(row.corrected, row.corrected_error)
    row.formula_ok = agrees(row.formula, row.formula_error)
    if row.formula and not row.formula_ok and row.corrected_ok then
      row.notes[#row.notes + 1] = "the formula derived at the first value misses a residue "
        .. "after a crossing; with the correction it agrees"
    elseif row.corrected and not row.corrected_ok then
      row.notes[#row.notes + 1] = "the corrected rescaled formula disagrees with quadrature"
    end
    if row.unrescaled and not row.unrescaled_ok then
      row.notes[#row.notes + 1] = "the unrescaled expansion disagrees with quadrature"
    end
    rows[#rows + 1] = row
  end
  local out = { rows = rows, crossings = cross, rescaled = K, large = x, order = order,
    integral = J }
  return setmetatable(out, { __index = { report = M.compare_report } })
end

--- J:sweep{x = {list} | {from =, to =, steps =}, order = N, csv = file, shard = {k, n},
-- progress = true|false, <other params>} -> rows
-- Expansion and quadrature over the range. Each step starts from the previous step's
-- saddles and singularities (continuation: Newton from them, no search of the whole
-- region) and falls back to a full search when it finds fewer of them, or fewer saddles
-- than the argument principle counts in the region. A shard k of n takes the
-- k-th contiguous block of the values, so the CSV pieces concatenate into the whole
-- table (only shard 1 writes the header).
function M.sweep(J, opts)
  need_table(opts, "sweep")
  if not J.large then error("sweep: the integral names no large parameter", 2) end
  local x = J.large.name
  local values = M.parameter_values(opts[x], "sweep")
  -- options and the other parameters are checked once here (an unknown name or an
  -- unbound parameter would otherwise fail every row alike)
  do
    local probe = copy(opts)
    probe[x] = values[1]
    local integral_m = require("steep.integral")
    local _, o = integral_m.split_options(J, probe, { order = true, csv = true, shard = true,
      progress = true, continuation = true, region = true, budget = true }, "sweep")
    if o.region then opts = copy(opts); opts.region = integral_m.check_region(o.region, "sweep", J) end
  end
  local order = require("steep.asymptotics").check_order(opts.order or 4, "sweep")
  local shard = opts.shard
  local first, last = 1, #values
  if shard ~= nil then
    if type(shard) ~= "table" or type(shard[1]) ~= "number" or type(shard[2]) ~= "number"
        or shard[1] < 1 or shard[1] > shard[2] or shard[1] ~= math.floor(shard[1])
        or shard[2] ~= math.floor(shard[2]) then
      error("sweep: option 'shard' must be {k, n} with 1 <= k <= n", 2)
    end
    local per = #values / shard[2]
    first = math.floor((shard[1] - 1) * per) + 1
    last = math.floor(shard[1] * per)
  end
  local fixed = {}
  for k, v in pairs(opts) do
    if k ~= x and k ~= "order" and k ~= "csv" and k ~= "shard" and k ~= "progress"
        and k ~= "continuation" and k ~= "region" and k ~= "budget" then fixed[k] = v end
  end
  local progress = opts.progress
  if progress == nil then progress = core.isatty and core.isatty(2) and (last - first) > 20 end
  local continuation = opts.continuation ~= false
  local rows = {}
  local prev
  local budget = M.check_budget(opts.budget, "sweep")
  local clock0 = os.clock()
  local out_status = "complete"
  for i = first, last do
    local v = values[i]
    local p = copy(fixed)
    p[x] = v
    local row = { x = v }
    if budget and os.clock() - clock0 > budget then
      row.failure = format("not computed: the time budget of %g s was used up", budget)
      out_status = "incomplete: time budget reached"
      rows[#rows + 1] = row
      goto next_value
    end
    do
    local ok, err = pcall(function()
      local L
      row.landscape = "full search"
      if continuation and prev then
        L = J:_landscape(p, prev.region, false, { seeds = prev.saddles, fast = true,
          sing_seeds = prev.singularities, sing_radii = prev.radii })
        row.landscape = "continued"
        -- fewer saddles or singularities than before, or fewer saddles than the argument
        -- principle counts (one entering the region): search the whole region again
        local sc = L.saddle_count
        if #L.saddles < #prev.saddles or #L.singularities < #prev.singularities
            or (sc and sc.count and sc.found < sc.count) then
          L = J:_landscape(p, nil, false)
          row.landscape = "full search"
        end
      else
        L = J:_landscape(p, opts.region, false)
      end
      local r = require("steep.asymptotics").expand(J, p, { order = order, landscape = L })
      local q, qe = require("steep.integral").quad_with(J, p, L, "deformed")
      row.expansion, row.error, row.quad, row.quad_error = r.value, r.error, q, qe
      row.relative_error = cabs(r.value - q) / math.max(cabs(q), 1e-300)
      row.estimated = r.error / math.max(cabs(q), 1e-300)
      row.agrees = cabs(r.value - q) <= 3 * (r.error + qe)
      row.stokes = r.stokes
      -- which valleys the contour's ends use depends on arg x: record it
      local ends = {}
      if not J.contour.closed then
        for _, which in ipairs({ "start", "finish" }) do
          local e = J.contour[which](J.contour)
          if contour_m.is_inf(e) then
            local k = landscape.valley_of(L.valleys, e.angle)
            ends[#ends + 1] = k and landscape.describe_valley(L.valleys[k]) or "none"
          end
        end
      end
      row.valleys = table.concat(ends, " -> ")
      prev = { region = L.region, saddles = {}, singularities = {}, radii = {} }
      for _, sd in ipairs(L.saddles) do prev.saddles[#prev.saddles + 1] = sd.at end
      for k, sg in ipairs(L.singularities) do
        prev.singularities[k], prev.radii[k] = sg.at, sg.radius or false
      end
    end)
    if not ok then row.failure = tostring(err); prev = nil end
    rows[#rows + 1] = row
    if progress then
      io.stderr:write(format("\rsweep: %d/%d", i - first + 1, last - first + 1))
      if i == last then io.stderr:write("\n") end
    end
    end
    ::next_value::
  end
  local out = { rows = rows, large = x, order = order, integral = J, shard = shard,
    status = out_status }
  setmetatable(out, { __index = { report = M.sweep_report, csv = M.sweep_csv } })
  if opts.csv then
    local f, e = io.open(opts.csv, "w")
    if not f then error("sweep: cannot write " .. tostring(opts.csv) .. ": " .. tostring(e), 2) end
    f:write(out:csv(not shard or shard[1] == 1))
    f:close()
  end
  return out
end

-- A complex column is two fields (re, im), a real column one; a missing value (a failed
-- row) leaves its fields empty, so every line has as many fields as the header.
local function csv_complex(v)
  if v == nil then return "," end
  local re, im = cparts(v)
  return format("%.17g,%.17g", re, im)
end

local function csv_real(v)
  if v == nil then return "" end
  return format("%.17g", (cparts(v)))
end

-- A quoted text field: inner quotes and line breaks would split the field or the line.
local function csv_text(s)
  return '"' .. (s or ""):gsub('"', "'"):gsub("[\r\n]+", " ") .. '"'
end

function M.sweep_csv(sw, header)
  local lines = {}
  if header ~= false then
    lines[1] = sw.large .. "_re," .. sw.large .. "_im,expansion_re,expansion_im,error,"
      .. "quad_re,quad_im,quad_error,relative_error,estimated,agrees,stokes,valleys,failure"
  end
  for _, r in ipairs(sw.rows) do
    lines[#lines + 1] = table.concat({ csv_complex(r.x), csv_complex(r.expansion),
      csv_real(r.error), csv_complex(r.quad), csv_real(r.quad_error), csv_real(r.relative_error),
      csv_real(r.estimated), tostring(r.agrees), tostring(r.stokes or false),
      csv_text(r.valleys), csv_text(r.failure) }, ",")
  end
  return table.concat(lines, "\n") .. "\n"
end

function M.sweep_report(sw, opts)
  local other = require("steep.report").format(opts, sw, sw.rows,
    { "x", "expansion", "error", "quad", "quad_error", "relative_error", "estimated",
      "agrees", "stokes", "valleys", "landscape", "failure" })
  if other then return other end
  local lines = { format("sweep of %s, %d terms", tostring(sw.integral), sw.order),
    format("%-12s %-26s %-26s %-11s %-11s %s", sw.large, "expansion", "quadrature",
      "rel. error", "estimated", "") }
  for _, r in ipairs(sw.rows) do
    if r.failure then
      lines[#lines + 1] = format("%-12s failed: %s", fmtv(r.x), r.failure)
    else
      lines[#lines + 1] = format("%-12s %-26s %-26s %-11.3g %-11.3g %s", fmtv(r.x),
        fmtv(r.expansion), fmtv(r.quad), r.relative_error, r.estimated,
        (r.agrees and "" or "DISAGREES") .. (r.stokes and " stokes" or ""))
    end
  end
  local continued, searched = 0, 0
  for _, r in ipairs(sw.rows) do
    if r.failure then   -- (not counted)
    elseif r.landscape == "continued" then continued = continued + 1
    elseif r.landscape then searched = searched + 1 end
  end
  lines[#lines + 1] = format("saddles followed from the previous step at %d values, searched "
    .. "for in the whole region at %d", continued, searched)
  return table.concat(lines, "\n")
end

function M.compare_report(c, opts)
  local other = require("steep.report").format(opts, c, c.rows,
    { "x", "unrescaled", "unrescaled_error", "rescaled", "formula", "correction", "corrected",
      "quad", "quad_error", "unrescaled_ok", "corrected_ok", "formula_ok" })
  if other then return other end
  local lines = {}
  local function add(...) lines[#lines + 1] = format(...) end
  add("routes for %s", tostring(c.integral))
  add("rescaled: %s = %s; %s", c.integral.var.name, tostring(c.rescaled.rescaling.t),
    c.rescaled.homogeneity.ok and c.rescaled.homogeneity.text or
    ("not homogeneous: " .. tostring(c.rescaled.homogeneity.why)))
  add("%-10s %-24s %-24s %-24s %-24s %s", c.large, "unrescaled", "formula+correction",
    "rescaled (held)", "quadrature", "flags")
  for _, r in ipairs(c.rows) do
    local flags = {}
    if r.unrescaled_ok == false then flags[#flags + 1] = "U" end
    if r.corrected_ok == false then flags[#flags + 1] = "R" end
    if r.formula_ok == false then flags[#flags + 1] = "f" end
    add("%-10s %-24s %-24s %-24s %-24s %s", fmtv(r.x), r.unrescaled and fmtv(r.unrescaled) or "-",
      r.corrected and fmtv(r.corrected) or "-", r.rescaled and fmtv(r.rescaled) or "-",
      fmtv(r.quad), table.concat(flags, ","))
    for _, n in ipairs(r.notes) do add("           note: %s", n) end
  end
  add("flags: U unrescaled disagrees with quadrature; R corrected rescaled formula disagrees; "
    .. "f the uncorrected formula derived at the first value disagrees")
  add("%s", c.crossings:report())
  return table.concat(lines, "\n")
end

return M
