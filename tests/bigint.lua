-- Exact non-negative integers for reference values (test-only): little-endian limbs of
-- base 10^7, so that a limb times a factor below 10^11 stays exact in Lua's 64-bit
-- integers. Enough for sums and products of binomial coefficients by their recurrences.
local M = {}
local BASE = 10000000

local Big = {}
Big.__index = Big

function M.new(n)
  assert(math.type(n) == "integer" and n >= 0, "bigint.new: a non-negative integer")
  local limbs = {}
  repeat limbs[#limbs + 1] = n % BASE; n = n // BASE until n == 0
  return setmetatable(limbs, Big)
end

local function trim(a)
  while #a > 1 and a[#a] == 0 do a[#a] = nil end
  return a
end

function Big.__add(a, b)
  local out, carry = {}, 0
  for i = 1, math.max(#a, #b) do
    local s = (a[i] or 0) + (b[i] or 0) + carry
    out[i], carry = s % BASE, s // BASE
  end
  if carry > 0 then out[#out + 1] = carry end
  return setmetatable(out, Big)
end

--- a - b for a >= b (checked: the integers are non-negative)
function Big.__sub(a, b)
  local out, borrow = {}, 0
  for i = 1, #a do
    local s = a[i] - (b[i] or 0) - borrow
    if s < 0 then s, borrow = s + BASE, 1 else borrow = 0 end
    out[i] = s
  end
  assert(borrow == 0 and #b <= #a, "bigint: a - b with b > a")
  return setmetatable(trim(out), Big)
end

--- a * k for an integer 0 <= k < 10^11
function Big.mul(a, k)
  assert(math.type(k) == "integer" and k >= 0 and k < 1e11)
  local out, carry = {}, 0
  for i = 1, #a do
    local s = a[i] * k + carry
    out[i], carry = s % BASE, s // BASE
  end
  while carry > 0 do out[#out + 1] = carry % BASE; carry = carry // BASE end
  return setmetatable(trim(out), Big)
end

--- a / k for an integer k > 0 that divides a exactly (checked)
function Big.div(a, k)
  assert(math.type(k) == "integer" and k > 0 and k < 1e11)
  local out, rem = {}, 0
  for i = #a, 1, -1 do
    local cur = rem * BASE + a[i]
    out[i], rem = cur // k, cur % k
  end
  assert(rem == 0, "bigint.div: not exact")
  return setmetatable(trim(out), Big)
end

--- a * b for two big integers (schoolbook, limb by limb)
function Big.mul_big(a, b)
  local out = setmetatable({ 0 }, Big)
  for i = #b, 1, -1 do
    -- out = out * BASE + a * b[i]
    table.insert(out, 1, 0)
    out = trim(out)
    out = out + a:mul(b[i])
  end
  return out
end

--- The nearest double (the top four limbs carry 28 digits: rounding below 1e-16).
function Big.tonumber(a)
  local v = 0.0
  for i = #a, math.max(1, #a - 3), -1 do v = v * BASE + a[i] end
  return v * BASE ^ math.max(0, #a - 4)
end

function Big.__tostring(a)
  local parts = { tostring(a[#a]) }
  for i = #a - 1, 1, -1 do parts[#parts + 1] = string.format("%07d", a[i]) end
  return table.concat(parts)
end

--- binomial(n, k) exactly, by C(n, j+1) = C(n, j) (n - j)/(j + 1)
function M.binomial(n, k)
  local c = M.new(1)
  for j = 0, k - 1 do c = c:mul(n - j):div(j + 1) end
  return c
end

return M
