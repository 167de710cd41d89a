package main

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"strings"
	"time"

	"github.com/spf13/cobra"

	"pitcard/bracket"
	"pitcard/engine"
	"pitcard/entry"
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

// guidedRound is one guided round's state: the folder, its units and the
// track's elevation, the prompts, the round's clock and what was chosen.
type guidedRound struct {
	o    *roundCmdOptions
	e    *eventFolder
	trk  engine.Track
	u    weather.Units
	elev weather.Length
	log  []weather.Reading // the weather log, oldest first
	p    *prompter
	now  time.Time // the round's clock: for the card, the reading and the slip
	rf   roundFlags
}

// roundCmdRun is the guided round, step by step: the round, the air, the
// lane and the setup, the card, then the slip.
func roundCmdRun(cmd *cobra.Command, o *roundCmdOptions) error {
	g, err := newGuidedRound(cmd, o)
	if err != nil {
		return err
	}
	if err := g.chooseRound(); err != nil {
		return err
	}
	fmt.Fprintf(o.s.Out, "Readings: Enter keeps the value in [brackets]; a bare number is in %s units.\n", g.u.Name())
	r, err := g.askReading()
	if err != nil {
		return err
	}
	if g.rf.Lane, err = g.p.until("Lane (left or right)", g.rf.Lane, func(a string) error {
		_, err := logbook.ParseLane(a)
		return err
	}); err != nil {
		return err
	}
	if g.rf.Set, err = askSetup(g.e, g.p, g.rf.Round, g.now); err != nil {
		return err
	}
	// Only an elimination has another lane to race: a time trial runs alone.
	if s, _ := logbook.ParseSession(g.rf.Round); s.Kind == logbook.Elimination {
		g.rf.OpponentDial = g.p.ask("Other lane's dial (Enter if not known)", "")
	}
	unsaved, err := g.saveReading(r)
	if err != nil {
		return err
	}
	c, broken, err := g.printCard()
	if err != nil {
		return err
	}
	if unsaved != nil {
		return fmt.Errorf("the reading was not saved: %w", unsaved)
	}
	if o.NoLog {
		return broken
	}
	return errors.Join(g.logSlip(c), broken)
}

// newGuidedRound opens the folder for writing and reads its weather log.
func newGuidedRound(cmd *cobra.Command, o *roundCmdOptions) (*guidedRound, error) {
	e, err := o.g.open(cmd)
	if err != nil {
		return nil, err
	}
	if err := e.Writable(); err != nil {
		return nil, err
	}
	trk, err := e.Track()
	if err != nil {
		return nil, err
	}
	g := &guidedRound{o: o, e: e, trk: trk, u: e.Settings.Units, elev: trk.Elevation(),
		p: &prompter{in: bufio.NewReader(o.s.In), out: o.s.Out}, rf: roundFlags{Round: o.Round, Lane: o.Lane}}
	log, bad, err := e.ReadableWeather(g.elev)
	if err != nil {
		return nil, err
	}
	if bad != nil {
		o.s.warn(bad.Error())
	}
	g.log = log
	return g, nil
}

// chooseRound sets the round's clock and asks which round it is, the
// schedule's next (and its lane) offered.
func (g *guidedRound) chooseRound() error {
	sched, haveSched, err := g.e.Schedule()
	if err != nil {
		return err
	}
	g.now, _, _ = g.e.ClockFor(sched, haveSched, g.log, g.o.s.Now())
	if g.rf.Round == "" && haveSched {
		passes, err := g.e.Logbook()
		if !event.OnlyLeftOut(err) {
			return err
		}
		if next, ok := sched.Next(passes); ok {
			g.rf.Round = next.Session.String()
			if g.rf.Lane == "" && next.Lane != "" {
				g.rf.Lane = string(next.Lane)
			}
		}
	}
	g.rf.Round, err = g.p.until("Round (3, E3, T2 ...)", g.rf.Round, func(a string) error {
		_, err := logbook.ParseSession(a)
		return err
	})
	return err
}

// readingPrompt is one question of the air: its words, its default from
// the last reading, and the reading field (as its flag) the answer fills.
type readingPrompt struct {
	question string
	def      func(g *guidedRound, last weather.Reading) string
	set      func(f *entry.ReadingFields, answer string)
	// required: Enter with no default is asked again.
	required bool
}

