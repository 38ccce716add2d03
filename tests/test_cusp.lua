-- Tests of the uniform form for three saddles together (the cusp, lua/steep/cusp.lua):
-- its map and model integrals on their own.
local lu = require "luaunit"
local H = require "helpers"
local gsl = require "gslref"
local steep = H.steep
local cusp = require "steep.cusp"

local I, pi = steep.I, math.pi
local EPS = 2.220446049250313e-16

local function cabs(z) return type(z) == "number" and math.abs(z) or z:abs() end
local function expi(th) return steep.complex(math.cos(th), math.sin(th)) end

-- The contributions of a result that use the cusp form, and a list of every kind.
local function cusp_parts(r)
  local found, kinds = {}, {}
  for _, c in ipairs(r.contributions) do
    kinds[#kinds + 1] = c.kind
    if c.kind:find("cusp", 1, true) then found[#found + 1] = c end
  end
  return found, table.concat(kinds, "; ")
end

-- |expansion - reference| within the expansion's estimate plus the reference's (1x).
local function within(r, ref, ref_err, msg)
  local d = cabs(r.value - ref)
  if not (d <= r.error + ref_err) then
    lu.fail(string.format("%s: |expansion - reference| = %.3g exceeds the estimates %.3g + "
      .. "%.3g; expansion %s, reference %s", msg, d, r.error, ref_err, tostring(r.value),
      tostring(ref)))
  end
  return d
end

---------------------------------------------------------------------------------------

TestCuspParts = {}

-- The map of an exact quartic: F(t) = A0 + P((t - t0)/beta) with P(u) = -(u^4/4 -
-- zeta u^2/2 + eta u) has its saddles at t0 + beta u_j (u_j the roots of u^3 - zeta u +
-- eta); the map built from the saddles alone must give back A0, zeta and eta (beta has
-- argument below pi/4, the principal root the map starts from) and t'(u_j) = beta. Exact
-- algebra (no outside reference).
function TestCuspParts:test_map_of_an_exact_quartic()
  local zeta, eta = steep.complex(0.3, 0.2), steep.complex(0.1, -0.05)
  local beta, t0, A0 = 1.3 * expi(0.2), steep.complex(2, 0.5), steep.complex(-0.4, 1.1)
  local function P(u) return -(u * (u * (0.25 * u * u - 0.5 * zeta) + eta)) end
  -- the roots by Newton's method from three guesses (the cubic is near u^3 - 0.3 u)
  local roots = {}
  for k, g in ipairs({ steep.complex(0.6, 0.1), steep.complex(0.3, 0), steep.complex(-0.7, -0.1) }) do
    local u = g
    for _ = 1, 60 do u = u - (u * u * u - zeta * u + eta) / (3 * u * u - zeta) end
    roots[k] = u
  end
  lu.assertTrue(cabs(roots[1] - roots[2]) > 0.1 and cabs(roots[2] - roots[3]) > 0.1
    and cabs(roots[1] - roots[3]) > 0.1, "three distinct roots")
  local S = {}
  for k, u in ipairs(roots) do
    -- F''(t) = P''(u) / beta^2 with P'' = -(3u^2 - zeta)
    S[k] = { at = t0 + beta * u, F = A0 + P(u), F2 = -(3 * u * u - zeta) / (beta * beta) }
  end
  local map = assert(cusp.quartic_map(S[1], S[2], S[3]))
  H.close(map.zeta, zeta, 1e-13, "zeta")
  H.close(map.eta, eta, 1e-12, "eta")
  H.close(map.A, A0, 1e-14, "A")
  for k = 1, 3 do
    H.close(map.u[k], roots[k], 1e-13, "root " .. k)
    H.close(map.tp[k], beta, 1e-13, "t'(u_" .. k .. ")")
  end
  -- three saddles that no quartic map sends onto a cusp: values and second derivatives
  -- that contradict their places (common practice: the chords must match t' at the ends)
  local bad = { { at = steep.complex(0, 0), F = steep.complex(0, 0), F2 = steep.complex(1, 0) },
    { at = steep.complex(1, 0), F = steep.complex(0, 3), F2 = steep.complex(0, 50) },
    { at = steep.complex(0, 4), F = steep.complex(2, 0), F2 = steep.complex(-0.01, 0) } }
  local none, why = cusp.quartic_map(bad[1], bad[2], bad[3])
  lu.assertNil(none, "an inconsistent triple is refused")
  lu.assertEquals(type(why), "string")
end

-- The model integrals against their Maclaurin series in zeta and eta: between the valleys
-- about the directions a pi/2 and b pi/2,
--   integral of u^n e^{-u^4/4} du = (w_b^(n+1) - w_a^(n+1)) 4^((n+1)/4 - 1) Gamma((n+1)/4)
-- (w_k = e^{i k pi/2}; the ray integral by v = u^4/4 and Euler's integral, DLMF 5.2.1),
-- and e^{zeta u^2/2 - eta u} expanded term by term (the integrand is entire and the
-- moments decay like Gamma((n+1)/4): the sum converges; for |zeta|, |eta| <= 1 its terms
-- do not cancel). Gamma from gsl_sf_gamma. Within the quadrature's own estimate plus the
-- series' rounding (16 eps times the sum of the terms' sizes).
function TestCuspParts:test_model_integrals_against_their_series()
  local cases = {
    { zeta = steep.complex(0.4, 0.3), eta = steep.complex(-0.2, 0.1), from = 2, to = 0 },
    { zeta = steep.complex(-0.8, 0.1), eta = steep.complex(0.5, 0), from = 3, to = 1 },
    { zeta = steep.complex(0, 1), eta = steep.complex(0.3, -0.6), from = 0, to = 1 },
    { zeta = steep.complex(1e-9, 0), eta = steep.complex(0, 0), from = 2, to = 0 },
  }
  for _, case in ipairs(cases) do
    local boundary = { [0] = 0, 0, 0, 0 }
    boundary[case.from], boundary[case.to] = -1, 1
    local map = { zeta = case.zeta, eta = case.eta, u = { 0, 0, 0 } }
    local Iq, Eq = cusp.model_integrals(map, boundary)
    lu.assertNotNil(Iq, "model integrals by quadrature")
    for m = 0, 2 do
      local sum, size = steep.complex(0, 0), 0
      local fj = steep.complex(1, 0)
      for j = 0, 60 do
        local fk = steep.complex(1, 0)
        for k = 0, 60 do
          local n = m + 2 * j + k
          local w = expi((n + 1) * case.to * pi / 2) - expi((n + 1) * case.from * pi / 2)
          local term = fj * fk * w * 4 ^ ((n + 1) / 4 - 1) * gsl.gamma((n + 1) / 4)
          sum, size = sum + term, size + cabs(term)
          fk = fk * (-case.eta) / (k + 1)
        end
        fj = fj * (case.zeta / 2) / (j + 1)
      end
      local msg = string.format("I_%d, zeta = %s, eta = %s, valleys %d -> %d", m,
        tostring(case.zeta), tostring(case.eta), case.from, case.to)
      local d = cabs(Iq[m] - sum)
      lu.assertTrue(d <= Eq[m] + 16 * EPS * size, string.format("%s: quadrature %s, series %s, "
        .. "difference %.3g, estimates %.3g + %.3g", msg, tostring(Iq[m]), tostring(sum), d,
        Eq[m], 16 * EPS * size))
      lu.assertTrue(Eq[m] < 1e-10 * math.max(cabs(sum), 1), msg .. ": a small estimate")
    end
  end
end
