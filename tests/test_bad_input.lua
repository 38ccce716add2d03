-- The bad-input catalogue: wrong and hostile input across the public interface. Every
-- case asserts what its error message says (the function or argument, what was expected,
-- what was got, the value or place involved: what a user needs to act on it), runs in
-- bounded time, and is followed by a full garbage collection and a check that the library
-- still computes (a Lua error raised inside the C core must leave nothing half-done).
local lu = require "luaunit"
local H = require "helpers"
local steep = H.steep

local C = steep.complex
local t, x, s = steep.var("t"), steep.param("x"), steep.var("s")
local pi = math.pi
local inf = steep.inf

-- a case slower than this is a failure (a hang, in effect); under valgrind (make memcheck
-- sets STEEP_SLOWDOWN) everything runs some 30 times slower
local CASE_SECONDS = 10 * (tonumber(os.getenv("STEEP_SLOWDOWN")) or 1)

-- Runs one bad-input case: f(...) must raise an error holding every fragment, within
-- CASE_SECONDS of CPU time; then a full collection and a quick evaluation. Returns the
-- message (for further checks).
local cases = 0
local function bad(fragments, f, ...)
  local t0 = os.clock()
  local msg = H.raises(fragments, f, ...)
  local dt = os.clock() - t0
  if dt > CASE_SECONDS then
    lu.fail(string.format("case took %.1f s (> %d s): %s", dt, CASE_SECONDS, msg))
  end
  collectgarbage("collect")
  lu.assertEquals(steep.compile(t ^ 2 + 1, t):eval(2), C(5, 0), "evaluation after: " .. msg)
  cases = cases + 1
  return msg
end

-- The message must not point into the library's own files: the place named (if any) is
-- the caller's.
local function no_library_location(msg)
  lu.assertNil(msg:find("lua/steep/", 1, true), "the message points into the library: " .. msg)
end

-- A full computation still works: the Gaussian integral of exp(-2 t^2) over the real
-- line, sqrt(pi/2) (exact), by quadrature and by its one-term expansion (exact too).
local groups = 0
local function still_usable(label)
  groups = groups + 1
  collectgarbage("collect")
  local J = steep.integral { var = t, exponent = -x * t ^ 2, contour = steep.line(inf(pi), inf(0)),
    large = x }
  local v = J:quad { x = 2 }
  H.close(v, math.sqrt(pi / 2), 1e-12, label .. ": quadrature after the bad input")
  local r = J:expand { x = 2, order = 2 }
  H.close(r.value, math.sqrt(pi / 2), 1e-12, label .. ": expansion after the bad input")
end

-- The Gaussian with a large parameter x, along the real line.
local function gauss()
  return steep.integral { var = t, exponent = -x * t ^ 2, contour = steep.line(inf(pi), inf(0)),
    large = x }
end

TestBadInput = {}

function TestBadInput:test_symbols_values_and_functions()
  bad({ "bad argument #1 to 'var'", "name expected", "got number" }, steep.var, 3)
  bad({ "bad argument #1 to 'param'", "got \"1x\"" }, steep.param, "1x")
  bad({ "bad argument #1 to 'var'", "got \"\"" }, steep.var, "")
  bad({ "bad argument #1 to 'complex'", "number expected, got string" }, steep.complex, "a")
  bad({ "bad argument #2 to 'complex'", "number expected, got table" }, steep.complex, 1, {})
  bad({ "bad argument #1 to 'exp'", "number, complex or expression expected, got string" },
    steep.exp, "a")
  bad({ "bad argument #1 to 'sin'", "got table" }, steep.sin, {})
  bad({ "bad argument #2 to 'diff'", "symbol expected" }, steep.diff, t * t, 3)
  bad({ "bad argument #2 to 'substitute'", "table expected" }, steep.substitute, t, 3)
  bad({ "attempt to use a string value in an expression" }, steep.substitute, t, { [t] = "a" })
  bad({ "test_bad_input.lua:", "attempt to use a table value in an expression" },
    function() return t + {} end)
  bad({ "bad argument #1 to 'airy'", "finite number or complex value expected" }, steep.airy, "a")
  still_usable("symbols")
end

