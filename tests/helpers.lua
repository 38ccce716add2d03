-- Shared helpers for the tests: relative-tolerance assertions and a seeded generator.
-- (No reference values here: each test names the source of its own.)
local lu = require "luaunit"
local steep = require "steep"

local H = {}

local function parts(v)
  if type(v) == "number" then return v, 0 end
  return v:re(), v:im()
end

local function cabs(re, im) return math.sqrt(re * re + im * im) end

--- Asserts |got - want| <= rtol * max(|want|, floor) (floor defaults to tiny), so the
-- tolerance is relative to the value's size; msg names the check.
function H.close(got, want, rtol, msg, floor)
  local gr, gi = parts(got)
  local wr, wi = parts(want)
  local err = cabs(gr - wr, gi - wi)
  local scale = math.max(cabs(wr, wi), floor or 1e-300)
  if not (err <= rtol * scale) then
    lu.fail(string.format("%s: got %s, want %s (relative error %.3g > %.3g)",
      msg or "value", tostring(got), tostring(want), err / scale, rtol))
  end
end

--- A seeded generator: the seed is printed when a check fails, so it can be replayed.
function H.rng(seed)
  seed = seed or tonumber(os.getenv("STEEP_SEED")) or os.time()
  local state = seed
  local function next01()     -- xorshift-style LCG, deterministic across platforms
    state = (state * 6364136223846793005 + 1442695040888963407) & 0x7fffffffffffffff
    return (state >> 11) / (1 << 52)
  end
  return next01, seed
end

--- Runs f(seed) and adds the seed to any failure message.
function H.seeded(f)
  local seed = tonumber(os.getenv("STEEP_SEED")) or os.time()
  local ok, err = pcall(f, seed)
  if not ok then lu.fail(tostring(err) .. " [seed " .. seed .. "; rerun with STEEP_SEED=" .. seed .. "]") end
end

--- Asserts that f(...) raises an error whose message contains every given fragment.
function H.raises(fragments, f, ...)
  local ok, err = pcall(f, ...)
  if ok then lu.fail("expected an error containing: " .. table.concat(fragments, " | ")) end
  err = tostring(err)
  for _, frag in ipairs(fragments) do
    if not err:find(frag, 1, true) then
      lu.fail(string.format("error message %q lacks %q", err, frag))
    end
  end
  return err
end

H.steep = steep
return H
