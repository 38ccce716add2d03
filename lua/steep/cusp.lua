-- steep.cusp — the uniform expansion for three saddles near each other: the cusp
-- (the method of Chester, Friedman & Ursell with a quartic model: Connor & Farrelly,
-- J. Chem. Phys. 75 (1981); the model integral is Pearcey's, Paris, Proc. R. Soc. A 432
-- (1991); Bleistein's reduction for the higher terms, Bleistein & Handelsman 1975, ch. 9).
-- Its companion for two saddles is steep.coalesce; steep.asymptotics decides which applies.
--
-- The quartic map F(t) = A + P(u), P(u) = -(u^4/4 - zeta u^2/2 + eta u), sends the three
-- saddles t1, t2, t3 to the roots u1, u2, u3 of P'(u) = -(u^3 - zeta u + eta) and their
-- values to F_j = A + P(u_j). With G(u) = g(t(u)) t'(u):
--   G = p0 + p1 u + p2 u^2 + (u^3 - zeta u + eta) H0(u),   H0' = (the same again), ...
-- and, integrating by parts ((u^3 - zeta u + eta) e^P = -(e^P)'), the integral is
--   e^A sum_k (p0_k I0 + p1_k I1 + p2_k I2),   I_m = integral over Gamma of u^m e^{P(u)} du,
-- over the model contour Gamma that the three saddles' rays map to: a combination of
-- paths between the model's four valleys (about the directions 0, pi/2, pi, 3pi/2). The
-- model integrals (Pearcey's function and its first two moments, in this normal form)
-- come from the library's own quadrature of the model integral along its steepest
-- descent paths, with its error estimate. The form stays continuous as zeta, eta -> 0,
-- where the plain expansion of each saddle blows up.

local core = require "steep.core"
local complex = require "steep.complex"
local landscape = require "steep.landscape"

local cnew, cparts = complex.new, complex.parts
local cabs, carg, expi = landscape.cabs, landscape.carg, landscape.expi
local format, pi, huge, max, min = string.format, math.pi, math.huge, math.max, math.min
local EPS = 2.220446049250313e-16

local M = {}

-- Three saddles are taken together when every two of them are within the pair form's
-- scale: |F_j - F_k| at most what |zeta| < coalesce.ZETA_RADIUS = 4 allows a pair,
-- |F1 - F2| = (4/3) |zeta|^(3/2) < 32/3 (and the quartic map must fit them).
M.SPREAD = 32 / 3

local function csqrt(z) return complex.apply("sqrt", z) end
local function cexp(z) return complex.apply("exp", cnew(cparts(z))) end

-- The model and its second derivative.
local function P(map, u) return -(u * (u * (0.25 * u * u - 0.5 * map.zeta) + map.eta)) end
local function d2P(map, u) return -(3 * u * u - map.zeta) end

-- P(u_j) - P(u_k) = -(u_j - u_k)^3 u_l / 4 for the roots {j, k, l} = {1, 2, 3} (the
-- integral of P' = -(u - u1)(u - u2)(u - u3) from u_k to u_j, with u1 + u2 + u3 = 0).
local function value_gap(uj, uk, ul)
  local d = uj - uk
  return -(d * d * d) * ul / 4
end

-- Newton's method for the roots u1, u2 (u3 = -u1 - u2) that give the saddles' values:
-- P(u1) - P(u2) = F1 - F2, P(u1) - P(u3) = F1 - F3; damped (a step is halved until the
-- residual falls). Returns u1, u2, the residual, and the magnitudes of the inverse
-- Jacobian's entries (how rounding of the F's moves the roots), or nil.
local function solve_roots(u1, u2, d12, d13, tol)
  local function residual(a, b)
    local c = -a - b
    return value_gap(a, b, c) - d12, value_gap(a, c, b) - d13
  end
  local r1, r2 = residual(u1, u2)
  local rn = cabs(r1) + cabs(r2)
  local inv
  for _ = 1, 100 do
    local u3 = -u1 - u2
    local d, e = u1 - u2, u1 - u3
    -- the Jacobian of (r1, r2) in (u1, u2)
    local a11 = -(d * d) * (3 * u3 - d) / 4
    local a12 = (d * d) * (3 * u3 + d) / 4
    local a21 = -1.5 * (e * e) * u2
    local a22 = -(e * e) * (3 * u2 + e) / 4
    local det = a11 * a22 - a12 * a21
    if cabs(det) == 0 then return nil end
    inv = { cabs(a22 / det), cabs(a12 / det), cabs(a21 / det), cabs(a11 / det) }
    if rn <= tol then return u1, u2, rn, inv end
    local s1 = (a22 * r1 - a12 * r2) / det
    local s2 = (a11 * r2 - a21 * r1) / det
    local lam, accepted = 1, false
    for _ = 1, 30 do
      local n1, n2 = u1 - lam * s1, u2 - lam * s2
      local q1, q2 = residual(n1, n2)
      local qn = cabs(q1) + cabs(q2)
      if qn < rn then
        u1, u2, r1, r2, rn, accepted = n1, n2, q1, q2, qn, true
        break
      end
      lam = lam / 2
    end
    if not accepted then
      -- no step lowers the residual: at rounding already, or stuck
      if rn <= 64 * tol then return u1, u2, rn, inv end
      return nil
    end
  end
  if rn <= 64 * tol then return u1, u2, rn, inv end
  return nil
end

--- quartic_map(s1, s2, s3) -> map or nil, why. The map of the three saddles (landscape
-- entries with at, F, F2) onto the model: A, zeta, eta, the roots u[j] (u[j] is the image
-- of s_j), t'(u_j) as tp[j], and what rounding of the F's does to zeta and eta (dzeta,
-- deta). Started from the linear map that is exact when F is a quartic: with F'(t) ~
-- c (t - t1)(t - t2)(t - t3) (c from F'' at the saddles), t = tc + alpha u with
-- c alpha^4 = -1 about the centroid tc; then Newton's method on the saddles' values.
function M.quartic_map(s1, s2, s3)
  local S = { s1, s2, s3 }
  local csum = cnew(0, 0)
  for j = 1, 3 do
    local prod = cnew(1, 0)
    for k = 1, 3 do if k ~= j then prod = prod * (S[j].at - S[k].at) end end
    if cabs(prod) == 0 then return nil, "two of the saddles coincide" end
    csum = csum + S[j].F2 / prod
  end
  local c = csum / 3
  if not (cabs(c) > 0 and cabs(c) < huge) then return nil, "F'' gives no quartic scale" end
  local m4 = -1 / c
  local alpha = cabs(m4) ^ 0.25 * expi(carg(m4) / 4)
  local tc = (s1.at + s2.at + s3.at) / 3
  local u0 = {}
  for j = 1, 3 do u0[j] = (S[j].at - tc) / alpha end
  -- (the guess's roots must sum to 0: they do, up to rounding)
  local Fsize = cabs(s1.F) + cabs(s2.F) + cabs(s3.F)
  local tol = 8 * EPS * Fsize
  local u1, u2, rn, inv = solve_roots(u0[1], u0[2], s1.F - s2.F, s1.F - s3.F, tol)
  if not u1 then return nil, "Newton's method for the quartic map did not converge" end
  local u = { u1, u2, -u1 - u2 }
  local zeta = u1 * u1 + u1 * u2 + u2 * u2
  local eta = u1 * u2 * (u1 + u2)
  local map = { zeta = zeta, eta = eta, u = u }
  local A = cnew(0, 0)
  for j = 1, 3 do A = A + (S[j].F - P(map, u[j])) end
  map.A = A / 3
  -- t'(u_j)^2 = P''(u_j) / F''(t_j); the sign nearest the chords to the other two saddles.
  -- The map fits when each chord's slope (t_j - t_k)/(u_j - u_k) is near both ends'
  -- t' (as coalesce.cubic_map asks of a pair).
  map.tp = {}
  for j = 1, 3 do
    local tp = csqrt(d2P(map, u[j]) / S[j].F2)
    local chord = cnew(0, 0)
    for k = 1, 3 do if k ~= j then chord = chord + (S[j].at - S[k].at) / (u[j] - u[k]) end end
    if cabs(-tp - chord) < cabs(tp - chord) then tp = -tp end
    map.tp[j] = tp
  end
  local score = 0
  for j = 1, 2 do
    for k = j + 1, 3 do
      local chord = (S[j].at - S[k].at) / (u[j] - u[k])
      score = max(score, (cabs(map.tp[j] - chord) + cabs(map.tp[k] - chord)) / cabs(chord))
    end
  end
  map.score = score
  if not (score <= 0.5) then return nil, format("the quartic map does not fit (score %.3g)", score) end
  -- rounding: each value difference carries about 4 eps sum|F| (plus the residual left);
  -- through the inverse Jacobian to the roots, and on to zeta = u1^2 + u1 u2 + u2^2 and
  -- eta = u1 u2 (u1 + u2)
  local dD = 4 * EPS * Fsize + rn
  local du1, du2 = (inv[1] + inv[2]) * dD, (inv[3] + inv[4]) * dD
  map.dzeta = cabs(2 * u1 + u2) * du1 + cabs(u1 + 2 * u2) * du2
  map.deta = cabs(2 * u1 * u2 + u2 * u2) * du1 + cabs(u1 * u1 + 2 * u1 * u2) * du2
  map.dA = 4 * EPS * Fsize
  return map
end

---------------------------------------------------------------------------------------
-- The model contour: which valleys the three saddles' rays end in.
---------------------------------------------------------------------------------------

-- The model and its derivative at u = (x, y) in real arithmetic (the path following below
-- evaluates them some hundreds of times: complex values as tables would allocate at
-- every operation). zr, zi, er, ei: zeta and eta.
local function P_dP(x, y, zr, zi, er, ei)
  local x2, y2 = x * x - y * y, 2 * x * y                    -- u^2
  local ar, ai = 0.25 * x2 - 0.5 * zr, 0.25 * y2 - 0.5 * zi  -- u^2/4 - zeta/2
  local br, bi = x * ar - y * ai + er, x * ai + y * ar + ei  -- u (u^2/4 - zeta/2) + eta
  local pr, pi_ = -(x * br - y * bi), -(x * bi + y * br)     -- P = -u (...)
  local cr, ci = x2 - zr, y2 - zi                            -- u^2 - zeta
  local dr, di = -(x * cr - y * ci + er), -(x * ci + y * cr + ei)   -- P' = -(u^3 - zeta u + eta)
  return pr, pi_, dr, di
end

-- The valley (0..3, about the direction k pi/2) in which the model's steepest descent path
-- from the root u[j], leaving along the descent direction nearest the angle `dir`, ends.
-- Followed by continuation of P(u) = P(u_j) - s for growing s > 0 (the path is where P
-- falls with its imaginary part fixed), each step from the Euler predictor corrected by
-- Newton's method and kept only if it lands near the predictor; until |u| is so large that
-- u^4/4 dominates and arg u lies within pi/8 of a valley's direction. A path that runs
-- into another root k (the model on a Stokes line) goes on from there along the descent
-- direction of u_k that side(k) gives (the unit vector along +-sqrt(-2/P''(u_k))), or
-- fails. (`hd`: the unit descent direction to leave u_j along, instead of `dir`.)
local function follow(map, j, dir, hd, side, depth)
  if depth > 3 then return nil, "the model's path runs through too many saddles" end
  local uj = map.u[j]
  if not hd then
    local h = csqrt(-2 / d2P(map, uj))   -- P(uj + r h) ~ P(uj) - r^2
    hd = h / cabs(h)
    if math.cos(carg(hd) - dir) < 0 then hd = -hd end
  end
  local sep = huge
  for k = 1, 3 do if k ~= j then sep = min(sep, cabs(map.u[k] - uj)) end end
  local scale = max(cabs(map.zeta) ^ 0.5, cabs(map.eta) ^ (1 / 3), 1e-300)
  if sep == huge or sep == 0 then sep = scale end
  local far = 3 + 2 * cabs(map.zeta) ^ 0.5 + 2 * cabs(map.eta) ^ (1 / 3)
  local zr, zi = cparts(map.zeta)
  local er, ei = cparts(map.eta)
  local Pr, Pi = cparts(P(map, uj))
  local roots = {}
  for k = 1, 3 do roots[k] = { cparts(map.u[k]) } end
  -- Newton's method for P(u) = (tr, ti) from (x, y)
  local function correct(x, y, tr, ti)
    for _ = 1, 12 do
      local pr, pi_, dr, di = P_dP(x, y, zr, zi, er, ei)
      local d2 = dr * dr + di * di
      if d2 == 0 then return nil end
      local nr, ni = pr - tr, pi_ - ti
      local sr, si = (nr * dr + ni * di) / d2, (ni * dr - nr * di) / d2
      x, y = x - sr, y - si
      if math.abs(sr) + math.abs(si) <= 1e-10 * (math.abs(x) + math.abs(y) + scale) then
        return x, y
      end
    end
    return x, y
  end
  local hx, hy = cparts(hd)
  local ux, uy = cparts(uj)
  local x, y = ux + 0.05 * sep * hx, uy + 0.05 * sep * hy
  local s = Pr - (P_dP(x, y, zr, zi, er, ei))
  local ds = s
  x, y = correct(x, y, Pr - s, Pi)
  if not x then return nil, "the model's path could not be followed" end
  -- the values s at which the path could run into another root: P(u_k) on the path's
  -- line of values, below P(u_j) (a connection, to rounding). The steps approach each such
  -- s geometrically and never pass it; there, the path either is next to u_k (it runs into
  -- it: go on along u_k's descent direction on the original's side) or is elsewhere (the
  -- value is reached on another branch: carry on).
  local caps = {}
  for k = 1, 3 do
    if k ~= j then
      local gr, gi = cparts(P(map, map.u[k]) - P(map, uj))
      if gr < 0 and math.abs(gi) <= 1e-6 * (math.abs(gr) + math.sqrt(Pr * Pr + Pi * Pi)) then
        caps[#caps + 1] = { s = -gr, k = k }
      end
    end
  end
  table.sort(caps, function(p, q) return p.s < q.s end)
  for _ = 1, 4000 do
    while caps[1] and caps[1].s - s <= 1e-9 * caps[1].s do
      local k = caps[1].k
      table.remove(caps, 1)
      local rx, ry = roots[k][1], roots[k][2]
      if math.sqrt((x - rx) ^ 2 + (y - ry) ^ 2) < 0.1 * sep then
        local sk = side and side(k)
        if not sk then return nil, "the model's path runs into another saddle" end
        return follow(map, k, nil, sk, side, depth + 1)
      end
    end
    local ar = math.sqrt(x * x + y * y)
    if ar >= far and not caps[1] then
      local th = math.atan(y, x)
      local k = math.floor(th / (pi / 2) + 0.5) % 4
      if math.abs(landscape.norm_angle(th - k * pi / 2)) < pi / 8 then return k end
      if ar > 1e3 * far then return nil, "the model's path ends in no valley" end
    end
    if caps[1] then ds = min(ds, 0.5 * (caps[1].s - s)) end
    local _, _, dr, di = P_dP(x, y, zr, zi, er, ei)
    local d2 = dr * dr + di * di
    local accepted = false
    for _ = 1, 40 do
      -- the Euler predictor: du/ds = -1/P'(u)
      local px, py = x - ds * dr / d2, y + ds * di / d2
      local vx, vy = correct(px, py, Pr - (s + ds), Pi)
      if vx and math.sqrt((vx - px) ^ 2 + (vy - py) ^ 2)
          <= 0.3 * math.sqrt((px - x) ^ 2 + (py - y) ^ 2) + 1e-14 * scale then
        x, y, s, accepted = vx, vy, s + ds, true
        ds = 2 * ds
        break
      end
      ds = ds / 4
    end
    if not accepted then return nil, "the model's path could not be followed" end
  end
  return nil, "the model's path is too long"
end

-- The valleys the model contour starts and ends in: each ray of the group (weight w) is
-- matched to the model's descent path leaving the corresponding root in the direction
-- the map gives it (du = dt - arg t'(u_j)); on a Stokes line of the model, a path that
-- runs into another root goes on along that root's descent direction on the side where
-- the group's own traced ray passed that saddle (its nearest point, mapped by t'(u_k)).
-- Returns the boundary n[0..3] (sum 0, n[k] the weight of the contour's ends in valley k),
-- or nil and why.
local function model_boundary(map, group)
  local boundary = { [0] = 0, 0, 0, 0 }
  for j, entry in ipairs(group) do
    local sum = 0
    for _, piece in ipairs(entry.rays) do
      if piece.weight ~= 0 then
        sum = sum + piece.weight
        local du = carg(piece.points[2] - entry.saddle.at) - carg(map.tp[j])
        local function side(k)
          local tk = group[k].saddle.at
          local best, near = huge, nil
          for _, p in ipairs(piece.points) do
            local d = cabs(p - tk)
            if d < best then best, near = d, p end
          end
          if not near or best == 0 or best > 0.5 * cabs(tk - entry.saddle.at) then return nil end
          local off = (near - tk) / map.tp[k]
          local hk = csqrt(-2 / d2P(map, map.u[k]))
          hk = hk / cabs(hk)
          local re = cparts(off * hk:conj())
          return re >= 0 and hk or -hk
        end
        local k, why = follow(map, j, du, nil, side, 0)
        if not k then return nil, why end
        boundary[k] = boundary[k] + piece.weight
      end
    end
    if sum ~= 0 then return nil, "a saddle of the group is an end of the contour" end
  end
  local total = 0
  for k = 0, 3 do total = total + boundary[k] end
  if total ~= 0 then return nil, "the model contour does not close" end
  return boundary
end
M.model_boundary = model_boundary

---------------------------------------------------------------------------------------
-- The model integrals by quadrature.
---------------------------------------------------------------------------------------

-- The model integrals as steep integrals: amplitude u^m (m = 0, 1, 2), the contour from
-- valley a to valley b through 0 (made once, when first asked for, and not changed after:
-- their landscapes are made afresh for each use and kept by no one; the contour of a pair
-- is shared by the three, so their quadrature shares one decomposition).
local models = { contours = {} }
local function model(m, a, b)
  if not models.var then
    local steep = require "steep"
    models.var, models.zeta, models.eta = steep.var "u", steep.param "zeta", steep.param "eta"
    local u = models.var
    models.exponent = -(u ^ 4 / 4 - models.zeta * u ^ 2 / 2 + models.eta * u)
    models.steep = steep
  end
  local key = a * 4 + b
  models[m] = models[m] or {}
  if not models[m][key] then
    local steep, u = models.steep, models.var
    local C = models.contours[key]
    if not C then
      C = steep.path { steep.inf(a * pi / 2), cnew(0, 0), steep.inf(b * pi / 2) }
      models.contours[key] = C
    end
    models[m][key] = steep.integral { var = u, exponent = models.exponent,
      amplitude = m == 0 and 1 or u ^ m, contour = C }
  end
  return models[m][key]
end

-- I0, I1, I2 over the model contour with the given boundary (a sum of paths from a
-- valley where it is -1 to one where it is +1), their errors, or nil and why. The
-- landscape is mapped once on a region sized by the roots (the default would size it by
-- the saddles' widths, which grow without bound as they merge).
local function model_integrals(map, boundary)
  local integral = require "steep.integral"
  local n = { [0] = boundary[0], boundary[1], boundary[2], boundary[3] }
  local pairs_ = {}
  for a = 0, 3 do
    while n[a] < 0 do
      local b
      for k = 0, 3 do if n[k] > 0 then b = k; break end end
      pairs_[#pairs_ + 1] = { a, b }
      n[a], n[b] = n[a] + 1, n[b] - 1
    end
  end
  local I, E = { [0] = cnew(0, 0), cnew(0, 0), cnew(0, 0) }, { [0] = 0, 0, 0 }
  if #pairs_ == 0 then return I, E end
  local params = { zeta = map.zeta, eta = map.eta }
  local vm = max(cabs(map.u[1]), cabs(map.u[2]), cabs(map.u[3]))
  local region = { center = cnew(0, 0), radius = max(4, 1.5 * vm + 2) }
  local L = model(0, pairs_[1][1], pairs_[1][2]):_landscape_uncached(params, region, false)
  for _, ab in ipairs(pairs_) do
    for m = 0, 2 do
      local v, e, info = integral.quad_with(model(m, ab[1], ab[2]), params, L, "deformed")
      if info.status ~= "ok" then
        return nil, "the model integral's quadrature: " .. tostring(info.status)
      end
      I[m], E[m] = I[m] + v, E[m] + e
    end
  end
  return I, E
end
M.model_integrals = model_integrals

---------------------------------------------------------------------------------------
-- The amplitude's reduction.
---------------------------------------------------------------------------------------

-- Taylor coefficients of G(u) about 0 from its values on |u| = rho, followed from the
-- root of largest modulus (the ray out of it meets no other root).
local function coefficients(J, params, group, map, rho, n)
  local ja = 1
  for j = 2, 3 do if cabs(map.u[j]) > cabs(map.u[ja]) then ja = j end end
  local N = 256
  while N < 4 * n do N = N * 2 end
  local st, C = core.invmap_quartic(J.tape, params, group[ja].saddle.at, map.A, map.zeta,
    map.eta, map.u[ja], map.tp[ja], rho, N, n)
  if st ~= "ok" then return nil end
  local c = {}
  for k = 0, n - 1 do c[k] = C:get(k + 1) end
  return c
end

-- G = (u^3 - zeta u + eta) H + p0 + p1 u + p2 u^2 on truncated coefficients c[0..n-1]
-- (H from the top down: c_k = h_{k-3} - zeta h_{k-1} + eta h_k): returns p0, p1, p2, the
-- coefficients of H' and their number.
local function reduce(c, n, zeta, eta)
  local h = {}
  for k = 0, n - 1 do h[k] = cnew(0, 0) end
  for k = n - 1, 3, -1 do h[k - 3] = c[k] + zeta * h[k - 1] - eta * h[k] end
  local p0 = c[0] - eta * h[0]
  local p1 = c[1] + zeta * h[0] - eta * h[1]
  local p2 = c[2] + zeta * h[1] - eta * h[2]
  local dh = {}
  for k = 0, n - 5 do dh[k] = (k + 1) * h[k + 1] end
  return p0, p1, p2, dh, n - 4
end

---------------------------------------------------------------------------------------
-- The contribution.
---------------------------------------------------------------------------------------

--- contribution(J, params, L, group, order [, map]) -> contribution table, or nil and why.
-- group = { {saddle = s1, rays = pieces}, {saddle = s2, rays = ...}, {saddle = s3, ...} };
-- map: their quartic_map, when already made.
function M.contribution(J, params, L, group, order, map)
  local why
  if not map then
    map, why = M.quartic_map(group[1].saddle, group[2].saddle, group[3].saddle)
    if not map then return nil, why end
  end
  local boundary
  boundary, why = model_boundary(map, group)
  if not boundary then return nil, why end
  local I, E
  I, E, why = model_integrals(map, boundary)
  if not I then return nil, why end
  local nterms = order == "optimal" and 6 or order
  local n = 4 * nterms + 24
  local vm = max(cabs(map.u[1]), cabs(map.u[2]), cabs(map.u[3]))
  local c, c2, used_rho
  for _, rho in ipairs({ 2 * vm + 1, 2 * vm + 0.6, 1.5 * vm + 0.3 }) do
    local c1 = coefficients(J, params, group, map, rho, n)
    local cb = c1 and coefficients(J, params, group, map, 0.8 * rho + 0.1 * vm, n)
    if c1 and cb then
      local ok = true
      for k = 0, 7 do
        if cabs(c1[k] - cb[k]) > 1e-8 * (cabs(c1[k]) + cabs(c1[0])) then ok = false end
      end
      if ok then c, c2, used_rho = c1, cb, rho; break end
    end
  end
  if not c then return nil, "no circle gives the amplitude's coefficients" end
  local scale = cexp(map.A)
  local sc = cabs(scale)
  local gsize = 0
  for k = 0, n - 1 do gsize = max(gsize, cabs(c[k]) * used_rho ^ k) end
  -- the terms from coefficients cf[0..len-1]: each reduction takes four of them
  local function series(cf, len, count)
    local out, coefs = {}, {}
    for k = 1, count do
      if len < 5 then break end
      local p0, p1, p2, dh, nlen = reduce(cf, len, map.zeta, map.eta)
      coefs[k] = { p0, p1, p2 }
      out[k] = (p0 * I[0] + p1 * I[1] + p2 * I[2]) * scale
      cf, len = dh, nlen
    end
    return out, coefs
  end
  local terms, coefs = series(c, n, nterms + 3)
  local used = min(nterms, #terms)
  local value, sizes, model_err = cnew(0, 0), 0, 0
  for k = 1, used do
    local p0, p1, p2 = coefs[k][1], coefs[k][2], coefs[k][3]
    value = value + terms[k]
    sizes = sizes + (cabs(p0 * I[0]) + cabs(p1 * I[1]) + cabs(p2 * I[2])) * sc
    model_err = model_err + (cabs(p0) * E[0] + cabs(p1) * E[1] + cabs(p2) * E[2]) * sc
  end
  -- the error: the series' remainder read from the next terms (as for plain
  -- contributions), the model integrals' own errors, the coefficients' (the value from the
  -- second circle, and from eight coefficients fewer, apart: the reduction divides a
  -- truncated series, whose tail reaches the first terms where G's radius of convergence
  -- is not much larger than the roots'), and rounding: of e^A and the sums (as
  -- expand.truncate's floor), of the circle's coefficients (of the size of G on it)
  local err = require("steep.expand").remainder(terms, used) + model_err
  for _, other in ipairs({ { c2, n }, { c, n - 8 } }) do
    local alt = series(other[1], other[2], used)
    local v = cnew(0, 0)
    for k = 1, used do v = v + (alt[k] or cnew(0, 0)) end
    err = err + cabs(v - value)
  end
  err = err + (128 + cabs(map.A)) * EPS * sizes
    + 64 * EPS * gsize * (cabs(I[0]) + cabs(I[1]) + cabs(I[2])) * sc
  -- the saddles' F carry rounding: A's moves the value by dA relative; zeta's and eta's
  -- move the model integrals (dI_m/dzeta = I_{m+2}/2, dI_m/deta = -I_{m+1}, with
  -- I3 = zeta I1 - eta I0 and I4 = zeta I2 - eta I1 + I0 by parts)
  local I3 = map.zeta * I[1] - map.eta * I[0]
  local I4 = map.zeta * I[2] - map.eta * I[1] + I[0]
  local Iabs = { [0] = cabs(I[0]), cabs(I[1]), cabs(I[2]), cabs(I3), cabs(I4) }
  local p = coefs[1]
  local shift = 0
  for m = 0, 2 do
    shift = shift + cabs(p[m + 1]) * (0.5 * Iabs[m + 2] * map.dzeta + Iabs[m + 1] * map.deta)
  end
  err = err + map.dA * cabs(value) + shift * sc
  -- the contribution is reported at the middle saddle (the root nearest 0)
  local mid = 1
  for j = 2, 3 do if cabs(map.u[j]) < cabs(map.u[mid]) then mid = j end end
  local others = {}
  for j = 1, 3 do if j ~= mid then others[#others + 1] = group[j].saddle.at end end
  local num = require("steep.report").num
  local ends, names = {}, { [0] = "0", "pi/2", "pi", "3pi/2" }
  for k = 0, 3 do
    if boundary[k] ~= 0 then ends[#ends + 1] = format("%+d at %s", boundary[k], names[k]) end
  end
  return { kind = "three saddles together (uniform, cusp)", at = group[mid].saddle.at,
    partners = others, order = 2, F = map.A, value = value, error = err,
    terms = { table.unpack(terms, 1, used) }, used = used, dominance = cparts(map.A),
    zeta = map.zeta, eta = map.eta,
    note = format("saddles %s, %s and %s: zeta = %s, eta = %s; the model contour's ends "
      .. "(valleys by direction) %s", num(group[1].saddle.at), num(group[2].saddle.at),
      num(group[3].saddle.at), num(map.zeta), num(map.eta), table.concat(ends, ", ")) }
end

---------------------------------------------------------------------------------------
-- Which saddles go together.
---------------------------------------------------------------------------------------

--- groups(L, used) -> list of {trio = {j1, j2, j3}, map =, spread =}: three simple
-- saddles, every two within the pair form's scale (|F_j - F_k| <= SPREAD), at least one of
-- them used by the contour (used[j] true), each among the four saddles nearest a used
-- one, that the quartic map fits (map: M.quartic_map of L.saddles[j1], [j2], [j3]); the
-- tightest (smallest largest |F_j - F_k|) first. (They may overlap: the caller takes
-- disjoint ones.)
function M.groups(L, used)
  local S = L.saddles
  local cands, seen = {}, {}
  for j in pairs(used) do
    if S[j].order == 2 then
      local near = {}
      for k, o in ipairs(S) do
        if k ~= j and o.order == 2 then near[#near + 1] = { k = k, d = cabs(o.at - S[j].at) } end
      end
      table.sort(near, function(x, y) return x.d < y.d end)
      for a = 1, min(4, #near) do
        for b = a + 1, min(4, #near) do
          local trio = { j, near[a].k, near[b].k }
          table.sort(trio)
          local key = table.concat(trio, ",")
          if not seen[key] then
            seen[key] = true
            local spread = max(cabs(S[trio[1]].F - S[trio[2]].F), cabs(S[trio[1]].F - S[trio[3]].F),
              cabs(S[trio[2]].F - S[trio[3]].F))
            local map = spread <= M.SPREAD
              and M.quartic_map(S[trio[1]], S[trio[2]], S[trio[3]])
            if map then cands[#cands + 1] = { trio = trio, spread = spread, map = map } end
          end
        end
      end
    end
  end
  table.sort(cands, function(x, y)
    if x.spread ~= y.spread then return x.spread < y.spread end
    return table.concat(x.trio, ",") < table.concat(y.trio, ",")
  end)
  return cands
end

--- contributions(J, params, L, by_saddle, seen, order, keep, notes, handled) -> list: the
-- cusp contributions of the contour's saddles (by_saddle[j]: saddle j's ray pieces; seen:
-- the saddles with pieces), each group of three taken once, disjoint, the tightest first;
-- their indices set in `handled`. Where a group's form cannot be built (a pole of the
-- amplitude among them, say) a note says why, and the caller's other forms take them.
-- (keep: the contribution keeps its group for resummation, which may expand them apart.)
function M.contributions(J, params, L, by_saddle, seen, order, keep, notes, handled)
  local used, out, failed = {}, {}, {}
  for _, j in ipairs(seen) do used[j] = true end
  for _, g in ipairs(M.groups(L, used)) do
    local a, b, d = g.trio[1], g.trio[2], g.trio[3]
    if not (handled[a] or handled[b] or handled[d]) then
      local group = {}
      for i, k in ipairs(g.trio) do group[i] = { saddle = L.saddles[k], rays = by_saddle[k] or {} } end
      local ok, c, why = pcall(M.contribution, J, params, L, group, order, g.map)
      if ok and c then
        c.pair = keep and group or nil
        out[#out + 1] = c
        handled[a], handled[b], handled[d] = true, true, true
      else
        failed[#failed + 1] = { trio = g.trio, why = ok and why or c }
      end
    end
  end
  for _, f in ipairs(failed) do
    local a, b, d = f.trio[1], f.trio[2], f.trio[3]
    if notes and not (handled[a] or handled[b] or handled[d]) then
      notes[#notes + 1] = format("saddles %d, %d and %d are close together, but the cusp "
        .. "form was not used for them (%s)", a, b, d, tostring(f.why))
    end
  end
  return out
end

return M
