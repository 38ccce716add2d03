-- steep.complex — complex values: tables {re, im} with a shared metatable that the C
-- core registered (so C code can read and create them). Arithmetic is done here;
-- elementary functions come from C (core.cmath) so branches match the tapes exactly.
--
-- When the other operand of an arithmetic operator is not a number or complex value
-- (an expression, a series), the operation is handed to that operand's own metamethod,
-- so `2*steep.I*t` builds an expression and `steep.I * s` scales a series.

local core = require "steep.core"

local type, getmetatable, setmetatable = type, getmetatable, setmetatable
local floor, huge, atan, sqrt = math.floor, math.huge, math.atan, math.sqrt
local format, tointeger = string.format, math.tointeger
local cmath = core.cmath

local M = {}
local mt = core.complex_mt
local methods = {}
mt.__index = methods
mt.__name = "steep.complex"

local function new(re, im)
  return setmetatable({ re, im or 0 }, mt)
end

local function is_complex(v) return getmetatable(v) == mt end

--- Real and imaginary parts of a number or complex value, or nil for anything else.
-- (complex values first: they are the common case in the hot loops, and need one call)
local function parts(v)
  if getmetatable(v) == mt then return v[1], v[2] end
  if type(v) == "number" then return v, 0 end
  return nil
end

-- Hands `a <op> b` to the operand that is neither a number nor a complex value.
local function delegate(event, a, b)
  local other = a
  if parts(a) then other = b end   -- not `parts(a) and b or a`: b may be nil or false
  local m = getmetatable(other)
  local h = m and m[event]
  if h and m ~= mt then return h(a, b) end
  error(format("attempt to perform arithmetic on a %s value (with a complex value)",
    type(other)), 3)
end

-- + - * / read the operands' parts inline (these run in every loop of the library): a
-- complex value or a number on either side; anything else is delegated.
mt.__add = function(a, b)
  local ar, ai, br, bi
  if getmetatable(a) == mt then ar, ai = a[1], a[2] elseif type(a) == "number" then ar, ai = a, 0 end
  if getmetatable(b) == mt then br, bi = b[1], b[2] elseif type(b) == "number" then br, bi = b, 0 end
  if not (ar and br) then return delegate("__add", a, b) end
  return setmetatable({ ar + br, ai + bi }, mt)
end

mt.__sub = function(a, b)
  local ar, ai, br, bi
  if getmetatable(a) == mt then ar, ai = a[1], a[2] elseif type(a) == "number" then ar, ai = a, 0 end
  if getmetatable(b) == mt then br, bi = b[1], b[2] elseif type(b) == "number" then br, bi = b, 0 end
  if not (ar and br) then return delegate("__sub", a, b) end
  return setmetatable({ ar - br, ai - bi }, mt)
end

mt.__mul = function(a, b)
  local ar, ai, br, bi
  if getmetatable(a) == mt then ar, ai = a[1], a[2] elseif type(a) == "number" then ar, ai = a, 0 end
  if getmetatable(b) == mt then br, bi = b[1], b[2] elseif type(b) == "number" then br, bi = b, 0 end
  if not (ar and br) then return delegate("__mul", a, b) end
  return setmetatable({ ar * br - ai * bi, ar * bi + ai * br }, mt)
end

-- Smith's algorithm (Comm. ACM 5 (1962) 435): avoids overflow in |b|^2.
local function div(ar, ai, br, bi)
  if br == 0 and bi == 0 then
    if ar == 0 and ai == 0 then return 0 / 0, 0 / 0 end
    return ar ~= 0 and ar * huge or 0 / 0, ai ~= 0 and ai * huge or 0 / 0
  end
  if math.abs(br) >= math.abs(bi) then
    local r = bi / br
    local d = br + bi * r
    return (ar + ai * r) / d, (ai - ar * r) / d
  else
    local r = br / bi
    local d = bi + br * r
    return (ar * r + ai) / d, (ai * r - ar) / d
  end
end

mt.__div = function(a, b)
  local ar, ai, br, bi
  if getmetatable(a) == mt then ar, ai = a[1], a[2] elseif type(a) == "number" then ar, ai = a, 0 end
  if getmetatable(b) == mt then br, bi = b[1], b[2] elseif type(b) == "number" then br, bi = b, 0 end
  if not (ar and br) then return delegate("__div", a, b) end
  return new(div(ar, ai, br, bi))
