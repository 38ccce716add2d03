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

-- Continuation runs in chains of CHAIN values: at values 1, 1 + CHAIN, 1 + 2 CHAIN, ...
-- of the list (and at the first of a shard) the landscape is searched afresh. A row then
-- depends only on its chain, so a sweep split among workers at chain boundaries gives
-- the rows of one process exactly; a fresh search every CHAIN steps costs a few per cent.
M.CHAIN = 64

-- The rows of values[i0..i1] (one process): expansion and quadrature at each value, the
-- landscape continued from the previous step within a chain. on_row(row, i) is called
-- after each row. Returns the rows and the number the time budget left out (the budget
-- counts this process's CPU time from clock0, by default the start of the call).
local function compute_rows(J, values, i0, i1, ctx, on_row, clock0)
  local x, fixed, order, budget, resum = ctx.x, ctx.fixed, ctx.order, ctx.budget, ctx.resum
  local continuation, region = ctx.continuation, ctx.region
  local rows, prev, skipped = {}, nil, 0
  clock0 = clock0 or os.clock()
  for i = i0, i1 do
    local v = values[i]
    local p = copy(fixed)
    p[x] = v
    local row = { x = v }
    if (i - 1) % M.CHAIN == 0 then prev = nil end
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
          sing_seeds = prev.singularities, sing_radii = prev.radii,
          sing_residue_radii = prev.residue_radii })
        row.landscape = "continued"
        -- fewer saddles or singularities than before, or fewer saddles than the argument
        -- principle counts (one entering the region): search the whole region again
        local sc, si = L.saddle_count, L.singularity_info
        if #L.saddles < #prev.saddles or #L.singularities < #prev.singularities
            or (sc and sc.count and sc.found < sc.count) or (si and si.missing) then
          L = J:_landscape(p, nil, false)
          row.landscape = "full search"
        end
      else
        L = J:_landscape(p, region, false)
      end
      -- (quadrature first, and kept when the expansion fails: a pole exactly on a
      -- steepest path stops the one, not the other)
      local q, qe, qinfo = require("steep.integral").quad_with(J, p, L, "deformed")
      row.quad, row.quad_error, row.quad_status = q, qe, qinfo.status
      local r = require("steep.asymptotics").expand(J, p, { order = order, landscape = L,
        resum = resum })
      row.expansion, row.error, row.status = r.value, r.error, r.status
      row.relative_error = cabs(r.value - q) / math.max(cabs(q), 1e-300)
      row.estimated = r.error / math.max(cabs(q), 1e-300)
      -- agreement needs both sides trustworthy: quadrature at its tolerance, and an
      -- expansion that does not call itself suspect
      row.agrees = cabs(r.value - q) <= r.error + qe and qinfo.status == "ok"
        and not tostring(r.status):match("^suspect")
      row.stokes = r.stokes
      if r.resum then row.method, row.level = r.resum.method, r.resum.level end
      -- which valleys the contour's ends use depends on arg x: record it
      local ends = {}
      if not J.contour.closed then
        for _, which in ipairs({ "start", "finish" }) do
          local e = J.contour[which](J.contour)
          if contour_m.is_inf(e) then
            -- (the ray from the point next to the end: in a strip valley its line decides)
            local piece = which == "start" and J.contour.pieces[1]
              or J.contour.pieces[#J.contour.pieces]
            local k = landscape.ray_valley(L, which == "start" and piece.b or piece.a, e.angle)
            ends[#ends + 1] = k and landscape.describe_valley(L.valleys[k]) or "none"
          end
        end
      end
      row.valleys = table.concat(ends, " -> ")
      prev = { region = L.region, saddles = {}, singularities = {}, radii = {},
        residue_radii = {} }
      for _, sd in ipairs(L.saddles) do prev.saddles[#prev.saddles + 1] = sd.at end
      for k, sg in ipairs(L.singularities) do
        prev.singularities[k], prev.radii[k] = sg.at, sg.radius or false
        prev.residue_radii[k] = rawget(sg, "residue_radius") or false   -- (not refining it)
      end
    end)
    if not ok then row.failure = tostring(err); prev = nil end
    rows[#rows + 1] = row
    end
    ::next_value::
    if on_row then on_row(row, i) end
  end
  return rows, skipped
end

-- Rows travel from a worker to the parent as lines of text, one per row: fields
-- name=tag:value separated by tabs; numbers in hexadecimal floating point (exact), so
-- the merged rows equal the worker's bit for bit.
local function encode_number(v)
  if math.type(v) == "integer" then return "i:" .. v end
  if v ~= v then return "n:nan" end
  if v == math.huge then return "n:inf" elseif v == -math.huge then return "n:-inf" end
  return "n:" .. format("%a", v)
end

local function decode_float(s)
  if s == "nan" then return 0 / 0 elseif s == "inf" then return math.huge
  elseif s == "-inf" then return -math.huge end
  return tonumber(s)
end

local function encode_row(row)
  local fields = {}
  for name, v in pairs(row) do
    local t, text = type(v)
    if t == "number" then text = encode_number(v)
    elseif t == "boolean" then text = v and "b:1" or "b:0"
    elseif t == "string" then
      text = "s:" .. v:gsub("[\\\t\n\r]", { ["\\"] = "\\\\", ["\t"] = "\\t", ["\n"] = "\\n",
        ["\r"] = "\\r" })
    elseif complex.is(v) then
      local re, im = cparts(v)
      text = "c:" .. encode_number(re):sub(3) .. "," .. encode_number(im):sub(3)
    else
      error("sweep: a row field '" .. tostring(name) .. "' of type " .. t .. " cannot be sent")
    end
    fields[#fields + 1] = name .. "=" .. text
  end
  table.sort(fields)
  return table.concat(fields, "\t")
end

M.encode_row = encode_row

local function decode_row(line)
  local row = {}
  for field in line:gmatch("[^\t]+") do
    local name, tag, text = field:match("^([^=]+)=(%a):(.*)$")
    if tag == "i" then row[name] = math.tointeger(tonumber(text))
    elseif tag == "n" then row[name] = decode_float(text)
    elseif tag == "b" then row[name] = text == "1"
    elseif tag == "s" then
      row[name] = text:gsub("\\(.)", { ["\\"] = "\\", t = "\t", n = "\n", r = "\r" })
    elseif tag == "c" then
      local re, im = text:match("^([^,]+),(.+)$")
      row[name] = complex.new(decode_float(re), decode_float(im))
    else
      error("sweep: a worker sent an unreadable row: " .. line:sub(1, 80), 0)
    end
  end
  return row
end

M.decode_row = decode_row

-- The chains of i0..i1 (the first may start inside one): a list of {first, last}.
local function chains_of(i0, i1)
  local list, a = {}, i0
  while a <= i1 do
    local b = math.min(i1, ((a - 1) // M.CHAIN + 1) * M.CHAIN)
    list[#list + 1] = { a, b }
    a = b + 1
  end
  return list
end

-- Runs the chains on W child processes (core.fork), chain c on worker (c - 1) % W + 1 (so
-- that a cost that changes along the values is shared out evenly), each writing its rows
-- to a file of its own, line by line; the parent reads them as they come (for progress)
-- and puts the chains back in order. A worker that fails, or a process that cannot fork,
-- is an error. Returns the rows and each worker's CPU seconds.
local function run_workers(J, values, chains, W, ctx, report_progress)
  local workers = {}
  local function cleanup()
    for _, w in ipairs(workers) do
      if w.file then w.file:close(); w.file = nil end
      os.remove(w.name)
    end
  end
  for k = 1, W do
    local mine = {}
    for c = k, #chains, W do mine[#mine + 1] = c end
    local name = os.tmpname()
    io.stdout:flush()
    io.stderr:flush()
    local pid, why = core.fork()
    if pid == 0 then
      -- the child: compute, write, leave (never back into the caller's code)
      local ok = pcall(function()
        local f = assert(io.open(name, "w"))
        local clock0 = os.clock()
        for _, c in ipairs(mine) do
          compute_rows(J, values, chains[c][1], chains[c][2], ctx, function(row)
            assert(f:write(encode_row(row), "\n"))
            f:flush()
          end, clock0)
        end
        assert(f:close())
      end)
      core.child_exit(ok and 0 or 1)
    end
    if not pid then
      for _, w in ipairs(workers) do core.wait(w.pid) end
      cleanup()
      error("sweep: cannot start worker " .. k .. " (" .. tostring(why) .. "): give workers = 1", 0)
    end
    local expected = 0
    for _, c in ipairs(mine) do expected = expected + chains[c][2] - chains[c][1] + 1 end
    workers[k] = { pid = pid, name = name, chains = mine, expected = expected, lines = {},
      partial = "" }
  end
  local done, finished = 0, 0
  local function read_new(w)
    if not w.file then w.file = io.open(w.name, "r") end
    if not w.file then return end
    local chunk = w.file:read("a")
    if chunk and #chunk > 0 then
      local text = w.partial .. chunk
      local last_nl = text:match(".*()\n")
      if last_nl then
        for line in text:sub(1, last_nl - 1):gmatch("[^\n]+") do
          w.lines[#w.lines + 1] = line
          done = done + 1
        end
        w.partial = text:sub(last_nl + 1)
      else
        w.partial = text
      end
    end
  end
  while finished < #workers do
    for _, w in ipairs(workers) do
      if not w.status then
        local st, code, cpu = core.wait(w.pid, true)
        if st ~= "running" then
          w.status, w.code, w.cpu, finished = st, code, cpu, finished + 1
        end
        read_new(w)
      end
    end
    if report_progress then report_progress(done) end
    if finished < #workers then core.sleep(0.05) end
  end
  local by_chain, cpu = {}, {}
  for k, w in ipairs(workers) do
    cpu[k] = w.cpu
    read_new(w)
    if w.status ~= "exit" or w.code ~= 0 or #w.lines ~= w.expected then
      cleanup()
      local first = chains[w.chains[1]]
      error(format("sweep: worker %d (values %d to %d%s) %s after %d of its %d rows: give "
        .. "workers = 1 to see the error in this process", k, first[1], first[2],
        #w.chains > 1 and format(" and %d more chains", #w.chains - 1) or "",
        w.status == "signal" and "was killed by signal " .. tostring(w.code)
          or "stopped (exit code " .. tostring(w.code) .. ")", #w.lines, w.expected), 0)
    end
    local at = 0
    for _, c in ipairs(w.chains) do
      local rows = {}
      for _ = chains[c][1], chains[c][2] do
        at = at + 1
        rows[#rows + 1] = decode_row(w.lines[at])
      end
      by_chain[c] = rows
    end
  end
  cleanup()
  local rows = {}
  for c = 1, #chains do
    for _, r in ipairs(by_chain[c]) do rows[#rows + 1] = r end
  end
  return rows, cpu
end

--- J:sweep{x = {list} | {from =, to =, steps =}, order = N, resum = true | "borel" | "hyper",
-- csv = file, shard = {k, n},
-- workers = W, progress = true|false, <other params>} -> rows
-- Expansion and quadrature over the range. Each step starts from the previous step's
-- saddles and singularities (continuation: Newton from them, no search of the whole
-- region) and falls back to a full search when it finds fewer of them, or fewer saddles
-- than the argument principle counts in the region; chains of M.CHAIN values start with
-- a full search. A shard k of n takes the k-th contiguous block of the values, so the
-- CSV pieces concatenate into the whole table (only shard 1 writes the header). With W
-- workers (default: the processors online) the chains go to W child processes in turn
-- and the rows come back in order, the same as one process computes them.
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
      progress = true, continuation = true, region = true, budget = true, workers = true,
      resum = true }, "sweep")
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
  local workers = opts.workers
  if workers == nil then workers = core.cpu_count() end
  if math.type(workers) == "float" and workers == math.floor(workers) then
    workers = math.tointeger(workers)
  end
  if math.type(workers) ~= "integer" or workers < 1 or workers > 1024 then
    error(format("sweep: option 'workers' must be a whole number from 1 to 1024, got %s",
      tostring(workers)), 2)
  end
  local fixed = {}
  for k, v in pairs(opts) do
    if k ~= x and k ~= "order" and k ~= "csv" and k ~= "shard" and k ~= "progress"
        and k ~= "continuation" and k ~= "region" and k ~= "budget" and k ~= "workers"
        and k ~= "resum" then
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
  local ctx = { x = x, fixed = fixed, order = order, budget = budget, resum = resum,
    continuation = opts.continuation ~= false, region = opts.region }
  local rows, skipped, worker_cpu = nil, 0, nil
  local chains = last >= first and chains_of(first, last) or {}
  local W = math.min(workers, #chains)
  local ok_loop, loop_err = pcall(function()
    if W > 1 then
      rows, worker_cpu = run_workers(J, values, chains, W, ctx, report_progress)
      for _, r in ipairs(rows) do if r.skipped then skipped = skipped + 1 end end
    else
      rows, skipped = compute_rows(J, values, first, last, ctx, report_progress and
        function(_, i) report_progress(i - first + 1) end)
    end
  end)
  if not ok_loop then
    if writer then writer:discard() end
    error(loop_err, 0)
  end
  local out = { rows = rows, large = x, order = order, integral = J, shard = shard,
    status = M.status(rows, skipped, budget), first = first, last = last,
    workers = math.max(1, W), worker_cpu = worker_cpu, resum = resum }
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
  local report_m = require "steep.report"
  local num, wrap = report_m.num, report_m.wrap
  local lines = { wrap(format("%s, %s terms%s", tostring(sw.integral), tostring(sw.order),
      sw.resum and ", resummed" or ""),
    "sweep of ", 4) }
  local columns = { { sw.large }, { "expansion" }, { "quadrature" }, { "rel. error" },
    { "estimated" }, { "" } }
  local cells, failed = {}, {}
  for i, r in ipairs(sw.rows) do
    if r.failure then
      -- (the quadrature where it was done before the expansion failed)
      cells[i] = { num(r.x, nil, 6), "failed (below)",
        r.quad and num(r.quad, r.quad_error, 8) or "" }
      failed[#failed + 1] = r
    else
      local flags = {}
      if not r.agrees then flags[#flags + 1] = "DISAGREES" end
      if not (r.estimated < 1) then flags[#flags + 1] = "no accuracy" end
      if r.stokes then flags[#flags + 1] = "stokes" end
      if r.method then flags[#flags + 1] = r.method end
      cells[i] = { num(r.x, nil, 6), num(r.expansion, r.error, 8), num(r.quad, r.quad_error, 8),
        format("%.3g", r.relative_error), format("%.3g", r.estimated), table.concat(flags, " ") }
    end
  end
  lines[#lines + 1] = report_m.table(columns, cells)
  for _, r in ipairs(failed) do
    lines[#lines + 1] = wrap(r.failure, format("%s = %s failed: ", sw.large, num(r.x, nil, 6)), 4)
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
