-- bessel_large_order.lua — Bessel and Hankel functions of large order nu at the argument
-- nu z (any real or complex z off the negative axis), from their standard contour
-- integrals, whose ends at infinity lie in strips (steep.inf(angle, through) names them):
--
--   J_nu(nu z)  = (1/2 pi i) int from inf - i pi to inf + i pi of e^{nu (z sinh w - w)} dw
--                 (Schlaefli, DLMF 10.9.17)
--   H1_nu(nu z) = (1/pi i)  int from -inf to inf + i pi of the same    (Sommerfeld, 10.9.18)
--   H2_nu(nu z) = -(1/pi i) int from -inf to inf - i pi of the same    (10.9.18)
--   Y_nu(nu z)  = (H1 - H2) / (2i)                                      (10.4.4)
--   I_nu(nu z)  = (1/2 pi i) int from inf - i pi to inf + i pi of e^{nu (z cosh w - w)} dw
--                 (10.9.17 with I_nu(x) = e^{-i nu pi/2} J_nu(i x), 10.27.6)
--   K_nu(nu z)  = (1/2) int over the real line of e^{nu (w - z cosh w)} dw  (10.32.9)
--
-- steep finds the saddles (cosh w = 1/z, or sinh w = 1/z for I and K: a periodic family,
-- reported once), decides which the contour passes through, and expands them: the Debye
-- expansions where the saddles are apart (DLMF 10.19.3, 10.19.6, 10.41.3-4), the Airy-type
-- uniform form where two of them are close (nu near the argument: the transition region,
-- DLMF 10.20), switching by itself. The order may be nu + m (m a whole number, or any
-- number) through the amplitude e^{-m w} (e^{m w} for K).
--
-- The Debye coefficients: J's series in the standard form e^{nu phi} sum c_k nu^(-k-1/2)
-- has c_k / c_0 = u_k(t), t = 1/sqrt(1 - z^2) (DLMF 10.19.3); this recipe prints them as
-- steep's series produces them, beside DLMF 10.41.10's polynomials.
--
-- Use it as a module:
--     local B = dofile "recipes/bessel_large_order.lua"
--     local r = B.value("J", 50, 0.6)   -- {value, error, quad, quad_error, agrees, form}
--     local c = B.debye(0.6, 3)         -- c_k / c_0, k = 1..3, and their estimated errors
--     print(B.table { nu = 40, z = { 0.6, 1.4 } })
-- Run: lua5.4 recipes/bessel_large_order.lua
-- These are approximations: check them (the table compares every value with quadrature)
-- before they inform an engineering, financial or safety decision.

local steep = require "steep"
steep.require_version("0.1")

local M = {}
local w, nu = steep.var "w", steep.param "nu"
local I, pi, C = steep.I, math.pi, steep.complex
local sinh, cosh, exp = steep.sinh, steep.cosh, steep.exp

M.var, M.nu = w, nu

local function up(y) return steep.inf(0, C(0, y)) end

--- M.integral(name, z, m) -> the steep.integral of name ("J", "H1", "H2", "I", "K") at
-- argument nu z and order nu + m (m defaults to 0); nu is the large parameter.
function M.integral(name, z, m)
  m = m or 0
  if name == "J" then
    return steep.integral { var = w, exponent = nu * (z * sinh(w) - w),
      amplitude = exp(-m * w) / (2 * pi * I), contour = steep.line(up(-pi), up(pi)), large = nu }
  elseif name == "H1" or name == "H2" then
    local s = name == "H1" and 1 or -1
    return steep.integral { var = w, exponent = nu * (z * sinh(w) - w),
      amplitude = s * exp(-m * w) / (pi * I),
      contour = steep.path { steep.inf(pi), 0, C(0, s * pi), steep.inf(0) }, large = nu }
  elseif name == "I" then
    return steep.integral { var = w, exponent = nu * (z * cosh(w) - w),
      amplitude = exp(-m * w) / (2 * pi * I), contour = steep.line(up(-pi), up(pi)), large = nu }
  elseif name == "K" then
    return steep.integral { var = w, exponent = nu * (w - z * cosh(w)),
      amplitude = 0.5 * exp(m * w), contour = steep.line(steep.inf(pi), steep.inf(0)),
      large = nu }
  end
  error("bessel_large_order: no function named " .. tostring(name)
    .. " (J, Y, H1, H2, I, K)", 2)
end

-- The integrals are kept per (name, z, m): expansions at several nu share their landscape
-- caches.
local kept = {}
local function integral_of(name, z, m)
  local key = string.format("%s|%s|%s", name, tostring(z), tostring(m or 0))
  kept[key] = kept[key] or M.integral(name, z, m)
  return kept[key]
end

local function one(name, nv, z, order, m)
  local J = integral_of(name, z, m)
  local r = J:expand { nu = nv, order = order }
  local q, qe = J:quad { nu = nv }
  return r, q, qe
end

