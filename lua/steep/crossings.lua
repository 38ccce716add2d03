-- steep.crossings — J:crossings: the singularities and saddles of an integral followed
-- along a path of parameter values with its contour held fixed; events where a
-- singularity changes side of the contour (with the residue term a formula derived
-- before needs), the rescaling turns singular, saddles merge, a Stokes line is crossed,
-- or an end leaves its valley.

local core = require "steep.core"
local complex = require "steep.complex"
local contour_m = require "steep.contour"
local landscape = require "steep.landscape"
local routes = require "steep.routes"

local cnew, cparts = complex.new, complex.parts
local cabs, carg, expi = landscape.cabs, landscape.carg, landscape.expi
local format, pi, huge = string.format, math.pi, math.huge
local copy, fmtv, is_real, with_large = routes.copy, routes.fmtv, routes.is_real, routes.with_large

local M = {}

-- Each previous saddle's nearest current one (each used once, nearest pairs first).
local function follow(prev, cur)
  local pairs_ = {}
  for i, a in ipairs(prev) do
    for j, b in ipairs(cur) do pairs_[#pairs_ + 1] = { i, j, cabs(a.at - b.at) } end
  end
  table.sort(pairs_, function(u, w) return u[3] < w[3] end)
  local match, used = {}, {}
  for _, q in ipairs(pairs_) do
    if not match[q[1]] and not used[q[2]] then match[q[1]], used[q[2]] = q[2], true end
  end
  return match
end

-- The net weight of each saddle in the held contour's decomposition (a string of its
-- ray weights), or nil when the decomposition fails.
local function stokes_weights(J, p, L)
  local ok, plan = pcall(require("steep.decompose").decompose, J, p, L, J.contour)
  if not ok or plan.status ~= "ok" then return nil end
  -- (on the line itself the weights are one side's: not a reference for either side)
  if plan.stokes then return nil, true end
  local w = {}
  for j, s in ipairs(L.saddles) do
    local r = {}
    for k = 1, s.order do r[k] = 0 end
    w[j] = r
  end
  for _, piece in ipairs(plan.pieces) do
    if piece.kind == "saddle" then
      w[piece.index][piece.ray] = w[piece.index][piece.ray] + piece.weight
    end
  end
  local out = {}
  for j, r in ipairs(w) do out[j] = table.concat(r, ",") end
  return out
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
function M.crossings(J, opts)
  routes.need_table(opts, "crossings")
  if not J.large then error("crossings: the integral names no large parameter", 2) end
  local x = J.large.name
  local values = routes.parameter_values(opts[x], "crossings")
  local rest = copy(opts)
  rest[x] = values[1]
  local params, o = require("steep.integral").split_options(J, rest, { region = true,
    budget = true }, "crossings")
  local budget = routes.check_budget(o.budget, "crossings")
  local clock0, done = os.clock(), 0
  if o.region then o.region = require("steep.integral").check_region(o.region, "crossings", J) end
  local poly0 = J.contour:sample { radius = 50, n = 32 }
  local scale = 1
  for _, z in ipairs(J.contour:finite_points()) do scale = math.max(scale, cabs(z)) end
  local Rbig = 1e3 * scale          -- beyond this a singularity counts as gone to infinity
  local region = { center = cnew(0, 0), radius = 20 * scale }
  local poly = J.contour:sample { radius = 40 * scale, n = 64 }
  local events, track = {}, {}
  local prev_sing, prev_saddles, prev_valleys, prev_weights = nil, nil, nil, nil
  local sad_id, next_id, last_sign = {}, 0, {}
  local factor = J.rescaling and J.rescaling.factor
  local prev_factor
  local function add_event(e) events[#events + 1] = e end
  for step, v in ipairs(values) do
    if budget and os.clock() - clock0 > budget then break end
    done = step
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
    -- Stokes lines: saddles followed from the previous step by position (not by their
    -- place in the list, which may change); where Im(F_j - F_k) of a followed pair changes
    -- sign (against its last non-zero sign: a step may sit exactly on the line), the
    -- contour's decomposition on either side says whether a weight actually switched (the
    -- lower saddle's jumps by the intersection number times the higher one's weight, so a
    -- Stokes line often changes nothing)
    local weights, on_line = stokes_weights(J, p, L)
    if prev_saddles then
      local match = follow(prev_saddles, sad)
      for i, ps in ipairs(prev_saddles) do
        if match[i] then sad_id[sad[match[i]]] = ps.id end
      end
    end
    local followed = {}
    for k, s in ipairs(sad) do
      if not sad_id[s] then next_id = next_id + 1; sad_id[s] = next_id end
      followed[k] = { at = s.at, F = s.F, id = sad_id[s] }
    end
    for i = 1, #sad do
      for j = i + 1, #sad do
        local lo, hi = math.min(followed[i].id, followed[j].id), math.max(followed[i].id, followed[j].id)
        local key = lo .. ":" .. hi
        local d = select(2, cparts(sad[i].F - sad[j].F))
        if followed[i].id > followed[j].id then d = -d end
        local tol = 1e-12 * (1 + cabs(sad[i].F) + cabs(sad[j].F))
        local b = d > tol and 1 or (d < -tol and -1 or 0)
        local a = last_sign[key]
        if b ~= 0 then last_sign[key] = b end
        if a and b ~= 0 and a ~= b and prev_saddles then
          local switched, known = {}, prev_weights and weights and true
          if known then
            for _, k in ipairs({ i, j }) do
              local before = prev_weights[followed[k].id]
              local after = weights[k]
              if before ~= after then
                switched[#switched + 1] = format("the saddle at %s: weight %s -> %s",
                  fmtv(sad[k].at), tostring(before), after)
              end
            end
          end
          if not known or #switched > 0 then
            add_event({ kind = "stokes", at = v, text = format("between %s = %s and %s, Im F "
              .. "of the saddles at %s and %s became equal: a Stokes line was crossed; %s",
              x, fmtv(values[step - 1]), fmtv(v), fmtv(sad[i].at), fmtv(sad[j].at),
              known and (table.concat(switched, "; ") .. " (the subdominant one switched)")
              or "the decomposition could not say whether a weight switched") })
          end
        end
      end
    end
    -- weights by saddle id, for the next steps (kept across a step on the line itself)
    if weights then
      local by_id = {}
      for k, w in ipairs(weights) do by_id[followed[k].id] = w end
      prev_weights = by_id
    elseif not on_line then
      prev_weights = nil
    end
    prev_saddles = followed
    -- contour ends and their valleys
    if not J.contour.closed then
      for _, which in ipairs({ "start", "finish" }) do
        local e = J.contour[which](J.contour)
        if contour_m.is_inf(e) then
          -- (the ray that reaches the end runs from the point next to it: in a strip valley
          -- its line decides)
          local piece = which == "start" and J.contour.pieces[1]
            or J.contour.pieces[#J.contour.pieces]
          local k = landscape.ray_valley(L, which == "start" and piece.b or piece.a, e.angle)
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
  local status = "complete"
  if done < #values then
    status = format("incomplete: the time budget of %g s was used up after %d of %d values%s",
      budget, done, #values, done > 0 and format(" (the last one followed: %s = %s)", x,
      fmtv(values[done])) or "")
  end
  local out = { events = events, track = track, large = x, values = values, integral = J,
    status = status, followed = done }
  return setmetatable(out, { __index = { report = M.crossings_report } })
end

function M.crossings_report(c, opts)
  local report_m = require "steep.report"
  local other = report_m.format(opts, { events = c.events, large = c.large,
    values = c.values, status = c.status }, c.events,
    { "kind", "at", "position", "term", "before", "after", "text" })
  if other then return other end
  local wrap = report_m.wrap
  local lines = { wrap(format("%s along %s = %s .. %s (%d values)", tostring(c.integral), c.large,
    fmtv(c.values[1]), fmtv(c.values[#c.values]), #c.values), "crossing check of ", 4) }
  if #c.events == 0 then
    lines[#lines + 1] = wrap(format("no events%s: no singularity changed side of the contour, no "
      .. "saddles merged, no Stokes line was crossed", c.status == "complete" and ""
      or " over the values followed"), "", 4)
  end
  for i, e in ipairs(c.events) do
    lines[#lines + 1] = wrap(e.text, format("%d. [%s] ", i, e.kind), 4)
  end
  if c.status ~= "complete" then lines[#lines + 1] = wrap(c.status, "status: ", 4) end
  return table.concat(lines, "\n")
end

return M
