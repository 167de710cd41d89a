package entry

import (
	"fmt"
	"math"
	"strconv"
	"strings"
	"time"
	"unicode"

	"github.com/shopspring/decimal"

	"pitcard/bracket"
	"pitcard/engine"
	"pitcard/event"
	"pitcard/logbook"
	"pitcard/weather"
)

// Writing to the folder from what a crew typed: a weather reading, a pass
// from its slip. Both front ends call these, so a reading or a slip is
// checked and written the same way from the command line and the page.

// NewReading is one weather reading as typed.
type NewReading struct {
	Fields  ReadingFields
	Time    string // "HH:MM" on today's race day or "YYYY-MM-DD HH:MM"; "" for now
	Notes   string
	Replace bool // replace a reading already logged in the same minute
}

// AddedReading is what AddReading wrote.
type AddedReading struct {
	Reading   weather.Reading
	Elevation weather.Length
	Count     int      // readings in the log after it
	Warnings  []string // a barometer that looks like an altimeter setting
}

// SiteElevation is the elevation of the folder's weather: the fields'
// elevation, or track.yaml's; and the track's name.
func SiteElevation(e *event.Folder, f ReadingFields) (weather.Length, string, error) {
	trk, err := e.Track()
	if err != nil && f.Elevation == "" {
		return 0, "", err
	}
	h, err := f.SiteElevation(e.Settings.Units, trk.Elevation(), err == nil)
	return h, trk.Name, err
}

// AddReading checks one reading and appends it to the weather log; nothing
// is written when anything is wrong with it.
func AddReading(e *event.Folder, nr NewReading, now time.Time) (AddedReading, error) {
	var out AddedReading
	if err := e.Writable(); err != nil {
		return out, err
	}
	elev, _, err := SiteElevation(e, nr.Fields)
	if err != nil {
		return out, err
	}
	when := now
	if strings.TrimSpace(nr.Time) != "" {
		start := e.Settings.DayStart
		if when, err = ParseWhen(nr.Time, start.Day(now.In(e.Zone())), start); err != nil {
			return out, err
		}
	}
	r, err := nr.Fields.ReadingAt(e.Settings.Units, when, nil)
	if err != nil {
		return out, err
	}
	r.Note = nr.Notes
	if err := ValidateFields(r, elev, e.Settings.Units); err != nil {
		return out, err
	}
	if w := r.PressureWarning(elev); w != "" {
		out.Warnings = append(out.Warnings, w)
	}
	n, err := e.AppendReading(r, elev, nr.Replace)
	if err != nil {
		return out, err
	}
	out.Reading, out.Elevation, out.Count = r, elev, n
	return out, nil
}

// unknownTrack is a warning when a pass's track is neither track.yaml's nor
// one of tracks/*.yaml (a typo, or a track not yet described): the model
// then knows neither its elevation nor its prep.
func unknownTrack(e *event.Folder, name string, trk engine.Track, trkErr error) string {
	if trkErr == nil && strings.EqualFold(name, trk.Name) {
		return ""
	}
	tracks, err := e.OtherTracks()
	if err != nil {
		return ""
	}
	if _, ok := tracks[strings.ToLower(name)]; ok {
		return ""
	}
	return fmt.Sprintf("--track %q is neither %s's name (%q) nor in tracks/*.yaml: check its spelling, or describe it in tracks/ (the model does not know its elevation)",
		name, event.TrackFile, trk.Name)
}

// NewPass is one pass from its time slip, as typed. Blank date and time
// are now's; a blank track is track.yaml's, a blank weight car.yaml's.
type NewPass struct {
	Date, Time, Track, Session      string
	Lane, Dial, RT, Weight, Notes   string
	ET60, ET330, ET660, ET1000, ET1 string
	MPH660, MPH1320                 string
	// Change is what changed on the car before the pass ("" nothing).
	Change string
	// Fields of the reading that replace the weather log's.
	Reading ReadingFields
	// The other lane's slip, when it is entered too: what decided the round.
	OppDial, OppRT, OppET string
	// OppCar is the other car's number or name: with its slip, a row of
	// the opponent book (event.OpponentsFile).
	OppCar string
	// Set are the pass's setup, "name=value" (the --set flags): each an
	// item of car.yaml's setup; an item not given keeps the last pass's value.
	Set []string
}

