-- steep.special — special functions with error estimates (used by the uniform forms, and
-- checked against GSL and identities in the tests): the Airy functions of a complex
-- argument, computed in C (ext/airy.c: Maclaurin series in double-double arithmetic near
-- the origin, the asymptotic expansions with their error bounds beyond, DLMF chapter 9).

local core = require "steep.core"
local complex = require "steep.complex"

local M = {}

local function check(z, fname)
  local re, im = complex.parts(z)
  if not re or re ~= re or im ~= im or math.abs(re) == math.huge or math.abs(im) == math.huge then
    error(string.format("bad argument #1 to '%s' (finite number or complex value expected)",
      fname), 3)
  end
  return complex.new(re, im)
end

--- steep.airy(z) -> Ai(z), Ai'(z), error estimate of each, status ("ok", or "underflow" /
-- "overflow" past the range of a double), for complex z.
function M.airy(z)
  return core.cmath.airy(check(z, "airy"))
end

--- steep.airy_bi(z) -> Bi(z), Bi'(z), error estimates, status.
function M.airy_bi(z)
  return core.cmath.airy_bi(check(z, "airy_bi"))
end

return M
