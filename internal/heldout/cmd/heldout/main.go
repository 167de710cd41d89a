// Command heldout scores pitcard's pass model and the plain rule on worlds
// of the truth simulator and prints the report's table (Markdown):
//
//	go run ./internal/heldout/cmd/heldout -n 20          # tuning draws 1..20
//	go run ./internal/heldout/cmd/heldout -n 40 -heldout # held-out draws
//	go run ./internal/heldout/cmd/heldout -fixed         # the six fixed worlds
//
// A developer's tool: never part of the pitcard command.
package main

import (
	"flag"
	"fmt"
	"os"

	"pitcard/engine"
	"pitcard/internal/heldout"
	"pitcard/internal/truthsim"
)

func main() {
	n := flag.Int("n", 0, "number of drawn worlds to score")
	skip := flag.Int("skip", 0, "leave out the first K of the n draws (-n 40 -skip 20: the tuning draws 21..40)")
	held := flag.Bool("heldout", false, "score the held-out draws, not the tuning draws")
	fixed := flag.Bool("fixed", false, "score the six fixed worlds (truthsim.Worlds)")
	model := flag.String("model", "pitcard", "the predictor: pitcard (the card's blend) or physics (the calibrated model alone)")
	days := flag.Bool("days", false, "also list the car-days the predictor lost to the plain rule")
	ablate := flag.String("ablate", "", "the ablation table: pitcard as it ships, then with each mechanism switched off in turn, one line each: all (engine.Mechanisms) or third (the third generation's: engine.BlendMechanisms)")
	without := flag.String("without", "", "pitcard with one mechanism switched off (a name of engine.Mechanisms), for the ablation table")
	flag.Parse()
	worlds := heldout.Draws(*n, *held)[min(*skip, *n):]
	if *fixed {
		worlds = append(worlds, truthsim.Worlds()...)
	}
	if len(worlds) == 0 {
		fmt.Fprintln(os.Stderr, "heldout: nothing to score: give -n N (1..) or -fixed")
		os.Exit(2)
	}
	if *ablate != "" {
		names := engine.Mechanisms
		if *ablate == "third" {
			names = engine.BlendMechanisms
		}
		fmt.Print(heldout.AblationHeader())
		for _, name := range append([]string{""}, names...) {
			r := heldout.ScoreDial(worlds, heldout.PitcardWithout(name))
			fmt.Print(r.AblationRow(name))
		}
		return
	}
	r := heldout.ScoreDial(worlds, heldout.PitcardWithout(*without))
	if *model == "physics" {
		r = heldout.Score(worlds, heldout.PhysicsOnly)
	}
	fmt.Print(r.Table())
	if *days {
		fmt.Print(r.LostDays())
	}
	fmt.Printf("\n%d worlds scored in %s\n", len(worlds), r.Elapsed.Round(100_000_000))
}
