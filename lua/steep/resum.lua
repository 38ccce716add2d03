-- steep.resum — beyond optimal truncation: the contributions of an expansion resummed
-- by Borel-Pade summation (lua/steep/borel.lua) or by hyperasymptotics (re-expansion of
-- the remainder in terminants and hyperterminants, with the adjacent saddles' own series),
-- and Berry's error-function smoothing of the Stokes multiplier.
--
-- Notation. A contribution n (a saddle passed through, or an endpoint) is
--   I_n = e^{F_n} sum_r t_r,   t_r = c_r Gamma(r + mu_n),
-- the terms at the parameters given (mu_n = 1/2 for a simple saddle passed through, 1 + beta
-- for an endpoint with the factor (t - a)^beta). Another saddle or a simple pole m has the
-- singulant sigma = F_n - F_m: the fall from n to m, where the Borel transform of n's
-- series is singular (Berry & Howls, Proc. R. Soc. A 434 (1991) 657-675).
--
-- How a value is accepted (M.apply): each saddle or endpoint of the expansion is resummed
-- by the method asked for (resum = true: Borel-Pade, and hyperasymptotics as well where
-- that left more than 1e-12); the result replaces the optimally truncated value when its
-- estimate is smaller and it agrees with that value within both estimates or, failing
-- that, with the other method (near a Stokes line the truncated series misses the
-- smoothly switched-on subdominant share). Two methods that disagree widen the error to
-- their difference. Residues stay exact; the uniform forms stay, except that two saddles
-- taken together are expanded apart when a method is named (or when that does better).
--
-- The Stokes multiplier (Berry, Proc. R. Soc. A 422 (1989) 7-21; DLMF 2.11(iv)) is here
-- for the decomposition to call on a Stokes line (M.stokes_multiplier).

local complex = require "steep.complex"
local expand = require "steep.expand"
local borel = require "steep.borel"
local core = require "steep.core"

local cnew, cparts = complex.new, complex.parts
local abs, sqrt, exp, log, cos, sin, atan = math.abs, math.sqrt, math.exp, math.log,
  math.cos, math.sin, math.atan
local huge, pi, max, min, floor = math.huge, math.pi, math.max, math.min, math.floor
local format = string.format
local hypot, cdiv = borel.hypot, borel.cdiv

local M = {}

local EPS = 2.220446049250313e-16

local function cabs(z)
  local r, i = cparts(z)
  return hypot(r, i)
end

---------------------------------------------------------------------------------------
-- Berry's smoothing of the Stokes multiplier.
---------------------------------------------------------------------------------------

-- erfc of a real argument from the Faddeeva function: erfc(x) = e^{-x^2} w(ix) for
-- x >= 0 (DLMF 7.2.3), erfc(-x) = 2 - erfc(x) (DLMF 7.4.2).
local function erfc(x)
  if x ~= x then return x end
  local ax = abs(x)
  local v = 0
  if ax < 27 then
    local w = core.cmath.faddeeva(cnew(0, ax))
    v = exp(-ax * ax) * cparts(w)
  end
  if x < 0 then return 2 - v end
  return v
end
M.erfc = erfc

--- stokes_multiplier(singulant [, large]) -> S, sigma
-- Berry's smoothed Stokes multiplier (Proc. R. Soc. A 422 (1989) 7-21, eq. (44); DLMF
-- 2.11(iv)): across a Stokes line the weight of a subdominant contribution m, relative to
-- the dominant one n whose series is truncated near its smallest term, changes as
--   S = (1/2) erfc(-sigma),   sigma = Im(Lambda) / sqrt(2 Re(Lambda)),
-- with Lambda = large * singulant and singulant = F_n - F_m (the dominant exponent minus
-- the subdominant one, so Re Lambda > 0 where m is subdominant; the Stokes line is
-- Im Lambda = 0). S goes from 0 where Im Lambda << 0 to 1 where Im Lambda >> 0 and is 1/2
-- on the line; the caller that knows m's weight on either side, w_minus (Im Lambda < 0)
-- and w_plus, uses w_minus + S (w_plus - w_minus). `large` defaults to 1 (the singulant
-- already includes the large parameter). Accuracy: Berry's form is the leading term of
-- the exact multiplier in 1/|Lambda|^(1/2) (the tests measure it on Ai).
function M.stokes_multiplier(singulant, large)
  local sr, si = cparts(singulant)
  if not sr or sr ~= sr or si ~= si then
    error(format("bad argument #1 to 'stokes_multiplier' (number or complex singulant "
      .. "expected, got %s)", sr and "NaN" or type(singulant)), 2)
  end
  if large ~= nil then
    local lr, li = cparts(large)
    if not lr then
      error(format("bad argument #2 to 'stokes_multiplier' (number or complex value "
        .. "expected, got %s)", type(large)), 2)
    end
    sr, si = sr * lr - si * li, sr * li + si * lr
  end
  if not (sr > 0) then
    error(format("stokes_multiplier: the singulant %s has no positive real part: the "
      .. "contribution it leads to is not subdominant there, and there is no Stokes "
      .. "line to smooth", tostring(cnew(sr, si))), 2)
  end
  local sigma = si / sqrt(2 * sr)
  return 0.5 * erfc(-sigma), sigma