// LoggedPass is what AddPass wrote.
type LoggedPass struct {
	Pass      logbook.Pass
	Count     int    // passes in the logbook after it
	Source    string // where the conditions came from; "" when none
	Elevation weather.Length
	Decided   string   // what decided the round, with the other lane's slip
	Warnings  []string // worth saying, none stopping the write
	// Opponent is the other lane's slip kept in the opponent book (nil:
	// none); OpponentErr why it could not be kept after the pass was.
	Opponent    *event.OpponentPass
	OpponentErr error
}

// AddPass checks a slip, takes its conditions from the weather log (the
// reading nearest the pass within an hour, or the day's trend; the fields
// given replace the reading's) and appends it to the logbook. Nothing is
// written when anything is wrong with it.
func AddPass(e *event.Folder, np NewPass, now time.Time) (LoggedPass, error) {
	var out LoggedPass
	if err := e.Writable(); err != nil {
		return out, err
	}
	trk, trkErr := e.Track()
	f, err := slipFields(e, np, now, trk, trkErr)
	if err != nil {
		return out, err
	}
	p, err := logbook.ParsePass(f, e.Zone())
	if err != nil {
		return out, err
	}
	if w := unknownTrack(e, p.Track, trk, trkErr); w != "" {
		out.Warnings = append(out.Warnings, w)
	}
	// A slip is logged after its pass: a date past tomorrow is a typo
	// (2500 for 2025), and would borrow another day's weather.
	if limit := now.Add(36 * time.Hour); p.Time.After(limit) {
		return out, &weather.InputError{Field: "--date", Value: np.Date,
			Reason: fmt.Sprintf("is in the future (today is %s): a slip is logged after its pass", now.Format("2006-01-02"))}
	}
	elev, source, err := passConditions(e, &p, np, trk, &out)
	if err != nil {
		return out, err
	}
	oppPass, err := opponentSlip(e, p, np, &out)
	if err != nil {
		return out, err
	}
	setupCols, err := passSetup(e, &p, np.Set)
	if err != nil {
		return out, err
	}
	saved, err := e.SaveLogbook([]logbook.Pass{p}, setupCols...)
	if err != nil {
		return out, err
	}
	if oppPass != nil {
		keepOpponent(e, *oppPass, &out)
	}
	if w := logbook.DialWarning(p); w != "" {
		out.Warnings = append(out.Warnings, w)
	}
	if saved.Kept != nil {
		out.Warnings = append(out.Warnings, saved.Kept.Error())
	}
	if !p.HasAir {
		out.Warnings = append(out.Warnings, "no weather reading within an hour of the pass and no reading given: the pass is logged without its conditions, and the model cannot learn from its air")
	}
	out.Pass, out.Count, out.Source, out.Elevation = p, saved.Count, source, elev
	return out, nil
}

// slipWhen is the slip's date and time as typed, a blank one filled from
// now: a time without a date is on today's race day ("23:50" typed at
// 00:24 is the evening's, not tonight's). It does not check them.
func slipWhen(e *event.Folder, np NewPass, now time.Time) (date, clock string, err error) {
	date, clock = np.Date, np.Time
	start := e.Settings.DayStart
	switch {
	case date == "" && clock != "":
		when, err := ParseWhen(clock, start.Day(now.In(e.Zone())), start)
		if err != nil {
			return "", "", err
		}
		date = when.Format(weather.DateLayout)
	case date == "":
		date = now.In(e.Zone()).Format(weather.DateLayout)
	}
	if clock == "" {
		clock = now.In(e.Zone()).Format(weather.TimeLayout)
	}
	return date, clock, nil
}

