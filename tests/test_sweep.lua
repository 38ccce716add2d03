-- Tests of sweeps on several processes (J:sweep{workers = W}): the rows merged from the
-- workers equal those of one process bit for bit (the chains of continuation are the
-- same), with shards too; the CSV is the same text; rows cross the process boundary
-- exactly (the row coding keeps integers, infinities, NaN and text with tabs and line
-- breaks); the option is checked. The chain length (steep.sweep's CHAIN, a tunable
-- cutoff) is lowered so that a few dozen values make several chains.
local lu = require "luaunit"
local H = require "helpers"
local steep = H.steep
local sweep_m = require "steep.sweep"

local pi, I = math.pi, steep.I

TestSweepWorkers = {}

-- exp(-t^2/2 + i x t) / (t - P) along the real line, P = -0.45 + 0.8 i: a saddle that
-- moves with x past the level of a pole (the family of tests/test_routes.lua)
local function family()
  local t, x = steep.var "t", steep.param "x"
  local P = steep.complex(-0.45, 0.8)
  return steep.integral { var = t, exponent = -t ^ 2 / 2 + I * x * t, amplitude = 1 / (t - P),
    contour = steep.line(steep.inf(pi), steep.inf(0)), large = x }
end

-- Every field of every row equal (== on numbers, complex values, strings, booleans).
local function same_rows(a, b, msg)
  lu.assertEquals(#a.rows, #b.rows, msg .. ": as many rows")
  for i, r in ipairs(a.rows) do
    local q = b.rows[i]
    for k, v in pairs(r) do
      if not (q[k] == v or (v ~= v and q[k] ~= q[k])) then
        lu.fail(string.format("%s: row %d field %s differs: %s against %s", msg, i, k,
          tostring(v), tostring(q[k])))
      end
    end
    for k in pairs(q) do
      lu.assertNotNil(r[k], string.format("%s: row %d has an extra field %s", msg, i, k))
    end
  end
end

function TestSweepWorkers:setUp() self.chain = sweep_m.CHAIN; sweep_m.CHAIN = 4 end
function TestSweepWorkers:tearDown() sweep_m.CHAIN = self.chain end

function TestSweepWorkers:test_workers_give_the_rows_of_one_process()
  local J = family()
  local values = { from = 1, to = 6, steps = 22 }   -- 23 values, 6 chains of 4
  local one = J:sweep { x = values, order = 4, workers = 1, progress = false }
  lu.assertEquals(one.workers, 1)
  lu.assertEquals(one.status, "complete")
  -- chains start afresh: a full search at values 1, 5, 9, ...
  for i, r in ipairs(one.rows) do
    lu.assertEquals(r.landscape, (i - 1) % 4 == 0 and "full search" or "continued",
      "row " .. i)
  end
  for _, W in ipairs({ 2, 3, 6, 50 }) do
    local many = J:sweep { x = values, order = 4, workers = W, progress = false }
    lu.assertEquals(many.workers, math.min(W, 6), "workers used for " .. W)
    same_rows(one, many, W .. " workers")
    lu.assertEquals(many:csv(), one:csv(), W .. " workers: the same CSV")
    lu.assertEquals(many.status, one.status)
  end
  -- a shard (values 9..16 of 23 in 3 shards: 8..15, starting inside a chain) on 2 workers
  local s1 = J:sweep { x = values, order = 4, workers = 1, shard = { 2, 3 }, progress = false }
  local s2 = J:sweep { x = values, order = 4, workers = 2, shard = { 2, 3 }, progress = false }
  lu.assertEquals(s1.first, 8)
  same_rows(s1, s2, "shard 2 of 3 on two workers")
end

-- A CSV written by the parent from the merged rows: the same file as one process writes.
function TestSweepWorkers:test_csv_file()
  local J = family()
  local f1, f2 = os.tmpname(), os.tmpname()
  local ok, err = pcall(function()
    J:sweep { x = { from = 2, to = 4, steps = 9 }, order = 3, workers = 1, csv = f1,
      progress = false }
    J:sweep { x = { from = 2, to = 4, steps = 9 }, order = 3, workers = 2, csv = f2,
      progress = false }
    local a, b = io.open(f1):read("a"), io.open(f2):read("a")
    lu.assertEquals(b, a, "the CSV of two workers is that of one process")
    lu.assertEquals(select(2, a:gsub("\n", "")), 11, "a header and ten rows")
  end)
  os.remove(f1)
  os.remove(f2)
  if not ok then error(err, 0) end
end

-- The coding of rows between processes: every kind of field back exactly.
function TestSweepWorkers:test_row_coding_round_trip()
  local row = { x = 3, y = 2.5, z = steep.complex(1 / 3, -0.1), big = math.huge,
    small = -math.huge, nan = 0 / 0, tiny = 5e-324, ok = true, no = false,
    text = "a\tb\nc\\d\r", c_inf = steep.complex(math.huge, -0.0) }
  local back = sweep_m.decode_row(sweep_m.encode_row(row))
  lu.assertEquals(math.type(back.x), "integer")
  for k, v in pairs(row) do
    if v ~= v then lu.assertTrue(back[k] ~= back[k], k .. " is NaN")
    else lu.assertEquals(back[k], v, k) end
  end
  lu.assertNil(sweep_m.encode_row(row):find("\n"), "one line per row")
  H.raises({ "cannot be sent" }, sweep_m.encode_row, { t = {} })
  H.raises({ "unreadable row" }, sweep_m.decode_row, "x=q:1")
end

function TestSweepWorkers:test_bad_workers()
  local J = family()
  for _, w in ipairs({ 0, 1.5, "two", -1, 2000 }) do
    H.raises({ "sweep: option 'workers' must be a whole number from 1 to 1024" }, J.sweep, J,
      { x = { 1, 2 }, workers = w })
  end
end

-- A worker that dies (here: leaves with exit code 3 at one value) makes the sweep fail
-- with an error naming it and its values, not a table with rows missing.
function TestSweepWorkers:test_a_worker_that_dies()
  local J = family()
  local core = require "steep.core"
  local landscape = J._landscape
  J._landscape = function(self, p, ...)
    if p.x == 5 then core.child_exit(3) end
    return landscape(self, p, ...)
  end
  local err = H.raises({ "sweep: worker 2 (values 5 to 8)", "exit code 3", "after 0 of its 4 rows",
    "workers = 1" }, J.sweep, J, { x = { 1, 2, 3, 4, 5, 6, 7, 8 }, order = 2, workers = 2,
    progress = false })
  lu.assertStrContains(err, "stopped")
end
