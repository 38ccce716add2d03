-- demo.lua — the whole job on an invented scenario (run it with `make demo`).
--
-- Scenario (invented): a wave-packet model with one resonance. The response at distance x
-- is R(x) = integral over the real line of exp(-0.35 t^2 + i x t) / (t - p) dt with the
-- resonance at p = 1.2 + 0.5i. We want R for large |x| of both signs: by the direct
-- (unrescaled) route, by the rescaled route t = x s that makes the exponent homogeneous,
-- and we want to know whether the rescaling drags the pole across the contour.
--
-- This is an approximation tool: the figures below are checked against quadrature, but
-- anything that feeds an engineering decision must be validated independently.

local steep = require "steep"

local t, s, x = steep.var "t", steep.var "s", steep.param "x"
local I = steep.I
local p = 1.2 + 0.5 * I

local R = steep.integral {
  var = t, exponent = -0.35 * t ^ 2 + I * x * t, amplitude = 1 / (t - p),
  contour = steep.line(steep.inf(math.pi), steep.inf(0)), large = x,
}

print("== the integral")
print(R)

print("\n== landscape at x = 6")
print(R:landscape { x = 6 }:report())

print("\n== expansion at x = 6, four terms, against quadrature")
local r = R:expand { x = 6, order = 4 }
print(r:report())
local q, qe = R:quad { x = 6 }
print(string.format("quadrature: %s (error %.2g)", steep.show(q, qe), qe))

print("\n== the rescaled route t = x*s, held at x = 8, followed to x = -8")
local K = R:rescale { var = s, t = x * s, at = { x = 8 } }
print(K.homogeneity.text)
print(K:crossings { x = { from = 8, to = -8, steps = 32 } }:report())

print("\n== both routes against quadrature")
print(R:compare { x = { 8, 6, 4, -4, -6, -8 }, order = 4, rescale = { var = s, t = x * s } }:report())

print("\n== sweep: error table")
print(R:sweep { x = { 3, 4, 6, 8, 12, 16, -4, -8, -16 }, order = 4, progress = false }:report())

-- the map goes to the current directory, or to the directory named by STEEP_OUT
local dir = os.getenv("STEEP_OUT") or "."
local file = dir .. "/steep-demo-map.svg"
R:map { x = 6, file = file }
print("\n== map of the complex plane written to " .. file
  .. (dir == "." and (" (in " .. (os.getenv("PWD") or "the current directory") .. ")") or ""))

print("\nCaution: asymptotic approximations; validate before they inform any decision.")
