-- Tests of J:landscape: the valleys at infinity of c t^n (exact sectors), saddles of
-- polynomials with known critical points (simple and degenerate), exponents with
-- infinitely many saddles, the classification of singularities (poles with their
-- residues, branch points, log points of the exponent) and the errors for bad input.
local lu = require "luaunit"
local H = require "helpers"
local steep = H.steep

local C, I = steep.complex, steep.I
local t, x = steep.var("t"), steep.param("x")
local pi = math.pi

local function cabs(z) return type(z) == "number" and math.abs(z) or z:abs() end

-- angles in (-pi, pi]
local function norm(th)
  th = th % (2 * pi)
  if th > pi then th = th - 2 * pi end
  return th
end

-- |a - b| modulo 2 pi
local function angle_dist(a, b) return math.abs(norm(a - b)) end

local function integral(F, g, contour)
  return steep.integral { var = t, exponent = F, amplitude = g,
    contour = contour or steep.line(0, 1) }
end

-- The saddle of L nearest to z, and its distance.
local function nearest_saddle(L, z)
  local best, bs = math.huge, nil
  for _, s in ipairs(L.saddles) do
    local d = cabs(s.at - z)
    if d < best then best, bs = d, s end
  end
  return bs, best
end

---------------------------------------------------------------------------------------

TestLandscapeValleys = {}