// slipFields turns the flags of a slip into the logbook's fields, each
// named by its flag in messages: a blank date, time, track or weight taken
// from now, track.yaml and car.yaml, trap speeds in the logbook's mph. It
// checks that --round and --lane are given, and leaves every other check to
// logbook.ParsePass.
func slipFields(e *event.Folder, np NewPass, now time.Time, trk engine.Track, trkErr error) (logbook.SlipFields, error) {
	var f logbook.SlipFields
	date, clock, err := slipWhen(e, np, now)
	if err != nil {
		return f, err
	}
	track := np.Track
	if track == "" {
		if trkErr != nil {
			return f, trkErr
		}
		track = trk.Name
	}
	// A weight typed without a unit is in the crew's units; car.yaml's is lb.
	weight, weightMetric := np.Weight, e.Settings.Units.Weight == weather.UnitKg
	if weight == "" {
		if car, err := e.Car(); err == nil {
			weight, weightMetric = fmt.Sprint(car.WeightLb), false
		}
	}
	// A trap speed typed with a unit, or bare in a metric folder's km/h, is
	// the logbook's mph (to the hundredth, as a slip prints it).
	trap := func(flag, v string) (string, error) {
		m, err := TrapMPH(v, e.Settings.Units)
		return m, event.FlagErr(err, flag)
	}
	mph660, err := trap("--mph660", np.MPH660)
	if err != nil {
		return f, err
	}
	mph1320, err := trap("--mph1320", np.MPH1320)
	if err != nil {
		return f, err
	}
	f = logbook.SlipFields{Values: map[string]string{
		"date": date, "time": clock, "track": track, "session": np.Session, "lane": np.Lane,
		"dial": np.Dial, "rt": np.RT, "et60": np.ET60, "et330": np.ET330, "et660": np.ET660, "et1000": np.ET1000, "et1320": np.ET1,
		"mph660": mph660, "mph1320": mph1320, "weight_lb": weight, "notes": np.Notes,
		"change": np.Change,
	}, Names: map[string]string{}, Metric: map[string]bool{"weight_lb": weightMetric}}
	for c := range f.Values {
		f.Names[c] = "--" + strings.ReplaceAll(strings.TrimSuffix(c, "_lb"), "_", "-")
	}
	f.Names["session"] = "--round" // the logbook's session column is the flag --round
	if np.Session == "" || np.Lane == "" {
		return f, event.BadInputf("--round and --lane are required (e.g. --round E1 --lane left)")
	}
	return f, nil
}

// passConditions gives p its air: the nearest weather reading within an
// hour (or the day's trend when it reaches the pass), with any field given
// replacing its own, at the track's elevation or the one given. It returns
// the elevation and where the air came from ("" when p has none); rows of
// the weather log that do not read are a warning in out. It writes nothing.
func passConditions(e *event.Folder, p *logbook.Pass, np NewPass, trk engine.Track, out *LoggedPass) (weather.Length, string, error) {
	elev := trk.Elevation()
	var err error
	if np.Reading.Elevation != "" {
		if elev, err = np.Reading.SiteElevation(e.Settings.Units, 0, false); err != nil {
			return elev, "", err
		}
	}
	var base *weather.Reading
	source := ""
	log, bad, err := e.ReadableWeather(elev)
	if err != nil {
		return elev, "", err
	}
	if bad != nil { // the pass is logged all the same, its air from the rows that read
		out.Warnings = append(out.Warnings, bad.Error())
	}
	if r, ok := nearestReading(log, p.Time, time.Hour); ok {
		base, source = &r, "the weather log's "+r.Time.Format("15:04")+" reading"
	} else if len(log) > 0 && e.Settings.DayStart.Same(log[len(log)-1].Time, p.Time) {
		// No reading within the hour, but the day's trend reaches the pass.
		if f, err := weather.ForecastAt(log, p.Time, elev); err == nil && f.Trusted {
			base, source = &f.Reading, "the weather log's trend ("+strings.Join(f.Notes, "; ")+")"
		}
	}
	if base != nil || np.Reading.Given() {
		r, err := np.Reading.ReadingAt(e.Settings.Units, p.Time, base)
		if err != nil {
			return elev, "", err
		}
		if err := ValidateFields(r, elev, e.Settings.Units); err != nil {
			return elev, "", err
		}
		a := r.Derive(elev)
		r.Baro, r.BaroKind, r.RH, r.DewPointSet, r.Time = a.Station, weather.StationPressure, a.RH, false, p.Time
		p.Air, p.HasAir = r, true
		if source == "" {
			source = "the values given"
		} else if np.Reading.Given() {
			source += ", with the values given"
		}
	}
	return elev, source, nil
}

