-- steep.files — writing a result file safely: the name is checked and the file opened
-- before the work that fills it, every write and the close are checked, and a regular
-- file is written under a temporary name and renamed over the target only when all went
-- well (a failed run leaves the old file, or none, never half of one). A target that
-- exists and is no regular file (a device such as /dev/null or /dev/full, a pipe) is
-- written in place: renaming over it would replace it.

local core = require "steep.core"

local format = string.format

local M = {}

--- The error value of a write that failed after the work was done: its message names
-- the file and the reason, and it carries what was computed (`result`) so that a caller
-- catching it with pcall loses nothing (tostring gives the message).
local failure_mt = { __tostring = function(e) return e.message end }

function M.failure(message, result)
  return setmetatable({ message = message, result = result }, failure_mt)
end

function M.is_failure(e) return getmetatable(e) == failure_mt end

--- Checks a file option: a non-empty string naming a file whose directory exists, or an
-- error at `level` that says what was given.
function M.check_name(path, fname, option, level)
  if type(path) ~= "string" or path == "" then
    error(format("%s: option '%s' must name a file (a non-empty string), got %s", fname, option,
      type(path) == "string" and '""' or type(path)), level + 1)
  end
  local kind, why = core.file_kind(path)
  if kind == "directory" then
    error(format("%s: cannot write %s: it is a directory", fname, path), level + 1)
  elseif not kind then
    error(format("%s: cannot write %s: %s", fname, path, why), level + 1)
  end
  return kind
end

--- Opens `path` for writing before the work: returns a writer with :write(text) (checked),
-- :commit() (flush and close checked, then the rename) and :discard(). Errors (raised at
-- `level`) name the file and the reason.
function M.open(path, fname, option, level)
  local kind = M.check_name(path, fname, option, level + 1)
  local target, temp = path, nil
  if kind ~= "other" then
    temp = format("%s.tmp-%s", path, tostring({}):match("0x(%x+)") or tostring(os.time()))
    target = temp
  end
  local f, err = io.open(target, "wb")
  if not f then
    -- (io.open's message starts with the name it tried, the temporary one)
    local why = tostring(err)
    if why:sub(1, #target + 2) == target .. ": " then why = why:sub(#target + 3) end
    error(format("%s: cannot write %s: %s", fname, path, why), level + 1)
  end
  local w = { path = path, failed = nil }
  local function fail(why)
    if not w.failed then w.failed = why end
  end
  function w.write(_, ...)
    if w.failed then return end
    local ok, e = f:write(...)
    if not ok then fail(tostring(e)) end
  end
  -- returns true, or nil and the reason (the temporary file is removed then)
  function w.commit()
    if not w.failed then
      local ok, e = f:flush()
      if not ok then fail(tostring(e)) end
    end
    local ok, e = f:close()
    if not ok and not w.failed then fail(tostring(e)) end
    if not w.failed and temp then
      local renamed, re = os.rename(temp, path)
      if not renamed then fail("cannot rename the temporary file: " .. tostring(re)) end
    end
    if w.failed then
      if temp then os.remove(temp) end
      return nil, format("cannot write %s: %s", path, w.failed)
    end
    return true
  end
  function w.discard()
    pcall(f.close, f)
    if temp then os.remove(temp) end
  end
  return w
end

return M
