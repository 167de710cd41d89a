package main

import (
	"errors"
	"fmt"
	"pitcard/internal/text"
	"strings"
	"time"

	"github.com/jedib0t/go-pretty/v6/table"
	"github.com/spf13/cobra"

	"pitcard/engine"
	"pitcard/entry"
	"pitcard/event"
	"pitcard/logbook"
	"pitcard/prep"
	"pitcard/weather"
)

type predictOptions struct {
	g      *globalOptions
	s      *IOStreams
	cond   conditionFlags
	Prep   string
	Weight string
	Format string
	Car    string
	Track  string
	Log    string
}

func newPredictCmd(s *IOStreams, g *globalOptions) *cobra.Command {
	o := &predictOptions{g: g, s: s}
	cmd := &cobra.Command{
		Use:   "predict",
		Short: "Predict every timer and trap of the next pass, with its interval and what it leaned on",
		Long: `Calibrates the pass model to the car's logbook and runs it in the air and on
the track of the next pass: every timer of the distance raced (60, 330, 660,
1000, 1320 ft) and both traps, each with a 95 % interval. It says which passes
it leaned on, which it left out and why, and what each 1000 ft of density
altitude, 10 °F of track and 10 mph of headwind is worth to this car today.

The air comes from the reading flags, --latest (the weather log's last
reading) or --at (the log's forecast for the call time); flags given with
--latest or --at replace single fields.`,
		Example: `  pitcard predict --latest
  pitcard predict --at 21:40 --track-temp 104F
  pitcard predict --temp 84F --baro 27.61inHg --humidity 35% --track-temp 118F --prep light
  pitcard predict --demo --format json`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error { return predictRun(cmd, o) },
	}
	o.cond.bind(cmd)
	fl := cmd.Flags()
	fl.StringVar(&o.Prep, "prep", "", "track prep today: none, light, full or 0..1 (default: track.yaml's)")
	fl.StringVar(&o.Weight, "weight", "", "car and driver as it will run: 3300lb or 1500kg, a bare number in the crew's units (default: car.yaml's)")
	// The old names of --car-file, --track-file and --logbook-file: --track
	// means a track's name on log add, so the file flags say "file".
	fl.StringVar(&o.Car, "car", "", "")
	fl.StringVar(&o.Track, "track", "", "")
	fl.StringVar(&o.Log, "logbook", "", "")
	for _, f := range []string{"car", "track", "logbook"} {
		deprecate(fl, f, "use --"+f+"-file")
	}
	fl.StringVar(&o.Format, "format", "text", "text, markdown or json")
	withOut(cmd, s)
	return cmd
}

// forecastNext gathers the car, the track, the logbook and the air and
// predicts the next pass. The time of the pass is the forecast's, the
// reading's, or now.
type nextPass struct {
	// LeftOut names logbook rows that could not be read (the rest were
	// used); the command reports it after its output and exits 2.
	LeftOut error
	Car     engine.Car
	Cond    conditions
	Pred    engine.Prediction
	Fit     engine.Fit
	When    time.Time
	Prep    float64
	Units   weather.Units
}

func forecastNext(e *eventFolder, cond conditionFlags, prepFlag, weightFlag, change string, now time.Time) (nextPass, error) {
	var n nextPass
	car, err := e.Car()
	if err != nil {
		return n, err
	}
	c, err := cond.resolve(e, now)
	if err != nil {
		return n, err
	}
	passes, leftOut := e.RecentLogbook()
	if !event.OnlyLeftOut(leftOut) {
		return n, leftOut
	}
	tracks, err := e.OtherTracks()
	if err != nil {
		return n, err
	}
	prepLvl, err := entry.PrepLevel(prepFlag, c.Track)
	if err != nil {
		return n, err
	}
	weight := 0.0
	if weightFlag != "" {
		if weight, err = logbook.ParseWeightLb("--weight", weightFlag, e.Settings.Units.Weight); err != nil {
			return n, err
		}
	}
	when := c.Reading.Time
	// Every pass logged so far counts, even one run after an older reading.
	upTo := when
	if now.After(upTo) {
		upTo = now
	}
	if len(passes) > 0 && passes[len(passes)-1].Time.After(upTo) {
		upTo = passes[len(passes)-1].Time
	}
	pred, fit, err := engine.Forecast(engine.CalibrateInput{Car: car, Track: c.Track, Tracks: tracks, Passes: passes, Now: upTo, DayStart: e.Settings.DayStart, Aborts: e.Settings.AbortWords, Changes: e.Settings.ChangeWords},
		engine.PredictInput{Air: c.Reading, Prep: prepLvl, WeightLb: weight, Time: when, Change: change}, e.HeldOut())
	if err != nil {
		return n, err
	}
	_ = e.KeepHeldOut() // a cache that cannot be written costs only time
	if c.BadRows != nil {
		leftOut = errors.Join(leftOut, c.BadRows)
	}
	return nextPass{Car: car, Cond: c, Pred: pred, Fit: fit, When: when, Prep: prepLvl, Units: e.Settings.Units, LeftOut: leftOut}, nil
}

