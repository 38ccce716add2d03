-- steep.infinity — how an integrand behaves at infinity, read from its expression.
--
-- Every subexpression is written, as t -> infinity along a ray, as a sum of terms
--   c * t^p * (log t)^q * exp(E(t)),    E(t) = sum of e_k t^k (real k > 0),
-- exactly where the operations allow it (sums, products, integer powers, exp, sinh, cosh,
-- sin, cos of such sums) and to leading order where a term must dominate (quotients,
-- logarithms, square roots and other powers of sums): then the dropped part is bounded by
-- a `rest` growth, and a later cancellation of the kept terms makes the result unknown
-- rather than wrong. Comparing growths along a ray (the exponential part first, then the
-- power, then the power of the logarithm) is the asymptotic comparison of exp-log
-- functions (D. Gruntz, "On computing limits in a symbolic manipulation system", thesis,
-- ETH Zurich 1996), here for the single variable of one integral and a fixed direction.
--
-- From the integrand's log, H = F + log g, it classifies each direction: a valley (Re H ->
-- -infinity faster than any log), algebraic decay |g e^F| ~ r^kappa, bounded, a hill, or
-- "wild" (a growing exponential whose phase turns along the ray: Re H oscillates with
-- growing size). Valleys of exponential type are half-strips (Re(c e^{a t}) -> -infinity
-- where cos(arg c + |a| Im(t e^{-i theta0})) < 0, theta0 = -arg a), returned as families
-- of strips; the rest are exact sectors and edge directions.

local complex = require "steep.complex"

local cnew, cparts, capply = complex.new, complex.parts, complex.apply
local pi, abs, floor, huge = math.pi, math.abs, math.floor, math.huge
local cos, sin, atan, log, sqrt = math.cos, math.sin, math.atan, math.log, math.sqrt
local format = string.format

local M = {}

local MAX_TERMS = 64        -- beyond this many terms a subexpression is "unknown"
local TOL = 1e-11           -- relative tolerance of ties between growth coefficients

local function norm_angle(th)
  th = th % (2 * pi)
  if th > pi then th = th - 2 * pi end
  return th
end

local function cmag(z) local r, i = cparts(z); return complex.hypot(r, i) end
local function carg(z) local r, i = cparts(z); return atan(i, r) end
local function expi(th) return cnew(cos(th), sin(th)) end

---------------------------------------------------------------------------------------
-- Terms.
---------------------------------------------------------------------------------------

-- A term: {c = complex, pr, pi = the power p, q = power of log t (integer >= 0),
-- E = list of {k, e} (k > 0 real, e complex), k decreasing}.
local function term(c, pr, pim, q, E)
  return { c = c, pr = pr or 0, pi = pim or 0, q = q or 0, E = E or {} }
end

