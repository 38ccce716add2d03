-- Tests of the expression DAG (lua/steep/expr.lua) and of tapes (ext/bind_tape.c):
-- hash-consing, construction-time simplification, printing, evaluation (single point,
-- batches on lists and steep.cvec, several outputs), listings, and bad input.
local lu = require "luaunit"
local H = require "helpers"
local steep = H.steep

local C, I = steep.complex, steep.I
local t, x, y = steep.var("t"), steep.param("x"), steep.param("y")

-- Instruction count of the tape compiled from e (tape:size() returns count, outputs).
local function size(e, var) return (steep.compile(e, var or t):size()) end

TestExprDag = {}

function TestExprDag:test_identical_construction_gives_the_same_node()
  lu.assertTrue(rawequal(steep.var("t"), t), "symbols are interned by kind and name")
  lu.assertTrue(rawequal(t + 1, t + 1))
  lu.assertTrue(rawequal(steep.sin(t * x + 1), steep.sin(t * x + 1)))
  lu.assertTrue(rawequal(t ^ 3, t ^ 3))
  lu.assertTrue(rawequal(2 * I * t, 2 * I * t), "complex constants are merged too")
  lu.assertFalse(rawequal(t + 1, t + 2))
  lu.assertFalse(rawequal(t * x, x * t), "no reordering of operands")
  lu.assertFalse(rawequal(steep.var("x"), x), "a variable and a parameter of one name differ")
  lu.assertTrue(t + 1 == t + 1, "== on expressions is node identity")
  lu.assertFalse(t + 1 == t + 2)
end

function TestExprDag:test_shared_subexpressions_compile_to_one_slot()
  -- (t+1)*(t+1): var, const 1, add, mul -- the two (t+1) are one slot
  lu.assertEquals(size((t + 1) * (t + 1)), 4)
  -- (t+1)*(t+2): var, 1, add, 2, add, mul
  lu.assertEquals(size((t + 1) * (t + 2)), 6)
  -- sin(t)*sin(t) + sin(t): var, sin, mul, add
  lu.assertEquals(size(steep.sin(t) * steep.sin(t) + steep.sin(t)), 4)
  -- a subexpression built twice in separate places is still merged
  local function build() return steep.exp(-(t - x) ^ 2 / 2) end
  local e = build() * steep.cos(t) + build() * steep.sin(t)
  lu.assertTrue(rawequal(build(), build()))
  -- var, x, sub, powi, neg, 2, div, exp, cos, mul, sin, mul, add
  lu.assertEquals(size(e), 13)
  -- several outputs share slots across outputs as well
  local tp = steep.compile({ steep.sin(t) + 1, steep.sin(t) * 2 }, t)
  local n, nout = tp:size()
  lu.assertEquals(n, 6, "var, sin, 1, add, 2, mul")
  lu.assertEquals(nout, 2)
end

function TestExprDag:test_simplifications()
  lu.assertTrue(rawequal(t + 0, t), "t + 0 = t")
  lu.assertTrue(rawequal(0 + t, t), "0 + t = t")
  lu.assertTrue(rawequal(t - 0, t), "t - 0 = t")
  lu.assertTrue(rawequal(0 - t, -t), "0 - t = -t")
  lu.assertTrue(rawequal(t * 1, t), "t * 1 = t")
  lu.assertTrue(rawequal(1 * t, t), "1 * t = t")
  lu.assertTrue(rawequal(t / 1, t), "t / 1 = t")
  lu.assertTrue(rawequal(-(-t), t), "-(-t) = t")
  lu.assertTrue(rawequal(t ^ 1, t), "t^1 = t")
  lu.assertEquals(tostring(t ^ 0), "1")
  lu.assertEquals(tostring(t * 0), "0")
  lu.assertEquals(tostring(0 * steep.exp(t)), "0")
  -- constant folding with the complex arithmetic
  lu.assertEquals(tostring((t * 0 + 2) * 3), "6")
  lu.assertEquals(size(steep.exp(t * 0 + 1) * t), 3, "exp(1) folds to one constant")
  H.close(steep.compile(steep.exp(t * 0 + 1)):eval(0), math.exp(1), 1e-16, "folded exp(1)")
  -- a folded power of a negative constant is the principal value, as the tape's powc
  -- gives: (-4)^(1/2) = 2i (DLMF 4.2.3 principal log in z^a = exp(a ln z))
  local folded = steep.compile((t * 0 - 4) ^ 0.5):eval(0)
  local taped = steep.compile((t - 4) ^ 0.5, t):eval(0)
  H.close(folded, C(0, 2), 1e-15, "folded (-4)^0.5")
  H.close(folded, taped, 1e-15, "folded and taped (-4)^0.5 agree")
