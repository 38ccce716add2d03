-- steep.multiquad — J:quad for integrals in several variables: iterated quadrature.
--
-- The innermost integral (over the last variable) is a one-variable steep integral with
-- the outer variables as parameters. Along = "deformed" (the default): when its contour
-- reaches infinity and the exponent is not real there, the existing one-variable
-- machinery deforms it (J_inner:quad, steepest descent decomposition); otherwise it is
-- integrated along the given contour by the C kernels (Gauss-Kronrod on segments and
-- circular arcs, pieces of doubling length along rays). The outer integrals are
-- adaptive Gauss-Kronrod (7, 15) in Lua over the given contours, with QUADPACK's error
-- estimate (Piessens et al. 1983) plus the inner errors carried through the weights;
-- for a stationary-phase integral over R^n (full real lines, oscillating integrand) each
-- outer line is replaced by the steepest descent path through the stationary point of
-- the reduced exponent Phi(x_k) = F(x_1..x_k, y*(x_1..x_k)), y* the critical point of F
-- in the inner variables (traced numerically; Cauchy's theorem in each variable in turn).

local core = require "steep.core"
local complex = require "steep.complex"
local critical = require "steep.critical"
local cmatrix = require "steep.cmatrix"

local cnew, cparts, hypot = complex.new, complex.parts, complex.hypot
local format, pi, abs, sqrt, huge, max, min = string.format, math.pi, math.abs, math.sqrt,
  math.huge, math.max, math.min

local M = {}

local function cabs(z) local re, im = cparts(z); return hypot(re, im) end
local function expi(th) return cnew(math.cos(th), math.sin(th)) end

-- Target relative accuracy of the outer integrals by the number of variables (the inner
-- one-variable integrals run at 1e-13).
local OUTER_TOL = { 1e-12, 1e-12, 1e-10, 1e-8 }
local INNER_TOL = 1e-13
local MAX_INTERVALS = 300
local EPS = 2.220446049250313e-16

-- Kronrod 15-point nodes and weights and the 7-point Gauss weights (QUADPACK's qk15, as
-- in ext/quad.c).
local XGK = { 0.991455371120812639206854697526329, 0.949107912342758524526189684047851,
  0.864864423359769072789712788640926, 0.741531185599394439863864773280788,
  0.586087235467691130294144845693013, 0.405845151377397166906606412076961,
  0.207784955007898467600689403773245, 0 }
local WGK = { 0.022935322010529224963732008058970, 0.063092092629978553290700663189204,
  0.104790010322250183839876322541518, 0.140653259715525918745189590510238,
  0.169004726639267902826583426598550, 0.190350578064785409913256402421014,
  0.204432940075298892414161999234649, 0.209482141084727828012999174891714 }
local WG = { 0.129484966168869693270611432679082, 0.279705391489276667901467771423780,
  0.381830050505118944950369775488975, 0.417959183673469387755102040816327 }

-- One Kronrod rule on s in [s0, s1] of f(map(s)) * dz/ds, f returning (value, error):
-- result (re, im), error (QUADPACK's, plus the inner errors through the weights), and
-- the integral of |f|.
local function rule(f, map, s0, s1)
  local c, h = 0.5 * (s0 + s1), 0.5 * (s1 - s0)
  local kr, ki, gr, gi, rabs, ein = 0, 0, 0, 0, 0, 0
  local vr, vi = {}, {}
  for j = 1, 15 do
    local jj = j <= 8 and j or 16 - j
    local x = (j <= 8) and -XGK[jj] or XGK[jj]
    local z, dz = map(c + h * x)
    local v, e = f(z)
    local fz = v * dz
    local re, im = cparts(fz)
    vr[j], vi[j] = re, im
    local w = WGK[jj]
    kr, ki = kr + w * re, ki + w * im
    rabs = rabs + w * hypot(re, im)
    ein = ein + w * e * cabs(dz)
    if jj % 2 == 0 then
      local wg = WG[jj / 2]
      gr, gi = gr + wg * re, gi + wg * im
    end
  end
  local ah = abs(h)
  local mr, mi = 0.5 * kr, 0.5 * ki
  local resasc = 0
  for j = 1, 15 do
    local jj = j <= 8 and j or 16 - j
    resasc = resasc + WGK[jj] * hypot(vr[j] - mr, vi[j] - mi)
  end
  resasc = resasc * ah
  local err = hypot(kr - gr, ki - gi) * ah
  if resasc ~= 0 and err ~= 0 then err = resasc * min(1, (200 * err / resasc) ^ 1.5) end
  err = max(err, 50 * EPS * rabs * ah)
  if not (kr == kr and ki == ki) then err = huge end
  return kr * h, ki * h, err, rabs * ah, ein * ah
end

-- Adaptive bisection on [s0, s1] until the error is within tol of the integral of |f|
-- (as core.quad_polyline: cancellation is not chased; an inner integral far from the
-- peak cancels to far below its integrand's size and does not need more digits than the
-- whole); returns value, error, status.
-- The inner integrals' errors (carried through the weights) are added to the result's
-- error but do not steer the bisection: below them no subdivision helps.
local function adaptive(f, map, s0, s1, tol, atol)
  atol = atol or 0
  local iv = {}
  local r, i, e, a, ein = rule(f, map, s0, s1)
  iv[1] = { s0 = s0, s1 = s1, r = r, i = i, e = e, a = a, ein = ein }
  local status = "ok"
  while true do
    local tr, ti, te, ta, tin, worst, wi = 0, 0, 0, 0, 0, -1, nil
    for k, v in ipairs(iv) do
      tr, ti, te, ta, tin = tr + v.r, ti + v.i, te + v.e, ta + v.a, tin + v.ein
      if v.e > worst then worst, wi = v.e, k end
    end
    if te <= max(max(tol, 100 * EPS) * ta, atol) or te == 0 then
      return cnew(tr, ti), te + tin, status
    end
    if #iv >= MAX_INTERVALS or not (te < huge) then
      return cnew(tr, ti), te + tin, (te < huge) and "limit" or "nonfinite"
    end
    local v = table.remove(iv, wi)
    local m = 0.5 * (v.s0 + v.s1)
    local r1, i1, e1, a1, n1 = rule(f, map, v.s0, m)
    local r2, i2, e2, a2, n2 = rule(f, map, m, v.s1)
    iv[#iv + 1] = { s0 = v.s0, s1 = m, r = r1, i = i1, e = e1, a = a1, ein = n1 }
    iv[#iv + 1] = { s0 = m, s1 = v.s1, r = r2, i = i2, e = e2, a = a2, ein = n2 }
  end
end

local function worse(a, b)
  if a == "ok" then return b end
  return a
end

-- A full circle by the trapezoidal rule in the angle, nested doubling from 8 points
-- until two levels agree to tol times the integral of |f| and the level before agreed
-- to 1e-2 of it (as core.quad_circle; exponentially convergent for integrands analytic
-- about the circle: Trefethen & Weideman, SIAM Review 56 (2014)), or to twice the inner
-- integrals' errors through the weights. The error is the last difference plus those.
local MAX_CIRCLE_POINTS = 4096

local function circle_trapezoid(f, c, r, dir, centre, tol)
  local sr, si, sabs, ein = 0, 0, 0, 0
  local function add(j, N)
    local e = expi(centre + 2 * pi * j / N)
    local dz = cnew(0, r) * e
    local v, err = f(c + r * e)
    local re, im = cparts(v * dz)
    sr, si, sabs, ein = sr + re, si + im, sabs + hypot(re, im), ein + err * r
  end
  for j = 0, 7 do add(j, 8) end
  local pr, pi_, dprev = sr * 2 * pi / 8, si * 2 * pi / 8, huge
  local N = 16
  while N <= MAX_CIRCLE_POINTS do
    for j = 1, N - 1, 2 do add(j, N) end
    local w = 2 * pi / N
    local cr, ci = sr * w, si * w
    local d, size = hypot(cr - pr, ci - pi_), sabs * w
    if not (d == d) then return cnew(cr, ci), huge, "nonfinite" end
    pr, pi_ = cr, ci
    -- (differences at the level of the inner integrals' errors cannot be resolved)
    local noise = 2 * ein * w
    if d <= max(tol, 100 * EPS) * size + noise and dprev <= 1e-2 * size + noise then
      return dir * cnew(cr, ci), d + ein * w, "ok"
    end
    dprev = d
    N = 2 * N
  end
  return dir * cnew(pr, pi_), dprev + ein * 2 * pi / (N / 2), "limit"
end

-- The whole real line by the trapezoidal rule for an integrand that decays fast and is
-- analytic in a strip (a whitened Laplace integrand, about N(0, 1)): exponentially
-- accurate (Trefethen & Weideman 2014, section 5). Points j h out to where |f| is below
-- 1e-18 of its largest value, h halved (nested) until two steps agree to tol times the
-- integral of |f| (or the inner errors' level) and the step before agreed to 1e-2.
local function line_trapezoid(f, tol, atol)
  local vals = {}
  local sabs, ein, fmax = 0, 0, 0
  local function at(u)
    local v, e = f(cnew(u, 0))
    local a = cabs(v)
    if not (a == a) then error("quad: the integrand is not finite at " .. u, 0) end
    fmax = max(fmax, a)
    return v, a, e
  end
  local h = 0.5
  local sum = cnew(0, 0)
  local pts = {}
  local function take(u)
    local v, a, e = at(u)
    sum, sabs, ein = sum + v, sabs + a, ein + e
    pts[#pts + 1] = u
    return a
  end
  take(0)
  local hi, lo = 0, 0
  for _, dir in ipairs({ 1, -1 }) do
    local small, u = 0, 0
    while small < 2 or abs(u) < 6 do
      u = u + dir * h
      local a = take(u)
      if a <= 1e-18 * fmax then small = small + 1 else small = 0 end
      if abs(u) > 200 then error("quad: the integrand does not decay along the line", 0) end
    end
    if dir > 0 then hi = u else lo = u end
  end
  local T, dprev = sum * h, huge
  for _ = 1, 8 do
    local hh = h / 2
    local u = lo + hh
    while u < hi do take(u); u = u + h end
    local Tn = sum * hh
    local d = cabs(Tn - T)
    local size, noise = sabs * hh, 2 * ein * hh
    T, h = Tn, hh
    if d <= max(max(tol, 100 * EPS) * size, atol or 0) + noise and dprev <= 1e-2 * size + noise then
      return T, d + ein * h + fmax * 1e-18 * (hi - lo), "ok"
    end
    dprev = d
  end
  return T, dprev + ein * h, "limit"
end

---------------------------------------------------------------------------------------
-- Pieces of a given contour.
---------------------------------------------------------------------------------------

-- The integral of f along one piece (a segment, an arc, a ray) of a given contour.
-- centre: an angle to centre full circles on (the peak of a torus integrand); scale(a):
-- the length scale of a ray from a (mapped to t in [0, 1) by a + L t/(1 - t) u).
local function piece_integral(f, p, tol, centre, scale, atol)
  if p.kind == "segment" then
    local a, d = p.a, p.b - p.a
    return adaptive(f, function(s) return a + s * d, d end, 0, 1, tol, atol)
  elseif p.kind == "arc" then
    local c, r = p.center, p.radius
    local th0, th1 = p.from, p.to
    if abs(abs(th1 - th0) - 2 * pi) < 1e-12 then
      return circle_trapezoid(f, c, r, th1 > th0 and 1 or -1, centre or 0, tol)
    end
    return adaptive(f, function(th)
      local e = expi(th)
      return c + r * e, cnew(0, r) * e
    end, th0, th1, tol, atol)
  end
  local a = p.a or p.b
  local u = expi(p.angle)
  local L = scale(a)
  local v, e, st = adaptive(f, function(t)
    local q = 1 - t
    return a + (L * t / q) * u, (L / (q * q)) * u
  end, 0, 1, tol, atol)
  if p.kind == "ray_in" then v = -v end
  return v, e, st
end

---------------------------------------------------------------------------------------
-- The innermost integral.
---------------------------------------------------------------------------------------

local function inner_integral(J)
  if not J._inner then
    local integral = require "steep.integral"
    J._inner = integral.new { var = J.vars[J.n], exponent = J.exponent,
      amplitude = J.amplitude, contour = J.contours[J.n], large = J.large }
  end
  return J._inner
end

local function has_infinite_end(C)
  for _, p in ipairs(C.pieces) do
    if p.kind == "ray_in" or p.kind == "ray_out" then return true end
  end
  return false
end

-- f(xs) -> value, error, status of the innermost integral at the outer values xs.
local function make_inner(J, params, mode, centre, scale, atol)
  local Jin = inner_integral(J)
  local C = J.contours[J.n]
  local names = {}
  for k = 1, J.n - 1 do names[k] = J.vars[k].name end
  local count = 0
  local prev   -- the last landscape's saddles and singularities: Newton starts there
  return function(xs)
    count = count + 1
    local p = {}
    for k, v in pairs(params) do p[k] = v end
    for k = 1, J.n - 1 do p[names[k]] = xs[k] end
    if mode == "deformed" then
      -- as J:sweep continues a landscape from one parameter value to the next: the
      -- previous saddles and singularities seed Newton, and the whole region is searched
      -- again when one is lost or the argument principle counts one more
      local L
      if prev then
        L = Jin:_landscape(p, prev.region, false, { seeds = prev.saddles, fast = true,
          sing_seeds = prev.singularities, sing_radii = prev.radii,
          sing_residue_radii = prev.residue_radii })
        local sc = L.saddle_count
        if #L.saddles < #prev.saddles or #L.singularities < #prev.singularities
            or (sc and sc.count and sc.found < sc.count) then
          L = nil
        end
      end
      L = L or Jin:_landscape(p, nil, false)
      local v, e, info = require("steep.integral").quad_with(Jin, p, L, "deformed")
      prev = { region = L.region, saddles = {}, singularities = {}, radii = {},
        residue_radii = {} }
      for _, sd in ipairs(L.saddles) do prev.saddles[#prev.saddles + 1] = sd.at end
      for k, sg in ipairs(L.singularities) do
        prev.singularities[k], prev.radii[k] = sg.at, sg.radius or false
        prev.residue_radii[k] = rawget(sg, "residue_radius") or false   -- (not refining it)
      end
      return v, e, info.status
    end
    local total, err, status = cnew(0, 0), 0, "ok"
    for _, piece in ipairs(C.pieces) do
      local v, e, st
      if piece.kind == "segment" then
        local ev
        v, e, ev, st = core.quad_polyline(Jin.tape, p, { piece.a, piece.b },
          { reltol = INNER_TOL, abstol = atol })
      elseif piece.kind == "arc" then
        local th0, th1 = piece.from, piece.to
        local ev
        if abs(abs(th1 - th0) - 2 * pi) < 1e-12 then
          v, e, ev, st = core.quad_circle(Jin.tape, p, piece.center, piece.radius,
            { reltol = INNER_TOL, centre = centre or 0, dir = th1 > th0 and 1 or -1 })
        else
          v, e, ev, st = core.quad_arc(Jin.tape, p, piece.center, piece.radius, th0, th1,
            { reltol = INNER_TOL })
        end
      else
        local a = piece.a or piece.b
        local ev
        v, e, ev, st = core.quad_ray(Jin.tape, p, a, piece.angle, scale(a),
          { reltol = INNER_TOL, abstol = atol })
        if piece.kind == "ray_in" then v = -v end
      end
      total, err, status = total + v, err + e, worse(status, st)
    end
    return total, err, status
  end, function() return count end
end

---------------------------------------------------------------------------------------
-- Steepest descent paths of the reduced exponent (stationary phase over R^n).
---------------------------------------------------------------------------------------

local STOP_DROP = 38   -- trace until Re Phi is this far below its value at the point

-- The parameter table with the outer values and x_k set.
local function with_values(J, cp, xs)
  local p = {}
  for k, v in pairs(cp) do p[k] = v end
  for k, v in ipairs(xs) do p[J.vars[k].name] = v end
  return p
end

local function slots(J, from)
  local s = {}
  for k = from, J.n do s[#s + 1] = J.varslot[k] end
  return s
end

-- The critical point of F in the variables k..n with x_1..x_{k-1} = xs fixed, from seed.
local function level_point(J, cp, k, xs, seed)
  local p = with_values(J, cp, xs)
  local roots = core.multi_newton(J.tape, p, slots(J, k), { seed }, { tol = 1e-14, maxit = 60 })
  return roots[1]
end

-- Phi and Phi' at x_k = z (the inner variables at their critical point, from rest).
local function reduced(J, cp, k, xs, z, rest)
  local p = with_values(J, cp, xs)
  p[J.vars[k].name] = z
  local y = rest
  if k < J.n then
    local roots = core.multi_newton(J.tape, p, slots(J, k + 1), { rest }, { tol = 1e-14, maxit = 40 })
    y = roots[1]
    if not y then return nil end
  end
  local pt = { table.unpack(xs) }
  pt[#pt + 1] = z
  for _, v in ipairs(y or {}) do pt[#pt + 1] = v end
  local F, g = core.multi_derivs(J.tape, with_values(J, cp, {}), J.varslot, pt)
  return F, g[k], y
end

-- The steepest descent path of Phi through the level's critical point: a polyline from
-- the end towards -infinity (Re x decreasing) to the end towards +infinity.
local function steepest_path(J, cp, k, xs, seed)
  local c = level_point(J, cp, k, xs, seed)
  if not c then
    error(format("quad: no critical point of the reduced exponent for variable %s (from "
      .. "%s)", J.vars[k].name, critical.point_text(seed)), 0)
  end
  local xc = c[1]
  local rest = {}
  for j = 2, #c do rest[j - 1] = c[j] end
  -- Phi'' = F_kk - F_kr F_rr^{-1} F_rk (the Schur complement over the inner variables)
  local pt = { table.unpack(xs) }
  for _, v in ipairs(c) do pt[#pt + 1] = v end
  local Fc, _, H = core.multi_derivs(J.tape, with_values(J, cp, {}), J.varslot, pt)
  local m = J.n - k + 1
  local phi2 = H[k][k]
  if m > 1 then
    local idx = {}
    for j = k + 1, J.n do idx[#idx + 1] = j end
    local Hrr = cmatrix.sub(H, idx)
    local col = {}
    for a, j in ipairs(idx) do col[a] = H[j][k] end
    local sol = cmatrix.solve(Hrr, col)
    if not sol then error("quad: the inner Hessian is singular at the stationary point", 0) end
    for a, j in ipairs(idx) do phi2 = phi2 - H[k][j] * sol[a] end
  end
  local w = 1 / sqrt(cabs(phi2))
  local alpha = (pi - math.atan(select(2, cparts(phi2)), (cparts(phi2)))) / 2
  local d0 = expi(alpha)
  if cparts(d0) < 0 then d0 = -d0 end
  local ReF0 = cparts(Fc)
  local sides = {}
  for _, sgn in ipairs({ -1, 1 }) do
    local pts = {}
    local z = xc + sgn * 0.3 * w * d0
    local y = rest
    local reached = false
    -- keep points where Re Phi has dropped by (1.5 j)^2 / 2 (every 1.5 widths: a
    -- Kronrod rule on each chord resolves the Gaussian there)
    local next_drop = 1.125
    local j = 1
    for _ = 1, 600 do
      local F, dF, ny = reduced(J, cp, k, xs, z, y)
      if not F then break end
      y = ny
      local drop = ReF0 - cparts(F)
      if drop >= next_drop or drop > STOP_DROP then
        pts[#pts + 1] = z
        while next_drop <= drop do j = j + 1; next_drop = 1.125 * j * j end
      end
      if drop > STOP_DROP then reached = true; break end
      local a = cabs(dF)
      if a == 0 then break end
      local h = max(0.1 * w, 0.05 * cabs(z - xc))
      z = z - h * dF:conj() / a
    end
    if not reached then
      error(format("quad: the steepest descent path of the reduced exponent in %s did not "
        .. "reach a negligible integrand", J.vars[k].name), 0)
    end
    sides[sgn] = pts
  end
  local path = {}
  for i = #sides[-1], 1, -1 do path[#path + 1] = sides[-1][i] end
  path[#path + 1] = xc
  for _, z in ipairs(sides[1]) do path[#path + 1] = z end
  if not (cparts(path[#path] - xc) > 0 and cparts(path[1] - xc) < 0) then
    error(format("quad: the steepest descent path in %s does not run from -infinity to "
      .. "+infinity as the given line does: the line picks up other critical points",
      J.vars[k].name), 0)
  end
  return path, c
end

---------------------------------------------------------------------------------------
-- The iterated integral.
---------------------------------------------------------------------------------------

-- Laplace type over all of R^n: the iterated integral in the coordinates u with
-- x = x* + L u, L L^T = (-F''(x*))^{-1} (Cholesky), x* the highest maximum. The integral
-- over R^n is unchanged (times det L), the integrand is nearly N(0, I) in u, so each
-- inner integral has its peak near 0 with unit width whatever the outer values: a
-- strongly correlated maximum no longer costs a shifting, narrow inner peak.
local function whitened(J, cp, pt)
  local expr = require "steep.expr"
  local m = pt.x
  local _, _, Hm = critical.derivs(J, cp, m)
  local n = J.n
  local negH = {}
  for i = 1, n do
    negH[i] = {}
    for j = 1, n do negH[i][j] = -(cparts(Hm[i][j])) end
  end
  local Sigma = cmatrix.inverse(negH)
  if not Sigma then return nil end
  local L = {}
  for i = 1, n do
    L[i] = {}
    for j = 1, i do
      local v = cparts(Sigma[i][j])
      for k = 1, j - 1 do v = v - L[i][k] * L[j][k] end
      if i == j then
        if not (v > 0) then return nil end
        L[i][i] = sqrt(v)
      else
        L[i][j] = v / L[j][j]
      end
    end
  end
  local taken = {}
  for _, name in ipairs(J.params) do taken[name] = true end
  for _, v in ipairs(J.vars) do taken[v.name] = true end
  local us, map, detL = {}, {}, 1
  for k = 1, n do
    local name = "w" .. k
    while taken[name] do name = "_" .. name end
    us[k] = expr.symbol("var", name)
    detL = detL * L[k][k]
  end
  for k = 1, n do
    local e = cparts(m[k])
    for j = 1, k do e = e + L[k][j] * us[j] end
    map[J.vars[k]] = e
  end
  local line = J.contours[1]
  local contours = {}
  for k = 1, n do contours[k] = line end
  local W = require("steep.multi").new { var = us,
    exponent = expr.substitute(J.exponent, map),
    amplitude = expr.substitute(expr.lift(J.amplitude), map) * detL, contour = contours,
    large = J.large }
  W._whitened = true
  return W, critical.point_text(m)
end

--- quad(J, params, {along =}) -> value, error estimate, info {status, along, levels,
-- inner_calls, notes}
function M.quad(J, params, opts)
  local n = J.n
  local cp = J:_cparams(params)
  local kind = critical.classify(J, cp)
  -- the maxima of a Laplace-type integrand guide the quadrature (scales, tolerances,
  -- whitening); a maximum the expansion refuses only costs the quadrature those hints
  local okp, pts = false, nil
  if kind == "laplace" then okp, pts = pcall(critical.contributing, J, cp, {}) end
  if okp and n >= 2 and not J._whitened then
    local all_lines = true
    for k = 1, n do
      local s = critical.shape(J.contours[k])
      all_lines = all_lines and s.lo == -huge and s.hi == huge and s.dir == 1
    end
    if all_lines then
      local W, at = whitened(J, cp, pts[1])
      if W then
        local v, e, info = M.quad(W, params, opts)
        table.insert(info.notes, 1, "over R^" .. n .. " in coordinates whitened at the "
          .. "maximum " .. at .. " (x = x* + L u, L L^T = (-F'')^{-1})")
        return v, e, info
      end
    end
  end
  local along = opts.along
  local notes = {}
  local Cn = J.contours[n]
  local inner_mode = "given"
  if along == "deformed" and has_infinite_end(Cn) and kind ~= "laplace" then
    inner_mode = "deformed"
  end
  local outer_mode = {}
  local stationary
  for k = 1, n - 1 do
    local s = critical.shape(J.contours[k])
    outer_mode[k] = "given"
    if along == "deformed" and kind == "stationary phase" and s.shape == "real" then
      outer_mode[k] = "steepest"
    end
  end
  -- circles are integrated in angle centred on the positive ray (the torus' peak)
  local centre = 0
  if outer_mode[1] == "steepest" then
    local pts = critical.contributing(J, cp, {})
    if #pts > 1 then
      error(format("quad: %d real stationary points: iterated quadrature along one "
        .. "steepest path per variable is not valid then; give along = \"given\" with a "
        .. "decaying amplitude, or finite contours", #pts), 0)
    end
    stationary = pts[1].x
    notes[#notes + 1] = "outer lines deformed to the steepest descent paths of the reduced "
      .. "exponent through the stationary point " .. critical.point_text(stationary)
  end
  if inner_mode == "deformed" then
    notes[#notes + 1] = "the innermost integral deformed by the one-variable machinery"
  end
  -- length scales of the rays: for a Laplace-type integral the distance to the maximum
  -- or its width, whichever is larger; otherwise the distance to 0 (at least 1/4)
  local scales = {}
  for k = 1, n do scales[k] = function(a) return max(1, cabs(a)) / 4 end end
  local rays = false
  for k = 1, n do rays = rays or has_infinite_end(J.contours[k]) end
  -- absolute tolerances for a Laplace-type integral: a slice at level k (variables k..n,
  -- the outer ones fixed) need not be known better than tol times the whole (its leading
  -- term Z0) over the outer variables' extent (sqrt(2 pi) widths each); slices far out in
  -- the tails then take one rule instead of chasing digits relative to themselves
  local atol = {}
  for k = 1, n do atol[k] = 0 end
  if okp then
    local pt = pts[1]
    local top = pt.x
    local _, gm, Hm = critical.derivs(J, cp, top)
    local Z0 = cabs(require("steep.hormander").contribution(J, cp, pt, 1).value)
    local extent = 1
    for k = 1, n do
      -- (the width from the curvature, or at a boundary maximum with none, Watson's,
      -- from the slope: e^{-n(x + y)} on the quadrant had widths of 1e150, every node in
      -- the underflow, and 0 with an error of 0, "ok"; neither: 1)
      local rate = max(sqrt(abs((cparts(Hm[k][k])))), cabs(gm[k]))
      local w = rate > 0 and 1 / rate or 1
      if rays then scales[k] = function(a) return max(w, cabs(a - top[k])) end end
      atol[k] = 0.1 * OUTER_TOL[n] * Z0 / extent
      extent = extent * sqrt(2 * pi) * w
    end
  end
  local inner, calls = make_inner(J, params, inner_mode, centre, scales[n], atol[n])
  local tol = OUTER_TOL[n]
  local status = "ok"
  local memo_seed = {}
  local function level(k, xs)
    if k == n then
      local v, e, st = inner(xs)
      status = worse(status, st)
      return v, e
    end
    local f = function(z)
      local ys = { table.unpack(xs) }
      ys[#ys + 1] = z
      return level(k + 1, ys)
    end
    local tolk = tol * (0.1 ^ (n - 1 - k))
    if outer_mode[k] == "steepest" then
      local seed = memo_seed[k]
      if not seed then
        seed = {}
        for j = k, n do seed[#seed + 1] = stationary[j] end
      end
      local path, c = steepest_path(J, cp, k, xs, seed)
      memo_seed[k] = c
      local total, err = cnew(0, 0), 0
      for i = 1, #path - 1 do
        local a, d = path[i], path[i + 1] - path[i]
        local v, e, st = adaptive(f, function(s) return a + s * d, d end, 0, 1, tolk, atol[k])
        total, err, status = total + v, err + e, worse(status, st)
      end
      -- the tails beyond the path's ends: about the integrand there times the last step
      for _, j in ipairs({ 1, #path }) do
        local v = f(path[j])
        local step = cabs(path[j] - path[j == 1 and 2 or #path - 1])
        err = err + cabs(v) * step
      end
      local s = critical.shape(J.contours[k])
      if s.dir < 0 then total = -total end
      return total, err
    end
    if J._whitened then
      local v, e, st = line_trapezoid(f, tolk, atol[k])
      status = worse(status, st)
      return v, e
    end
    local total, err = cnew(0, 0), 0
    for _, piece in ipairs(J.contours[k].pieces) do
      local v, e, st = piece_integral(f, piece, tolk, centre, scales[k], atol[k])
      total, err, status = total + v, err + e, worse(status, st)
    end
    return total, err
  end
  local value, err = level(1, {})
  -- rounding floor: e^F inherits the absolute rounding of F, about eps |F| relative, |F|
  -- taken as its largest modulus over samples of the contours (as the one-variable quad)
  local lists = {}
  for k, C in ipairs(J.contours) do lists[k] = critical.contour_samples(C, 5) end
  local Fs = critical.eval_many(J, cp, critical.product(lists, 625))
  local Fmax = 0
  for i = 1, #Fs do
    local a = cabs(Fs:get(i))
    if a < huge then Fmax = max(Fmax, a) end
  end
  err = err + (8 + Fmax) * EPS * cabs(value)
  local vr, vi = cparts(value)
  if not (vr == vr and vi == vi and abs(vr) < huge and abs(vi) < huge and err == err) then
    error(format("quad: the iterated quadrature gives a non-finite value (status %s): the "
      .. "integral diverges, or its integrand overflows double precision in the box",
      status), 0)
  end
  -- a value of exactly 0 with no error where the integrand is not negligible at the
  -- samples: the rule's nodes missed it (no number is better than a wrong 0)
  if cabs(value) == 0 and err == 0 then
    local top = -huge
    for i = 1, #Fs do
      local re = cparts(Fs:get(i))
      if re == re then top = max(top, re) end
    end
    if top > math.log(1e-300) then
      status, err = "failed", huge
      notes[#notes + 1] = format("quadrature found only underflowing values, yet e^F reaches "
        .. "e^%.4g on the contours: the nodes missed the integrand; the value is not known",
        top)
    end
  end
  return value, err, { status = status, along = along, inner = inner_mode,
    outer = outer_mode, inner_calls = calls(), notes = notes }
end

return M
