-- steep.coalesce — the Airy-type uniform expansion for two saddles near each other
-- (Chester, Friedman & Ursell, Proc. Camb. Phil. Soc. 53 (1957) 599-611; DLMF 2.4(v);
-- Bleistein's reduction for the higher terms, Bleistein & Handelsman 1975, ch. 9).
--
-- The cubic map F(t) = A + zeta u - u^3/3 sends the saddles t1, t2 to u = +-v (v^2 = zeta),
-- with A = (F1 + F2)/2 and v^3 = (3/4)(F1 - F2). With G(u) = g(t(u)) t'(u):
--   G = p0 + q0 u + (u^2 - zeta) H0(u),   H0' = p1 + q1 u + (u^2 - zeta) H1(u), ...
-- and, integrating by parts, I = e^A sum_k (p_k I0 + q_k I1) with the model integrals
--   I0 = integral over Gamma of e^{zeta u - u^3/3} du,   I1 = the same with u,
-- Airy functions of zeta on the contour Gamma that the decomposition gives (computed by the
-- project's own steepest-path quadrature). The form is continuous as zeta -> 0, where the
-- plain expansion of each saddle blows up.

local core = require "steep.core"
local complex = require "steep.complex"
local expr = require "steep.expr"
local landscape = require "steep.landscape"
local contour_m = require "steep.contour"

local cnew, cparts = complex.new, complex.parts
local cabs, carg, expi = landscape.cabs, landscape.carg, landscape.expi
local format, pi, abs, huge = string.format, math.pi, math.abs, math.huge

local M = {}

M.ZETA_RADIUS = 4   -- |zeta| below which two saddles are treated together

local function csqrt(z) return complex.apply("sqrt", z) end

-- The model integrals e^{z u - u^3/3} and u e^{...} (built once).
local model_J, model_J1
local function models()
  if not model_J then
    local integral = require "steep.integral"
    local u, z = expr.symbol("var", "u"), expr.symbol("param", "z")
    local dummy = contour_m.line(contour_m.inf(math.pi), contour_m.inf(0))
    model_J = integral.new { var = u, exponent = z * u - u ^ 3 / 3, contour = dummy }
    model_J1 = integral.new { var = u, exponent = z * u - u ^ 3 / 3, amplitude = u, contour = dummy }
  end
  return model_J, model_J1
end

--- The saddle pair's map: A, zeta, v (= u of t1), t'(+-v); nil when no cube root fits.
local function cubic_map(s1, s2)
  local A = (s1.F + s2.F) / 2
  local r = 0.75 * (s1.F - s2.F)
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

-- G = (u^2 - zeta) H + p + q u on truncated coefficients c[0..n-1]: returns p, q, H'.
local function reduce(c, n, zeta)
  local h = {}
  for k = 0, n - 1 do h[k] = cnew(0, 0) end
  for k = n - 1, 2, -1 do h[k - 2] = c[k] + zeta * h[k] end
  local p = c[0] + zeta * h[0]
  local q = c[1] + zeta * h[1]
  local dh = {}
  for k = 0, n - 3 do dh[k] = (k + 1) * h[k + 1] end
  return p, q, dh, n - 2
end

-- The model contour: each ray of the pair (weight c) matched to the model's ray at the
-- corresponding saddle by its direction through the map, and the valleys they end in.
local function model_contour(J, params, L, pair, map)
  local MJ = models()
  local ML = MJ:_landscape({ z = map.zeta }, nil, true)
  local boundary = {}
  for side, entry in ipairs(pair) do
    local u0 = side == 1 and map.v or -map.v
    local tp = side == 1 and map.ta or map.tb
    -- the model's saddle at u0 (or the single order-3 saddle when zeta ~ 0)
    local best, mj = huge, nil
    for j, s in ipairs(ML.saddles) do
      local d = cabs(s.at - u0)
      if d < best then best, mj = d, j end
    end
    if not mj then return nil end
    local mpaths = ML.paths[mj]
    for _, piece in ipairs(entry.rays) do
      if piece.weight ~= 0 then
        local dt = carg(piece.points[2] - entry.saddle.at)
        local du = dt - carg(tp)
        local bb, mk = huge, nil
        for k, mp in ipairs(mpaths.descent) do
          local d = abs(landscape.norm_angle(carg(mp.points[2] - ML.saddles[mj].at) - du))
          if d < bb then bb, mk = d, k end
        end
        if bb > pi / 3 then return nil end
        local label = mpaths.descent[mk].ends
        local vk = label:match("^valley (%d+)$")
        if not vk then return nil end
        local v = ML.valleys[tonumber(vk)]
        local mid = v.type == "edge" and v.from or 0.5 * (v.from + v.to)
        boundary[mid] = (boundary[mid] or 0) + piece.weight
      end
    end
  end
  local from, to
  for angle, n in pairs(boundary) do
    if n == -1 and not from then from = angle
    elseif n == 1 and not to then to = angle
    elseif n ~= 0 then return nil end
  end
  if not (from and to) then return nil end
  return contour_m.path { contour_m.inf(from), complex.new(0, 0), contour_m.inf(to) }
end

--- contribution(J, params, L, pair, order) -> contribution table or nil
-- pair = { {saddle = s1, rays = pieces}, {saddle = s2, rays = pieces} }
function M.contribution(J, params, L, pair, order)
  local s1, s2 = pair[1].saddle, pair[2].saddle
  local map = cubic_map(s1, s2)
  if not map or cabs(map.zeta) > M.ZETA_RADIUS then return nil end
  local C = model_contour(J, params, L, pair, map)
  if not C then return nil end
  local MJ, MJ1 = models()
  MJ.contour, MJ1.contour = C, C
  MJ._lcache, MJ1._lcache = nil, nil
  local I0, e0 = MJ:quad { z = map.zeta }
  local I1, e1 = MJ1:quad { z = map.zeta }
  local nterms = order == "optimal" and 6 or order
  local n = 2 * nterms + 16
  local c
  local vm = cabs(map.v)
  for _, rho in ipairs({ 2 * vm + 1, 2 * vm + 0.6, 1.5 * vm + 0.3 }) do
    local c1 = coefficients(J, params, s1, map, rho, n)
    local c2 = c1 and coefficients(J, params, s1, map, 0.8 * rho + 0.1 * vm, n)
    if c1 and c2 then
      local ok = true
      for k = 0, 6 do
        if cabs(c1[k] - c2[k]) > 1e-8 * (cabs(c1[k]) + cabs(c1[0])) then ok = false end
      end
      if ok then c = c1; break end
    end
  end
  if not c then return nil end
  local scale = complex.apply("exp", map.A)
  local terms, value = {}, cnew(0, 0)
  local cur, len = c, n
  local pq = {}
  for k = 1, nterms + 1 do
    if len < 4 then break end
    local p, q, dh, nlen = reduce(cur, len, map.zeta)
    pq[k] = { p = p, q = q }
    terms[k] = (p * I0 + q * I1) * scale
    cur, len = dh, nlen
  end
  local used = math.min(nterms, #terms)
  for k = 1, used do value = value + terms[k] end
  local err = terms[used + 1] and cabs(terms[used + 1]) or huge
  err = err + cabs(pq[1].p * scale) * e0 + cabs(pq[1].q * scale) * e1
  return { kind = "two saddles together (uniform, Airy type)", at = s1.at, partner = s2.at,
    order = 2, F = map.A, value = value, error = err, terms = { table.unpack(terms, 1, used) },
    used = used, dominance = cparts(map.A), zeta = map.zeta, weights = { 1 },
    note = format("saddles %s and %s: zeta = %s", tostring(s1.at), tostring(s2.at),
      tostring(map.zeta)) }
end

return M
