-- steep.contour — oriented contours in the complex plane: straight lines, polylines
-- whose first and last points may lie at infinity in a direction, and circles.
--
-- A contour is an immutable list of pieces:
--   {kind = "segment", a = z1, b = z2}           from z1 to z2
--   {kind = "ray_out", a = z, angle = th}         from z to infinity in direction th
--   {kind = "ray_in", angle = th, b = z}          from infinity in direction th to z
--   {kind = "arc", center = c, radius = r, from = th0, to = th1}   (a circle: 0 -> 2pi)
-- Consecutive pieces join end to start; contours concatenate with `..`.

local complex = require "steep.complex"

local cnew, cparts, is_complex = complex.new, complex.parts, complex.is
local format, pi, cos, sin, atan = string.format, math.pi, math.cos, math.sin, math.atan

local M = {}

local Inf = { __name = "steep.inf" }
Inf.__index = Inf
Inf.__tostring = function(p)
  if p.through then return format("inf(%.6g, %s)", p.angle, tostring(p.through)) end
  return format("inf(%.6g)", p.angle)
end

local Contour = { __name = "steep.contour" }
local methods = {}
Contour.__index = methods

local function is_inf(v) return getmetatable(v) == Inf end
local function is_contour(v) return getmetatable(v) == Contour end
M.is_inf, M.is = is_inf, is_contour

-- Angles are kept in (-pi, pi].
local function norm_angle(th)
  th = th % (2 * pi)
  if th > pi then th = th - 2 * pi end
  return th
end
M.norm_angle = norm_angle

--- steep.inf(angle [, through]): the point at infinity reached by the ray in direction
-- `angle` (radians). Where the integrand's valleys are strips (exponents with exp, sinh,
-- cosh of the variable) the end also depends on the line the ray runs along: `through`
-- names a point of it, and a contour then runs along the ray from that point (a path's
-- end without `through` runs along the ray from its neighbouring point).
function M.inf(angle, through)
  if type(angle) ~= "number" or angle ~= angle or angle == math.huge or angle == -math.huge then
    error(format("bad argument #1 to 'inf' (finite angle in radians expected, got %s)",
      tostring(angle)), 2)
  end
  if through ~= nil then
    local re, im = cparts(through)
    if not re or re ~= re or im ~= im or math.abs(re) == math.huge or math.abs(im) == math.huge then
      error(format("bad argument #2 to 'inf' (finite point expected, got %s)",
        re and tostring(through) or type(through)), 2)
    end
    through = cnew(re, im)
  end
  return setmetatable({ angle = norm_angle(angle), through = through }, Inf)
end

local function to_point(v, fname, argn, allow_inf)
  if is_inf(v) then
    if allow_inf then return v end
    error(format("bad argument #%d to '%s' (a point at infinity is allowed only at an end)",
      argn, fname), 3)
  end
  local re, im = cparts(v)
  if not re then
    error(format("bad argument #%d to '%s' (point or steep.inf expected, got %s)", argn, fname,
      type(v)), 3)
  end
  if re ~= re or im ~= im or math.abs(re) == math.huge or math.abs(im) == math.huge then
    error(format("bad argument #%d to '%s' (point is not finite: use steep.inf(angle))",
      argn, fname), 3)
  end
  return cnew(re, im)
end

local function new(pieces, closed)
  return setmetatable({ pieces = pieces, closed = closed or false }, Contour)
end

