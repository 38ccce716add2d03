-- steep.asymptotics — J:expand, J:series and J:check: the decomposition turned into
-- asymptotic series, truncated where asked, and verified against quadrature.

local core = require "steep.core"
local complex = require "steep.complex"
local landscape = require "steep.landscape"
local decompose = require "steep.decompose"
local expand = require "steep.expand"
local expr = require "steep.expr"
local coalesce = require "steep.coalesce"
local cusp = require "steep.cusp"
local nearpole = require "steep.nearpole"
local nearend = require "steep.nearend"
local strips = require "steep.strips"

local cnew, cparts = complex.new, complex.parts
local cabs = landscape.cabs
local cexp = complex.apply
local format, pi, abs, log, huge = string.format, math.pi, math.abs, math.log, math.huge

local M = {}

local function exp_c(z) return cexp("exp", complex.new(cparts(z))) end

-- How many raw series coefficients a contribution needs for `order` terms (plus the
-- first omitted one), or for optimal truncation.
local function raw_count(order, m, symmetric)
  local per = symmetric and m or 1
  if order == "optimal" then return math.min(120, 250 - m) end
  -- (three omitted terms: the error estimate reads how the series goes on)
  return per * (order + 4) + m
end

local function check_order(order, fname)
  if order == "optimal" then return order end
  if type(order) ~= "number" or math.tointeger(order) == nil or order < 1 or order > 200 then
    error(format("%s: option 'order' must be a whole number of terms from 1 to 200 or "
      .. "\"optimal\", got %s", fname, tostring(order)), 3)
  end
  return math.tointeger(order)
end
M.check_order = check_order

-- The number of leading coefficients a[0..n-1] that doubles hold: the series' raw
-- coefficients carry the large parameter's powers (a_k ~ x^(-k/m)), and past some order
-- they fall below 1e-290, where doubles lose digits and then give 0 (the scaled Gamma
-- integral at x = 10: its coefficients underflowed from order 171 on, the terms past it
-- were 0 and the error read from them vanished: 0.7 % off under an estimate of 1e-11).
-- A fixed order that needs more is refused; "optimal" stops there.
local TINY_COEFFICIENT = 1e-290
local function held_coefficients(a, n)
  for k = 0, n - 1 do
    local v = a[k] and cabs(a[k]) or 0
    if v > 0 and v < TINY_COEFFICIENT then return k end
    -- (an exact 0 right after tiny ones is an underflow, not a symmetry)
    if v == 0 and k >= 1 and a[k - 1] and cabs(a[k - 1]) < 1e-250 and cabs(a[k - 1]) > 0 then
      return k
    end
  end
  return n
end

