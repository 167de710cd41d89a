-- A hot track.
--
-- pitcard's prediction already slows the car for a hot surface (the traction
-- model, calibrated from your 60-ft times). Some crews still dial slower when
-- the track is very hot, because a greasy track makes the car less
-- consistent, not just slower. This rule dials two hundredths slower above
-- 130 °F. If the card's "Today so far: predicted against actual" table shows
-- the prediction keeping up on hot days, set ADJUST to 0.

local HOT_F = 130     -- track surface temperature, °F, above which the rule applies
local ADJUST = 0.02   -- seconds added to the dial (positive dials slower)

function dial(ctx)
  local t = ctx.air.track_temp_f
  if t == nil then
    pit.log("no track temperature in the reading: the hot-track rule cannot judge")
    return 0
  end
  if t > HOT_F then
    return ADJUST, string.format("track %.0f °F is over %d °F: dial slower for a greasy track", t, HOT_F)
  end
  return 0
end