end

function TestExprDag:test_tostring_readable_infix()
  lu.assertEquals(tostring(I * (t ^ 3 / 3 + x * t) - steep.log(1 + t ^ 2)),
    "i*(t^3/3 + x*t) - log(1 + t^2)")
  lu.assertEquals(tostring(t - (x - y)), "t - (x - y)")
  lu.assertEquals(tostring((t - x) - y), "t - x - y")
  lu.assertEquals(tostring(t / (x * y)), "t/(x*y)")
  lu.assertEquals(tostring(t / x * y), "t/x*y")
  lu.assertEquals(tostring(-(t + 1)), "-(t + 1)")
  lu.assertEquals(tostring((-t) ^ 2), "(-t)^2")
  lu.assertEquals(tostring(-t ^ 2), "-t^2")
  lu.assertEquals(tostring(t ^ -1), "t^(-1)")
  lu.assertEquals(tostring(t ^ 0.5), "t^0.5")
  lu.assertEquals(tostring(t ^ x), "exp(x*log(t))")
  lu.assertEquals(tostring((1 + 2 * I) * t), "(1+2i)*t")
  lu.assertEquals(tostring(steep.exp(-t ^ 2 / 2)), "exp(-t^2/2)")
  lu.assertEquals(tostring(t + x * y - x / (t + 1)), "t + x*y - x/(t + 1)")
  lu.assertEquals(tostring(steep.sin(t) ^ 2 + steep.atan(x)), "sin(t)^2 + atan(x)")
end

function TestExprDag:test_symbols_and_value()
  local e = x * steep.sin(t) + y
  lu.assertEquals(e:symbols(), { "x", "t", "y" })
  lu.assertTrue(e:depends_on(t))
  lu.assertFalse(e:depends_on(steep.param("z")))
  -- value with every symbol bound by name
  H.close((x * 2 + y):value({ x = 3, y = C(0, 1) }), C(6, 1), 1e-16, "value")
end

TestTapeEval = {}

-- e(t; x) = i (t^3/3 + x t) - log(1 + t^2) and the same by direct complex arithmetic
local E = I * (t ^ 3 / 3 + x * t) - steep.log(1 + t ^ 2)
local function direct(tv, xv) return I * (tv ^ 3 / 3 + xv * tv) - steep.log(1 + tv ^ 2) end

function TestTapeEval:test_eval_at_complex_points_with_named_parameters()
  local tape = steep.compile(E, t)
  lu.assertEquals(tape:params(), { "x" })
  for _, tv in ipairs({ C(0.3, 0.7), C(-1.2, 0.1), 2, C(0, -0.5) }) do
    for _, xv in ipairs({ 1.5, C(1.5, -0.2), -3 }) do
      H.close(tape:eval(tv, { x = xv }), direct(tv, xv), 1e-14,
        string.format("e(%s; x=%s)", tostring(tv), tostring(xv)))
    end
  end
  -- extra entries in the parameter table are ignored; parameters bind by name
  local two = steep.compile(x - y, t)
  H.close(two:eval(0, { y = 1, x = 10, z = "unused" }), 9, 1e-16, "x - y by name")
  lu.assertEquals(two:params(), { "x", "y" })
end