local function check_held(a, nraw, order, m, what)
  local held = held_coefficients(a, nraw)
  if held >= nraw then return nraw end
  if order == "optimal" then return held end
  error(format("%s: order %d needs %d coefficients of its series, but those from order %d "
    .. "on are below what doubles hold (the large parameter's powers are in them): ask for "
    .. "at most %d terms, or order = \"optimal\"", what, order, nraw, held,
    math.max(1, held // m - 4)), 0)
end

-- Saddle contribution from its ray pieces (uniformly with a pole nearby: steep.nearpole).
local function saddle_contribution(J, params, L, j, rays, order, plan)
  local s = L.saddles[j]
  local m = s.order
  local c = {}
  for k = 1, m do c[k] = 0 end
  local at_endpoint = false
  for _, piece in ipairs(rays) do
    c[piece.ray] = c[piece.ray] + piece.weight
    at_endpoint = at_endpoint or piece.at_endpoint
  end
  local symmetric = (m == 2 and c[1] == -c[2])
  -- (nearpole.find looks at simple poles only: without one, no series to find it by)
  local simple_pole = false
  for _, p in ipairs(L.singularities or {}) do
    if p.kind == "pole" and p.order == 1 then simple_pole = true end
  end
  if symmetric and c[1] ~= 0 and simple_pole then
    local ok, a0, F0, sm = pcall(expand.saddle_series, J, params, s.at, 2, 4)
    if not ok then
      -- the amplitude is singular at the saddle itself (a pole there): the map from F alone
      local Fs = J.tape:jet(s.at, 3, params, 1)
      local f2 = Fs:coef(2)
      a0, F0 = nil, Fs:coef(0)
      sm = cabs(f2) ^ 0.5 * landscape.expi(-(pi - landscape.carg(f2)) / 2)
    end
    local series = { a0, F0, sm }
    local near = nearpole.find(J, params, L, s, sm)
    if near then
      local u = nearpole.contribution(J, params, L, j, c, near, order, series)
      if u then
        -- re-decide the pole's side of this saddle's path exactly (from Im b)
        if plan then nearpole.fix_side(plan, near, c, rays) end
        return u
      end
    end
  end
  local nraw = raw_count(order, m, symmetric)
  local a, F0, _, _, _, aerr = expand.saddle_series(J, params, s.at, m, nraw, L)
  nraw = check_held(a, nraw, order, symmetric and m or 1,
    format("the saddle at %s", tostring(s.at)))
  local terms, powers, _, terr = expand.saddle_terms(a, F0, m, c, nraw, aerr)
  local scale = exp_c(F0)
  local value, err, used = expand.truncate(terms, order, scale, cabs(F0), terr)
  local kind = m == 2 and "saddle" or format("saddle of order %d", m)
  if at_endpoint then kind = kind .. " at an endpoint" end
  local tl, omitted = {}, {}
  for k = 1, used do tl[k] = terms[k] * scale end
  for k = used + 1, math.min(#terms, used + 3) do omitted[#omitted + 1] = terms[k] * scale end
  return { kind = kind, at = s.at, order = m, weights = c, F = F0, value = value,
    error = err, terms = tl, omitted = omitted, powers = powers, used = used,
    dominance = cparts(F0) }
end

local function endpoint_contribution(J, params, piece, order, L, opts)
  local nraw = raw_count(order, 1, false)
  local ok, b, Fa, beta, berr, logs = pcall(expand.endpoint_series, J, params, piece.at, nraw,
    nil, L, opts)
  -- ("optimal" with coefficients that overflow past some order, Taylor's at the end or
  -- the series' own (their powers of 1/x at small x): stop below it; a fixed order that
  -- needs them is refused, saying so)
  local why = not ok and tostring(b)
  local held = why and (tonumber(why:match("overflow past order (%d+)"))
    or tonumber(why:match("coefficient (%d+) is not finite")))
  if held and order == "optimal" and held > 6 then
    nraw = held - 4
    b, Fa, beta, berr, logs = expand.endpoint_series(J, params, piece.at, nraw, nil, L, opts)
  elseif held and not why:find("overflow past", 1, true) then
    error(format("the endpoint %s: the series' coefficients overflow past order %d (powers "
      .. "of a small scale, as 1/x at small x): ask for at most %d terms, or order = "
      .. "\"optimal\"", tostring(piece.at), held, math.max(1, held - 6)), 0)
  elseif not ok then
    error(b, 0)
  end
  if not b then
    error(format("the endpoint %s is a saddle of the exponent: not handled as an endpoint",
      tostring(piece.at)), 0)
  end
  nraw = check_held(b, nraw, order, 1, format("the endpoint %s", tostring(piece.at)))
  local terms, _, terr = expand.endpoint_terms(b, beta, nraw, berr)
  local scale = exp_c(Fa) * piece.weight
  -- (room 1.25 for an endpoint's series: Berry's smoothing is not applied to it, and next
  -- to a Stokes line its remainder reaches the optimal term's bound itself)
  local value, err, used = expand.truncate(terms, order, scale, cabs(Fa), terr, 1.25)
  local tl, omitted = {}, {}
  for k = 1, used do tl[k] = terms[k] * scale end
  for k = used + 1, math.min(#terms, used + 3) do omitted[#omitted + 1] = terms[k] * scale end
  local kind = beta and format("endpoint with factor (t-a)^%g", beta) or "endpoint"
  if logs then kind = kind .. (beta and " and a log" or " with a log factor") end
  if beta and beta <= -1 then kind = kind .. " (Hadamard's finite part)" end
  return { kind = kind, at = piece.at, weight = piece.weight, F = Fa, value = value, error = err,
    terms = tl, omitted = omitted, used = used, dominance = cparts(Fa), beta = beta,
    finite_part = beta and beta <= -1 or nil }
end

local function residue_contribution(L, r)
  local s = L.singularities[r.index]
  local v = cnew(0, 2 * pi * r.winding) * s.residue
  return { kind = "pole", at = s.at, weight = r.winding, order = s.order, value = v,
    error = 2 * pi * abs(r.winding) * s.residue_error, terms = { v }, used = 1,
    residue = s.residue, dominance = log(math.max(cabs(v), 1e-300)) }
end

-- A link between two valleys (the saddles beyond the region, with infinitely many of
-- them): no series, its value by quadrature (lua/steep/integral.lua), its error that of
-- the quadrature.
local function link_contribution(J, params, L, piece)
  local notes = {}
  local v, e = require("steep.integral").quad_link(J, params, L, piece, notes)
  v, e = piece.weight * v, abs(piece.weight) * e
  return { kind = "link between valleys (by quadrature)", at = piece.through,
    weight = piece.weight, value = v, error = e, terms = { v }, used = 1,
    note = "the saddles beyond the region, summed by quadrature along the line from "
      .. strips.label_words(L, piece.ends[1]) .. " to " .. strips.label_words(L, piece.ends[2]),
    dominance = log(math.max(cabs(v), 1e-300)) }
end

-- Why a decomposition failed, where the landscape can say more: a saddle of an order the
-- expansions do not support (its paths are not traced reliably either), or zeros of F'
-- that the argument principle counts but Newton's method did not find (a zero of high
-- multiplicity is the usual reason: a saddle of order 10 at a 9-fold zero of F').
local function failure_detail(L)
  local max = expand.MAX_SADDLE_ORDER
  for _, s in ipairs(L.saddles) do
    if s.order > max then
      return format("; a saddle of order %d at %s: orders above %d are not supported", s.order,
        tostring(s.at), max)
    end
  end
  local c = L.saddle_count
  if c and c.count and c.found and c.count > c.found then
    local m = c.count - c.found + 1
    return format("; the landscape is incomplete: the argument principle counts %d zeros of F' "
      .. "(with multiplicity), %d found; if the missing ones coincide they make a saddle of "
      .. "order %d%s", c.count, c.found, m,
      m > max and format(" (orders above %d are not supported)", max) or "")
  end
  return ""
end

-- When the global decomposition cannot be settled (exponential-type valleys, say) but
-- the contour itself passes through saddles along their steepest directions, the
-- classical local method applies: the contour's contribution is that of those saddles,
-- the rest of it being assumed exponentially smaller (Flajolet & Sedgewick 2009,
-- ch. VIII, for coefficient integrals on a circle through the saddle). The plan says so;
-- J:check verifies it against quadrature.
function M.local_plan(J, L, plan)
  local R = L.region.radius
  local pieces = {}
  for j, s in ipairs(L.saddles) do
    -- the contour's direction where it passes through the saddle, if it does
    local dir
    for _, p in ipairs(J.contour.pieces) do
      if p.kind == "arc" then
        local d = cabs(s.at - p.center)
        if abs(d - p.radius) <= 1e-9 * math.max(R, p.radius) then
          local sign = p.to > p.from and 1 or -1
          dir = landscape.carg(s.at - p.center) + sign * pi / 2
        end
      elseif p.kind == "segment" then
        local u = p.b - p.a
        local w = (s.at - p.a) / u
        local wr, wi = cparts(w)
        if abs(wi) * cabs(u) <= 1e-9 * R and wr > 1e-9 and wr < 1 - 1e-9 then
          dir = landscape.carg(u)
        end
      end
    end
    if dir and s.order == 2 then
      local paths = (L.paths and L.paths[j]) or landscape.saddle_paths(J, L.params, L, j)
      local best, bk = huge, nil
      for k, d in ipairs(paths.descent) do
        local a = abs(landscape.norm_angle(landscape.carg(d.points[2] - s.at) - dir))
        if a < best then best, bk = a, k end
      end
      if best > pi / 4 then return nil end   -- not along a descent direction: no local form
      for k, d in ipairs(paths.descent) do
        pieces[#pieces + 1] = { kind = "saddle", index = j, ray = k, order = 2,
          weight = (k == bk) and 1 or -1, points = d.points, ends = { "saddle " .. j, d.ends } }
      end
    end
  end
  if #pieces == 0 then return nil end
  -- the rest must be exponentially smaller indeed: no finite point of the contour (its
  -- ends, its corners) within e^36 of the saddles used (Laplace's first integral for P_n
  -- over a whole period has saddles at its ends as large as the one inside: half the value,
  -- "estimated (local method)")
  local top = -huge
  for _, piece in ipairs(pieces) do
    local sd = L.saddles[piece.index]
    local gm = cabs(sd.g)
    top = math.max(top, cparts(sd.F) + (gm > 0 and math.log(gm) or -huge))
  end
  for _, z in ipairs(J.contour:finite_points()) do
    local ok, F, g = pcall(J.tape.eval, J.tape, z, L.params)
    if ok then
      local gm = g and cabs(g) or 1
      local lv = cparts(F) + (gm > 0 and math.log(gm) or -huge)
      if lv == lv and lv > top - 36 then return nil end
    end
  end
  local notes = { "local method: the contour passes through the saddle(s) used; the rest of "
    .. "it is assumed exponentially smaller (the global decomposition was not settled: "
    .. plan.status .. ")" }
  return { pieces = pieces, residues = {}, notes = notes, status = "ok", evals = plan.evals,
    stokes = plan.stokes, is_local = true }
end


-- The contributions of a plan's pieces and residues, expanded to `order` (`resum`: keep
-- the pair of a uniform form, for lua/steep/resum.lua).
local function contributions_of(J, params, L, plan, order, resum, opts)
  local contributions = {}
  local by_saddle, order_seen, endpoints = {}, {}, {}
  for _, piece in ipairs(plan.pieces) do
    if piece.kind == "saddle" then
      if not by_saddle[piece.index] then
        by_saddle[piece.index] = {}
        order_seen[#order_seen + 1] = piece.index
      end
      table.insert(by_saddle[piece.index], piece)
    elseif piece.kind == "link" then
      contributions[#contributions + 1] = link_contribution(J, params, L, piece)
    else
      for _, s in ipairs(L.singularities) do
        if cabs(s.at - piece.at) <= 1e-9 * L.region.radius and s.kind == "essential" then
          error(format("expand: an essential singularity (%s) sits at the endpoint %s",
            s.source, tostring(piece.at)), 0)
        end
      end
      endpoints[#endpoints + 1] = piece
    end
  end
  -- three simple saddles close together: the cusp form for the three (steep.cusp)
  local handled = {}
  for _, c in ipairs(cusp.contributions(J, params, L, by_saddle, order_seen, order, resum,
      plan.notes, handled)) do
    contributions[#contributions + 1] = c
  end
  -- two simple saddles close together: the Airy-type uniform form for the pair
  for _, j in ipairs(order_seen) do
    local s = L.saddles[j]
    if s.order == 2 and not handled[j] then
      local best, j2 = huge, nil
      for k, o in ipairs(L.saddles) do
        if k ~= j and o.order == 2 and not handled[k] then
          local map = coalesce.cubic_map(s, o, coalesce.ZETA_RADIUS)
          if map and cabs(map.zeta) < coalesce.ZETA_RADIUS and cabs(map.zeta) < best then
            best, j2 = cabs(map.zeta), k
          end
        end
      end
      if j2 then
        local pair = { { saddle = s, rays = by_saddle[j] },
          { saddle = L.saddles[j2], rays = by_saddle[j2] or {} } }
        local ok, c = pcall(coalesce.contribution, J, params, L, pair, order)
        if ok and c then
          c.pair = resum and pair or nil   -- (resummation may expand them apart)
          contributions[#contributions + 1] = c
          handled[j], handled[j2] = true, true
        end
      end
    end
  end
  -- an endpoint within a few widths of a simple saddle: the two together (steep.nearend)
  for _, piece in ipairs(endpoints) do
    local c
    local j = not (opts and opts.finite_part) and nearend.find(J, params, L, piece, handled)
    if j then
      local ok, u, why = pcall(nearend.contribution, J, params, L, j, by_saddle[j] or {},
        piece, order)
      if ok and u then
        -- (the two apart where that is better: far from the saddle the series from it to
        -- the endpoint nearly cancels the saddle's, and the endpoint's own series is good)
        local apart = endpoint_contribution(J, params, piece, order, L, opts)
        local err = apart.error
        if by_saddle[j] then
          local ok2, sc = pcall(saddle_contribution, J, params, L, j, by_saddle[j], order, plan)
          err = ok2 and err + sc.error or math.huge
        end
        if u.error < err then c, handled[j] = u, true else c = apart end
      else
        plan.notes[#plan.notes + 1] = format("the endpoint %s and saddle %d were expanded "
          .. "apart: %s", tostring(piece.at), j, tostring(ok and why or u))
      end
    end
    contributions[#contributions + 1] = c
      or endpoint_contribution(J, params, piece, order, L, opts)
  end
  for _, j in ipairs(order_seen) do
    if handled[j] then goto next_saddle end
    do
    local c = saddle_contribution(J, params, L, j, by_saddle[j], order, plan)
    local zero = true
    for _, w in ipairs(c.weights) do if w ~= 0 then zero = false end end
    if not zero then contributions[#contributions + 1] = c end
    end
    ::next_saddle::
  end
  for _, r in ipairs(plan.residues) do
    if r.winding ~= 0 then contributions[#contributions + 1] = residue_contribution(L, r) end
  end
  return contributions
end

-- On a Stokes line with a genuine jump: the mean of the two sides' contributions (Berry's
-- multiplier 1/2 on the line), each with half the difference as part of its error (the
-- unsettled part).
local function mean_of_sides(plus, minus)
  local out, used = {}, {}
  -- (a uniform form covers several saddles and is keyed on either side by one of them:
  -- match it by the set of its saddles)
  local function key(c)
    local pts = { tostring(c.at) }
    if c.partner then pts[#pts + 1] = tostring(c.partner) end
    for _, p in ipairs(c.partners or {}) do pts[#pts + 1] = tostring(p) end
    table.sort(pts)
    return c.kind .. "@" .. table.concat(pts, ",")
  end
  local byk = {}
  for _, c in ipairs(minus) do byk[key(c)] = c end
  for _, c in ipairs(plus) do
    local m = byk[key(c)]
    if m then used[m] = true end
    if m and cabs(m.value - c.value) <= 1e-15 * cabs(c.value) then
      out[#out + 1] = c
    else
      local mv, me = m and m.value or cnew(0, 0), m and m.error or 0
      local d = cabs(c.value - mv)
      local mc = {}
      for k, v in pairs(c) do mc[k] = v end
      mc.value = 0.5 * (c.value + mv)
      mc.error = 0.5 * (c.error + me) + 0.5 * d
      mc.unsettled = 0.5 * d
      mc.kind = c.kind .. " (on a Stokes line: mean of its two sides)"
      out[#out + 1] = mc
    end
  end
  for _, m in ipairs(minus) do
    if not used[m] then
      local mc = {}
      for k, v in pairs(m) do mc[k] = v end
      mc.value, mc.error, mc.unsettled = 0.5 * m.value, 0.5 * m.error + 0.5 * cabs(m.value),
        0.5 * cabs(m.value)
      mc.kind = m.kind .. " (on a Stokes line: mean of its two sides)"
      out[#out + 1] = mc
    end
  end
  return out
end

-- Near (not on) a Stokes line, at optimal truncation: a dominant saddle n's series cut
-- at its least term leaves out a share of the subdominant saddle m that switches on
-- smoothly across the line, S(sigma) from Berry's error function (Proc. R. Soc. A 422
-- (1989) 7-21; resum.stokes_multiplier), where the decomposition's weights jump at the
-- line itself. The share still missing on this side, (S - theta) times m's jump (theta =
-- 1 on the side where m's weight already includes it), is added as a contribution of
-- its own. Its value rests on Berry's law, the leading term in |Lambda|^(-1/2), whose
-- error the dominant's own estimate (about half of m's jump near the line) still
-- covers: the estimates are left as they are. Only where |Lambda| >= 8 and |sigma| < 4.
local SIGMA_NEAR, LAMBDA_MIN = 4, 8
local function report_num(z) return require("steep.report").num(z) end
-- (|F_j - F_k| within which two saddles take the pair form: (4/3) |zeta|^(3/2))
local PAIR_SCALE = 4 / 3 * coalesce.ZETA_RADIUS ^ 1.5
local function berry_smoothing(J, params, L, contributions, order, notes)
  local resum = require "steep.resum"
  local added = {}
  local tol = 1e-12 * L.region.radius
  -- a saddle whose plain series is poor: named by a uniform contribution, or within the
  -- pair form's scale of another saddle (its share is then not added: the dominant's
  -- estimate covers it)
  local function poorly_served(m)
    local at = L.saddles[m].at
    for _, c in ipairs(contributions) do
      if c.kind ~= "saddle" then
        local pts = { c.at, c.partner }
        for _, q in ipairs(c.partners or {}) do pts[#pts + 1] = q end
        for _, q in pairs(pts) do if cabs(q - at) <= tol then return true end end
      end
    end
    -- (a pair the cubic map fits, not merely close in F: the periodic copies of I_nu's
    -- saddles at +-i pi differ by 2 pi nu i in F, 2 pi i apart, and their share was left
    -- out, 3.6e-6 off under 1.3e-6)
    for k, sk in ipairs(L.saddles) do
      if k ~= m and sk.order == 2 and cabs(sk.F - L.saddles[m].F) <= PAIR_SCALE
          and coalesce.cubic_map(sk, L.saddles[m], coalesce.ZETA_RADIUS) then
        return true
      end
    end
    return false
  end
  for _, c in ipairs(contributions) do
    local n
    if c.kind == "saddle" and c.order == 2 and c.weights then
      for j, s in ipairs(L.saddles) do
        if cabs(s.at - c.at) <= tol then n = j end
      end
    end
    for m, sm in ipairs(n and L.saddles or {}) do
      local sgl = L.saddles[n].F - sm.F
      local sr, si = cparts(sgl)
      if m ~= n and sm.order == 2 and sr > 0 and si ~= 0 and cabs(sgl) >= LAMBDA_MIN
          and abs(si) < SIGMA_NEAR * math.sqrt(2 * sr) and not poorly_served(m) then
        local S, sigma = resum.stokes_multiplier(sgl)
        local f = S - (si > 0 and 1 or 0)
        -- (the share at its largest, |f| |g| e^{Re F} sqrt(2 pi/|F''|), against the error
        -- it would change: not worth tracing where it is far below it)
        local size = abs(f) * cabs(sm.g) * math.exp(cparts(sm.F)) * math.sqrt(2 * pi / cabs(sm.F2))
        if size > 1e-6 * c.error then
          local jump, why = decompose.stokes_jump(J, params, L, n, m)
          local w = jump and c.weights[jump.ray] or 0
          if jump and w ~= 0 then
            -- (m's jump from the minus side to the plus side: stokes_jump)
            local unit = saddle_contribution(J, params, L, m, { { ray = jump.plus, weight = -w },
              { ray = jump.minus, weight = w } }, order)
            added[#added + 1] = { kind = "Stokes smoothing (Berry)", at = sm.at, order = 2,
              F = unit.F, value = f * unit.value, error = abs(f) * unit.error,
              used = unit.used, terms = {}, dominance = cparts(sm.F), smoothing = {
                of = n, saddle = m, multiplier = S, sigma = sigma, share = f, jump = unit.value },
              note = format("near a Stokes line (sigma = %.3g): saddle %d's share that saddle "
                .. "%d's optimally truncated series leaves out: (S - %d) x its jump across the "
                .. "line %s, Berry's multiplier S = %.4g", sigma, m, n, si > 0 and 1 or 0,
                report_num(unit.value), S) }
          elseif not jump then
            -- (the share at its largest joins the dominant's estimate: it is not there by
            -- itself when the share is larger than the series' own error)
            if size > c.error then c.error = c.error + size end
            notes[#notes + 1] = format("near a Stokes line of saddles %d and %d (sigma = %.3g) "
              .. "the smoothing was not applied: %s; the dominant's estimate covers the "
              .. "share (at most %.3g)", n, m, sigma, why, size)
          end
        end
      end
    end
  end
  for _, a in ipairs(added) do contributions[#contributions + 1] = a end
end

-- F's own rounding where a contribution is read: e^{F0} carries F0's absolute rounding
-- as a relative error of the value (and g's relative one), which the series' floor, (128
-- + |F0|) u, misses where F0 is a small difference of large terms (a coefficient
-- integral with its exponent shifted by a constant near 2929: 1.5e-12 off under 9e-14).
-- The running error bound through the tape (tape:rounding) at the contribution's point,
-- and at its partners for a uniform form; residues and links carry their own.
local function exponent_rounding(J, params, contributions)
  local pts, at = {}, {}
  for i, c in ipairs(contributions) do
    if c.at and c.kind ~= "pole" and not c.kind:match("^link") then
      local list = { c.at, c.partner }
      for _, q in ipairs(c.partners or {}) do list[#list + 1] = q end
      at[i] = {}
      for _, q in pairs(list) do
        pts[#pts + 1] = q
        at[i][#at[i] + 1] = #pts
      end
    end
  end
  local rounding = landscape.relative_rounding(J, params, pts)
  for i, c in ipairs(contributions) do
    local rel = 0
    for _, k in ipairs(at[i] or {}) do rel = math.max(rel, rounding[k]) end
    if rel > 0 then c.error = c.error + rel * cabs(c.value) end
  end
end

--- expand(J, params, opts) -> result
function M.expand(J, params, opts)
  local order = check_order(opts.order or 1, "expand")
  if J.zero_amplitude then
    local result = { value = cnew(0, 0), error = 0, contributions = {}, order = order,
      params = params, notes = { "the amplitude is identically zero" }, stokes = false,
      integral = J, status = "exact: the amplitude is identically zero" }
    return setmetatable(result, { __index = { report = M.report } })
  end
  -- (whether F depends on the variable at all: once per integral)
  if J._exponent_flat == nil then
    local dF = expr.diff(J.exponent, J.var)
    J._exponent_flat = dF.op == "const" and dF.re == 0 and dF.im == 0
  end
  if J._exponent_flat then
    error("expand: the exponent " .. tostring(J.exponent) .. " does not change with "
      .. J.var.name .. " (its derivative is identically 0: no saddle, no endpoint expansion); "
      .. "the integral is a plain one (use J:quad)", 0)
  end
  local L = opts.landscape or J:_landscape(params, opts.region, false)
  local plan
  if opts.finite_part then
    -- (a divergent end allowed for Hadamard's finite part: a plan of its own, not kept
    -- with the landscape for quadrature to reuse)
    plan = decompose.decompose_uncached(J, params, L, J.contour, { finite_part = true })
  else
    plan = decompose.decompose(J, params, L, J.contour)
  end
  if plan.status ~= "ok" then
    local lp = M.local_plan(J, L, plan)
    if lp then plan = lp end
  end
  if plan.status ~= "ok" then
    error("expand: the contour could not be decomposed into steepest descent paths ("
      .. plan.status .. "): " .. table.concat(plan.notes, "; ") .. failure_detail(L), 0)
  end
  local contributions = contributions_of(J, params, L, plan, order, opts.resum, opts)
  local stokes = type(plan.stokes) == "table" and plan.stokes or nil
  local sides
  if stokes and not stokes.settled then
    local minus = contributions_of(J, params, L, stokes.minus, order, nil, opts)
    local function total(list)
      local v, e = cnew(0, 0), 0
      for _, c in ipairs(list) do v, e = v + c.value, e + c.error end
      return { value = v, error = e }
    end
    sides = { plus = total(contributions), minus = total(minus) }
    contributions = mean_of_sides(contributions, minus)
  elseif order == "optimal" and not opts.resum and plan.stokes ~= true then
    berry_smoothing(J, params, L, contributions, order, plan.notes)
  end
  table.sort(contributions, function(a, b) return a.dominance > b.dominance end)
  -- beyond optimal truncation (lua/steep/resum.lua): replaces what it improves
  local resummed = opts.resum and require("steep.resum").apply(J, params, L, contributions,
    opts.resum, stokes and not stokes.settled)
  exponent_rounding(J, params, contributions)
  local value, err, unsettled = cnew(0, 0), 0, 0
  for _, c in ipairs(contributions) do
    value = value + c.value
    err = err + c.error
    unsettled = unsettled + (c.unsettled or 0)
  end
  -- the status says how far to trust the number before any comparison with quadrature
  local status = plan.is_local and "estimated (local method)" or "estimated"
  for _, c in ipairs(contributions) do
    if c.finite_part then
      status = "estimated (Hadamard's finite part: the integral itself diverges)"
    end
  end
  if plan.abel then status = status .. " (the integral exists in Abel's sense only: see notes)" end
  local reasons = {}
  if plan.stokes == true then
    reasons[#reasons + 1] = "a saddle connection (Stokes line): the weight of a subdominant "
      .. "saddle could not be decided there"
  elseif stokes and not stokes.settled and unsettled > err - unsettled then
    reasons[#reasons + 1] = format("on a Stokes line with a genuine jump: the unsettled part "
      .. "(%.3g) is larger than the rest of the error estimate", unsettled)
  end
  if not (err < cabs(value)) then
    reasons[#reasons + 1] = "the error estimate is not smaller than the value"
  end
  for _, c in ipairs(contributions) do
    if c.kind == "saddle" and c.error > 0.1 * cabs(c.value) then
      reasons[#reasons + 1] = "a saddle's series converges poorly here (a pole or another "
        .. "saddle nearby?)"
      break
    end
  end
  if #reasons > 0 then status = "suspect: " .. table.concat(reasons, "; ") end
  -- a value beyond doubles: no number (the terms are there, their scale e^F overflows)
  local vr, vi = cparts(value)
  if not (abs(vr) < huge and abs(vi) < huge) then
    status, err = "failed: the value overflows doubles (a contribution's e^F is beyond "
      .. "1e308: subtract a constant from the exponent)", huge
  end
  local result = { value = value, error = err, contributions = contributions,
    order = order, params = params, landscape = L, notes = plan.notes,
    stokes = plan.stokes and true or false, integral = J, status = status,
    stokes_line = stokes and { settled = stokes.settled, unsettled = unsettled,
      by_rule = stokes.by_rule, sides = sides, multiplier = sides and 0.5 or nil } or nil,
    resum = resummed }
  setmetatable(result, { __index = { report = M.report } })
  -- residues decided by a closure through an essential singularity's valley sectors are
  -- confirmed by quadrature (which checks itself against the given contour there): a
  -- closure on the wrong side of a pole had counted its residue twice (a Laguerre
  -- polynomial's Cauchy integral: twice the value, "estimated")
  local essential = false
  for _, piece in ipairs(plan.pieces or {}) do
    for _, label in ipairs(piece.ends or {}) do
      if label:match("^essential") then essential = true end
    end
  end
  if essential and #(plan.residues or {}) > 0 and not opts.verify then
    M.verify(J, params, result, opts)
    if not result.status:match("^verified") then
      result.notes[#result.notes + 1] = "paths end in an essential singularity and residues "
        .. "were added: quadrature disagrees, so the residues' bookkeeping is in doubt"
    end
  end
  if opts.verify then M.verify(J, params, result, opts) end
  return result
end

--- Compares an expansion with quadrature: result.check, and the status "verified" only
-- when they agree within the two error estimates together (as stated: 1x).
function M.verify(J, params, result, opts)
  local qopts = { region = opts.region }
  for k, v in pairs(params) do qopts[k] = v end
  local q, qe, info = J:quad(qopts)
  local diff = cabs(result.value - q)
  local ok = diff <= result.error + qe and info.status == "ok"
  result.check = { quad = q, quad_error = qe, difference = diff, quad_status = info.status,
    verdict = ok and format("verified: agrees within the two error estimates (the difference "
      .. "is %.2g of their sum)", diff / (result.error + qe))
      or format("NOT verified: expansion and quadrature differ by %.3g times their error "
      .. "estimates%s", diff / (result.error + qe),
      info.status == "ok" and "" or " (quadrature: " .. info.status .. ")") }
  -- (agreement within an estimate as large as the value verifies nothing: a Cauchy
  -- integral about e^{z/(1-z)} at n = 1000 gave -4.3e33 for 2.8e24, "verified")
  if ok and not (result.error < cabs(result.value)) then
    result.status = "suspect: the error estimate is not smaller than the value (quadrature "
      .. "agrees within it)"
  else
    result.status = ok and "verified against quadrature" or
      ("suspect: disagrees with quadrature by " .. format("%.3g", diff))
  end
  return result
end

local report_m = require "steep.report"
local num, wrap = report_m.num, report_m.wrap

local function fmtc(z, err) return num(z, err) end

--- result:report{format = "text" | "json" | "csv"} -> text, lines within 100 columns
function M.report(r, opts)
  local other = report_m.format(opts, r, r.contributions,
    { "kind", "at", "value", "error", "used", "weight" })
  if other then return other end
  local lines = {}
  local function add(...) lines[#lines + 1] = format(...) end
  local function say(text, first, indent) lines[#lines + 1] = wrap(text, first, indent) end
  local J = r.integral
  say(tostring(J), "integral: ", 4)
  local ps = {}
  for k, v in pairs(r.params) do ps[#ps + 1] = k .. " = " .. num(v) end
  table.sort(ps)
  say(table.concat(ps, ", ") .. (J.large and ("   (large parameter: " .. J.large.name .. ")") or ""),
    "parameters: ", 4)
  add("terms per contribution: %s", tostring(r.order))
  if r.resum then
    add("resummation (asked: %s): %s", tostring(r.resum.requested), r.resum.method)
  end
  -- the landscape the decomposition used
  local L = r.landscape
  if L then
    add("landscape (region: center %s, radius %.4g):", fmtc(L.region.center), L.region.radius)
    local families = require("steep.periodic").saddle_lines(L, fmtc)
    if families then
      -- a periodic F': each saddle family once
      for k, text in ipairs(families) do say(text, "  ", k == 1 and 4 or 6) end
    else
      for j, sd in ipairs(L.saddles) do
        say(format("saddle %d at %s = %s, order %d, F = %s", j, J.var.name, fmtc(sd.at), sd.order,
          fmtc(sd.F)), "  ", 4)
      end
    end
    for _, sg in ipairs(L.singularities) do
      say(format("%s at %s = %s (%s)", sg.kind, J.var.name, fmtc(sg.at), sg.source), "  ", 4)
    end
    -- (strip families once each)
    local vs = strips.valley_words(L)
    say(#vs > 0 and table.concat(vs, "; ") or "none found", "  valleys: ", 4)
  end
  say("(most dominant first; a saddle counts when the contour crosses its steepest ascent "
    .. "paths, weights below; a pole when the deformation sweeps over it)", "contributions ", 2)
  for i, c in ipairs(r.contributions) do
    local why = ""
    if c.weights then
      local w = {}
      for k, v in ipairs(c.weights) do if v ~= 0 then w[#w + 1] = format("ray %d: %+d", k, v) end end
      why = #w > 0 and ("weights " .. table.concat(w, ", ")) or ""
    elseif c.kind == "pole" then
      why = format("winding %+d, residue %s", c.weight, fmtc(c.residue))
    elseif c.kind:find("^link") then
      why = format("weight %+d", c.weight)
    elseif c.weight then
      why = format("endpoint weight %+d", c.weight)
    end
    say(format("%s at %s%s", c.kind, fmtc(c.at), why ~= "" and (": " .. why) or ""),
      format("  %d. ", i), 5)
    say(format("value %s, error %.3g, %d term%s", fmtc(c.value, c.error), c.error, c.used,
      c.used == 1 and "" or "s"), "     ", 5)
    if c.terms and c.terms[1] then
      say(format("leading term %s%s", fmtc(c.terms[1], c.error), c.note and ("; " .. c.note) or ""),
        "     ", 5)
    elseif c.note then
      say(c.note, "     ", 5)
    end
    local how = r.resum and require("steep.resum").describe(c)
    if how then add("     %s", how) end
  end
  add("total: %s   estimated error %.3g", fmtc(r.value, r.error), r.error)
  if r.check then
    say(format("%s (error %.2g); difference %.3g -> %s", fmtc(r.check.quad, r.check.quad_error),
      r.check.quad_error, r.check.difference, r.check.verdict), "quadrature: ", 4)
  end
  say(r.status .. (r.check and "" or
    " (not compared with quadrature: verify = true or J:check does that)"), "status: ", 4)
  if r.stokes_line and r.stokes_line.by_rule then
    say("settled (the saddles whose paths run into others have weight 0)", "on a Stokes line: ", 4)
  elseif r.stokes_line and r.stokes_line.settled then
    say("the weights are the same on both sides of it (settled)", "on a Stokes line: ", 4)
  elseif r.stokes_line then
    local sd = r.stokes_line.sides
    say(format("Stokes multiplier 1/2 (Berry): the mean of the two sides' values %s and "
      .. "%s; unsettled part %.3g", fmtc(sd.plus.value, sd.plus.error),
      fmtc(sd.minus.value, sd.minus.error), r.stokes_line.unsettled),
      "on a Stokes line with a genuine jump: ", 4)
  elseif r.stokes then
    add("warning: a saddle connection was found (Stokes line): see notes")
  end
  for _, n in ipairs(r.notes or {}) do say(n, "note: ", 4) end
  say("an asymptotic approximation; check it (J:check) before it informs any engineering, "
    .. "financial or safety decision", "caution: ", 4)
  return table.concat(lines, "\n")
end

---------------------------------------------------------------------------------------
-- Standard form: exponent = large * phi(t).
---------------------------------------------------------------------------------------

--- Is the exponent exactly large * phi(t) with phi free of the large parameter, and the
-- amplitude free of it? Decided on the expression (large times something, in either
-- order), and otherwise numerically: F/large at several points for two values of large.
function M.homogeneous(J, params)
  local x = J.large
  if not x then return false, "the integral names no large parameter" end
  local F = J.exponent
  local g = J.amplitude
  if expr.is(g) and g:depends_on(x) then
    return false, "the amplitude depends on the large parameter " .. x.name
  end
  if F.op == "mul" and ((F.a == x and not F.b:depends_on(x)) or
      (F.b == x and not F.a:depends_on(x))) then
    return true
  end
  local pts = { cnew(0.3, 0.1), cnew(-0.7, 0.4), cnew(1.3, -0.2) }
  for _, z in ipairs(J.contour:finite_points()) do pts[#pts + 1] = z + cnew(0.01, 0.02) end
  for _, t in ipairs(pts) do
    local p1 = setmetatable({ [x.name] = 1.7 }, { __index = params })
    local p2 = setmetatable({ [x.name] = 3.1 }, { __index = params })
    local ok1, F1 = pcall(J.tape.eval, J.tape, t, p1)
    local ok2, F2 = pcall(J.tape.eval, J.tape, t, p2)
    if ok1 and ok2 then
      local d = cabs(F1 / 1.7 - F2 / 3.1)
      if d > 1e-12 * (1 + cabs(F1 / 1.7)) then
        return false, "the exponent is not " .. x.name .. " times a function of "
          .. J.var.name
      end
    end
  end
  return true
end

--- series(J, params, opts) -> list of contributions with coefficients c_k, an estimate of
-- each one's absolute error (errors[k]) and :value(lambda, nterms). Saddles: e^{lambda phi0} sum_k c_k lambda^(-(n_k+1)/m)
-- (for a simple saddle passed through: e^{lambda phi0} lambda^(-1/2) sum c_k lambda^-k);
-- endpoints: e^{lambda phi(a)} sum_k c_k lambda^(-k-1).
function M.series(J, params, opts)
  local ok, why = M.homogeneous(J, params)
  if not ok then error("series: the standard form does not apply: " .. why, 0) end
  local order = check_order(opts.order or 6, "series")
  if order == "optimal" then order = 60 end
  local x = J.large.name
  local lam = params[x] or 1
  local lr, li = cparts(lam)
  if li ~= 0 or lr <= 0 then
    error("series: the standard form is built for a positive large parameter (" .. x
      .. " > 0); got " .. tostring(lam), 0)
  end
  -- at lambda = 1 the exponent is phi itself
  local p1 = {}
  for k, v in pairs(params) do p1[k] = v end
  p1[x] = 1
  local L = J:_landscape(p1, opts.region, false)
  local plan = decompose.decompose(J, p1, L, J.contour)
  if plan.status ~= "ok" then
    error("series: the contour could not be decomposed (" .. plan.status .. "): "
      .. table.concat(plan.notes, "; ") .. failure_detail(L), 0)
  end
  local out = {}
  local rays = {}
  for _, piece in ipairs(plan.pieces) do
    if piece.kind == "saddle" then
      rays[piece.index] = rays[piece.index] or {}
      table.insert(rays[piece.index], piece)
    else
      local nraw = order + 1
      local b, phia, beta, berr, logs = expand.endpoint_series(J, p1, piece.at, nraw, nil, L)
      if logs then
        error("series: a log factor at the endpoint " .. tostring(piece.at) .. " makes terms in "
          .. "log of the large parameter: not the standard form (J:expand handles it)", 0)
      end
      local terms, _, terr = expand.endpoint_terms(b, beta, nraw, berr)
      local coefs, powers, errors = {}, {}, {}
      for k = 0, order - 1 do
        coefs[k + 1] = terms[k + 1] * piece.weight
        errors[k + 1] = terr[k + 1] * abs(piece.weight)
        powers[k + 1] = k + 1 + (beta or 0)
      end
      out[#out + 1] = { kind = "endpoint", at = piece.at, phi = phia, coefficients = coefs,
        powers = powers, errors = errors }
    end
  end
  for j, list in pairs(rays) do
    local s = L.saddles[j]
    local m = s.order
    local c = {}
    for k = 1, m do c[k] = 0 end
    for _, piece in ipairs(list) do c[piece.ray] = c[piece.ray] + piece.weight end
    local symmetric = m == 2 and c[1] == -c[2]
    local nraw = raw_count(order, m, symmetric)
    local a, phi0, _, _, how, aerr = expand.saddle_series(J, p1, s.at, m, nraw, L)
    local terms, raw_powers, _, terr = expand.saddle_terms(a, phi0, m, c, nraw, aerr)
    local coefs, powers, errors = {}, {}, {}
    for k = 1, math.min(order, #terms) do
      coefs[k] = terms[k]
      errors[k] = terr[k]
      powers[k] = (raw_powers[k] + 1) / m
    end
    out[#out + 1] = { kind = "saddle", at = s.at, order = m, phi = phi0,
      coefficients = coefs, powers = powers, errors = errors, method = how }
  end
  local mt = { __index = {
    value = function(c, lambda, nterms)
      nterms = nterms or #c.coefficients
      local s = cnew(0, 0)
      for k = 1, math.min(nterms, #c.coefficients) do
        s = s + c.coefficients[k] * lambda ^ (-c.powers[k])
      end
      return exp_c(c.phi * lambda) * s
    end } }
  for _, c in ipairs(out) do setmetatable(c, mt) end
  table.sort(out, function(a, b) return cparts(a.phi) > cparts(b.phi) end)
  -- the list of contributions, with the common result interface
  out.large, out.integral, out.order = x, J, order
  return setmetatable(out, { __index = { report = M.series_report } })
end

--- series:report{format = "text" | "json" | "csv"}: each contribution's standard form
-- and its coefficients (CSV: one row per coefficient).
function M.series_report(sr, opts)
  local rows = {}
  for i, c in ipairs(sr) do
    for k, v in ipairs(c.coefficients) do
      rows[#rows + 1] = { contribution = i, kind = c.kind, at = c.at, phi = c.phi, k = k - 1,
        power = c.powers[k], coefficient = v }
    end
  end
  local list = {}
  for i, c in ipairs(sr) do list[i] = c end
  local other = report_m.format(opts, { contributions = list, large = sr.large, order = sr.order,
    integral = sr.integral }, rows, { "contribution", "kind", "at", "phi", "k", "power", "coefficient" })
  if other then return other end
  local x = sr.large
  local lines = { wrap(tostring(sr.integral), "standard form of ", 4),
    wrap(format("each contribution is e^{%s phi} sum_k c_k %s^(-p_k), %d terms", x, x, sr.order),
      "", 4) }
  for i, c in ipairs(sr) do
    lines[#lines + 1] = wrap(format("%s at %s, phi = %s%s", c.kind, num(c.at), num(c.phi),
      c.order and c.order > 2 and format(" (order %d)", c.order) or ""), format("%d. ", i), 3)
    local t = {}
    for k, v in ipairs(c.coefficients) do
      t[#t + 1] = { tostring(k - 1), format("%.6g", c.powers[k]), num(v, nil, 15) }
    end
    lines[#lines + 1] = report_m.table({ { "k", right = true }, { "p_k", right = true },
      { "c_k" } }, t, nil, 3)
  end
  if #sr == 0 then lines[#lines + 1] = "no contributions" end
  return table.concat(lines, "\n")
end

---------------------------------------------------------------------------------------
-- Verification against quadrature.
---------------------------------------------------------------------------------------

--- check(J, fixed params, list of values of the large parameter, opts) -> report table
function M.check(J, params, values, opts)
  local x = J.large and J.large.name
  local rows = {}
  local order = check_order(opts.order or 4, "check")
  for _, v in ipairs(values) do
    local p = {}
    for k, val in pairs(params) do p[k] = val end
    p[x] = v
    local r = M.expand(J, p, { order = order, region = opts.region, resum = opts.resum })
    local qopts = { region = opts.region }
    for k, val in pairs(p) do qopts[k] = val end
    local q, qe, qinfo = J:quad(qopts)
    local diff = cabs(r.value - q)
    local scale = math.max(cabs(q), 1e-300)
    -- agreement means within the two estimates as stated (1x), with quadrature that
    -- reached its tolerance
    local ok = diff <= r.error + qe and qinfo.status == "ok"
    rows[#rows + 1] = { x = v, expansion = r.value, quad = q, quad_error = qe,
      relative_error = diff / scale, estimated = r.error / scale, agrees = ok,
      ratio = diff / (r.error + qe), stokes = r.stokes, quad_status = qinfo.status,
      method = r.resum and r.resum.method or nil, level = r.resum and r.resum.level or nil }
  end
  -- observed order: slope of log(error) against log|x| (least squares)
  local sx, sy, sxx, sxy, n = 0, 0, 0, 0, 0
  for _, row in ipairs(rows) do
    local ax = cabs(row.x)
    if row.relative_error > 0 and ax > 0 then
      local lx, ly = log(ax), log(row.relative_error)
      sx, sy, sxx, sxy, n = sx + lx, sy + ly, sxx + lx * lx, sxy + lx * ly, n + 1
    end
  end
  local slope
  if n >= 2 and (n * sxx - sx * sx) > 0 then slope = (n * sxy - sx * sy) / (n * sxx - sx * sx) end
  local all = true
  for _, row in ipairs(rows) do all = all and row.agrees end
  local result = { rows = rows, observed_order = slope, verified = all, order = order,
    integral = J, large = x, resum = opts.resum }
  return setmetatable(result, { __index = { report = M.check_report } })
end

function M.check_report(c, opts)
  local cols = { "x", "expansion", "quad", "quad_error", "relative_error", "estimated", "agrees",
    "stokes" }
  if c.resum then cols[#cols + 1] = "method"; cols[#cols + 1] = "level" end
  local other = report_m.format(opts, c, c.rows, cols)
  if other then return other end
  local lines = {}
  local function add(...) lines[#lines + 1] = format(...) end
  lines[#lines + 1] = wrap(tostring(c.integral), "check of ", 4)
  local rows, inaccurate = {}, {}
  for _, r in ipairs(c.rows) do
    local scale = cabs(r.quad)
    local flags = {}
    if not r.agrees then flags[#flags + 1] = "DISAGREES" end
    -- an estimate as large as the value: agreement within it says nothing
    if not (r.estimated < 1) then
      flags[#flags + 1] = "no accuracy"
      inaccurate[#inaccurate + 1] = num(r.x)
    end
    if r.stokes then flags[#flags + 1] = "stokes" end
    if r.method then flags[#flags + 1] = r.method end
    rows[#rows + 1] = { num(r.x), num(r.expansion, r.estimated * scale), num(r.quad, r.quad_error),
      format("%.3g", r.relative_error), format("%.3g", r.estimated), table.concat(flags, " ") }
  end
  lines[#lines + 1] = report_m.table({ { c.large or "x" }, { "expansion" }, { "quadrature" },
    { "rel. error" }, { "estimated" }, { "" } }, rows)
  if c.observed_order then
    add("observed order of the error: %.3g (relative error ~ %s^%.3g)", c.observed_order,
      c.large or "x", c.observed_order)
  end
  if c.verified then
    local worst = 0
    for _, r in ipairs(c.rows) do worst = math.max(worst, r.ratio or 0) end
    lines[#lines + 1] = wrap(format("the expansion with %s terms agrees with quadrature within "
      .. "its error estimate (as stated, 1x) at every point; the largest difference is %.2g "
      .. "of the two estimates together", tostring(c.order), worst), "verified: ", 4)
    if #inaccurate > 0 then
      lines[#lines + 1] = wrap(format("at %s %s the estimated error is not smaller than the value: "
        .. "agreement within it carries no accuracy (marked \"no accuracy\")",
        c.large or "x", table.concat(inaccurate, ", ")), "but: ", 4)
    end
  else
    local worst = 0
    for _, r in ipairs(c.rows) do worst = math.max(worst, r.ratio or 0) end
    lines[#lines + 1] = wrap(format("the expansion and quadrature disagree by more than the "
      .. "error estimates where marked (up to %.3g times them)", worst), "NOT verified: ", 4)
  end
  return table.concat(lines, "\n")
end

return M