// opponentSlip checks the other lane's slip: what decided the round (put
// in out.Decided) and, when its car is named, the slip for the opponent
// book, checked before anything is written so a bad one stops the pass too
// (nil: none to keep). It writes nothing.
func opponentSlip(e *event.Folder, p logbook.Pass, np NewPass, out *LoggedPass) (*event.OpponentPass, error) {
	var err error
	if np.OppDial != "" || np.OppRT != "" || np.OppET != "" {
		if out.Decided, err = DecidedBy(p, np.OppDial, np.OppRT, np.OppET, e.Settings); err != nil {
			return nil, err
		}
	}
	switch {
	case np.OppCar != "" && out.Decided == "":
		return nil, event.BadInputf("--opponent %s: give the other lane's slip with it (--opponent-dial, --opponent-rt, --opponent-et) to keep it in %s", np.OppCar, event.OpponentsFile)
	case np.OppCar != "":
		op, err := event.NewOpponentPass(np.OppCar, p.Time.Format(weather.DateLayout), p.Session, np.OppDial, np.OppRT, np.OppET, "")
		if err != nil {
			return nil, err
		}
		if err := e.OpponentBookWritable(op); err != nil {
			return nil, err
		}
		return &op, nil
	case out.Decided != "":
		out.Warnings = append(out.Warnings, fmt.Sprintf("the other lane's slip is not kept: name its car with --opponent (its number) and %s remembers it for the next time you race it", event.OpponentsFile))
	}
	return nil, nil
}

// keepOpponent adds the other lane's slip to the opponent book after the
// pass is logged. Two files cannot change in one atomic step: the pass is
// logged first (it is what the model learns from); a failure here is said
// in out.OpponentErr, not returned, and the slip can be added again with
// the next pass's or by hand.
func keepOpponent(e *event.Folder, op event.OpponentPass, out *LoggedPass) {
	if _, _, err := e.AddOpponentPasses([]event.OpponentPass{op}, "this slip"); err != nil {
		out.OpponentErr = fmt.Errorf("the pass is logged, but the other lane's slip was not kept in %s: %w", e.Name(event.OpponentsFile), err)
	} else {
		out.Opponent = &op
	}
}

// passSetup puts the pass's setup in its columns: the items of set
// ("name=value", checked against car.yaml's setup), every other item the
// last pass's value. It returns the columns the logbook must have.
func passSetup(e *event.Folder, p *logbook.Pass, set []string) ([]string, error) {
	var setup logbook.Setup
	car, carErr := e.Car()
	if carErr == nil {
		setup = car.Setup
	}
	if len(set) > 0 && carErr != nil {
		return nil, carErr
	}
	given, err := logbook.ParseSetAssignments("--set", set, setup)
	if err != nil || len(setup) == 0 {
		return nil, err
	}
	last, err := e.LastSetup(p.Time, setup)
	if err != nil {
		return nil, err
	}
	var cols []string
	for _, it := range setup {
		v, ok := given[it.Name]
		if !ok {
			v = last[it.Name]
		}
		if v == "" {
			continue
		}
		if p.Extra == nil {
			p.Extra = map[string]string{}
		}
		p.Extra[it.Name] = v
		cols = append(cols, it.Name)
	}
	return cols, nil
}

