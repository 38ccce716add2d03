-- Tests of the recipes (recipes/*.lua): each loads as a module (recipes/ is on the test
-- runner's path) and computes something checkable against values computed here
-- independently, each runs as a script, and a recipe asking for a newer API fails loudly.
-- The saddlepoint recipe has its own file (tests/test_saddlepoint.lua).
local lu = require "luaunit"
local H = require "helpers"
local gsl = require "gslref"
local steep = H.steep

local abs, pi = math.abs, math.pi

local root = debug.getinfo(1, "S").source:match("^@(.*)/tests/test_recipes%.lua$") or "."

local function cabs(z) return type(z) == "number" and abs(z) or z:abs() end

---------------------------------------------------------------------------------------

TestRecipesLaplaceEndpoint = {}

local le = require "laplace_endpoint"
local lt = le.t
-- the recipe's invented example: g(t) = 1/(1 + t^2), h(t) = t + t^2/4
local LG, LH = 1 / (1 + lt ^ 2), lt + lt ^ 2 / 4

-- Watson's lemma by hand: with u = h(t), t = 2 (sqrt(1 + u) - 1), dt/du = (1 + u)^(-1/2)
-- and g(t(u)) dt/du = 1 - u/2 - (5/8) u^2 + (11/16) u^3 + ..., so
-- L(x) ~ 1/x - 1/(2 x^2) - (5/4)/x^3 + (33/8)/x^4 (k! G_k / x^(k+1); worked out for this
-- test). The recipe's integral gives these terms.
function TestRecipesLaplaceEndpoint:test_watson_terms()
  local J = le.integral { g = LG, h = LH }
  local r = J:expand { x = 10, order = 4 }
  lu.assertEquals(r.contributions[1].kind, "endpoint")
  local want = { 1, -1 / 2, -5 / 4, 33 / 8 }
  for k, w in ipairs(want) do
    H.close(r.contributions[1].terms[k], w / 10 ^ k, 1e-12, "Watson term " .. k .. " at x = 10")
  end
end

-- M.analyse: optimal truncation against quadrature at x = 10..40. The expansion's
-- relative error falls with x, and it is within the agreement rule J:check applies
-- (|expansion - quadrature| <= estimate + quadrature error, 1x).
function TestRecipesLaplaceEndpoint:test_optimal_truncation_honest()
  local xs = {}
  for x = 10, 40, 5 do xs[#xs + 1] = x end
  local rows, text = le.analyse { g = LG, h = LH, x = xs }
  lu.assertEquals(#rows, #xs)
  lu.assertStrContains(text, "rel.err")
  local bad = {}
  for i, row in ipairs(rows) do
    lu.assertEquals(row.x, xs[i])
    local q = cabs(row.quad)
    local diff = cabs(row.expansion - row.quad)
    H.close(diff / q, row.relative_error, 1e-12, "the row's relative error at x = " .. row.x)
    if not (diff <= row.estimate * q + row.quad_error) then
      bad[#bad + 1] = string.format("x = %g: relative error %.3g, estimate %.3g (ratio %.2f, "
        .. "%d terms)", row.x, row.relative_error, row.estimate, row.relative_error / row.estimate,
        row.terms)
    end
  end
  lu.assertTrue(rows[3].relative_error < rows[1].relative_error and
    rows[7].relative_error < rows[3].relative_error, "error falls from x = 10 to 20 to 40")
  lu.assertTrue(rows[7].relative_error < 1e-13, "x = 40: relative error " .. rows[7].relative_error)
  if #bad > 0 then
    lu.fail("optimal truncation: the error exceeds the estimate at " .. table.concat(bad, "; "))
  end
end

-- A fixed number of terms (4): the estimate (the first omitted term) is honest.
function TestRecipesLaplaceEndpoint:test_fixed_order_honest()
  local rows = le.analyse { g = LG, h = LH, x = { 10, 20, 40 }, order = 4 }
  for _, row in ipairs(rows) do
    lu.assertEquals(row.terms, 4)
    lu.assertTrue(row.relative_error <= row.estimate, string.format("x = %g: relative "
      .. "error %.3g, estimate %.3g", row.x, row.relative_error, row.estimate))
  end
end

---------------------------------------------------------------------------------------

TestRecipesCoefficients = {}

local co = require "coefficients"
local cz = co.z

-- [z^n] (1 + z + z^2)^n (1 + z/2) by multiplying the polynomial out in floating point (the
-- coefficients are positive integers: exact below 2^53, relative rounding ~ n u beyond)
local function trinomial_coefficient(n)
  local c, deg = { [0] = 1.0 }, 0
  for _ = 1, n do
    local d = {}
    for k = 0, deg + 2 do d[k] = (c[k] or 0) + (c[k - 1] or 0) + (c[k - 2] or 0) end
    c, deg = d, deg + 2
  end
  return c[n] + 0.5 * c[n - 1]
end

-- Large powers: the series of order 6 (the default) against the exact coefficients:
-- relative error under n^-6 + 1e-13 (observed 3e-7 at n = 10, 3e-13 at n = 100), a real
-- value, and the leading term 1.5 * 3^(n + 1/2) / (2 sqrt(pi n)) (the central trinomial
-- coefficients grow as 3^(n + 1/2) / (2 sqrt(pi n)), from memory; A(1) = 1.5).
function TestRecipesCoefficients:test_large_powers()
  local lp = co.large_powers { A = 1 + cz / 2, B = 1 + cz + cz ^ 2 }
  H.close(lp.radius, 1, 1e-14, "the saddle on the positive axis")
  for _, n in ipairs({ 10, 20, 50, 100, 200, 400 }) do
    local v, err = lp.at(n)
    local want = trinomial_coefficient(n)
    H.close(v, want, n ^ -6 + 1e-13, "[z^" .. n .. "] (1 + z + z^2)^n (1 + z/2)")
    lu.assertTrue(abs(v:im()) <= 1e-13 * want, "imaginary part at n = " .. n)
    -- the error estimate bounds the error (the reference carries a relative n u of its own)
    lu.assertTrue(cabs(v - want) <= err + n * 2 ^ -53 * want, string.format("n = %d: error %.3g, "
      .. "estimate %.3g", n, cabs(v - want), err))
    if n <= 100 then   -- (beyond, the rounding allowance dominates the estimate)
      lu.assertTrue(err <= 3 * cabs(v - want), "the estimate is not loose at n = " .. n)
    end
  end
  -- fewer terms: the estimate still bounds the error
  local lp2 = co.large_powers { A = 1 + cz / 2, B = 1 + cz + cz ^ 2, order = 2 }
  for _, n in ipairs({ 10, 100, 400 }) do
    local v, err = lp2.at(n)
    local want = trinomial_coefficient(n)
    lu.assertTrue(cabs(v - want) <= err, "2 terms, n = " .. n)
  end
  local lead
  for _, c in ipairs(lp.series) do
    if cabs(c.at - 1) < 1e-12 then lead = c end
  end
  lu.assertNotNil(lead, "a contribution from the saddle at z = 1")
  for _, n in ipairs({ 100, 400 }) do
    H.close(lead:value(n, 1) / (2 * pi * steep.I), 1.5 * 3 ^ (n + 0.5) / (2 * math.sqrt(pi * n)),
      1e-12, "leading term at n = " .. n)
  end
end

-- Bell numbers by the Bell triangle (each row starts with the last entry of the one
-- before; each entry is its left neighbour plus the entry above that neighbour; B_n starts
-- row n), in floating point.
local function bell_numbers(nmax)
  local B, row = { [0] = 1.0 }, { 1.0 }
  for n = 1, nmax do
    local nr = { row[#row] }
    for k = 1, #row do nr[k + 1] = nr[k] + row[k] end
    row = nr
    B[n] = row[1]
  end
  return B
end

-- [z^n] e^{e^z - 1} = B_n / n! by the non-homogeneous route: within its error
-- estimate, and the relative error falling with n (observed 1.2e-5 at n = 10, 1.9e-9 at
-- n = 60).
function TestRecipesCoefficients:test_bell_numbers()
  local B = bell_numbers(60)
  H.close(B[10], 115975, 0, "B_10 from the triangle")      -- the triangle itself, checked
  local ns = { 10, 20, 30, 40, 60 }
  local rows = co.nonhomogeneous { P = steep.exp(cz) - 1, n = ns }
  local last = math.huge
  for i, row in ipairs(rows) do
    lu.assertEquals(row.n, ns[i])
    local fact = 1.0
    for k = 2, row.n do fact = fact * k end
    local got, want = row.value * fact, B[row.n]
    local rel = abs(got - want) / want
    local msg = string.format("B_%d: got %.17g, want %.17g (relative error %.3g, estimate %.3g)",
      row.n, got, want, rel, row.error / abs(row.value))
    lu.assertTrue(abs(row.value - want / fact) <= row.error, msg)
    lu.assertTrue(rel < last, msg .. ": falls with n")
    last = rel
  end
  lu.assertTrue(last < 1e-8, "n = 60: relative error " .. last)
end

---------------------------------------------------------------------------------------

TestRecipesMergingPoints = {}

local mp = require "merging_points"

-- The uniform answer 2 pi x^(-1/3) Ai(-a x^(2/3)) (steep.airy) against quadrature and
-- against GSL's Ai, to 1e-10 relative, as the points merge, coincide (a = 0) and move off
-- the real axis (a < 0).
function TestRecipesMergingPoints:test_uniform_airy_value()
  local X = 30
  local as = { 1, 0.5, 0.2, 0.05, 0.01, 0, -0.2, -0.5 }
  local rows, text = mp.table { x = X, a = as }
  lu.assertStrContains(text, "uniform (Airy) rel.err")
  for i, row in ipairs(rows) do
    lu.assertEquals(row.a, as[i])
    local ref = 2 * pi * X ^ (-1 / 3) * gsl.airy_Ai(-row.a * X ^ (2 / 3))   -- gsl_sf_airy_Ai_e
    H.close(row.uniform, row.quad, 1e-10, "uniform vs quadrature, a = " .. row.a)
    H.close(row.uniform, ref, 1e-10, "uniform vs GSL, a = " .. row.a)
  end
end

-- The plain two-saddle expansion (order 3) while J:expand still uses it (x = 30,
-- a x^(2/3) >= 4): its error, relative to the size of the two saddles' terms, grows as
-- a -> 0 and stays within its estimate. Closer in, J:expand switches to the
-- Airy-type uniform form of the pair, which agrees with quadrature to 1e-10.
function TestRecipesMergingPoints:test_plain_expansion_degrades()
  local X = 30
  local last = 0
  for _, a in ipairs({ 3, 2, 1, 0.7, 0.45 }) do
    local r = mp.J:expand { x = X, a = a, order = 3 }
    local q = mp.J:quad { x = X, a = a }
    local size = 0
    for _, c in ipairs(r.contributions) do
      lu.assertEquals(c.kind, "saddle", "a = " .. a)
      size = size + cabs(c.value)
    end
    local d = cabs(r.value - q)
    local msg = string.format("a = %g: error %.3g, relative to the saddles' size %.3g, "
      .. "estimate %.3g", a, d, d / size, r.error)
    lu.assertTrue(d <= r.error, msg)
    lu.assertTrue(d / size > 2 * last, msg .. string.format(" (previous %.3g)", last))
    last = d / size
  end
  local rows = mp.table { x = X, a = { 0.3, 0.1, 0.01, -0.1 }, order = 3 }
  for _, row in ipairs(rows) do
    lu.assertStrContains(row.kind, "uniform, Airy type")
    H.close(row.expansion, row.quad, 1e-10, "J:expand near coalescence, a = " .. row.a)
  end
end

---------------------------------------------------------------------------------------

TestRecipesScripts = {}

local function q(s) return "'" .. s:gsub("'", "'\\''") .. "'" end

-- The steep module the runner uses (the plain build, or the sanitized one under make asan)
local steep_cpath = (os.getenv("STEEP_CPATH") or "lua/?.so"):gsub("^([^/])", root .. "/%1")

-- runs `lua5.4 <file>` with LUA_PATH / LUA_CPATH naming the tree; output, exit status
local function run_script(file, tmpdir)
  local cmd = string.format("cd %s && env -u LUA_INIT -u LUA_INIT_5_4 LUA_PATH=%s LUA_CPATH=%s "
    .. "%s lua5.4 %s 2>&1", q(root), q(root .. "/lua/?.lua;" .. root .. "/lua/?/init.lua;;"),
    q(steep_cpath .. ";;"), tmpdir and ("TMPDIR=" .. q(tmpdir) .. " STEEP_OUT=" .. q(tmpdir)) or "",
    q(file))
  local p = assert(io.popen(cmd))
  local out = p:read("a")
  local ok, how, code = p:close()
  return out, ok, how, code
end

-- Each recipe runs as a script (exit status 0) and prints its table.
function TestRecipesScripts:test_recipes_run()
  local tmpdir = os.tmpname()
  os.remove(tmpdir)
  assert(os.execute("mkdir " .. q(tmpdir)))
  local expect = {
    ["laplace_endpoint.lua"] = { "Invented example", "rel.err", "\n40 " },
    ["coefficients.lua"] = { "(1 + z + z^2)^n", "n = 200", "6 terms, estimated)", "Bell numbers",
      "n = 40" },
    ["merging_points.lua"] = { "Invented sweep", "uniform (Airy) rel.err", "\n0.02 " },
    ["saddlepoint.lua"] = { "Invented example", "P(tail >= threshold)", "caution: " },
    ["demo.lua"] = { "== the integral", "== both routes against quadrature", "Caution",
      "== map of the complex plane written to " },
    ["special_functions.lua"] = { "airy", "gamma", "hankel", "bessel", "rel.err", "status" },
    ["bessel_large_order.lua"] = { "order nu = 40", "Debye", "Airy", "order 3",
      "DLMF 10.41.10", "caution: " },
    ["beyond_optimal.lua"] = { "== e^x E1(x)", "== Gamma(x)/x^x", "resummed", "plot written to",
      "caution: " },
    ["diagonal_coefficients.lua"] = { "1/(1 - x - y - 2xy)", "one-variable route", "\n160 ",
      "torus quadrature", "caution: " },
    ["laplace_approximation.lua"] = { "2 coefficients", "rel.err 2", "\n160 ", "3 coefficients",
      "status", "caution: " },
  }
  local ls = assert(io.popen("ls " .. q(root .. "/recipes")))
  local seen = 0
  for f in ls:lines() do
    if f:match("%.lua$") then
      seen = seen + 1
      local frags = expect[f]
      lu.assertNotNil(frags, "a test expectation for recipes/" .. f)
      local out, ok, how, code = run_script("recipes/" .. f, tmpdir)
      if not ok then
        lu.fail(string.format("recipes/%s failed (%s %s):\n%s", f, tostring(how),
          tostring(code), out))
      end
      for _, frag in ipairs(frags) do lu.assertStrContains(out, frag) end
      if f == "demo.lua" then
        -- the map went where STEEP_OUT says, and the demo said so
        lu.assertStrContains(out, "written to " .. tmpdir .. "/steep-demo-map.svg")
        local svg = io.open(tmpdir .. "/steep-demo-map.svg")
        lu.assertNotNil(svg, "the demo's map in STEEP_OUT")
        if svg then svg:close() end
      end
      if f == "saddlepoint.lua" then
        -- the printed tail at x = 2 (n = 20) against the exact gamma tail
        local p = tonumber(out:match("\n2%s+(%S+)"))
        lu.assertNotNil(p, "row x = 2 in:\n" .. out)
        H.close(p, gsl.cdf_gamma_Q(40, 20, 1), 1e-3, "saddlepoint script, x = 2")
      end
    end
  end
  ls:close()
  lu.assertEquals(seen, 10, "recipes found")
  os.execute("rm -rf " .. q(tmpdir))
end

---------------------------------------------------------------------------------------

TestRecipesSpecialFunctions = {}

-- The family of representations against GSL (and exact factorials): the expansion agrees
-- with quadrature within the error estimates, and the value is the function's.
function TestRecipesSpecialFunctions:test_family_against_references()
  local sf = require "special_functions"
  -- Ai(6): gsl_sf_airy_Ai
  local r = sf.analyse("airy", { x = 6 }, 5)
  lu.assertTrue(r.agrees, "airy: expansion and quadrature agree")
  H.close(r.quad, gsl.airy_Ai(6), 1e-10, "Ai(6) by quadrature vs gsl_sf_airy_Ai")
  lu.assertTrue((r.value - gsl.airy_Ai(6)):abs() <= r.error, "Ai(6) expansion within its estimate")
  -- Gamma(13) = 12! exactly (DLMF 5.2.1 with x = 12)
  r = sf.analyse("gamma", { x = 12 }, 6)
  H.close(r.quad, 479001600, 1e-10, "12! by quadrature")
  lu.assertTrue((r.value - 479001600):abs() <= r.error, "12! expansion within its estimate")
  -- e^x E1(x): gsl_sf_expint_E1
  local ref = math.exp(15) * gsl.expint_E1(15)
  r = sf.analyse("expint", { x = 15 }, 6)
  H.close(r.quad, ref, 1e-10, "e^15 E1(15) by quadrature")
  lu.assertTrue((r.value - ref):abs() <= r.error, "e^15 E1(15) expansion within its estimate")
  -- a representation of one's own: the Gaussian integral of exp(-x t^2) = sqrt(pi/x)
  local steep = require "steep"
  local t, x = steep.var "t", steep.param "x"
  sf.add("gauss", { var = t, exponent = -x * t ^ 2,
    contour = steep.line(steep.inf(math.pi), steep.inf(0)), large = x })
  r = sf.analyse("gauss", { x = 3 }, 2)
  H.close(r.quad, math.sqrt(math.pi / 3), 1e-12, "sqrt(pi/3), exact")
  H.close(r.value, math.sqrt(math.pi / 3), 1e-12, "sqrt(pi/3), expansion (exact here)")
  -- Bessel's integral over a period (DLMF 10.9.2): the two real saddles at t = pm acos(n/x)
  -- and the ends at -+pi, whose contributions cancel (the integrand is periodic);
  -- gsl_sf_bessel_Jn
  r = sf.analyse("bessel", { x = 30, n = 2 }, 4)
  ref = gsl.bessel_Jn(2, 30)
  H.close(r.quad, ref, 1e-10, "J_2(30) by quadrature")
  lu.assertTrue((r.value - ref):abs() <= r.error, "J_2(30) expansion within its estimate")
end

-- The recipe's table: a representation whose expansion fails shows "failed" in its row,
-- quadrature's value (or its failure) beside it, and the reason below the table (it was in
-- the source's comments only). exp(-4 t^2) / (t - 1/2) over [0, 1]: the pole at 1/2 lies
-- on the contour.
function TestRecipesSpecialFunctions:test_table_says_why()
  local sf = require "special_functions"
  local steep = require "steep"
  local t, x = steep.var "t", steep.param "x"
  sf.add("stuck", { var = t, exponent = -x * t ^ 2, amplitude = 1 / (t - 0.5),
    contour = steep.line(0, 1), large = x, sample = { x = 4 } })
  local ok = pcall(sf.analyse, "stuck", { x = 4 }, 2)
  lu.assertFalse(ok, "the expansion of the case fails")
  local text = sf.table { "gamma", "stuck" }
  lu.assertStrContains(text, "failed (see below)")
  lu.assertStrContains(text, "stuck: the expansion failed: ")
  for line in text:gmatch("[^\n]+") do lu.assertTrue(#line <= 100, "within 100 columns: " .. line) end
  lu.assertStrContains(text, "479001600")   -- 12! by quadrature (exact)
end

TestRecipesVersion = {}

-- A recipe written for a newer API (here laplace_endpoint.lua with its version line asking
-- for 9.0) fails loudly: as a module the load raises an error naming both versions; as a
-- script it stops with a non-zero exit status before printing anything.
function TestRecipesVersion:test_newer_api_fails_loudly()
  H.raises({ "this script needs steep 9.0", "the installed steep is " .. steep.version },
    steep.require_version, "9.0")
  local f = assert(io.open(root .. "/recipes/laplace_endpoint.lua"))
  local src = f:read("a")
  f:close()
  local n
  src, n = src:gsub('steep%.require_version%("0%.1"%)', 'steep.require_version("9.0")')
  lu.assertEquals(n, 1, "the recipe states its API version")
  local base = os.tmpname()
  local dir, name = base:match("^(.*)/([^/]+)$")
  local modname = name:gsub("[^%w_]", "_") .. "_laplace_endpoint"
  local path = dir .. "/" .. modname .. ".lua"
  f = assert(io.open(path, "w"))
  f:write(src)
  f:close()
  local saved = package.path
  package.path = dir .. "/?.lua;" .. package.path
  local ok, err = pcall(require, modname)
  package.path = saved
  package.loaded[modname] = nil
  lu.assertFalse(ok, "loading a recipe that needs API 9.0")
  err = tostring(err)
  lu.assertStrContains(err, "this script needs steep 9.0")
  lu.assertStrContains(err, "the installed steep is " .. steep.version)
  -- as a script: the script-detection pattern matches laplace_endpoint.lua, so copy the
  -- file to that name in a directory of its own
  local sdir = base .. "_dir"
  assert(os.execute("mkdir " .. q(sdir)))
  local spath = sdir .. "/laplace_endpoint.lua"
  f = assert(io.open(spath, "w"))
  f:write(src)
  f:close()
  local out, sok, how, code = run_script(spath)
  os.remove(path)
  os.remove(spath)
  os.remove(sdir)
  os.remove(base)
  lu.assertTrue(not sok and how == "exit" and code ~= 0,
    "the script's exit status is non-zero:\n" .. out)
  lu.assertStrContains(out, "this script needs steep 9.0")
  lu.assertStrContains(out, "the installed steep is " .. steep.version)
  lu.assertNil(out:find("Invented example", 1, true), "nothing computed:\n" .. out)
end

---------------------------------------------------------------------------------------

TestRecipesBeyondOptimal = {}

local bo = require "beyond_optimal"

-- The recipe's table for e^x E1(x) against GSL (gsl_sf_expint_E1_scaled_e): quadrature is
-- the function, the resummed value beats optimal truncation by 10^4 and more, and its
-- estimate bounds its error (relative, with quadrature's own).
function TestRecipesBeyondOptimal:test_expint_rows()
  local case = bo.cases()[1]
  lu.assertEquals(case.name, "e^x E1(x)")
  local rows, text = bo.analyse { integral = case.integral, x = { 5, 3 }, plain = 4 }
  lu.assertStrContains(text, "resummed")
  for _, row in ipairs(rows) do
    local ref = gsl.expint_E1_scaled(row.x)
    H.close(row.quad, ref, 1e-12, "quadrature at x = " .. row.x)
    lu.assertTrue(row.resummed <= row.estimate + row.quad_error, "estimate bounds the error")
    lu.assertTrue(row.resummed <= 1e-4 * row.optimal, "resummation beats optimal truncation")
    lu.assertTrue(row.optimal > 1e-3, "optimal truncation alone is poor at x = " .. row.x)
    lu.assertEquals(row.method, "borel")
  end
end

-- The SVG writer: one panel per case with its title, four curves each (fixed terms,
-- optimal, resummed, estimate), a legend; errors mapped on a log scale (1e-2 halfway
-- between 1e-17 and 1e1 less 8 decades, checked through the two curves' heights).
function TestRecipesBeyondOptimal:test_plot()
  local rows = { { x = 1, plain = 1e-2, optimal = 1e-4, resummed = 1e-12, estimate = 1e-11 },
    { x = 2, plain = 1e-3, optimal = 1e-6, resummed = 0, estimate = 1e-13 } }
  local svg = bo.plot({ { name = "first & <one>", rows = rows }, { name = "second", rows = rows } })
  lu.assertStrContains(svg, "<svg xmlns=")
  lu.assertTrue(svg:match("</svg>%s*$") ~= nil, "closed")
  lu.assertStrContains(svg, "first &amp; &lt;one&gt;")
  local n = 0
  for _ in svg:gmatch("<polyline") do n = n + 1 end
  lu.assertEquals(n, 8, "four curves in each of two panels")
  lu.assertStrContains(svg, "optimal truncation")
  lu.assertStrContains(svg, "errors below 1e-17 are drawn at 1e-17")
  -- the first panel's plain curve: 1e-2 at x = 1 and 1e-3 at x = 2 are one decade apart,
  -- the resummed curve's 1e-12 and 0 (drawn at 1e-17) five apart
  local plain = svg:match('<polyline points="([^"]+)" fill="none" stroke="#8a8a8a"')
  local y1, y2 = plain:match("[%d.]+,([%d.]+) [%d.]+,([%d.]+)")
  local decade = tonumber(y2) - tonumber(y1)
  lu.assertTrue(decade > 0, "a smaller error is drawn lower")
  local res = svg:match('<polyline points="([^"]+)" fill="none" stroke="#1b7f79" stroke%-width="1.8"')
  local r1, r2 = res:match("[%d.]+,([%d.]+) [%d.]+,([%d.]+)")
  H.close(tonumber(r2) - tonumber(r1), 5 * decade, 1e-2, "log scale")
end

---------------------------------------------------------------------------------------

TestRecipesBesselLargeOrder = {}

-- The recipe's J, Y, H1, H2, I, K of order nu (and nu + 1) at nu z against GSL (gsl_sf_bessel_Jnu,
-- _Ynu, _Knu_scaled, _Inu_scaled): each expansion within its estimate (and GSL's error),
-- quadrature to 1e-12, and the forms it names (Debye apart, Airy near nu = x).
function TestRecipesBesselLargeOrder:test_values_against_gsl()
  local B = require "bessel_large_order"
  local function check(name, nv, z, want, gerr, m)
    local r = B.value(name, nv, z, { m = m })
    local msg = string.format("%s_{%g+%d}(%g*%g)", name, nv, m or 0, nv, z)
    lu.assertTrue((r.value - want):abs() <= r.error + gerr, string.format("%s: %s vs %s, "
      .. "estimate %.3g", msg, tostring(r.value), tostring(want), r.error))
    lu.assertTrue((r.quad - want):abs() <= 1e-12 * cabs(want) + gerr, msg .. ": quadrature")
    lu.assertTrue(r.agrees, msg .. ": expansion and quadrature agree")
    return r
  end
  for _, z in ipairs({ 0.6, 1.4 }) do
    local nv = 30
    local x = nv * z
    local j, je = gsl.bessel_Jnu(nv, x)
    local y, ye = gsl.bessel_Ynu(nv, x)
    check("J", nv, z, j, je)
    check("Y", nv, z, y, ye)
    check("H1", nv, z, steep.complex(j, y), je + ye)
    check("H2", nv, z, steep.complex(j, -y), je + ye)
    local ks, kse = gsl.bessel_Knu_scaled(nv, x)
    local is, ise = gsl.bessel_Inu_scaled(nv, x)
    check("K", nv, z, ks * math.exp(-x), kse * math.exp(-x))
    check("I", nv, z, is * math.exp(x), ise * math.exp(x))
    -- order nu + 1 through the amplitude
    local j1, j1e = gsl.bessel_Jnu(nv + 1, x)
    check("J", nv, z, j1, j1e, 1)
  end
  -- the transition: nu = 31 at the argument 30 (z = 30/31) takes the uniform form
  local j, je = gsl.bessel_Jnu(31, 30)
  local r = check("J", 31, 30 / 31, j, je)
  lu.assertStrContains(r.form, "Airy type")
  H.raises({ "no function named Q" }, B.integral, "Q", 0.5)
end

-- The Debye coefficients as steep's series produces them: c_k/c_0 of J's series = u_k(t),
-- t = 1/sqrt(1 - z^2) (DLMF 10.19.3 with 10.41.10), and of I's = U_k(p), p = 1/sqrt(1 +
-- z^2) (DLMF 10.41.3), to 1e-12, each within its stated error.
function TestRecipesBesselLargeOrder:test_debye_coefficients()
  local B = require "bessel_large_order"
  for _, z in ipairs({ 0.3, 0.6, 0.9 }) do
    local t = 1 / math.sqrt(1 - z * z)
    local c, e = B.debye(z, 3)
    for k = 1, 3 do
      local want = B.u[k](t)
      H.close(c[k], want, 1e-12, string.format("u_%d(%g)", k, t), 1)
      lu.assertTrue((c[k] - want):abs() <= e[k] + 1e-15 * abs(want), "within its error")
    end
  end
  local p = 1 / math.sqrt(1 + 2 ^ 2)
  local c = B.debye(2, 3, "I")
  for k = 1, 3 do H.close(c[k], B.u[k](p), 1e-12, "U_" .. k .. " for I at z = 2", 1) end
end

---------------------------------------------------------------------------------------

TestRecipesLaplaceApproximation = {}

-- The recipe's two-coefficient logistic example against iterated quadrature (the
-- reference, its estimate below 1e-10): each correction term improves on the one before
-- (n = 40, 160), the estimate of the two-correction value bounds its error, and the
-- leading term is the textbook Laplace approximation e^{n lbar*} (2 pi/n)^{d/2}
-- det(-lbar'')^{-1/2} prior(theta*) (Tierney & Kadane 1986), computed here from the
-- Hessian at the maximum by steep's own derivatives.
function TestRecipesLaplaceApproximation:test_corrections_improve()
  local la = require "laplace_approximation"
  local spec = {}
  for k, v in pairs(la.example.two) do spec[k] = v end
  spec.n = { 40, 160 }
  local rows, text = la.table(spec)
  lu.assertStrContains(text, "rel.err 2")
  for _, row in ipairs(rows) do
    local rel = row.relative
    lu.assertTrue(row.quad_error <= 1e-10 * row.quad:abs(), "quadrature estimate at n = " .. row.n)
    lu.assertTrue(rel[1] > rel[2] and rel[2] > rel[3], string.format("n = %d: %.3g, %.3g, %.3g",
      row.n, rel[1], rel[2], rel[3]))
    lu.assertTrue((row.second - row.quad):abs() <= row.estimate + row.quad_error,
      string.format("n = %d: the estimate bounds the error", row.n))
  end
  -- the leading term by hand at n = 40
  local a, b = la.a, la.b
  local lbar = spec.loglik
  local N = 40
  local m = rows[1].maximum
  local p = { a = m[1], b = m[2] }
  local t = steep.compile({ lbar, steep.diff(steep.diff(lbar, a), a), steep.diff(steep.diff(lbar, a), b),
    steep.diff(steep.diff(lbar, b), b), spec.prior }, nil)
  local l0, haa, hab, hbb, pr = t:eval(0, p)
  local det = haa * hbb - hab * hab
  local lead = steep.exp(N * l0) * (2 * pi / N) * pr / steep.sqrt(det)
  H.close(rows[1].leading, lead, 1e-12, "the leading Laplace term at n = 40")
end

-- The three-coefficient example (strongly correlated parameters) against iterated
-- quadrature at n = 40: orders 3 to 5 within their estimates, order 3 (the recipe's) not
-- suspect, the estimates below 1e-3 of the value. In the
-- plain coordinates the fourth group of terms cancelled to 1e-17 of the moduli summed
-- into it: it was noise, the estimate 2.5e3 times the value ("suspect"), and order 5 gave
-- 250 times the value. In whitened coordinates the groups fall as they should.
function TestRecipesLaplaceApproximation:test_three_correlated_coefficients()
  local la = require "laplace_approximation"
  local J = la.integral(la.example.three)
  local q, qe = J:quad { n = 40 }
  lu.assertTrue(qe <= 1e-7 * q:abs(), "quadrature estimate")
  for K = 3, 5 do
    local r = J:expand { n = 40, order = K }
    local msg = "order " .. K
    if K == 3 then lu.assertEquals(r.status, "estimated", msg) end
    lu.assertTrue((r.value - q):abs() <= r.error + qe, string.format("%s: %.3g off under %.3g",
      msg, (r.value - q):abs(), r.error))
    lu.assertTrue(r.error <= 1e-3 * q:abs(), msg .. ": relative estimate " .. r.error / q:abs())
  end
end
