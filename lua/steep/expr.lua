-- steep.expr — expressions: an immutable DAG built by operator overloading on symbols
-- (variables and parameters), numbers and complex values, and compiled to a C tape.
--
-- Nodes are hash-consed: building the same operation on the same operands twice returns
-- the same node, so shared subexpressions are merged and compile to one tape slot.

local core = require "steep.core"
local complex = require "steep.complex"

local type, getmetatable, setmetatable, tostring = type, getmetatable, setmetatable, tostring
local format, concat, tointeger, floor = string.format, table.concat, math.tointeger, math.floor
local cparts, cnew, capply = complex.parts, complex.new, complex.apply

local M = {}
local Expr = { __name = "steep.expr" }
local methods = {}
Expr.__index = methods

-- The cache of nodes by structural key; weak values so unused nodes are collected.
local nodes = setmetatable({}, { __mode = "v" })
local next_id = 0

local function node(key, fields)
  local n = nodes[key]
  if n then return n end
  next_id = next_id + 1
  fields.id = next_id
  n = setmetatable(fields, Expr)
  nodes[key] = n
  return n
end

local function is_expr(v) return getmetatable(v) == Expr end
M.is = is_expr

local function const(v)
  local re, im = cparts(v)
  return node(format("c:%a:%a", re, im), { op = "const", re = re, im = im })
end

--- symbol(kind, name): kind is "var" or "param".
function M.symbol(kind, name)
  if type(name) ~= "string" or not name:match("^[%a_][%w_]*$") then
    error(format("bad argument #1 to '%s' (name expected: letters, digits, _; got %s)",
      kind, type(name) == "string" and format("%q", name) or type(name)), 3)
  end
  return node(kind .. ":" .. name, { op = kind, name = name })
end

-- Turns an operand into a node: expressions pass, numbers and complex values become
-- constants; anything else is an error at the caller's line (level 3: the line that
-- used the operator, when called from a metamethod).
local function lift(v, level)
  if is_expr(v) then return v end
  if cparts(v) then return const(v) end
  error(format("attempt to use a %s value in an expression", type(v)), level or 3)
end

local function value_of(n) -- constant node -> number or complex, else nil
  if n.op ~= "const" then return nil end
  if n.im == 0 then return n.re end
  return cnew(n.re, n.im)
end

local function is_value(n, x) return n.op == "const" and n.re == x and n.im == 0 end
local function finite(v) return v == v and v ~= math.huge and v ~= -math.huge end

local function binary(op, a, b)
  return node(format("%s:%d:%d", op, a.id, b.id), { op = op, a = a, b = b })
end

local function unary(op, a, k)
  if k ~= nil then
    local kr, ki = cparts(k)
    return node(format("%s:%d:%a:%a", op, a.id, kr, ki), { op = op, a = a, k = k })
  end
  return node(format("%s:%d", op, a.id), { op = op, a = a })
end

-- Constant folding: an operation on two constants is done now, with the same complex
-- arithmetic the tape would use.
local fold = {
  add = function(x, y) return x + y end, sub = function(x, y) return x - y end,
  mul = function(x, y) return x * y end, div = function(x, y) return x / y end,
}

-- Construction-time simplifications: constants fold; x+0 = 0+x = x, x-0 = x, 0-x = -x,
-- x*1 = 1*x = x, x*0 = 0*x = 0, x/1 = x, -(-x) = x. (x*0 = 0 treats x as finite, as
-- algebra on expressions does.)
local function add(a, b)
  a, b = lift(a, 3), lift(b, 3)
  local va, vb = value_of(a), value_of(b)
  if va and vb then return const(fold.add(va, vb)) end
  if is_value(a, 0) then return b end
  if is_value(b, 0) then return a end
  return binary("add", a, b)
end

local function neg(a)
  if a.op == "neg" then return a.a end
  local va = value_of(a)
  if va then return const(-va) end
  return unary("neg", a)
end

local function sub(a, b)
  a, b = lift(a, 3), lift(b, 3)
  local va, vb = value_of(a), value_of(b)
  if va and vb then return const(fold.sub(va, vb)) end
  if is_value(b, 0) then return a end
  if is_value(a, 0) then return neg(b) end
  return binary("sub", a, b)
end