end

---------------------------------------------------------------------------------------
-- The series of a contribution, as classes of terms c_r Gamma(r + mu).
---------------------------------------------------------------------------------------

local MAX_DEGREE = 30         -- Pade degrees tried up to [30/30]: 61 coefficients a class
-- A resummed value's own checks (Pade degrees that agree, the terminants' levels, the
-- coefficients moved by their errors) have been seen to pass while the value was off by
-- up to 6e-13 relative (Pearcey's saddles at +-1, l = 34.6, against quadrature along
-- their own paths; a random scan of thirteen families): a relative floor, measured.
local RELATIVE_FLOOR = 1e-12

-- The raw coefficients of a contribution and its classes: a list of
-- {fr, fi (the factor), mu, cr, ci (coefficients c_r, 0-based), count}, and e^{F0}.
-- Saddle of order m with ray weights c_k: the terms a_n Gamma((n+1)/m)/m sum_k c_k
-- omega_k^(n+1) (lua/steep/expand.lua) grouped by n mod m = j: factor
-- sum_k c_k omega_k^(j+1) / m, mu = (j+1)/m, c_r = a_(rm + j).
local function classes_of(J, params, c, count)
  if c.weights then
    local m = c.order
    local nraw = min(m * count, core.max_order - m - 1)
    local a, F0, _, _, _, aerr = expand.saddle_series(J, params, c.at, m, nraw)
    local total = 0
    for _, w in ipairs(c.weights) do total = total + abs(w) end
    local classes = {}
    for j = 0, m - 1 do
      local fr, fi = 0, 0
      for k, w in ipairs(c.weights) do
        if w ~= 0 then
          local ang = 2 * pi * (k - 1) * (j + 1) / m
          fr, fi = fr + w * cos(ang) / m, fi + w * sin(ang) / m
        end
      end
      if hypot(fr, fi) > 1e-12 * total then
        local cr, ci, er = {}, {}, {}
        local n = 0
        for r = 0, nraw do
          local v = a[r * m + j]
          if not v then break end
          cr[r], ci[r] = cparts(v)
          er[r] = aerr and aerr[r * m + j] or 0
          n = r + 1
        end
        classes[#classes + 1] = { fr = fr, fi = fi, mu = (j + 1) / m, cr = cr, ci = ci,
          er = er, count = n }
      end
    end
    return classes, F0
  end
  local b, Fa, beta, berr = expand.endpoint_series(J, params, c.at, min(count, core.max_order - 2))
  if not b then return nil end
  local cr, ci, er = {}, {}, {}
  local n = 0
  for r = 0, count - 1 do
    if not b[r] then break end
    cr[r], ci[r] = cparts(b[r])
    er[r] = berr and berr[r] or 0
    n = r + 1
  end
  return { { fr = c.weight, fi = 0, mu = 1 + (beta or 0), cr = cr, ci = ci, er = er,
    count = n } }, Fa
end