-- The pieces from p1 to p2 (appended to `out`): a segment, or a ray and, when the end at
-- infinity names the point its ray runs from, the segment between that point and the
-- other one.
local function pieces_from(p1, p2, fname, out)
  if is_inf(p1) and is_inf(p2) then
    error(format("bad argument to '%s' (both ends at infinity: put a finite point between "
      .. "them, e.g. steep.path{steep.inf(a), 0, steep.inf(b)})", fname), 3)
  elseif is_inf(p1) then
    local from = p1.through or p2
    out[#out + 1] = { kind = "ray_in", angle = p1.angle, b = from }
    if from ~= p2 then out[#out + 1] = { kind = "segment", a = from, b = p2 } end
  elseif is_inf(p2) then
    local to = p2.through or p1
    if to ~= p1 then out[#out + 1] = { kind = "segment", a = p1, b = to } end
    out[#out + 1] = { kind = "ray_out", a = to, angle = p2.angle }
  else
    if p1 == p2 then error(format("bad argument to '%s' (a segment of zero length at %s)",
        fname, tostring(p1)), 3) end
    out[#out + 1] = { kind = "segment", a = p1, b = p2 }
  end
  return out
end

--- steep.line(a, b): from a to b; either may be steep.inf(angle). A line between two
-- opposite infinities passes through 0.
function M.line(a, b)
  a, b = to_point(a, "line", 1, true), to_point(b, "line", 2, true)
  if is_inf(a) and is_inf(b) and (a.through or b.through) then
    -- two ends that name the lines of their rays: along one ray in, across, out along
    -- the other (e.g. from inf - i pi to inf + i pi, each along its horizontal line)
    local ta, tb = a.through or cnew(0, 0), b.through or cnew(0, 0)
    local pieces = { { kind = "ray_in", angle = a.angle, b = ta } }
    if ta ~= tb then pieces[#pieces + 1] = { kind = "segment", a = ta, b = tb } end
    pieces[#pieces + 1] = { kind = "ray_out", a = tb, angle = b.angle }
    return new(pieces)
  end
  if is_inf(a) and is_inf(b) then
    local d = norm_angle(b.angle - a.angle)
    if math.abs(math.abs(d) - pi) > 1e-12 then
      error("bad argument #2 to 'line' (ends at infinity in directions that are not opposite:"
        .. " give the points in between with steep.path)", 2)
    end
    return new({ { kind = "ray_in", angle = a.angle, b = cnew(0, 0) },
      { kind = "ray_out", a = cnew(0, 0), angle = b.angle } })
  end
  return new(pieces_from(a, b, "line", {}))
end

--- steep.path{p1, ..., pk}: polyline; first and last may be steep.inf(angle).
function M.path(points)
  if type(points) ~= "table" or is_complex(points) or is_inf(points) then
    error(format("bad argument #1 to 'path' (list of points expected, got %s)", type(points)), 2)
  end
  local n = #points
  if n < 2 then error("bad argument #1 to 'path' (at least two points expected)", 2) end
  local pts = {}
  for k = 1, n do pts[k] = to_point(points[k], "path", 1, k == 1 or k == n) end
  if is_inf(pts[1]) and is_inf(pts[n]) and n == 2 then return M.line(pts[1], pts[2]) end
  local pieces = {}
  for k = 1, n - 1 do pieces_from(pts[k], pts[k + 1], "path", pieces) end
  return new(pieces)
end

--- steep.circle(center, radius): closed, counter-clockwise.
function M.circle(center, radius)
  center = to_point(center, "circle", 1, false)
  if type(radius) ~= "number" or not (radius > 0) or radius == math.huge then
    error(format("bad argument #2 to 'circle' (positive radius expected, got %s)",
      tostring(radius)), 2)
  end
  return new({ { kind = "arc", center = center, radius = radius, from = 0, to = 2 * pi } }, true)
end

local function arc_point(p, th) return p.center + p.radius * cnew(cos(th), sin(th)) end

-- The start and end of a piece: a complex point or a steep.inf.
local function piece_start(p)
  if p.kind == "segment" or p.kind == "ray_out" then return p.a end
  if p.kind == "ray_in" then return M.inf(p.angle, p.b) end
  return arc_point(p, p.from)
end

local function piece_end(p)
  if p.kind == "segment" or p.kind == "ray_in" then return p.b end
  if p.kind == "ray_out" then return M.inf(p.angle, p.a) end
  return arc_point(p, p.to)
end

--- c:start(), c:finish(): the end points (complex or steep.inf); nil for closed contours.
function methods.start(c) if not c.closed then return piece_start(c.pieces[1]) end end
function methods.finish(c) if not c.closed then return piece_end(c.pieces[#c.pieces]) end end

local function same_point(p, q)
  if is_inf(p) or is_inf(q) then
    return is_inf(p) and is_inf(q) and math.abs(norm_angle(p.angle - q.angle)) < 1e-12
  end
  local d = (p - q):abs()
  return d <= 1e-12 * math.max(1, p:abs())
end

--- c1 .. c2: c1 followed by c2; the end of c1 must be the start of c2.
Contour.__concat = function(c1, c2)
  if not is_contour(c1) or not is_contour(c2) then
    error("attempt to concatenate a contour with a " ..
      (is_contour(c1) and type(c2) or type(c1)), 2)
  end
  if c1.closed or c2.closed then error("cannot concatenate a closed contour", 2) end
  local e, s = c1:finish(), c2:start()
  if not same_point(e, s) then
    error(format("cannot concatenate contours: the first ends at %s, the second starts at %s",
      tostring(e), tostring(s)), 2)
  end
  if is_inf(e) then
    error("cannot concatenate contours that meet at infinity (the result would pass "
      .. "through infinity)", 2)
  end
  local pieces = {}
  for _, p in ipairs(c1.pieces) do pieces[#pieces + 1] = p end
  for _, p in ipairs(c2.pieces) do pieces[#pieces + 1] = p end
  return new(pieces)
end

local function reverse_piece(p)
  if p.kind == "segment" then return { kind = "segment", a = p.b, b = p.a } end
  if p.kind == "ray_out" then return { kind = "ray_in", angle = p.angle, b = p.a } end
  if p.kind == "ray_in" then return { kind = "ray_out", a = p.b, angle = p.angle } end
  return { kind = "arc", center = p.center, radius = p.radius, from = p.to, to = p.from }
end

--- c:reverse(): the same curve, traversed the other way.
function methods.reverse(c)
  local pieces = {}
  for k = #c.pieces, 1, -1 do pieces[#pieces + 1] = reverse_piece(c.pieces[k]) end
  return new(pieces, c.closed)
end

--- c:finite_points(): the finite vertices (for the problem's scale).
function methods.finite_points(c)
  local out = {}
  for _, p in ipairs(c.pieces) do
    if p.kind == "arc" then
      out[#out + 1] = p.center + p.radius
      out[#out + 1] = p.center - p.radius
      out[#out + 1] = p.center + cnew(0, p.radius)
      out[#out + 1] = p.center - cnew(0, p.radius)
    else
      if p.a then out[#out + 1] = p.a end
      if p.b then out[#out + 1] = p.b end
    end
  end
  return out
end

--- c:sample{radius = R, n = N}: a polyline through the contour: each segment in N
-- pieces, each ray out to |t| = R (at least its start plus one unit of length), each arc
-- in N pieces per quarter turn.
function methods.sample(c, opts)
  if opts ~= nil and type(opts) ~= "table" then
    error(format("bad argument #1 to 'sample' (options table expected, got %s)", type(opts)), 2)
  end
  opts = opts or {}
  local R, n = opts.radius or 10, opts.n or 16
  if type(R) ~= "number" or not (R > 0) or R == math.huge then
    error(format("sample: option 'radius' must be a positive finite number, got %s",
      tostring(R)), 2)
  end
  if math.type(n) == "float" and n == math.floor(n) then n = math.tointeger(n) or n end
  if math.type(n) ~= "integer" or n < 1 or n > 1e6 then
    error(format("sample: option 'n' must be a whole number from 1 to 10^6, got %s",
      tostring(n)), 2)
  end
  local pts = {}
  local function add(z)
    local last = pts[#pts]
    if not last or (z - last):abs() > 1e-14 * math.max(1, z:abs()) then pts[#pts + 1] = z end
  end
  local function ray_end(a, th)
    local dir = cnew(cos(th), sin(th))
    -- |a + s dir| = R  ->  s = -Re(conj(a) dir) + sqrt(...)
    local ar, ai = cparts(a)
    local proj = ar * cos(th) + ai * sin(th)
    local a2 = ar * ar + ai * ai
    local s = -proj + math.sqrt(math.max(0, proj * proj - a2 + R * R))
    return a + math.max(s, 1) * dir
  end
  for _, p in ipairs(c.pieces) do
    if p.kind == "segment" then
      for k = 0, n do add(p.a + (p.b - p.a) * (k / n)) end
    elseif p.kind == "ray_out" then
      local e = ray_end(p.a, p.angle)
      for k = 0, n do add(p.a + (e - p.a) * (k / n)) end
    elseif p.kind == "ray_in" then
      local e = ray_end(p.b, p.angle)
      for k = 0, n do add(e + (p.b - e) * (k / n)) end
    else
      local m = math.max(4, math.ceil(math.abs(p.to - p.from) / (pi / 2) * n))
      for k = 0, m do add(arc_point(p, p.from + (p.to - p.from) * k / m)) end
    end
  end
  return pts
end

Contour.__tostring = function(c)
  local parts = {}
  for _, p in ipairs(c.pieces) do
    if p.kind == "arc" then
      parts[#parts + 1] = format("arc(center %s, radius %.6g, %.6g..%.6g)", tostring(p.center),
        p.radius, p.from, p.to)
    else
      -- (a ray's end is shown by its direction; its line is fixed by its finite point)
      local s = p.kind == "ray_in" and format("inf(%.6g)", p.angle) or tostring(piece_start(p))
      local e = p.kind == "ray_out" and format("inf(%.6g)", p.angle) or tostring(piece_end(p))
      parts[#parts + 1] = s .. " -> " .. e
    end
  end
  return "contour[" .. table.concat(parts, ", ") .. "]"
end

M.arc_point = arc_point
M.new = new
return M
