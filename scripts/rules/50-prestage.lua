-- The pre-staging checklist: items a person ticks on the card before the
-- car goes to the lanes. Add, remove or reword items to suit your car.

-- The dial item, and the one that stands in for it when the card posts no
-- dial (ctx.dial is nil: too few passes of the car yet).
local DIAL_ITEM = "Dial on the window matches the card"
local NO_DIAL = "No dial yet: make a time trial before posting one"

local ITEMS = {
  "Belts tight, helmet strap done, arm restraints on",
  "Window net up and latched",
  "Fuel for the round (and the return road)",
  "Tire pressures set",
  DIAL_ITEM,
  "Burnout plan and water box talked through",
}

function checks(ctx)
  local out = {}
  for _, item in ipairs(ITEMS) do
    if item == DIAL_ITEM and ctx.dial == nil then
      item = NO_DIAL
    end
    out[#out + 1] = {label = item, status = "confirm"}
  end
  if ctx.car.chute == true then
    out[#out + 1] = {label = "Parachute pin pulled at the line", status = "confirm"}
  end
  return out
end