-- The singulants of a contribution at F0: the falls F0 - F to every other saddle and to
-- every singular point where F is finite (poles and branch points of the amplitude).
local function singulants_of(J, params, L, F0, at)
  local list = {}
  for j, s in ipairs(L.saddles) do
    if cabs(s.at - at) > 1e-9 * L.region.radius then
      local d = F0 - s.F
      local re, im = cparts(d)
      list[#list + 1] = { re = re, im = im, what = format("saddle %d at %s", j, tostring(s.at)),
        kind = "saddle", index = j }
    end
  end
  for j, s in ipairs(L.singularities) do
    if s.kind == "pole" or s.kind == "branch" then
      local ok, F = pcall(J.tape.eval, J.tape, s.at, params)
      local re, im = cparts(ok and F or 0 / 0)
      if ok and re == re and im == im and abs(re) < huge and abs(im) < huge then
        local dr, di = cparts(F0 - F)
        list[#list + 1] = { re = dr, im = di,
          what = format("%s at %s", s.kind, tostring(s.at)), kind = s.kind, index = j }
      end
    end
  end
  return list
end

---------------------------------------------------------------------------------------
-- Borel-Pade.
---------------------------------------------------------------------------------------

local function by_borel(J, params, L, c)
  local classes, F0 = classes_of(J, params, c, 2 * MAX_DEGREE + 2)
  if not classes then return nil, "no series at this endpoint" end
  local sing = singulants_of(J, params, L, F0, c.at)
  local s = borel.sum({ classes = classes, singulants = sing, max_degree = MAX_DEGREE,
    median = c.on_stokes_line })
  local scale = complex.apply("exp", F0)
  local value = cnew(s.re, s.im) * scale
  local err = s.error * cabs(scale)
  -- the coefficients' own errors: the Pade approximants of two degrees share them, so
  -- their agreement cannot show them (past a few dozen terms a coefficient may be below
  -- its error); the sum again with every coefficient moved by its estimated error (signs
  -- alternating), the change added
  local moved = {}
  for k, cl in ipairs(classes) do
    local cr2, ci2 = {}, {}
    for r = 0, cl.count - 1 do
      local e = (cl.er and cl.er[r] or 0) * (r % 2 == 0 and 1 or -1)
      local mag = hypot(cl.cr[r], cl.ci[r])
      local f = mag > 0 and 1 + e / mag or 1
      cr2[r], ci2[r] = cl.cr[r] * f, cl.ci[r] * f
      if mag == 0 then cr2[r] = e end
    end
    moved[k] = { fr = cl.fr, fi = cl.fi, mu = cl.mu, cr = cr2, ci = ci2, count = cl.count }
  end
  local s2 = borel.sum({ classes = moved, singulants = sing, max_degree = MAX_DEGREE,
    median = c.on_stokes_line })
  err = err + hypot(s2.re - s.re, s2.im - s.im) * cabs(scale) + RELATIVE_FLOOR * cabs(value)
  -- e^{F0} carries the rounding of F0 itself
  err = err + (16 + cabs(F0)) * EPS * cabs(value)
  local detail = format("Borel-Pade [%d/%d]", s.degree, s.degree)
  if s.lateral and #s.theta == 2 then
    detail = detail .. format(", median of the lateral sums along rays %.2f and %.2f",
      s.theta[1], s.theta[2])
  elseif s.lateral then
    detail = detail .. ", along the real axis through a singulant (no clear ray beside it)"
  elseif s.theta[1] ~= 0 then
    detail = detail .. format(", Laplace integral along the ray at angle %.2f", s.theta[1])
  end
  local notes = s.notes
  if s.nearest then
    local near = cnew(s.nearest.re, s.nearest.im)
    if s.matched then
      notes[#notes + 1] = format("the nearest singularity of the Borel transform (%s) is "
        .. "the singulant of the %s", tostring(near), s.matched)
    elseif #sing > 0 then
      notes[#notes + 1] = format("the nearest singularity of the Borel transform (%s) is "
        .. "none of the landscape's singulants (a branch on another sheet of a logarithm?)",
        tostring(near))
    end
  end
  if s.lateral then
    notes[#notes + 1] = "a singulant lies on the Laplace ray (a Stokes line): the value is "
      .. "the median of the two lateral sums, which is right when the subdominant saddle's "
      .. "weight is the mean of its weights on either side"
  end
  return { value = value, error = err, method = "borel", level = s.degree, detail = detail,
    notes = notes, poles = s.poles }
end

---------------------------------------------------------------------------------------
-- Hyperasymptotics.
---------------------------------------------------------------------------------------

local hyper = require "steep.hyper"

-- The terms t_r = factor c_r Gamma(r + mu) of a contribution with a single class (a
-- simple saddle passed through, an endpoint), 0-based, and mu; nil for several classes.
local function single_class_terms(J, params, c, count)
  local classes, F0 = classes_of(J, params, c, count)
  if not classes or #classes ~= 1 then return nil end
  local cl = classes[1]
  local f = cnew(cl.fr, cl.fi)
  local terms = {}
  for r = 0, cl.count - 1 do
    terms[r] = f * cnew(cl.cr[r], cl.ci[r]) * expand.gamma(r + cl.mu)
  end
  return { terms = terms, count = cl.count, mu = cl.mu, F = F0 }
end

-- The points a series can resurge from, with their own series: every simple saddle (its
-- steepest descent path through it, in along ray 2 and out along ray 1) and every simple
-- pole with a residue (its whole contribution is the one term 2 pi i Res e^{-F}).
-- Kept in L for the contributions of one expansion.
local function resurgent_points(J, params, L, count)
  if L._resurgent then return L._resurgent end
  local pts = {}
  for j, s in ipairs(L.saddles) do
    if s.order == 2 then
      local ok, sc = pcall(single_class_terms, J, params,
        { weights = { 1, -1 }, order = 2, at = s.at }, count)
      if ok and sc then
        sc.kind, sc.at, sc.index = "saddle", s.at, j
        sc.what = format("saddle %d at %s", j, tostring(s.at))
        pts[#pts + 1] = sc
      end
    end
  end
  for j, s in ipairs(L.singularities) do
    if s.kind == "pole" and s.order == 1 and s.residue then
      local ok, F = pcall(J.tape.eval, J.tape, s.at, params)
      if ok and cabs(F) < huge then
        pts[#pts + 1] = { kind = "pole", at = s.at, index = j, F = F, mu = 0, count = 1,
          exact = true, terms = { [0] = cnew(0, 2 * pi) * s.residue * complex.apply("exp", -F) },
          what = format("pole at %s", tostring(s.at)) }
      end
    end
  end
  L._resurgent = pts
  return pts
end

-- Adjacency from the landscape (Berry & Howls 1991, sec. 3): p is adjacent to the point
-- `at` (a saddle, or an endpoint of the contour) when, with the exponent turned to the
-- Stokes phase of the pair (e^{i theta} (F - F_p) real and positive), the steepest descent
-- path from `at` runs into p: it ends at the saddle p, or passes through the pole p.
-- Returns true or false, or nil where the turned landscape could not be traced. Each
-- pair is traced once per landscape.
local function connected(J, params, L, at, F, is_saddle, p)
  L._connected = L._connected or {}
  local key = format("%a,%a", cparts(at)) .. format(";%a,%a", cparts(p.at))
  local known = L._connected[key]
  if known then return ({ yes = true, no = false })[known] end
  local ok, result = pcall(function()
    local landscape = require "steep.landscape"
    local sigma = F - p.F
    local th = -atan(select(2, cparts(sigma)), (cparts(sigma)))
    local turn = cnew(cos(th), sin(th))
    local Jt = require("steep.integral").new { var = J.var, exponent = turn * J.exponent,
      amplitude = J.amplitude, contour = J.contour, large = J.large }
    local Lt = Jt:_landscape(params, L.region, false)
    local R = L.region.radius
    local paths = {}
    if is_saddle then
      for j, sd in ipairs(Lt.saddles) do
        if cabs(sd.at - at) <= 1e-8 * R then paths = landscape.saddle_paths(Jt, params, Lt, j).descent end
      end
    else
      local Ft = Jt.tape:eval(at, params)
      paths = { landscape.trace(Jt, params, Lt, at, Ft, true, { ref = (cparts(Ft)) }) }
    end
    if #paths == 0 then return nil end
    for _, path in ipairs(paths) do
      if p.kind == "saddle" then
        local k = path.ends:match("^saddle (%d+)$")
        if k and cabs(Lt.saddles[tonumber(k)].at - p.at) <= 1e-6 * R then return true end
      elseif #path.points >= 2 and core.distance(path.points, p.at) <= 1e-3 * R then
        -- (through the pole, within the chord error of the traced polyline: at the
        -- Stokes phase the exact path runs through it, and no other point is that close)
        return true
      end
    end
    return false
  end)
  if not ok then result = nil end
  L._connected[key] = result == true and "yes" or (result == false and "no" or "unknown")
  return result
end

-- The candidates for a series at F (at the point `at`): every other resurgent point,
-- with sigma = F - F_m and whether the landscape connects them; each saddle's own
-- candidates (for level 2) likewise.
local function candidates(J, params, L, pts, F, at, is_saddle, depth)
  local R = L.region.radius
  local list = {}
  for _, p in ipairs(pts) do
    if cabs(p.at - at) > 1e-9 * R then
      local c = setmetatable({ sigma = F - p.F }, { __index = p })
      c.connected = connected(J, params, L, at, F, is_saddle, p)
      if depth > 0 and p.kind == "saddle" and c.connected ~= false then
        c.cands = candidates(J, params, L, pts, p.F, p.at, true, depth - 1)
      end
      list[#list + 1] = c
    end
  end
  return list
end

local function by_hyper(J, params, L, c)
  local count = 2 * MAX_DEGREE + 2
  local n = single_class_terms(J, params, c, count)
  if not n then return nil, "hyperasymptotics here needs a simple saddle passed through or an endpoint" end
  n.median = c.on_stokes_line
  local pts = resurgent_points(J, params, L, count)
  local cands = candidates(J, params, L, pts, n.F, c.at, c.weights ~= nil, 1)
  local h, why = hyper.sum(n, cands)
  if not h then return nil, why end
  local scale = complex.apply("exp", n.F)
  local value = h.value * scale
  local err = h.error * cabs(scale) + (16 + cabs(n.F)) * EPS * cabs(value)
    + RELATIVE_FLOOR * cabs(value)
  local adj = {}
  for _, a in ipairs(h.adjacent) do
    adj[#adj + 1] = format("%s (singulant %s, Stokes constant %s%s)", a.what, tostring(a.sigma),
      tostring(a.K), a.connected and ", reached by the steepest path at the Stokes phase"
        or ", not traced")
  end
  local detail = format("hyperasymptotic level %d, %d terms of its own series; adjacent: %s",
    h.level, h.N0, table.concat(adj, "; "))
  return { value = value, error = err, method = "hyper", level = h.level, detail = detail,
    notes = h.notes, adjacent = h.adjacent }
end

---------------------------------------------------------------------------------------
-- Applying a method to an expansion.
---------------------------------------------------------------------------------------

local METHODS = { borel = by_borel, hyper = by_hyper }

--- check_option(v, fname, order) -> true | "hyper" | "borel" | nil: the option `resum`
-- (which works from the optimally truncated series: any other order is an error).
function M.check_option(v, fname, order)
  if v == nil or v == false then return nil end
  if v ~= true and v ~= "hyper" and v ~= "borel" then
    error(format("%s: option 'resum' must be true, \"hyper\" or \"borel\", got %s", fname,
      tostring(v)), 3)
  end
  if order ~= nil and order ~= "optimal" then
    error(format("%s: option 'resum' starts from the optimally truncated series: give "
      .. "order = \"optimal\" (or leave 'order' out), got order = %s", fname, tostring(order)), 3)
  end
  return v
end

-- A simple saddle's own contribution, optimally truncated, as lua/steep/asymptotics.lua
-- builds it (used where the expansion took two saddles together in a uniform form).
local function plain_saddle(J, params, s, rays)
  local c = { 0, 0 }
  for _, piece in ipairs(rays) do c[piece.ray] = c[piece.ray] + piece.weight end
  if c[1] == 0 and c[2] == 0 then return nil end
  local nraw = 120
  local a, F0 = expand.saddle_series(J, params, s.at, 2, nraw)
  local terms = expand.saddle_terms(a, F0, 2, c, nraw)
  local scale = complex.apply("exp", F0)
  local value, err, used = expand.truncate(terms, "optimal", scale, cabs(F0))
  return { kind = "saddle", at = s.at, order = 2, weights = c, F = F0, value = value,
    error = err, used = used, terms = { terms[1] * scale }, dominance = cparts(F0) }
end

-- One contribution: the method's value replaces the optimally truncated one when its
-- error estimate is smaller and it is confirmed: it agrees with the truncated value
-- within both estimates, or, where it does not, the other method agrees with it. (They
-- all estimate one number. Near a Stokes line the truncated series misses the smoothly
-- switched-on share of the subdominant contribution, which can exceed its smallest
-- term, so a disagreement with it alone proves nothing; two independent resummations
-- that agree do.) Where two methods ran and disagree beyond their estimates, the
-- difference is added to the error.
local function run(name, J, params, L, c, why)
  local ok, r, whynot = pcall(METHODS[name], J, params, L, c)
  if not ok then why[#why + 1] = name .. " failed: " .. tostring(r); return nil end
  if not r then why[#why + 1] = name .. ": " .. tostring(whynot); return nil end
  if not (r.error < huge) then why[#why + 1] = name .. ": no error estimate"; return nil end
  return r
end

local function resum_one(J, params, L, c, how)
  c.truncated = { value = c.value, error = c.error, used = c.used }
  if c.kind == "pole" then
    c.method, c.level = "exact", 0
    return
  end
  if c.kind:match("uniform") then
    c.method, c.level = "uniform form", 0
    c.resum_note = "a uniform form: not resummed"
    return
  end
  if c.unsettled then
    -- on a Stokes line the decomposition took the mean of the two sides' contributions
    -- (Berry's multiplier 1/2): its series is not one thimble's
    c.method, c.level = "optimal truncation", 0
    c.resum_note = "on a Stokes line, the mean of the two sides: not resummed"
    return
  end
  c.method, c.level = "optimal truncation", 0
  if not (c.weights or c.kind:match("^endpoint")) then return end
  local why = {}
  local first = how == true and "borel" or how
  local other = first == "borel" and "hyper" or "borel"
  local a = run(first, J, params, L, c, why)
  local b
  local function agrees_with_truncation(r)
    return cabs(r.value - c.value) <= 3 * (r.error + c.error)
  end
  -- the second method: as a referee where the first disagrees with the truncated series,
  -- and (how = true) where the first left more than 1e-12 relative beyond the floor
  if a and not agrees_with_truncation(a) then
    b = run(other, J, params, L, c, why)
  elseif how == true and not (a and a.error <= (1e-12 + RELATIVE_FLOOR) * cabs(a.value)) then
    b = run(other, J, params, L, c, why)
  end
  local best
  if a and b then
    local d = cabs(a.value - b.value)
    local consistent = d <= a.error + b.error
    best = (b.error < a.error and how == true) and b or a
    if consistent then
      if not agrees_with_truncation(best) then
        why[#why + 1] = format("the optimally truncated value is %.3g off, beyond its estimate "
          .. "(near a Stokes line that estimate misses the subdominant share); Borel-Pade and "
          .. "hyperasymptotics agree", cabs(best.value - c.value))
      end
    elseif agrees_with_truncation(a) or agrees_with_truncation(b) then
      -- the one the truncated series confirms (of two, the smaller estimate where the
      -- caller let either be chosen), its error widened by their difference
      local ok_a, ok_b = agrees_with_truncation(a), agrees_with_truncation(b)
      if ok_a and ok_b then
        best = (how == true and b.error < a.error) and b or a
      else
        best = ok_a and a or b
      end
      best.error = best.error + d
      why[#why + 1] = format("Borel-Pade and hyperasymptotics differ by %.3g, beyond their "
        .. "estimates: the error is widened to that", d)
    else
      best = nil
      why[#why + 1] = format("Borel-Pade and hyperasymptotics disagree with each other (by "
        .. "%.3g) and with the truncated series: neither is used", d)
    end
  elseif a then
    if agrees_with_truncation(a) then
      best = a
    else
      why[#why + 1] = format("%s disagrees with the truncated series by %.3g (estimates %.3g "
        .. "and %.3g) and no second method could referee: not used", a.method,
        cabs(a.value - c.value), a.error, c.error)
    end
  end
  if best and best.error < c.error then
    c.value, c.error = best.value, best.error
    c.method, c.level, c.resummed = best.method, best.level, best
  elseif best then
    why[#why + 1] = format("%s did not improve on optimal truncation (estimate %.3g)",
      best.method, best.error)
  end
  if #why > 0 then c.resum_note = table.concat(why, "; ") end
end

-- Two saddles the expansion took together (the Airy-type uniform form): each expanded
-- on its own and resummed. Returns the list of the two, or nil and why; with how = true
-- only when their estimates together beat the uniform form's and agree with it.
local function split_pair(J, params, L, c, how)
  local parts_ = {}
  for _, p in ipairs(c.pair) do
    local ok, pc = pcall(plain_saddle, J, params, p.saddle, p.rays)
    if not ok then return nil, "the saddles' own series failed: " .. tostring(pc) end
    if pc then
      pc.on_stokes_line = c.on_stokes_line
      resum_one(J, params, L, pc, how)
      if not pc.resummed then
        return nil, "the saddle at " .. tostring(pc.at) .. " could not be resummed ("
          .. tostring(pc.resum_note) .. ")"
      end
      parts_[#parts_ + 1] = pc
    end
  end
  if #parts_ == 0 then return nil, "neither saddle carries weight" end
  local v, e = cnew(0, 0), 0
  for _, pc in ipairs(parts_) do v, e = v + pc.value, e + pc.error end
  if how == true then
    if not (e < c.error) then
      return nil, format("the uniform form's estimate (%.3g) is smaller than the resummed "
        .. "saddles' (%.3g)", c.error, e)
    end
    if cabs(v - c.value) > 3 * (e + c.error) then
      return nil, format("the resummed saddles disagree with the uniform form by %.3g",
        cabs(v - c.value))
    end
  end
  return parts_
end

--- apply(J, params, L, contributions, how [, on_stokes_line]) -> summary: replaces the value and error of
-- every contribution that a method improves (the truncated ones stay in c.truncated),
-- and says which method each used. Two saddles taken together in a uniform form are
-- expanded apart and resummed when a method is named (how = "borel" or "hyper"), or
-- when that beats the uniform form (how = true).
function M.apply(J, params, L, contributions, how, on_stokes_line)
  local methods, level = {}, 0
  local out = {}
  for _, c in ipairs(contributions) do
    -- (on a Stokes line the Laplace integrals take the mean of the two lateral sums, as
    -- the decomposition takes the mean of the two sides; off it the one lateral sum on
    -- the decomposition's side)
    c.on_stokes_line = on_stokes_line or nil
    local split, why
    -- (a pair's pieces carry one side's weights: a contribution that is the mean of the
    -- two sides of a Stokes line is not split)
    if c.pair and not c.unsettled then split, why = split_pair(J, params, L, c, how) end
    c.pair = nil   -- (the decomposition's pieces: not part of the result)
    if split then
      for _, pc in ipairs(split) do out[#out + 1] = pc end
    else
      resum_one(J, params, L, c, how)
      if why then c.resum_note = why end
      out[#out + 1] = c
    end
  end
  for k = #contributions, 1, -1 do contributions[k] = nil end
  for k, c in ipairs(out) do contributions[k] = c; c.on_stokes_line = nil end
  for _, c in ipairs(contributions) do
    if c.method ~= "exact" then methods[c.method] = true end
    if c.resummed then level = max(level, c.level) end
  end
  local names = {}
  for k in pairs(methods) do names[#names + 1] = k end
  table.sort(names)
  return { requested = how, method = #names == 1 and names[1] or table.concat(names, " + "),
    level = level }
end

--- describe(c) -> one line on how a contribution was resummed (for reports).
function M.describe(c)
  if c.resummed then
    return format("resummed: %s, error %.3g (optimal truncation: %s, error %.3g, %d terms)",
      c.resummed.detail, c.error, tostring(c.truncated.value), c.truncated.error,
      c.truncated.used or 0)
  end
  if c.resum_note then return "not resummed: " .. c.resum_note end
  return nil
end

return M