local function ekey(E)
  local parts = {}
  for _, x in ipairs(E) do
    local er, ei = cparts(x.e)
    parts[#parts + 1] = format("%a:%a:%a", x.k, er, ei)
  end
  return table.concat(parts, ",")
end

-- (kept in the term: a term's powers and exponential part never change once made)
local function key(t)
  local k = t.key
  if not k then
    k = format("%a:%a:%d|%s", t.pr, t.pi, t.q, ekey(t.E))
    t.key = k
  end
  return k
end

local function E_add(A, B)
  local by, out = {}, {}
  for _, x in ipairs(A) do by[x.k] = (by[x.k] or 0) + x.e end
  for _, x in ipairs(B) do by[x.k] = (by[x.k] or 0) + x.e end
  for k, e in pairs(by) do if cmag(e) ~= 0 then out[#out + 1] = { k = k, e = e } end end
  table.sort(out, function(a, b) return a.k > b.k end)
  return out
end

local function E_scale(A, s)
  local out = {}
  for _, x in ipairs(A) do out[#out + 1] = { k = x.k, e = x.e * s } end
  return out
end

-- A list: {terms = {...}, rest = nil or a term giving the growth of what was dropped}.
-- Like terms are merged; zero coefficients dropped.
local function normalize(terms, rest)
  local by, order = {}, {}
  for _, t in ipairs(terms) do
    local k = key(t)
    local m = by[k]
    if m then m.c = m.c + t.c
    else
      m = term(t.c, t.pr, t.pi, t.q, t.E)
      by[k] = m
      order[#order + 1] = m
    end
  end
  local out = {}
  for _, t in ipairs(order) do if cmag(t.c) ~= 0 then out[#out + 1] = t end end
  if #out > MAX_TERMS then return nil end
  return { terms = out, rest = rest }
end

local function const_list(v) return normalize({ term(cnew(cparts(v))) }) end

---------------------------------------------------------------------------------------
-- Growth along a ray t = r e^{i theta}: a key compared lexicographically.
---------------------------------------------------------------------------------------

-- The growth of |term| along the ray: {ek = {{k, Re(e_k e^{ik theta})}...} (k decreasing,
-- zero coefficients left out), p = Re p, q}. (|t^p| = r^{Re p} e^{-Im p theta}: the
-- factor does not grow.)
local function growth(t, th)
  local ek = {}
  for _, x in ipairs(t.E) do
    local re = cparts(x.e * expi(x.k * th))
    if abs(re) > TOL * cmag(x.e) then ek[#ek + 1] = { x.k, re } end
  end
  return { ek = ek, p = t.pr, q = t.q }
end

-- Compares growths: -1, 0, 1.
local function compare(a, b)
  local n = math.max(#a.ek, #b.ek)
  local i, j = 1, 1
  while i <= #a.ek or j <= #b.ek do
    local ka = a.ek[i] and a.ek[i][1] or -1
    local kb = b.ek[j] and b.ek[j][1] or -1
    local k = math.max(ka, kb)
    local ca = (ka == k) and a.ek[i][2] or 0
    local cb = (kb == k) and b.ek[j][2] or 0
    local s = math.max(abs(ca), abs(cb))
    if abs(ca - cb) > TOL * s then return ca > cb and 1 or -1 end
    if ka == k then i = i + 1 end
    if kb == k then j = j + 1 end
  end
  local _ = n
  if abs(a.p - b.p) > 1e-12 * (1 + abs(a.p) + abs(b.p)) then return a.p > b.p and 1 or -1 end
  if a.q ~= b.q then return a.q > b.q and 1 or -1 end
  return 0
end
M.compare = compare

-- Does the term's size grow faster than every power of log (an exponential part that
-- grows along the ray)?
local function exp_grows(g) return g.ek[1] ~= nil and g.ek[1][2] > 0 end

-- The decisions a walk of the expression took that depend on the direction (which terms
-- dominate, whether a remainder stays below them), logged while `log` is set: the walk's
-- result holds at any other direction where every logged decision comes out the same
-- (M.analyze replays them instead of walking again).
local log

-- The terms of largest growth (the dominant group) and their growth.
local function dominant_raw(list, th)
  local best, group = nil, {}
  for _, t in ipairs(list.terms) do
    local g = growth(t, th)
    local c = best and compare(g, best) or 1
    if c > 0 then best, group = g, { t }
    elseif c == 0 then group[#group + 1] = t end
  end
  return group, best
end

-- Does no term of the list (nor its remainder) have an exponential part? Then the
-- growths do not depend on the direction (growth() reads th only through E), and neither
-- does a decision about the list: it holds at every direction and is not replayed.
local function fixed_growths(list)
  for _, t in ipairs(list.terms) do if #t.E > 0 then return false end end
  return not (list.rest and #list.rest.E > 0)
end

local function dominant(list, th)
  local group, best = dominant_raw(list, th)
  if log then
    log[#log + 1] = { kind = "dominant", list = list, group = group, fixed = fixed_growths(list) }
  end
  return group, best
end

-- Is the remainder of a list below the growth g (so that it cannot change terms of
-- that growth)?
local function rest_below(list, g, th)
  if not list.rest then return true end
  local below = compare(growth(list.rest, th), g) < 0
  if log then
    log[#log + 1] = { kind = "rest", list = list, below = below, fixed = fixed_growths(list) }
  end
  return below
end

-- Do the logged decisions come out the same at direction th?
local function same_decisions(decisions, th)
  for _, d in ipairs(decisions) do
    if d.fixed then goto next_decision end
    local group, best = dominant_raw(d.list, th)
    if d.kind == "dominant" then
      if #group ~= #d.group then return false end
      for i = 1, #group do if group[i] ~= d.group[i] then return false end end
    elseif best then
      if (compare(growth(d.list.rest, th), best) < 0) ~= d.below then return false end
    end
    ::next_decision::
  end
  return true
end

---------------------------------------------------------------------------------------
-- Operations on lists (nil = unknown), in the direction th where dominance matters.
---------------------------------------------------------------------------------------

local function mul_terms(a, b)
  return term(a.c * b.c, a.pr + b.pr, a.pi + b.pi, a.q + b.q, E_add(a.E, b.E))
end

-- The larger of two remainder growths (either may be nil).
local function max_rest(r1, r2, th)
  if not r1 then return r2 end
  if not r2 then return r1 end
  return compare(growth(r1, th), growth(r2, th)) >= 0 and r1 or r2
end

local function add(A, B, th, sign)
  if not (A and B) then return nil end
  local terms = {}
  for _, t in ipairs(A.terms) do terms[#terms + 1] = t end
  for _, t in ipairs(B.terms) do
    terms[#terms + 1] = sign < 0 and term(-t.c, t.pr, t.pi, t.q, t.E) or t
  end
  local out = normalize(terms, max_rest(A.rest, B.rest, th))
  if not out then return nil end
  -- a cancellation of everything above the remainder leaves nothing known
  if out.rest then
    local _, g = dominant(out, th)
    if not g or not rest_below(out, g, th) then return nil end
  end
  return out
end

local function mul(A, B, th)
  if not (A and B) then return nil end
  if #A.terms * #B.terms > 4 * MAX_TERMS then return nil end
  local terms = {}
  for _, a in ipairs(A.terms) do
    for _, b in ipairs(B.terms) do terms[#terms + 1] = mul_terms(a, b) end
  end
  -- remainders: rest_A * dominant(B) and dominant(A) * rest_B
  local rest
  if A.rest or B.rest then
    local ga = dominant(A, th)
    local gb = dominant(B, th)
    if A.rest and gb[1] then rest = mul_terms(A.rest, gb[1]) end
    if B.rest and ga[1] then rest = max_rest(rest, mul_terms(ga[1], B.rest), th) end
  end
  return normalize(terms, rest)
end

-- 1/A: exact for one term; otherwise (1/D)(1 - rho + ...) with D the dominant term and
-- the remainder of the size of (second term)/D^2.
local function inverse(A, th)
  if not A or #A.terms == 0 then return nil end
  local group, g = dominant(A, th)
  if #group ~= 1 or not rest_below(A, g, th) then return nil end
  local D = group[1]
  local inv = term(1 / D.c, -D.pr, -D.pi, 0, E_scale(D.E, -1))
  if D.q ~= 0 then
    -- 1/(log t)^q: a negative power of log, kept as q < 0 (it only ever compares)
    inv.q = -D.q
  end
  if #A.terms == 1 and not A.rest then return normalize({ inv }) end
  -- the largest of the others (and the remainder) over D^2
  local second = A.rest
  for _, t in ipairs(A.terms) do
    if t ~= D then second = max_rest(second, t, th) end
  end
  local rest = mul_terms(mul_terms(second, inv), inv)
  return normalize({ inv }, rest)
end

-- exp(A): the exponent's polynomial part goes into E (constant into c), a log term
-- b*log t into t^b, and terms that vanish at infinity into a remainder; anything else
-- (an exponential inside exp, a growing fractional power mixed with logs) is unknown.
local function exp_of(A, th)
  if not A then return nil end
  local c, pr, pim, E, small = cnew(1, 0), 0, 0, {}, nil
  for _, t in ipairs(A.terms) do
    if #t.E > 0 then return nil end
    if t.q == 0 and t.pi == 0 and t.pr == 0 then
      c = c * capply("exp", t.c)
    elseif t.q == 0 and t.pi == 0 and t.pr > 0 then
      E = E_add(E, { { k = t.pr, e = t.c } })
    elseif t.q == 1 and t.pr == 0 and t.pi == 0 then
      local br, bi = cparts(t.c)
      pr, pim = pr + br, pim + bi
    elseif t.q == 0 and t.pr < 0 then
      small = max_rest(small, t, th)
    else
      return nil
    end
  end
  local main = term(c, pr, pim, 0, E)
  local rest
  if A.rest then
    local g = growth(A.rest, th)
    -- the dropped part of the exponent must vanish at infinity
    if exp_grows(g) or g.p > 0 or (g.p == 0 and g.q >= 0) then return nil end
    small = max_rest(small, A.rest, th)
  end
  if small then rest = mul_terms(main, small) end
  return normalize({ main }, rest)
end

-- log(A) = log D + log(1 + rho): D's exponent, power and constant; rho vanishes.
local function log_of(A, th)
  if not A or #A.terms == 0 then return nil end
  local group, g = dominant(A, th)
  if #group ~= 1 or not rest_below(A, g, th) then return nil end
  local D = group[1]
  if D.q ~= 0 then return nil end   -- log log t is not represented
  local terms = { term(capply("log", cnew(cparts(D.c)))) }
  if D.pr ~= 0 or D.pi ~= 0 then terms[#terms + 1] = term(cnew(D.pr, D.pi), 0, 0, 1) end
  for _, x in ipairs(D.E) do terms[#terms + 1] = term(x.e, x.k) end
  local rest
  if #A.terms > 1 or A.rest then
    local second = A.rest
    for _, t in ipairs(A.terms) do if t ~= D then second = max_rest(second, t, th) end end
    local inv = term(1 / D.c, -D.pr, -D.pi, 0, E_scale(D.E, -1))
    rest = mul_terms(second, inv)
  end
  return normalize(terms, rest)
end

-- A^k for a real or complex constant k (principal branches): through the dominant term.
local function power_of(A, k, th)
  if not A or #A.terms == 0 then return nil end
  local kr, ki = cparts(k)
  local group, g = dominant(A, th)
  if #group ~= 1 or not rest_below(A, g, th) then return nil end
  local D = group[1]
  if D.q ~= 0 and not (ki == 0 and kr == floor(kr) and kr >= 0) then return nil end
  local c = capply("exp", capply("log", cnew(cparts(D.c))) * k)
  local kp = cnew(D.pr, D.pi) * k
  local kpr, kpi = cparts(kp)
  local main = term(c, kpr, kpi, D.q * floor(kr), E_scale(D.E, k))
  local rest
  if #A.terms > 1 or A.rest then
    local second = A.rest
    for _, t in ipairs(A.terms) do if t ~= D then second = max_rest(second, t, th) end end
    local inv = term(1 / D.c, -D.pr, -D.pi, 0, E_scale(D.E, -1))
    rest = mul_terms(main, mul_terms(second, inv))
  end
  return normalize({ main }, rest)
end

local function powi(A, n, th)
  if not A then return nil end
  if n < 0 then
    local P = powi(A, -n, th)
    return P and inverse(P, th)
  end
  local out = const_list(1)
  local base = A
  while n > 0 do
    if n % 2 == 1 then out = mul(out, base, th) end
    n = n // 2
    if n > 0 then base = mul(base, base, th) end
    if not out or not base then return nil end
  end
  return out
end

local function scale(A, s)
  if not A then return nil end
  local terms = {}
  for _, t in ipairs(A.terms) do terms[#terms + 1] = term(t.c * s, t.pr, t.pi, t.q, t.E) end
  local rest = A.rest
  return normalize(terms, rest)
end

local I = cnew(0, 1)

-- sin, cos, sinh, cosh through exponentials; tan, tanh as quotients.
local function trig(name, A, th)
  if not A then return nil end
  local ep, em
  if name == "sinh" or name == "cosh" or name == "tanh" then
    ep, em = exp_of(A, th), exp_of(scale(A, -1), th)
  else
    ep, em = exp_of(scale(A, I), th), exp_of(scale(A, -I), th)
  end
  if not (ep and em) then return nil end
  if name == "sinh" then return scale(add(ep, em, th, -1), 0.5) end
  if name == "cosh" then return scale(add(ep, em, th, 1), 0.5) end
  if name == "sin" then return scale(add(ep, em, th, -1), cnew(0, -0.5)) end
  if name == "cos" then return scale(add(ep, em, th, 1), 0.5) end
  local num, den
  if name == "tanh" then num, den = add(ep, em, th, -1), add(ep, em, th, 1)
  else num, den = scale(add(ep, em, th, -1), -I), add(ep, em, th, 1) end
  return mul(num, inverse(den, th), th)
end

--- list(e, var, params, th) -> the term list of expression e along the ray at angle th,
-- or nil (unknown). Parameters are bound by name (values).
function M.list(e, var, params, th, memo)
  memo = memo or {}
  local expr = require "steep.expr"
  local function go(n)
    local m = memo[n]
    if m ~= nil then return m or nil end
    local r
    local op = n.op
    if op == "const" then r = const_list(cnew(n.re, n.im))
    elseif n == var then r = normalize({ term(cnew(1, 0), 1) })
    elseif op == "var" or op == "param" then
      local v = params[n.name]
      r = v ~= nil and const_list(v) or nil
    elseif op == "add" then r = add(go(n.a), go(n.b), th, 1)
    elseif op == "sub" then r = add(go(n.a), go(n.b), th, -1)
    elseif op == "neg" then r = scale(go(n.a), -1)
    elseif op == "mul" then r = mul(go(n.a), go(n.b), th)
    elseif op == "div" then
      local b = go(n.b)
      r = b and mul(go(n.a), inverse(b, th), th)
    elseif op == "powi" then r = powi(go(n.a), n.k, th)
    elseif op == "powc" then r = power_of(go(n.a), n.k, th)
    elseif op == "sqrt" then r = power_of(go(n.a), 0.5, th)
    elseif op == "exp" then r = exp_of(go(n.a), th)
    elseif op == "log" then r = log_of(go(n.a), th)
    elseif op == "sinh" or op == "cosh" or op == "tanh" or op == "sin" or op == "cos"
        or op == "tan" then
      r = trig(op, go(n.a), th)
    else
      r = nil   -- atan and anything new: unknown
    end
    memo[n] = r or false
    return r
  end
  if not expr.is(e) then return const_list(e) end
  -- deep expressions: fill the memo bottom-up first (an explicit walk, no deep recursion)
  local order, seen, stack = {}, {}, { e }
  while #stack > 0 do
    local n = stack[#stack]
    if seen[n] == nil then
      seen[n] = false
      if n.a and seen[n.a] == nil then stack[#stack + 1] = n.a end
      if n.b and seen[n.b] == nil then stack[#stack + 1] = n.b end
    else
      stack[#stack] = nil
      if not seen[n] then seen[n] = true; order[#order + 1] = n end
    end
  end
  for _, n in ipairs(order) do go(n) end
  return go(e)
end

---------------------------------------------------------------------------------------
-- Polynomials.
---------------------------------------------------------------------------------------

--- polynomial(e, var, params) -> coefficient list c[0..d] (complex values) if e is a
-- polynomial in var (exactly, with the parameters' values), else nil.
local polynomial_of
function M.polynomial(e, var, params)
  return polynomial_of(M.list(e, var, params, 0))
end

-- The same from e's term list (at any direction: a polynomial's list has no remainder and
-- no decision in it depends on the direction).
polynomial_of = function(L)
  if not L or L.rest then return nil end
  local c, d = {}, 0
  for _, t in ipairs(L.terms) do
    if #t.E > 0 or t.q ~= 0 or t.pi ~= 0 or t.pr < 0 or t.pr ~= floor(t.pr) or t.pr > 1000 then
      return nil
    end
    local k = math.tointeger(t.pr)
    c[k] = (c[k] or 0) + t.c
    if k > d then d = k end
  end
  for k = 0, d do c[k] = cnew(cparts(c[k] or 0)) end
  return c, d
end

---------------------------------------------------------------------------------------
-- Classification of directions.
---------------------------------------------------------------------------------------

-- Real coefficients of Re H along the ray from its terms without a growing or turning
-- exponential part: c t^p (log t)^q = c e^{i p th} r^p (log r + i th)^q (|.| e^{-Im p th}),
-- expanded in powers of log r. Returns a list of {p, j, re, im} sorted by growth.
local function pure_parts(terms, th)
  -- (real arithmetic on the parts: this runs for every cell of every analysis)
  local by, out = {}, {}
  local function put(p, j, re, im)
    local k = p * 4096 + j
    local e = by[k]
    if not e then
      e = { p = p, j = j, re = 0, im = 0 }
      by[k] = e
      out[#out + 1] = e
    end
    e.re, e.im = e.re + re, e.im + im
  end
  for _, t in ipairs(terms) do
    local cr, ci = cparts(t.c)
    local a, m = t.pr * th, math.exp(-t.pi * th)
    local ca, sa = cos(a) * m, sin(a) * m
    local br, bi = cr * ca - ci * sa, cr * sa + ci * ca
    local q = t.q
    if q < 0 then
      -- (log r)^q with q < 0: only its leading power (it never decides alone)
      put(t.pr, q, br, bi)
    else
      -- C(q, j) (i th)^(q - j) (log r)^j
      local binom = 1
      for j = q, 0, -1 do
        local n = q - j
        -- (i th)^n = th^n i^n
        local mag = binom * th ^ n
        local pr, pi_ = br * mag, bi * mag
        local r4 = n % 4
        if r4 == 1 then pr, pi_ = -pi_, pr elseif r4 == 2 then pr, pi_ = -pr, -pi_
        elseif r4 == 3 then pr, pi_ = pi_, -pr end
        put(t.pr, j, pr, pi_)
        binom = binom * j / (n + 1)
      end
    end
  end
  table.sort(out, function(u, v)
    if u.p ~= v.p then return u.p > v.p end
    return u.j > v.j
  end)
  return out
end

--- classify(H, th) -> {class =, kappa =, phase_power =} for the integrand's log H (a term
-- list or nil) along the ray at angle th. class: "valley" (Re H -> -infinity faster than
-- any multiple of log r), "hill", "algebraic" (|integrand| ~ r^kappa, kappa from a log
-- term), "bounded" (Re H -> a constant or oscillates boundedly: kappa = 0), "wild" (Re H
-- oscillates with growing size), or "unknown".
function M.classify(H, th)
  if not H then return { class = "unknown" } end
  if #H.terms == 0 then
    return H.rest and { class = "unknown" } or { class = "bounded", kappa = 0 }
  end
  local group, g = dominant(H, th)
  if exp_grows(g) then
    if not rest_below(H, g, th) then return { class = "unknown" } end
    -- a growing exponential: its phase must not turn along the ray
    if #group > 1 then return { class = "wild" } end
    local D = group[1]
    for _, x in ipairs(D.E) do
      local _, im = cparts(x.e * expi(x.k * th))
      if abs(im) > TOL * cmag(x.e) then return { class = "wild" } end
    end
    if D.pi ~= 0 then return { class = "wild" } end
    local re = cparts(D.c * expi(D.pr * th))
    -- (purely imaginary along the ray: the ray runs on the edge between a valley strip
    -- and a hill strip, e^{i x cosh t} on the real line; still a strip direction, and
    -- along the ray itself the other terms decide the size: e^{i x cosh t - p t^2} decays)
    if abs(re) <= TOL * cmag(D.c) then
      local others = { terms = {}, rest = H.rest }
      for _, t in ipairs(H.terms) do if t ~= D then others.terms[#others.terms + 1] = t end end
      local cl = M.classify(others, th)
      return { class = cl.class == "valley" and "valley" or "wild", exponential = true,
        on_edge = true }
    end
    return { class = re < 0 and "valley" or "hill", exponential = true }
  end
  -- no growing exponential: the pure terms decide; bounded oscillating exponentials
  -- (Re of their exponent vanishes on the ray) only matter where they outgrow them
  local pure, osc = {}, nil
  for _, t in ipairs(H.terms) do
    local gt = growth(t, th)
    if #t.E == 0 then pure[#pure + 1] = t
    elseif #gt.ek == 0 then
      if not osc or compare(gt, osc) > 0 then osc = gt end
    end
    -- (exponentially decaying terms do not matter)
  end
  local parts = pure_parts(pure, th)
  local decide, phase
  for _, e in ipairs(parts) do
    local s = abs(e.re) + abs(e.im)
    if not decide and abs(e.re) > TOL * s and (e.p > 0 or (e.p == 0 and e.j > 0)) then
      decide = e
    end
    if not phase and abs(e.im) > TOL * s and (e.p > 0 or (e.p == 0 and e.j > 0)) then
      phase = e
    end
  end
  local function above(e, gt)
    -- does an oscillating growth gt reach the pure part e?
    if not gt then return false end
    if gt.p ~= e.p then return gt.p > e.p end
    return gt.q >= e.j
  end
  if H.rest then
    local gr = growth(H.rest, th)
    if exp_grows(gr) then return { class = "unknown" } end
    if decide and above(decide, gr) then return { class = "unknown" } end
    if not decide and (gr.p > 0 or (gr.p == 0 and gr.q > 0)) then return { class = "unknown" } end
  end
  if osc and (osc.p > 0 or (osc.p == 0 and osc.q > 0)) then
    if not decide or above(decide, osc) then return { class = "wild" } end
  end
  local phase_power = phase and phase.p or 0
  if decide then
    if decide.p > 0 or decide.j > 1 then
      return { class = decide.re < 0 and "valley" or "hill", phase_power = phase_power,
        degree = decide.p }
    end
    -- decide.p == 0, j == 1: Re H ~ kappa log r
    return { class = "algebraic", kappa = decide.re, phase_power = phase_power }
  end
  return { class = "bounded", kappa = 0, phase_power = phase_power }
end

-- Is an end in a direction of this class integrable (absolutely, or as an improper
-- oscillatory integral)? With |integrand| ~ r^kappa and phase ~ r^p (p > 0), u = r^p
-- turns the tail into the integral of u^((kappa + 1)/p - 1) e^{iu}, which converges
-- exactly when kappa < p - 1 (Dirichlet's test; common practice); without a phase,
-- kappa < -1.
local function convergent(cl)
  if cl.class == "valley" then return true end
  if cl.class == "algebraic" or cl.class == "bounded" then
    local k = cl.kappa or 0
    local pp = cl.phase_power or 0
    if pp > 0 then return k < pp - 1 end
    return k < -1
  end
  return false
end
M.convergent = convergent

-- Candidate angles where a classification can change, from the terms of H at th.
local function critical_angles(H, th, out)
  if not H then return end
  local function add_family(base, k)
    -- base + 2 pi j / k for all j (k > 0)
    local n = math.min(64, math.max(1, math.ceil(k)))
    local step = 2 * pi / k
    for j = -n, n do out[#out + 1] = norm_angle(base + j * step) end
  end
  for _, t in ipairs(H.terms) do
    if #t.E > 0 then
      for _, x in ipairs(t.E) do
        local a = carg(x.e)
        add_family((pi / 2 - a) / x.k, x.k)      -- Re(e e^{ik th}) = 0
        add_family((-pi / 2 - a) / x.k, x.k)
        add_family(-a / x.k, x.k)                -- aligned: a strip direction
        add_family((pi - a) / x.k, x.k)
      end
    elseif t.pr > 0 then
      local a = carg(t.c)
      add_family((pi / 2 - a) / t.pr, t.pr)
      add_family((-pi / 2 - a) / t.pr, t.pr)
    end
  end
  -- ties between exponential terms of the same top power
  for i = 1, #H.terms do
    for j = i + 1, #H.terms do
      local a, b = H.terms[i].E[1], H.terms[j].E[1]
      if a and b and a.k == b.k then
        local d = a.e - b.e
        if cmag(d) > 0 then
          add_family((pi / 2 - carg(d)) / a.k, a.k)
          add_family((-pi / 2 - carg(d)) / a.k, a.k)
        end
      end
    end
  end
  local _ = th
end

--- analyze(F, g, var, params [, rho]) -> analysis or nil, reason, for the exponent F (times
-- the constant rho when given: F turned in phase on a Stokes line). The analysis has
-- .H(th) (the integrand's log along a ray), .valleys (sectors, edges and strip families,
-- like landscape.valleys), .polynomial (coefficients of F when F is a polynomial),
-- .degree, .exponential (true when exponential terms are present).
function M.analyze(F, g, var, params, rho)
  local function walk(th)
    local Fl = M.list(F, var, params, th)
    if not Fl then return nil end
    -- (the exponent turned by a constant factor: the same terms, scaled)
    if rho then Fl = scale(Fl, rho) end
    if g == nil or g == 1 then return Fl end
    local gl = M.list(g, var, params, th)
    if not gl then return nil end
    if #gl.terms == 0 and not gl.rest then return nil end   -- g = 0
    return add(Fl, log_of(gl, th), th, 1)
  end
  -- walks with their decision logs: a walk is reused at every direction where its
  -- decisions hold (most exponents need one or two walks, not one per direction)
  local walks = {}
  local function H_at(th)
    for _, w in ipairs(walks) do
      if same_decisions(w.decisions, th) then return w.H end
    end
    log = {}
    local ok, H = pcall(walk, th)
    local decisions = log
    log = nil
    if not ok then error(H, 0) end
    walks[#walks + 1] = { H = H, decisions = decisions }
    return H
  end
  local out = { H = H_at }
  --- out.converges(th) -> whether an end along direction th converges, and its class
  function out.converges(th)
    local cl = M.classify(H_at(th), th)
    return convergent(cl), cl
  end
  -- a polynomial exponent of degree d (and an amplitude without exponentials): its d
  -- sectors are where Re(c_d e^{i d theta}) < 0, exact; only the 2d directions between
  -- them need the full reading (an end along one converges with its sector, Jordan).
  -- (F's list at direction 0, with its decisions: where g is 1 it is the first walk)
  log = {}
  local okF, Fl0 = pcall(M.list, F, var, params, 0)
  local decisionsF = log
  log = nil
  if not okF then error(Fl0, 0) end
  if g == nil or g == 1 then
    walks[1] = { H = (Fl0 and rho) and scale(Fl0, rho) or Fl0, decisions = decisionsF }
  end
  local poly, d = polynomial_of(Fl0)
  if poly then out.polynomial, out.degree = poly, d end
  if poly and d >= 1 then
    local gl = (g == nil or g == 1) and { terms = {} } or M.list(g, var, params, 0)
    local plain = gl ~= nil
    for _, tm in ipairs(gl and gl.terms or {}) do if #tm.E > 0 then plain = false end end
    if plain then
      local c = poly[d] * (rho or 1)
      local a = carg(c)
      local valleys = {}
      for k = 0, d - 1 do
        local from = norm_angle((pi / 2 - a + 2 * pi * k) / d)
        valleys[#valleys + 1] = { from = from, to = from + pi / d, type = "polynomial",
          exact = true }
      end
      table.sort(valleys, function(u, v) return u.from < v.from end)
      out.valleys, out.exponential = valleys, false
      return out
    end
  end
  -- candidate angles: a coarse grid, then the critical angles of the terms found there
  local angles = {}
  for j = 0, 71 do angles[#angles + 1] = norm_angle(-pi + (j + 0.5) * 2 * pi / 72) end
  local crit = {}
  local any_known, exponential = false, false
  local seen = {}
  for _, th in ipairs(angles) do
    local H = H_at(th)
    if H and not seen[H] then
      seen[H] = true
      any_known = true
      critical_angles(H, th, crit)
      for _, t in ipairs(H.terms) do if #t.E > 0 then exponential = true end end
    end
  end
  if not any_known then return nil, "the integrand's behaviour at infinity is not of a "
    .. "form the analysis reads (sums of powers, logs and exponentials)" end
  table.sort(crit)
  local uniq = {}
  for _, a in ipairs(crit) do
    if #uniq == 0 or a - uniq[#uniq] > 1e-12 then uniq[#uniq + 1] = a end
  end
  if #uniq > 0 and uniq[1] + 2 * pi - uniq[#uniq] <= 1e-12 then uniq[#uniq] = nil end
  if #uniq == 0 then uniq = { 0 } end
  -- classify each critical angle and the middle of each gap
  local cells = {}
  for i, a in ipairs(uniq) do
    local b = uniq[i + 1] or (uniq[1] + 2 * pi)
    local ca = M.classify(H_at(a), a)
    cells[#cells + 1] = { from = a, to = a, cl = ca, point = true }
    local mid = 0.5 * (a + b)
    if b - a > 1e-12 then
      cells[#cells + 1] = { from = a, to = b, cl = M.classify(H_at(norm_angle(mid)), norm_angle(mid)) }
    end
  end
  -- directions the analysis cannot decide (the amplitude a sum of oscillating terms of one
  -- size there, as cosh(nu t) along the imaginary axis) are not valleys: an end or a
  -- path there is refused later, while the decided directions keep their valleys (the
  -- strips of e^{-x cosh t} cosh(nu t) were lost with them). With none decided to
  -- converge, the analysis says why.
  local undecided, any_valley = {}, false
  for _, c in ipairs(cells) do
    if c.cl.class == "unknown" then undecided[#undecided + 1] = c.from
    elseif convergent(c.cl) then any_valley = true end
  end
  if #undecided > 0 and not any_valley then
    return nil, format("the behaviour at infinity in direction %.4g is not decided by "
      .. "the analysis", undecided[1])
  end
  out.undecided = #undecided > 0 and undecided or nil
  out.cells, out.exponential = cells, exponential
  out.valleys = M.valleys_from_cells(cells, H_at, exponential)
  return out
end

-- Sectors (runs of convergent directions), edges (isolated convergent directions) and
-- strip families, from the classified cells: cells alternate between a critical angle
-- (a point) and the open interval after it.
function M.valleys_from_cells(cells, H_at, exponential)
  local n = #cells
  local ok = {}
  for i, c in ipairs(cells) do ok[i] = convergent(c.cl) end
  local function at(i) return (i - 1) % n + 1 end
  local function vtype(cl) return cl.class == "valley" and "polynomial" or "algebraic" end
  -- a point joins a run when it converges or lies between two convergent intervals
  local joins = {}
  for i, c in ipairs(cells) do
    if c.point then
      joins[i] = ok[i] or (ok[at(i - 1)] and ok[at(i + 1)] and not cells[at(i - 1)].point
        and not cells[at(i + 1)].point)
    else
      joins[i] = ok[i]
    end
  end
  local valleys = {}
  local all, any_interval = true, false
  for i = 1, n do
    if not joins[i] then all = false end
    if ok[i] and not cells[i].point then any_interval = true end
  end
  if all and any_interval then
    local cl
    for _, c in ipairs(cells) do if not c.point then cl = cl or c.cl end end
    valleys[1] = { from = -pi, to = pi, type = vtype(cl), kappa = cl.kappa, exact = true }
  elseif any_interval then
    local s0
    for i = 1, n do if not joins[i] then s0 = i; break end end
    local run
    for step = 1, n do
      local i = at(s0 + step)
      local c = cells[i]
      if joins[i] then
        if not c.point then
          local from, to = c.from, c.to
          if not run then run = { from = from, to = to, cl = c.cl }
          else
            while to < run.to - 1e-12 do to = to + 2 * pi end
            run.to = to
          end
        end
      elseif run then
        valleys[#valleys + 1] = run
        run = nil
      end
    end
    if run then valleys[#valleys + 1] = run end
    for _, v in ipairs(valleys) do
      local cl = v.cl
      v.cl = nil
      while v.to <= v.from do v.to = v.to + 2 * pi end
      local shift = norm_angle(v.from) - v.from
      v.from, v.to = v.from + shift, v.to + shift
      v.type, v.kappa, v.exact = vtype(cl), cl.kappa, true
    end
  end
  -- convergent points with no convergent interval on either side: edges, or (a valley
  -- between two directions where an exponential grows and turns) directions along which
  -- every parallel line converges
  for i, c in ipairs(cells) do
    local prev, nxt = at(i - 1), at(i + 1)
    -- (a strip direction's own ray is described by its strip family below)
    if c.point and ok[i] and not ok[prev] and not ok[nxt] and not c.cl.exponential then
      local wild = cells[prev].cl.class == "wild" and cells[nxt].cl.class == "wild"
      valleys[#valleys + 1] = { from = c.from, to = c.from,
        type = (c.cl.class == "valley" and wild) and "line" or "edge",
        decay = -(c.cl.kappa or 0), kappa = c.cl.kappa, exact = true,
        conditional = c.cl.class ~= "valley" and (c.cl.kappa or 0) >= -1 }
    end
  end
  -- strip families: directions where one growing exponential dominates without turning
  if exponential then
    for _, c in ipairs(cells) do
      if c.point and c.cl.exponential then
        local th = c.from
        local H = H_at(th)
        local group = dominant(H, th)
        local D = group[1]
        local top = D.E[1]
        if top.k == 1 and D.pi == 0 then
          local rate = cmag(top.e)
          -- Re(D) on t = (s + i y) e^{i th}: |c| s^p e^{rate s} cos(phi + rate y)
          local phi = carg(D.c) + D.pr * th
          local period = 2 * pi / rate
          -- valley where cos(phi + rate y) < 0: y in ((pi/2 - phi)/rate, (3pi/2 - phi)/rate)
          local lo = (pi / 2 - phi) / rate
          lo = lo - floor(lo / period + 0.5) * period    -- the one nearest y = 0
          valleys[#valleys + 1] = { type = "strip", direction = th, from = th, to = th,
            lo = lo, hi = lo + period / 2, period = period, rate = rate, phase = phi,
            exact = true }
        end
      end
    end
  end
  table.sort(valleys, function(a, b) return a.from < b.from end)
  return valleys
end

--- The transverse coordinate of a point z in the strip direction th (its offset from
-- the line through 0 in that direction) and the distance along it.
function M.strip_coords(z, th)
  local w = z * expi(-th)
  local s, y = cparts(w)
  return y, s
end

--- For a strip family v and a transverse offset y: the index m of the strip instance
-- containing y (valley strips are lo + m period < y < hi + m period), whether y lies on
-- a boundary, and the instance's middle offset.
function M.strip_instance(v, y)
  local m = floor((y - v.lo) / v.period)
  local u = y - (v.lo + m * v.period)        -- in [0, period)
  local w = v.hi - v.lo
  local tol = 1e-9 * math.max(1, abs(y)) * v.rate
  local inside = u > tol and u < w - tol
  local boundary = abs(u) <= tol or abs(u - w) <= tol or abs(u - v.period) <= tol
  return m, inside, boundary, v.lo + m * v.period + 0.5 * w
end

M.norm_angle = norm_angle
return M
