package prep_test

import (
	"fmt"
	"time"

	"pitcard/engine"
	"pitcard/prep"
)

// The built-in checks on an invented car that races the 1/4 mile with a
// 10.65 s ET limit, predicted to run 10.62 s at the quick end of its
// interval and to trap 126.4 mph at the fast end.
func ExampleSafetyChecks() {
	car := engine.Car{DistanceFt: 1320, Extra: map[string]any{"limit_et": 10.65, "limit_mph": 135, "belts_expire": "2027-03"}}
	checks := prep.SafetyChecks(prep.SafetyInput{Limits: car.Limits(), DistanceFt: 1320, QuickET: 10.62, FastMPH: 126.4,
		Day: time.Date(2026, 6, 13, 0, 0, 0, 0, time.UTC)})
	for _, ch := range checks {
		fmt.Printf("%-7s %s\n", ch.Status, ch.Label)
	}
	fmt.Println(prep.Failed(checks))
	// Output:
	// fail    ET limit
	// pass    MPH limit
	// warn    Parachute
	// pass    Belts
	// confirm Rulebook and tech
	// [ET limit: could run 10.620 s (the quick end of the 95 % interval): quicker than the car's 1/4 mile limit of 10.65 s]
}
