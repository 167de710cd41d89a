-- Rear tire pressure by track temperature.
--
-- A starting point for the rear tires: firmest on a cool track, a little
-- softer with each step hotter, as the table below reads. The numbers are
-- this crew's, for drag radials; your tire maker's guidance and your own
-- 60-ft times come first. Edit the table: each row is {up to this track °F,
-- psi}. The note is printed in the card's units (ctx.units).

local PRESSURES = {
  {80, 16.5},
  {100, 16.0},
  {120, 15.5},
  {140, 15.0},
  {999, 14.5},
}

function notes(ctx)
  local t = ctx.air.track_temp_f
  if t == nil then
    return {"Rear tires: no track temperature read; set them as on your last good pass"}
  end
  for _, row in ipairs(PRESSURES) do
    if t <= row[1] then
      if ctx.units == "metric" then
        return {string.format("Rear tires: start at %.0f kPa (%.1f psi) for a %.0f °C track", row[2] * 6.894757, row[2], (t - 32) / 1.8)}
      end
      return {string.format("Rear tires: start at %.1f psi for a %.0f °F track", row[2], t)}
    end
  end
end
