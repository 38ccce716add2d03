-- coefficients.lua — asymptotics of coefficients of generating functions by the saddle
-- point method on a circle through the dominant saddle (Flajolet & Sedgewick, Analytic
-- Combinatorics, 2009, ch. VIII).
--
--   [z^n] A(z) B(z)^n = (1/2 pi i) * contour integral of A(z) e^{n log B(z) - (n+1) log z} dz
-- is in the standard form n * phi(z) (large powers, VIII.8): the coefficients of the
-- expansion are computed once (J:series) and then evaluated at any n.
-- A non-homogeneous case, [z^n] e^{P(z)} with the exponent P(z) - (n+1) log z (not n times
-- a function of z: e.g. e^{e^z - 1}, whose coefficients times n! are the Bell numbers),
-- goes by the unrescaled route: jets at the moving saddle for each n.
--
-- Parameters (as a module): M.large_powers{A =, B =, radius =} -> object with :at(n);
-- M.nonhomogeneous{P =, n = {values}} -> rows. Expressions are in the variable M.z.
-- Run: lua5.4 recipes/coefficients.lua (invented examples: [z^n] (1+z+z^2)^n (1+z/2)
-- and [z^n] e^{e^z - 1}).

local steep = require "steep"
steep.require_version("0.1")

local M = {}
M.z = steep.var "z"
local n = steep.param "n"
M.n = n

--- M.large_powers{A =, B =, saddle = z0 (the positive saddle, found if omitted), order = 6}
-- -> {series = J:series result (one term more than order), at = function(n) -> value,
-- error estimate, status ("estimated", or "suspect: ..." where the estimate is not
-- smaller than the value)}. The estimate is the size of the first term left out (common practice
-- for an asymptotic series: Flajolet & Sedgewick 2009, VIII), plus the rounding of
-- e^{n phi}: a relative 4 u (1 + |n phi|) (u = 2^-52).
function M.large_powers(spec)
  local z = M.z
  local A = spec.A or 1
  local phi = steep.log(spec.B) - steep.log(z)
  -- the saddle of phi on the positive axis: phi'(r) = 0 by Newton from 1
  local d1 = steep.compile(steep.diff(phi, z), z)
  local d2 = steep.compile(steep.diff(steep.diff(phi, z), z), z)
  local r = spec.saddle or 1
  for _ = 1, 100 do
    local f, g = d1:eval(r), d2:eval(r)
    local step = (f / g):re()
    r = r - step
    if math.abs(step) < 1e-15 * math.abs(r) then break end
  end
  local J = steep.integral { var = z, exponent = n * phi, amplitude = A / z,
    contour = steep.circle(0, r), large = n }
  local order = spec.order or 6
  local ser = J:series { order = order + 1 }
  return {
    radius = r, integral = J, series = ser, order = order,
    at = function(nv)
      local s, omitted, size = 0, 0, 0
      for _, c in ipairs(ser) do
        local v = c:value(nv, order)
        s = s + v
        omitted = omitted + (c:value(nv, order + 1) - v):abs()
        size = math.max(size, (c.phi * nv):abs())
      end
      local value = s / (2 * math.pi * steep.I)
      local rounding = 4 * 2 ^ -52 * (1 + size) * value:abs()
      local err = omitted / (2 * math.pi) + rounding
      -- (the status as J:expand words it: an estimate as large as the value says nothing)
      return value, err, err < value:abs() and "estimated"
        or "suspect: the error estimate is not smaller than the value"
    end,
  }
end

--- M.nonhomogeneous{P =, n = {values}, order = N} -> rows with the coefficient of z^n of
-- e^{P(z)} (the unrescaled route on the circle through the saddle of P - (n+1) log z)
function M.nonhomogeneous(spec)
  local z = M.z
  local rows = {}
  local dP = steep.compile(steep.diff(spec.P, z), z)
  for _, nv in ipairs(spec.n) do
    -- saddle: z P'(z) = n + 1 on the positive axis
    local r = 1
    for _ = 1, 200 do
      local f = (r * dP:eval(r)):re() - (nv + 1)
      local h = 1e-7 * r
      local fp = (((r + h) * dP:eval(r + h)):re() - (r * dP:eval(r)):re()) / h
      local step = f / fp
      r = r - step
      if r <= 0 then r = 1e-3 end
      if math.abs(step) < 1e-14 * r then break end
    end
    local J = steep.integral { var = z, exponent = spec.P - (n + 1) * steep.log(z),
      contour = steep.circle(0, r), large = n }
    local res = J:expand { n = nv, order = spec.order or 4 }
    rows[#rows + 1] = { n = nv, value = (res.value / (2 * math.pi * steep.I)):re(),
      error = res.error / (2 * math.pi), status = res.status, radius = r }
  end
  return rows
end

if arg and arg[0] and arg[0]:match("coefficients%.lua$") then
  local z = M.z
  print("Invented example: [z^n] (1 + z + z^2)^n * (1 + z/2)")
  local lp = M.large_powers { A = 1 + z / 2, B = 1 + z + z ^ 2 }
  for _, nv in ipairs({ 10, 50, 200 }) do
    local v, err, status = lp.at(nv)
    print(string.format("  n = %-4d  %s  (error %.2g, %d terms, %s)", nv, steep.show(v, err, 12),
      err, lp.order, status))
  end
  print("Invented example: [z^n] exp(e^z - 1) (times n! these are the Bell numbers)")
  for _, row in ipairs(M.nonhomogeneous { P = steep.exp(z) - 1, n = { 10, 20, 40 } }) do
    print(string.format("  n = %-4d  %s  (error %.2g, %s)", row.n, steep.show(row.value, row.error, 12),
      row.error, row.status))
  end
end

return M
