-- Safety limits of THIS car, as the crew entered them in car.yaml.
--
-- pitcard knows no rulebook: the ET and MPH a chassis, cage, belts and
-- parachute are good for are set by your sanctioning body's current rulebook
-- and your track's tech inspection. Enter your car's limits in car.yaml:
--
--   limit_et: 10.00          # quickest ET your chassis and cage are certified for
--   limit_mph: 135           # fastest trap speed you may run without more equipment
--   chute: false             # is a parachute fitted?
--   chute_needed_mph: 150    # the speed above which your rulebook requires one
--   belts_expire: "2027-03"  # month the belts' date tag runs out
--
-- The checks compare the quick end of the prediction's interval with them.

local WARN_ET = 0.10     -- s: warn when the prediction comes this close to limit_et
local WARN_MPH = 3       -- mph: warn this close to a speed limit

function checks(ctx)
  local car, p = ctx.car, ctx.prediction
  local out = {}
  local function add(label, status, note) out[#out + 1] = {label = label, status = status, note = note} end

  if p == nil then
    add("Safety limits", "warn", "no prediction to compare with the car's limits")
  else
    if car.limit_et == nil then
      add("ET limit", "warn", "no limit_et in car.yaml: enter the quickest ET your chassis and cage are certified for")
    elseif p.low < car.limit_et then
      add("ET limit", "fail", string.format("could run %.2f (quick end of the interval): quicker than the car's %.2f limit", p.low, car.limit_et))
    elseif p.low < car.limit_et + WARN_ET then
      add("ET limit", "warn", string.format("could run %.2f, within %.2f s of the car's %.2f limit", p.low, WARN_ET, car.limit_et))
    else
      add("ET limit", "pass", string.format("quickest likely %.2f against the car's %.2f limit", p.low, car.limit_et))
    end

    if car.limit_mph ~= nil and p.mph_high ~= nil then
      if p.mph_high > car.limit_mph then
        add("MPH limit", "fail", string.format("could trap %.1f mph: over the car's %.0f mph limit", p.mph_high, car.limit_mph))
      elseif p.mph_high > car.limit_mph - WARN_MPH then
        add("MPH limit", "warn", string.format("could trap %.1f mph, close to the car's %.0f mph limit", p.mph_high, car.limit_mph))
      else
        add("MPH limit", "pass", string.format("fastest likely %.1f mph against the car's %.0f mph limit", p.mph_high, car.limit_mph))
      end
    end

    if car.chute_needed_mph ~= nil and p.mph_high ~= nil then
      if p.mph_high >= car.chute_needed_mph and car.chute ~= true then
        add("Parachute", "fail", string.format("could trap %.1f mph with no chute fitted; you entered %.0f mph as needing one", p.mph_high, car.chute_needed_mph))
      else
        add("Parachute", "pass", string.format("fastest likely %.1f mph; chute needed from %.0f mph", p.mph_high, car.chute_needed_mph))
      end
    end
  end

  if car.belts_expire ~= nil then
    local month = tostring(car.belts_expire):sub(1, 7)
    local today = ctx.round.date:sub(1, 7)
    if today > month then
      add("Belts", "fail", "the belts' date tag ran out in " .. month)
    elseif today == month then
      add("Belts", "warn", "the belts' date tag runs out this month (" .. month .. ")")
    else
      add("Belts", "pass", "date tag good to " .. month)
    end
  end

  add("Rulebook and tech", "confirm", "equipment and ET/MPH limits verified against the current rulebook and at tech")
  return out
end
