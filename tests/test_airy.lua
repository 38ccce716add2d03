-- Tests of the Airy functions steep.airy and steep.airy_bi (ext/airy.c): against GSL on
-- the real axis; at complex points against the Maclaurin series summed here in plain
-- double precision with its own rounding bound, and against quadrature of the integral
-- DLMF 9.5.4 along its steepest descent deformation (the library's J:quad, which shares
-- nothing with ext/airy.c); identities at complex points of every size; statuses past
-- the range of a double; bad input. Every comparison allows the reported error estimate
-- plus the reference's own.
local lu = require "luaunit"
local H = require "helpers"
local gsl = require "gslref"
local steep = H.steep

local I, pi, eps = steep.I, math.pi, 2.220446049250313e-16
local C = steep.complex

local function cabs(z) return type(z) == "number" and math.abs(z) or z:abs() end

TestAiry = {}

-- |got - want| <= (our estimate) + (the reference's error), with a message.
local function within(got, err, want, ref_err, msg)
  local d = cabs(got - want)
  if not (d <= err + ref_err) then
    lu.fail(string.format("%s: |value - reference| = %.3g exceeds %.3g + %.3g (value %s, "
      .. "reference %s)", msg, d, err, ref_err, tostring(got), tostring(want)))
  end
end

-- Real points where GSL's own estimates fall short, and at both methods' edges: the
-- Maclaurin series (DLMF 9.4.1-9.4.2, a_0 = Ai(0) from Gamma(1/3) by DLMF 9.2.3) summed
-- in 150-digit decimal arithmetic with an arbitrary-precision calculator (bc): exact to
-- the digits given. The estimate must bound the error (the reference's own is nil).
local PRECISE = {
  { x = -12, ai = -0.0665551750543731294741896623595965263, aip = 1.02311045336797072989598432236278283 },
  { x = -10.5, ai = -0.311926035051050600854618572121706653, aip = 0.0909574873906816728788981087546629668 },
  { x = -8.5, ai = -0.330290237630208879021700102898908070, aip = -0.0323133482846391358728827385293273544 },
  { x = -5.5, ai = 0.0177815412765749756030201514972446065, aip = 0.864197217771398390772111894692317537,
    bi = -0.367813453915711991094707777081219341, bip = 0.0251115830736309259887557995600780798 },
  { x = -3.25, ai = -0.419013266805230802239046920624021954, aip = -0.00245384818794818649737462287614563 },
  { x = 8.7, ai = 6.08260821877454449564061782142e-9, aip = -1.81118760461761228077194899162e-8 },
  { x = 10, ai = 1.1047532552898685933550205657e-10, aip = -3.520633676738923636620644825e-10,
    bi = 455641153.548225140999787308106493995, bip = 1429236134.48286577611883144781389316 },
}

function TestAiry:test_real_axis_against_precise_sums()
  for _, p in ipairs(PRECISE) do
    local ai, aip, e, ep = steep.airy(p.x)
    -- (on the negative axis, relative to the oscillation's amplitude, as below)
    local amp = p.x < 0 and math.abs(p.x) ^ -0.25 / math.sqrt(pi) or 0
    local ampd = p.x < 0 and math.abs(p.x) ^ 0.25 / math.sqrt(pi) or 0
    local checks = { { "Ai", ai, e, p.ai, amp }, { "Ai'", aip, ep, p.aip, ampd } }
    if p.bi then
      local bi, bip, eb, ebp = steep.airy_bi(p.x)
      checks[3], checks[4] = { "Bi", bi, eb, p.bi, amp }, { "Bi'", bip, ebp, p.bip, ampd }
    end
    for _, c in ipairs(checks) do
      local msg = string.format("%s(%g)", c[1], p.x)
      -- (the reference rounded to a double differs from it by half an ulp)
      within(c[2], c[3], c[4], eps * math.abs(c[4]), msg)
      H.close(c[2], c[4], 4e-15, msg, c[5])
    end
  end
end

-- x from -12 to 16 in steps of 1/4 (both methods and the band where both are computed,
-- 9 <= |x| < 12): Ai, Ai', Bi, Bi' against gsl_sf_airy_Ai_e, _Ai_deriv_e, _Bi_e,
-- _Bi_deriv_e, allowing twice their own error estimates or 1e-14 of the size below, the
-- larger (their estimates fall short at a few points: Ai'(-8.5) is 3.7e-15 off against the
-- precise sum above, with an estimate of 7.2e-16); real values; estimates below
-- 1e-14 of the function's size (on the negative axis, of its oscillation amplitude
-- |x|^(-1/4)/sqrt(pi), |x|^(1/4)/sqrt(pi) for the derivatives: DLMF 9.7.9-9.7.10, from
-- memory).
function TestAiry:test_real_axis_against_gsl()
  for k = -48, 64 do
    local xv = k / 4
    local amp = xv < 0 and math.abs(xv) ^ -0.25 / math.sqrt(pi) or 0
    local ampd = xv < 0 and math.abs(xv) ^ 0.25 / math.sqrt(pi) or 0
    local ai, aip, e, ep, st = steep.airy(xv)
    local bi, bip, eb, ebp, stb = steep.airy_bi(xv)
    lu.assertEquals(st, "ok", "status at " .. xv)
    lu.assertEquals(stb, "ok", "Bi status at " .. xv)
    local checks = {
      { "Ai", ai, e, { gsl.airy_Ai(xv) }, amp }, { "Ai'", aip, ep, { gsl.airy_Ai_deriv(xv) }, ampd },
      { "Bi", bi, eb, { gsl.airy_Bi(xv) }, amp }, { "Bi'", bip, ebp, { gsl.airy_Bi_deriv(xv) }, ampd } }
    for _, c in ipairs(checks) do
      local name, v, err, ref, size = c[1], c[2], c[3], c[4], c[5]
      local msg = string.format("%s(%g)", name, xv)
      lu.assertEquals(v:im(), 0, msg .. " is real")
      size = math.max(size, math.abs(ref[1]))
      within(v, err, ref[1], math.max(2 * ref[2], 1e-14 * size), msg)
      lu.assertTrue(err <= 1e-14 * size, string.format("%s: estimate %.3g above 1e-14 of %.3g",
        msg, err, size))
    end
  end
end

-- The Maclaurin series Ai(z) = sum a_n z^n, a_{n+3} = a_n / ((n+2)(n+3)), a_2 = 0 (DLMF
-- 9.4.1, with a_0 = Ai(0), a_1 = Ai'(0) from gsl_sf_airy_Ai_e, _Ai_deriv_e) summed in
-- double precision: a bound of its error is (4n + 16) eps times the sum of |terms|, plus
-- the constants' own relative errors carried through.
local function maclaurin(z)
  local a0, e0 = gsl.airy_Ai(0)
  local a1, e1 = gsl.airy_Ai_deriv(0)
  local z3 = z * z * z
  local pa, pb = C(a0, 0), a1 * z
  local qa, qb = C(0, 0), C(a1, 0)
  local s, sd = pa + pb, qb
  local mag, magd = cabs(pa) + cabs(pb), cabs(a1)
  local n = 0
  while true do
    -- q_{n+3} = p_n z^2 / (n+2), p_{n+3} = p_n z^3 / ((n+2)(n+3))
    qa, qb = pa * z * z / (n + 2), pb * z * z / (n + 3)
    pa, pb = pa * z3 / ((n + 2) * (n + 3)), pb * z3 / ((n + 3) * (n + 4))
    s, sd = s + pa + pb, sd + qa + qb
    local m, md = cabs(pa) + cabs(pb), cabs(qa) + cabs(qb)
    mag, magd = mag + m, magd + md
    n = n + 3
    if m <= 1e-18 * mag and md <= 1e-18 * magd and cabs(z3) / ((n + 2) * (n + 3)) < 0.5 then
      break
    end
  end
  local rel0 = math.max(e0 / a0, e1 / math.abs(a1))
  return s, sd, (4 * n + 16) * eps * mag + rel0 * mag, (4 * n + 16) * eps * magd + rel0 * magd
end

-- 60 seeded random points with |z| <= 2.5 (where the double-precision sum's bound stays
-- below 1e-11 relative): steep.airy within its estimate plus the reference's bound.
function TestAiry:test_complex_against_maclaurin()
  H.seeded(function(seed)
    local rnd = H.rng(seed)
    for _ = 1, 60 do
      local r, th = 2.5 * rnd(), 2 * pi * rnd()
      local z = r * steep.exp(I * th)
      local ai, aip, e, ep = steep.airy(z)
      local want, wantd, we, wed = maclaurin(z)
      within(ai, e, want, we, "Ai(" .. tostring(z) .. ") against the Maclaurin sum")
      within(aip, ep, wantd, wed, "Ai'(" .. tostring(z) .. ") against the Maclaurin sum")
      lu.assertTrue(we <= 1e-11 * cabs(want) + 1e-15, "a meaningful reference at " .. tostring(z))
    end
  end)
end

-- Ai(z) = (1/2 pi i) integral from inf e^{-i pi/3} to inf e^{i pi/3} of exp(t^3/3 - z t) dt
-- (DLMF 9.5.4) and Ai'(z) with the amplitude -t, by J:quad along the steepest descent
-- deformation, at points of both methods in every sector (values from 1e-9 to 1e5).
local airy_J, airy_dJ
local function airy_by_quadrature(z)
  if not airy_J then
    local t, zp = steep.var "t", steep.param "z"
    local path = steep.path { steep.inf(-pi / 3), 0, steep.inf(pi / 3) }
    airy_J = steep.integral { var = t, exponent = t ^ 3 / 3 - zp * t, contour = path }
    airy_dJ = steep.integral { var = t, exponent = t ^ 3 / 3 - zp * t, amplitude = -t,
      contour = path }
  end
  local two_pi_i = C(0, 2 * pi)
  local v, e = airy_J:quad { z = z }
  local dv, de = airy_dJ:quad { z = z }
  return v / two_pi_i, dv / two_pi_i, e / (2 * pi), de / (2 * pi)
end

function TestAiry:test_complex_against_quadrature()
  for _, z in ipairs({ 1 + I, -2 + 0.5 * I, 3 - 2 * I, -1 - 3 * I, 0.5 * I, -4 + 0.1 * I,
      6 + 6 * I, -7 + 3 * I, 8 - I, 2 + 8 * I, -9 - 4 * I, C(10, 0), 11 * I, -12 + I,
      C(14, -3), -15 - 0.5 * I }) do
    local ai, aip, e, ep = steep.airy(z)
    local q, qd, qe, qde = airy_by_quadrature(z)
    local msg = tostring(z)
    within(ai, e, q, qe, "Ai(" .. msg .. ") against quadrature")
    within(aip, ep, qd, qde, "Ai'(" .. msg .. ") against quadrature")
    H.close(ai, q, 1e-12, "Ai(" .. msg .. ") to 1e-12")
    H.close(aip, qd, 1e-12, "Ai'(" .. msg .. ") to 1e-12")
  end
end

-- At seeded random points with |z| < 20, omega = e^{2 pi i/3}:
--   Ai(z) + omega Ai(omega z) + omega^2 Ai(omega^2 z) = 0 (DLMF 9.2.12),
--   Ai(z) Bi'(z) - Ai'(z) Bi(z) = 1/pi (DLMF 9.2.7),
--   Bi(z) = e^{i pi/6} Ai(omega z) + e^{-i pi/6} Ai(omega^2 z) (DLMF 9.2.10; the library
--   sums Bi's own Maclaurin series below |z| = 9, so this compares two methods there),
-- each within the estimates carried through (and, for the rotated arguments, their
-- rounding: omega from steep.exp and omega^2 z carry up to 6 eps relative, which moves
-- Ai by |Ai'| 6 eps |z|).
function TestAiry:test_identities()
  H.seeded(function(seed)
    local rnd = H.rng(seed)
    local w, e6 = steep.exp(2 * pi * I / 3), steep.exp(I * pi / 6)
    for _ = 1, 80 do
      local z = 20 * rnd() * steep.exp(2 * pi * I * rnd())
      local msg = "z = " .. tostring(z)
      local a0, d0, e0, f0 = steep.airy(z)
      local a1, d1, e1 = steep.airy(w * z)
      local a2, d2, e2 = steep.airy(w * w * z)
      local b, bd, eb, ebd = steep.airy_bi(z)
      local shift = 6 * eps * cabs(z)
      local roundoff = 4 * eps * (cabs(a0) + cabs(a1) + cabs(a2))
      local s = a0 + w * a1 + w * w * a2
      lu.assertTrue(cabs(s) <= e0 + e1 + e2 + shift * (cabs(d1) + cabs(d2)) + roundoff,
        string.format("%s: connection formula, |sum| = %.3g", msg, cabs(s)))
      local W = a0 * bd - d0 * b
      local eW = e0 * cabs(bd) + ebd * cabs(a0) + f0 * cabs(b) + eb * cabs(d0)
        + 4 * eps * (cabs(a0 * bd) + cabs(d0 * b))
      lu.assertTrue(cabs(W - 1 / pi) <= eW, string.format("%s: Wronskian off by %.3g, "
        .. "estimate %.3g", msg, cabs(W - 1 / pi), eW))
      local b2 = e6 * a1 + e6:conj() * a2
      lu.assertTrue(cabs(b - b2) <= eb + e1 + e2 + shift * (cabs(d1) + cabs(d2))
        + 4 * eps * (cabs(a1) + cabs(a2)), string.format("%s: Bi by DLMF 9.2.10 off by %.3g",
        msg, cabs(b - b2)))
    end
  end)
end

-- Large |z| where the phase zeta = (2/3) z^(3/2) is large (on the negative axis, and where
-- Im zeta is large off it): Ai and Ai' against their asymptotic expansions summed in
-- quadruple precision (gslref.airy_quad; DLMF 9.7.5, 9.7.6, 9.2.12), allowing the
-- reference's rounding to doubles. The low part of Im zeta had entered e^{-i zeta} with
-- the wrong sign: Ai(-1000) was 2.9e-13 off under an estimate of 4.5e-16, and at
-- 1000 e^{i pi/3} 690 times its estimate.
function TestAiry:test_large_phase_against_quad_precision()
  for _, r in ipairs({ 30, 120, 400, 1000, 3000 }) do
    for _, th in ipairs({ pi, 0.93 * pi, 5 * pi / 6, 0.7 * pi, pi / 3, 0.31 * pi, -pi / 3,
        -0.8 * pi, 0.2 }) do
      local z = r * steep.exp(I * th)
      local ai, aip, e, ep, st = steep.airy(z)
      if st == "ok" then
        local ar, ai_im, dr, di = gsl.airy_quad(z:re(), z:im())
        local want, wantd = C(ar, ai_im), C(dr, di)
        local msg = string.format("Ai(%g e^(%.4g i))", r, th)
        within(ai, e, want, 2 * eps * cabs(want), msg)
        within(aip, ep, wantd, 2 * eps * cabs(wantd), msg .. "'")
      else
        -- (only where the value leaves doubles: |Re zeta| beyond 700)
        local zeta = 2 / 3 * z * steep.sqrt(z)
        lu.assertTrue(math.abs(zeta:re()) > 700, "status " .. st .. " at " .. tostring(z))
      end
    end
  end
end

-- Past the range of a double: Ai(200) ~ e^{-1886} is 0 with status "underflow" and an
-- estimate of the smallest normal double; along ph z = 2 pi/3, |Ai(200 e^{2 pi i/3})| ~
-- e^{1886}: infinite, "overflow", infinite estimate.
function TestAiry:test_range_statuses()
  local ai, _, e, _, st = steep.airy(200)
  lu.assertEquals(st, "underflow")
  lu.assertEquals(cabs(ai), 0)
  lu.assertTrue(e >= 2.2250738585072014e-308, "estimate covers the lost value")
  ai, _, e, _, st = steep.airy(200 * steep.exp(2 * pi * I / 3))
  lu.assertEquals(st, "overflow")
  lu.assertEquals(cabs(ai), math.huge)
  lu.assertEquals(e, math.huge)
end

function TestAiry:test_bad_input()
  H.raises({ "bad argument #1 to 'airy'", "finite number or complex value expected" },
    steep.airy, 0 / 0)
  H.raises({ "bad argument #1 to 'airy_bi'", "finite number or complex value expected" },
    steep.airy_bi, C(1, math.huge))
  H.raises({ "bad argument #1 to 'airy_bi'" }, steep.airy_bi, {})
end
