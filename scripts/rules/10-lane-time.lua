-- Lane and time of day.
--
-- Some crews find their car runs a little quicker in one lane once the sun is
-- down and the track cools unevenly. This rule takes a hundredth off the dial
-- in the left lane after dark. Change the lane, the hour and the amount to
-- your own experience, or delete the file if you have no such rule.
--
-- A dial rule returns an adjustment in seconds (negative dials quicker) and
-- the reason the card shows beside it. Return 0 for no change.

local LANE = "left"        -- the lane the rule is for
local DARK_AFTER = 20.5    -- hour of the day after which it counts as dark (20.5 = 20:30)
local ADJUST = -0.01       -- seconds added to the dial

local function clock(hour)
  return string.format("%02d:%02d", math.floor(hour), math.floor((hour % 1) * 60 + 0.5))
end

function dial(ctx)
  local r = ctx.round
  if r.lane == LANE and r.call_hour >= DARK_AFTER then
    pit.log("lane " .. r.lane .. ", called at " .. r.call_time .. ": the after-dark adjustment applies")
    return ADJUST, string.format("%s lane after %s", LANE, clock(DARK_AFTER))
  end
  return 0
end
