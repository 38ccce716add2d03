-- Calibration of the error estimates (issue of honest estimates): 15 families of integrals
-- with published or exact values (tests/calibration.lua names each source) x 4 values of
-- the large parameter x orders 1, 2, 3, 4, 6, 8 and optimal truncation. In every cell
-- the true error must be at most the stated error (plus the reference's own error bound);
-- the worst and the median ratio true/stated are printed (the estimate should not be
-- wildly pessimistic either).
local lu = require "luaunit"
local cal = require "calibration"

TestCalibration = {}

function TestCalibration:test_estimates_bound_the_error()
  local cells = cal.cells({ 1, 2, 3, 4, 6, 8, "optimal" })
  local ratios, over, failed = {}, {}, {}
  for _, c in ipairs(cells) do
    if c.failure then
      failed[#failed + 1] = string.format("%s at x = %s, order %s: %s", c.family, tostring(c.x),
        tostring(c.order), c.failure)
    else
      ratios[#ratios + 1] = c.ratio
      if not (c.ratio <= 1) then
        over[#over + 1] = string.format("%s at x = %s, order %s: true %.3g > stated %.3g",
          c.family, tostring(c.x), tostring(c.order), c.true_error, c.error)
      end
    end
  end
  table.sort(ratios)
  io.write(string.format("\ncalibration: %d cells, true/stated worst %.3g, median %.3g\n",
    #ratios, ratios[#ratios], ratios[(#ratios + 1) // 2]))
  lu.assertEquals(#failed, 0, table.concat(failed, "\n"))
  lu.assertEquals(#over, 0, "estimates exceeded:\n" .. table.concat(over, "\n"))
  lu.assertTrue(#ratios >= 12 * 4 * 6, "at least 12 families x 4 values x 6 orders")
end
