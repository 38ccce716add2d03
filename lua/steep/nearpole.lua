-- steep.nearpole — the uniform expansion of a simple saddle with a simple pole of the
-- amplitude nearby (Van der Waerden, Appl. Sci. Res. B2 (1951) 33-45; Bleistein, Comm. Pure
-- Appl. Math. 19 (1966)). Its companion for two saddles together is steep.coalesce;
-- steep.asymptotics decides when either applies.

local core = require "steep.core"
local complex = require "steep.complex"
local landscape = require "steep.landscape"
local expand = require "steep.expand"

local cnew, cparts = complex.new, complex.parts
local cabs = landscape.cabs
local format, pi = string.format, math.pi

local M = {}

local function exp_c(z) return complex.apply("exp", complex.new(cparts(z))) end

-- Uniform expansion of a simple saddle with a simple pole of the amplitude nearby (Van der
-- Waerden, Appl. Sci. Res. B2 (1951) 33-45; Bleistein, Comm. Pure Appl. Math. 19 (1966)):
-- G(w) = r/(w - b) + H(w) with b the pole's image under F0 - F = w^2 and r the residue of
-- g there; the pole part is exact through the Faddeeva function,
--   integral of e^{-w^2}/(w - b) dw over the real line = i pi w(b) (Im b > 0),
--                                                       -i pi w(-b) (Im b < 0)
-- (DLMF 7.7.2 with w(-z) = 2 e^{-z^2} - w(z), DLMF 7.4.3), and H by its series to any order.
-- The jump of that integral as b crosses the real axis, 2 pi i e^{-b^2} r, is exactly the
-- residue term the decomposition gains or loses there, so the total is continuous.
M.UNIFORM_RADIUS = 16       -- |b| below which the pole is treated uniformly (saddle widths)

--- The nearest simple pole whose image b under F0 - F = w^2 has |b| < UNIFORM_RADIUS, or nil.
function M.find(J, params, L, s, sm)
  local best
  for idx, p in ipairs(L.singularities) do
    if p.kind == "pole" and p.order == 1 and p.residue then
      local Fp = J.tape:eval(p.at, params)
      local b2 = s.F - Fp
      local b = complex.apply("sqrt", b2)
      local guess = sm * (p.at - s.at)
      if cabs(-b - guess) < cabs(b - guess) then b = -b end
      if cabs(b) < M.UNIFORM_RADIUS and (not best or cabs(b) < cabs(best.b)) then
        best = { index = idx, pole = p, b = b, r = p.residue * exp_c(-Fp), Fp = Fp }
      end
    end
  end
  return best
end

local function pole_integral(b)
  local _, bi = cparts(b)
  local w = core.cmath.faddeeva
  if bi >= 0 then return cnew(0, pi) * w(b) end
  return cnew(0, -pi) * w(-b)
end