--- M.value(name, nu, z, opts) -> {value, error, quad, quad_error, agrees, form, status}:
-- the function (J, Y, H1, H2, I, K) of order nu + (opts.m or 0) at nu z by its expansion
-- (opts.order terms per contribution, default 6) and by quadrature along the deformed
-- contour; `form` names the expansion used (Debye: "saddle"; the transition: "two saddles
-- together (uniform, Airy type)" or "saddle of order 3").
function M.value(name, nv, z, opts)
  opts = opts or {}
  local order, m = opts.order or 6, opts.m
  if name == "Y" then
    local r1, q1, e1 = one("H1", nv, z, order, m)
    local r2, q2, e2 = one("H2", nv, z, order, m)
    local v, err = (r1.value - r2.value) / (2 * I), 0.5 * (r1.error + r2.error)
    local q, qe = (q1 - q2) / (2 * I), 0.5 * (e1 + e2)
    return { value = v, error = err, quad = q, quad_error = qe,
      agrees = (v - q):abs() <= err + qe, form = r1.contributions[1].kind,
      status = r1.status }
  end
  local r, q, qe = one(name, nv, z, order, m)
  return { value = r.value, error = r.error, quad = q, quad_error = qe,
    agrees = (r.value - q):abs() <= r.error + qe, form = r.contributions[1].kind,
    status = r.status, result = r }
end

--- M.debye(z, kmax) -> list of c_k / c_0 (k = 1..kmax) of J's series at argument nu z
-- (the Debye coefficients u_k(t), t = 1/sqrt(1 - z^2), for 0 < z < 1: DLMF 10.19.3), and
-- the list of their estimated errors; for I's series (name = "I") they are U_k(p),
-- p = 1/sqrt(1 + z^2) (DLMF 10.41.3).
function M.debye(z, kmax, name)
  local S = integral_of(name or "J", z):series { order = kmax + 1 }
  local c, e = S[1].coefficients, S[1].errors
  local ratios, errors = {}, {}
  for k = 1, kmax do
    ratios[k] = c[k + 1] / c[1]
    errors[k] = (e[k + 1] + ratios[k]:abs() * e[1]) / c[1]:abs()
  end
  return ratios, errors
end

--- DLMF 10.41.10: the polynomials u_1, u_2, u_3 (for comparison).
M.u = {
  function(t) return (3 * t - 5 * t ^ 3) / 24 end,
  function(t) return (81 * t ^ 2 - 462 * t ^ 4 + 385 * t ^ 6) / 1152 end,
  function(t) return (30375 * t ^ 3 - 369603 * t ^ 5 + 765765 * t ^ 7 - 425425 * t ^ 9) / 414720 end,
}

-- A short name for an expansion's form.
local function form_of(kind)
  if kind:find("Airy", 1, true) then return "Airy" end
  if kind:find("order 3", 1, true) then return "order 3" end
  if kind == "saddle" then return "Debye" end
  return kind
end

--- M.table{nu =, z = {values}, names = {...}, order =} -> text: each function at each z by
-- expansion and by quadrature, aligned, with the form the expansion used.
function M.table(spec)
  local names = spec.names or { "J", "Y", "H1", "I", "K" }
  local head = { "fn", "z", "expansion", "error", "quadrature", "rel.diff", "form" }
  local rows = {}
  for _, z in ipairs(spec.z) do
    for _, name in ipairs(names) do
      local ok, r = pcall(M.value, name, spec.nu, z, { order = spec.order })
      if ok then
        rows[#rows + 1] = { name, tostring(z), steep.show(r.value, r.error, 8),
          string.format("%.2g", r.error), steep.show(r.quad, r.quad_error, 8),
          string.format("%.2g", (r.value - r.quad):abs() / r.quad:abs()), form_of(r.form) }
      else
        rows[#rows + 1] = { name, tostring(z), "failed: " .. tostring(r):sub(1, 60), "", "",
          "", "" }
      end
    end
  end
  local width = {}
  for c, h in ipairs(head) do
    width[c] = #h
    for _, r in ipairs(rows) do width[c] = math.max(width[c], #r[c]) end
  end
  local function line(cells)
    local out = {}
    for c, v in ipairs(cells) do out[c] = v .. string.rep(" ", width[c] - #v) end
    return (table.concat(out, "  "):gsub("%s+$", ""))
  end
  local lines = { line(head) }
  for _, r in ipairs(rows) do lines[#lines + 1] = line(r) end
  return table.concat(lines, "\n")
end

if arg and arg[0] and arg[0]:match("bessel_large_order%.lua$") then
  local nv = 40
  print(string.format("Bessel functions of order nu = %d at nu z (sample arguments; at z = 1",
    nv))
  print("the order equals the argument: the transition). form: Debye (the saddles apart),")
  print("Airy (two saddles close: the uniform form), order 3 (one saddle of order 3)")
  print(M.table { nu = nv, z = { 0.6, 1, 1.4, C(0.8, 0.3) } })
  print()
  local z = 0.6
  local t = 1 / math.sqrt(1 - z * z)
  print(string.format("Debye coefficients of J's series at z = %g (c_k / c_0), beside "
    .. "DLMF 10.41.10's u_k(t), t = %.6g:", z, t))
  local c, e = M.debye(z, 3)
  print(string.format("%-3s %-24s %-10s %s", "k", "steep", "error", "u_k(t)"))
  for k = 1, 3 do
    print(string.format("%-3d %-24s %-10.2g %.17g", k, steep.show(c[k], e[k]), e[k], M.u[k](t)))
  end
  print("caution: asymptotic approximations; check them (the table compares each with")
  print("    quadrature) before they inform any engineering, financial or safety decision")
end

return M
