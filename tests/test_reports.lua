-- Tests of what the reports show: JSON that reads back the same numbers (decoded by
-- lua-cjson, an independent parser), in a stable order, with empty lists as []; numbers
-- printed without rounding noise; the variable's own name; J:compare's estimates and flags;
-- the common report interface of J:series and J:suggest_rescaling; tables aligned and
-- every line within 100 columns.
local lu = require "luaunit"
local H = require "helpers"
local steep = H.steep
local cjson = require "cjson"
local report = require "steep.report"

local C, I = steep.complex, steep.I
local pi = math.pi
local t, x, s = steep.var "t", steep.param "x", steep.var "s"
local REAL_LINE = steep.line(steep.inf(pi), steep.inf(0))

-- Every line of a text report within 100 columns (UTF-8 characters).
local function within_width(text, what)
  for line in (text .. "\n"):gmatch("([^\n]*)\n") do
    local n = utf8.len(line) or #line
    if n > 100 then lu.fail(string.format("%s: a line of %d columns:\n%s", what, n, line)) end
  end
end

-- The Airy integral with a pole near the saddles (used for long complex numbers, and for
-- x = 0.5 where the expansions fail).
local function airy_pole()
  return steep.integral { var = t, exponent = I * (t ^ 3 / 3 + x * t),
    amplitude = 1 / (t - C(0.5, 0.3)), contour = REAL_LINE, large = x }
end

TestReports = {}

-- Parts below a value's rounding print as 0, never as -0 (the full values stay in the
-- tables). Expected texts written out by hand from the rule in report.num.
function TestReports:test_noise()
  local num = report.num
  lu.assertEquals(num(C(1.232595164e-32, 2.828427125)), "2.828427125i")
  lu.assertEquals(num(C(-0.0, -5)), "-5i")
  lu.assertEquals(num(-0.0), "0")
  lu.assertEquals(num(C(-1e-300, 0)), "-1e-300", "a value's only part is its size")
  lu.assertEquals(num(C(1, 1e-18)), "1", "a real result with an imaginary part of 1e-18")
  lu.assertEquals(num(C(1.25, -3e-33), 1e-14), "1.25")
  lu.assertEquals(num(C(1, 1e-5), 0.01), "1", "a part below a hundredth of the error")
  lu.assertEquals(num(C(1, 0.3), 0.5), "1+0.3i", "a part the error does not swamp stays")
  lu.assertEquals(num(C(-2, -3)), "-2-3i")
  lu.assertEquals(num(C(0 / 0, 1)), "nan+1i")
  lu.assertEquals(steep.show(C(3e-17, 1)), "1i")
  H.raises({ "bad argument #1 to 'show'" }, steep.show, "a")
  -- in a landscape report (Airy's saddles at +-i sqrt(x) and F = -+(2/3) x^(3/2) i... real
  -- there: F(i sqrt x) = -(2/3) x^(3/2), exact)
  local J = steep.integral { var = t, exponent = I * (t ^ 3 / 3 + x * t), contour = REAL_LINE, large = x }
  local text = J:landscape { x = 8 }:report()
  lu.assertStrContains(text, "t = 2.828427125i, order 2, F = -15.08494467")
  lu.assertNil(text:find("e%-3%d"), "no noise of size 1e-30 in:\n" .. text)
  lu.assertNil(text:find("-0[-+]", 1, true), "no -0 in:\n" .. text)
end

-- The landscape report names the integration variable as the user did.
function TestReports:test_variable_name()
  local z = steep.var "z"
  local J = steep.integral { var = z, exponent = -x * (z - I) ^ 2, amplitude = 1 / (z - I / 2),
    contour = REAL_LINE, large = x }
  local text = J:landscape { x = 1 }:report()
  lu.assertStrContains(text, "1. z = 1i, order 2")
  lu.assertStrContains(text, "pole at z = 0.5i")
  lu.assertNil(text:find("t = ", 1, true), text)
  lu.assertStrContains(J:expand { x = 1, order = 2 }:report(), "saddle 1 at z = 1i")
