-- steep.nearend — the uniform expansion of a simple saddle near a finite endpoint of the
-- contour (a Gaussian cut near its peak): the endpoint's Watson series is in powers of
-- F''/F'(a)^2 and fails as the endpoint nears the saddle, where the plain saddle series
-- needs the whole line. In the saddle's own variable w, F0 - F(t) = w^2 (w increasing out
-- along ray 1), with G(w) = g(t(w)) t'(w) = sum_k a_k w^k and the endpoint at w_a,
--   the endpoint's path = integral from w_a to sigma infinity (sigma = sign of Re w_a)
--                       = (the saddle's ray sigma) - integral_0^{w_a} G e^{-w^2} dw,
-- so the endpoint and the saddle together are the saddle's series with the endpoint's
-- weight added to ray sigma (asymptotic, truncated as usual) less the convergent series
-- sum_k a_k K_k(w_a), K_k(c) = integral_0^c w^k e^{-w^2} dw = c^(k+1) e^(-c^2) sum_j
-- (2c^2)^j / ((k+1)(k+3)...(k+2j+1)) (the lower incomplete gamma function's series,
-- DLMF 8.7.1 with 8.2.1, equation numbers from memory; common practice for the
-- saddle-near-endpoint problem, cf. Bleistein & Handelsman, Asymptotic Expansions of
-- Integrals, 1975, ch. 9). It holds where
-- G's series converges along the segment from 0 to w_a and nothing singular lies between
-- the endpoint's path, the saddle's ray and that segment; the K series' own convergence is
-- checked and counted in the error, else the caller keeps the two expansions apart.

local complex = require "steep.complex"
local landscape = require "steep.landscape"
local expand = require "steep.expand"

local cnew, cparts = complex.new, complex.parts
local cabs = landscape.cabs
local format, pi, abs = string.format, math.pi, math.abs
local EPS = 2.220446049250313e-16

local M = {}

M.RADIUS = 6   -- |w_a| below which the endpoint is taken with the saddle

local function exp_c(z) return complex.apply("exp", cnew(cparts(z))) end
local function sqrt_c(z) return complex.apply("sqrt", cnew(cparts(z))) end

-- w_a for the endpoint a of saddle s (F(a) = Fa): the root of w^2 = F0 - Fa nearest the
-- linear guess sm (a - t0), sm the saddle's scale (expand.saddle_series).
local function endpoint_w(s, a, Fa, sm)
  local w = sqrt_c(s.F - Fa)
  local guess = sm * (a - s.at)
  if cabs(-w - guess) < cabs(w - guess) then w = -w end
  return w, guess
end

--- find(J, params, L, piece, handled) -> index of the simple saddle the endpoint piece lies
-- within M.RADIUS of (in w, and w within half its size of the linear guess), or nil. The endpoint must be a plain one (no algebraic or
-- log factor there, the amplitude regular).
function M.find(J, params, L, piece, handled)
  local a = piece.at
  if expand.endpoint_factors(J, params, a) then return nil end
  local ok, Fa, g = pcall(J.tape.eval, J.tape, a, params)
  if not ok or not (cabs(Fa) < math.huge) then return nil end
  if g ~= nil and not (cabs(g) < math.huge) then return nil end   -- (singular there)
  local best, bj
  for j, s in ipairs(L.saddles) do
    if s.order == 2 and not handled[j] and s.F2 and cabs(s.F2) > 0 then
      -- (the scale from F'' alone: |F''/2|^(1/2) e^{-i alpha}, alpha the descent angle)
      local f2 = s.F2 * 0.5
      local sm = cabs(f2) ^ 0.5 * landscape.expi(-(pi - landscape.carg(f2)) / 2)
      local w, guess = endpoint_w(s, a, Fa, sm)
      local d = cabs(w)
      -- (w must be the map's continuation from the saddle, near its linear guess: where
      -- F' is periodic, a copy of a saddle whole periods away has F0 - F(a) small by the
      -- period's shift alone, and Bessel's integral on [-pi, pi] paired each end with a
      -- copy 10.9 away: 1 % off under 2e-11)
      if d > 0 and d < M.RADIUS and cabs(w - guess) <= 0.5 * cabs(guess)
          and (not best or d < best) then
        best, bj = d, j
      end
    end
  end
  return bj
end

-- K_k(c) for k = 0..n-1, and the sizes of their series' terms (for the rounding).
local function lower_integrals(c, n)
  local K, size = {}, {}
  local c2 = c * c
  local pre = exp_c(-c2)
  local apre = cabs(pre)
  local cpow = c * 1
  local two_c2, ac2 = 2 * c2, 2 * cabs(c2)
  for k = 0, n - 1 do
    local term = cnew(1 / (k + 1), 0)
    local sum, asum, aterm = term, 1 / (k + 1), 1 / (k + 1)
    for j = 1, 400 do
      term = term * two_c2 / (k + 2 * j + 1)
      aterm = aterm * ac2 / (k + 2 * j + 1)
      sum, asum = sum + term, asum + aterm
      if aterm < 1e-18 * asum then break end
    end
    K[k] = cpow * pre * sum
    size[k] = cabs(cpow) * apre * asum
    cpow = cpow * c
  end
  return K, size
end

--- contribution(J, params, L, j, rays, piece, order) -> the saddle j and the endpoint
-- piece together, or nil and why (the caller then expands them apart).
function M.contribution(J, params, L, j, rays, piece, order)
  local s = L.saddles[j]
  local c = { 0, 0 }
  for _, p in ipairs(rays) do c[p.ray] = c[p.ray] + p.weight end
  local N = order == "optimal" and 40 or order
  local nraw = math.min(2 * (N + 2) + 24, 200)
  local a, F0, sm, _, _, aerr = expand.saddle_series(J, params, s.at, 2, nraw, L)
  local Fa = J.tape:eval(piece.at, params)
  local wa = endpoint_w(s, piece.at, Fa, sm)
  local wr = cparts(wa)
  if abs(wr) <= 1e-6 * cabs(wa) then
    return nil, "the endpoint lies on the saddle's ascent line (its path runs into the saddle)"
  end
  -- the endpoint's weight goes to the ray its path ends along (sigma = sign of Re w_a)
  local ew = piece.weight
  local cw = { c[1], c[2] }
  if wr > 0 then cw[1] = cw[1] + ew else cw[2] = cw[2] + ew end
  local scale = exp_c(F0)
  local value, err, used, tl = cnew(0, 0), 0, 0, {}
  if cw[1] ~= 0 or cw[2] ~= 0 then
    local terms, _, _, terr = expand.saddle_terms(a, F0, 2, cw, nraw, aerr)
    value, err, used = expand.truncate(terms, order, scale, cabs(F0), terr)
    for k = 1, used do tl[k] = terms[k] * scale end
  end
  -- less the endpoint's piece from 0 to w_a: the convergent series
  local K, size = lower_integrals(wa, nraw)
  local ksum, kabs, kerr = cnew(0, 0), 0, 0
  local last = {}
  for k = 0, nraw - 1 do
    if not a[k] then break end
    local t = a[k] * K[k]
    ksum = ksum + t
    kabs = kabs + cabs(a[k]) * size[k]
    kerr = kerr + (aerr and aerr[k] or 0) * cabs(K[k])
    last[#last + 1] = cabs(t)
  end
  local n = #last
  local tail = 0
  for i = math.max(1, n - 3), n do tail = tail + last[i] end
  if n < 8 or not (tail <= 1e-10 * (cabs(ksum) + kabs * EPS) + 1e-300) then
    return nil, format("the series from the saddle to the endpoint (w = %s) does not settle",
      tostring(wa))
  end
  local ascale = cabs(scale)
  value = value - ew * scale * ksum
  err = err + abs(ew) * ascale * (kerr + 2 * tail + 64 * EPS * kabs)
  -- w_a from w_a^2 = F0 - F(a), a difference of two values of F that each carry a few
  -- u (1 + |F|) of rounding: it moves w_a by delta/(2|w_a|) (at most sqrt(delta)), and
  -- the value by the integrand at the endpoint, |G(w_a)| e^{Re(F0 - w_a^2)}, times that
  local delta = 16 * EPS * (1 + cabs(F0) + cabs(Fa))
  local dw = math.min(delta / (2 * cabs(wa)), math.sqrt(delta))
  local g, wk = cnew(0, 0), cnew(1, 0)
  for k = 0, nraw - 1 do
    if not a[k] then break end
    g = g + a[k] * wk
    wk = wk * wa
  end
  err = err + abs(ew) * ascale * cabs(g) * cabs(exp_c(-(wa * wa))) * dw
  return { kind = "saddle near an endpoint (uniform, erfc)", at = s.at, endpoint = piece.at,
    order = 2, weights = cw, F = F0, value = value, error = err, terms = tl, used = used,
    dominance = cparts(F0), endpoint_image = wa,
    note = format("endpoint %s lies %.3g saddle widths from saddle %d (w = %s): taken "
      .. "together", tostring(piece.at), cabs(wa), j, tostring(wa)) }
end

return M