// readingPrompts are the guided round's questions of the air, in order.
var readingPrompts = []readingPrompt{
	{"Air temperature", func(g *guidedRound, l weather.Reading) string { return l.Temp.Format(g.u.Temp, 1) },
		func(f *entry.ReadingFields, a string) { f.Temp = a }, true},
	{"Barometer, station (uncorrected)", func(g *guidedRound, l weather.Reading) string { return l.Derive(g.elev).Station.Format(g.u.Pressure) },
		func(f *entry.ReadingFields, a string) { f.Baro, f.BaroKind = a, "station" }, true},
	{"Humidity % (or a dew point with its unit, 52F)", func(g *guidedRound, l weather.Reading) string {
		return fmt.Sprintf("%.0f%%", l.Derive(g.elev).RH*100)
	}, setHumidity, true},
	{"Wind speed", func(g *guidedRound, l weather.Reading) string { return l.Wind.Format(g.u.Speed, 0) },
		func(f *entry.ReadingFields, a string) {
			if f.Wind = a; a == "" || strings.EqualFold(a, "calm") {
				f.Wind = "0" // Enter with nothing logged: calm, as the prompt has always read it
			}
		}, false},
	{"Wind from (degrees or N, SW ...)", func(g *guidedRound, l weather.Reading) string { return fmt.Sprintf("%.0f", l.WindFrom) },
		func(f *entry.ReadingFields, a string) { f.WindFrom = a }, false},
	{"Track temperature (Enter to skip)", func(g *guidedRound, l weather.Reading) string {
		if !l.HasTrack {
			return ""
		}
		return l.TrackTemp.Format(g.u.Temp, 0)
	}, func(f *entry.ReadingFields, a string) { f.TrackTemp = a }, false},
}

// setHumidity reads the humidity answer: a temperature with its unit is a
// dew point, anything else a relative humidity.
func setHumidity(f *entry.ReadingFields, a string) {
	f.Humidity, f.DewPoint = a, ""
	if _, err := weather.ParseTemperature(a, weather.DegF); err == nil && strings.ContainsAny(strings.ToLower(a), "fc") {
		f.Humidity, f.DewPoint = "", a
	}
}

// askReading asks the air, field by field, each defaulting to the last
// reading's. Each answer is checked as its flag is (entry.ReadingFields,
// the one parser of a typed reading) within a reading whose other fields
// are known good, so a refusal is about the field just typed and asks it
// again.
func (g *guidedRound) askReading() (weather.Reading, error) {
	var last weather.Reading
	has := len(g.log) > 0
	if has {
		last = g.log[len(g.log)-1]
	}
	base := g.goodBase(last, has)
	var fields entry.ReadingFields
	for _, q := range readingPrompts {
		def := ""
		if has {
			def = q.def(g, last)
		}
		if _, err := g.p.until(q.question, def, func(a string) error {
			if a == "" && q.required {
				return &weather.InputError{Field: strings.ToLower(q.question), Reason: "is needed"}
			}
			f := fields
			q.set(&f, a)
			r, err := f.ReadingAt(g.u, g.now, &base)
			if err == nil {
				err = entry.ValidateFields(r, g.elev, g.u)
			}
			if err != nil {
				return promptWords(err)
			}
			fields = f
			return nil
		}); err != nil {
			return weather.Reading{}, err
		}
	}
	r, err := fields.ReadingAt(g.u, g.now, nil)
	if err != nil {
		return r, err
	}
	if err := r.ValidateIn(g.elev, g.u); err != nil {
		return r, err
	}
	if w := r.PressureWarning(g.elev); w != "" {
		g.o.s.warn(w)
	}
	return r, nil
}

// fieldWords are the reading flags as a prompt's answer is told about them.
var fieldWords = map[string]string{"--temp": "temperature", "--baro": "barometer", "--humidity": "humidity", "--dewpoint": "dew point",
	"--wind": "wind", "--wind-from": "wind from", "--track-temp": "track temperature"}

// promptWords names the field in a reading flag's refusal as the prompt
// asks it: `temperature "150 °F" is outside -40..140 °F`, not --temp.
func promptWords(err error) error {
	var ie *weather.InputError
	if !errors.As(err, &ie) {
		return err
	}
	if w, ok := fieldWords[ie.Field]; ok {
		c := *ie
		c.Field = w
		return &c
	}
	return err
}

