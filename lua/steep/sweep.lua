-- steep.sweep — J:sweep: expansion and quadrature over a range of the large parameter,
-- with continuation from step to step, shards, a time budget, progress, and the CSV
-- and text reports of the rows.

local core = require "steep.core"
local complex = require "steep.complex"
local contour_m = require "steep.contour"
local landscape = require "steep.landscape"
local routes = require "steep.routes"
local files = require "steep.files"

local cparts = complex.parts
local cabs = landscape.cabs
local format = string.format
local copy, fmtv, need_table = routes.copy, routes.fmtv, routes.need_table

local M = {}

--- The block of values shard k of n takes from a list of N: first .. last (empty when
-- last < first). Integer arithmetic: floating point shares lost values at the block
-- edges (for 15 values in 11 shards the last value belonged to no shard). Shards
-- partition the list: shard k ends where shard k + 1 begins.
function M.shard_range(N, k, n)
  return (k - 1) * N // n + 1, k * N // n
end

local MAX_SHARDS = 1 << 31   -- k * N stays far inside the integers (N <= 10^6 + 1)

local function check_shard(shard)
  local k = type(shard) == "table" and math.tointeger(shard[1])
  local n = type(shard) == "table" and math.tointeger(shard[2])
  if not (k and n and k >= 1 and k <= n and n <= MAX_SHARDS) then
    local got = type(shard) == "table"
      and format("{%s, %s}", tostring(shard[1]), tostring(shard[2])) or tostring(shard)
    error(format("sweep: option 'shard' must be {k, n} with whole numbers 1 <= k <= n <= 2^31, "
      .. "got %s", got), 3)
  end
  return { k, n }
end

-- Progress on stderr. On a terminal the count is redrawn in place; otherwise (stderr
-- going to a log) a line every PROGRESS_EVERY seconds with the count, the rate and the
-- time left, and one at the end: no carriage returns in a file.
local PROGRESS_EVERY = 5

local function progress_reporter(total, on_terminal)
  local start = os.time()
  local last_line = start
  return function(done)
    if on_terminal then
      io.stderr:write(format("\rsweep: %d/%d", done, total))
      if done == total then io.stderr:write("\n") end
      return
    end
    local now = os.time()
    if done == total then
      io.stderr:write(format("sweep: %d/%d values done in %d s\n", done, total, now - start))
    elseif now - last_line >= PROGRESS_EVERY then
      last_line = now
      local rate = done / math.max(now - start, 1)
      io.stderr:write(format("sweep: %d/%d values, %.3g values/s, about %d s left\n", done,
        total, rate, math.floor((total - done) / rate + 0.5)))
    end
  end
end

