-- steep.coalesce — the Airy-type uniform expansion for two saddles near each other
-- (Chester, Friedman & Ursell, Proc. Camb. Phil. Soc. 53 (1957) 599-611; DLMF 2.4(v);
-- Bleistein's reduction for the higher terms, Bleistein & Handelsman 1975, ch. 9).
--
-- The cubic map F(t) = A + zeta u - u^3/3 sends the saddles t1, t2 to u = +-v (v^2 = zeta),
-- with A = (F1 + F2)/2 and v^3 = (3/4)(F1 - F2). With G(u) = g(t(u)) t'(u):
--   G = p0 + q0 u + (u^2 - zeta) H0(u),   H0' = p1 + q1 u + (u^2 - zeta) H1(u), ...
-- and, integrating by parts, I = e^A sum_k (p_k I0 + q_k I1) with the model integrals
--   I0 = integral over Gamma of e^{zeta u - u^3/3} du,   I1 = the same with u,
-- over the contour Gamma of the model that the pair's rays map to: from one of the
-- model's valleys (about the directions 0, 2pi/3, -2pi/3) to another. Each such integral
-- is an Airy function (DLMF 9.5.4 with t = -u, and u -> e^{+-2pi i/3} u for the other
-- pairs of valleys), computed in C (ext/airy.c) with its error estimate. The form is
-- continuous as zeta -> 0, where the plain expansion of each saddle blows up.

local core = require "steep.core"
local complex = require "steep.complex"
local landscape = require "steep.landscape"

local cnew, cparts = complex.new, complex.parts
local cabs, carg, expi = landscape.cabs, landscape.carg, landscape.expi
local format, pi, abs, huge = string.format, math.pi, math.abs, math.huge
local airy, model_valley = core.cmath.airy, core.cmath.airy_valley
local EPS = 2.220446049250313e-16

local M = {}

M.ZETA_RADIUS = 4   -- |zeta| below which two saddles are treated together

local function csqrt(z) return complex.apply("sqrt", z) end

--- The saddle pair's map: A, zeta, v (= u of t1), t'(+-v); nil when no cube root fits.
-- (With zeta_radius, also nil for a pair whose |zeta| is not below it.)
local function cubic_map(s1, s2, zeta_radius)
  local A = (s1.F + s2.F) / 2
  local r = 0.75 * (s1.F - s2.F)
  -- (|zeta| = |r|^(2/3) whichever cube root: a pair farther apart than the caller asks
  -- for is dismissed before the roots' complex arithmetic)
  if zeta_radius and cabs(r) >= zeta_radius ^ 1.5 then return nil end
  local best
  for k = 0, 2 do
    local v = cabs(r) ^ (1 / 3) * expi((carg(r) + 2 * pi * k) / 3)
    local chord = (s1.at - s2.at) / (2 * v)
    -- t'(u)^2 = -2u / F''(t) at each saddle; the sign nearest the chord slope
    local ta = csqrt(-2 * v / s1.F2)
    if cabs(-ta - chord) < cabs(ta - chord) then ta = -ta end
    local tb = csqrt(2 * v / s2.F2)
    if cabs(-tb - chord) < cabs(tb - chord) then tb = -tb end
    local score = (cabs(ta - chord) + cabs(tb - chord)) / cabs(chord)
    if not best or score < best.score then
      best = { A = A, zeta = v * v, v = v, ta = ta, tb = tb, score = score }
    end
  end
  if best.score > 0.5 then return nil end   -- the saddles are not a coalescing pair
  return best
end
M.cubic_map = cubic_map

local TRUNCATION_CHECK = 16

-- Taylor coefficients of G(u) about 0 from its values on |u| = rho.
local function coefficients(J, params, s1, map, rho, n)
  local N = 256
  while N < 4 * n do N = N * 2 end
  local st, C = core.invmap_cubic(J.tape, params, s1.at, map.A, map.zeta, map.v, map.ta, rho,
    N, n)
  if st ~= "ok" then return nil end
  local c = {}
  for k = 0, n - 1 do c[k] = C:get(k + 1) end
  return c
end

-- G = (u^2 - zeta) H + p + q u on truncated coefficients c[0..n-1] (their real and
-- imaginary parts cr, ci: this runs over every coefficient for every term, so without a
-- complex value each): returns p, q and H' (its parts). With e[0..n-1] (bounds on the
-- coefficients' errors), also those of p, q and H': the recursion and the derivative
-- carry them (the k-th round multiplies the high coefficients' errors by about k!, which
-- at 24 terms had put 8e-8 of rounding into a value estimated at 1e-13).
local function reduce(cr, ci, n, zeta, e)
  local zr, zi = cparts(zeta)
  local az = cabs(zeta)
  local hr, hi, eh = {}, {}, {}
  for k = n - 2, n - 1 do hr[k], hi[k], eh[k] = 0, 0, 0 end
  for k = n - 1, 2, -1 do
    local ar, ai = hr[k], hi[k]
    hr[k - 2] = cr[k] + zr * ar - zi * ai
    hi[k - 2] = ci[k] + zr * ai + zi * ar
    eh[k - 2] = e[k] + az * eh[k]
  end
  local p = cnew(cr[0] + zr * hr[0] - zi * hi[0], ci[0] + zr * hi[0] + zi * hr[0])
  local q = cnew(cr[1] + zr * hr[1] - zi * hi[1], ci[1] + zr * hi[1] + zi * hr[1])
  local ep, eq = e[0] + az * eh[0], e[1] + az * eh[1]
  local dr, di, edh = {}, {}, {}
  for k = 0, n - 3 do dr[k], di[k], edh[k] = (k + 1) * hr[k + 1], (k + 1) * hi[k + 1], (k + 1) * eh[k + 1] end
  return p, q, dr, di, n - 2, ep, eq, edh
end

-- The model's contour: each ray of the pair (weight w) is matched to the model's descent
-- ray leaving the corresponding saddle u0 = +-v in the direction the map gives it
-- (du = dt - arg t'(u0)), whose valley ext/airy.c finds by tracing the model's path. On a
-- Stokes line of the model that path runs into the other saddle, and goes on along one of
-- that saddle's descent directions: the one on the side where the pair's own traced ray
-- passed the other saddle (its nearest point, mapped by t'(u) there). Returns the valleys
-- (0, 1, 2) the model contour starts and ends in, or nil when they are not one pair.
local function other_side(map, side, piece, pair)
  local u1 = side == 1 and -map.v or map.v
  local t1 = pair[side == 1 and 2 or 1].saddle.at
  local tp1 = side == 1 and map.tb or map.ta
  local best, near = huge, nil
  for _, p in ipairs(piece.points) do
    local d = cabs(p - t1)
    if d < best then best, near = d, p end
  end
  if not near or best == 0 then return nil end
  local du = (near - t1) / tp1
  local alpha = (pi - carg(-2 * u1)) / 2
  for _, a in ipairs({ alpha, alpha + pi }) do
    local dr = cparts(du * expi(-a))
    if dr > 0 then return model_valley(map.zeta, u1, a) end
  end
  return nil
end

local function model_ends(map, pair)
  local boundary = { [0] = 0, 0, 0 }
  for side, entry in ipairs(pair) do
    local u0 = side == 1 and map.v or -map.v
    local tp = side == 1 and map.ta or map.tb
    for _, piece in ipairs(entry.rays) do
      if piece.weight ~= 0 then
        local du = carg(piece.points[2] - entry.saddle.at) - carg(tp)
        local k, why = model_valley(map.zeta, u0, du)
        if not k and why == "saddle" then k = other_side(map, side, piece, pair) end
        if not k then return nil end
        boundary[k] = boundary[k] + piece.weight
      end
    end
  end
  local from, to
  for k = 0, 2 do
    local n = boundary[k]
    if n == -1 and not from then from = k
    elseif n == 1 and not to then to = k
    elseif n ~= 0 then return nil end
  end
  if not (from and to) then return nil end
  return from, to
end

-- The model integrals from valley a to valley b, I0 = int e^{zeta u - u^3/3} du and I1
-- (the same with u), and their errors: from valley 2 (direction -2pi/3) to valley 1
-- (2pi/3) I0 = 2 pi i Ai(zeta) (DLMF 9.5.4 with t = -u); substituting u = omega^{+-1} w
-- (omega = e^{2 pi i/3}) turns the other two pairs into I0 = 2 pi i omega Ai(omega zeta)
-- (0 -> 2) and 2 pi i omega^-1 Ai(omega^-1 zeta) (1 -> 0); I1 = dI0/dzeta; a reversed
-- pair changes the sign. The rotated argument is rounded (relative 2^-52): that moves Ai
-- by |Ai'| |d zeta|, counted in the errors.
local OMEGA = complex.new(-0.5, math.sqrt(3) / 2)
local OMEGA_BAR = complex.new(-0.5, -math.sqrt(3) / 2)
local ROUTES = {   -- [from][to] = factor of I0, factor of I1, rotation of the argument
  [2] = { [1] = { 1, 1, 1 } }, [0] = { [2] = { OMEGA, OMEGA_BAR, OMEGA } },
  [1] = { [0] = { OMEGA_BAR, OMEGA, OMEGA_BAR } } }
local function model_integrals(zeta, from, to)
  local sign = 1
  local route = ROUTES[from] and ROUTES[from][to]
  if not route then route, sign = ROUTES[to][from], -1 end
  local arg = route[3] * zeta
  local ai, aip, e_ai, e_aip, status = airy(arg)
  if status ~= "ok" then return nil end
  local two_pi_i = complex.new(0, 2 * pi * sign)
  local shift = 4.5e-16 * cabs(arg)
  return two_pi_i * route[1] * ai, two_pi_i * route[2] * aip,
    2 * pi * (e_ai + cabs(aip) * shift), 2 * pi * (e_aip + cabs(arg * ai) * shift)
end

--- contribution(J, params, L, pair, order) -> contribution table or nil
-- pair = { {saddle = s1, rays = pieces}, {saddle = s2, rays = pieces} }
function M.contribution(J, params, L, pair, order)
  local s1, s2 = pair[1].saddle, pair[2].saddle
  local map = cubic_map(s1, s2)
  if not map or cabs(map.zeta) > M.ZETA_RADIUS then return nil end
  local from, to = model_ends(map, pair)
  if not from then return nil end
  local I0, I1, e0, e1 = model_integrals(map.zeta, from, to)
  if not I0 then return nil end
  local nterms = order == "optimal" and 6 or order
  -- (n coefficients for the terms; TRUNCATION_CHECK more to see how the terms move when
  -- the recursion starts further up: the omitted coefficients' share)
  local n = 2 * nterms + 22
  local c, c_other, used_rho
  local vm = cabs(map.v)
  for _, rho in ipairs({ 2 * vm + 1, 2 * vm + 0.6, 1.5 * vm + 0.3 }) do
    local c1 = coefficients(J, params, s1, map, rho, n + TRUNCATION_CHECK)
    local c2 = c1 and coefficients(J, params, s1, map, 0.8 * rho + 0.1 * vm,
      n + TRUNCATION_CHECK)
    if c1 and c2 then
      local ok = true
      for k = 0, 6 do
        if cabs(c1[k] - c2[k]) > 1e-8 * (cabs(c1[k]) + cabs(c1[0])) then ok = false end
      end
      if ok then c, c_other, used_rho = c1, c2, rho; break end
    end
  end
  if not c then return nil end
  local scale = complex.apply("exp", map.A)
  -- the circle's coefficients carry rounding of the size of G on it, divided by rho^k:
  -- each one's error bounded by that and by its difference from the second circle's
  local gsize = 0
  for k = 0, n - 1 do gsize = math.max(gsize, cabs(c[k]) * used_rho ^ k) end
  local cerr = {}
  for k = 0, n + TRUNCATION_CHECK - 1 do
    cerr[k] = cabs(c[k] - c_other[k]) + 64 * EPS * gsize / used_rho ^ k
  end
  -- the terms from the first len coefficients
  local c_re, c_im = {}, {}
  for k = 0, n + TRUNCATION_CHECK - 1 do c_re[k], c_im[k] = cparts(c[k]) end
  local function terms_from(len)
    local terms, pq = {}, {}
    local sizes = 0   -- the sizes the terms' rounding scales with (p I0 and q I1 may cancel)
    local carried = 0 -- the coefficients' errors carried into the terms used
    local cr, ci, ecur = c_re, c_im, cerr
    for k = 1, nterms + 3 do
      if len < 4 then break end
      local p, q, dr, di, nlen, ep, eq, edh = reduce(cr, ci, len, map.zeta, ecur)
      pq[k] = { p = p, q = q }
      terms[k] = (p * I0 + q * I1) * scale
      if k <= nterms then
        sizes = sizes + (cabs(p * I0) + cabs(q * I1)) * cabs(scale)
        carried = carried + (ep * cabs(I0) + eq * cabs(I1)) * cabs(scale)
      end
      cr, ci, len, ecur = dr, di, nlen, edh
    end
    return terms, pq, sizes, carried
  end
  local terms, pq, sizes, carried = terms_from(n)
  local more = terms_from(n + TRUNCATION_CHECK)
  local used = math.min(nterms, #terms)
  local value, moved = cnew(0, 0), cnew(0, 0)
  for k = 1, used do value, moved = value + terms[k], moved + (more[k] - terms[k]) end
  -- (the terms' own dependence on where the recursion starts: saddles far apart at a high
  -- order made the terms diverge as the coefficients grew, 8.7e-7 off under 1.9e-8)
  carried = carried + cabs(moved)
  -- the series' remainder as for plain contributions, the model integrals' own errors,
  -- the coefficients' errors carried through, and the rounding of e^A and of the sums
  -- (as expand.truncate's floor)
  -- (the omitted terms as the longer recursion gives them too: those of the shorter one
  -- can fall short, as the seventh term of a Hermite polynomial's pair, 2e-14 against 1e-15)
  local expand_m = require "steep.expand"
  local err = math.max(expand_m.remainder(terms, used), expand_m.remainder(more, used))
  err = err + cabs(pq[1].p * scale) * e0 + cabs(pq[1].q * scale) * e1 + carried
    + (128 + cabs(map.A)) * 2.220446049250313e-16 * sizes
  -- the saddles' F carry rounding (a few units of |F| each): zeta = v^2 with
  -- v^3 = (3/4)(F1 - F2) inherits it divided by |v| (saddles close together leave zeta
  -- less well determined); dI0/dzeta = I1, dI1/dzeta = zeta I0
  local Fsize = cabs(s1.F) + cabs(s2.F)
  local dzeta = 4 * EPS * (Fsize / math.max(cabs(map.v), 1e-300) + cabs(map.zeta))
  err = err + 4 * EPS * Fsize * cabs(value) + dzeta * (cabs(pq[1].p * scale) * cabs(I1)
    + cabs(pq[1].q * scale) * cabs(map.zeta * I0))
  return { kind = "two saddles together (uniform, Airy type)", at = s1.at, partner = s2.at,
    order = 2, F = map.A, value = value, error = err, terms = { table.unpack(terms, 1, used) },
    used = used, dominance = cparts(map.A), zeta = map.zeta, weights = { 1 },
    note = format("saddles %s and %s: zeta = %s", tostring(s1.at), tostring(s2.at),
      tostring(map.zeta)) }
end

return M
