-- Tests of embedding: tests/embed/host is a C program that links the extension, creates
-- its own lua_States and runs Airy's integral J(x) = int_R exp(i (t^3/3 + x t)) dt at
-- x = 5 and 7, first in sequence, then two lua_States in two threads at once (several
-- rounds). Its output is checked here; every threaded result must equal the sequential
-- one to the last bit (the module keeps no state outside its lua_State). make asan runs
-- the sanitized build of the host (STEEP_EMBED_HOST). The host also installs its own GSL
-- error handler first and checks that loading steep left it in force.
local lu = require "luaunit"
local H = require "helpers"
local gsl = require "gslref"

local root = debug.getinfo(1, "S").source:match("^@(.*)/tests/test_embed%.lua$") or "."
local host = os.getenv("STEEP_EMBED_HOST") or (root .. "/tests/embed/host")

local function q(s) return "'" .. s:gsub("'", "'\\''") .. "'" end

-- Ai(x) ~ e^(-z) / (2 sqrt(pi) x^(1/4)) sum_k (-1)^k u_k / z^k, z = (2/3) x^(3/2), with
-- u_k = (2k+1)(2k+3)...(6k-1) / (216^k k!) (DLMF 9.7.5 and 9.7.2, numbers from memory):
-- the first four terms, times 2 pi
local function airy_four_terms(x)
  local z = 2 / 3 * x ^ 1.5
  local u = { 1, 5 / 72, 385 / 10368, 85085 / 2239488 }
  local s = 0
  for k = 0, 3 do s = s + (-1) ^ k * u[k + 1] / z ^ k end
  return 2 * math.pi * math.exp(-z) / (2 * math.sqrt(math.pi) * x ^ 0.25) * s
end

TestEmbed = {}

function TestEmbed:test_host()
  local p = assert(io.popen(q(host) .. " " .. q(root) .. " 2>&1"))
  local out = p:read("a")
  local ok = p:close()
  lu.assertTrue(ok, host .. " failed:\n" .. out)
  for _, x in ipairs({ 5, 7 }) do
    local msg = "J(" .. x .. ")"
    local line = out:match("airy " .. x .. " quad ([^\n]*)")
    lu.assertNotNil(line, msg .. ": no result in:\n" .. out)
    local v = {}
    for f in line:gmatch("[-+%w.]+") do
      if f ~= "expand" then v[#v + 1] = tonumber(f) end
    end
    lu.assertEquals(#v, 6, msg .. ": six numbers")
    local qre, qim, qerr, ere, eim, eerr = table.unpack(v)
    -- quadrature against GSL's gsl_sf_airy_Ai_e
    local ref = 2 * math.pi * gsl.airy_Ai(x)
    H.close(qre, ref, 1e-10, msg .. " by J:quad")
    lu.assertEquals(qim, 0, msg .. " by J:quad is real")
    lu.assertTrue(math.abs(qre - ref) <= qerr + 1e-15 * math.abs(ref),
      msg .. ": J:quad's error estimate is honest")
    -- the four-term expansion is the partial sum of DLMF 9.7.5 (exact formula)
    H.close(ere, airy_four_terms(x), 1e-12, msg .. " by J:expand, four terms")
    lu.assertTrue(math.abs(eim) <= 1e-15 * math.abs(ere), msg .. ": J:expand is real")
    lu.assertTrue(math.abs(ere - ref) <= eerr, msg .. ": J:expand's error estimate is honest")
  end
  local runs, same = out:match("threads: (%d+) runs, (%d+) identical")
  lu.assertEquals(tonumber(runs), 8, "threaded runs")
  lu.assertEquals(tonumber(same), 8, "threaded runs identical to the sequential ones")
  -- the host installed its own GSL error handler before loading steep: still in force
  -- after the analyses, and called on a GSL error (gsl_sf_log_e(-1), a domain error)
  lu.assertStrContains(out, "gsl handler: kept, 1 calls")
end