local function mul(a, b)
  a, b = lift(a, 3), lift(b, 3)
  local va, vb = value_of(a), value_of(b)
  if va and vb then return const(fold.mul(va, vb)) end
  if is_value(a, 1) then return b end
  if is_value(b, 1) then return a end
  if is_value(a, 0) or is_value(b, 0) then return const(0) end
  return binary("mul", a, b)
end

local function div(a, b)
  a, b = lift(a, 3), lift(b, 3)
  local va, vb = value_of(a), value_of(b)
  if va and vb and not (vb == 0) then return const(fold.div(va, vb)) end
  if is_value(b, 1) then return a end
  return binary("div", a, b)
end

local function apply(name, a)
  local va = value_of(a)
  if va then return const(capply(name, va)) end
  return unary(name, a)
end

-- Powers: a^n for an integer n is "powi" (repeated multiplication, no log), a^c for
-- another constant c is "powc" (principal branch), and a^b for an expression b is
-- exp(b*log(a)). a^1 = a, a^0 = 1.
local function pow(a, b)
  a, b = lift(a, 3), lift(b, 3)
  local va, vb = value_of(a), value_of(b)
  if va and vb then
    -- a negative real base with a non-integer real exponent: the principal complex
    -- value, as powc gives on the tape (Lua's real ^ gives NaN there)
    if type(va) == "number" and va < 0 and type(vb) == "number" and vb ~= floor(vb) then
      va = cnew(va, 0)
    end
    return const(va ^ vb)
  end
  if vb then
    local br, bi = cparts(vb)
    if bi == 0 and br == floor(br) and math.abs(br) <= 1e9 then
      local n = tointeger(br)
      if n == 1 then return a end
      if n == 0 then return const(1) end
      return unary("powi", a, n)
    end
    return unary("powc", a, vb)
  end
  return apply("exp", mul(b, apply("log", a)))
end

Expr.__add = add
Expr.__sub = sub
Expr.__mul = mul
Expr.__div = div
Expr.__pow = pow
Expr.__unm = function(a) return neg(a) end
Expr.__eq = rawequal
Expr.__idiv = function() error("integer division is not defined on expressions", 2) end
Expr.__mod = function() error("the modulo operator is not defined on expressions", 2) end
Expr.__concat = function() error("cannot concatenate an expression (use tostring)", 2) end

--- fn(name, v): the named elementary function of an expression, number or complex value.
function M.fn(name, v)
  if is_expr(v) then return apply(name, v) end
  local r = capply(name, v)
  if r == nil then
    error(format("bad argument #1 to '%s' (number, complex or expression expected, got %s)",
      name, type(v) == "userdata" and (getmetatable(v) or {}).__name or type(v)), 3)
  end
  return r
end

-- Printing: infix with the usual precedences (sum 1, product 2, unary minus 3, power 4).
local prec = { add = 1, sub = 1, mul = 2, div = 2, neg = 3, powi = 4, powc = 4 }

local function const_text(n)
  if n.im == 0 then return format("%.15g", n.re), n.re < 0 and 3 or 5 end
  if n.re == 0 then
    if n.im == 1 then return "i", 5 end
    return format("%.15gi", n.im), n.im < 0 and 3 or 2
  end
  return tostring(cnew(n.re, n.im)), 1
end

local function text(n)
  local op = n.op
  if op == "var" or op == "param" then return n.name, 5 end
  if op == "const" then return const_text(n) end
  local p = prec[op]
  if not p then return op .. "(" .. (text(n.a)) .. ")", 5 end
  local function wrap(child, min)
    local s, q = text(child)
    if q < min then return "(" .. s .. ")" end
    return s
  end
  if op == "neg" then return "-" .. wrap(n.a, 3), 3 end
  if op == "powi" or op == "powc" then
    local k, ks = n.k, nil
    if type(k) == "number" then
      ks = format("%.15g", k)
      if k < 0 then ks = "(" .. ks .. ")" end
    else
      ks = "(" .. tostring(k) .. ")"
    end
    return wrap(n.a, 5) .. "^" .. ks, 4
  end
  local sym = ({ add = " + ", sub = " - ", mul = "*", div = "/" })[op]
  -- left operand binds at the same level; the right one must be stronger for - and /
  local right_min = (op == "sub" or op == "div") and p + 1 or p
  return wrap(n.a, p) .. sym .. wrap(n.b, right_min), p
end

--- The nodes of the expressions in the list, children before parents, each once (an
-- explicit stack: a chain of 10^5 or more operations must not exhaust Lua's stack).
local function walk(roots)
  local order, seen = {}, {}
  local stack, state = {}, {}
  for _, r in ipairs(roots) do
    if not seen[r] then
      seen[r] = true
      local top = 1
      stack[1], state[1] = r, 0
      while top > 0 do
        local n, st = stack[top], state[top]
        if st < 2 then
          state[top] = st + 1
          local child = (st == 0) and n.a or n.b
          if child and not seen[child] then
            seen[child] = true
            top = top + 1
            stack[top], state[top] = child, 0
          end
        else
          order[#order + 1] = n
          top = top - 1
        end
      end
    end
  end
  return order
end

-- Printing is recursive and a DAG with shared nodes can print exponentially long
-- ((t+1)^2 squared 25 times as products prints 2^25 factors): beyond this many
-- characters (bounded from above, per node, without building the text) an expression
-- prints as a summary.
local PRINT_LIMIT = 20000

Expr.__tostring = function(n)
  local size, count = {}, 0
  for _, m in ipairs(walk({ n })) do
    count = count + 1
    if m.op == "var" or m.op == "param" then size[m] = #m.name
    elseif m.op == "const" then size[m] = 48.0
    else size[m] = 12.0 + (m.a and size[m.a] or 0) + (m.b and size[m.b] or 0) + (m.k and 48 or 0) end
  end
  if size[n] > PRINT_LIMIT then
    local names = {}
    for _, m in ipairs(walk({ n })) do
      if m.op == "var" or m.op == "param" then names[#names + 1] = m.name end
    end
    return format("<expression of %d operations in %s, too long to print>", count,
      #names > 0 and concat(names, ", ") or "no symbols")
  end
  return (text(n))
end

function methods.symbols(e)
  local out = {}
  for _, n in ipairs(walk({ e })) do
    if n.op == "var" or n.op == "param" then out[#out + 1] = n.name end
  end
  return out
end

function methods.depends_on(e, sym)
  for _, n in ipairs(walk({ e })) do
    if n == sym then return true end
  end
  return false
end

--- compile(exprs, var) -> tape. exprs: an expression/number or a list of them (the
-- tape's outputs in that order). var: the variable symbol fed by the evaluation point
-- (nil: none); every other symbol becomes a parameter bound by name at evaluation.
-- level: the error level to blame (default 2, the caller; steep.integral passes 3, its
-- own caller).
function M.compile(exprs, var, level)
  local lvl = level or 2
  if is_expr(exprs) or cparts(exprs) then exprs = { exprs } end
  if type(exprs) ~= "table" or getmetatable(exprs) ~= nil then
    error(format("bad argument #1 to 'compile' (expression, number, complex value or list "
      .. "of them expected, got %s)", type(exprs)), lvl)
  end
  if #exprs == 0 then
    error("bad argument #1 to 'compile' (the list of expressions is empty)", lvl)
  end
  local roots = {}
  for i, e in ipairs(exprs) do
    if not (is_expr(e) or cparts(e)) then
      error(format("bad argument #1 to 'compile' (element %d: attempt to use a %s value in "
        .. "an expression)", i, type(e)), lvl)
    end
    roots[i] = lift(e)
  end
  if var ~= nil and not (is_expr(var) and (var.op == "var" or var.op == "param")) then
    error("bad argument #2 to 'compile' (symbol expected)", lvl)
  end
  local order = walk(roots)
  local max = core.max_tape or 100000
  if #order > max then
    error(format("compile: the expression is too large for a tape (%d distinct operations, "
      .. "at most %d): simplify it or split it", #order, max), lvl)
  end
  local code, slot, params, pindex, kinds = {}, {}, {}, {}, {}
  for _, n in ipairs(order) do
    if (n.op == "const" and not (finite(n.re) and finite(n.im)))
        or (n.op == "powc" and not (finite(cparts(n.k)) and finite(select(2, cparts(n.k))))) then
      local v = n.op == "const" and value_of(n) or n.k
      error(format("compile: a constant is not finite (%s%s): a NaN or an infinity cannot "
        .. "be evaluated on a tape", tostring(v),
        n.op == "powc" and (" as the power in " .. (text(n))) or ""), lvl)
    end
    local ins
    if n == var then
      ins = { "var" }
    elseif n.op == "var" or n.op == "param" then
      if kinds[n.name] and kinds[n.name] ~= n.op then
        error(format("compile: '%s' is used both as a variable and as a parameter", n.name), lvl)
      end
      kinds[n.name] = n.op
      if not pindex[n.name] then
        params[#params + 1] = n.name
        pindex[n.name] = #params
      end
      ins = { "param", k = pindex[n.name] }
    elseif n.op == "const" then
      ins = { "const", c = value_of(n) }
    else
      ins = { n.op, a = n.a and slot[n.a], b = n.b and slot[n.b] }
      if n.op == "powi" then ins.k = n.k elseif n.op == "powc" then ins.c = n.k end
    end
    code[#code + 1] = ins
    slot[n] = #code
  end
  local outputs = {}
  for i, r in ipairs(roots) do outputs[i] = slot[r] end
  return core.tape { code = code, params = params, outputs = outputs }
end

--- e:value(bindings) — the value with every symbol bound by name.
function methods.value(e, bindings)
  local tape = M.compile(e)
  return (tape:eval(0, bindings or {}))
end

---------------------------------------------------------------------------------------
-- Derivatives and substitution (both rebuild through the constructors above, so the
-- results are simplified and merged like any other expression). Both go through the
-- nodes in walk's order, children first, without recursion: an expression nested 2*10^5
-- deep overflowed Lua's stack when they recursed.
---------------------------------------------------------------------------------------

local rebuild2 = { add = add, sub = sub, mul = mul, div = div }

--- substitute(e, map): e with every symbol node that is a key of map replaced by the
-- (expression, number or complex) value.
function M.substitute(e, map)
  local root = lift(e, 3)
  local memo = {}
  for _, n in ipairs(walk({ root })) do
    local r
    if map[n] ~= nil then
      r = lift(map[n], 3)
    elseif n.op == "const" or n.op == "var" or n.op == "param" then
      r = n
    elseif rebuild2[n.op] then
      r = rebuild2[n.op](memo[n.a], memo[n.b])
    elseif n.op == "neg" then
      r = neg(memo[n.a])
    elseif n.op == "powi" or n.op == "powc" then
      r = pow(memo[n.a], n.k)
    else
      r = apply(n.op, memo[n.a])
    end
    memo[n] = r
  end
  return memo[root]
end

--- diff(e, sym): the derivative of e with respect to the symbol sym (chain rule on the
-- DAG; shared subexpressions are differentiated once).
function M.diff(e, sym)
  local root = lift(e, 3)
  local memo = {}
  local zero, one = const(0), const(1)
  local function d(n) return memo[n] end   -- (children come first: already known)
  for _, n in ipairs(walk({ root })) do
    local op, r = n.op, nil
    if op == "const" or op == "param" or op == "var" then
      r = (n == sym) and one or zero
    elseif op == "add" then r = add(d(n.a), d(n.b))
    elseif op == "sub" then r = sub(d(n.a), d(n.b))
    elseif op == "mul" then r = add(mul(d(n.a), n.b), mul(n.a, d(n.b)))
    elseif op == "div" then r = div(sub(mul(d(n.a), n.b), mul(n.a, d(n.b))), pow(n.b, 2))
    elseif op == "neg" then r = neg(d(n.a))
    elseif op == "powi" or op == "powc" then
      r = mul(mul(n.k, pow(n.a, n.k - 1)), d(n.a))
    else
      local a, da = n.a, d(n.a)
      local f = {
        exp = function() return n end,
        log = function() return div(1, a) end,
        sqrt = function() return div(1, mul(2, n)) end,
        sin = function() return apply("cos", a) end,
        cos = function() return neg(apply("sin", a)) end,
        tan = function() return add(1, pow(n, 2)) end,
        sinh = function() return apply("cosh", a) end,
        cosh = function() return apply("sinh", a) end,
        tanh = function() return sub(1, pow(n, 2)) end,
        atan = function() return div(1, add(1, pow(a, 2))) end,
      }
      r = mul(f[op](), da)
    end
    memo[n] = r
  end
  return memo[root]
end

M.const = const
M.lift = lift
M.metatable = Expr
return M