// goodBase is a reading every field of which is valid at the track: the
// last one (its humidity as a relative humidity, so a new air temperature
// is not refused for an old dew point), or the standard atmosphere at the
// track's elevation.
func (g *guidedRound) goodBase(last weather.Reading, has bool) weather.Reading {
	if has && entry.ValidateFields(last, g.elev, g.u) == nil {
		b := last
		b.RH, b.DewPointSet = last.Derive(g.elev).RH, false
		return b
	}
	std := weather.StandardAtmosphere(g.elev)
	return weather.Reading{Time: g.now, Temp: std.Temp, Baro: std.Pressure, BaroKind: weather.StationPressure, RH: 0.5}
}

// saveReading logs the round's reading. One already logged in the same
// minute with other values is replaced only when the crew says so. A
// reading the disk refuses still makes the card (unsaved): the crew hears
// it was not saved.
func (g *guidedRound) saveReading(r weather.Reading) (unsaved error, err error) {
	_, err = g.e.AppendReading(r, g.elev, false)
	var same *event.SameMinute
	switch {
	case err == nil:
	case errors.As(err, &same) && same.Old.Same(r, g.elev):
		fmt.Fprintf(g.o.s.Out, "The %s reading already logged has these values: kept as it is.\n", same.Old.Time.Format("15:04"))
	case errors.As(err, &same):
		a := g.p.ask(fmt.Sprintf("A reading at %s is already logged with other values: replace it? (y/N)", same.Old.Time.Format("15:04")), "N")
		if strings.HasPrefix(strings.ToLower(a), "y") {
			if _, err := g.e.AppendReading(r, g.elev, true); err != nil {
				unsaved = err
			}
		} else {
			fmt.Fprintln(g.o.s.Out, "Kept the logged reading; yours was not saved, and the card uses the logged one.")
		}
	case isBadInput(err):
		return nil, err
	default:
		unsaved = err
	}
	if unsaved != nil {
		g.rf.Unsaved = &r
		fmt.Fprintf(g.o.s.Err, "pitcard: the reading was NOT saved (%v): the card below uses it anyway; write it down\n", unsaved)
	}
	return unsaved, nil
}

// printCard gathers and prints the round's card. broken is what the card
// printed around (rows left out, a failed check: a failed check stops the
// dial, and the command ends with exit 3, while the round goes on).
func (g *guidedRound) printCard() (c prep.Card, broken error, err error) {
	in, warnings, err := entry.GatherRound(g.e, g.rf.request(), g.now)
	if !event.Usable(err) {
		return c, nil, err
	}
	broken = err
	for _, w := range warnings {
		g.o.s.warn(w)
	}
	c = prep.Gather(in)
	keepHeldOut(g.e, g.o.s)
	fmt.Fprintln(g.o.s.Out)
	if err := prep.RenderTextWidth(g.o.s.Out, c, g.o.s.Terminal, g.o.s.width()); err != nil {
		return c, nil, err
	}
	return c, errors.Join(failedChecks(c.Failed), broken), nil
}

// slipQuestion is one field of the slip as the guided round asks it.
type slipQuestion struct{ key, question, def string }

// slipQuestions are the slip's fields in the order a slip prints them, the
// card's dial offered in an elimination.
func (g *guidedRound) slipQuestions(c prep.Card) []slipQuestion {
	dial := ""
	if c.HasFinal && c.Input.Session.Kind == logbook.Elimination {
		dial = prep.DialText(c.FinalDial, g.e.Settings.DialStep)
	}
	speed := g.u.Speed.String()
	return []slipQuestion{
		{"dial", "Dial-in posted", dial}, {"rt", rtQuestion(g.e.Settings.RTZero), ""}, {"et60", "60 ft", ""}, {"et330", "330 ft", ""},
		{"et660", "1/8 mile ET", ""}, {"mph660", "1/8 mile trap, " + speed, ""}, {"et1000", "1000 ft", ""}, {"et1320", "1/4 mile ET", ""},
		{"mph1320", "1/4 mile trap, " + speed, ""}, {"notes", "Notes (lifted, pedaled ...)", ""},
		{"change", "What changed on the car before this pass (new converter, +2 psi ...; Enter: nothing)", ""},
	}
}

