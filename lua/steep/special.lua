-- steep.special — special functions computed by the project's own machinery (used as
-- uniform forms, and checked against GSL in the tests).

local complex = require "steep.complex"
local expr = require "steep.expr"
local contour = require "steep.contour"

local M = {}

local airy_J, airy_dJ

-- Ai(z) = (1/2 pi i) * integral from inf e^{-i pi/3} to inf e^{i pi/3} of
-- exp(t^3/3 - z t) dt (DLMF 9.5.4), and Ai'(z) with the amplitude -t; both by quadrature
-- along the steepest descent deformation of that contour.
local function airy_integrals()
  if not airy_J then
    local integral = require "steep.integral"
    local t, z = expr.symbol("var", "t"), expr.symbol("param", "z")
    local C = contour.path { contour.inf(-math.pi / 3), complex.new(0, 0), contour.inf(math.pi / 3) }
    airy_J = integral.new { var = t, exponent = t ^ 3 / 3 - z * t, contour = C }
    airy_dJ = integral.new { var = t, exponent = t ^ 3 / 3 - z * t, amplitude = -t, contour = C }
  end
  return airy_J, airy_dJ
end

--- steep.airy(z) -> Ai(z), Ai'(z), error estimates (both), for complex z.
function M.airy(z)
  local re, im = complex.parts(z)
  if not re or re ~= re or im ~= im or math.abs(re) == math.huge or math.abs(im) == math.huge then
    error("bad argument #1 to 'airy' (finite number or complex value expected)", 2)
  end
  local J, dJ = airy_integrals()
  local two_pi_i = complex.new(0, 2 * math.pi)
  local v, e = J:quad { z = z }
  local dv, de = dJ:quad { z = z }
  return v / two_pi_i, dv / two_pi_i, e / (2 * math.pi), de / (2 * math.pi)
end

return M