-- Re(c t^n) = |c| r^n cos(arg c + n theta): the integrand exp(c t^n) decays at infinity
-- exactly in the n open sectors where cos(arg c + n theta) < 0, i.e.
-- theta in ((pi/2 - arg c + 2 pi k)/n, (3 pi/2 - arg c + 2 pi k)/n), k = 0..n-1
-- (exact; the standard sector rule for a polynomial exponent).
function TestLandscapeValleys:test_monomial_sectors()
  for _, c in ipairs({ C(1), C(-1), I, C(2, -3), C(-0.5, 0.25), C(0, -7) }) do
    local phi = c:arg()
    for n = 2, 5 do
      local msg = string.format("exp(%s t^%d)", tostring(c), n)
      local L = integral(c * t ^ n):landscape {}
      lu.assertEquals(#L.valleys, n, msg .. ": number of valleys")
      lu.assertEquals(L.growth.growth, n, msg .. ": growth degree")
      -- the leading coefficient c, by the trapezoidal rule on c t^n / t^n (exact up to
      -- rounding)
      H.close(L.growth.leading, c, 1e-12, msg .. ": leading coefficient")
      local matched = {}
      for _, v in ipairs(L.valleys) do
        lu.assertEquals(v.type, "polynomial", msg .. ": valley type")
        -- width pi/n
        lu.assertTrue(math.abs((v.to - v.from) - pi / n) <= 1e-9,
          string.format("%s: valley (%.12g, %.12g) has width %.12g, want pi/%d", msg, v.from,
            v.to, v.to - v.from, n))
        -- independently of the formula: the integrand decays in the middle of the sector
        -- and its edges are where cos(arg c + n theta) = 0
        local mid = 0.5 * (v.from + v.to)
        lu.assertTrue(math.cos(phi + n * mid) < -0.99, msg .. ": decay inside the valley")
        lu.assertTrue(math.abs(math.cos(phi + n * v.from)) <= 1e-9, msg .. ": edge at from")
        lu.assertTrue(math.abs(math.cos(phi + n * v.to)) <= 1e-9, msg .. ": edge at to")
        local k0
        for k = 0, n - 1 do
          local from = (pi / 2 - phi + 2 * pi * k) / n
          local to = (3 * pi / 2 - phi + 2 * pi * k) / n
          if angle_dist(v.from, from) <= 1e-9 and angle_dist(v.to, to) <= 1e-9 then k0 = k end
        end
        lu.assertNotNil(k0, string.format("%s: valley (%.12g, %.12g) is not one of the sectors",
          msg, v.from, v.to))
        lu.assertNil(matched[k0], msg .. ": sector reported twice")
        matched[k0] = true
      end
    end
  end
end

-- The steepest descent paths out of the saddle of order n of t^n at 0 run along the
-- rays where t^n is negative real, one into each valley (exact).
function TestLandscapeValleys:test_monomial_descent_paths_reach_every_valley()
  for n = 2, 5 do
    local L = integral(t ^ n):landscape {}
    lu.assertEquals(#L.saddles, 1, "t^" .. n .. ": one saddle")
    local p = L.paths[1]
    lu.assertEquals(#p.descent, n, "t^" .. n .. ": descent paths")
    local seen = {}
    for _, d in ipairs(p.descent) do
      local k = tonumber(d.ends:match("^valley (%d+)$"))
      lu.assertNotNil(k, "t^" .. n .. ": a descent path ends at " .. d.ends)
      lu.assertNil(seen[k], "t^" .. n .. ": two descent paths end in valley " .. tostring(k))
      seen[k] = true
      -- its far end lies on a ray where t^n < 0: direction (2j+1) pi / n
      local last = d.points[#d.points]
      local th = last:arg()
      local best = math.huge
      for j = 0, n - 1 do best = math.min(best, angle_dist(th, (2 * j + 1) * pi / n)) end
      lu.assertTrue(best <= 1e-6, string.format("t^%d: descent path ends at angle %.9g, "
        .. "%.3g from the nearest ray where t^n < 0", n, th, best))
    end
  end
end

---------------------------------------------------------------------------------------

TestLandscapeSaddles = {}

-- F with F' = prod (t - r_k): F = sum_j p_j t^(j+1)/(j+1) where prod (t - r_k) = sum p_j t^j.
local function poly_with_critical_points(roots)
  local p = { [0] = C(1) }
  for _, r in ipairs(roots) do
    local q = {}
    for j = 0, #p + 1 do
      q[j] = (p[j - 1] or C(0)) - r * (p[j] or C(0))
    end
    q[#p + 1] = p[#p]
    p = q
  end
  local F, Fv = 0, function(z)
    local s = C(0)
    for j = 0, #p do s = s + p[j] * z ^ (j + 1) / (j + 1) end
    return s
  end
  for j = 0, #p do F = F + p[j] / (j + 1) * t ^ (j + 1) end
  return F, Fv
end

function TestLandscapeSaddles:test_simple_saddles_at_known_points()
  -- exact: the saddles are the zeros of F' = prod (t - r_k), each simple, with
  -- F''(r_j) = prod_{k ~= j} (r_j - r_k)
  local sets = {
    { C(1), C(-2, 1), C(0.5, -1.5) },
    { C(2), C(-1), C(0, 1.5), C(-0.5, -1), C(0.3, 0.2) },
  }
  for _, roots in ipairs(sets) do
    local F, Fv = poly_with_critical_points(roots)
    local L = integral(F):landscape {}
    local msg = "F' with zeros " .. #roots
    lu.assertEquals(L.saddle_count.status, "complete", msg .. ": count status")
    lu.assertEquals(L.saddle_count.count, #roots, msg .. ": argument-principle count")
    lu.assertEquals(#L.saddles, #roots, msg .. ": saddles found")
    for j, r in ipairs(roots) do
      local s, d = nearest_saddle(L, r)
      lu.assertTrue(d <= 1e-12 * math.max(1, cabs(r)),
        string.format("%s: saddle %s found at distance %.3g", msg, tostring(r), d))
      lu.assertEquals(s.order, 2, msg .. ": order at " .. tostring(r))
      local F2 = C(1)
      for k, q in ipairs(roots) do if k ~= j then F2 = F2 * (r - q) end end
      H.close(s.F2, F2, 1e-11, msg .. ": F'' at " .. tostring(r))
      -- F(r) by Horner-free direct sum; relative to max(|F|, 1) (the terms are O(1..10))
      H.close(s.F, Fv(r), 1e-12, msg .. ": F at " .. tostring(r), 1)
    end
  end
end

function TestLandscapeSaddles:test_degenerate_saddles()
  -- exact: t^3 has a saddle of order 3 at 0 (F = t^3: F - F(0) = 1 * t^3), t^4 one of
  -- order 4; (t-1)^3 (t+2) has F' = (t-1)^2 (4t + 5): order 3 at 1 with
  -- F - F(1) = 3 (t-1)^3 + (t-1)^4, and a simple saddle at -5/4 with F(-5/4) = -2187/256,
  -- F''(-5/4) = 81/4. A double zero of F' is located only to about sqrt(eps) in general
  -- (1e-8 relative to max(1, |t0|) allowed).
  local cases = {
    { F = t ^ 3, saddles = { { at = 0, order = 3, coef = 1, F = 0 } } },
    { F = t ^ 4, saddles = { { at = 0, order = 4, coef = 1, F = 0 } } },
    { F = (t - 1) ^ 3 * (t + 2), saddles = {
      { at = 1, order = 3, coef = 3, F = 0 },
      { at = -1.25, order = 2, coef = 81 / 8, F = -2187 / 256 } } },
  }
  for _, case in ipairs(cases) do
    local msg = tostring(case.F)
    local L = integral(case.F):landscape {}
    lu.assertEquals(L.saddle_count.status, "complete", msg .. ": count status")
    lu.assertEquals(#L.saddles, #case.saddles, msg .. ": number of saddles")
    for _, want in ipairs(case.saddles) do
      local s, d = nearest_saddle(L, want.at)
      lu.assertTrue(d <= 1e-8 * math.max(1, math.abs(want.at)),
        string.format("%s: saddle %g found at distance %.3g", msg, want.at, d))
      lu.assertEquals(s.order, want.order, msg .. ": order at " .. want.at)
      -- the leading coefficient of F - F(t0): relative 1e-6 (the location is known to 1e-8)
      H.close(s.coef, want.coef, 1e-6, msg .. ": leading coefficient at " .. want.at)
      H.close(s.F, want.F, 1e-12, msg .. ": F at " .. want.at, 1)
    end
  end
end

-- exp(t) - 2t: F' = e^t - 2 vanishes at log 2 + 2 pi i k for every integer k (exact),
-- with F'' = 2 there.
local function exact_exp_saddles(center, radius)
  local out = {}
  for k = -100, 100 do
    local z = C(math.log(2), 2 * pi * k)
    if cabs(z - center) < radius then out[#out + 1] = z end
  end
  return out
end

function TestLandscapeSaddles:test_infinitely_many_saddles_in_a_region()
  local J = integral(steep.exp(t) - 2 * t)
  for _, region in ipairs({ { center = 0, radius = 10 }, { center = C(0, 6 * pi), radius = 4 },
      { center = C(1, -3), radius = 20 } }) do
    local want = exact_exp_saddles(region.center, region.radius)
    local msg = string.format("exp(t) - 2t in the disc |t - %s| < %g", tostring(region.center),
      region.radius)
    local L = J:landscape { region = region }
    lu.assertEquals(L.saddle_count.status, "complete", msg .. ": count status")
    lu.assertEquals(#L.saddles, #want, msg .. ": number of saddles")
    for _, z in ipairs(want) do
      local s, d = nearest_saddle(L, z)
      lu.assertTrue(d <= 1e-12 * math.max(1, cabs(z)),
        string.format("%s: saddle %s found at distance %.3g", msg, tostring(z), d))
      lu.assertEquals(s.order, 2, msg .. ": order")
      H.close(s.F2, 2, 1e-12, msg .. ": F'' at " .. tostring(z))
    end
    -- the valleys of e^(e^t - 2t) are strips to the right: Re(e^t) = e^(Re t) cos(Im t)
    -- -> -infinity where cos(Im t) < 0, Im t in (pi/2, 3pi/2) + 2 pi k (exact); to the
    -- left -2t grows: no sector
    for _, v in ipairs(L.valleys) do
      lu.assertEquals(v.type, "strip", msg .. ": no sector valleys, only strips reached")
    end
    lu.assertEquals(#L.strip_families, 1, msg .. ": one strip family")
    local f = L.strip_families[1]
    H.close(f.direction, 0, 1e-12, msg .. ": strips to the right", 1e-12)
    H.close(f.period, 2 * pi, 1e-12, msg .. ": period")
    H.close(math.cos(f.lo + math.pi / 2), -1, 1e-12, msg .. ": strip starts where cos(Im t) = 0")
    lu.assertTrue(math.cos(0.5 * (f.lo + f.hi)) < -0.999, msg .. ": decay inside the strip")
  end
end

function TestLandscapeSaddles:test_infinitely_many_saddles_default_region()
  -- F = e^t - t^2: F' = e^t - 2t has infinitely many zeros, not periodic. With no region
  -- given, the saddle count grows with every circle: the landscape limits its region,
  -- says so in a note, and what it finds are true saddles (F' = 0 there, to rounding)
  local J = integral(steep.exp(t) - t ^ 2, nil, steep.line(0, 10))
  local L = J:landscape {}
  lu.assertTrue(L.region.bounded == true, "the region is marked as limited")
  lu.assertTrue(L.region.radius < math.huge, "finite region")
  local noted = false
  for _, n in ipairs(L.notes) do
    if n:find("infinitely many", 1, true) and n:find("region = {", 1, true) then noted = true end
  end
  lu.assertTrue(noted, "a note says the saddles keep growing: " .. table.concat(L.notes, "; "))
  lu.assertTrue(#L.saddles >= 3, "saddles found")
  for _, s in ipairs(L.saddles) do
    local z = s.at
    local dF = steep.exp(z) - 2 * z
    lu.assertTrue(cabs(dF) <= 1e-12 * (1 + 2 * cabs(z)),
      "saddle " .. tostring(z) .. " is a zero of e^t - 2t: |F'| = " .. cabs(dF))
  end
end

-- A periodic F' (e^t - 2, period 2 pi i): every family found exactly, its copies
-- log 2 + 2 pi i k where the contour lies and one period beyond on either side, the
-- region no larger than that band needs, and the family reported once (exact saddles).
function TestLandscapeSaddles:test_periodic_saddle_family_default_region()
  local J = integral(steep.exp(t) - 2 * t, nil, steep.line(0, 10))
  local L = J:landscape {}
  lu.assertFalse(L.region.bounded == true, "the region is not a guess")
  lu.assertEquals(L.saddle_count.status, "complete")
  lu.assertNotNil(L.periodic, "the family is recognised")
  H.close(L.periodic.period, C(0, 2 * pi), 1e-14, "period 2 pi i")
  H.close(L.periodic.shift, C(0, -4 * pi), 1e-12, "F(t + 2 pi i) - F(t) = -4 pi i")
  -- the contour lies on Im t = 0: copies k = -1, 0, 1
  lu.assertEquals(#L.saddles, 3, "three copies")
  for _, k in ipairs({ -1, 0, 1 }) do
    local s, d = nearest_saddle(L, C(math.log(2), 2 * pi * k))
    lu.assertTrue(d <= 1e-13, "copy " .. k .. " at log 2 + 2 pi i k")
    lu.assertEquals(s.copy, k, "copy number")
    H.close(s.F2, 2, 1e-13, "F'' = e^t = 2")
  end
  lu.assertTrue(L.region.radius <= 16, "region radius " .. L.region.radius)
  local text = L:report()
  local _, n = text:gsub("family %d:", "")
  lu.assertEquals(n, 1, "one family line: " .. text)
  lu.assertStrContains(text, "period 6.283185307i")
end

function TestLandscapeSaddles:test_periodic_exponent_with_parameter()
  -- x (t - e^t): F' = x (1 - e^t) vanishes at 2 pi i k (exact), F'' = -x there
  local J = integral(x * (t - steep.exp(t)))
  local L = J:landscape { x = 3, region = { center = C(0, 1), radius = 8 } }
  local want = { C(0, 0), C(0, 2 * pi), C(0, -2 * pi) }   -- |2 pi i k - i| < 8
  lu.assertEquals(L.saddle_count.status, "complete")
  lu.assertEquals(#L.saddles, #want, "saddles in |t - i| < 8")
  for _, z in ipairs(want) do
    local s, d = nearest_saddle(L, z)
    lu.assertTrue(d <= 1e-12 * math.max(1, cabs(z)), "saddle " .. tostring(z))
    H.close(s.F2, -3, 1e-12, "F'' at " .. tostring(z))
    H.close(s.F, 3 * (z - steep.exp(z)), 1e-12, "F at " .. tostring(z), 1)
  end
end

---------------------------------------------------------------------------------------

TestLandscapeSingularities = {}

local function only_singularity(L, msg)
  lu.assertEquals(#L.singularities, 1, msg .. ": one singularity")
  return L.singularities[1]
end

function TestLandscapeSingularities:test_simple_pole_of_the_amplitude()
  -- exp(-t^2)/(t - a): a simple pole with residue exp(-a^2) (exact)
  for _, a in ipairs({ C(0.5, 0.3), C(-1.2, 0.7), C(0, -0.4) }) do
    local J = integral(-t ^ 2, 1 / (t - a), steep.line(steep.inf(pi), steep.inf(0)))
    local msg = "exp(-t^2)/(t - " .. tostring(a) .. ")"
    local s = only_singularity(J:landscape {}, msg)
    lu.assertEquals(s.kind, "pole", msg)
    lu.assertEquals(s.order, 1, msg .. ": order")
    lu.assertTrue(cabs(s.at - a) <= 1e-12 * math.max(1, cabs(a)), msg .. ": location " .. tostring(s.at))
    local want = steep.exp(-a * a)
    H.close(s.residue, want, 1e-12, msg .. ": residue")
    -- its error estimate is honest
    lu.assertTrue(cabs(s.residue - want) <= s.residue_error + 1e-15 * cabs(want),
      msg .. ": residue error estimate")
  end
end

-- Where a singular point's subexpression is a polynomial by its form (landscape.poly_degree)
-- its zeros are the polynomial's roots, not a search's: all of them in the region, each
-- once with its multiplicity (exact values: the roots of (t - a)^2 (t - b) and t^3 + 8).
function TestLandscapeSingularities:test_polynomial_singular_points()
  local landscape = require "steep.landscape"
  lu.assertEquals(landscape.poly_degree((t - 1) * (t + x) ^ 2 / 3, t), 3)
  lu.assertEquals(landscape.poly_degree(x * t ^ 4 + steep.log(x) * t, t), 4)
  lu.assertEquals(landscape.poly_degree(steep.exp(x) + 2, t), 0)
  lu.assertNil(landscape.poly_degree(1 / t + 1, t))
  lu.assertNil(landscape.poly_degree(steep.sqrt(t), t))
  local a, b = C(0.5, 0.3), C(-1, -0.5)
  local J = integral(-t ^ 2, 1 / ((t - a) ^ 2 * (t - b)), steep.line(steep.inf(pi), steep.inf(0)))
  local L = J:landscape {}
  lu.assertEquals(#L.singularities, 2, "two poles")
  for _, s in ipairs(L.singularities) do
    local want, order = cabs(s.at - a) < 0.1 and a or b, cabs(s.at - a) < 0.1 and 2 or 1
    lu.assertTrue(cabs(s.at - want) <= 1e-12, "pole at " .. tostring(want))
    lu.assertEquals(s.order, order, "order of the pole at " .. tostring(want))
  end
  -- three simple poles at the cube roots of -8 (2 e^{i pi/3}, -2, 2 e^{-i pi/3})
  local K = integral(-t ^ 2, 1 / (t ^ 3 + 8), steep.line(steep.inf(pi), steep.inf(0)))
  local poles = K:landscape { region = { center = 0, radius = 4 } }.singularities
  lu.assertEquals(#poles, 3, "three poles")
  for _, s in ipairs(poles) do
    H.close(s.at ^ 3, -8, 1e-14, "a cube root of -8")
    lu.assertEquals(s.order, 1)
  end
end

function TestLandscapeSingularities:test_double_pole_of_the_amplitude()
  -- exp(-t^2)/(t - a)^2: a double pole with residue d/dt exp(-t^2) at a = -2a exp(-a^2)
  local a = C(0.5, 0.3)
  local J = integral(-t ^ 2, 1 / (t - a) ^ 2, steep.line(steep.inf(pi), steep.inf(0)))
  local s = only_singularity(J:landscape {}, "double pole")
  lu.assertEquals(s.kind, "pole")
  lu.assertEquals(s.order, 2, "order")
  lu.assertTrue(cabs(s.at - a) <= 1e-12 * math.max(1, cabs(a)), "location " .. tostring(s.at))
  H.close(s.residue, -2 * a * steep.exp(-a * a), 1e-11, "residue of a double pole")
end

function TestLandscapeSingularities:test_pole_under_a_fast_exponent()
  -- exp(-x (t - i)^2)/(t - i/2): still a simple pole, residue exp(x/4) (exact: at t = i/2,
  -- -x (t - i)^2 = -x (-i/2)^2 = x/4), for x large enough that the integrand changes by
  -- e^(2x rho) around a circle of radius rho about the pole
  local J = integral(-x * (t - I) ^ 2, 1 / (t - I / 2), steep.line(steep.inf(pi), steep.inf(0)))
  for _, xv in ipairs({ 1, 10, 30, 100 }) do
    local msg = "x = " .. xv
    local s = only_singularity(J:landscape { x = xv }, msg)
    lu.assertEquals(s.kind, "pole", msg)
    lu.assertEquals(s.order, 1, msg .. ": order")
    H.close(s.residue, math.exp(xv / 4), 1e-12, msg .. ": residue")
  end
end

function TestLandscapeSingularities:test_branch_point_of_the_amplitude()
  -- sqrt(t - a) has a branch point at a (exact)
  local a = C(0.5, 0.3)
  local J = integral(-t ^ 2, steep.sqrt(t - a), steep.line(steep.inf(pi), steep.inf(0)))
  local s = only_singularity(J:landscape {}, "sqrt(t - a)")
  lu.assertEquals(s.kind, "branch")
  lu.assertTrue(cabs(s.at - a) <= 1e-12 * math.max(1, cabs(a)), "location " .. tostring(s.at))
  lu.assertNil(s.residue, "no residue at a branch point")
end

function TestLandscapeSingularities:test_log_point_of_the_exponent()
  -- exp(x log t - t) = t^x e^(-t) (exact): at 0 the integrand vanishes for Re x > 0 (a sink,
  -- a branch point unless x is an integer), blows up for Re x < 0 (a hill), and has a pole
  -- of order n for x = -n, with residue (-1)^(n-1)/(n-1)! (the coefficient of t^(n-1) in
  -- e^(-t)).
  local J = integral(x * steep.log(t) - t, nil, steep.line(1, steep.inf(0)))
  for _, case in ipairs({
      { x = 2.5, kind = "sink" }, { x = C(1.5, 0.5), kind = "sink" },
      { x = -0.5, kind = "hill" }, { x = C(-0.5, 2), kind = "hill" },
      { x = -3, kind = "pole", order = 3, residue = 0.5 },
      { x = -1, kind = "pole", order = 1, residue = 1 } }) do
    local msg = "t^x e^-t at x = " .. tostring(case.x)
    local s = only_singularity(J:landscape { x = case.x }, msg)
    lu.assertEquals(s.kind, case.kind, msg)
    -- at 0: relative to the scale 1 of the problem (the contour [1, inf))
    lu.assertTrue(cabs(s.at) <= 1e-12, msg .. ": location " .. tostring(s.at))
    -- the coefficient of log t in F, by the trapezoidal rule on F' (rel. 1e-10)
    H.close(s.coefficient, case.x, 1e-10, msg .. ": log coefficient")
    if case.kind ~= "pole" then lu.assertTrue(s.branch == true, msg .. ": a branch point") end
    if case.order then
      lu.assertEquals(s.order, case.order, msg .. ": order")
      H.close(s.residue, case.residue, 1e-12, msg .. ": residue")
    end
  end
end

---------------------------------------------------------------------------------------

TestLandscapeErrors = {}

function TestLandscapeErrors:test_end_outside_every_valley()
  -- exp(-x t^2) decays only in |arg t| < pi/4 and |arg t - pi| < pi/4 (exact sectors)
  local J = integral(-x * t ^ 2, nil, steep.path { 0, steep.inf(pi / 2) })
  H.raises({ "finishing end at infinity", "direction 1.5708", "outside every valley",
    "(-0.7854, 0.7854)", "(2.356, 3.927)" }, function() return J:quad { x = 1 } end)
  local J2 = integral(-t ^ 2, nil, steep.path { steep.inf(-pi / 2), 0, steep.inf(0) })
  H.raises({ "starting end at infinity", "direction -1.5708", "outside every valley" },
    function() return J2:quad {} end)
end

function TestLandscapeErrors:test_pole_on_the_contour()
  local J = integral(-t ^ 2, 1 / (t - 0.5), steep.line(steep.inf(pi), steep.inf(0)))
  for _, along in ipairs({ "deformed", "given" }) do
    H.raises({ "pole of the integrand lies on the contour at 0.5", "t - 0.5" },
      function() return J:quad { along = along } end)
  end
end

function TestLandscapeErrors:test_bad_region()
  local J = integral(-t ^ 2)
  for _, r in ipairs({ 0, -1, 0 / 0, math.huge }) do
    H.raises({ "landscape: region radius must be a positive finite number" },
      function() return J:landscape { region = { center = 0, radius = r } } end)
    H.raises({ "quad: region radius must be a positive finite number" },
      function() return J:quad { region = { center = 0, radius = r } } end)
  end
  H.raises({ "region radius must be a positive finite number, got nil" },
    function() return J:landscape { region = { center = 0 } } end)
  H.raises({ "option 'region' must be a table" }, function() return J:landscape { region = 3 } end)
  H.raises({ "region center must be a finite number or complex value" },
    function() return J:landscape { region = { center = "a", radius = 1 } } end)
end

function TestLandscapeErrors:test_unbound_parameter()
  local J = integral(-x * t ^ 2, nil, steep.line(steep.inf(pi), steep.inf(0)))
  H.raises({ "landscape: unbound parameter 'x'", "x = <value>" },
    function() return J:landscape {} end)
  H.raises({ "quad: unbound parameter 'x'" }, function() return J:quad {} end)
  H.raises({ "parameter 'x' is not finite" }, function() return J:quad { x = 0 / 0 } end)
end

function TestLandscapeErrors:test_exponent_not_an_expression()
  H.raises({ "field 'exponent' must be an expression in t, got number" },
    function() return integral(3) end)
  H.raises({ "field 'exponent' must be an expression in t, got a complex value" },
    function() return integral(C(1, 2)) end)
  H.raises({ "does not depend on t" }, function() return integral(x * 2) end)
end

function TestLandscapeErrors:test_unknown_option()
  local J = integral(-x * t ^ 2, nil, steep.line(steep.inf(pi), steep.inf(0)))
  H.raises({ "quad: unknown option 'foo'", "parameters: x", "options: along, region" },
    function() return J:quad { x = 1, foo = 2 } end)
  H.raises({ "landscape: unknown option 'along'" },
    function() return J:landscape { x = 1, along = "given" } end)
  H.raises({ "quad: option 'along' must be \"deformed\" or \"given\"" },
    function() return J:quad { x = 1, along = "straight" } end)
  H.raises({ "unknown field 'bogus'" }, function()
    return steep.integral { var = t, exponent = -t ^ 2, contour = steep.line(0, 1), bogus = 1 }
  end)
end
