-- merging_points.lua — an oscillatory integral with two stationary points that merge:
--   O(x, a) = integral over the real line of e^{i x (t^3/3 - a t)} dt,
-- whose stationary points t = +-sqrt(a) coalesce as a -> 0 (for a < 0 they move off the
-- real axis into the complex plane). By the scaling t = x^{-1/3} u it is
-- 2 pi x^{-1/3} Ai(-a x^{2/3}) (DLMF 9.5.4 with a change of variables), which the recipe
-- uses as its check.
--
-- What it shows: the plain two-saddle expansion degrades as the points merge (its error
-- estimate grows; J:crossings reports the coalescence) until J:expand switches to the
-- Airy-type uniform form for the pair (Chester, Friedman & Ursell 1957; steep.coalesce,
-- when |zeta| < 4 for the cubic map's zeta, here about a x^{2/3}); quadrature stays
-- exact; and the answer is the Airy function itself (steep.airy computes Ai and Ai' for
-- complex arguments by steepest-path quadrature of DLMF 9.5.4). The table's "kind" column
-- says which form J:expand used.
--
-- Parameters (as a module): M.table{x =, a = {values}, order = N}.
-- Run: lua5.4 recipes/merging_points.lua (an invented sweep of a at x = 30).

local steep = require "steep"
steep.require_version("0.1")

local M = {}
local t, x, a = steep.var "t", steep.param "x", steep.param "a"
M.J = steep.integral { var = t, exponent = steep.I * x * (t ^ 3 / 3 - a * t),
  contour = steep.line(steep.inf(math.pi), steep.inf(0)), large = x }

--- M.table{x =, a = {values}, order = N} -> rows, text
function M.table(spec)
  local rows = {}
  local lines = { string.format("%-8s %-18s %-18s %-10s %-24s %s", "a", "J:expand",
    "quadrature", "rel.err", "uniform (Airy) rel.err", "kind") }
  for _, av in ipairs(spec.a) do
    local q, qe = M.J:quad { x = spec.x, a = av }
    local ok, r = pcall(M.J.expand, M.J, { x = spec.x, a = av, order = spec.order or 3 })
    local ai = steep.airy(-av * spec.x ^ (2 / 3))
    local uniform = 2 * math.pi * spec.x ^ (-1 / 3) * ai
    local kind = ok and r.contributions[1] and r.contributions[1].kind or "-"
    local row = { a = av, quad = q, uniform = uniform, kind = kind,
      expansion = ok and r.value or nil, error = ok and r.error or nil,
      failure = not ok and tostring(r) or nil }
    rows[#rows + 1] = row
    -- (values as the reports print them: rounding noise such as 1e-17i dropped)
    lines[#lines + 1] = string.format("%-8g %-18s %-18s %-10s %-24.3g %s", av,
      ok and steep.show(r.value, r.error) or "failed", steep.show(q, qe),
      ok and string.format("%.3g", (r.value - q):abs() / q:abs()) or "-",
      (uniform - q):abs() / q:abs(), kind:find("uniform", 1, true) and "pair, uniform" or kind)
  end
  return rows, table.concat(lines, "\n")
end

if arg and arg[0] and arg[0]:match("merging_points%.lua$") then
  local _, text = M.table { x = 30, a = { 1, 0.5, 0.2, 0.1, 0.05, 0.02 } }
  print("Invented sweep: two stationary points +-sqrt(a) merging at x = 30")
  print(text)
end

return M
