-- The pre-staging checklist: items a person ticks on the card before the
-- car goes to the lanes. Add, remove or reword items to suit your car.

local ITEMS = {
  "Belts tight, helmet strap done, arm restraints on",
  "Window net up and latched",
  "Fuel for the round (and the return road)",
  "Tire pressures set",
  "Dial on the window matches the card",
  "Burnout plan and water box talked through",
}

function checks(ctx)
  local out = {}
  for _, item in ipairs(ITEMS) do
    out[#out + 1] = {label = item, status = "confirm"}
  end
  if ctx.car.chute == true then
    out[#out + 1] = {label = "Parachute pin pulled at the line", status = "confirm"}
  end
  return out
end