end

-- JSON: the numbers read back bit for bit (17 digits where 15 or 16 do not), two runs
-- give the same text (keys sorted), empty lists are [] and empty parameter tables {}.
function TestReports:test_json()
  local J = airy_pole()
  local r = J:expand { x = 4, order = 4 }
  local text = r:report { format = "json" }
  local back = cjson.decode(text)
  lu.assertEquals(back.value.re, r.value:re(), "the value's real part reads back the same")
  lu.assertEquals(back.value.im, r.value:im())
  lu.assertEquals(back.error, r.error)
  for i, c in ipairs(r.contributions) do
    lu.assertEquals(back.contributions[i].value.re, c.value:re(), "contribution " .. i)
    lu.assertEquals(back.contributions[i].value.im, c.value:im(), "contribution " .. i)
  end
  -- a second run of the same analysis prints the same JSON
  local J2 = airy_pole()
  lu.assertEquals(J2:expand { x = 4, order = 4 }:report { format = "json" }, text)
  -- keys in order, empty lists and objects
  lu.assertEquals(report.json({ b = 1, a = { c = 0.1, notes = {} }, params = {} }),
    '{"a":{"c":0.1,"notes":[]},"b":1,"params":{}}')
  lu.assertEquals(report.json({ 1 / 3 }), "[0.3333333333333333]")
  lu.assertEquals(report.json({ x = 0.1 + 0.2 }), '{"x":0.30000000000000004}')
  lu.assertEquals(report.json({ s = 'a"b\n' }), '{"s":"a\\"b\\n"}')
  -- lua-cjson reads the strings back too
  lu.assertEquals(cjson.decode(report.json({ s = 'a"b\n\1' })).s, 'a"b\n\1')
  -- the sweep's JSON: failed rows and all
  local G = steep.integral { var = t, exponent = -x * t ^ 2, contour = REAL_LINE, large = x }
  local sw = G:sweep { x = { 2, 0 }, order = 1, progress = false }
  local sb = cjson.decode(sw:report { format = "json" })
  lu.assertEquals(#sb.rows, 2)
  lu.assertEquals(sb.rows[1].quad.re, sw.rows[1].quad:re())
  lu.assertStrContains(sb.rows[2].failure, "outside every valley")
end

-- J:compare shows every route's value and estimate, the uncorrected formula too, and
-- flags every disagreement beyond the estimates and every estimate as large as its value.
-- At x = 0.5 every route of the Airy integral with a pole gives about -283+194i against
-- quadrature's -1.79+3.64i (observed): all wrong together, with estimates of about 5e3.
function TestReports:test_compare_flags()
  local J = airy_pole()
  local cmp = J:compare { x = { 4, 0.5 }, order = 4, rescale = { var = s, t = steep.sqrt(x) * s } }
  local good, bad = cmp.rows[1], cmp.rows[2]
  lu.assertFalse(good.all_routes_fail)
  lu.assertTrue(good.unrescaled_accurate and good.formula_accurate)
  lu.assertTrue(bad.all_routes_fail)
  lu.assertTrue(steep.is_complex(bad.unrescaled) and (bad.unrescaled - bad.quad):abs() > 50 * bad.quad:abs(),
    "the miss is large (the case the report must flag)")
  for _, k in ipairs({ "unrescaled", "rescaled", "formula", "corrected" }) do
    lu.assertFalse(bad[k .. "_accurate"], k .. ": an estimate as large as the value")
  end
  local text = cmp:report()
  within_width(text, "compare")
  lu.assertStrContains(text, "formula from x = 4")
  lu.assertStrContains(text, "formula + crossing terms")
  lu.assertStrContains(text, "estimate")
  for _, flag in ipairs({ "U?", "H?", "f?", "R?" }) do lu.assertStrContains(text, flag) end
  lu.assertStrContains(text, "no route is accurate here")
  -- the uncorrected formula's value and estimate are in the table (and in the CSV)
  lu.assertStrContains(text, report.num(bad.formula, bad.formula_error))
  lu.assertStrContains(cmp:report { format = "csv" }, "formula_error")
end

-- J:series and J:suggest_rescaling have the common result interface: text, JSON, CSV.
function TestReports:test_series_and_suggestion_reports()
  -- int_0^inf exp(x (t - t^2/2)) / (3 + t^2) dt: a saddle at t = 1 and the endpoint 0
  local J = steep.integral { var = t, exponent = x * (t - t ^ 2 / 2), amplitude = 1 / (3 + t ^ 2),
    contour = steep.line(0, steep.inf(0)), large = x }
  local sr = J:series { order = 4 }
  lu.assertEquals(#sr, 2, "a list of contributions, as before")
  -- Watson's lemma at the endpoint: the first coefficient is -g(0) = -1/3 (exact; the
  -- exponent decreases away from 0 in the other direction: the endpoint's sign)
  local text = sr:report()
  within_width(text, "series")
  lu.assertStrContains(text, "saddle at 1, phi = 0.5")
  lu.assertStrContains(text, "p_k")
  local back = cjson.decode(sr:report { format = "json" })
  lu.assertEquals(#back.contributions, 2)
  lu.assertEquals(back.contributions[1].coefficients[1].re, sr[1].coefficients[1]:re())
  local csv = sr:report { format = "csv" }
  lu.assertStrContains(csv, "contribution,kind,at_re,at_im,phi_re,phi_im,k,power,coefficient_re")
  local nlines = select(2, csv:gsub("\n", ""))
  lu.assertEquals(nlines, 1 + 8, "a header and one line per coefficient (2 contributions x 4)")
  -- the suggestion: Airy's saddles move like x^(1/2)
  local A = steep.integral { var = t, exponent = I * (t ^ 3 / 3 + x * t), contour = REAL_LINE, large = x }
  local sg = A:suggest_rescaling { x = { from = 1, to = 16 } }
  lu.assertEquals(sg.exponent, 0.5)
  local st = sg:report()
  within_width(st, "suggestion")
  lu.assertStrContains(st, "try t = x^0.5*s")
  lu.assertEquals(cjson.decode(sg:report { format = "json" }).fraction, "1/2")
  lu.assertStrContains(sg:report { format = "csv" }, "saddle,exponent,spread")
end

-- J:check's table stays aligned with long complex numbers, and the expansion report
-- keeps its lines within 100 columns.
function TestReports:test_alignment_and_width()
  local J = airy_pole()
  local text = J:check { x = { 2, 4, 8 }, order = 4 }:report()
  within_width(text, "check")
  local header, col
  for line in text:gmatch("[^\n]+") do
    if line:match("^x%s+expansion") then header = line; col = line:find("quadrature", 1, true) end
  end
  lu.assertNotNil(col, "the table header in:\n" .. text)
  local rows = 0
  for line in text:gmatch("[^\n]+") do
    if line:match("^%d+%s") then
      rows = rows + 1
      -- the quadrature column starts where its title does: a value there, after a blank
      lu.assertEquals(line:sub(col - 2, col - 1), "  ", line)
      lu.assertNotEquals(line:sub(col, col), " ", line)
    end
  end
  lu.assertEquals(rows, 3, text)
  local r = J:expand { x = 4, order = 4, verify = true }
  within_width(r:report(), "expand")
  within_width(J:landscape { x = 4 }:report(), "landscape")
  within_width(J:crossings { x = { 4, 2 } }:report(), "crossings")
  -- the table helper folds a row too wide for 100 columns instead of cutting it
  local wide = report.table({ { "a" }, { "b" }, { "c" } }, { { string.rep("1", 60), string.rep("2", 60),
    string.rep("3", 30) } })
  within_width(wide, "folded table")
  lu.assertStrContains(wide, string.rep("2", 60))
  lu.assertStrContains(wide, string.rep("3", 30))
  -- a single word longer than a line keeps its own line, whole
  lu.assertStrContains(report.wrap("a " .. string.rep("9", 120) .. " b"), string.rep("9", 120))
end
