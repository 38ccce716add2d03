-- diagonal_coefficients.lua — diagonal coefficients of multivariate rational generating
-- functions: [x^n y^n] G(x, y)/H(x, y), and [x^n y^n z^n] G/H in three variables.
--
-- Method: the Cauchy integral over a torus. For H linear in the last variable,
-- H = H0 + H1 y, a residue in y (pushing its circle out past the pole Y = -H0/H1 leaves
-- an exponentially smaller remainder) gives
--   [x^n y^n] G/H = (1/2 pi i) * integral over |x| = r of -G(x, Y)/(H1 Y x) e^{n phi(x)} dx,
--   phi(x) = -log x - log Y(x),
-- an integral over a torus of one dimension less, dominated by the minimal critical point
-- (positive, the smooth critical point x H_x = y H_y of Pemantle & Wilson, Analytic
-- Combinatorics in Several Variables, 2013, ch. 8-9). Its expansion to any order is the
-- several-variable Hormander expansion at that point (the smooth-point formula with its
-- higher terms, as Raichev & Wilson, Electron. J. Combin. 15 (2008) R89, computed them):
-- steep.integral{var = {...}} with a torus contour, `J:expand` or `J:series`.
-- Cross-check (two variables): the same residue followed by the one-variable saddle
-- machinery (steep.integral{var = x}, a saddle on a circle) — a different algorithm
-- (series reversion at a saddle) for the same numbers. In three variables the cross-check
-- is the iterated quadrature of the two-variable torus integral (J:quad).
--
-- Parameters (as a module): M.diagonal{G =, H =, vars = {x, y} or {x, y, z}, order = K}
-- -> object with :expand(n), :cross(n) (two variables), :quad(n), :series(), .point.
-- Expressions are in M.x, M.y, M.z; H must be linear in the last variable.
-- Run: lua5.4 recipes/diagonal_coefficients.lua (invented examples: lattice walks with
-- unit steps and a weighted diagonal step, 1/(1 - x - y - 2xy), and a three-variable
-- cousin 1/(1 - x - y - z - 2xyz)).
--
-- Caution: asymptotic approximations; the table compares two routes. Validate before
-- relying on them.

local steep = require "steep"
steep.require_version("0.1")

local M = {}
M.x, M.y, M.z = steep.var "x", steep.var "y", steep.var "z"
M.n = steep.param "n"

local pi, abs = math.pi, math.abs