--- The saddle's contribution with the pole `near` (from M.find) treated exactly; nil when
-- no circle in the w plane gives trusted coefficients of the regular part.
function M.contribution(J, params, L, j, c, near, order, series)
  local s = L.saddles[j]
  local nraw = 2 * ((order == "optimal" and 40 or order) + 2)
  local a, F0, sm = series[1], series[2], series[3]   -- saddle_series(..., 2, 4)
  -- H's coefficients: a circle in the w plane enclosing b, inside G's other singularities.
  -- A circle is trusted when the rule on every other point agrees to 1e-7 (so that the
  -- aliasing error of the whole rule, about the square of that, is near rounding) and
  -- nothing else singular lies inside: its first two coefficients must be those of the
  -- series a of G about the saddle with the pole's part added back, H_k = a_k + r/b^(k+1)
  -- (any other singular point inside would add its residues to every H_k). That needs b
  -- itself to many digits; b^2 = F0 - F(pole) carries the rounding of F (1e-13 assumed),
  -- so for a pole within about 1e-3 saddle widths a second, smaller circle enclosing b
  -- must give the same coefficients instead.
  local bmag = cabs(near.b)
  local b_rel = 1e-13 * math.max(1, cabs(F0), cabs(near.Fp)) / (bmag * bmag)
  local function trusted(h1, half, level, rho)
    -- (the aliasing of the pole's part is measured against its own size on the circle,
    -- |r| / ((rho - |b|) rho^k): H may vanish outright)
    local pole_size = cabs(near.r) / (rho - bmag)
    for k = 0, nraw - 1 do
      if expand.dist(h1[k], half[k]) > 1e-7 * (expand.mag(h1[k]) + pole_size)
          + 4 * level(k) then
        return false
      end
      pole_size = pole_size / rho
    end
    if b_rel < 1e-6 then
      local binv = 1 / near.b
      local pole_k = near.r * binv
      for k = 0, 1 do   -- (H may vanish outright: the scale includes the pole's part)
        local tol = (1e-7 + (k + 1) * b_rel) * (cabs(a[k]) + cabs(pole_k)) + 2 * level(k)
        if cabs(h1[k] - (a[k] + pole_k)) > tol then return false end
        pole_k = pole_k * binv
      end
      return true
    end
    local h2 = expand.circle_coefficients(J, params, s.at, F0, 2, sm, nraw,
      0.5 * (rho + bmag) + 0.05)
    if not h2 then return false end
    local size = cabs(h1[0]) + cabs(near.r) / math.max(bmag, 0.1)
    for k = 0, math.min(nraw - 1, 8) do
      if cabs(h1[k] - h2[k]) > 1e-8 * (cabs(h1[k]) + size) then return false end
    end
    return true
  end
  local h, used_rho
  for _, rho in ipairs({ bmag + 1.2, bmag + 0.8, bmag + 0.5, 1.5 * bmag + 0.2 }) do
    -- points: the pole's part aliases like (|b|/rho)^N; enough for the half rule to be
    -- clear of it (1e-10), at least 64 and 4 per coefficient
    local N = 64
    local need = 2 * math.log(1e-10) / math.log(bmag / rho)
    while N < need or N < 4 * nraw do N = 2 * N end
    local h1, half, level = expand.circle_coefficients(J, params, s.at, F0, 2, sm, nraw, rho, N)
    if h1 and trusted(h1, half, level, rho) then h, used_rho = h1, rho; break end
  end
  if not h then return nil end
  local sign = c[1]          -- +1: in along ray 2, out along ray 1 (w increasing)
  local terms = {}
  for k = 0, nraw / 2 - 1 do terms[#terms + 1] = expand.gamma_times(h[2 * k], k + 0.5) end
  terms[1] = terms[1] + near.r * pole_integral(near.b)
  local scale = exp_c(F0) * sign
  local value, err, used = expand.truncate(terms, order, scale, cabs(F0))
  -- b comes from b^2 = F0 - F(pole), a difference of two values of F that each carry a few
  -- u (1 + |F|) of rounding (8 each, allowed): near b = 0 that moves b by delta/(2|b|) (at most sqrt(delta)),
  -- and the pole term by |r| |d/db of i pi w(b)| (at most 2 sqrt(pi) + 2 pi |b|) times that
  -- (seen: a saddlepoint tail at 1e-7 standard errors from the mean, off by 1e-8 against
  -- a series estimate of 5e-9)
  local delta = 16 * 2.220446049250313e-16 * (1 + cabs(F0) + cabs(near.Fp))
  -- (F a difference of terms larger than F itself, as n (-log(1 - s) - s x) near the mean
  -- where F0 ~ 1e-6 and its terms ~ 1e-2 n: their running error bound, tape:rounding;
  -- the saddlepoint tail at n = 100, x = 0.9998 was 1.09e-11 off under 9.9e-12)
  local eF = J.tape:rounding(core.cvec { s.at, near.pole.at }, params)
  local run = (eF[1] or 0) + (eF[2] or 0)
  if run == run and run < math.huge then delta = math.max(delta, 2 * run) end
  local db = math.min(delta / (2 * math.max(bmag, 1e-300)), math.sqrt(delta))
  err = err + cabs(near.r * scale) * (2 * math.sqrt(pi) + 2 * pi * bmag) * db
  local tl = {}
  for k = 1, used do tl[k] = terms[k] * scale end
  return { kind = "saddle with a nearby pole (uniform, Faddeeva)", at = s.at, order = 2,
    weights = c, F = F0, value = value, error = err, terms = tl, used = used,
    dominance = cparts(F0), pole = near.pole.at, pole_image = near.b,
    note = format("pole at %s lies %.3g saddle widths from the saddle (|b| = %.3g; "
      .. "circle |w| = %.3g)", tostring(near.pole.at), bmag, bmag, used_rho) }
end

--- The part of a pole's residue term that belongs to the saddle: with the steepest path
-- oriented as w increases, a pole whose image b lies above the real w axis is on its left.
-- The decomposition decided sides with the traced polyline; a pole within its chord error
-- of the exact path may have been put on the wrong side, so the side is re-decided exactly
-- from Im b here. If the polyline said otherwise, the winding about the pole changes by the
-- saddle's weight c1 (the pole crossing the path from right to left takes c1 away).
function M.fix_side(plan, near, c, rays)
  local ray1, ray2
  for _, piece in ipairs(rays) do
    if piece.ray == 1 then ray1 = piece.points elseif piece.ray == 2 then ray2 = piece.points end
  end
  if not (ray1 and ray2) then return end
  local poly = {}
  for k = #ray2, 2, -1 do poly[#poly + 1] = ray2[k] end
  for k = 1, #ray1 do poly[#poly + 1] = ray1[k] end
  -- side relative to the polyline: nearest segment's orientation (a pole at the saddle
  -- itself was counted as displaced to one side: decompose says which)
  local side_poly = plan.displaced and plan.displaced[near.index]
  if not side_poly then
    local _, k = core.nearest(poly, near.pole.at)
    local _, im = cparts((near.pole.at - poly[k]) / (poly[k + 1] - poly[k]))
    side_poly = im > 0 and 1 or -1
  end
  -- (the same convention as pole_integral: Im b >= 0 is the left)
  local _, bi = cparts(near.b)
  local side_exact = bi >= 0 and 1 or -1
  if side_poly == side_exact then return end
  -- the cycle is contour - c1 * path: a pole that crosses the path from its right to its
  -- left crosses -c1 * path from left to right, and the cycle's winding about it falls by c1
  local delta = side_exact > 0 and -c[1] or c[1]
  for _, r in ipairs(plan.residues) do
    if r.index == near.index then r.winding = r.winding + delta; return end
  end
  plan.residues[#plan.residues + 1] = { index = near.index, winding = delta }
end

return M
