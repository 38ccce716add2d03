-- Coefficient integrals of exponential type with infinitely many saddles (not periodic):
-- the Bell numbers B_n = (n!/e) (1/2 pi i) closed integral of exp(e^z) z^(-n-1) dz
-- (Cauchy's formula for the coefficients of e^{e^z - 1} = sum B_n z^n/n!, DLMF 26.7.6),
-- with the exponent e^z - n log z and the contour a circle of radius 1: the landscape must
-- find the saddle W with W e^W = n by itself, the saddles W_k beyond it (one per branch of
-- the equation), and close the chain of their descent paths. Reference: exact B_n by the
-- Bell triangle (each row starts with the last entry of the one before; each entry is its
-- left neighbour plus the entry above that neighbour; B_n starts row n), in exact integers
-- (tests/bigint.lua); B_50 also from memory.
local lu = require "luaunit"
local H = require "helpers"
local steep = H.steep
local big = require "bigint"

local z, n = steep.var "z", steep.param "n"

local function bell(nmax)
  local row, B = { big.new(1) }, { [0] = big.new(1) }
  for k = 1, nmax do
    local nr = { row[#row] }
    for j = 1, #row do nr[j + 1] = nr[j] + row[j] end
    row = nr
    B[k] = row[1]
  end
  return B
end

-- a / b for big integers as a double: the top four limbs of each (28 digits) and the
-- power of the base between them (relative rounding a few 1e-16).
local function ratio(a, b)
  local function top(x)
    local v = 0.0
    for i = #x, math.max(1, #x - 3), -1 do v = v * 1e7 + x[i] end
    return v, math.max(0, #x - 4)
  end
  local va, ea = top(a)
  local vb, eb = top(b)
  return va / vb * 10.0 ^ (7 * (ea - eb))
end

TestBell = {}

function TestBell:test_bell_numbers()
  local B = bell(200)
  lu.assertEquals(tostring(B[10]), "115975", "B_10 from the triangle")
  lu.assertEquals(tostring(B[50]), "185724268771078270438257767181908917499221852770",
    "B_50 (from memory)")
  local J = steep.integral { var = z, exponent = steep.exp(z) - n * steep.log(z),
    amplitude = 1 / (2 * math.pi * steep.I * z), contour = steep.circle(0, 1), large = n }
  for _, nv in ipairs({ 10, 50, 100, 200 }) do
    local fact = big.new(1)
    for k = 2, nv do fact = fact:mul(k) end
    local want = math.exp(1) * ratio(B[nv], fact)    -- e B_n / n!
    local msg = "n = " .. nv
    -- quadrature along the deformed contour, to 1e-12
    local v, e, info = J:quad { n = nv }
    lu.assertEquals(info.along, "deformed", msg)
    lu.assertEquals(info.status, "ok", msg .. ": " .. table.concat(info.notes, "; "))
    H.close(v, want, 1e-12, msg .. ": quadrature")
    lu.assertTrue(e <= 1e-12 * want, msg .. ": quadrature estimate")
    -- the expansion: within its estimate, led by the saddle W e^W = n on the positive axis
    local r = J:expand { n = nv, order = 6 }
    lu.assertTrue((r.value - want):abs() <= r.error, string.format("%s: expand %s vs %.17g, "
      .. "difference %.3g, estimate %.3g", msg, tostring(r.value), want,
      (r.value - want):abs(), r.error))
    lu.assertTrue(r.error < 1e-5 * want, msg .. ": a useful estimate")
    local c = r.contributions[1]
    lu.assertEquals(c.kind, "saddle", msg .. ": the dominant contribution is a saddle")
    local W = c.at
    lu.assertTrue(math.abs(W:im()) < 1e-12 and W:re() > 0, msg .. ": on the positive axis")
    H.close(W * steep.exp(W), nv, 1e-12, msg .. ": W e^W = n")
    for _, ci in ipairs(r.contributions) do
      lu.assertNotEquals(ci.kind, "pole", msg .. ": no residue (the chain goes round 0)")
    end
  end
end