func predictRun(cmd *cobra.Command, o *predictOptions) error {
	if err := checkFormat(o.Format, "text", "markdown", "json"); err != nil {
		return err
	}
	e, err := o.g.open(cmd)
	if err != nil {
		return err
	}
	for _, f := range []struct {
		dst *string
		v   string
	}{{&e.CarPath, o.Car}, {&e.TrackPath, o.Track}, {&e.LogbookPath, o.Log}} {
		if f.v != "" {
			*f.dst = f.v
		}
	}
	n, err := forecastNext(e, o.cond, o.Prep, o.Weight, "", o.s.Now())
	if err != nil {
		return err
	}
	for _, w := range n.Cond.Warnings {
		o.s.warn(w)
	}
	if o.Format == "json" {
		if err := writeJSON(o.s.Out, predictionJSON(n)); err != nil {
			return err
		}
		return n.LeftOut
	}
	printPrediction(o.s, n, o.Format)
	return n.LeftOut
}

type timerJSON struct {
	DistanceFt float64 `json:"distance_ft"`
	ET         float64 `json:"et"`
	Low        float64 `json:"low"`
	High       float64 `json:"high"`
}

type trapJSON struct {
	DistanceFt float64 `json:"distance_ft"`
	MPH        float64 `json:"mph"`
	Low        float64 `json:"low"`
	High       float64 `json:"high"`
}

type leanedJSON struct {
	Time    string  `json:"time"`
	Session string  `json:"session"`
	Track   string  `json:"track"`
	ET      float64 `json:"et"`
	Carried float64 `json:"carried_et"`
	Share   float64 `json:"share"`
}

type outlierJSON struct {
	Time   string `json:"time"`
	Reason string `json:"reason"`
}

type basisJSON struct {
	PhysicsOnly       bool          `json:"physics_only"`
	PassesCalibrated  int           `json:"passes_calibrated"`
	Leaned            []leanedJSON  `json:"leaned_on"`
	LeftOut           []outlierJSON `json:"left_out"`
	AirSource         string        `json:"air_source"`
	Prep              string        `json:"prep"`
	PowerScale        float64       `json:"power_scale"`
	TractionScale     float64       `json:"traction_scale"`
	PressureExponent  float64       `json:"pressure_exponent"`
	TempExponent      float64       `json:"temperature_exponent"`
	TrackBestF        float64       `json:"track_best_f"`
	TrackWidthF       float64       `json:"track_width_f"`
	Per01InHgS        float64       `json:"et_per_0.1inhg_lower_s"`
	Per10PctRHS       float64       `json:"et_per_10pct_humidity_s"`
	PerKDAs           float64       `json:"et_per_1000ft_da_s"`
	PerKDAMPH         float64       `json:"mph_per_1000ft_da"`
	Per10FTrackS      float64       `json:"et_per_10f_track_s"`
	Sixty10FTrackS    float64       `json:"et60_per_10f_track_s"`
	Per10HeadwindS    float64       `json:"et_per_10mph_headwind_s"`
	Per10FAirS        float64       `json:"et_per_10f_air_s"`
	Notes             []string      `json:"notes"`
	IntervalPct       float64       `json:"interval_pct"`
	ModelFinishET     float64       `json:"model_finish_et"`
	ExtrapolatedDAFt  float64       `json:"extrapolated_da_ft"`
	ExtrapolatedTrack float64       `json:"extrapolated_track_f"`
}

// predictJSON is predict's JSON. Prediction is the object of the card's
// "prediction" key (prep.PredictionJSON); Timers, Traps and Basis are the
// older shape, kept for scripts written before (README, "Names").
type predictJSON struct {
	Car        string         `json:"car"`
	Track      string         `json:"track"`
	Time       string         `json:"time"`
	Distance   float64        `json:"distance_ft"`
	Prediction map[string]any `json:"prediction"`
	Timers     []timerJSON    `json:"timers"`
	Traps      []trapJSON     `json:"traps"`
	Air        airReport      `json:"air"`
	Basis      basisJSON      `json:"basis"`
}

