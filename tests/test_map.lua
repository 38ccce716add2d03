-- Tests of J:map: the SVG file is written, is well-formed XML (a small checker below),
-- carries one marker per saddle and pole in view (class attributes that map.lua
-- defines), agrees with the summary it returns, and renders with rsvg-convert (Debian
-- package librsvg2-bin, installed by `make deps`).
--
-- Expected positions: the Airy exponent F = i (t^3/3 + x t) has F' = i (t^2 + x), so its
-- saddles are t = +-i sqrt(x) for x > 0 and t = +-sqrt(-x) for x < 0; F = -x (t - i)^2
-- has its one saddle at t = i, and the amplitude 1/(t - i/2) a simple pole at i/2.
-- Shifting the real line up to Im t = 1 (through the saddle) sweeps over that pole once,
-- counter-clockwise (Cauchy's theorem on the strip 0 < Im t < 1): winding number +1.
local lu = require "luaunit"
local H = require "helpers"
local steep = H.steep

local t, x = steep.var("t"), steep.param("x")
local I = steep.I

local function airy()
  return steep.integral { var = t, exponent = I * (t ^ 3 / 3 + x * t),
    contour = steep.line(steep.inf(math.pi), steep.inf(0)) }
end

local function with_pole()
  return steep.integral { var = t, exponent = -x * (t - I) ^ 2, amplitude = 1 / (t - I / 2),
    contour = steep.line(steep.inf(math.pi), steep.inf(0)) }
end

-- Temporary file names derived from os.tmpname (which creates the base file).
local function tmpnames()
  local base = os.tmpname()
  return { base = base, svg = base .. ".svg", png = base .. ".png" }
end

local function cleanup(names)
  for _, f in pairs(names) do os.remove(f) end
end

local function read(path)
  local f = assert(io.open(path, "rb"))
  local s = f:read("a")
  f:close()
  return s
end

local function count(s, pattern)
  local n = 0
  for _ in s:gmatch(pattern) do n = n + 1 end
  return n
end

-- A small well-formedness checker (common practice: a stack of open elements): one
-- prolog, then elements whose start and end tags nest and match, attributes written
-- name="value" without '<' in the value, one root element, and no bare '<' or '&'
-- (other than entity references) in text. Returns true, or nil and the first problem.
local function well_formed(s)
  local pos = 1
  local decl = s:match("^<%?xml[^?]*%?>%s*()")
  if decl then pos = decl end
  local stack, roots = {}, 0
  local function check_text(text)
    if text:find("<", 1, true) then return "bare '<' in text" end
    for amp in text:gmatch("&([^;]*);?") do
      if not (amp:match("^[a-z]+$") or amp:match("^#%d+$") or amp:match("^#x%x+$")) then
        return "bad entity reference &" .. amp
      end
    end
  end
  while pos <= #s do
    local lt = s:find("<", pos, true)
    local text = s:sub(pos, (lt or #s + 1) - 1)
    local problem = check_text(text)
    if problem then return nil, problem end
    if not lt then break end
    if #stack == 0 and roots > 0 then return nil, "content after the root element" end
    local gt = s:find(">", lt, true)
    if not gt then return nil, "unterminated tag at " .. lt end
    local tag = s:sub(lt + 1, gt - 1)
    if tag:sub(1, 3) == "!--" then
      local close = s:find("-->", lt, true)
      if not close then return nil, "unterminated comment" end
      gt = close + 2
    elseif tag:sub(1, 1) == "/" then
      local name = tag:match("^/([%w:_%-%.]+)%s*$")
      if not name then return nil, "bad end tag <" .. tag .. ">" end
      local open = table.remove(stack)
      if open ~= name then
        return nil, string.format("end tag </%s> closes <%s>", name, tostring(open))
      end
    else
      local name, rest = tag:match("^([%a_][%w:_%-%.]*)(.*)$")
      if not name then return nil, "bad start tag <" .. tag .. ">" end
      local empty = rest:sub(-1) == "/"
      if empty then rest = rest:sub(1, -2) end
      local seen = {}
      local leftover = rest:gsub('%s+([%a_][%w:_%-%.]*)="([^"]*)"', function(attr, value)
        if seen[attr] then return "!duplicate " .. attr end
        seen[attr] = true
        if value:find("<", 1, true) then return "!'<' in " .. attr end
        return ""
      end)
      if leftover:match("%S") then
        return nil, string.format("bad attributes in <%s>: %s", name, leftover)
      end
      if #stack == 0 then roots = roots + 1 end
      if not empty then stack[#stack + 1] = name end
    end
    pos = gt + 1
  end
  if #stack > 0 then return nil, "unclosed <" .. stack[#stack] .. ">" end
  if roots ~= 1 then return nil, "expected one root element, found " .. roots end
  return true
end

-- rsvg-convert renders the file to a PNG; the exit status is 0 and the PNG is not empty
-- (it starts with the PNG signature).
local function assert_renders(names)
  local ok, how, code = os.execute(string.format("env -u LD_PRELOAD -u ASAN_OPTIONS rsvg-convert -o %q %q 2>/dev/null",
    names.png, names.svg))
  if how == "exit" and code == 127 then
    lu.fail("rsvg-convert not found: install the Debian package librsvg2-bin (make deps)")
  end
  lu.assertTrue(ok == true and code == 0, string.format("rsvg-convert: %s %s", tostring(how),
    tostring(code)))
  local png = read(names.png)
  lu.assertTrue(#png > 1000, "PNG of " .. #png .. " bytes")
  lu.assertEquals(png:sub(1, 8), "\137PNG\r\n\26\n", "PNG signature")
end

-- Draws J at the given options into a temporary file, checks what every map must
-- satisfy (well-formed, the summary matches the file, axes, legend and title present,
-- it renders) and returns the SVG text and the summary; the files are removed.
local function draw(J, opts)
  local names = tmpnames()
  opts.file = names.svg
  local results = table.pack(pcall(function()
    local file, summary = J:map(opts)
    lu.assertEquals(file, names.svg)
    local svg = read(names.svg)
    local good, why = well_formed(svg)
    lu.assertTrue(good, "not well-formed: " .. tostring(why))
    lu.assertStrContains(svg, '<svg xmlns="http://www.w3.org/2000/svg"')
    lu.assertEquals(count(svg, '<g class="saddle"'), summary.saddles, "saddle markers")
    lu.assertEquals(count(svg, '<g class="pole"'), summary.poles, "pole markers")
    lu.assertEquals(count(svg, 'class="descent"'), summary.descent_paths, "descent paths")
    lu.assertEquals(count(svg, 'class="ascent"'), summary.ascent_paths, "ascent paths")
    lu.assertEquals(count(svg, 'class="piece"'), summary.pieces, "deformed pieces")
    lu.assertEquals(count(svg, 'class="valley"'), summary.valleys, "valley marks")
    lu.assertEquals(count(svg, 'class="residue%-loop"'), summary.residues, "residue loops")
    lu.assertEquals(count(svg, 'class="arrow%-'), summary.arrows, "arrows")
    lu.assertEquals(count(svg, 'class="cut"'), summary.cuts, "branch cuts")
    lu.assertEquals(count(svg, 'class="level"'), summary.level_lines, "level lines")
    lu.assertStrContains(svg, ">Re t</text>")
    lu.assertStrContains(svg, ">Im t</text>")
    lu.assertStrContains(svg, '<g id="legend"')
    lu.assertStrContains(svg, '<g id="title"')
    assert_renders(names)
    return svg, summary
  end))
  cleanup(names)
  if not results[1] then error(results[2], 0) end
  return results[2], results[3]
end

---------------------------------------------------------------------------------------

TestMap = {}

function TestMap:test_airy_positive_x()
  local J = airy()
  local svg, s = draw(J, { x = 5 })
  lu.assertEquals(s.saddles, 2, "saddles at +-i sqrt(5)")
  lu.assertEquals(s.poles, 0)
  lu.assertEquals(count(svg, '<g class="saddle"'), 2)
  lu.assertEquals(count(svg, '<g class="pole"'), 0)
  lu.assertEquals(s.status, "ok")
  -- every saddle in view gets its descent and ascent paths (two each)
  lu.assertEquals(s.descent_paths, 4)
  lu.assertEquals(s.ascent_paths, 4)
  -- the real line becomes the two descent rays of the upper saddle only
  lu.assertEquals(s.pieces, 2)
  lu.assertEquals(s.residues, 0)
  -- three sectors and their two edge directions (as the landscape reports them)
  local L = J:landscape { x = 5 }
  lu.assertEquals(s.valleys, #L.valleys)
  lu.assertStrContains(svg, "x = 5")
  -- the markers sit where the saddles are: +-i sqrt 5 (tooltips name the positions)
  for j = 1, #L.saddles do lu.assertStrContains(svg, 'id="saddle-' .. j .. '"') end
  lu.assertStrContains(svg, "at t = 2.236i")
  lu.assertStrContains(svg, "at t = \u{2212}2.236i")
  -- no branch points or cuts for a polynomial exponent
  lu.assertEquals(s.cuts, 0)
  lu.assertEquals(s.branch_points, 0)
end

function TestMap:test_airy_negative_x()
  local J = airy()
  local svg, s = draw(J, { x = -5 })
  lu.assertEquals(s.saddles, 2, "saddles at +-sqrt(5)")
  lu.assertEquals(count(svg, '<g class="saddle"'), 2)
  lu.assertEquals(count(svg, '<g class="pole"'), 0)
  lu.assertStrContains(svg, "at t = 2.236,")
  lu.assertStrContains(svg, "at t = \u{2212}2.236,")
  -- both saddles contribute, each through both of its descent rays
  lu.assertEquals(s.status, "ok")
  lu.assertEquals(s.pieces, 4)
  lu.assertStrContains(svg, "x = \u{2212}5")
end

function TestMap:test_pole()
  local J = with_pole()
  local svg, s = draw(J, { x = 1 })
  lu.assertEquals(s.saddles, 1, "one saddle at i")
  lu.assertEquals(s.poles, 1, "one pole at i/2")
  lu.assertEquals(count(svg, '<g class="saddle"'), 1)
  lu.assertEquals(count(svg, '<g class="pole"'), 1)
  lu.assertStrContains(svg, "at t = i,")
  lu.assertStrContains(svg, "pole P1 at t = 0.5i")
  -- the deformation to Im t = 1 sweeps over the pole once, counter-clockwise
  lu.assertEquals(s.status, "ok")
  lu.assertEquals(s.pieces, 2)
  lu.assertEquals(s.residues, 1)
  lu.assertStrContains(svg, 'class="residue-loop" data-winding="1"')
  -- the title names the integral and the parameter
  lu.assertStrContains(svg, "x = 1")
  lu.assertStrContains(svg, "exp(\u{2212}x\u{b7}(t \u{2212} i)^2)")
end

-- A branch point of the amplitude and a sink of the exponent: their markers and cuts
-- (sqrt(t^2 + 1) is cut where t^2 + 1 <= 0, on the imaginary axis beyond +-i; x log t
-- with x = 2.5 is cut along the negative real axis).
function TestMap:test_branch_points_and_cuts()
  local J = steep.integral { var = t, exponent = x * steep.log(t) - t,
    amplitude = steep.sqrt(t ^ 2 + 1), contour = steep.line(0, steep.inf(0)) }
  local svg, s = draw(J, { x = 2.5 })
  lu.assertEquals(s.branch_points, 2)
  lu.assertEquals(s.sinks, 1)
  lu.assertEquals(s.cuts, 2)
  lu.assertEquals(count(svg, '<g class="branch"'), 2)
  lu.assertEquals(count(svg, '<g class="sink"'), 1)
  lu.assertEquals(count(svg, 'class="cut"'), 2)
  -- with an integer coefficient the log of the exponent is no cut of the integrand
  local _, s2 = draw(J, { x = 2 })
  lu.assertEquals(s2.cuts, 1)
end

-- A window without the saddles draws no saddle marker; the counts follow the window.
function TestMap:test_view_option()
  local J = airy()
  local svg, s = draw(J, { x = 5, view = { center = 0, radius = 1 }, width = 400, grid = 40 })
  lu.assertEquals(s.saddles, 0)
  lu.assertEquals(count(svg, '<g class="saddle"'), 0)
  lu.assertEquals(s.cells, 1600)
  lu.assertEquals(s.width, 400)
  local _, s2 = draw(J, { x = 5, view = { center = 2 * I, radius = 1 } })
  lu.assertEquals(s2.saddles, 1)
end

function TestMap:test_modulus_shading()
  local J = with_pole()
  local svg, s = draw(J, { x = 1, shade = "modulus", levels = 0 })
  lu.assertEquals(s.shade, "modulus")
  lu.assertEquals(s.level_lines, 0)
  lu.assertStrContains(svg, "log |g(t) e^F(t)|")
  lu.assertTrue(s.range[1] < s.range.pivot and s.range.pivot < s.range[2])
end

function TestMap:test_errors()
  local J = airy()
  H.raises({ "map", "file" }, function() J:map { x = 5 } end)
  H.raises({ "map", "unbound parameter 'x'" }, function() J:map { file = "/tmp/never.svg" } end)
  H.raises({ "map", "unknown option 'colour'" }, function()
    J:map { x = 5, file = "/tmp/never.svg", colour = "red" } end)
  H.raises({ "shade" }, function() J:map { x = 5, file = "/tmp/never.svg", shade = "hue" } end)
  H.raises({ "width" }, function() J:map { x = 5, file = "/tmp/never.svg", width = 10 } end)
  H.raises({ "view radius" }, function()
    J:map { x = 5, file = "/tmp/never.svg", view = { center = 0, radius = -1 } } end)
  H.raises({ "cannot write" }, function()
    J:map { x = 5, file = "/nonexistent-directory/map.svg" } end)
end

-- Labels are numbered within their kind: a branch point listed before the pole leaves the
-- pole P1 (it was P2, numbered across kinds), and the residue note names P1 too. The
-- amplitude sqrt(t + 3i) / (t - i/2): a branch point at -3i (listed first), a simple
-- pole at i/2; the cut runs left from -3i, clear of the contours.
function TestMap:test_labels_per_kind()
  local J = steep.integral { var = t, exponent = -x * (t - I) ^ 2,
    amplitude = steep.sqrt(t + 3 * I) / (t - I / 2), contour = steep.line(steep.inf(math.pi), steep.inf(0)) }
  local svg, s = draw(J, { x = 1, view = { center = 0, radius = 4 } })
  lu.assertEquals(s.status, "ok")
  lu.assertEquals(s.poles, 1)
  lu.assertEquals(s.branch_points, 1)
  lu.assertNotNil(svg:find(">P1</text>", 1, true), ">P1</text>")
  lu.assertNotNil(svg:find(">B1</text>", 1, true), ">B1</text>")
  lu.assertNil(svg:find(">P2</text>", 1, true), "the only pole is P1")
  lu.assertNotNil(svg:find("Res at P1", 1, true), "Res at P1")
end

-- In modulus shading |g e^F| grows without bound at a pole: a disc of the top colour
-- marks it (and the legend says so); the exponent shading has none.
function TestMap:test_modulus_shows_poles()
  local J = with_pole()
  local svg = draw(J, { x = 1, shade = "modulus" })
  lu.assertEquals(count(svg, 'class="pole%-peak"'), 1)
  lu.assertNotNil(svg:find("at a pole (top of the scale)", 1, true), "at a pole (top of the scale)")
  local svg2 = draw(J, { x = 1 })
  lu.assertEquals(count(svg2, 'class="pole%-peak"'), 0)
end

-- A decomposition that fails leaves one short line under the map; the reasons in full are
-- in the summary (decomposition_notes). exp(x t^2) on the real line: the ends lie in no
-- valley for x = 1.
function TestMap:test_failed_decomposition_short_note()
  local J = steep.integral { var = t, exponent = x * t ^ 2, contour = steep.line(steep.inf(math.pi), steep.inf(0)) }
  local svg, s = draw(J, { x = 1 })
  lu.assertNotEquals(s.status, "ok")
  lu.assertTrue(#s.decomposition_notes > 0, "the reasons are in the summary")
  local notes = svg:match('<g id="notes".-</g>')
  lu.assertStrContains(notes, "deformed contour not drawn: the contour could not be decomposed")
  for _, reason in ipairs(s.decomposition_notes) do
    lu.assertNil(notes:find(reason:sub(1, 40), 1, true), "the full reason is not under the map")
  end
  lu.assertTrue(count(notes, "<text") <= 3, "a short note: " .. notes)
end

-- The checker itself rejects what it should (so a pass above means something).
function TestMap:test_checker()
  lu.assertTrue(well_formed('<?xml version="1.0"?>\n<a><b x="1"/><c>t &amp; u</c></a>\n'))
  for _, bad in ipairs({ "<a><b></a></b>", "<a>", "<a></a><b/>", '<a x="1" x="2"/>',
    "<a>1 < 2</a>", "<a>R&D</a>", "<a x=1/>" }) do
    lu.assertNil((well_formed(bad)), bad)
  end
end
