-- steep.expand — asymptotic expansions of every contribution of the decomposition:
-- saddles of any order (as sums over their descent rays), finite endpoints (Watson's
-- lemma) and residues of the poles the deformation sweeps over.
--
-- Saddle of order m at t0 (F - F0 ~ f_m h^m): the map F0 - F(t0 + h) = w^m, i.e.
-- w = s h (r(h))^(1/m) with r = (F0 - F)/(-f_m h^m) = 1 + O(h) and s^m = -f_m, is
-- reverted to h(w) (series reversion, Lagrange inversion in C), and
-- G(w) = g(t0 + h(w)) h'(w) = sum a_n w^n. Along descent ray k (w = omega_k u, u > 0,
-- omega_k = exp(2 pi i k/m)) the integral is
--   e^{F0} sum_n a_n omega_k^{n+1} Gamma((n+1)/m) / m
-- (Olver, Asymptotics and Special Functions, 1974, ch. 3-4; Bleistein & Handelsman 1975,
-- ch. 7; DLMF 2.4(iv); Wojdylo, SIAM Review 48 (2006) 76-96 for explicit coefficients).
-- For a simple saddle passed through (rays weighted +1, -1) only even n survive:
-- e^{F0} sum_k a_{2k} Gamma(k + 1/2), DLMF 2.4.14-15.
--
-- Endpoint a with F'(a) != 0: F(a) - F(a + h) = w, G(w) = g(a + h(w)) h'(w) = sum a_n w^n
-- and the integral from a along the descent path is e^{F(a)} sum_n a_n n! (Watson's lemma,
-- DLMF 2.3(ii)); an algebraic factor (t - a)^beta of the amplitude gives
-- e^{F(a)} sum_n b_n Gamma(n + beta + 1), with the branch taken from the user's own
-- principal value next to the endpoint.

local core = require "steep.core"
local complex = require "steep.complex"
local landscape = require "steep.landscape"

local cnew, cparts = complex.new, complex.parts
local cabs, carg, expi = landscape.cabs, landscape.carg, landscape.expi
local format, pi, abs, exp, log, huge = string.format, math.pi, math.abs, math.exp, math.log, math.huge
local floor = math.floor
local series = core.series

local M = {}

M.MAX_SADDLE_ORDER = 8