// nearestReading is the reading of log closest in time to t, within tol.
func nearestReading(log []weather.Reading, t time.Time, tol time.Duration) (weather.Reading, bool) {
	best, bestGap := weather.Reading{}, time.Duration(math.MaxInt64)
	for _, r := range log {
		gap := r.Time.Sub(t)
		if gap < 0 {
			gap = -gap
		}
		if gap < bestGap {
			best, bestGap = r, gap
		}
	}
	return best, bestGap <= tol
}

// DecidedBy says what decided a round, from our pass and the other lane's
// slip: the reason (a red light, a breakout, the finish) and where the
// margin came from, the package of reaction time and time over the dial in
// each lane. The rules are Settle's.
func DecidedBy(p logbook.Pass, dial, rt, et string, s event.Settings) (string, error) {
	if dial == "" || rt == "" || et == "" {
		return "", event.BadInputf("give the other lane's slip whole: --opponent-dial, --opponent-rt and --opponent-et")
	}
	fin, _, ok := p.Finish()
	if !p.Dial.Valid || !p.RT.Valid || !ok {
		return "", event.BadInputf("what decided the round needs our dial, reaction time and ET too (--dial, --rt, --et1320)")
	}
	var them bracket.LaneRun
	var err error
	// The other lane's slip is read and range-checked as ours is.
	for _, f := range []struct {
		flag, v string
		dst     *decimal.Decimal
		valid   [2]float64
	}{{"--opponent-dial", dial, &them.Dial, logbook.DialRange}, {"--opponent-rt", rt, &them.RT, logbook.RTRange}, {"--opponent-et", et, &them.ET, logbook.DialRange}} {
		if *f.dst, err = logbook.ParseSlipTime(f.flag, f.v, f.valid); err != nil {
			return "", err
		}
	}
	us := bracket.LaneRun{Dial: p.Dial.Decimal, RT: p.RT.Decimal, ET: fin}
	left, right := us, them
	if p.Lane == logbook.Right {
		left, right = them, us
	}
	o, err := bracket.Settle(left, right, bracket.RaceRules{Tree: s.Tree, RTZero: bracket.FromGreen})
	if err != nil {
		return "", err
	}
	ours, theirs := o.Left, o.Right
	if p.Lane == logbook.Right {
		ours, theirs = o.Right, o.Left
	}
	verdict := "You won"
	switch o.Winner {
	case "":
		verdict = "No winner"
	case logbook.Left, logbook.Right:
		if (o.Winner == logbook.Right) != (p.Lane == logbook.Right) {
			verdict = "You lost"
		}
	}
	pkg := func(x bracket.LaneResult) string {
		return fmt.Sprintf("%s reaction, %s over the dial: %s", logbook.FormatSeconds(x.Reaction, 3), signedSeconds(x.OverDial), signedSeconds(x.Package))
	}
	return fmt.Sprintf("%s: %s (%s). Packages: yours %s; the other lane's %s.", verdict, o.Reason, o.Explanation, pkg(ours), pkg(theirs)), nil
}

func signedSeconds(d decimal.Decimal) string {
	if d.IsNegative() {
		return logbook.FormatSeconds(d, 3)
	}
	return "+" + logbook.FormatSeconds(d, 3)
}

// TrapMPH reads a trap speed as typed (108.2mph, 174.1km/h, or bare in the
// crew's units) and gives it as the logbook keeps it: mph to the hundredth,
// as a slip prints it. A bare figure in an imperial folder is kept as typed.
// The one parser of a trap speed for the flags and round's questions.
func TrapMPH(typed string, u weather.Units) (string, error) {
	if typed == "" || u.Speed == weather.UnitMPH && !strings.ContainsFunc(typed, unicode.IsLetter) {
		return typed, nil
	}
	sp, err := weather.ParseSpeed(typed, u.Speed)
	if err != nil {
		return "", err
	}
	return strconv.FormatFloat(math.Round(sp.MPH()*100)/100, 'f', 2, 64), nil
}
