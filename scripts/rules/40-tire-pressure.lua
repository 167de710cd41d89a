-- Rear tire pressure by track temperature, for drag radials.
--
-- A starting point for the rear tires: firmest on a cool track, a little
-- softer with each step hotter, as the table below reads. The numbers are
-- one crew's, for drag radials, and the note on the card says so: your tire
-- maker's minimum pressure and your own 60-ft times come first. The rule
-- prints nothing for street tires or slicks (car.yaml's tire:), which the
-- table is not for. Edit the table: each row is {up to this track °F, psi}.
-- The note is printed in the card's units (ctx.units).

local TIRE = "radial"   -- the tire kind the table is for (car.yaml's tire:, radial when not given)
local WHOSE = "drag radials; one crew's numbers: your tire maker's minimum comes first"

local PRESSURES = {
  {80, 16.5},
  {100, 16.0},
  {120, 15.5},
  {140, 15.0},
  {999, 14.5},
}

function notes(ctx)
  local tire = string.lower(ctx.car.tire or "")
  if tire == "" then
    tire = "radial"
  end
  if tire ~= TIRE then
    pit.log("tire: " .. tire .. ": the pressure table is for " .. TIRE .. " tires, so no note")
    return nil
  end
  local t = ctx.air.track_temp_f
  if t == nil then
    return {"Rear tires: no track temperature read; set them as on your last good pass"}
  end
  for _, row in ipairs(PRESSURES) do
    if t <= row[1] then
      if ctx.units == "metric" then
        return {string.format("Rear tires: start at %.0f kPa (%.1f psi) for a %.0f °C track (%s)", row[2] * 6.894757, row[2], (t - 32) / 1.8, WHOSE)}
      end
      return {string.format("Rear tires: start at %.1f psi for a %.0f °F track (%s)", row[2], t, WHOSE)}
    end
  end
end