--- J:sweep{x = {list} | {from =, to =, steps =}, order = N, resum = true | "borel" | "hyper",
-- csv = file, shard = {k, n}, progress = true|false, <other params>} -> rows
-- Expansion and quadrature over the range. Each step starts from the previous step's
-- saddles and singularities (continuation: Newton from them, no search of the whole
-- region) and falls back to a full search when it finds fewer of them, or fewer saddles
-- than the argument principle counts in the region. A shard k of n takes the
-- k-th contiguous block of the values, so the CSV pieces concatenate into the whole
-- table (only shard 1 writes the header).
function M.sweep(J, opts)
  need_table(opts, "sweep")
  if not J.large then error("sweep: the integral names no large parameter", 2) end
  local x = J.large.name
  local values = routes.parameter_values(opts[x], "sweep")
  -- options and the other parameters are checked once here (an unknown name or an
  -- unbound parameter would otherwise fail every row alike)
  do
    local probe = copy(opts)
    probe[x] = values[1]
    local integral_m = require("steep.integral")
    local _, o = integral_m.split_options(J, probe, { order = true, csv = true, shard = true,
      progress = true, continuation = true, region = true, budget = true, resum = true },
      "sweep")
    if o.region then opts = copy(opts); opts.region = integral_m.check_region(o.region, "sweep", J) end
  end
  -- beyond optimal truncation (lua/steep/resum.lua): from the optimally truncated series
  local resum = require("steep.resum").check_option(opts.resum, "sweep", opts.order)
  local order = require("steep.asymptotics").check_order(opts.order or (resum and "optimal" or 4),
    "sweep")
  local shard = opts.shard
  local first, last = 1, #values
  if shard ~= nil then
    shard = check_shard(shard)
    first, last = M.shard_range(#values, shard[1], shard[2])
  end
  local budget = routes.check_budget(opts.budget, "sweep")
  local fixed = {}
  for k, v in pairs(opts) do
    if k ~= x and k ~= "order" and k ~= "csv" and k ~= "shard" and k ~= "progress"
        and k ~= "continuation" and k ~= "region" and k ~= "budget" and k ~= "resum" then
      fixed[k] = v
    end
  end
  local progress = opts.progress
  if progress ~= nil and type(progress) ~= "boolean" then
    error("sweep: option 'progress' must be true or false, got " .. type(progress), 2)
  end
  if progress == nil then progress = (last - first) >= 20 end
  local report_progress = progress and progress_reporter(last - first + 1, core.isatty(2))
  -- the CSV file is opened before the work: a bad name fails now, not after the sweep
  local writer = opts.csv ~= nil and files.open(opts.csv, "sweep", "csv", 2)
  local continuation = opts.continuation ~= false
  local rows = {}
  local prev
  local clock0 = os.clock()
  local skipped = 0
  local ok_loop, loop_err = pcall(function()
  for i = first, last do
    local v = values[i]
    local p = copy(fixed)
    p[x] = v
    local row = { x = v }
    if budget and os.clock() - clock0 > budget then
      row.failure = format("not computed: the time budget of %g s was used up", budget)
      row.skipped = true
      skipped = skipped + 1
      rows[#rows + 1] = row
      goto next_value
    end
    do
    local ok, err = pcall(function()
      local L
      row.landscape = "full search"
      if continuation and prev then
        L = J:_landscape(p, prev.region, false, { seeds = prev.saddles, fast = true,
          sing_seeds = prev.singularities, sing_radii = prev.radii })
        row.landscape = "continued"
        -- fewer saddles or singularities than before, or fewer saddles than the argument
        -- principle counts (one entering the region): search the whole region again
        local sc = L.saddle_count
        if #L.saddles < #prev.saddles or #L.singularities < #prev.singularities
            or (sc and sc.count and sc.found < sc.count) then
          L = J:_landscape(p, nil, false)
          row.landscape = "full search"
        end
      else
        L = J:_landscape(p, opts.region, false)
      end
      local r = require("steep.asymptotics").expand(J, p, { order = order, landscape = L,
        resum = resum })
      local q, qe = require("steep.integral").quad_with(J, p, L, "deformed")
      row.expansion, row.error, row.quad, row.quad_error = r.value, r.error, q, qe
      row.relative_error = cabs(r.value - q) / math.max(cabs(q), 1e-300)
      row.estimated = r.error / math.max(cabs(q), 1e-300)
      row.agrees = cabs(r.value - q) <= 3 * (r.error + qe)
      row.stokes = r.stokes
      if r.resum then row.method, row.level = r.resum.method, r.resum.level end
      -- which valleys the contour's ends use depends on arg x: record it
      local ends = {}
      if not J.contour.closed then
        for _, which in ipairs({ "start", "finish" }) do
          local e = J.contour[which](J.contour)
          if contour_m.is_inf(e) then
            local k = landscape.valley_of(L.valleys, e.angle)
            ends[#ends + 1] = k and landscape.describe_valley(L.valleys[k]) or "none"
          end
        end
      end
      row.valleys = table.concat(ends, " -> ")
      prev = { region = L.region, saddles = {}, singularities = {}, radii = {} }
      for _, sd in ipairs(L.saddles) do prev.saddles[#prev.saddles + 1] = sd.at end
      for k, sg in ipairs(L.singularities) do
        prev.singularities[k], prev.radii[k] = sg.at, sg.radius or false
      end
    end)
    if not ok then row.failure = tostring(err); prev = nil end
    rows[#rows + 1] = row
    end
    ::next_value::
    if report_progress then report_progress(i - first + 1) end
  end
  end)
  if not ok_loop then
    if writer then writer:discard() end
    error(loop_err, 0)
  end
  local out = { rows = rows, large = x, order = order, integral = J, shard = shard,
    status = M.status(rows, skipped, budget), first = first, last = last, resum = resum }
  setmetatable(out, { __index = { report = M.sweep_report, csv = M.sweep_csv } })
  if writer then
    writer:write(out:csv(not shard or shard[1] == 1))
    local done, why = writer:commit()
    if not done then
      error(files.failure("sweep: " .. why .. " (the computed rows are kept: the error's "
        .. "field result is the sweep)", out), 2)
    end
  end
  return out
end

--- The sweep's status: "complete" when every row was computed, otherwise "incomplete"
-- with the counts of failed rows (the first reason quoted) and of rows the time budget
-- left out.
function M.status(rows, skipped, budget)
  local failed, first_reason, at = 0, nil, nil
  for _, r in ipairs(rows) do
    if r.failure and not r.skipped then
      failed = failed + 1
      if not first_reason then first_reason, at = r.failure, r.x end
    end
  end
  if failed == 0 and skipped == 0 then return "complete" end
  local parts = {}
  if failed > 0 then
    parts[#parts + 1] = format("%d of %d rows failed (first at %s: %s)", failed, #rows, fmtv(at),
      (first_reason:gsub("\n.*", "")))
  end
  if skipped > 0 then
    parts[#parts + 1] = format("%d of %d rows not computed (time budget of %g s reached)",
      skipped, #rows, budget)
  end
  return "incomplete: " .. table.concat(parts, "; ")
end

-- A complex column is two fields (re, im), a real column one; a missing value (a failed
-- row) leaves its fields empty, so every line has as many fields as the header.
local function csv_complex(v)
  if v == nil then return "," end
  local re, im = cparts(v)
  return format("%.17g,%.17g", re, im)
end

local function csv_real(v)
  if v == nil then return "" end
  return format("%.17g", (cparts(v)))
end

-- A boolean field: true or false, empty where the row has no value (a failed row);
-- `computed` says a missing value means false (a flag only set when it holds).
local function csv_bool(v, computed)
  if v == nil and not computed then return "" end
  return tostring(v and true or false)
end

-- A quoted text field: inner quotes and line breaks would split the field or the line.
local function csv_text(s)
  return '"' .. (s or ""):gsub('"', "'"):gsub("[\r\n]+", " ") .. '"'
end

-- (with resum, two more columns at the end: the method and the level it reached)
function M.sweep_csv(sw, header)
  local lines = {}
  if header ~= false then
    lines[1] = sw.large .. "_re," .. sw.large .. "_im,expansion_re,expansion_im,error,"
      .. "quad_re,quad_im,quad_error,relative_error,estimated,agrees,stokes,valleys,failure"
      .. (sw.resum and ",method,level" or "")
  end
  for _, r in ipairs(sw.rows) do
    local fields = { csv_complex(r.x), csv_complex(r.expansion),
      csv_real(r.error), csv_complex(r.quad), csv_real(r.quad_error), csv_real(r.relative_error),
      csv_real(r.estimated), csv_bool(r.agrees), csv_bool(r.stokes, r.expansion ~= nil),
      csv_text(r.valleys), csv_text(r.failure) }
    if sw.resum then
      fields[#fields + 1] = csv_text(r.method)
      fields[#fields + 1] = r.level and format("%d", r.level) or ""
    end
    lines[#lines + 1] = table.concat(fields, ",")
  end
  return table.concat(lines, "\n") .. "\n"
end

function M.sweep_report(sw, opts)
  local cols = { "x", "expansion", "error", "quad", "quad_error", "relative_error", "estimated",
    "agrees", "stokes", "valleys", "landscape", "failure" }
  if sw.resum then cols[#cols + 1] = "method"; cols[#cols + 1] = "level" end
  local other = require("steep.report").format(opts, sw, sw.rows, cols)
  if other then return other end
  local lines = { format("sweep of %s, %s terms%s", tostring(sw.integral), tostring(sw.order),
      sw.resum and ", resummed" or ""),
    format("%-12s %-26s %-26s %-11s %-11s %s", sw.large, "expansion", "quadrature",
      "rel. error", "estimated", "") }
  for _, r in ipairs(sw.rows) do
    if r.failure then
      lines[#lines + 1] = format("%-12s failed: %s", fmtv(r.x), r.failure)
    else
      lines[#lines + 1] = format("%-12s %-26s %-26s %-11.3g %-11.3g %s", fmtv(r.x),
        fmtv(r.expansion), fmtv(r.quad), r.relative_error, r.estimated,
        (r.agrees and "" or "DISAGREES") .. (r.stokes and " stokes" or "")
        .. (r.method and (" " .. r.method) or ""))
    end
  end
  local continued, searched = 0, 0
  for _, r in ipairs(sw.rows) do
    if r.failure then   -- (not counted)
    elseif r.landscape == "continued" then continued = continued + 1
    elseif r.landscape then searched = searched + 1 end
  end
  lines[#lines + 1] = format("saddles followed from the previous step at %d values, searched "
    .. "for in the whole region at %d", continued, searched)
  lines[#lines + 1] = "status: " .. tostring(sw.status)
  return table.concat(lines, "\n")
end

return M
