package entry_test

import (
	"fmt"
	"os"
	"time"

	"pitcard/entry"
	"pitcard/event"
)

// Opening a folder and gathering a round: a new folder holding the demo
// event (an invented car at an invented track), opened in a fixed zone, and
// everything the card of its third elimination round is made from, gathered
// at 20:30 on the demo's race day.
func ExampleGatherRound() {
	dir, err := os.MkdirTemp("", "pitcard-example-")
	if err != nil {
		fmt.Println(err)
		return
	}
	defer os.RemoveAll(dir)
	if _, err := event.Create(dir, true, time.Date(2026, 6, 13, 12, 0, 0, 0, time.UTC)); err != nil {
		fmt.Println(err)
		return
	}
	e, err := event.Open(event.OpenOptions{Dir: dir, Loc: time.UTC})
	if err != nil {
		fmt.Println(err)
		return
	}
	now := time.Date(2026, 6, 13, 20, 30, 0, 0, time.UTC)
	in, warnings, err := entry.GatherRound(e, entry.RoundRequest{Round: "E3"}, now)
	if !event.Usable(err) {
		fmt.Println(err)
		return
	}
	fmt.Printf("%s at %s (%.0f ft)\n", in.Car.Name, in.Track.Name, in.Elevation.Feet())
	fmt.Printf("%s called at %s, %s lane\n", in.Session, in.Call.Format("15:04"), in.Lane)
	fmt.Printf("%d passes in the logbook\n", len(in.Passes))
	fmt.Printf("air: %v, %v (%s)\n", in.Air.Temp, in.Air.Baro, in.AirSource)
	fmt.Println(len(warnings), "warnings; error:", err)
	// Output:
	// Whitlock 71 Ember at Juniper Bend Raceway (2240 ft)
	// E3 called at 20:45, left lane
	// 65 passes in the logbook
	// air: 82.5 °F, 27.61 inHg (forecast for 20:45: trend of 6 readings over 1 h 50 min (18:40–20:30), 15 min ahead of the last)
	// 0 warnings; error: <nil>
}
