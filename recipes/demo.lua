-- Placeholder demo until the full analysis lands: Taylor jets of an invented exponent.
local steep = require "steep"
local t, x = steep.var "t", steep.param "x"
local F = steep.I * (t ^ 3 / 3 + x * t) - steep.log(1 + t ^ 2)
print("exponent F(t) = " .. tostring(F))
print("Taylor jet of F about t = 0.5 at x = 2:")
print(steep.taylor(F, t, 0.5, 6, { x = 2 }))