-- Newton's method for grad phi = 0 on the positive orthant (real), from `guess`.
local function minimal_point(phi, vars, guess)
  local d = #vars
  local grad, hess = {}, {}
  for i = 1, d do
    grad[i] = steep.diff(phi, vars[i])
    hess[i] = {}
    for j = 1, d do hess[i][j] = steep.diff(grad[i], vars[j]) end
  end
  local exprs = {}
  for i = 1, d do exprs[#exprs + 1] = grad[i] end
  for i = 1, d do for j = 1, d do exprs[#exprs + 1] = hess[i][j] end end
  local tape = steep.compile(exprs, nil)
  local x = { table.unpack(guess) }
  for _ = 1, 100 do
    local p = {}
    for i = 1, d do p[vars[i].name] = x[i] end
    local vals = { tape:eval(0, p) }
    local g, Hm = {}, {}
    for i = 1, d do g[i] = vals[i]:re() end
    for i = 1, d do
      Hm[i] = {}
      for j = 1, d do Hm[i][j] = vals[d + (i - 1) * d + j]:re() end
    end
    local step
    if d == 1 then step = { g[1] / Hm[1][1] }
    else
      local det = Hm[1][1] * Hm[2][2] - Hm[1][2] * Hm[2][1]
      step = { (Hm[2][2] * g[1] - Hm[1][2] * g[2]) / det,
        (Hm[1][1] * g[2] - Hm[2][1] * g[1]) / det }
    end
    local size = 0
    for i = 1, d do
      x[i] = x[i] - step[i]
      if not (x[i] > 0) then x[i] = 0.5 * (x[i] + step[i]) end   -- stay positive
      size = math.max(size, abs(step[i]) / x[i])
    end
    if size < 1e-15 then break end
  end
  return x
end

--- M.diagonal{G = 1, H =, vars = {x, y} | {x, y, z}, order = K, guess = {...}}
function M.diagonal(spec)
  local vars = spec.vars or { M.x, M.y }
  local d = #vars
  assert(d == 2 or d == 3, "diagonal: two or three variables")
  local G, H = spec.G or 1, spec.H
  local last = vars[d]
  local outer = {}
  for k = 1, d - 1 do outer[k] = vars[k] end
  -- H = H0 + H1 * last, checked at a few points
  local H1 = steep.diff(H, last)
  local H0 = steep.substitute(H, { [last] = 0 })
  local check = steep.compile({ steep.diff(H1, last) }, nil)
  local probe = {}
  for k = 1, d do probe[vars[k].name] = 0.1 + 0.07 * k end
  assert(check:eval(0, probe):abs() < 1e-12, "diagonal: H must be linear in " .. last.name)
  -- the pole Y = -H0/H1; with H = 1 - P for P of nonnegative coefficients, H0 > 0 and
  -- -H1 > 0 at the positive point, and log Y = log H0 - log(-H1) there (two log points,
  -- not a quotient inside one log: the one-variable landscape sees sinks and hills)
  local Y = -H0 / H1
  local Gy = steep.is_expr(G) and steep.substitute(G, { [last] = Y }) or G
  local prod = 1
  local phi = -steep.log(H0) + steep.log(-H1)
  for k = 1, d - 1 do
    prod = prod * outer[k]
    phi = phi - steep.log(outer[k])
  end
  -- the residue's amplitude -G/(H1 Y prod) = G/(H0 prod)
  local amplitude = Gy / (H0 * prod)
  local point = minimal_point(phi, outer, spec.guess or (d == 2 and { 0.3 } or { 0.25, 0.25 }))
  local circles = {}
  for k = 1, d - 1 do circles[k] = steep.circle(0, point[k]) end
  local n = M.n
  local J = steep.integral { var = outer, exponent = n * phi, amplitude = amplitude,
    contour = circles, large = n }
  local norm = (2 * pi * steep.I) ^ (d - 1)
  local obj = { point = point, integral = J, exponent = phi, amplitude = amplitude, dims = d }
  local order = spec.order or 4
  --- the coefficient by the several-variable expansion: value, error, result
  function obj.expand(_, N, K)
    local r = J:expand { n = N, order = K or order }
    return r.value / norm, r.error / abs(norm:abs()), r
  end
  --- the same by the one-variable saddle machinery (two variables only)
  function obj.cross(_, N, K)
    assert(d == 2, "diagonal: the one-variable cross-check is for two variables")
    obj.one = obj.one or steep.integral { var = outer[1], exponent = n * phi,
      amplitude = amplitude, contour = circles[1], large = n }
    local r = obj.one:expand { n = N, order = K or order }
    return r.value / norm, r.error / norm:abs(), r
  end
  --- the torus integral by iterated quadrature
  function obj.quad(_, N)
    local v, e, info = J:quad { n = N }
    return v / norm, e / norm:abs(), info
  end
  --- the standard form: e^{n phi0} sum_m c_m n^{-(p + m/2)} (coefficients once, any n)
  function obj.series(_, K)
    local s = J:series { order = K or order }
    return s[1], norm
  end
  return obj
end

--- M.table{G =, H =, vars =, n = {values}, order = K} -> rows, text: the expansion, the
-- cross-check (two variables: one-variable machinery; three: quadrature) side by side.
function M.table(spec)
  local D = M.diagonal(spec)
  local rows = {}
  local lines = { string.format("%-6s %-24s %-10s %-24s %-10s %s", "n", "expansion",
    "rel.est", D.dims == 2 and "one-variable route" or "torus quadrature", "rel.est",
    "rel.diff") }
  for _, N in ipairs(spec.n) do
    local v, e = D:expand(N)
    local w, f
    if D.dims == 2 then w, f = D:cross(N) else w, f = D:quad(N) end
    local rel = (v - w):abs() / w:abs()
    rows[#rows + 1] = { n = N, expansion = v, error = e, cross = w, cross_error = f,
      relative_difference = rel }
    lines[#lines + 1] = string.format("%-6d %-24.17g %-10.3g %-24.17g %-10.3g %.3g", N,
      v:re(), e / v:abs(), w:re(), f / w:abs(), rel)
  end
  return rows, table.concat(lines, "\n"), D
end

if arg and arg[0] and arg[0]:match("diagonal_coefficients%.lua$") then
  local x, y, z = M.x, M.y, M.z
  print("Invented example: lattice walks with steps (1,0), (0,1) and two kinds of (1,1):")
  print("[x^n y^n] 1/(1 - x - y - 2xy), 4 terms")
  local _, text, D = M.table { H = 1 - x - y - 2 * x * y, n = { 10, 40, 160 } }
  print(string.format("minimal critical point x = %.15g", D.point[1]))
  print(text)
  print()
  print("Invented example: [x^n y^n z^n] 1/(1 - x - y - z - 2xyz), 4 terms")
  local _, text3, D3 = M.table { H = 1 - x - y - z - 2 * x * y * z, vars = { x, y, z },
    n = { 10, 40 } }
  print(string.format("minimal critical point (x, y) = (%.15g, %.15g)", D3.point[1], D3.point[2]))
  print(text3)
  print("caution: asymptotic approximations, compared here by two routes; validate them "
    .. "before relying on them")
end

return M
