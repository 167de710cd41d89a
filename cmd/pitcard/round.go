package main

import (
	"github.com/spf13/cobra"

	"pitcard/entry"
	"pitcard/weather"
)

// roundFlags choose the round: which session, which lane, the opponent's
// dial, the call time (--at, shared with the air flags), the prep.
type roundFlags struct {
	cond         conditionFlags
	Round        string
	Lane         string
	OpponentDial string
	Prep         string
	Weight       string
	Change       string
	Set          []string // the planned setup, name=value
	// Unsaved is a reading that could not be written (a full disk): the
	// round's card still uses it.
	Unsaved *weather.Reading
	opp     opponentFlags
}

// request is the round as the event folder takes it.
func (r roundFlags) request() entry.RoundRequest {
	return entry.RoundRequest{Reading: r.cond.ReadingFields, At: r.cond.At, Round: r.Round, Lane: r.Lane, OpponentDial: r.OpponentDial,
		Prep: r.Prep, Weight: r.Weight, Change: r.Change, Unsaved: r.Unsaved, Opponent: r.opp.OpponentFields, Set: r.Set}
}

func (r *roundFlags) bind(cmd *cobra.Command) {
	r.cond.readingFlags.bind(cmd)
	fl := cmd.Flags()
	fl.StringVar(&r.cond.At, "at", "", "call time of the round, HH:MM (default: schedule.yaml's, or now)")
	fl.StringVar(&r.Round, "round", "", roundFlagHelp+" (default: the schedule's next)")
	fl.StringVar(&r.Lane, "lane", "", "left or right")
	fl.StringVar(&r.OpponentDial, "opponent-dial", "", "the other lane's dial-in, s, if known")
	fl.StringVar(&r.Prep, "prep", "", "track prep today: none, light, full or 0..1 (default: track.yaml's)")
	fl.StringVar(&r.Change, "change", "", "what was changed on the car since its last pass, in your words (widens the interval until a pass shows what it is worth)")
	fl.StringVar(&r.Weight, "weight", "", "car and driver as it will run: 3300lb or 1500kg, a bare number in the crew's units (default: car.yaml's)")
	fl.StringArrayVar(&r.Set, "set", nil, "the planned setup, name=value, an item of car.yaml's setup: (repeat for each; an item not given is the last pass's): the prediction moves by what each change is worth")
	bindSettingFlags(cmd)
	r.opp.bind(cmd)
}
