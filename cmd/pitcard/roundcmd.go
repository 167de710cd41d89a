package main

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"math"
	"strings"
	"time"

	"github.com/spf13/cobra"

	"pitcard/bracket"
	"pitcard/event"
	"pitcard/logbook"
	"pitcard/prep"
	"pitcard/weather"
)

type roundCmdOptions struct {
	g     *globalOptions
	s     *IOStreams
	Round string
	Lane  string
	NoLog bool
}

func newRoundCmd(s *IOStreams, g *globalOptions) *cobra.Command {
	o := &roundCmdOptions{g: g, s: s}
	cmd := &cobra.Command{
		Use:   "round",
		Short: "Between rounds, in a hurry: asks for the readings, prints the card, then logs the slip",
		Long: `A guided round for when the lanes are calling. pitcard asks for each reading in
turn, showing the last one in [brackets]: press Enter to keep it, or type the
new value with or without its unit (88F, 31C, 27.61inHg, 935hPa). It logs the
reading, prints the round's card, and when the round is run asks for the time
slip and logs it. Plain prompts on standard input: it works over ssh and
from a pipe (at the end of the input every remaining answer is Enter).`,
		Example: "  pitcard round\n  pitcard round --round E4 --lane right\n  printf '\\n\\n\\n\\n\\n\\n\\nleft\\n\\n' | pitcard round --no-log",
		Args:    cobra.NoArgs,
		RunE:    func(cmd *cobra.Command, _ []string) error { return roundCmdRun(cmd, o) },
	}
	cmd.Flags().StringVar(&o.Round, "round", "", roundFlagHelp+" (default: the schedule's next)")
	cmd.Flags().StringVar(&o.Lane, "lane", "", "left or right (asked when not given)")
	cmd.Flags().BoolVar(&o.NoLog, "no-log", false, "print the card and stop: do not ask for the slip")
	bindSettingFlags(cmd)
	return cmd
}

// prompter asks one question at a time on plain streams.
type prompter struct {
	in  *bufio.Reader
	out io.Writer
	eof bool
}

// ask prints the question with its default and returns the answer, or the
// default for an empty answer (or once the input has ended).
func (p *prompter) ask(question, def string) string {
	if def != "" {
		fmt.Fprintf(p.out, "%s [%s]: ", question, def)
	} else {
		fmt.Fprintf(p.out, "%s: ", question)
	}
	if p.eof {
		fmt.Fprintln(p.out)
		return def
	}
	line, err := p.in.ReadString('\n')
	if err != nil {
		p.eof = true
		if line == "" {
			fmt.Fprintln(p.out)
		}
	}
	line = strings.TrimSpace(line)
	if line == "" {
		return def
	}
	return line
}

// until asks until check accepts the answer, at most three times.
func (p *prompter) until(question, def string, check func(string) error) (string, error) {
	for try := 0; ; try++ {
		a := p.ask(question, def)
		err := check(a)
		if err == nil {
			return a, nil
		}
		fmt.Fprintln(p.out, "  ", err)
		if try == 2 || p.eof {
			return "", userErr(err)
		}
	}
}