func predictionJSON(n nextPass) predictJSON {
	p := n.Pred
	j := predictJSON{Car: n.Car.Name, Track: n.Cond.Track.Name, Time: n.When.Format(time.RFC3339), Distance: p.Distance, Prediction: prep.PredictionJSON(p, n.Fit),
		Air: newAirReport(n.Cond.Reading, n.Cond.Elevation, n.Cond.Track.HeadingDeg, n.Cond.HaveTrack)}
	for _, t := range p.Timers {
		j.Timers = append(j.Timers, timerJSON{t.DistanceFt, round(t.ET, 3), round(t.Low, 3), round(t.High, 3)})
	}
	for _, t := range p.Traps {
		j.Traps = append(j.Traps, trapJSON{t.DistanceFt, round(t.MPH, 2), round(t.Low, 2), round(t.High, 2)})
	}
	s := p.Sensitivity
	b := basisJSON{PhysicsOnly: p.PhysicsOnly, PassesCalibrated: len(n.Fit.Samples), AirSource: n.Cond.Source, Prep: engine.PrepName(n.Prep),
		PowerScale: round(p.Params.PowerScale, 4), TractionScale: round(p.Params.TractionScale, 4), PressureExponent: round(p.Params.PressureExp, 3),
		TempExponent: round(p.Params.TempExp, 3), TrackBestF: round(p.Params.TrackOptF, 1), TrackWidthF: round(p.Params.TrackWidthF, 1),
		Per01InHgS: round(s.PerTenthInHg, 4), Per10PctRHS: round(s.Per10PctRH, 4), PerKDAs: round(s.PerKDA, 4), PerKDAMPH: round(s.PerKDAMPH, 2),
		Per10FTrackS: round(s.Per10FTrack, 4), Sixty10FTrackS: round(s.Sixty10FTrack, 4), Per10HeadwindS: round(s.Per10Headwind, 4),
		Per10FAirS: round(s.Per10FAir, 4), Notes: p.Notes, IntervalPct: 95, ModelFinishET: round(p.Model.ETAt(p.Distance), 3),
		ExtrapolatedDAFt: round(s.ExtrapolatedDA, 0), ExtrapolatedTrack: round(s.ExtrapolatedT, 1),
		Leaned: []leanedJSON{}, LeftOut: []outlierJSON{}}
	for i, l := range p.Leaned {
		if i == 5 {
			break
		}
		b.Leaned = append(b.Leaned, leanedJSON{l.Pass.Time.Format(time.RFC3339), l.Pass.Session.String(), l.Pass.Track,
			round(l.ET, 3), round(l.Carried, 3), round(l.Share, 3)})
	}
	for _, o := range p.Outliers {
		b.LeftOut = append(b.LeftOut, outlierJSON{o.Pass.Time.Format(time.RFC3339), o.Reason})
	}
	if b.Notes == nil {
		b.Notes = []string{}
	}
	j.Basis = b
	return j
}

func printPrediction(s *IOStreams, n nextPass, format string) {
	p := n.Pred
	u := n.Units
	a := n.Cond.Reading.Derive(n.Cond.Elevation)
	fmt.Fprintf(s.Out, "Prediction for %s at %s, %s\n", orDefault(n.Car.Name, "the car"), orDefault(n.Cond.Track.Name, "the track"), n.When.Format("2006-01-02 15:04"))
	t := newTable(s, "")
	t.AppendHeader(table.Row{"Timer", "ET", "95 % interval", "Trap", "95 % interval"})
	for _, tm := range p.Timers {
		trap, trapI := "", ""
		for _, tr := range p.Traps {
			if tr.DistanceFt == tm.DistanceFt {
				trap = fmt.Sprintf("%.2f mph", tr.MPH)
				trapI = fmt.Sprintf("%.2f – %.2f", tr.Low, tr.High)
			}
		}
		t.AppendRow(table.Row{prep.TimerName(tm.DistanceFt), fmt.Sprintf("%.3f", tm.ET), fmt.Sprintf("%.3f – %.3f", tm.Low, tm.High), trap, trapI})
	}
	configs := alignRight(2, 5)
	render(s, t, format, configs...)
	track := "track not read"
	if n.Cond.Reading.HasTrack {
		track = "track " + n.Cond.Reading.TrackTemp.Format(u.Temp, 0)
	}
	fmt.Fprintln(s.Out, text.Wrap(fmt.Sprintf("Air: density altitude %s, %s, %s, prep %s (%s).", a.DensityAltitude.FormatDensityAltitude(u.Length),
		n.Cond.Reading.Temp.Format(u.Temp, 1), track, engine.PrepName(n.Prep), n.Cond.Source), s.width(), "  "))
	if rests := prep.RestsOn(p, n.Fit, u); len(rests) > 0 {
		fmt.Fprintln(s.Out, "Rests on:")
		lead := "  " // a list in markdown, an indented block in text
		if format == "markdown" {
			lead = "- "
		}
		for _, l := range rests {
			fmt.Fprintln(s.Out, text.Wrap(lead+l, s.width(), "    "))
		}
	}
	for _, l := range prep.Explain(p, n.Fit, n.Units) {
		fmt.Fprintln(s.Out, text.Wrap("- "+l, s.width(), "  "))
	}
}

func orDefault(s, d string) string {
	if strings.TrimSpace(s) == "" {
		return d
	}
	return s
}