// logSlip asks for the slip after the round, each field checked as it is
// typed and the checks across fields asked again by field, then logs it
// (with the setup planned and the other lane's slip) through 'log add'.
func (g *guidedRound) logSlip(c prep.Card) error {
	fmt.Fprintln(g.o.s.Out)
	if a := g.p.ask("Run the round, then press Enter for the slip (or type skip)", ""); strings.EqualFold(a, "skip") || g.p.eof {
		fmt.Fprintln(g.o.s.Out, "No slip logged. Log it later with 'pitcard log add'.")
		return nil
	}
	in := c.Input
	notLogged := func(err error) error {
		return fmt.Errorf("%w; the slip was not logged: log it with 'pitcard log add'", err)
	}
	questions := g.slipQuestions(c)
	slip, err := g.askSlip(questions, in)
	if err != nil {
		return notLogged(err)
	}
	args := []string{"log", "add", "--dir", g.e.Dir, "--round", in.Session.String(), "--lane", string(in.Lane),
		"--date", g.now.Format(weather.DateLayout), "--time", g.now.Format("15:04")}
	for _, q := range questions {
		if v := slip.Values[q.key]; v != "" {
			if q.key == "mph660" || q.key == "mph1320" {
				v += "mph" // already the logbook's unit
			}
			args = append(args, "--"+q.key, v)
		}
	}
	for _, set := range g.rf.Set { // the setup the car ran: the one planned for its card
		args = append(args, "--set", set)
	}
	if in.Session.Kind == logbook.Elimination {
		args = append(args, g.askOtherLane(in)...)
	}
	if code := run(args, g.o.s); code != exitOK {
		return userErrf("the slip was not logged (see above); log it with 'pitcard log add'")
	}
	fmt.Fprintln(g.o.s.Out, "Next round: pitcard round")
	return nil
}

// askSlip asks each field of the slip up to the car's finish line, then
// the checks across fields (a 1/8 mile slower than the 1/4 ...), asking the
// field named again, up to three times.
func (g *guidedRound) askSlip(questions []slipQuestion, in prep.Input) (logbook.SlipFields, error) {
	slip := logbook.SlipFields{Values: map[string]string{"date": g.now.Format(weather.DateLayout), "time": g.now.Format("15:04"),
		"track": g.trk.Name, "session": in.Session.String(), "lane": string(in.Lane)}, Names: map[string]string{}}
	// A trap speed is typed in the crew's units (km/h in a metric folder)
	// and kept as the logbook's mph.
	toMPH := func(key, a string) (string, error) {
		if key != "mph660" && key != "mph1320" {
			return a, nil
		}
		return entry.TrapMPH(a, g.u)
	}
	askField := func(key, question, def string) error {
		v, err := g.p.until(question, def, func(a string) error {
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
			return slip, err
		}
	}
	for try := 0; ; try++ {
		_, err := logbook.ParsePass(slip, g.e.Zone())
		var ie *weather.InputError
		if err == nil {
			return slip, nil
		}
		if !errors.As(err, &ie) || try == 3 {
			return slip, err
		}
		fmt.Fprintln(g.o.s.Out, "  ", err)
		key := ""
		for k, name := range slip.Names {
			if name == ie.Field {
				key = k
			}
		}
		if key == "" || g.p.eof {
			return slip, err
		}
		if err := askField(key, slip.Names[key], ""); err != nil {
			return slip, err
		}
	}
}

// askOtherLane asks the other lane's slip, what decided the round, and its
// car for the opponent book: the flags 'log add' takes for them (none when
// skipped).
func (g *guidedRound) askOtherLane(in prep.Input) []string {
	oppDial := ""
	if in.OpponentDial.Valid {
		oppDial = prep.DialText(in.OpponentDial.Decimal, g.e.Settings.DialStep)
	}
	d := g.p.ask("Other lane's dial (Enter to skip its slip)", oppDial)
	if d == "" || g.p.eof {
		return nil
	}
	rt, err1 := g.p.until("Other lane's reaction time", "", func(a string) error {
		return logbook.CheckSlipField("rt", "other lane's reaction time", a)
	})
	et, err2 := g.p.until("Other lane's ET", "", func(a string) error { return logbook.CheckSlipField("dial", "other lane's ET", a) })
	if err1 != nil || err2 != nil || rt == "" || et == "" {
		return nil
	}
	args := []string{"--opponent-dial", d, "--opponent-rt", rt, "--opponent-et", et}
	// Its car, to keep the slip in the opponent book (--opponent on round is the default).
	if car := g.p.ask("Other lane's car, its number (Enter to skip)", g.rf.opp.Car); car != "" {
		args = append(args, "--opponent", car)
	}
	return args
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

// rtQuestion asks for a reaction time as the slips print it: from the green
// (.021, a red light negative) or from the last amber (.521 on a full tree).
func rtQuestion(zero bracket.RTZero) string {
	if zero == bracket.FromAmber {
		return "Reaction time (.521; perfect is .500 full tree, .400 pro)"
	}
	return "Reaction time (.021; a red light is negative)"
}