func roundCmdRun(cmd *cobra.Command, o *roundCmdOptions) error {
	e, err := o.g.open(cmd)
	if err != nil {
		return err
	}
	if err := e.Writable(); err != nil {
		return err
	}
	trk, err := e.Track()
	if err != nil {
		return err
	}
	u := e.Settings.Units
	elev := trk.Elevation()
	log, bad, err := e.ReadableWeather(elev)
	if err != nil {
		return err
	}
	if bad != nil {
		o.s.warn(bad.Error())
	}
	p := &prompter{in: bufio.NewReader(o.s.In), out: o.s.Out}

	// Which round, and its clock: one clock for the card, the reading and the slip.
	rf := roundFlags{Round: o.Round, Lane: o.Lane}
	sched, haveSched, err := e.Schedule()
	if err != nil {
		return err
	}
	now, _, _ := e.ClockFor(sched, haveSched, log, o.s.Now())
	if rf.Round == "" && haveSched {
		passes, err := e.Logbook()
		if !event.OnlyLeftOut(err) {
			return err
		}
		if next, ok := sched.Next(passes); ok {
			rf.Round = next.Session.String()
			if rf.Lane == "" && next.Lane != "" {
				rf.Lane = string(next.Lane)
			}
		}
	}
	if rf.Round, err = p.until("Round (3, E3, T2 ...)", rf.Round, func(a string) error {
		_, err := logbook.ParseSession(a)
		return err
	}); err != nil {
		return err
	}
	fmt.Fprintf(o.s.Out, "Readings: Enter keeps the value in [brackets]; a bare number is in %s units.\n", u.Name())

	// The readings, each defaulting to the last one.
	var last weather.Reading
	if len(log) > 0 {
		last = log[len(log)-1]
	}
	has := len(log) > 0
	def := func(f func() string) string {
		if !has {
			return ""
		}
		return f()
	}
	r := weather.Reading{Time: now, BaroKind: weather.StationPressure}
	if _, err := p.until("Air temperature", def(func() string { return last.Temp.Format(u.Temp, 1) }), func(a string) error {
		if r.Temp, err = weather.ParseTemperature(a, u.Temp); err != nil {
			return event.FlagErr(err, "temperature")
		}
		return inRange("temperature", a, r.Temp.In(u.Temp), u.Temp.String(), inUnits(weather.TempRange, func(f float64) float64 { return weather.Fahrenheit(f).In(u.Temp) }))
	}); err != nil {
		return err
	}
	station := weather.Pressure(0)
	if has {
		station = last.Derive(elev).Station
	}
	if _, err := p.until("Barometer, station (uncorrected)", def(func() string { return station.Format(u.Pressure) }), func(a string) error {
		if r.Baro, err = weather.ParsePressure(a, u.Pressure); err != nil {
			return event.FlagErr(err, "barometer")
		}
		return inRange("barometer", a, r.Baro.In(u.Pressure), u.Pressure.String(), inUnits(weather.StationRange, func(p float64) float64 { return weather.InHg(p).In(u.Pressure) }))
	}); err != nil {
		return err
	}
	humDef := def(func() string { return fmt.Sprintf("%.0f%%", last.Derive(elev).RH*100) })
	if _, err := p.until("Humidity % (or a dew point with its unit, 52F)", humDef, func(a string) error {
		if t, err := weather.ParseTemperature(a, u.Temp); err == nil && strings.ContainsAny(strings.ToLower(a), "fc") {
			r.DewPointSet, r.DewPoint = true, t
			return nil
		}
		r.DewPointSet = false
		if r.RH, err = weather.ParsePercent(a); err != nil {
			return event.FlagErr(err, "humidity")
		}
		return inRange("humidity", a, r.RH*100, "%", [2]float64{0, 100})
	}); err != nil {
		return err
	}
	if _, err := p.until("Wind speed", def(func() string { return last.Wind.Format(u.Speed, 0) }), func(a string) error {
		if a == "" || a == "calm" {
			r.Wind = 0
			return nil
		}
		if r.Wind, err = weather.ParseSpeed(a, u.Speed); err != nil {
			return event.FlagErr(err, "wind")
		}
		return inRange("wind", a, r.Wind.In(u.Speed), u.Speed.String(), inUnits(weather.WindRange, func(v float64) float64 { return weather.MPH(v).In(u.Speed) }))
	}); err != nil {
		return err
	}
	if _, err := p.until("Wind from (degrees or N, SW ...)", def(func() string { return fmt.Sprintf("%.0f", last.WindFrom) }), func(a string) error {
		if a == "" {
			r.WindDirUnknown = r.Wind > 0
			return nil
		}
		r.WindFrom, err = weather.ParseDirection(a)
		return event.FlagErr(err, "wind from")
	}); err != nil {
		return err
	}
	trackDef := ""
	if has && last.HasTrack {
		trackDef = last.TrackTemp.Format(u.Temp, 0)
	}
	if _, err := p.until("Track temperature (Enter to skip)", trackDef, func(a string) error {
		if a == "" {
			r.HasTrack = false
			return nil
		}
		r.HasTrack = true
		if r.TrackTemp, err = weather.ParseTemperature(a, u.Temp); err != nil {
			return event.FlagErr(err, "track temperature")
		}
		return inRange("track temperature", a, r.TrackTemp.In(u.Temp), u.Temp.String(), inUnits(weather.TrackTempRange, func(f float64) float64 { return weather.Fahrenheit(f).In(u.Temp) }))
	}); err != nil {
		return err
	}
	if err := r.ValidateIn(elev, u); err != nil {
		return err
	}
	if w := r.PressureWarning(elev); w != "" {
		o.s.warn(w)
	}
	if rf.Lane, err = p.until("Lane (left or right)", rf.Lane, func(a string) error {
		_, err := logbook.ParseLane(a)
		return err
	}); err != nil {
		return err
	}
	if rf.Set, err = askSetup(e, p, rf.Round, now); err != nil {
		return err
	}
	// Only an elimination has another lane to race: a time trial runs alone.
	if s, _ := logbook.ParseSession(rf.Round); s.Kind == logbook.Elimination {
		rf.OpponentDial = p.ask("Other lane's dial (Enter if not known)", "")
	}

	// Log the reading, then the card. A reading the disk refuses still
	// makes the card; the crew hears it was not saved.
	var unsaved error
	if _, err := e.AppendReading(r, elev, false); err != nil {
		var same *event.SameMinute
		switch {
		case errors.As(err, &same) && same.Old.Same(r, elev):
			fmt.Fprintf(o.s.Out, "The %s reading already logged has these values: kept as it is.\n", same.Old.Time.Format("15:04"))
		case errors.As(err, &same):
			a := p.ask(fmt.Sprintf("A reading at %s is already logged with other values: replace it? (y/N)", same.Old.Time.Format("15:04")), "N")
			if strings.HasPrefix(strings.ToLower(a), "y") {
				if _, err := e.AppendReading(r, elev, true); err != nil {
					unsaved = err
				}
			} else {
				fmt.Fprintln(o.s.Out, "Kept the logged reading; yours was not saved, and the card uses the logged one.")
			}
		case isBadInput(err):
			return err
		default:
			unsaved = err
		}
	}
	if unsaved != nil {
		rf.Unsaved = &r
		fmt.Fprintf(o.s.Err, "pitcard: the reading was NOT saved (%v): the card below uses it anyway; write it down\n", unsaved)
	}
	in, warnings, err := e.GatherRound(rf.request(), now)
	if !event.Usable(err) {
		return err
	}
	broken := err
	for _, w := range warnings {
		o.s.warn(w)
	}
	c := prep.Gather(in)
	keepHeldOut(e, o.s)
	fmt.Fprintln(o.s.Out)
	if err := prep.RenderTextWidth(o.s.Out, c, o.s.Terminal, o.s.width()); err != nil {
		return err
	}
	// A failed check stops the dial: the round goes on (the slip is still
	// logged when the car runs), and the command ends with exit 3.
	broken = errors.Join(failedChecks(c.Failed), broken)
	if unsaved != nil {
		return fmt.Errorf("the reading was not saved: %w", unsaved)
	}
	if o.NoLog {
		return broken
	}

	// After the round: the slip, each field checked as it is typed.
	fmt.Fprintln(o.s.Out)
	if a := p.ask("Run the round, then press Enter for the slip (or type skip)", ""); strings.EqualFold(a, "skip") || p.eof {
		fmt.Fprintln(o.s.Out, "No slip logged. Log it later with 'pitcard log add'.")
		return broken
	}
	dial := ""
	if c.HasFinal && in.Session.Kind == logbook.Elimination {
		dial = prep.DialText(c.FinalDial, e.Settings.DialStep)
	}
	questions := []struct{ key, question, def string }{
		{"dial", "Dial-in posted", dial}, {"rt", rtQuestion(e.Settings.RTZero), ""}, {"et60", "60 ft", ""}, {"et330", "330 ft", ""},
		{"et660", "1/8 mile ET", ""}, {"mph660", "1/8 mile trap, " + u.Speed.String(), ""}, {"et1000", "1000 ft", ""}, {"et1320", "1/4 mile ET", ""},
		{"mph1320", "1/4 mile trap, " + u.Speed.String(), ""}, {"notes", "Notes (lifted, pedaled ...)", ""},
		{"change", "What changed on the car before this pass (new converter, +2 psi ...; Enter: nothing)", ""},
	}
	slip := logbook.SlipFields{Values: map[string]string{"date": now.Format(weather.DateLayout), "time": now.Format("15:04"),
		"track": trk.Name, "session": in.Session.String(), "lane": string(in.Lane)}, Names: map[string]string{}}
	// A trap speed is typed in the crew's units (km/h in a metric folder)
	// and kept as the logbook's mph.
	toMPH := func(key, a string) (string, error) {
		if key != "mph660" && key != "mph1320" {
			return a, nil
		}
		return event.TrapMPH(a, u)
	}
	askField := func(key, question, def string) error {
		v, err := p.until(question, def, func(a string) error {
			m, err := toMPH(key, a)
			if err != nil {
				return err
			}
			return logbook.CheckSlipField(key, question, m)
		})
		if m, merr := toMPH(key, v); merr == nil {
			v = m
		}
		slip.Values[key] = v
		return err
	}
	for _, q := range questions {
		if slipTimerFt[q.key] > in.Car.DistanceFt { // no timer past the car's finish line
			continue
		}
		slip.Names[q.key] = q.question
		if err := askField(q.key, q.question, q.def); err != nil {
			return errors.Join(fmt.Errorf("%w; the slip was not logged: log it with 'pitcard log add'", err), broken)
		}
	}
	// The checks across fields: the field named is asked again.
	for try := 0; ; try++ {
		_, err := logbook.ParsePass(slip, e.Zone())
		var ie *weather.InputError
		if err == nil || !errors.As(err, &ie) || try == 3 {
			if err != nil {
				return errors.Join(fmt.Errorf("%w; the slip was not logged: log it with 'pitcard log add'", err), broken)
			}
			break
		}
		fmt.Fprintln(o.s.Out, "  ", err)
		key := ""
		for k, name := range slip.Names {
			if name == ie.Field {
				key = k
			}
		}
		if key == "" || p.eof {
			return errors.Join(fmt.Errorf("%w; the slip was not logged: log it with 'pitcard log add'", err), broken)
		}
		if err := askField(key, slip.Names[key], ""); err != nil {
			return errors.Join(fmt.Errorf("%w; the slip was not logged: log it with 'pitcard log add'", err), broken)
		}
	}
	args := []string{"log", "add", "--dir", e.Dir, "--round", in.Session.String(), "--lane", string(in.Lane),
		"--date", now.Format("2006-01-02"), "--time", now.Format("15:04")}
	for _, q := range questions {
		if v := slip.Values[q.key]; v != "" {
			if q.key == "mph660" || q.key == "mph1320" {
				v += "mph" // already the logbook's unit
			}
			args = append(args, "--"+q.key, v)
		}
	}
	for _, set := range rf.Set { // the setup the car ran: the one planned for its card
		args = append(args, "--set", set)
	}
	// The other lane's slip, in an elimination: what decided the round.
	if in.Session.Kind == logbook.Elimination {
		oppDial := ""
		if in.OpponentDial.Valid {
			oppDial = prep.DialText(in.OpponentDial.Decimal, e.Settings.DialStep)
		}
		check := func(name string) func(string) error {
			return func(a string) error { return logbook.CheckSlipField("rt", name, a) }
		}
		if d := p.ask("Other lane's dial (Enter to skip its slip)", oppDial); d != "" && !p.eof {
			rt, err1 := p.until("Other lane's reaction time", "", check("other lane's reaction time"))
			et, err2 := p.until("Other lane's ET", "", func(a string) error { return logbook.CheckSlipField("dial", "other lane's ET", a) })
			if err1 == nil && err2 == nil && rt != "" && et != "" {
				args = append(args, "--opponent-dial", d, "--opponent-rt", rt, "--opponent-et", et)
				// Its car, to keep the slip in the opponent book (--opponent on round is the default).
				if car := p.ask("Other lane's car, its number (Enter to skip)", rf.opp.Car); car != "" {
					args = append(args, "--opponent", car)
				}
			}
		}
	}
	if code := run(args, o.s); code != exitOK {
		return errors.Join(userErrf("the slip was not logged (see above); log it with 'pitcard log add'"), broken)
	}
	fmt.Fprintln(o.s.Out, "Next round: pitcard round")
	return broken
}