-- Gamma of a positive real argument (GSL is the reference in the tests; here the
-- Lanczos-free route through lgamma is enough: Lua has no gamma, so use the reflection-
-- free product for small arguments and Stirling's series with many terms).
local gamma_kept, gamma_count = {}, 0   -- the same few arguments recur (k/m, k + 1/2)
local function gamma(x)
  local kept = gamma_kept[x]
  if kept then return kept end
  local x0 = x
  -- shift up to x >= 20, then Stirling with 8 terms (error < 1e-17 there)
  local prod = 1
  while x < 20 do prod = prod * x; x = x + 1 end
  local z = x
  local inv, inv2 = 1 / z, 1 / (z * z)
  local s = 1 / 12 - inv2 * (1 / 360 - inv2 * (1 / 1260 - inv2 * (1 / 1680 - inv2 * (1 / 1188
    - inv2 * (691 / 360360 - inv2 * (1 / 156 - inv2 * 3617 / 122400))))))
  local lg = (z - 0.5) * log(z) - z + 0.5 * log(2 * pi) + s * inv
  local v = exp(lg) / prod
  if x0 == x0 then   -- (NaN cannot be a key)
    if gamma_count >= 4096 then gamma_kept, gamma_count = {}, 0 end   -- bounded memory
    gamma_kept[x0], gamma_count = v, gamma_count + 1
  end
  return v
end
M.gamma = gamma

--- gamma_times(c, x) -> c Gamma(x) for a number or complex value c and x > 0, without
-- overflowing where Gamma(x) alone would (x > 171) but the product does not (the
-- coefficients of a saddle's series fall like R^-n while Gamma((n+1)/m) grows): Gamma
-- of x shifted into [20, 21), then the factors of the recurrence Gamma(x+1) = x Gamma(x)
-- multiplied into c one by one. Relative rounding below (x + 32) u (u = 2^-53); also
-- returned.
local function gamma_times(c, x)
  if x < 160 then return c * gamma(x), (math.abs(log(math.abs(gamma(x)))) + 32) * 1.1102230246251565e-16 end
  local K = floor(x - 20)
  local x0 = x - K
  local v = c * gamma(x0)
  for j = 0, K - 1 do v = v * (x0 + j) end
  return v, (x + 32) * 1.1102230246251565e-16
end
M.gamma_times = gamma_times

-- A series of length n from a list of coefficients (complex values).
local function ser(list, n)
  local t = {}
  for k = 1, n do t[k] = list[k] or 0 end
  return series(t)
end

--- circle_coefficients(J, params, t0, F0, m, s, n, rho [, N]) -> c, c_half, level, gmax or nil:
-- the coefficients c[k] = (1/2 pi i) of the integral of G(w) w^(-k-1) over |w| = rho,
-- k = 0..n-1, by the trapezoidal rule on N points (by default a power of 2, >= 256, >= 4n); c_half[k] the same on every
-- other point (k < N/2: their difference measures the aliasing error, whose square is
-- that of c), level(k) the rounding level of c[k] ((4 sqrt(N) + 16) u max|G| / rho^k: the
-- sum's rounding grows like sqrt(N) u max|G|), and max|G|. Inside the disc of convergence
-- they are G's Taylor coefficients; a circle that also encloses a simple pole
-- r/(w - b) of G gives those of G - r/(w - b) instead (the pole's own part has no net
-- residue: r/(w - b) w^(-k-1) decays like w^(-k-2)).
local EPS = 2.220446049250313e-16
function M.circle_coefficients(J, params, t0, F0, m, s, n, rho, N)
  if not N then
    N = 256
    while N < 4 * n do N = N * 2 end
  end
  local st, C, C2, gmax = core.invmap_circle(J.tape, params, t0, F0, m, s, rho, N, n)
  if st ~= "ok" then return nil end
  local out, half = C:totable(), C2:totable()
  for k = 0, n - 1 do out[k] = out[k + 1]; half[k] = half[k + 1] end
  out[n], half[n] = nil, nil
  local lev0 = (4 * math.sqrt(N) + 16) * EPS * gmax
  return out, half, function(k) return lev0 / rho ^ k end, gmax
end

-- |u - v| and |u| for complex values u, v (never plain numbers here: they come from C),
-- on the parts: these comparisons run over every coefficient
local function dist(u, v) return complex.hypot(u[1] - v[1], u[2] - v[2]) end
local function mag(u) return complex.hypot(u[1], u[2]) end
M.dist, M.mag = dist, mag

--- known_radius(J, params, L, t0, F0, m) -> R or nil: the distance from w = 0 to the
-- nearest singularity of G(w) that the landscape L knows of. G is singular where the
-- inverse map t(w) reaches another saddle (t'(w) = -P'(w)/F'(t) blows up there) or a
-- singular point of F or g; such a point p lies at |w| = |F0 - F(p)|^(1/m), with F
-- continued along the way: a log term c log(t - q) of F adds 2 pi i c per turn about q,
-- so every saddle (this one too) and singular point is also taken at F(p) +- 2 pi i c.
-- Some of these may lie on other sheets of t(w) (the true radius is then larger: the
-- circle's own coefficients say so, below); one the landscape missed makes a circle
-- past it fail its checks.
function M.known_radius(J, params, L, t0, F0, m)
  if not L then return nil end
  local shifts = { cnew(0, 0) }
  for _, q in ipairs(L.singularities or {}) do
    if q.coefficient and cabs(q.coefficient) > 0 then
      local turn = cnew(0, 2 * pi) * q.coefficient
      shifts[#shifts + 1], shifts[#shifts + 2] = turn, -turn
    end
  end
  local R = huge
  local tiny = 1e-12 * (1 + cabs(F0))
  local function consider(F)
    for _, shift in ipairs(shifts) do
      local d = cabs(F0 - F - shift)
      -- (a point at the saddle's own level maps to w = 0 on another sheet: not ours)
      if d > tiny then R = math.min(R, d ^ (1 / m)) end
    end
  end
  for _, sd in ipairs(L.saddles or {}) do consider(sd.F) end
  for _, q in ipairs(L.singularities or {}) do
    if q.kind ~= "removable" and q.kind ~= "regular" then
      local ok, F = pcall(J.tape.eval, J.tape, q.at, params)
      if ok and F and cabs(F) < huge then consider(F) end
    end
  end
  return R < huge and R or nil
end

-- Rounding-level errors of coefficients a[0..n-1] that came from series reversion
-- without a circle to check them: (k + 1) 64 u times the natural size at order k, the
-- largest lower coefficient carried up by the radius R (reversion loses digits like
-- (R_map/R)^k beyond that when the map's own series converges less far than G's: a
-- circle is then needed, and used when one can be trusted).
local function series_errors(a, n, R)
  local err, size = {}, 0
  R = (R and R < huge) and R or 1
  for k = 0, n - 1 do
    size = math.max(size / R, mag(a[k]))
    err[k] = (k + 1) * 64 * EPS * size
  end
  return err
end

-- The coefficients of G(w) by Cauchy's formula on a circle inside G's disc of
-- convergence (ext/invmap.c explains why: series reversion loses digits geometrically
-- when G converges further out than the map's own series). The trapezoidal rule on
-- |w| = rho on N points gives coefficient k with a rounding error of about
-- sqrt(N) u max|G| / rho^k and an aliasing error of about |a_k| (rho/R)^N (R the radius
-- of convergence). Coefficient k's relative error thus grows like (R/rho)^k: for n
-- coefficients the circle is sized from the nearest known singularity (known_radius,
-- else the growth of the series a) at rho = R e^(-4.6/n) (so (R/rho)^n <= 100; for
-- n <= 64 e^(-9/n), about 8100), within [0.75 R, 0.99 R], and N is a multiple of 64 with
-- (rho/R)^N <= 1e-16 (at least 4n and 128; at most 16384 but for the doubling below).
-- A circle is trusted only if
--   * its low-order coefficients agree with the series a (reliable there): a circle past
--     a pole of G would silently add the pole's residue to every coefficient;
--   * the rule on every other point (N/2) agrees to 1e-6 relative for k <= N/8.
-- When not, the radius shrinks by 0.85 (N doubled once first when only the second
-- failed). When the coefficients fall off faster than R predicts (the known singularity
-- lies on another sheet), R is taken from their growth instead (at most 8 times the
-- last R, twice at most), the circle 15 % further in.
-- Returns the coefficients, how they were obtained, and an estimate of each one's
-- absolute error: the rounding level (4 sqrt(N) + 16) u max|G| / rho^k plus the aliasing
-- (the N/2 rule's difference times (rho/R)^(N/2) where that rule has the coefficient,
-- |c_k| N (rho/R)^N beyond).
local function circle_points(n, q)
  local need = math.max(128, 4 * n, math.min(16384, 36.8 / -log(q)))
  return 64 * math.ceil(need / 64)
end

local function root_radius(c, from, to, S)
  local R = huge
  for k = from, to do
    local v = mag(c[k])
    if v > 0 and S > 0 then R = math.min(R, (v / S) ^ (-1 / k)) end
  end
  return R
end

-- `series` is the list a[0..n-1] from the series route, or a function giving its first
-- k entries (computed only as far as needed).
local function cauchy_coefficients(J, params, t0, F0, m, s, series, n, L)
  local by_reversion = series
  if type(series) == "table" then by_reversion = function() return series end end
  local a = by_reversion(math.min(n, 17))   -- what the checks below read
  local S = math.max(cabs(a[0]), cabs(a[1] or 0), cabs(a[2] or 0))
  local R = M.known_radius(J, params, L, t0, F0, m)
  -- root test on the series relative to the largest of a_0..a_2 (so that an overall
  -- scale, as the 1/x of 1/(x + w), does not bias the estimate)
  if not R then R = root_radius(a, 3, math.min(n - 1, 16), S) end
  local function all()
    local full = n > 17 and by_reversion(n) or a
    return full, series_errors(full, n, R)
  end
  if n <= 6 or R == huge then
    local c, err = all()
    return c, "series", err
  end
  -- (up to 64 coefficients, (R/rho)^n <= 8100 is enough: their last few only size the
  -- first omitted term; a circle at 0.75 R needs 128 points, at 0.8 R 192)
  local q = math.min(0.99, math.max(0.75, exp(-(n <= 64 and 9 or 4.6) / n)))
  local rho, N, doubled, regrown = q * R, circle_points(n, q), false, 0
  for _ = 1, 14 do
    local c, c2, level = M.circle_coefficients(J, params, t0, F0, m, s, n, rho, N)
    local ok_series, ok_alias = c ~= nil, c ~= nil
    if c then
      -- a coefficient that vanishes is compared with the natural size at its order: the
      -- largest lower one carried to the circle, max_{j<=k} |a_j| rho^j / rho^k
      local size = 0
      for k = 0, math.min(n - 1, 8) do
        size = math.max(size, mag(a[k]) * rho ^ k)
        if dist(c[k], a[k]) > 1e-7 * math.max(mag(a[k]), mag(c[k])) + 1e-9 * size / rho ^ k
            + 2 * level(k) then
          ok_series = false
          break
        end
      end
      for k = 0, math.min(n - 1, N // 8) do
        if dist(c[k], c2[k]) > 1e-6 * mag(c[k]) + 4 * level(k) then
          ok_alias = false
          break
        end
      end
    end
    if ok_series and ok_alias and n > 17 and regrown < 2 then
      -- the growth of the well-determined coefficients (100 times their rounding
      -- level), from order n/4 on, against R
      local Rc = huge
      for k = math.max(3, n // 4), n - 1 do
        local v = mag(c[k])
        if v > 100 * level(k) then Rc = math.min(Rc, (v / S) ^ (-1 / k)) end
      end
      if Rc < huge and Rc > 1.3 * R then
        -- (Rc, from coefficients of unknown prefactor, may overshoot by 15 %: the
        -- circle keeps inside that, for one circle more than needed would cost more)
        R, regrown = math.min(Rc, 8 * R), regrown + 1
        rho, N, doubled = q * R / 1.15, circle_points(n, q), false
        goto continue
      end
    end
    if ok_series and ok_alias then
      local ratio = rho / R
      local half_alias = ratio ^ (N / 2)
      local err = {}
      for k = 0, n - 1 do
        local alias
        if k <= N // 4 then alias = dist(c[k], c2[k]) * half_alias
        else alias = mag(c[k]) * N * ratio ^ N end
        err[k] = level(k) + alias
      end
      -- level(k) takes the rounding of the N values as independent: it overstates the
      -- error of high orders by orders of magnitude (the values' errors vary smoothly
      -- round the circle and alias little). For many coefficients, a second circle
      -- slightly inside (rho e^(-1/n): its own errors at most e times larger up to order
      -- n) measures the achieved accuracy instead: 3 times the largest difference of the two
      -- at k and its three neighbours on each side (the rounding is random from order to
      -- order, a single difference may fall short), plus what the circles share, the
      -- rounding of the map's scale s and of F0 carried to order k (8 (k + 1) u |c_k|),
      -- and the aliasing.
      if n > 100 then
        local c3 = M.circle_coefficients(J, params, t0, F0, m, s, n, rho * exp(-1 / n), N)
        if c3 then
          local d = {}
          for k = 0, n - 1 do d[k] = dist(c[k], c3[k]) end
          for k = 0, n - 1 do
            local near = 0
            for j = math.max(0, k - 3), math.min(n - 1, k + 3) do near = math.max(near, d[j]) end
            err[k] = math.min(err[k], 3 * near + 8 * (k + 1) * EPS * mag(c[k])
              + (err[k] - level(k)))
          end
        end
      end
      return c, format("Cauchy integral on |w| = %.4g (%d points)", rho, N), err
    end
    if ok_series and not doubled and N <= 16384 then
      N, doubled = 2 * N, true
    else
      rho, N, doubled = 0.85 * rho, circle_points(n, q), false
    end
    ::continue::
  end
  local c, err = all()
  return c, "series (no circle could be trusted)", err
end

--- saddle_series(J, params, t0, m, n [, L]) -> a (list a[0..n-1] as complex, 0-based),
-- F0, s, alpha, how, err (err[k] an estimate of a[k]'s absolute error)
-- The coefficients a_n of G(w) about the saddle t0 of order m, with the map oriented so
-- that w > 0 is the direction of descent ray 1 (the one core.saddle_starts lists first).
-- L, the landscape, sizes the Cauchy circle (known_radius).
function M.saddle_series(J, params, t0, m, n, L)
  if m > M.MAX_SADDLE_ORDER then
    error(format("a saddle of order %d at %s: orders above %d are not supported", m,
      tostring(t0), M.MAX_SADDLE_ORDER), 0)
  end
  -- jets of F to order k + m - 1 give k coefficients (one spare): the circle needs the
  -- first 17 for its checks, all n only if it is not trusted
  local have, Fc, gc = -1, nil, nil
  local function jets(k)
    local order = k + m
    if order > have then
      if order > core.max_order then
        error(format("expansion needs jets of order %d (at most %d) where no Cauchy "
          .. "circle could be trusted: ask for fewer terms", order, core.max_order), 0)
      end
      local ok, Fj, gj = pcall(J.tape.jet, J.tape, t0, order, params)
      if not ok then
        -- (the amplitude or F singular at the saddle itself, as t^(1/2) at a saddle at
        -- t = 0 that is also an end of the contour: no Taylor series there)
        error(format("the saddle at %s is a singular point of the integrand (%s): its series "
          .. "does not exist there; J:quad gives the value", tostring(t0),
          tostring(Fj):gsub("^.-:%d+: ", "")), 0)
      end
      Fc, gc, have = Fj:coefs(), gj:coefs(), order   -- Fc[k + 1] = f_k
    end
  end
  jets(math.min(n, 17))
  local F0, fm = Fc[1], Fc[m + 1]
  -- s: |f_m|^(1/m) e^{-i alpha_1}, alpha_1 = (pi - arg f_m)/m the first descent angle
  local alpha = (pi - carg(fm)) / m
  local sm = cabs(fm) ^ (1 / m) * expi(-alpha)
  -- the first n coefficients of G(w) = g(t0 + h(w)) h'(w) by series reversion (O(n^3))
  local function by_reversion(n)
    jets(n)
    -- r(h) = (F0 - F(t0 + h)) / (-f_m h^m) = sum_k (f_{m+k} / f_m) h^k
    local rs = series(table.move(Fc, m + 1, m + n, 1, {})) * (1 / fm)
    local root = rs ^ (1 / m)     -- principal branch near 1
    local w = (root * sm):coefs()
    table.insert(w, 1, 0)
    local hw = ser(w, n + 1):revert()                  -- h(w), length n + 1
    -- compose g's jet (about t0) with h(w)
    local gh = ser(table.move(gc, 1, n + 1, 1, {}), n + 1):compose(hw)
    local a = (gh * hw:deriv()):coefs()                -- length n
    table.move(a, 1, n, 0)
    a[n] = nil
    return a
  end
  local a, how, err = cauchy_coefficients(J, params, t0, F0, m, sm, by_reversion, n, L)
  return a, F0, sm, alpha, how, err
end

--- Terms of a saddle contribution with ray weights c[1..m] (c_k on descent ray k, whose
-- angle is alpha_1 + 2 pi (k-1)/m): the n-th term e^{F0} a_n Gamma((n+1)/m)/m
-- sum_k c_k omega_k^{n+1}. Terms that vanish by the symmetry of the rays are left out.
-- With aerr (the coefficients' errors), also each term's error (that of a_n carried
-- through, plus Gamma's rounding).
function M.saddle_terms(a, F0, m, c, nraw, aerr)
  local eF0 = complex.new(0, 0) + 1
  local terms, powers, errors = {}, {}, {}
  for n = 0, nraw - 1 do
    -- sum_k c_k omega_k^(n+1), on the parts
    local fr, fi = 0, 0
    for k = 1, m do
      if c[k] ~= 0 then
        local angle = 2 * pi * (k - 1) * (n + 1) / m
        fr, fi = fr + c[k] * math.cos(angle), fi + c[k] * math.sin(angle)
      end
    end
    local f = math.sqrt(fr * fr + fi * fi)
    if f > 1e-12 then
      local coef, rel = gamma_times(a[n] * cnew(fr, fi), (n + 1) / m)
      terms[#terms + 1] = coef / m
      powers[#powers + 1] = n
      if aerr then
        errors[#errors + 1] = cabs(gamma_times(aerr[n] * f, (n + 1) / m)) / m
          + rel * cabs(coef) / m
      end
    end
  end
  return terms, powers, eF0, aerr and errors or nil
end

-- The amplitude's singular factors at an endpoint a: looks through the products and
-- quotients of the amplitude for a factor base^beta (powc with a real exponent, or
-- exp(beta log(base)) with beta a parameter real at these values), sqrt(base), or
-- sqrt(base)^k (= base^(k/2) for principal branches), and for a factor log(base) or
-- log(base)^m (m = 1, 2), whose base vanishes at a; a factor of a denominator
-- counts with -beta. Returns {beta, pbase, lbase, m, rest} (rest: the other factors, an
-- expression regular at a, or a number), or nil.
local function endpoint_factors(J, params, a)
  local expr = require "steep.expr"
  local g = J.amplitude
  if not expr.is(g) then return nil end
  local factors, signs = {}, {}
  local function collect(n, sign)
    if n.op == "mul" then collect(n.a, sign); collect(n.b, sign)
    elseif n.op == "div" then collect(n.a, sign); collect(n.b, -sign)
    else factors[#factors + 1], signs[#factors + 1] = n, sign end
  end
  collect(g, 1)
  local bind = setmetatable({ [J.var.name] = a }, { __index = params })
  local function vanishes(base)
    if not (base and base:depends_on(J.var)) then return false end
    local v = base:value(bind)
    return cabs(v) <= 1e-12 * math.max(1, cabs(a))
  end
  local out, used = { beta = 0, m = 0 }, {}
  for i, f in ipairs(factors) do
    local beta, base, lbase, m
    if f.op == "powc" or f.op == "powi" then
      local br, bi = cparts(f.k)
      if bi == 0 and f.a.op == "sqrt" then
        beta, base = br / 2, f.a.a
      elseif bi == 0 and f.op == "powc" then
        beta, base = br, f.a
      elseif f.op == "powi" and f.a.op == "log" and signs[i] > 0 and f.k >= 1 and f.k <= 2 then
        lbase, m = f.a.a, f.k
      end
    elseif f.op == "sqrt" then
      beta, base = 0.5, f.a
    elseif f.op == "exp" then
      -- base^c with c a parameter (written exp(c log(base))): real c at these values
      local e, s = f.a, 1
      if e.op == "neg" then e, s = e.a, -1 end
      if e.op == "mul" then
        local c, l
        if expr.is(e.b) and e.b.op == "log" and not (expr.is(e.a) and e.a:depends_on(J.var)) then
          c, l = e.a, e.b
        elseif expr.is(e.a) and e.a.op == "log" and not (expr.is(e.b) and e.b:depends_on(J.var)) then
          c, l = e.b, e.a
        end
        if c then
          local cr, ci = cparts(expr.is(c) and c:value(bind) or c)
          if ci == 0 then beta, base = s * cr, l.a end
        end
      end
    elseif f.op == "log" and signs[i] > 0 then
      lbase, m = f.a, 1
    end
    if beta and not out.pbase and vanishes(base) then
      out.beta, out.pbase = signs[i] * beta, base
      used[i] = true
    elseif lbase and not out.lbase and vanishes(lbase) then
      out.lbase, out.m = lbase, m
      used[i] = true
    end
  end
  if not (out.pbase or out.lbase) then return nil end
  local rest = 1
  for j, h in ipairs(factors) do
    if not used[j] then
      if signs[j] > 0 then rest = rest * h else rest = rest / h end
    end
  end
  out.rest = rest
  return out
end
M.endpoint_factors = endpoint_factors

-- psi(s) and psi'(s) for real s > 0: the recurrences up to s >= 10, then the asymptotic
-- series (DLMF 5.11.2 and 5.15.8; error below 1e-16 there).
local function digamma(s)
  local acc = 0
  while s < 10 do acc = acc - 1 / s; s = s + 1 end
  local s2 = 1 / (s * s)
  return acc + log(s) - 0.5 / s - s2 * (1 / 12 - s2 * (1 / 120 - s2 * (1 / 252 - s2
    * (1 / 240 - s2 * (1 / 132 - s2 * 691 / 32760)))))
end
local function trigamma(s)
  local acc = 0
  while s < 10 do acc = acc + 1 / (s * s); s = s + 1 end
  local s2 = 1 / (s * s)
  return acc + 1 / s + 0.5 * s2 + (1 / s) * s2 * (1 / 6 - s2 * (1 / 30 - s2 * (1 / 42
    - s2 * (1 / 30 - s2 * 5 / 66))))
end
M.digamma, M.trigamma = digamma, trigamma

--- endpoint_series(J, params, a, n [, near, L, opts]) -> b (0-based list), F(a), beta, err
-- Watson's lemma at a finite endpoint with F'(a) != 0: the coefficients of
-- G(w) = g(a + h(w)) h'(w) (times w^-beta for an algebraic factor (t-a)^beta), and an
-- estimate of each one's error. L, the landscape, sizes the Cauchy circle.
-- With a factor log(base)^m (base vanishing at a): log(base) = log w + Lw(w), Lw regular,
-- and the integral of e^-w w^(s-1) (log w)^j is Gamma^(j)(s) = Gamma(s) D_j(s), D_1 = psi,
-- D_2 = psi^2 + psi' (DLMF 5.2.2, 5.15.1; Wong, Asymptotic Approximations of Integrals,
-- 1989, ch. I): the coefficients returned are sum_j C(m,j) [G Lw^(m-j)]_n D_j(n+beta+1),
-- so that the terms stay b_n Gamma(n + beta + 1). A factor (t-a)^beta with beta <= -1 is
-- not integrable: refused unless opts.finite_part (Hadamard's finite part: the same
-- continued sums).
function M.endpoint_series(J, params, a, n, near, L, opts)
  local order = n + 1
  if order > core.max_order then
    error(format("expansion needs jets of order %d (at most %d)", order, core.max_order), 0)
  end
  local fac = endpoint_factors(J, params, a)
  local beta = fac and fac.pbase and fac.beta or nil
  if beta and beta <= -1 and not (opts and opts.finite_part) then
    error(format("the integrand behaves like (t - %s)^%g at the endpoint %s: not integrable "
      .. "there (a power <= -1); the integral diverges (expand{finite_part = true} gives "
      .. "Hadamard's finite part, the value continued in the power)", tostring(a), beta,
      tostring(a)), 0)
  end
  -- (a jet that fails at a: a singular factor of a form not read above, said plainly;
  -- or, where the low orders are finite, Taylor coefficients that overflow because a
  -- singular point lies close to a: said so, with the highest order that holds)
  local function jet_at(tape, k)
    local ok, j1, j2, j3 = pcall(tape.jet, tape, a, k, params)
    if ok then return j1, j2, j3 end
    if k > 2 and pcall(tape.jet, tape, a, 1, params) then
      local lo, hi = 1, k
      while hi - lo > 1 do
        local mid = (lo + hi) // 2
        if pcall(tape.jet, tape, a, mid, params) then lo = mid else hi = mid end
      end
      error(format("the integrand's Taylor coefficients at the endpoint %s overflow past "
        .. "order %d (a singular point close to it): ask for fewer terms", tostring(a), lo), 0)
    end
    error(format("the integrand is singular at the endpoint %s in a form the endpoint "
      .. "expansion does not read (%s); it reads amplitude factors (t - a)^beta (beta a "
      .. "number, or a parameter written base^p), sqrt(t - a) and log(t - a)^m (m <= 2) in "
      .. "products and quotients, and logs of t - a in the exponent", tostring(a),
      tostring(j1):gsub("^.-:%d+: ", "")), 0)
  end
  local Fj
  if fac then
    -- J.tape also computes the amplitude, which is singular at a (its jet fails there):
    -- the exponent's jet from a tape of its own
    if not J._exponent_tape then
      J._exponent_tape = require("steep.expr").compile({ J.exponent }, J.var)
    end
    Fj = jet_at(J._exponent_tape, order)
  else
    Fj = jet_at(J.tape, order)
  end
  local gj, qb
  if fac then
    -- the regular part: rest * (pbase/(t-a))^beta; its jet from a tape of its own, with
    -- the bases' jets (base = (t - a) q(t): q's coefficients are base's shifted by one)
    local expr = require "steep.expr"
    local key = fac.rest
    local tapes = J._endpoint_tapes or setmetatable({}, { __mode = "k" })
    J._endpoint_tapes = tapes
    local quotient_tape = tapes[fac]
    if not quotient_tape then
      quotient_tape = expr.compile({ fac.rest, fac.pbase or 1, fac.lbase or 1 }, J.var)
      tapes[fac] = quotient_tape
    end
    local _ = key
    local rj, pj, lj = jet_at(quotient_tape, order + 1)
    local function shifted(sj, what)
      local q = {}
      for k = 0, order - 1 do q[k + 1] = sj:coef(k + 1) end
      local qs = ser(q, order)
      if cabs(qs:coef(0)) == 0 then
        error(format("the amplitude's factor %s vanishes to higher order at the endpoint %s",
          tostring(what), tostring(a)), 0)
      end
      return qs
    end
    local rr = {}
    for k = 0, order - 1 do rr[k + 1] = rj:coef(k) end
    gj = ser(rr, order)
    if fac.pbase then gj = gj * shifted(pj, fac.pbase) ^ beta end
    if fac.lbase then qb = shifted(lj, fac.lbase) end
  else
    local _, g = J.tape:jet(a, order, params)
    gj = g
  end
  local Fa, f1 = Fj:coef(0), Fj:coef(1)
  if cabs(f1) == 0 then return nil end
  -- w = F(a) - F(a + h) = -f1 h - f2 h^2 - ...
  local w = { 0 }
  for k = 1, n do w[k + 1] = -Fj:coef(k) end
  local hw = ser(w, n + 1):revert()
  local glist = {}
  for k = 0, n do glist[k + 1] = gj:coef(k) end
  local gh = ser(glist, n + 1):compose(hw)
  local G = gh * hw:deriv()
  local b = {}
  if fac then
    -- (t - a)^beta = h(w)^beta = w^beta (h(w)/w)^beta: fold (h/w)^beta into G; the factor
    -- w^beta goes into Gamma(n + beta + 1)
    local hq = {}
    for k = 0, n - 1 do hq[k + 1] = hw:coef(k + 1) end
    local hqs = ser(hq, n)
    if beta then G = G * hqs ^ beta end
    -- our principal values may differ from the user's by exp(2 pi i k beta) (the power)
    -- and by 2 pi i k (the log): compare the two a small step down the descent path
    local t1 = a + 1e-6 * math.max(1, cabs(a)) * (-1 / f1) / cabs(1 / f1)
    local F1 = J.tape:eval(t1, params)
    local w1 = Fa - F1
    local bind = setmetatable({ [J.var.name] = t1 }, { __index = params })
    local expr = require "steep.expr"
    local phase = 1
    if beta then
      -- the user's amplitude (without its log factor) times h'(w) against what the series
      -- holds, G(w) w^beta, at w1 (both sides summed as series there, so that they agree
      -- to rounding but for the branch): their ratio is exp(2 pi i k beta), k whole,
      -- taken exactly. (Re-deriving the branches of (t - a)^beta and q^beta instead had
      -- read the signs of zeros differently from the series: the upper end of
      -- (1 - t)^-0.5 came out with the opposite sign, "estimated".)
      local h1 = t1 - a
      local wv, hk = cnew(0, 0), h1
      for k = 1, math.min(n, 12) do wv, hk = wv - Fj:coef(k) * hk, hk * h1 end
      local Gv, dh, wk = cnew(0, 0), cnew(0, 0), cnew(1, 0)
      for k = 0, math.min(n - 1, 12) do
        Gv, dh, wk = Gv + G:coef(k) * wk, dh + (k + 1) * hw:coef(k + 1) * wk, wk * wv
      end
      local user = J.amplitude:value(bind)
      if fac.lbase then user = user / complex.apply("log", fac.lbase:value(bind)) ^ fac.m end
      local raw = user * dh / (Gv * wv ^ beta)
      local unit = raw / cabs(raw)
      local best = huge
      for k = -4, 4 do
        local c = complex.apply("exp", cnew(0, 2 * pi * k * beta))
        if cabs(unit - c) < best then best, phase = cabs(unit - c), c end
      end
      if best > 1e-6 then phase = unit end
    end
    if fac.lbase then
      -- log(base) = log w + Lw(w), Lw = log(h/w) + log(q_b(a + h(w)))
      local qbh = ser((function()
        local c = {}
        for k = 0, n do c[k + 1] = qb:coef(k) end
        return c
      end)(), n + 1):compose(hw)
      local qlist = {}
      for k = 0, n - 1 do qlist[k + 1] = qbh:coef(k) end
      local Lw = hqs:log() + ser(qlist, n):log()
      local user_log = complex.apply("log", fac.lbase:value(bind))
      local ours_log = complex.apply("log", w1) + Lw:coef(0)
      -- (Lw's value at w1 to first order; the jump is a multiple of 2 pi i)
      local jump = user_log - ours_log - Lw:coef(1) * w1
      local k = math.floor(select(2, cparts(jump)) / (2 * pi) + 0.5)
      if k ~= 0 then Lw = Lw + cnew(0, 2 * pi * k) end
      local m, sb = fac.m, beta or 0
      local parts = { [0] = G }
      local Lpow = ser({ 1 }, n)
      for j = m, 0, -1 do
        -- C(m, j) G Lw^(m - j), with (log w)^j
        if j < m then Lpow = Lpow * Lw end
        parts[j] = G * Lpow * (j == 1 and m or 1)
      end
      for k2 = 0, n - 1 do
        local s = k2 + sb + 1
        local d1 = digamma(s)
        local v = parts[0]:coef(k2)
        if m >= 1 then v = v + parts[1]:coef(k2) * d1 end
        if m >= 2 then v = v + parts[2]:coef(k2) * (d1 * d1 + trigamma(s)) end
        b[k2] = v * phase
      end
      return b, Fa, beta, series_errors(b, n, M.known_radius(J, params, L, a, Fa, 1)), true
    end
    for k = 0, n - 1 do b[k] = G:coef(k) * phase end
    return b, Fa, beta, series_errors(b, n, M.known_radius(J, params, L, a, Fa, 1))
  end
  for k = 0, n - 1 do b[k] = G:coef(k) end
  local err
  b, _, err = cauchy_coefficients(J, params, a, Fa, 1, -f1, b, n, L)
  return b, Fa, beta, err
end

--- Terms of an endpoint contribution: e^{F(a)} b_n Gamma(n + beta + 1), and with berr
-- (the coefficients' errors) each term's error.
function M.endpoint_terms(b, beta, nraw, berr)
  local terms, powers, errors = {}, {}, {}
  for n = 0, nraw - 1 do
    local v, rel = gamma_times(b[n], n + (beta or 0) + 1)
    terms[#terms + 1] = v
    powers[#powers + 1] = n
    if berr then
      errors[#errors + 1] = gamma_times(berr[n], n + (beta or 0) + 1) + rel * cabs(v)
    end
  end
  return terms, powers, berr and errors or nil
end

--- Sums terms to `order` terms (a number) or to the smallest term ("optimal"); returns
-- the sum, the error estimate (size of the first omitted term, or of the smallest one
-- for optimal truncation, plus the errors of the terms used when term_errors gives
-- them) and the number of terms used. The estimate is never below the
-- rounding floor (128 + logsize) u sum |terms used| |scale| (u = 2^-52): Gamma here is good
-- to about 2e-14 relative, and e^F with |F| = logsize carries |F| u of its own; without
-- the floor a series that terminates (all further terms zero) would claim no error.
-- room (default 1) widens optimal truncation's factor for series that need it.
function M.truncate(terms, order, scale, logsize, term_errors, room)
  scale = scale or 1
  local n = #terms
  local function floor(used)
    local s = 0
    for k = 1, used do s = s + cabs(terms[k]) end
    return (128 + (logsize or 0)) * 2.220446049250313e-16 * s * cabs(scale)
  end
  local function coef_errors(used)
    local e = 0
    if term_errors then for k = 1, used do e = e + term_errors[k] end end
    return e * cabs(scale)
  end
  if order == "optimal" then
    -- A term that cannot be told from 0 (see noise) while a later one can is a zero of the series'
    -- structure (at a saddle of order 3 two of every three vanish), not its smallest
    -- term: J_nu(nu) by Schlaefli's integral stopped at such a zero, 1.8e-4 off under
    -- 4e-11. Such terms are passed over, here and as neighbours below.
    local size, big, last_real = {}, {}, 0
    for k = 1, n do
      size[k] = cabs(terms[k])
      big[k] = math.max(big[k - 1] or 0, size[k])
    end
    local function noise(k)
      -- (below its own error, or 1e-13 of the largest before it, and a million times
      -- below a term within two of it: a smooth run of small terms, as at Stieltjes'
      -- optimum, is not noise)
      if not (size[k] <= 1e-13 * big[k]
          or (term_errors and term_errors[k] and size[k] <= term_errors[k])) then
        return false
      end
      for j = math.max(1, k - 2), math.min(n, k + 2) do
        if size[k] <= 1e-6 * size[j] then return true end
      end
      return false
    end
    for k = 1, n do
      if not noise(k) then last_real = k end
    end
    local function structural_zero(k) return k < last_real and noise(k) end
    local best, bi = huge, nil
    for k = 2, n do
      if not noise(k) and size[k] < best then best, bi = size[k], k end
    end
    if not bi or (bi == last_real and bi < n) then
      -- the terms fall to the last one above the noise and only noise follows: the
      -- series has ended, every term above it is summed, and the error is the largest
      -- of the noise (of at least three terms: fewer may hide the next real term)
      bi = last_real + 1
      best = 0
      for k = bi, n do best = math.max(best, size[k]) end
      if n - last_real < 3 then best = math.max(best, size[last_real]) end
    end
    local s = cnew(0, 0)
    for k = 1, bi - 1 do s = s + terms[k] end
    -- terms that oscillate in size (complex singularities of the Borel transform) can
    -- dip far below their envelope at the smallest one: then the envelope there, the
    -- geometric mean of the neighbours, is the honest size of the error
    local kb, ka = bi - 1, bi + 1
    while kb > 1 and structural_zero(kb) do kb = kb - 1 end
    while ka < n and structural_zero(ka) do ka = ka + 1 end
    local before, after = terms[kb], terms[ka]
    if before and after then
      local env = math.sqrt(cabs(before) * cabs(after))
      if best < 0.5 * env then best = env end
    end
    -- the smallest term not well below the first: the series does not fall here, and
    -- the terms it leaves out may first rise in a hump (Kummer's integral at x = 0.5: the
    -- end's series gave -1.2 within 9.9 for -26): the error is at least the first term
    -- and the hump's terms together, up to where they fall below half the first
    if size[bi] and size[bi] >= 0.5 * size[1] then
      -- (the hump ends where the terms fall below half the first, or where, past their
      -- peak, they start to grow again: the divergent tail beyond is not summed)
      local hump, peaked = size[1], false
      for k = 2, n do
        if k > bi and size[k] < 0.5 * size[1] then break end
        if peaked and size[k] > size[k - 1] then break end
        if k > 2 and size[k] < size[k - 1] then peaked = true end
        hump = hump + size[k]
      end
      best = math.max(best, hump)
    end
    -- at the smallest term the remainder is that term times a factor that grows like
    -- sqrt(pi N/2) off the real axis (Olver's bound for the saddle-point remainder in a
    -- Stokes sector, DLMF 9.7(iii) for Airy's: the subdominant exponential switching on
    -- is of the size of the smallest term times that); a real alternating series keeps
    -- the smallest term (Stieltjes)
    -- (`room` multiplies it: an endpoint's series next to a Stokes line reaches that
    -- bound itself, e^x E1(x) at arg x = pi - 1e-3 by 1.00 to 1.03 times it)
    local factor = M.alternating(terms, bi) and 1.5
      or math.max(1.5, (room or 1) * math.sqrt(pi * bi / 2))
    return s * scale, math.max(factor * best * cabs(scale), floor(bi - 1)) + coef_errors(bi - 1),
      bi - 1
  end
  local used = math.min(order, n)
  local s = cnew(0, 0)
  for k = 1, used do s = s + terms[k] end
  return s * scale, math.max(M.remainder(terms, used) * cabs(scale), floor(used))
    + coef_errors(used), used
end

--- remainder(terms, used) -> an estimate of |sum of the terms after `used`| that bounds it
-- in practice: the next three terms that are not negligible (a symmetry can make every
-- other term vanish: the first omitted one then says nothing), their sizes added, and
-- while they still fall, the rest of a geometric series with their last ratio (at most a
-- factor 10). Calibrated against 15 families of published and exact values
-- (tests/test_calibration.lua): the first omitted term alone fell short by up to a
-- factor 2 (Stirling's series near its optimal point, Airy's next to a Stokes line, where
-- the remainder's own bound carries a factor ~ sqrt(pi N/2), DLMF 9.7(iii)).
function M.remainder(terms, used)
  local big = 0
  for k = 1, used do big = math.max(big, cabs(terms[k])) end
  local next3, raw = {}, {}
  for k = used + 1, #terms do
    local v = cabs(terms[k])
    if v > 1e-13 * big then next3[#next3 + 1], raw[#raw + 1] = v, terms[k] end
    if #next3 == 3 then break end
  end
  if #next3 == 0 then
    -- the series stops (every later term below 1e-13 of the largest), or none was
    -- computed; what is below still counts (a seventh term of 2.2e-14 against a largest of
    -- 0.22 had been dropped: the value 2.3e-14 off under 1.1e-14)
    if #terms <= used then return huge end
    local rest = 0
    for k = used + 1, math.min(#terms, used + 3) do rest = rest + cabs(terms[k]) end
    return 1.5 * rest
  end
  -- terms of alternating sign (a real series of Stieltjes type, as Watson's lemma gives
  -- for e^x E1(x)): the remainder lies between 0 and the first omitted term (DLMF 2.3
  -- (iii) for that case); its first two, and half again, bound it with room
  if #raw == 3 and M.alternating(raw, 1) then return 1.5 * (next3[1] + next3[2]) end
  local sum = 0
  for _, v in ipairs(next3) do sum = sum + v end
  local a, b = next3[#next3 - 1], next3[#next3]
  local r = a and b / a or 1
  if r < 1 then sum = sum + b * math.min(r / (1 - r), 10) end
  -- the ratios of an asymptotic series grow with the index: the geometric rest falls
  -- short by about the last ratio's share; and half again, so that a remainder made of
  -- terms all of one phase is not met exactly (the calibration's margin)
  return sum * (1.5 + math.min(r, 1))
end

--- Do terms[from], terms[from + 1], terms[from + 2] alternate in sign, real to rounding?
function M.alternating(terms, from)
  for k = from, from + 1 do
    local u, v = terms[k], terms[k + 1]
    if not (u and v) or cabs(u) == 0 then return false end
    local qr, qi = cparts(v / u)
    if not (qr < 0 and abs(qi) <= 1e-6 * abs(qr)) then return false end
  end
  return true
end

return M
