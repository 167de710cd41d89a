-- Dial for the other lane: move toward the dial that wins most.
--
-- pitcard's dial keeps the breakout chance within the risk you accept. When
-- the other lane's dial is known, the card also works out the dial that
-- wins most against that car (ctx.dial.best_for_win). This rule moves to it
-- when it is worth at least GAIN of winning and does not break out more
-- than LIMIT: against a sharp opponent, giving time away loses rounds.
-- Set GAIN high to switch it off; the card shows what it changed.

local GAIN = 0.03   -- the least gain in the chance to win worth a move (3 points)
local LIMIT = 0.15  -- the most breakout chance it will accept (15 %)

function dial(ctx)
  local d = ctx.dial
  if ctx.opponent == nil or d == nil or d.best_for_win == nil or d.win_chance == nil then
    return 0
  end
  local best = d.best_for_win
  if best.win_chance - d.win_chance < GAIN or best.breakout_chance > LIMIT then
    return 0
  end
  return pit.round_dial(best.dial - d.recommended),
    string.format("the other lane: %s wins %.0f %%, %s %.0f %%", pit.round_dial(best.dial), 100 * best.win_chance,
      d.recommended_text, 100 * d.win_chance)
end