// askSetup asks the car's setup for the round, item by item, as car.yaml's
// setup: names them; each defaults to what the pit page noted for the round
// or else the last pass's value, so Enter keeps it. A car without setup
// items is asked nothing. The answers are --set's name=value.
func askSetup(e *eventFolder, p *prompter, round string, now time.Time) ([]string, error) {
	car, err := e.Car()
	if err != nil || len(car.Setup) == 0 {
		return nil, nil // a car.yaml that cannot be read: the card says why
	}
	passes, _ := e.RecentLogbook() // rows left out: the card names them
	def := logbook.LastSetup(passes, car.Setup)
	if ses, err := logbook.ParseSession(round); err == nil {
		if notes, err := e.RoundNotes(now.Format(weather.DateLayout), ses); err == nil {
			for _, set := range notes.Setup {
				if name, v, ok := strings.Cut(set, "="); ok {
					def[name] = v
				}
			}
		}
	}
	fmt.Fprintln(p.out, "Setup for this pass (car.yaml's setup:): Enter keeps the value in [brackets].")
	var sets []string
	for _, it := range car.Setup {
		question := it.Name
		switch {
		case !it.Numeric():
			question += " (" + strings.Join(it.Choices, ", ") + ")"
		case it.Unit != "":
			question += fmt.Sprintf(", %s (%g..%g)", it.Unit, it.Range[0], it.Range[1])
		}
		cell := ""
		if _, err := p.until(question, def[it.Name], func(a string) error {
			cell, err = it.Check("--set "+it.Name, a)
			return err
		}); err != nil {
			return nil, err
		}
		if cell != "" {
			sets = append(sets, it.Name+"="+cell)
		}
	}
	return sets, nil
}

// slipTimerFt is the distance of each timed field of the slip, ft.
var slipTimerFt = map[string]float64{"et660": 660, "mph660": 660, "et1000": 1000, "et1320": 1320, "mph1320": 1320}

// inUnits says a range given in pitcard's imperial limits in the crew's
// units (conv converts one end), to two decimals.
func inUnits(r [2]float64, conv func(float64) float64) [2]float64 {
	return [2]float64{math.Round(conv(r[0])*100) / 100, math.Round(conv(r[1])*100) / 100}
}

// inRange refuses a value outside its valid range, naming the field.
func inRange(field, typed string, v float64, unit string, r [2]float64) error {
	if v >= r[0] && v <= r[1] {
		return nil
	}
	return &weather.InputError{Field: field, Value: typed, Reason: fmt.Sprintf("is outside %g..%g %s", r[0], r[1], unit)}
}

// rtQuestion asks for a reaction time as the slips print it: from the green
// (.021, a red light negative) or from the last amber (.521 on a full tree).
func rtQuestion(zero bracket.RTZero) string {
	if zero == bracket.FromAmber {
		return "Reaction time (.521; perfect is .500 full tree, .400 pro)"
	}
	return "Reaction time (.021; a red light is negative)"
}