end

mt.__unm = function(a) return new(-a[1], -a[2]) end

-- Integer powers by binary powering (exact for small integers); others by the
-- principal branch exp(w log z).
local function powi(zr, zi, n)
  local neg = n < 0
  if neg then n = -n end
  local rr, ri = 1, 0
  while n > 0 do
    if n % 2 == 1 then rr, ri = rr * zr - ri * zi, rr * zi + ri * zr end
    n = n // 2
    if n > 0 then zr, zi = zr * zr - zi * zi, 2 * zr * zi end
  end
  if neg then return div(1, 0, rr, ri) end
  return rr, ri
end

mt.__pow = function(a, b)
  local ar, ai = parts(a)
  local br, bi = parts(b)
  if not (ar and br) then return delegate("__pow", a, b) end
  if bi == 0 and br == floor(br) and math.abs(br) < 2 ^ 31 then
    return new(powi(ar, ai, tointeger(br)))
  end
  if ar == 0 and ai == 0 then
    if br > 0 then return new(0, 0) end
    return new(0 / 0, 0 / 0)
  end
  return cmath.exp(cmath.log(a) * b)
end

mt.__eq = function(a, b) return a[1] == b[1] and a[2] == b[2] end

local function fmt(x)
  if x ~= x then return "nan" end
  if x == huge then return "inf" end
  if x == -huge then return "-inf" end
  return format("%.15g", x)
end

mt.__tostring = function(z)
  local re, im = z[1], z[2]
  if im == 0 then return fmt(re) end
  local ims = fmt(math.abs(im))
  local sign = (im < 0 or (im == 0 and 1 / im < 0)) and "-" or "+"
  if re == 0 then return (sign == "-" and "-" or "") .. ims .. "i" end
  return fmt(re) .. sign .. ims .. "i"
end

function methods.re(z) return z[1] end
function methods.im(z) return z[2] end
function methods.abs(z) return cmath.abs(z) end
function methods.arg(z) return atan(z[2], z[1]) end
function methods.conj(z) return new(z[1], -z[2]) end

--- sqrt(re^2 + im^2) without overflow or underflow of the squares (the plain formula
-- first: it is right unless the result is beyond 1e150 either way).
local function hypot(re, im)
  local r = sqrt(re * re + im * im)
  if r < 1e150 and r > 1e-150 then return r end
  if re ~= re or im ~= im then return 0 / 0 end
  local m = math.max(math.abs(re), math.abs(im))
  if m == 0 or m == huge then return m end
  re, im = re / m, im / m
  return m * sqrt(re * re + im * im)
end

M.new = new
M.hypot = hypot
M.is = is_complex
M.parts = parts
M.I = new(0, 1)
M.metatable = mt

-- The functions of one argument on numbers and complex values. A real number gives a
-- real number where the real function is defined there, else the principal complex value.
local real_ok = {
  exp = function() return true end,
  log = function(x) return x > 0 end,
  sqrt = function(x) return x >= 0 end,
  sin = function() return true end, cos = function() return true end,
  tan = function() return true end, sinh = function() return true end,
  cosh = function() return true end, tanh = function() return true end,
  atan = function() return true end,
}
local real_fn = {
  exp = math.exp, log = math.log, sqrt = sqrt, sin = math.sin, cos = math.cos,
  tan = math.tan, atan = math.atan,
  -- C's csinh/ccosh/ctanh at a real point are accurate near 0 (unlike (e^x - e^-x)/2).
  sinh = function(x) return cmath.sinh(x)[1] end,
  cosh = function(x) return cmath.cosh(x)[1] end,
  tanh = function(x) return cmath.tanh(x)[1] end,
}

--- fn(name, v): the function `name` at a number or complex value, or nil if v is neither.
function M.apply(name, v)
  if type(v) == "number" then
    if real_ok[name](v) then return real_fn[name](v) end
    return cmath[name](v)
  end
  if getmetatable(v) == mt then return cmath[name](v) end
  return nil
end

M.function_names = { "exp", "log", "sqrt", "sin", "cos", "tan", "sinh", "cosh", "tanh", "atan" }

return M
