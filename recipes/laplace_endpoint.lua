-- laplace_endpoint.lua — a Laplace-type integral whose main contribution comes from an
-- endpoint: L(x) = integral from 0 to infinity of g(t) e^{-x h(t)} dt, h increasing.
--
-- Method: Watson's lemma (DLMF 2.3(ii)) at the endpoint t = 0, to any order or truncated
-- optimally (at the smallest term: common practice; Berry, Proc. R. Soc. A 422 (1989) for
-- the refined picture); checked against quadrature along the real axis.
--
-- Parameters (as a module): M.analyse{g = <expression in t>, h = <expression in t>,
-- x = {values}, order = N | "optimal"}. Swap in your own g and h.
-- Run: lua5.4 recipes/laplace_endpoint.lua  (an invented example: a relaxation response
-- g(t) = 1/(1 + t^2) with h(t) = t + t^2/4).
--
-- Caution: an asymptotic approximation; check it (the table does) before relying on it.

local steep = require "steep"
steep.require_version("0.1")

local M = {}
M.t = steep.var "t"
M.x = steep.param "x"

--- M.integral{g =, h =}: the steep integral for g(t) e^{-x h(t)} on [0, inf).
function M.integral(spec)
  return steep.integral { var = M.t, exponent = -M.x * spec.h, amplitude = spec.g,
    contour = steep.line(0, steep.inf(0)), large = M.x }
end

--- M.analyse{g =, h =, x = {values}, order = N | "optimal"} -> rows, report text
function M.analyse(spec)
  local J = M.integral(spec)
  local rows, lines = {}, { string.format("%-8s %-22s %-22s %-10s %-10s %s", "x",
    "expansion", "quadrature", "rel.err", "estimate", "terms") }
  for _, xv in ipairs(spec.x) do
    local r = J:expand { x = xv, order = spec.order or "optimal" }
    local q, qe = J:quad { x = xv }
    local rel = (r.value - q):abs() / q:abs()
    rows[#rows + 1] = { x = xv, expansion = r.value, quad = q, quad_error = qe,
      relative_error = rel, estimate = r.error / q:abs(), terms = r.contributions[1].used }
    lines[#lines + 1] = string.format("%-8g %-22.15g %-22.15g %-10.3g %-10.3g %d", xv,
      r.value:re(), q:re(), rel, r.error / q:abs(), r.contributions[1].used)
  end
  return rows, table.concat(lines, "\n")
end

if arg and arg[0] and arg[0]:match("laplace_endpoint%.lua$") then
  local t = M.t
  local _, text = M.analyse { g = 1 / (1 + t ^ 2), h = t + t ^ 2 / 4, x = { 5, 10, 20, 40 } }
  print("Invented example: integral_0^inf exp(-x (t + t^2/4)) / (1 + t^2) dt, optimal truncation")
  print(text)
end

return M
