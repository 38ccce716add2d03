-- Tests of steep.complex / steep.I: arithmetic, accessors, printing, equality, powers and
-- the elementary functions on numbers and complex values (principal branches).
local lu = require "luaunit"
local H = require "helpers"
local steep = H.steep

local C, I = steep.complex, steep.I
local pi = math.pi

-- Exact comparison of both parts (for results that IEEE arithmetic gives exactly).
local function exact(z, re, im, msg)
  lu.assertTrue(steep.is_complex(z), (msg or "value") .. ": complex value expected, got " .. type(z))
  lu.assertEquals(z:re(), re, (msg or "value") .. ": real part")
  lu.assertEquals(z:im(), im, (msg or "value") .. ": imaginary part")
end

local function is_real_number(v) return type(v) == "number" end

TestComplex = {}

function TestComplex:test_construction_and_accessors()
  local z = C(3, -4)
  exact(z, 3, -4, "C(3,-4)")
  exact(C(2), 2, 0, "C(2) has a zero imaginary part")
  exact(I, 0, 1, "steep.I")
  lu.assertTrue(steep.is_complex(z))
  lu.assertFalse(steep.is_complex(3))
  lu.assertFalse(steep.is_complex({ 3, 4 }))   -- a plain table is not a complex value
  -- |3-4i| = 5 exactly (hypot of a Pythagorean triple is exact in IEEE arithmetic)
  lu.assertEquals(z:abs(), 5)
  exact(z:conj(), 3, 4, "conj")
  -- arg = atan2(im, re) in (-pi, pi] (principal argument, DLMF 4.2.3's ph z)
  H.close(I:arg(), pi / 2, 1e-16, "arg i = pi/2")
  H.close(C(-1, 0):arg(), pi, 1e-16, "arg(-1) = pi")
  H.close(C(-1, -1e-300):arg(), -pi, 1e-16, "arg just below the negative axis = -pi")
  H.close(C(1, 1):arg(), pi / 4, 1e-16, "arg(1+i) = pi/4")
  lu.assertEquals(C(0, 0):abs(), 0)
  -- abs must not overflow where re^2 + im^2 would (hypot): |1e300 + 1e300 i| = sqrt(2) e300
  H.close(C(1e300, 1e300):abs(), math.sqrt(2) * 1e300, 1e-15, "abs without overflow")
end

function TestComplex:test_construction_errors()
  H.raises({ "bad argument #1 to 'complex'", "number expected, got string" }, steep.complex, "1")
  H.raises({ "bad argument #2 to 'complex'", "number expected, got table" }, steep.complex, 1, {})
  H.raises({ "bad argument #1 to 'complex'", "got nil" }, steep.complex)
end

function TestComplex:test_arithmetic_with_numbers_on_both_sides()
  local z = C(1, 2)
  exact(z + 3, 4, 2, "z + 3")
  exact(3 + z, 4, 2, "3 + z")
  exact(z - 3, -2, 2, "z - 3")
  exact(3 - z, 2, -2, "3 - z")
  exact(z * 3, 3, 6, "z * 3")
  exact(3 * z, 3, 6, "3 * z")
  exact(z * 0.5, 0.5, 1, "z * 0.5 (float)")
  exact(z / 2, 0.5, 1, "z / 2")
  exact(-z, -1, -2, "-z")
  -- 5/(1+2i) = 5(1-2i)/5 = 1-2i (exact formula)
  exact(5 / z, 1, -2, "5 / z")
  -- (1+2i)(3-4i) = 3 - 4i + 6i + 8 = 11 + 2i
  exact(z * C(3, -4), 11, 2, "(1+2i)(3-4i)")
  exact(z + C(3, -4), 4, -2, "(1+2i)+(3-4i)")
  exact(z - C(3, -4), -2, 6, "(1+2i)-(3-4i)")
  -- (3+4i)/(1+2i) = (3+4i)(1-2i)/5 = (11-2i)/5
  H.close(C(3, 4) / z, C(2.2, -0.4), 1e-15, "(3+4i)/(1+2i)")
  exact(I * I, -1, 0, "i*i")
  exact(1 / I, 0, -1, "1/i")
end

function TestComplex:test_division_robustness()
  -- Smith's algorithm avoids |b|^2: these overflow/underflow with the textbook formula.
  exact(C(1e300, 1e300) / C(1e300, 1e300), 1, 0, "huge / huge")
  -- (1+i)/(1+2i) = (3-i)/5, scaled by 1e-300 in both operands (exact formula)
  H.close(C(1e-300, 1e-300) / C(1e-300, 2e-300), C(0.6, -0.2), 1e-15, "tiny / tiny")
  -- 1/(d + d i) = (1 - i)/(2d) with d = 1e-308 (|b|^2 underflows to 0 naively)
  H.close(1 / C(1e-308, 1e-308), C(5e307, -5e307), 1e-15, "1 / tiny")
  -- huge imaginary divisor: (1+i)/(1e300 i) = (1 - i) 1e-300
  H.close(C(1, 1) / C(0, 1e300), C(1e-300, -1e-300), 1e-15, "1 / huge imaginary")
  -- division by zero does not raise: a non-zero numerator gives infinite parts, 0/0 NaN
  local q = C(1, 2) / 0
  lu.assertEquals(q:re(), math.huge, "(1+2i)/0 real part")
  lu.assertEquals(q:im(), math.huge, "(1+2i)/0 imaginary part")
  local n = C(0, 0) / C(0, 0)
  lu.assertTrue(n:re() ~= n:re() and n:im() ~= n:im(), "0/0 is NaN in both parts")
end

-- |z| without overflow or underflow of the squares: 3-4-5 triangles scaled to 1e200 and
-- 1e-200 (Pythagoras; the scaled values are exact up to the rounding of 3e200 etc.), as
-- the library's own modulus (complex.hypot) and the landscape's (landscape.cabs) give it.
function TestComplex:test_modulus_far_from_one()
  local complex = require "steep.complex"
  local landscape = require "steep.landscape"
  H.close(complex.hypot(3e200, 4e200), 5e200, 1e-15, "hypot of 3e200, 4e200")
  H.close(complex.hypot(-3e-200, 4e-200), 5e-200, 1e-15, "hypot of -3e-200, 4e-200")
  H.close(landscape.cabs(C(3e200, -4e200)), 5e200, 1e-15, "|3e200 - 4e200 i|")
  H.close(landscape.cabs(C(3e-200, 4e-200)), 5e-200, 1e-15, "|3e-200 + 4e-200 i|")
  lu.assertEquals(complex.hypot(0, 0), 0)
  lu.assertEquals(complex.hypot(math.huge, 1), math.huge)
  local n = complex.hypot(0 / 0, 1)
  lu.assertTrue(n ~= n, "hypot of NaN is NaN")
  H.close(complex.hypot(3, 4), 5, 0, "the plain case")
end

function TestComplex:test_tostring()
  lu.assertEquals(tostring(C(1, 2)), "1+2i")
  lu.assertEquals(tostring(C(1, -2)), "1-2i")
  lu.assertEquals(tostring(C(0, -2.5)), "-2.5i")
  lu.assertEquals(tostring(C(0, 1)), "1i")
  lu.assertEquals(tostring(C(3, 0)), "3")
  lu.assertEquals(tostring(C(-0.25, 0)), "-0.25")
  lu.assertEquals(tostring(C(1e-20, 1e300)), "1e-20+1e+300i")
  -- 15 significant digits
  lu.assertEquals(tostring(C(pi, -1 / 3)), "3.14159265358979-0.333333333333333i")
  lu.assertEquals(tostring(C(0 / 0, 1)), "nan+1i")
  lu.assertEquals(tostring(C(1, math.huge)), "1+infi")
  lu.assertEquals(tostring(C(-math.huge, -math.huge)), "-inf-infi")
end

function TestComplex:test_equality()
  lu.assertTrue(C(1, 2) == C(1, 2))
  lu.assertFalse(C(1, 2) == C(1, -2))
  lu.assertFalse(C(1, 2) == C(2, 2))
  lu.assertTrue(C(1, 2) ~= C(1, 3))
  lu.assertTrue((C(0.5, 1) + C(0.5, 1)) == C(1, 2), "results compare by value")
  lu.assertFalse(rawequal(C(1, 2), C(1, 2)), "values are not interned (equality is by parts)")
  lu.assertFalse(C(0 / 0, 0) == C(0 / 0, 0), "NaN parts compare unequal, as for numbers")
end

function TestComplex:test_integer_powers_exact()
  -- binary powering: exact for small Gaussian integers
  exact(C(1, 1) ^ 2, 0, 2, "(1+i)^2 = 2i")
  exact(C(1, 1) ^ 8, 16, 0, "(1+i)^8 = 16")
  exact(C(1, 1) ^ 2.0, 0, 2, "an integral float exponent uses the exact path")
  exact(I ^ -1, 0, -1, "i^-1 = -i")
  exact(C(1, 1) ^ -2, 0, -0.5, "(1+i)^-2 = -i/2")
  exact(C(2, 3) ^ 0, 1, 0, "z^0 = 1")
  exact(C(0, 0) ^ 3, 0, 0, "0^3 = 0")
  -- (2+i)^3 = 8 + 12i - 6 - i = 2 + 11i
  exact(C(2, 1) ^ 3, 2, 11, "(2+i)^3")
  -- a large integer power against the polar form r^n e^{i n theta} (exact formula)
  local z, n = C(1, 1e-3), 1000
  local r, th = z:abs(), z:arg()
  local want = C(r ^ n * math.cos(n * th), r ^ n * math.sin(n * th))
  H.close(z ^ n, want, 1e-12, "(1+0.001i)^1000 vs polar form")
end

function TestComplex:test_non_integer_powers_principal()
  -- principal power z^w = exp(w ln z), ln the principal logarithm (DLMF 4.2.3)
  H.close(C(-4, 0) ^ 0.5, C(0, 2), 1e-15, "(-4)^(1/2) = 2i")
  H.close(C(-8, 0) ^ (1 / 3), C(1, math.sqrt(3)), 1e-15, "(-8)^(1/3) = 2 e^{i pi/3} = 1 + i sqrt 3")
  -- i^i = exp(i * i pi/2) = e^{-pi/2}, real
  H.close(I ^ I, math.exp(-pi / 2), 1e-15, "i^i = e^{-pi/2}")
  -- a number base with a complex exponent: 2^i = cos(ln 2) + i sin(ln 2)
  local l2 = math.log(2)
  H.close(2 ^ I, C(math.cos(l2), math.sin(l2)), 1e-15, "2^i")
  -- z^w for z = 1+i, w = 0.5-0.25i: ln z = ln(sqrt 2) + i pi/4, so
  -- w ln z = (0.5 ln sqrt2 + 0.25 pi/4) + i (0.5 pi/4 - 0.25 ln sqrt2)  (exact formula)
  local lr, th = 0.5 * l2, pi / 4
  local wr, wi = 0.5 * lr + 0.25 * th, 0.5 * th - 0.25 * lr
  H.close(C(1, 1) ^ C(0.5, -0.25), C(math.exp(wr) * math.cos(wi), math.exp(wr) * math.sin(wi)),
    1e-15, "(1+i)^(0.5-0.25i)")
  exact(C(0, 0) ^ 0.5, 0, 0, "0^0.5 = 0")
  local bad = C(0, 0) ^ -0.5
  lu.assertTrue(bad:re() ~= bad:re(), "0^-0.5 is NaN (no principal value)")
end

function TestComplex:test_functions_on_numbers_are_real_where_real()
  for _, x in ipairs({ -2.5, -0.3, 0, 0.7, 3 }) do
    local checks = {
      { "exp", math.exp }, { "sin", math.sin }, { "cos", math.cos }, { "tan", math.tan },
      { "atan", math.atan },
    }
    for _, c in ipairs(checks) do
      local v = steep[c[1]](x)
      lu.assertTrue(is_real_number(v), c[1] .. "(" .. x .. ") is a Lua number")
      lu.assertEquals(v, c[2](x), c[1] .. "(" .. x .. ") equals math." .. c[1])
    end
    for _, name in ipairs({ "sinh", "cosh", "tanh" }) do
      lu.assertTrue(is_real_number(steep[name](x)), name .. "(" .. x .. ") is a Lua number")
    end
  end
  lu.assertEquals(steep.log(2), math.log(2))
  lu.assertEquals(steep.sqrt(2), math.sqrt(2))
  lu.assertEquals(steep.sqrt(0), 0)
  -- sinh, cosh, tanh from their definitions (exact formulas) away from cancellation
  local x = 0.8
  H.close(steep.sinh(x), (math.exp(x) - math.exp(-x)) / 2, 1e-15, "sinh 0.8")
  H.close(steep.cosh(x), (math.exp(x) + math.exp(-x)) / 2, 1e-15, "cosh 0.8")
  H.close(steep.tanh(x), (math.exp(2 * x) - 1) / (math.exp(2 * x) + 1), 1e-15, "tanh 0.8")
  -- near 0: sinh x = x + x^3/6 + ..., tanh x = x - x^3/3 + ... (Maclaurin series):
  -- the difference formula would give 0 here
  H.close(steep.sinh(1e-20), 1e-20, 1e-15, "sinh of a tiny argument")
  H.close(steep.tanh(1e-20), 1e-20, 1e-15, "tanh of a tiny argument")
  -- cosh 710 = e^710/2 is finite although e^710 overflows; reference e^(710 - ln 2)
  -- (the rounding of 710 - ln 2 costs ~1e-13 relative)
  H.close(steep.cosh(710), math.exp(710 - math.log(2)), 1e-12, "cosh 710 without overflow")
  -- tanh 20 = 1 - 2e^-40 + ... (to double precision 1)
  H.close(steep.tanh(20), 1, 1e-16, "tanh 20")
end

function TestComplex:test_functions_on_numbers_outside_the_real_domain()
  -- principal branch: ln(-x) = ln x + i pi on the negative axis (DLMF 4.2.3 with ph = pi;
  -- C99 Annex G clog(-x + 0i) likewise, from memory)
  local l = steep.log(-1)
  lu.assertTrue(steep.is_complex(l), "log(-1) is complex")
  H.close(l, C(0, pi), 1e-16, "log(-1) = i pi")
  H.close(steep.log(-2.5), C(math.log(2.5), pi), 1e-15, "log(-2.5) = ln 2.5 + i pi")
  -- principal square root, Re >= 0: sqrt(-4) = 2i exactly
  exact(steep.sqrt(-4), 0, 2, "sqrt(-4) = 2i")
  exact(steep.sqrt(-0.25), 0, 0.5, "sqrt(-0.25) = 0.5i")
end

function TestComplex:test_functions_on_complex_values()
  local x, y = 0.3, 1.2
  local z = C(x, y)
  local ch, sh = (math.exp(y) + math.exp(-y)) / 2, (math.exp(y) - math.exp(-y)) / 2
  -- e^{x+iy} = e^x (cos y + i sin y) (Euler's formula, exact)
  H.close(steep.exp(z), C(math.exp(x) * math.cos(y), math.exp(x) * math.sin(y)), 1e-15, "exp z")
  H.close(steep.exp(C(0, pi)), -1, 1e-15, "exp(i pi) = -1")
  -- ln z = ln|z| + i ph z (DLMF 4.2.3)
  H.close(steep.log(C(3, 4)), C(math.log(5), math.atan(4, 3)), 1e-15, "log(3+4i)")
  H.close(steep.log(I), C(0, pi / 2), 1e-16, "log i = i pi/2")
  H.close(steep.log(C(-1, 0)), C(0, pi), 1e-16, "log(-1+0i) = i pi")
  -- just below the cut the principal value jumps to -i pi (ph in (-pi, pi])
  H.close(steep.log(C(-1, -1e-12)), C(0, -pi), 1e-12, "log just below the cut")
  -- principal square roots: Re sqrt >= 0
  H.close(steep.sqrt(C(-3, -4)), C(1, -2), 1e-15, "sqrt(-3-4i) = 1-2i")
  H.close(steep.sqrt(C(-3, 4)), C(1, 2), 1e-15, "sqrt(-3+4i) = 1+2i")
  H.close(steep.sqrt(I), C(1, 1) / math.sqrt(2), 1e-15, "sqrt i = (1+i)/sqrt 2")
  exact(steep.sqrt(C(-4, 0)), 0, 2, "sqrt(-4+0i) = 2i")
  -- sin(x+iy) = sin x cosh y + i cos x sinh y, cos(x+iy) = cos x cosh y - i sin x sinh y
  -- (addition theorems with sin(iy) = i sinh y, cos(iy) = cosh y; exact formulas)
  local sz = C(math.sin(x) * ch, math.cos(x) * sh)
  local cz = C(math.cos(x) * ch, -math.sin(x) * sh)
  H.close(steep.sin(z), sz, 1e-15, "sin z")
  H.close(steep.cos(z), cz, 1e-15, "cos z")
  H.close(steep.tan(z), sz / cz, 1e-14, "tan z = sin z / cos z")
  -- sinh z = -i sin(iz), cosh z = cos(iz), tanh z = -i tan(iz) (exact identities)
  local iz = I * z
  H.close(steep.sinh(z), -I * steep.sin(iz), 1e-15, "sinh z")
  H.close(steep.cosh(z), steep.cos(iz), 1e-15, "cosh z")
  H.close(steep.tanh(z), -I * steep.tan(iz), 1e-14, "tanh z")
  H.close(steep.sin(I), C(0, (math.exp(1) - math.exp(-1)) / 2), 1e-15, "sin i = i sinh 1")
  H.close(steep.cos(I), (math.exp(1) + math.exp(-1)) / 2, 1e-15, "cos i = cosh 1")
  H.close(steep.sinh(C(0, pi / 2)), I, 1e-15, "sinh(i pi/2) = i")
  H.close(steep.cosh(C(0, pi)), -1, 1e-15, "cosh(i pi) = -1")
  H.close(steep.tanh(C(0, pi / 4)), I, 1e-15, "tanh(i pi/4) = i")
  -- arctan z = (i/2) ln((i+z)/(i-z)) (DLMF 4.23.26, equation number from memory), off
  -- the cuts; and tan(atan z) = z
  for _, w in ipairs({ C(0.5, 0.5), C(-2, 0.3), C(0.1, -0.9), C(3, -2) }) do
    local want = (I / 2) * steep.log((I + w) / (I - w))
    H.close(steep.atan(w), want, 1e-14, "atan(" .. tostring(w) .. ") by the log formula")
    H.close(steep.tan(steep.atan(w)), w, 1e-14, "tan(atan(" .. tostring(w) .. "))")
  end
end

function TestComplex:test_function_argument_errors()
  H.raises({ "bad argument #1 to 'exp'", "number, complex or expression expected, got string" },
    steep.exp, "x")
  H.raises({ "bad argument #1 to 'log'", "got nil" }, steep.log)
  H.raises({ "bad argument #1 to 'sqrt'", "got table" }, steep.sqrt, {})
  H.raises({ "bad argument #1 to 'atan'", "got steep.cvec" }, steep.atan, steep.cvec { 1 })
end

function TestComplex:test_arithmetic_errors()
  H.raises({ "attempt to perform arithmetic on a nil value (with a complex value)" },
    function() return I + nil end)
  H.raises({ "attempt to perform arithmetic on a table value (with a complex value)" },
    function() return {} * I end)
  H.raises({ "attempt to perform arithmetic on a boolean value" }, function() return I - true end)
  H.raises({ "attempt to perform arithmetic on a boolean value" }, function() return I * false end)
  -- a string operand: Lua's string coercion refuses the complex value
  H.raises({ "attempt to", "string" }, function() return I + "1" end)
  -- still usable afterwards
  exact(I + 1, 1, 1, "arithmetic after errors")
end

function TestComplex:test_mixing_with_expressions()
  local t = steep.var("t")
  local e = 2 * I * t
  lu.assertTrue(steep.is_expr(e), "2*steep.I*t is an expression")
  lu.assertFalse(steep.is_complex(e))
  lu.assertTrue(steep.is_complex(2 * I), "2*steep.I is a complex value")
  lu.assertFalse(steep.is_expr(2 * I))
  for _, f in ipairs({
    function() return t * I end, function() return I + t end, function() return C(1, 2) - t end,
    function() return t / I end, function() return I ^ t end, function() return t ^ I end,
  }) do
    lu.assertTrue(steep.is_expr(f()))
  end
  -- values: at t = 0.5 - 0.25i, compare with the complex arithmetic directly
  local t0 = C(0.5, -0.25)
  local tape = steep.compile({ e, I + t, C(1, 2) - t, t / I, I ^ t }, t)
  local v1, v2, v3, v4, v5 = tape:eval(t0)
  H.close(v1, 2 * I * t0, 1e-15, "2it")
  H.close(v2, I + t0, 1e-15, "i + t")
  H.close(v3, C(1, 2) - t0, 1e-15, "(1+2i) - t")
  H.close(v4, t0 / I, 1e-15, "t / i")
  H.close(v5, I ^ t0, 1e-15, "i^t = exp(t log i)")
end