function TestBadInput:test_contours()
  bad({ "bad argument #1 to 'line'", "point or steep.inf expected, got nil" }, steep.line, nil, 1)
  bad({ "bad argument #2 to 'line'", "point is not finite", "steep.inf(angle)" },
    steep.line, 0, 0 / 0)
  bad({ "bad argument to 'line'", "segment of zero length at 1" }, steep.line, 1, 1)
  bad({ "bad argument #2 to 'line'", "not opposite", "steep.path" }, steep.line, inf(0), inf(1))
  bad({ "bad argument #1 to 'path'", "at least two points expected" }, steep.path, { 1 })
  bad({ "bad argument #1 to 'path'", "list of points expected, got string" }, steep.path, "ab")
  bad({ "bad argument #1 to 'path'", "a point at infinity is allowed only at an end" },
    steep.path, { 0, inf(1), 2 })
  bad({ "bad argument #1 to 'path'", "point or steep.inf expected, got boolean" },
    steep.path, { 0, true })
  bad({ "bad argument #2 to 'circle'", "positive radius expected, got -1" }, steep.circle, 0, -1)
  bad({ "bad argument #2 to 'circle'", "positive radius expected, got 0" }, steep.circle, 0, 0)
  bad({ "bad argument #2 to 'circle'", "got inf" }, steep.circle, 0, math.huge)
  bad({ "bad argument #1 to 'circle'", "allowed only at an end" }, steep.circle, inf(0), 1)
  bad({ "bad argument #1 to 'inf'", "finite angle in radians expected", "nan" }, steep.inf, 0 / 0)
  bad({ "bad argument #1 to 'inf'", "got inf" }, steep.inf, math.huge)
  bad({ "bad argument #1 to 'inf'", "got up" }, steep.inf, "up")
  -- concatenation: the ends must meet, at a finite point, and neither may be closed
  bad({ "cannot concatenate contours", "the first ends at 1", "the second starts at 2" },
    function() return steep.line(0, 1) .. steep.line(2, 3) end)
  bad({ "cannot concatenate contours that meet at infinity" },
    function() return steep.line(0, inf(0)) .. steep.line(inf(0), 1) end)
  bad({ "cannot concatenate a closed contour" },
    function() return steep.circle(0, 1) .. steep.line(1, 2) end)
  bad({ "attempt to concatenate a contour with a number" },
    function() return steep.line(0, 1) .. 3 end)
  -- sampling options
  local c = steep.line(0, 1)
  bad({ "sample: option 'n' must be a whole number from 1 to 10^6, got a" },
    function() return c:sample { n = "a" } end)
  bad({ "sample: option 'n'", "got 0" }, function() return c:sample { n = 0 } end)
  bad({ "sample: option 'n'", "got 2.5" }, function() return c:sample { n = 2.5 } end)
  bad({ "sample: option 'radius' must be a positive finite number, got -1" },
    function() return c:sample { radius = -1 } end)
  bad({ "bad argument #1 to 'sample'", "options table expected, got number" },
    function() return c:sample(3) end)
  lu.assertEquals(#c:sample { n = 4 }, 5, "a good sample still works")
  still_usable("contours")
end

function TestBadInput:test_series()
  local S = steep.series
  bad({ "bad argument #1 to 'series'", "coefficient 1 is a string", "number or complex expected" },
    S, { "x" })
  bad({ "coefficient 2 is a table" }, S, { 1, {} })
  bad({ "expected 1 to 257 coefficients, got 0" }, S, {})
  local many = {}
  for k = 1, 258 do many[k] = 1 end
  bad({ "expected 1 to 257 coefficients, got 258" }, S, many)
  bad({ "table expected, got number" }, S, 5)
  bad({ "series revert: the constant term must be zero" }, function() return S { 1, 1, 0 }:revert() end)
  bad({ "series revert: the linear coefficient is zero (not invertible)" },
    function() return S { 0, 0, 1 }:revert() end)
  bad({ "series revert: needs order >= 1" }, function() return S { 0 }:revert() end)
  bad({ "series division: the divisor's constant term is zero" },
    function() return S { 1, 1 } / S { 0, 1 } end)
  bad({ "series division: the divisor's constant term is zero" }, function() return S { 1, 1 } / 0 end)
  bad({ "bad argument #1 to 'compose'", "inner series must have a zero constant term" },
    function() return S { 1, 1 }:compose(S { 1, 1 }) end)
  bad({ "bad argument #1 to 'compose'", "steep.series expected, got number" },
    function() return S { 1, 1 }:compose(3) end)
  bad({ "series log: singular at the constant term 0+0i" }, function() return S { 0, 1 }:log() end)
  bad({ "series power: the constant term is zero", "a negative power has no power series" },
    function() return S { 0, 1 } ^ -1 end)
  bad({ "series power: the constant term is zero", "a non-integer power has a branch point" },
    function() return S { 0, 1 } ^ 0.5 end)
  bad({ "bad argument #1 to 'coef'", "coefficient 5 outside 0..1" },
    function() return S { 0, 1 }:coef(5) end)
  bad({ "series arithmetic with a string", "number, complex or series expected" },
    function() return S { 0, 1 } + "a" end)
  bad({ "series integ: the order would exceed 256" },
    function() local c = {} for k = 1, 257 do c[k] = 1 end return S(c):integ() end)
  -- NaN and infinities are refused where they enter (they gave NaN coefficients silently)
  bad({ "bad argument #1 to 'series'", "coefficient 1 is not finite: a NaN or an infinity" },
    S, { 0 / 0, 1 })
  bad({ "coefficient 2 is not finite" }, S, { 1, C(0, math.huge) })
  bad({ "series power: the exponent is not finite" }, function() return S { 1, 1 } ^ (0 / 0) end)
  bad({ "series power: the exponent is not finite" }, function() return S { 1, 1 } ^ C(1, 0 / 0) end)
  bad({ "series arithmetic with a value that is not finite" }, function() return S { 1, 1 } + 0 / 0 end)
  bad({ "series arithmetic with a value that is not finite" },
    function() return math.huge * S { 1, 1 } end)
  -- a good series operation afterwards
  local r = S { 0, 1, 1 }:revert()
  H.close(r:coef(2), -1, 1e-15, "revert of z + z^2: coefficient of z^2 is -1 (exact)")
  still_usable("series")
end

function TestBadInput:test_taylor_and_tapes()
  local e = steep.exp(t) * x
  bad({ "bad argument #4 to 'taylor'", "order in 0..256 expected, got 257" },
    steep.taylor, e, t, 0, 257, { x = 1 })
  bad({ "bad argument #4 to 'taylor'", "got -1" }, steep.taylor, e, t, 0, -1, { x = 1 })
  bad({ "bad argument #4 to 'taylor'", "got 1.5" }, steep.taylor, e, t, 0, 1.5, { x = 1 })
  bad({ "bad argument #2 to 'taylor'", "symbol expected, got number" }, steep.taylor, e, 3, 0, 2)
  local msg = bad({ "bad argument #3 to 'taylor'", "finite number or complex point expected",
    "got string" }, function() return steep.taylor(e, t, "a", 2, { x = 1 }) end)
  no_library_location(msg)
  bad({ "bad argument #3 to 'taylor'", "nan" }, steep.taylor, e, t, 0 / 0, 2, { x = 1 })
  bad({ "bad argument #5 to 'taylor'", "table of parameter values expected, got number" },
    steep.taylor, e, t, 0, 2, 7)
  msg = bad({ "test_bad_input.lua:", "taylor: unbound parameter 'x'" },
    function() local r = steep.taylor(e, t, 0, 2); return r end)
  no_library_location(msg)
  msg = bad({ "taylor: parameter 'x' is not finite" },
    function() return steep.taylor(e, t, 0, 2, { x = 0 / 0 }) end)
  no_library_location(msg)

  local tape = steep.compile(t * x, t)
  bad({ "unbound parameter 'x'", "no table of parameter values given" },
    function() return tape:eval(1) end)
  bad({ "unbound parameter 'x'" }, function() return tape:eval(1, {}) end)
  bad({ "parameter 'x' is not finite" }, function() return tape:eval(1, { x = 0 / 0 }) end)
  bad({ "parameter 'x' is not finite" }, function() return tape:eval(1, { x = -math.huge }) end)
  bad({ "parameter 'x' is not finite" }, function() return tape:eval(1, { x = C(1, math.huge) }) end)
  bad({ "parameter 'x' must be a number or complex value, got string" },
    function() return tape:eval(1, { x = "2" }) end)
  bad({ "table of parameter values expected, got number" }, function() return tape:eval(1, 5) end)
  bad({ "bad argument #1 to 'eval'", "number or complex expected, got string" },
    function() return tape:eval("a", { x = 1 }) end)
  bad({ "bad argument #2 to 'jet'", "order 300 outside 0..256" },
    function() return tape:jet(0, 300, { x = 1 }) end)
  bad({ "bad argument #2 to 'jet'", "integer order expected" },
    function() return tape:jet(0, 1.5, { x = 1 }) end)
  bad({ "parameter 'x' is not finite" }, function() return tape:jet(0, 2, { x = 0 / 0 }) end)
  bad({ "bad argument #1 to 'eval_many'", "point 2 is a string" },
    function() return tape:eval_many({ 1, "a" }, { x = 1 }) end)
  bad({ "jet at 0+0i: div (instruction 3) is singular there" },
    function() return steep.compile(1 / t, t):jet(0, 3) end)

  bad({ "bad argument #1 to 'compile'", "got nil" }, steep.compile, nil)
  bad({ "bad argument #1 to 'compile'", "the list of expressions is empty" }, steep.compile, {})
  bad({ "bad argument #1 to 'compile'", "element 2", "attempt to use a string value" },
    steep.compile, { t, "x" }, t)
  bad({ "bad argument #2 to 'compile'", "symbol expected" }, steep.compile, t, 3)
  msg = bad({ "compile: a constant is not finite (inf)" }, steep.compile, t * math.huge, t)
  no_library_location(msg)
  bad({ "compile: a constant is not finite (", "nan)" }, steep.compile, t + 0 / 0, t)
  bad({ "compile: 'y' is used both as a variable and as a parameter" },
    steep.compile, steep.var("y") + steep.param("y"), t)
  -- a good tape afterwards
  H.close(tape:eval(3, { x = 2 }), 6, 0, "t*x at t = 3, x = 2")
  still_usable("tapes")
end

function TestBadInput:test_integral_construction()
  local line = steep.line(inf(pi), inf(0))
  bad({ "bad argument #1 to 'integral'", "table expected, got nil" }, steep.integral)
  bad({ "bad argument #1 to 'integral'", "field 'var' must be a variable made by steep.var",
    "got nil" }, steep.integral, {})
  bad({ "unknown field 'foo'", "fields: var, exponent, amplitude, contour, large" },
    steep.integral, { var = t, exponent = -t ^ 2, contour = line, foo = 1 })
  bad({ "field 'exponent' must be an expression in t, got number" },
    steep.integral, { var = t, exponent = 3, contour = line })
  bad({ "field 'exponent' must be an expression in t, got a complex value" },
    steep.integral, { var = t, exponent = C(1, 2), contour = line })
  bad({ "the exponent x^2 does not depend on t" },
    steep.integral, { var = t, exponent = x ^ 2, contour = line })
  bad({ "field 'var' must be a variable made by steep.var, got param" },
    steep.integral, { var = x, exponent = -x ^ 2, contour = line })
  bad({ "field 'contour' must be a contour", "steep.line", "got nil" },
    steep.integral, { var = t, exponent = -t ^ 2 })
  bad({ "field 'contour' must be a contour", "got table" },
    steep.integral, { var = t, exponent = -t ^ 2, contour = { 0, 1 } })
  bad({ "field 'amplitude' must be an expression, number or complex value, got string" },
    steep.integral, { var = t, exponent = -t ^ 2, contour = line, amplitude = "a" })
  bad({ "field 'large' must be a parameter made by steep.param" },
    steep.integral, { var = t, exponent = -t ^ 2, contour = line, large = t })
  local msg = bad({ "test_bad_input.lua:", "compile: a constant is not finite (inf)" },
    function()
      local J = steep.integral { var = t, exponent = -t ^ 2 * math.huge, contour = line }
      return J
    end)
  no_library_location(msg)
  still_usable("construction")
end

function TestBadInput:test_options_and_parameters()
  local J = gauss()
  bad({ "quad: unknown option 'tol'", "parameters: x", "options: along, region" },
    function() return J:quad { x = 2, tol = 1e-3 } end)
  bad({ "expand: unknown option 'orders'", "parameters: x", "order" },
    function() return J:expand { x = 2, orders = 3 } end)
  bad({ "landscape: unknown option 'radius'", "options: paths, region" },
    function() return J:landscape { x = 2, radius = 3 } end)
  bad({ "series: unknown option 'orders'" }, function() return J:series { orders = 3 } end)
  bad({ "quad: unbound parameter 'x'", "give x = <value>" }, function() return J:quad {} end)
  bad({ "quad: unbound parameter 'x'" }, function() return J:quad() end)
  bad({ "expand: unbound parameter 'x'" }, function() return J:expand { order = 2 } end)
  bad({ "landscape: unbound parameter 'x'" }, function() return J:landscape {} end)
  bad({ "quad: parameter 'x' is not finite", "nan" }, function() return J:quad { x = 0 / 0 } end)
  bad({ "expand: parameter 'x' is not finite", "inf" }, function() return J:expand { x = math.huge } end)
  bad({ "quad: parameter 'x' is not finite" }, function() return J:quad { x = C(2, -math.huge) } end)
  bad({ "quad: parameter 'x' must be a number or complex value, got string" },
    function() return J:quad { x = "2" } end)
  bad({ "bad argument #1 to 'quad'", "options table expected, got number" },
    function() return J:quad(5) end)
  bad({ "quad: option 'along' must be \"deformed\" or \"given\", got straight" },
    function() return J:quad { x = 2, along = "straight" } end)
  -- orders out of range
  for _, o in ipairs({ 0, 1.5, 201, "many", -3 }) do
    bad({ "expand: option 'order' must be a whole number of terms from 1 to 200 or \"optimal\"",
      "got " .. tostring(o) }, function() return J:expand { x = 2, order = o } end)
  end
  bad({ "check: option 'order'", "got 0" }, function() return J:check { x = { 4 }, order = 0 } end)
  still_usable("options")
end

function TestBadInput:test_regions()
  local J = gauss()
  bad({ "expand: region radius must be a positive finite number, got 0" },
    function() return J:expand { x = 2, region = { radius = 0 } } end)
  bad({ "quad: region radius must be a positive finite number, got -1" },
    function() return J:quad { x = 2, region = { radius = -1 } } end)
  bad({ "landscape: region radius must be a positive finite number, got nil" },
    function() return J:landscape { x = 2, region = { center = 0 } } end)
  bad({ "expand: region center must be a finite number or complex value" },
    function() return J:expand { x = 2, region = { center = math.huge, radius = 1 } } end)
  bad({ "expand: option 'region' must be a table" },
    function() return J:expand { x = 2, region = 5 } end)
  -- absurdly large: the points of the problem cannot be resolved (it used to give a
  -- wrong "diverges" message, and quadrature returned exactly 0 with status "ok")
  for _, fn in ipairs({ "quad", "expand", "landscape" }) do
    bad({ fn .. ": region radius 1e+300 is too large for this problem", "scale 1" },
      function() return J[fn](J, { x = 2, region = { radius = 1e300 } }) end)
  end
  bad({ "quad: region radius 1e+150 is too large" },
    function() return J:quad { x = 2, region = { radius = 1e150 } } end)
  -- far from everything: the valleys seen from there say nothing about the contour's ends
  bad({ "expand: the region (center 1000000, radius 1) is too far from the contour",
    "direction 3.14159", "leaves from 0" },
    function() return J:expand { x = 2, region = { center = 1e6, radius = 1 } } end)
  bad({ "quad: the region (center 1000000, radius 1) is too far from the contour" },
    function() return J:quad { x = 2, region = { center = 1e6, radius = 1 } } end)
  bad({ "check: the region", "too far from the contour" },
    function() return J:check { x = { 4 }, region = { center = C(0, 500), radius = 2 } } end)
  -- ... but J:landscape may look there, and finds nothing
  local L = J:landscape { x = 2, region = { center = 1e6, radius = 1 } }
  lu.assertEquals(#L.saddles, 0, "no saddle near 10^6")
  lu.assertEquals(#L.singularities, 0, "no singularity near 10^6")
  -- a sensible region still works
  local r = J:expand { x = 2, region = { center = 0, radius = 3 } }
  H.close(r.value, math.sqrt(pi / 2), 1e-12, "expansion with an explicit region")
  still_usable("regions")
end

function TestBadInput:test_optimal_truncation_with_few_terms()
  -- "optimal" on expansions whose series stop: the result is exact, not an error
  local E = steep.integral { var = t, exponent = -x * t, contour = steep.line(0, inf(0)), large = x }
  local r = E:expand { x = 3, order = "optimal" }
  H.close(r.value, 1 / 3, 1e-13, "integral of e^{-3t} over (0, inf) is 1/3 (exact)")
  local E2 = steep.integral { var = t, exponent = -x * t, amplitude = 1 + t,
    contour = steep.line(0, inf(0)), large = x }
  r = E2:expand { x = 3, order = "optimal" }
  H.close(r.value, 1 / 3 + 1 / 9, 1e-13, "integral of (1+t) e^{-3t} is 1/3 + 1/9 (exact)")
  lu.assertTrue(r.contributions[1].used <= 3, "two terms carry it all")
  r = gauss():expand { x = 3, order = "optimal" }
  H.close(r.value, math.sqrt(pi / 3), 1e-13, "Gaussian: sqrt(pi/3) (exact)")
  still_usable("optimal")
end

function TestBadInput:test_contours_the_analysis_refuses()
  -- an end at infinity outside every valley: named with its direction and the valleys
  local Jd = steep.integral { var = t, exponent = -x * t ^ 2, contour = steep.path { 0, inf(pi / 2) },
    large = x }
  local frags = { "finishing end at infinity (the ray from 0 in direction 1.5708)", "outside every valley",
    "diverges", "(-0.7854, 0.7854) (polynomial)", "(2.356, 3.927) (polynomial)" }
  bad(frags, function() return Jd:quad { x = 2 } end)
  bad(frags, function() return Jd:expand { x = 2 } end)
  -- along the given contour too (it used to integrate the divergent ray to NaN)
  bad(frags, function() return Jd:quad { x = 2, along = "given" } end)
  local Js = steep.integral { var = t, exponent = -x * t ^ 2,
    contour = steep.path { inf(-pi / 2), 0, inf(0) }, large = x }
  bad({ "starting end at infinity (the ray from 0 in direction -1.5708)", "outside every valley" },
    function() return Js:quad { x = 2, along = "given" } end)
  -- a pole on the contour, by location and source
  local Jp = steep.integral { var = t, exponent = -x * t ^ 2, amplitude = 1 / (t - 0.5),
    contour = steep.line(inf(pi), inf(0)), large = x }
  for _, along in ipairs({ "deformed", "given" }) do
    bad({ "a pole of the integrand lies on the contour at 0.5", "t - 0.5", "amplitude" },
      function() return Jp:quad { x = 2, along = along } end)
  end
  bad({ "a pole of the integrand lies on the contour at 0.5" },
    function() return Jp:expand { x = 2 } end)
  -- a saddle of order 10 (exponent t^10 on the real line): beyond the supported 8
  local J10 = steep.integral { var = t, exponent = -x * t ^ 10, contour = steep.line(inf(pi), inf(0)),
    large = x }
  bad({ "saddle of order 10", "orders above 8 are not supported" },
    function() return J10:expand { x = 2 } end)
  bad({ "saddle of order 10", "orders above 8 are not supported" },
    function() return J10:series { order = 3 } end)
  -- quadrature of it still works: integral of exp(-2 t^10) = 2^(-1/10) Gamma(1/10)/5 (exact)
  local q = J10:quad { x = 2 }
  H.close(q, 2 ^ (-0.1) * 9.5135076986687318 / 5, 1e-10, "Gamma(1/10) = 9.51350769866873 (DLMF 5.4)")
  still_usable("refused contours")
end

function TestBadInput:test_series_and_rescaling()
  -- the standard form needs exponent = x * phi(t)
  local Jn = steep.integral { var = t, exponent = x * (t - t ^ 3 / 3) + t,
    contour = steep.line(inf(pi), inf(0)), large = x }
  bad({ "series: the standard form does not apply", "the exponent is not x times a function of t" },
    function() return Jn:series { order = 3 } end)
  local J = steep.integral { var = t, exponent = x * steep.I * (t ^ 3 / 3 - t),
    contour = steep.line(inf(pi), inf(0)), large = x }
  -- t = 0*s + 1: the 0*s folds away, so t does not depend on s at all
  bad({ "test_bad_input.lua:", "rescale: option 't' must be an expression in s" },
    function() local K = J:rescale { var = s, t = 0 * s + 1 }; return K end)
  bad({ "test_bad_input.lua:", "rescale: the substitution t = x*s is not invertible at x = 0",
    "dt/ds = 0" }, function() local K = J:rescale { var = s, t = x * s, at = { x = 0 } }; return K end)
  bad({ "rescale: the substitution names the variable 'u'", "neither the new variable s nor a parameter" },
    function() local K = J:rescale { var = s, t = steep.var("u") * s }; return K end)
  bad({ "rescale: the substitution is not affine in s", "t = c*s + d" },
    function() local K = J:rescale { var = s, t = s ^ 2, at = { x = 1 } }; return K end)
  bad({ "rescale: the new variable must differ from t" },
    function() local K = J:rescale { var = t, t = 2 * t }; return K end)
  bad({ "rescale: option 'var' must be a new variable made by steep.var" },
    function() local K = J:rescale { var = x, t = 2 * s }; return K end)
  local msg = bad({ "rescale: cannot evaluate the substitution at the holding values",
    "unbound parameter 'x'", "at = {...}" },
    function() local K = J:rescale { var = s, t = x * s, at = {} }; return K end)
  no_library_location(msg)
  -- without `at`, only a contour the map leaves unchanged is held by default
  local Jseg = steep.integral { var = t, exponent = -x * t ^ 2, contour = steep.line(-1, 1), large = x }
  msg = bad({ "test_bad_input.lua:", "rescale: give the parameter values at which to hold the contour, at = {...}",
    "the contour is not made of rays from the origin" },
    function() local K = Jseg:rescale { var = s, t = x * s }; return K end)
  no_library_location(msg)
  bad({ "rescale: give the parameter values", "the map moves the origin (s = 0 is t = 1)" },
    function() local K = J:rescale { var = s, t = x * s + 1 }; return K end)
  bad({ "rescale: give the parameter values", "dt/ds = i*x is not real and positive" },
    function() local K = J:rescale { var = s, t = steep.I * x * s }; return K end)
  bad({ "rescale: option 'at' must be a table of parameter values, got number" },
    function() local K = J:rescale { var = s, t = x * s, at = 3 }; return K end)
  bad({ "rescale: unknown option 'foo'", "options: var, t, at" },
    function() local K = J:rescale { var = s, t = 2 * s, foo = 1 }; return K end)
  bad({ "bad argument #1 to 'rescale'", "options table expected" },
    function() local K = J:rescale(); return K end)
  -- a good rescaling afterwards
  local K = J:rescale { var = s, t = 2 * s, at = { x = 4 } }
  lu.assertTrue(K.homogeneity.ok, "t = 2 s keeps i x (t^3/3 - t) homogeneous in x")
  still_usable("rescaling")
end

function TestBadInput:test_routes()
  local J = gauss()
  for _, fn in ipairs({ "crossings", "sweep" }) do
    bad({ fn .. ": the list of parameter values is empty" },
      function() local r = J[fn](J, { x = {} }); return r end)
    bad({ fn .. ": 'steps' must be a whole number from 1 to 10^6" },
      function() local r = J[fn](J, { x = { from = 1, to = 2, steps = 0 } }); return r end)
    bad({ fn .. ": parameter value 2 is not a finite number" },
      function() local r = J[fn](J, { x = { 1, 0 / 0 } }); return r end)
    bad({ fn .. ": parameter value 3 is not a finite number" },
      function() local r = J[fn](J, { x = { 1, 2, -math.huge } }); return r end)
    bad({ fn .. ": 'from' and 'to' must be numbers" },
      function() local r = J[fn](J, { x = { from = "a", to = 2 } }); return r end)
    bad({ fn .. ": give the large parameter as {from =, to =, steps =}, a list, or a steep.path" },
      function() local r = J[fn](J, {}); return r end)
    bad({ "test_bad_input.lua:", "bad argument #1 to '" .. fn .. "'", "options table expected, got nil" },
      function() local r = J[fn](J); return r end)
    bad({ fn .. ": unknown option 'foo'", "parameters: x" },
      function() local r = J[fn](J, { x = { 2, 3 }, foo = 1 }); return r end)
    bad({ fn .. ": region radius must be a positive finite number, got -1" },
      function() local r = J[fn](J, { x = { 2, 3 }, region = { radius = -1 } }); return r end)
  end
  bad({ "sweep: option 'shard' must be {k, n} with whole numbers 1 <= k <= n" },
    function() local r = J:sweep { x = { 1, 2 }, shard = { 3, 2 } }; return r end)
  bad({ "sweep: option 'shard'" },
    function() local r = J:sweep { x = { 1, 2 }, shard = { 1.5, 2 } }; return r end)
  bad({ "sweep: option 'order'", "got 0" },
    function() local r = J:sweep { x = { 1, 2 }, order = 0 }; return r end)
  bad({ "compare: option 'rescale' = {var =, t =} is required" },
    function() local r = J:compare { x = { 1, 2 } }; return r end)
  bad({ "suggest_rescaling: from and to must be distinct numbers of the same sign" },
    function() local r = J:suggest_rescaling { x = { from = -1, to = 2 } }; return r end)
  -- the check needs the large parameter as a list
  bad({ "check: give the values of the large parameter as a list, x = {...}" },
    function() return J:check { x = 4 } end)
  bad({ "check: give the values of the large parameter as a list, x = {...}" },
    function() return J:check { x = {} } end)
  bad({ "check: give the values of the large parameter as a list, x = {...}" },
    function() return J:check { order = 2 } end)
  bad({ "bad argument #1 to 'check'", "options table expected" }, function() return J:check() end)
  local K = steep.integral { var = t, exponent = -t ^ 2, contour = steep.line(inf(pi), inf(0)) }
  bad({ "check: the integral names no large parameter" }, function() return K:check { order = 2 } end)
  bad({ "crossings: the integral names no large parameter" },
    function() local r = K:crossings {}; return r end)
  -- a good sweep afterwards (one value)
  local sw = J:sweep { x = { 2 }, order = 2, progress = false }
  lu.assertNil(sw.rows[1].failure)
  H.close(sw.rows[1].quad, math.sqrt(pi / 2), 1e-12, "sweep row after the bad input")
  still_usable("routes")
end

function TestBadInput:test_version_and_recipes()
  bad({ "this script needs steep 9.0", "API 9.0 or a later 9.x", "the installed steep is " .. steep.version },
    steep.require_version, "9.0")
  bad({ "this script needs steep 0.99", "the installed steep is" }, steep.require_version, "0.99")
  bad({ "bad argument #1 to 'require_version'", "version string like \"0.1\" expected" },
    steep.require_version, "abc")
  bad({ "bad argument #1 to 'require_version'" }, steep.require_version, 1)
  lu.assertTrue(steep.require_version("0.1"))

  -- a recipe module that fails while loading: its error names the recipe's line
  local base = os.tmpname()
  local dir, name = base:match("^(.*)/([^/]+)$")
  local modname = name:gsub("[^%w_]", "_") .. "_recipe"
  local path = dir .. "/" .. modname .. ".lua"
  local f = assert(io.open(path, "w"))
  f:write("local steep = require 'steep'\n",
    "local t = steep.var 't'\n",
    "local J = steep.integral { var = t, exponent = -t ^ 2, contour = steep.line(-1, 1) }\n",
    "steep.require_version('7.2')\n",
    "return { J = J }\n")
  f:close()
  local saved = package.path
  package.path = dir .. "/?.lua;" .. package.path
  local ok, err = pcall(require, modname)
  package.path = saved
  package.loaded[modname] = nil
  os.remove(path)
  os.remove(base)
  lu.assertFalse(ok, "the recipe's load fails")
  err = tostring(err)
  for _, frag in ipairs({ modname .. ".lua:4:", "this script needs steep 7.2" }) do
    lu.assertNotNil(err:find(frag, 1, true), string.format("message %q lacks %q", err, frag))
  end
  cases = cases + 1

  -- a recipe's code that raises in the middle of an analysis (here: from a function the
  -- library calls, the __index of the user's parameter table)
  local hook = setmetatable({}, { __index = function(_, k) error("user lookup failed for " .. k) end })
  local tape = steep.compile(t * x, t)
  bad({ "user lookup failed for x" }, function() return tape:eval(1, hook) end)
  bad({ "user lookup failed for x" }, function() return tape:jet(1, 4, hook) end)
  bad({ "user lookup failed for x" }, function() return tape:eval_many({ 1, 2, 3 }, hook) end)
  local J = gauss()
  bad({ "user pairs failed" }, function()
    return J:quad(setmetatable({}, { __pairs = function() error("user pairs failed") end }))
  end)
  still_usable("recipes")
end

function TestBadInput:test_hostile_sizes()
  -- a sum of 10^5 distinct terms: 3*10^5 operations, over the tape's limit of 10^5
  local e = 0
  for k = 1, 100000 do e = e + k * t end
  local msg = bad({ "compile: the expression is too large for a tape", "at most 100000" },
    steep.compile, e, t)
  lu.assertNotNil(msg:find("%d%d%d%d%d%d distinct operations"), msg)
  msg = bad({ "test_bad_input.lua:", "compile: the expression is too large for a tape" },
    function() local J = steep.integral { var = t, exponent = -e, contour = steep.line(0, 1) }; return J end)
  no_library_location(msg)
  -- it prints as a summary (printing it in full is not bounded)
  local text = tostring(e)
  lu.assertStrContains(text, "too long to print")
  lu.assertTrue(#text < 200)
  e = nil
  collectgarbage("collect")

  -- a chain of exactly 10^5 instructions (t + t + ... + t): compiles and evaluates
  local chain = t
  for _ = 2, 100000 do chain = chain + t end
  local tape = steep.compile(chain, t)
  lu.assertEquals((tape:size()), 100000)
  lu.assertEquals(tape:eval(1), C(100000, 0))
  H.close(tape:jet(0.5, 2):coef(1), 100000, 0, "derivative of the 10^5-term chain")
  -- 5*10^5 deep: the walk over it is iterative; the tape is refused by size, not by a
  -- stack overflow
  for _ = 1, 400000 do chain = chain + t end
  bad({ "compile: the expression is too large for a tape (500000 distinct operations" },
    steep.compile, chain, t)
  -- derivative and substitution of an expression nested 2*10^5 deep (they recursed and
  -- overflowed Lua's stack): t + t + ... + t, 200001 terms, has derivative 200001 and
  -- value 400002 at t = 2 (exact integers; constants fold as they are built)
  local deep = t
  for _ = 1, 200000 do deep = deep + t end
  local dd = steep.diff(deep, t)
  lu.assertEquals(dd:value({}), C(200001, 0), "derivative of the 2*10^5-deep chain")
  lu.assertEquals(steep.substitute(deep, { [t] = 2 }):value({}), C(400002, 0),
    "substitution into the 2*10^5-deep chain")
  deep, dd = nil, nil
  chain, tape = nil, nil
  collectgarbage("collect")

  -- a tape of 10^5 instructions built directly, and one over the limit
  local core = require "steep.core"
  local code = { { "var" } }
  for k = 2, 100000 do code[k] = { "add", a = k - 1, b = 1 } end
  local big = core.tape { code = code, params = {}, outputs = { 100000 } }
  lu.assertEquals(big:eval(1), C(100000, 0))
  code[100001] = { "add", a = 100000, b = 1 }
  bad({ "tape: 'code' has 100001 entries (at most 100000)" },
    core.tape, { code = code, params = {}, outputs = { 100001 } })
  code, big = nil, nil
  collectgarbage("collect")

  -- exp(exp(...(t))) 200 deep: compiles; overflow is reported where it happens
  local d = t
  for _ = 1, 200 do d = steep.exp(d) end
  local dt = steep.compile(d, t)
  lu.assertEquals((dt:size()), 201)
  local v = dt:eval(-50)
  lu.assertTrue(v:re() == math.huge or v:re() ~= v:re(), "e^e^...: overflow, not a crash")
  bad({ "jet at -50+0i: exp (instruction", "gives a non-finite value there" },
    function() return dt:jet(-50, 3) end)
  lu.assertEquals((steep.compile(steep.diff(d, t), t):size()) > 0, true, "its derivative compiles")
  lu.assertStrContains(tostring(d), "exp(exp(exp(")
  -- as an exponent: quadrature says its result is not finite (status), it does not crash
  local J = steep.integral { var = t, exponent = -t ^ 2 + d, contour = steep.line(-1, 1) }
  local q, qe, info = J:quad {}
  lu.assertNotEquals(info.status, "ok", "status of a non-finite integral: " .. tostring(q))

  -- shared nodes: (t+1)^(2^25) as repeated squaring prints exponentially long in full;
  -- printing stays short and fast (it used to hang), and the report of an integral too
  local sq = t + 1
  for _ = 1, 25 do sq = sq * sq end
  local t0 = os.clock()
  local Jsq = steep.integral { var = t, exponent = -sq, contour = steep.line(-0.5, 0.5) }
  lu.assertStrContains(tostring(Jsq), "too long to print")
  lu.assertTrue(os.clock() - t0 < CASE_SECONDS, "printing a shared DAG is bounded")
  still_usable("hostile sizes")
end

-- Lists whose length lies (a __len metamethod returning 2^60, 2^63 - 1, or just past the
-- limit of 2^24 points): every binding that takes a list of points checks the count
-- before it sizes memory by it (2^60 * 16 bytes wrapped round to 0 and the points were
-- written past a 1-byte block), so each call is a clear error and the host is intact.
function TestBadInput:test_lying_list_lengths()
  local core = require "steep.core"
  local tape = steep.compile({ t ^ 2 + x, t }, t)
  local P = { x = 1 }
  local function liar(n)
    return setmetatable({ 1, C(2, 1), 3 }, { __len = function() return n end })
  end
  for _, n in ipairs({ 1 << 60, math.maxinteger, (1 << 24) + 1 }) do
    local too_long = string.format("a list of %d points is too long (at most 16777216)", n)
    local L = liar(n)
    bad({ "bad argument #1 to 'eval_many'", too_long }, function() return tape:eval_many(L, P) end)
    bad({ "bad argument #1 to 'cvec'", too_long }, function() return core.cvec(L) end)
    bad({ "bad argument #1 to 'cvec_join'", too_long }, function() return core.cvec_join(L, { 1, 2 }) end)
    bad({ "bad argument #2 to 'cvec_join'", too_long }, function() return core.cvec_join({ 1, 2 }, L) end)
    bad({ "bad argument #1 to 'turning'", too_long }, function() return core.turning(L, 0) end)
    bad({ "bad argument #2 to 'crossings'", too_long }, function() return core.crossings({ 0, 1 }, L) end)
    bad({ "bad argument #1 to 'distance'", too_long }, function() return core.distance(L, 0) end)
    bad({ "bad argument #1 to 'nearest'", too_long }, function() return core.nearest(L, 0) end)
    bad({ "bad argument #3 to 'integrand_many'", too_long }, function() return core.integrand_many(tape, P, L) end)
    bad({ "bad argument #3 to 'quad_polyline'", too_long }, function() return core.quad_polyline(tape, P, L, {}) end)
    bad({ "bad argument #4 to 'branch_jump'", too_long }, function() return core.branch_jump(tape, P, { 1, 2 }, L, 0) end)
  end
  -- a length of 2^24 exactly is allowed: the missing entries are then the error
  bad({ "point 4 is a nil (number or complex expected)" }, function() return core.turning(liar(1 << 24), 0) end)
  bad({ "bad argument #1 to 'eval_many' (point 4 is a nil)" },
    function() return tape:eval_many(liar(1 << 24), P) end)
  -- a negative length counts as an empty list
  lu.assertEquals(#core.cvec(liar(-5)), 0)
  -- series and tapes have their own (small) limits, also checked before any allocation
  bad({ "bad argument #1 to 'series'", "expected 1 to 257 coefficients" }, function()
    return steep.series(setmetatable({ 1 }, { __len = function() return 1 << 60 end }))
  end)
  bad({ "tape: 'code' has", "entries (at most 100000)" }, core.tape,
    { code = setmetatable({}, { __len = function() return 1 << 60 end }), outputs = { 1 } })
  still_usable("lying lengths")
end

-- Maps whose drawing loops could run away (a tick step the doubles cannot add to the
-- tick's value: 2 GB in 44 s once), views double precision cannot draw, and result files
-- that cannot be written: each a clear error before the work, or after it with what was
-- computed kept.
function TestBadInput:test_maps_and_files()
  local J = gauss()
  local tmpdir = os.tmpname()
  os.remove(tmpdir)
  assert(os.execute("mkdir " .. tmpdir))
  local svg = tmpdir .. "/map.svg"
  bad({ "map: the view radius 1 is too small to draw around the center 1e+17",
    "at least 1e+07" }, function() return J:map { x = 1, file = svg, view = { center = 1e17, radius = 1 } } end)
  bad({ "map: the view radius 1e-300 is too small", "never below 1e-280" },
    function() return J:map { x = 1, file = svg, view = { center = 0, radius = 1e-300 } } end)
  bad({ "map: the view (center 0, radius 1e+300) is too large to draw" },
    function() return J:map { x = 1, file = svg, view = { center = 0, radius = 1e300 } } end)
  bad({ "map: the region radius 1 is too small to draw around the center 1e+17" },
    function() return J:map { x = 1, file = svg, region = { center = 1e17, radius = 1 } } end)
  -- a saddle at 1e16 with its natural window: drawn, with ticks the doubles resolve
  -- (the tick loop used to stall or fail with "'for' step is zero")
  local c = 1e16
  local Jfar = steep.integral { var = t, exponent = -x * (t - c) ^ 2, contour = steep.line(c - 10, c + 10),
    large = x }
  local file, summary = Jfar:map { x = 1, file = svg }
  lu.assertEquals(file, svg)
  lu.assertEquals(summary.saddles, 1)
  local f = assert(io.open(svg))
  local text = f:read("a")
  f:close()
  local ticks, seen = 0, {}
  for label in text:gmatch('class="tick"[^>]*>([^<]*)<') do
    ticks = ticks + 1
    lu.assertNil(seen[label], "tick labels are distinct: " .. label)
    seen[label] = true
  end
  lu.assertTrue(ticks >= 4 and ticks <= 80, ticks .. " ticks")
  -- files: a device that cannot take the data, a name that is no string, a directory,
  -- a missing directory
  bad({ "map: cannot write /dev/full: No space left on device" },
    function() return J:map { x = 1, file = "/dev/full" } end)
  bad({ "map: option 'file' must name the SVG file" }, function() return J:map { x = 1, file = 42 } end)
  bad({ "map: cannot write " .. tmpdir .. ": it is a directory" },
    function() return J:map { x = 1, file = tmpdir } end)
  bad({ "map: cannot write " .. tmpdir .. "/none/map.svg: No such file or directory" },
    function() return J:map { x = 1, file = tmpdir .. "/none/map.svg" } end)
  -- a sweep's CSV: the name is checked and the file opened before any row is computed
  local computed = 0
  local Jc = gauss()
  local landscape_method = Jc._landscape
  Jc._landscape = function(...) computed = computed + 1; return landscape_method(...) end
  bad({ "sweep: option 'csv' must name a file (a non-empty string), got number" },
    function() return Jc:sweep { x = { 2, 3 }, csv = 42 } end)
  bad({ "sweep: option 'csv' must name a file (a non-empty string), got boolean" },
    function() return Jc:sweep { x = { 2, 3 }, csv = true } end)
  bad({ "sweep: cannot write " .. tmpdir .. "/none/rows.csv: No such file or directory" },
    function() return Jc:sweep { x = { 2, 3 }, csv = tmpdir .. "/none/rows.csv" } end)
  lu.assertEquals(computed, 0, "no row computed before the bad CSV name was refused")
  -- a write that fails after the work: the error carries the computed sweep
  local msg
  local ok, err = pcall(function() return Jc:sweep { x = { 2, 3 }, csv = "/dev/full", progress = false } end)
  lu.assertFalse(ok)
  msg = tostring(err)
  lu.assertStrContains(msg, "sweep: cannot write /dev/full: No space left on device")
  lu.assertEquals(#err.result.rows, 2, "the rows are kept in the error")
  H.close(err.result.rows[2].quad, math.sqrt(pi / 3), 1e-12, "a kept row: int exp(-3 t^2) dt = sqrt(pi/3) (exact)")
  cases = cases + 1
  -- a good CSV goes through a temporary name: only the file itself is left
  Jc:sweep { x = { 2 }, csv = tmpdir .. "/rows.csv", progress = false }
  local p = assert(io.popen("ls -A " .. tmpdir))
  local listing = p:read("a")
  p:close()
  lu.assertEquals(listing, "map.svg\nrows.csv\n", "no temporary file left behind")
  -- shards: whole numbers 1 <= k <= n only
  for _, sh in ipairs({ { math.huge, math.huge }, { 1, math.huge }, { 0 / 0, 2 }, { 1.5, 2 },
                        { 2, 1 }, { 1, 2 ^ 40 }, "1/2" }) do
    bad({ "sweep: option 'shard' must be {k, n} with whole numbers 1 <= k <= n" },
      function() return J:sweep { x = { 2, 3 }, shard = sh } end)
  end
  -- crossings: a time budget, checked like sweep's
  bad({ "crossings: option 'budget' must be a positive number of seconds, got -1" },
    function() return J:crossings { x = { 1, 2 }, budget = -1 } end)
  local cr = J:crossings { x = { from = 1, to = 2, steps = 1000000 }, budget = 1e-3 }
  lu.assertStrContains(cr.status, "incomplete: the time budget of 0.001 s was used up after")
  lu.assertTrue(cr.followed < 1000001)
  lu.assertStrContains(cr:report(), "status: incomplete")
  os.execute("rm -rf " .. tmpdir)
  still_usable("maps and files")
end

function TestBadInput:test_errors_leave_no_garbage()
  -- errors raised inside the C core after scratch memory was allocated: repeated, the
  -- Lua heap stays flat (scratch lives in collectable userdata)
  local tape = steep.compile(steep.log(t) * x + steep.sqrt(t), t)
  local S = steep.series
  local function round()
    pcall(tape.eval, tape, 1, {})
    pcall(tape.eval, tape, 1, { x = 0 / 0 })
    pcall(tape.jet, tape, 0, 40, { x = 1 })           -- log(0): singular
    pcall(tape.eval_many, tape, { 1, 2, "a" }, { x = 1 })
    pcall(function() return S { 0, 1, 2 } / S { 0, 1, 2 } end)
    pcall(function() return S { 1, 1, 2 }:revert() end)
    pcall(function() return S { 0, 1 } ^ 0.5 end)
    pcall(steep.compile, { t, "x" }, t)
  end
  for _ = 1, 50 do round() end
  collectgarbage("collect")
  collectgarbage("collect")
  local before = collectgarbage("count")
  for _ = 1, 2000 do round() end
  collectgarbage("collect")
  collectgarbage("collect")
  local after = collectgarbage("count")
  lu.assertTrue(after - before < 256, string.format("heap grew by %.0f KB over 2000 rounds of "
    .. "failing calls", after - before))
  still_usable("no garbage")
end

function TestBadInput:test_zz_catalogue_size()
  -- (runs last by name) the whole catalogue, when it all ran (not under a -p filter),
  -- holds at least 45 cases; and the library still works
  if groups >= 15 then lu.assertTrue(cases >= 45, "bad-input cases run: " .. cases) end
  still_usable("end")
end