function TestTapeEval:test_multiple_outputs()
  local e1, e2, e3 = steep.exp(I * t), steep.cos(t) + I * steep.sin(t), x * t
  local tape = steep.compile({ e1, e2, e3 }, t)
  local tv = C(0.4, -0.3)
  local a, b, c = tape:eval(tv, { x = 2 })
  -- e^{it} = cos t + i sin t (Euler's formula, exact)
  H.close(a, steep.exp(I * tv), 1e-15, "output 1")
  H.close(b, a, 1e-15, "output 2 equals output 1 (Euler)")
  H.close(c, 2 * tv, 1e-16, "output 3")
  local ja, jb = tape:jet(tv, 5, { x = 2 })
  for k = 0, 5 do H.close(jb:coef(k), ja:coef(k), 1e-14, "jets of the two outputs, k=" .. k) end
end

function TestTapeEval:test_eval_many_on_lists_and_cvecs()
  local tape = steep.compile({ E, t * t }, t)
  local pts = { C(0.3, 0.7), 2, C(-1, 0.25), 0 }
  local l1, l2 = tape:eval_many(pts, { x = 0.5 })
  lu.assertEquals(#l1, 4)
  lu.assertEquals(#l2, 4)
  for i, p in ipairs(pts) do
    H.close(l1[i], direct(p, 0.5), 1e-14, "list output 1 at point " .. i)
    H.close(l2[i], p * p, 1e-15, "list output 2 at point " .. i)
  end
  -- a cvec of 150 points (more than one block of 64) gives cvecs, matching eval
  local xs = steep.cvec_range(C(-1, -0.5), C(2, 1), 150)
  local c1, c2 = tape:eval_many(xs, { x = C(0, 1) })
  lu.assertEquals(tostring(c1), "steep.cvec (150 points)")
  lu.assertEquals(#c1, 150)
  lu.assertEquals(#c2, 150)
  for i = 1, 150 do
    local p = xs:get(i)
    local v1, v2 = tape:eval(p, { x = C(0, 1) })
    H.close(c1:get(i), v1, 1e-15, "cvec output 1 vs eval at point " .. i)
    H.close(c2:get(i), v2, 1e-15, "cvec output 2 vs eval at point " .. i)
  end
  H.close(xs:get(150), C(2, 1), 1e-15, "cvec_range end point")
  -- an empty list gives empty results
  local e1, e2 = tape:eval_many({}, { x = 1 })
  lu.assertEquals(#e1, 0)
  lu.assertEquals(#e2, 0)
end

-- tape:evals() counts every evaluation made through the tape: one per value or jet, one
-- per point of a batch, and those of the kernels (Newton's method reports its own count).
function TestTapeEval:test_evaluation_tally()
  local core = require "steep.core"
  local tape = steep.compile({ t ^ 3 / 3 - x * t, 1 + 0 * t }, t)
  lu.assertEquals(tape:evals(), 0)
  tape:eval(C(0.5, 0.1), { x = 2 })
  lu.assertEquals(tape:evals(), 1)
  tape:eval_many(steep.cvec_range(0, 1, 7), { x = 2 })
  lu.assertEquals(tape:evals(), 8)
  tape:jet(0.3, 5, { x = 2 })
  lu.assertEquals(tape:evals(), 9)
  -- F' = t^2 - x vanishes at sqrt 2 (exactly, from the seed 1.2)
  local st, root, _, n = core.zero(tape, { x = 2 }, { out = 1, deriv = 1 }, C(1.2, 0),
    C(0, 0), 4, 0.1, 60)
  lu.assertEquals(st, "ok")
  H.close(root, math.sqrt(2), 1e-15, "zero of t^2 - 2")
  lu.assertTrue(n >= 2)
  lu.assertEquals(tape:evals(), 9 + n)
end

function TestTapeEval:test_dump_listing()
  local tape = steep.compile({ t ^ 3 + x, t ^ 2.5 }, t)
  local d = tape:dump()
  lu.assertStrContains(d, "powi")
  lu.assertStrContains(d, "^3")
  lu.assertStrContains(d, "powc")
  lu.assertStrContains(d, "param  x")
  lu.assertStrContains(d, "var")
  -- one line per instruction plus the output line; varying slots are starred
  local lines = {}
  for line in d:gmatch("[^\n]+") do lines[#lines + 1] = line end
  lu.assertEquals(#lines, (tape:size()) + 1)
  lu.assertStrMatches(lines[1], "%s*1%* var%s*")
  lu.assertStrMatches(lines[#lines], "out %d+ %d+")
  lu.assertEquals(tostring(tape), "steep.tape (5 instructions, 1 parameters, 2 outputs)")
  -- integer powers of any size stay powi (no log): t^-7 and t^40
  local d2 = steep.compile({ t ^ -7, t ^ 40 }, t):dump()
  lu.assertStrContains(d2, "powi   1 ^-7")
  lu.assertStrContains(d2, "powi   1 ^40")
  lu.assertNil(d2:find("log", 1, true))
  -- and evaluate exactly: 2^40, (1+i)^-7 = (1+i)/(1+i)^8 = (1+i)/16
  local a, b = steep.compile({ t ^ 40, t ^ -7 }, t):eval(2)
  lu.assertEquals(a:re(), 2 ^ 40)
  local _, c = steep.compile({ t ^ 40, t ^ -7 }, t):eval(C(1, 1))
  H.close(c, C(1, 1) / 16, 1e-16, "(1+i)^-7")
end

TestExprErrors = {}

function TestExprErrors:test_unbound_and_bad_parameters()
  local tape = steep.compile(x * t + y, t)
  H.raises({ "unbound parameter 'x'" }, tape.eval, tape, 1, { y = 1 })
  H.raises({ "unbound parameter 'y'" }, tape.eval, tape, 1, { x = 1 })
  H.raises({ "unbound parameter 'x'" }, tape.eval, tape, 1)   -- no table at all
  H.raises({ "unbound parameter 'x'" }, tape.jet, tape, 1, 3)
  H.raises({ "unbound parameter 'x'" }, tape.eval_many, tape, { 1, 2 })
  H.raises({ "parameter 'x' is not finite" }, tape.eval, tape, 1, { x = 0 / 0, y = 1 })
  H.raises({ "parameter 'y' is not finite" }, tape.eval, tape, 1, { x = 1, y = math.huge })
  H.raises({ "parameter 'x' is not finite" }, tape.eval, tape, 1, { x = C(1, -math.huge), y = 1 })
  H.raises({ "parameter 'x' must be a number or complex value, got string" },
    tape.eval, tape, 1, { x = "2", y = 1 })
  H.raises({ "table of parameter values expected, got number" }, tape.eval, tape, 1, 5)
  -- the tape is fine afterwards
  H.close(tape:eval(2, { x = 3, y = 1 }), 7, 1e-16, "eval after errors")
end

function TestExprErrors:test_wrong_types()
  local tape = steep.compile(t * 2, t)
  H.raises({ "number or complex expected, got string" }, tape.eval, tape, "1")
  H.raises({ "point 2 is a string" }, tape.eval_many, tape, { 1, "a" })
  H.raises({ "steep.cvec or list of points expected, got number" }, tape.eval_many, tape, 3)
  H.raises({ "bad argument #2 to 'compile' (symbol expected)" }, steep.compile, t, "t")
  H.raises({ "bad argument #2 to 'compile' (symbol expected)" }, steep.compile, t, t + 1)
  H.raises({ "attempt to use a string value in an expression" }, steep.compile, { t, "x" }, t)
  H.raises({ "compile: 'x' is used both as a variable and as a parameter" },
    steep.compile, steep.var("x") + x, t)
  H.raises({ "bad argument #1 to 'var'", "got \"1x\"" }, steep.var, "1x")
  H.raises({ "bad argument #1 to 'param'", "got number" }, steep.param, 3)
  -- the tape still evaluates
  H.close(tape:eval(C(1, 1)), C(2, 2), 1e-16, "eval after errors")
end

function TestExprErrors:test_bad_operands()
  -- the error points at the line that used the operator (this file)
  H.raises({ "test_expr.lua:", "attempt to use a string value in an expression" },
    function() return t + "x" end)
  H.raises({ "attempt to use a string value in an expression" }, function() return "x" * t end)
  H.raises({ "attempt to use a table value in an expression" }, function() return t - {} end)
  H.raises({ "attempt to use a nil value in an expression" }, function() return t / nil end)
  H.raises({ "attempt to use a boolean value in an expression" }, function() return t ^ true end)
  H.raises({ "integer division is not defined on expressions" }, function() return t // 2 end)
  H.raises({ "the modulo operator is not defined on expressions" }, function() return t % 2 end)
  H.raises({ "cannot concatenate an expression" }, function() return t .. "a" end)
  -- construction keeps working
  lu.assertEquals(tostring(t + 1), "t + 1")
end

function TestExprErrors:test_non_finite_constants_are_rejected_at_compile()
  H.raises({ "constant is not finite" }, steep.compile, t + math.huge, t)
  H.raises({ "constant is not finite" }, steep.compile, t * C(0, 0 / 0), t)
  lu.assertEquals((steep.compile(t + 1, t):size()), 3)
end
