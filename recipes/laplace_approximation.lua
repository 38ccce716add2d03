-- laplace_approximation.lua — the normalising constant (marginal likelihood, evidence)
-- of an unnormalised density in 2 to 4 parameters,
--   Z(n) = integral of prior(theta) e^{n lbar(theta)} d theta,
-- lbar the average log-likelihood of n observations: the statistician's Laplace
-- approximation
--   Z ~ e^{n lbar(theta*)} (2 pi / n)^{d/2} det(-lbar'')^{-1/2} prior(theta*) (1 + c1/n + c2/n^2)
-- with its first two correction terms (Tierney & Kadane, J. Amer. Statist. Assoc. 81
-- (1986) 82-86, for the leading term and its order; the corrections here are Hormander's
-- formula, The Analysis of Linear Partial Differential Operators I, Thm 7.7.5, at the
-- maximum: steep.integral{var = {...}} with J:expand, order 1, 2 and 3), and a table
-- against iterated quadrature (J:quad).
--
-- Parameters (as a module): M.table{loglik = lbar (an expression in the parameters),
-- prior = density (expression), vars = {theta1, ...}, ranges = {{lo, hi}, ...} (default:
-- every parameter over the real line), n = {values}, quad = true} -> rows, text.
-- M.integral{...} gives the steep integral itself. Parameters are M.a, M.b, M.c, M.d
-- (or your own steep.var); the sample size is M.n.
-- Run: lua5.4 recipes/laplace_approximation.lua (invented data: a dose-response study,
-- logistic models with 2 and 3 coefficients).
--
-- Caution: the Laplace approximation and its corrections are asymptotic in n; the
-- table shows how far they are from the quadrature at the sizes asked. Results that
-- inform decisions (model choice, regulatory or financial use) need independent
-- validation and the review that practice in your field requires.

local steep = require "steep"
steep.require_version("0.1")

local M = {}
M.a, M.b, M.c, M.d = steep.var "a", steep.var "b", steep.var "c", steep.var "d"
M.n = steep.param "n"

--- M.integral{loglik =, prior =, vars =, ranges =} -> the steep integral of
-- prior e^{n loglik} over the box (the real line where no range is given)
function M.integral(spec)
  local vars = spec.vars
  assert(#vars >= 1 and #vars <= 4, "laplace_approximation: 1 to 4 parameters")
  local contours = {}
  for k = 1, #vars do
    local r = spec.ranges and spec.ranges[k]
    if r then
      local lo = r[1] == -math.huge and steep.inf(math.pi) or r[1]
      local hi = r[2] == math.huge and steep.inf(0) or r[2]
      contours[k] = steep.line(lo, hi)
    else
      contours[k] = steep.line(steep.inf(math.pi), steep.inf(0))
    end
  end
  return steep.integral { var = vars, exponent = M.n * spec.loglik, amplitude = spec.prior or 1,
    contour = contours, large = M.n }
end

--- M.table{loglik =, prior =, vars =, ranges =, n = {values}, quad = true, seeds =}
-- -> rows {n, leading, first, second (the approximations with 0, 1, 2 corrections),
-- estimate (of the error of `second`), quad, quad_error}, text
function M.table(spec)
  local J = M.integral(spec)
  local rows = {}
  local lines = { string.format("%-6s %-20s %-10s %-10s %-10s %-10s %-20s %s", "n",
    "log Z (2 corr.)", "rel.err 0", "rel.err 1", "rel.err 2", "estimate", "log Z (quadrature)",
    "status") }
  for _, N in ipairs(spec.n) do
    local r = {}
    for K = 1, 3 do r[K] = J:expand { n = N, order = K, seeds = spec.seeds } end
    local row = { n = N, leading = r[1].value, first = r[2].value, second = r[3].value,
      estimate = r[3].error, log_value = r[3].log_value, status = r[3].status,
      maximum = r[3].contributions[1].at }
    local qtext, e0, e1, e2 = "", "", "", ""
    if spec.quad ~= false then
      local q, qe = J:quad { n = N }
      row.quad, row.quad_error = q, qe
      local qa = q:abs()
      row.relative = { (r[1].value - q):abs() / qa, (r[2].value - q):abs() / qa,
        (r[3].value - q):abs() / qa }
      e0, e1, e2 = string.format("%.3g", row.relative[1]), string.format("%.3g", row.relative[2]),
        string.format("%.3g", row.relative[3])
      qtext = string.format("%.15g", math.log(qa))
    end
    rows[#rows + 1] = row
    -- (the status's first word: the notes of a "suspect" one follow the table)
    lines[#lines + 1] = string.format("%-6d %-20.15g %-10s %-10s %-10s %-10.3g %-20s %s", N,
      row.log_value:re(), e0, e1, e2, row.estimate / r[3].value:abs(), qtext,
      tostring(row.status):match("^[^:]*"))
    if tostring(row.status):match("^suspect") then
      row.why = tostring(row.status):match("^suspect: (.*)")
    end
  end
  for _, row in ipairs(rows) do
    if row.why then lines[#lines + 1] = string.format("n = %d suspect: %s", row.n, row.why) end
  end
  return rows, table.concat(lines, "\n"), J
end

-- The invented example: a dose-response study at doses 0, 1, 2, 3 with success fractions
-- 0.15, 0.32, 0.58, 0.80, each dose given to n subjects; logistic models in the dose
-- (intercept a, slope b; then a dose^2 coefficient c), independent normal priors N(0, 2^2).
M.example = {}
local doses = { 0, 1, 2, 3 }
local fractions = { 0.15, 0.32, 0.58, 0.80 }

local function logistic_loglik(eta_of)
  local l = 0
  for j, dose in ipairs(doses) do
    local eta = eta_of(dose)
    l = l + fractions[j] * eta - steep.log(1 + steep.exp(eta))
  end
  return l
end

local function normal_prior(vars, sd)
  local s = 0
  for _, v in ipairs(vars) do s = s + v ^ 2 end
  return steep.exp(-s / (2 * sd ^ 2)) / (2 * math.pi * sd ^ 2) ^ (#vars / 2)
end

M.example.two = { vars = { M.a, M.b }, prior = normal_prior({ M.a, M.b }, 2),
  loglik = logistic_loglik(function(dose) return M.a + M.b * dose end) }
M.example.three = { vars = { M.a, M.b, M.c }, prior = normal_prior({ M.a, M.b, M.c }, 2),
  loglik = logistic_loglik(function(dose) return M.a + M.b * dose + M.c * dose ^ 2 end) }

if arg and arg[0] and arg[0]:match("laplace_approximation%.lua$") then
  print("Invented dose-response data; logistic model, 2 coefficients (intercept, slope):")
  local spec = M.example.two
  spec.n = { 10, 40, 160 }
  local _, text = M.table(spec)
  print(text)
  print()
  print("The same with a dose^2 coefficient (3 coefficients; the quadrature takes a few "
    .. "seconds a row):")
  spec = M.example.three
  spec.n = { 40 }
  _, text = M.table(spec)
  print(text)
  print("rel.err k: the Laplace approximation with k correction terms against the quadrature")
  print("caution: asymptotic approximations; validate them before they inform a decision")
end

return M
