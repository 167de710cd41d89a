package entry

import (
	"errors"
	"fmt"
	"maps"
	"strconv"
	"strings"
	"time"

	"github.com/shopspring/decimal"

	"pitcard/bracket"
	"pitcard/engine"
	"pitcard/event"
	"pitcard/internal/stats"
	"pitcard/logbook"
	"pitcard/prep"
	"pitcard/scripts"
	"pitcard/weather"
)

// A round gathered from what a crew typed: the fields of a reading, of the
// round and of the other lane, as text (a flag's value, a form's field),
// parsed here so that every front end checks them alike and names the
// field (as "--temp": the command line's name, which the pit page shows
// beside its own field) in its messages.

// ReadingFields are one weather reading as typed.
type ReadingFields struct {
	Temp, Baro, BaroKind, Humidity, DewPoint, Elevation, Wind, WindFrom, TrackTemp string
}

// OpponentFields are what is known of the other lane, and of our driver's
// reaction times, as typed; each blank takes its setting.
type OpponentFields struct {
	// Car names the other car (--opponent): its history in the opponent
	// book sets its margin, spread and reaction times.
	Car                      string
	Margin, SD, RTMean, RTSD string
	ETs, RTs                 []string
	OurRTMean, OurRTSD       string
}

// RoundRequest is a round as asked for: which session and lane, the call
// time (At), the opponent, the air's fields, the prep and the weight.
type RoundRequest struct {
	Reading      ReadingFields
	At           string
	Round, Lane  string
	OpponentDial string
	Prep, Weight string
	// Change is the crew's words for a change made to the car since its
	// last pass (--change): the prediction widens for it.
	Change string
	// Unsaved is a reading that could not be written (a full disk): the
	// round's card still uses it.
	Unsaved  *weather.Reading
	Opponent OpponentFields
	// Set is the planned setup, "name=value" (--set): each an item of
	// car.yaml's setup; an item not given is the last pass's.
	Set []string
}

// Given reports whether any reading field (flag or form field) was set.
func (f *ReadingFields) Given() bool {
	return f.Temp != "" || f.Baro != "" || f.BaroKind != "" || f.Humidity != "" || f.DewPoint != "" ||
		f.Wind != "" || f.WindFrom != "" || f.TrackTemp != ""
}

// SiteElevation is the elevation the fields give (--elevation), or else the
// track's when haveTrack; neither is an error naming --elevation.
func (f *ReadingFields) SiteElevation(u weather.Units, track weather.Length, haveTrack bool) (weather.Length, error) {
	if f.Elevation == "" {
		if !haveTrack {
			return 0, event.BadInputf("the track elevation is unknown: give --elevation (e.g. --elevation 2240ft) or write track.yaml")
		}
		return track, nil
	}
	h, err := weather.ParseLength(f.Elevation, u.Length)
	return h, event.FlagErr(err, "--elevation")
}

// ReadingAt builds a reading from the fields at time now. With base (the latest
// logged reading, say) the flags given replace its fields; without it temp,
// baro and humidity (or dew point) are required.
func (f *ReadingFields) ReadingAt(u weather.Units, now time.Time, base *weather.Reading) (weather.Reading, error) {
	var r weather.Reading
	if base != nil {
		r = *base
	} else {
		r.Time = now
	}
	r, err := f.parseOnto(r, u, base == nil)
	if err != nil || base != nil {
		return r, err
	}
	// Checked after the values given, so a bad one is named before a
	// missing one ("--track-temp abc" is answered about abc).
	for _, req := range []struct{ name, v string }{{"--temp", f.Temp}, {"--baro", f.Baro}} {
		if req.v == "" {
			return r, &MissingField{What: req.name}
		}
	}
	if f.Humidity == "" && f.DewPoint == "" {
		return r, &MissingField{What: "--humidity or --dewpoint"}
	}
	return r, nil
}

// parseOnto puts the fields given onto r; fresh says r is a new reading (not
// a logged one whose fields the flags replace). A value that does not parse
// is answered with its flag and, where it has one, its valid range.
func (f *ReadingFields) parseOnto(r weather.Reading, u weather.Units, fresh bool) (weather.Reading, error) {
	var err error
	if f.Temp != "" {
		if r.Temp, err = weather.ParseTemperature(f.Temp, u.Temp); err != nil {
			return r, rangedErr(err, "temp", u)
		}
	}
	if f.Baro != "" {
		if r.Baro, err = weather.ParsePressure(f.Baro, u.Pressure); err != nil {
			return r, rangedErr(err, "baro", u)
		}
		r.BaroKind = weather.StationPressure
	}
	if f.BaroKind != "" {
		if r.BaroKind, err = weather.ParsePressureKind(f.BaroKind); err != nil {
			return r, event.FlagErr(err, "--baro-kind")
		}
	}
	if f.Humidity != "" && f.DewPoint != "" {
		return r, event.BadInputf("give --humidity or --dewpoint, not both")
	}
	if f.Humidity != "" {
		if r.RH, err = weather.ParsePercent(f.Humidity); err != nil {
			return r, rangedErr(err, "humidity", u)
		}
		r.DewPointSet = false
	}
	if f.DewPoint != "" {
		if r.DewPoint, err = weather.ParseTemperature(f.DewPoint, u.Temp); err != nil {
			return r, event.FlagErr(err, "--dewpoint")
		}
		r.DewPointSet = true
	}
	if f.Wind != "" {
		if r.Wind, err = weather.ParseSpeed(f.Wind, u.Speed); err != nil {
			return r, rangedErr(err, "wind", u)
		}
		r.WindUnknown = false
	} else if fresh {
		r.WindUnknown = true // not read: blank in weather.csv, never "calm"
	}
	if f.WindFrom != "" {
		if r.WindFrom, err = weather.ParseDirection(f.WindFrom); err != nil {
			return r, event.FlagErr(err, "--wind-from")
		}
		r.WindDirUnknown = false
	} else if f.Wind != "" && fresh && r.Wind > 0 {
		r.WindDirUnknown = true // a speed without a direction: neither head- nor tailwind
	}
	if f.TrackTemp != "" {
		if r.TrackTemp, err = weather.ParseTemperature(f.TrackTemp, u.Temp); err != nil {
			return r, rangedErr(err, "track-temp", u)
		}
		r.HasTrack = true
	}
	// each value given is checked against its range now, so a reading that
	// lacks another field is not answered about the missing one first
	for _, c := range []struct {
		field, given string
		t            weather.Temperature
		lim          [2]float64
	}{
		{"temp", f.Temp, r.Temp, weather.TempRange},
		{"track-temp", f.TrackTemp, r.TrackTemp, weather.TrackTempRange},
	} {
		if c.given == "" {
			continue
		}
		if err := weather.CheckTemp(c.field, c.t, c.lim, u); err != nil {
			return r, event.FlagErr(err, "--"+c.field)
		}
	}
	return r, nil
}

// rangedErr names the flag --field in a parser's InputError and adds the
// field's valid range in the crew's units: "--track-temp "abc" is not a
// number with a unit (valid -20..200 °F)".
func rangedErr(err error, field string, u weather.Units) error {
	var ie *weather.InputError
	if !errors.As(err, &ie) {
		return err
	}
	named := ie.Named("--" + field)
	if r := weather.RangeText(field, u); r != "" {
		named.Reason += " (valid " + r + ")"
	}
	return named
}

// MissingField is a reading without a field it needs (and no reading to
// take it from). A command that can take the weather log's last reading
// instead says so beside it.
type MissingField struct{ What string }

// Error says which field is required.
func (m *MissingField) Error() string { return m.What + " is required" }

// BadInput marks the error as the crew's to fix.
func (m *MissingField) BadInput() bool { return true }

// ValidateFields checks a reading and names the flags in its error, with
// the value and its range in the crew's units u.
func ValidateFields(r weather.Reading, h weather.Length, u weather.Units) error {
	err := r.ValidateIn(h, u)
	var ie *weather.InputError
	if errors.As(err, &ie) {
		return ie.Named("--" + ie.Field)
	}
	return err
}

// PrepLevel is the prep level the --prep flag gives, or else the track's
// usual prep from track.yaml.
func PrepLevel(flag string, trk engine.Track) (float64, error) {
	if flag != "" {
		p, err := engine.ParsePrep(flag)
		return p, event.FlagErr(err, "--prep")
	}
	p, err := engine.ParsePrep(trk.Prep)
	if err != nil {
		return 1, fmt.Errorf("track.yaml: %w", err)
	}
	return p, nil
}

// ParseWhen reads "2026-06-13 21:40" (a calendar date and time) or "21:40"
// on the race day that began on day's date (start.Day(now) for today's):
// a time before start is on the next calendar date, so "00:15" typed
// during a race night is the coming midnight's, and "23:50" typed at 00:24
// the evening's. In day's zone; a time daylight saving skips is refused.
func ParseWhen(s string, day time.Time, start weather.DayStart) (time.Time, error) {
	s = strings.TrimSpace(s)
	if d, c, ok := strings.Cut(s, " "); ok {
		t, err := weather.ParseDateTime(d, c, day.Location())
		return t, event.FlagErr(err, "--time")
	}
	t, err := start.Clock(s, day, day.Location())
	return t, event.FlagErr(err, "--time")
}

// seconds reads the time v given for flag, in seconds within lo..hi.
func seconds(flag, v string, lo, hi float64) (float64, error) {
	x, err := strconv.ParseFloat(strings.TrimSpace(v), 64)
	if err != nil || !(x >= lo && x <= hi) {
		return 0, &weather.InputError{Field: flag, Value: v, Reason: fmt.Sprintf("is not a time in seconds within %g..%g", lo, hi)}
	}
	return x, nil
}

// Build turns the flags, the settings, the logbook and the opponent book
// (nil: none) into the other lane and our driver's reaction times; nil when
// the other lane's dial is unknown. A named car's history replaces the
// settings' defaults (shrunk toward them, Shrunk); the day's slips and the
// flags given replace both.
func (o *OpponentFields) Build(s event.Settings, dial decimal.NullDecimal, passes []logbook.Pass, book *event.OpponentBook) (*bracket.Opponent, bracket.RTModel, error) {
	us, err := o.ourRT(s, passes)
	if err != nil || !dial.Valid {
		return nil, us, err
	}
	opp := &bracket.Opponent{Dial: dial.Decimal, Margin: s.OppMargin, MarginSD: s.OppMarginSD, RT: bracket.RTModel{Mean: s.OppRTMean, SD: s.OppRTSD}}
	for _, step := range []func(*bracket.Opponent) error{
		func(opp *bracket.Opponent) error { return o.fromBook(opp, s, book) },
		o.fromSlips,
		o.fromFlags,
	} {
		if err := step(opp); err != nil {
			return nil, us, err
		}
	}
	return opp, us, nil
}

// ourRT is our driver's reaction times: the logbook's (aborted passes left
// out), shrunk to the settings' (NewRTModel), or --rt-mean and --rt-sd.
func (o *OpponentFields) ourRT(s event.Settings, passes []logbook.Pass) (bracket.RTModel, error) {
	var logged []float64 // most recent first
	for i := len(passes) - 1; i >= 0; i-- {
		if p := passes[i]; p.RT.Valid && !s.AbortWords.Aborted(p.Notes) {
			logged = append(logged, p.RT.Decimal.InexactFloat64())
		}
	}
	if o.OurRTMean == "" && o.OurRTSD == "" {
		return bracket.NewRTModel(logged, s.RTMean, s.RTSD), nil
	}
	us := bracket.RTModel{Mean: s.RTMean, SD: s.RTSD}
	var err error
	if o.OurRTMean != "" {
		if us.Mean, err = seconds("--rt-mean", o.OurRTMean, -1, 2); err != nil {
			return us, err
		}
	}
	if o.OurRTSD != "" {
		if us.SD, err = seconds("--rt-sd", o.OurRTSD, 0.001, 1); err != nil {
			return us, err
		}
	}
	return us, nil
}

// fromBook puts the named car's history in the opponent book (nil: none)
// over the settings' figures, shrunk toward them (bracket.Shrunk).
func (o *OpponentFields) fromBook(opp *bracket.Opponent, s event.Settings, book *event.OpponentBook) error {
	if o.Car == "" {
		return nil
	}
	car, err := event.ParseCar("--opponent", o.Car)
	if err != nil {
		return err
	}
	if book == nil {
		book = &event.OpponentBook{}
	}
	h := book.History(car, s.AbortWords)
	opp.Margin, opp.MarginSD = bracket.Shrunk(h.Margins, s.OppMargin, s.OppMarginSD, bracket.PriorPasses)
	opp.RT.Mean, opp.RT.SD = bracket.Shrunk(h.RTs, s.OppRTMean, s.OppRTSD, bracket.PriorPasses)
	opp.From = h.Words()
	return nil
}

// secondsList reads each of vs for flag, in seconds within lo..hi.
func secondsList(flag string, vs []string, lo, hi float64) ([]float64, error) {
	var out []float64
	for _, v := range vs {
		x, err := seconds(flag, v, lo, hi)
		if err != nil {
			return nil, err
		}
		out = append(out, x)
	}
	return out, nil
}

// fromSlips puts what the other lane's slips of the day showed over the
// book's and the settings' figures: its ETs' margin over its dial, its
// reaction times (a spread only from three or more).
func (o *OpponentFields) fromSlips(opp *bracket.Opponent) error {
	ets, err := secondsList("--opponent-et", o.ETs, logbook.DialRange[0], logbook.DialRange[1])
	if err != nil {
		return err
	}
	if len(ets) > 0 {
		d := opp.Dial.InexactFloat64()
		for i := range ets {
			ets[i] -= d
		}
		m, sd := stats.MeanSD(ets)
		opp.Margin = m
		if len(ets) >= 3 {
			opp.MarginSD = sd
		}
	}
	rts, err := secondsList("--opponent-rt", o.RTs, logbook.RTRange[0], logbook.RTRange[1])
	if err != nil || len(rts) == 0 {
		return err
	}
	opp.RT = bracket.NewRTModel(rts, opp.RT.Mean, opp.RT.SD)
	if len(rts) < bracket.MinRTSamples {
		m, sd := stats.MeanSD(rts)
		opp.RT.Mean = m
		if len(rts) >= 3 {
			opp.RT.SD = sd
		}
	}
	return nil
}

// fromFlags puts the figures given as flags over everything else.
func (o *OpponentFields) fromFlags(opp *bracket.Opponent) error {
	for _, f := range []struct {
		flag   string
		v      string
		dst    *float64
		lo, hi float64
	}{{"--opponent-margin", o.Margin, &opp.Margin, -1, 2}, {"--opponent-margin-sd", o.SD, &opp.MarginSD, 0.001, 1},
		{"--opponent-rt-mean", o.RTMean, &opp.RT.Mean, -1, 2}, {"--opponent-rt-sd", o.RTSD, &opp.RT.SD, 0.001, 1}} {
		if f.v == "" {
			continue
		}
		x, err := seconds(f.flag, f.v, f.lo, f.hi)
		if err != nil {
			return err
		}
		*f.dst = x
		if f.flag == "--opponent-rt-mean" || f.flag == "--opponent-rt-sd" {
			opp.RT.Samples = nil
		}
	}
	return nil
}

// GatherRound gathers everything a round's card is made from. Problems that
// leave part of the card blank (no weather log, a forecast too far ahead)
// come back as warnings, not errors: the card still prints what it can.
func GatherRound(e *event.Folder, r RoundRequest, now time.Time) (prep.Input, []string, error) {
	g := &gathering{e: e, r: r, now: now}
	for _, step := range []func() error{g.readFolder, g.readWeather, g.chooseSlot, g.chooseCall, g.readNotes, g.airAtCall, g.roundOptions, g.otherLane} {
		if err := step(); err != nil {
			return prep.Input{}, nil, err
		}
	}
	in, err := g.input()
	if err != nil {
		return prep.Input{}, nil, err
	}
	if len(g.broken) > 0 {
		return in, g.warnings, event.BrokenInput{Errs: g.broken}
	}
	return in, g.warnings, nil
}

// gathering is one GatherRound in progress: what the request asked, what
// the folder holds, and what each step found. A step returns an error that
// stops the card; bad input the card can print around goes to broken (a
// broken car.yaml or logbook.csv does not stop the card: it prints what it
// can, the air, the rules, the checklist, the cautions, and says what is
// wrong; the command then exits 2).
type gathering struct {
	e        *event.Folder
	r        RoundRequest
	now      time.Time
	broken   []error
	warnings []string

	car       engine.Car
	trk       engine.Track
	tracks    map[string]engine.Track
	passes    []logbook.Pass
	sched     prep.Schedule
	haveSched bool
	elev      weather.Length
	log       []weather.Reading // the weather log, oldest first

	slot     prep.Slot
	haveSlot bool
	call     time.Time
	lane     logbook.Lane
	notes    event.RoundNotes
	opp      decimal.NullDecimal // the other lane's dial

	air      weather.Reading
	source   string
	airNow   *weather.Reading
	forecast *weather.Forecast

	prepLvl, weight float64
	change          string
	planned         map[string]string
	opponent        *bracket.Opponent
	usRT            bracket.RTModel
}

// readFolder reads the car, the track and the other tracks, the logbook's
// recent passes and the schedule, and the site's elevation.
func (g *gathering) readFolder() error {
	e, r := g.e, g.r
	var err error
	if g.car, err = e.Car(); err != nil {
		if !event.IsBadInput(err) {
			return err
		}
		g.broken = append(g.broken, err)
	}
	if g.trk, err = e.Track(); err != nil {
		return err
	}
	g.passes, err = e.RecentLogbook()
	switch {
	case event.OnlyLeftOut(err) && err != nil: // the good rows are used, the bad ones named
		g.broken = append(g.broken, err)
	case err != nil && !event.IsBadInput(err):
		return err
	case err != nil: // a header pitcard cannot read: no passes at all
		g.broken = append(g.broken, err)
		g.passes = nil
	}
	if g.tracks, err = e.OtherTracks(); err != nil {
		return err
	}
	g.sched, g.haveSched, err = e.Schedule()
	switch {
	case err != nil && r.Round != "" && event.IsBadInput(err):
		// the round is given: a broken schedule costs only its call time
		g.broken = append(g.broken, err)
		g.sched, g.haveSched = prep.Schedule{}, false
	case err != nil:
		return err
	}
	g.elev, err = r.Reading.SiteElevation(e.Settings.Units, g.trk.Elevation(), true)
	return err
}

// readWeather reads the weather log and sets the clock from it and the
// schedule (ClockFor).
func (g *gathering) readWeather() error {
	e, r := g.e, g.r
	log, badRows, err := e.ReadableWeather(g.elev)
	if badRows != nil {
		// Rows of weather.csv that cannot be read are named; the rest of
		// the log is used, and the command exits 2, as for the logbook.
		g.broken = append(g.broken, badRows)
	}
	if err != nil {
		// A corrupt weather.csv costs the card nothing when the flags give
		// a whole reading: the card prints from them and names the bad
		// row, and the command exits 2 as for a bad logbook row.
		if _, ferr := r.Reading.ReadingAt(e.Settings.Units, g.now, nil); !event.IsBadInput(err) || ferr != nil {
			return err
		}
		g.broken = append(g.broken, fmt.Errorf("%w (the weather log could not be read: the card's air is the reading flags)", err))
		log = nil
	}
	g.now, g.sched, g.warnings = e.ClockFor(g.sched, g.haveSched, log, g.now)
	if r.Unsaved != nil { // a reading the disk refused: the card still uses it
		log = append(log, *r.Unsaved)
		weather.SortLog(log)
	}
	g.log = log
	return nil
}

// chooseSlot is the session and its slot in the schedule: --round, or the
// schedule's next round without a pass.
func (g *gathering) chooseSlot() error {
	switch {
	case g.r.Round != "":
		ses, err := logbook.ParseSession(g.r.Round)
		if err != nil {
			return event.FlagErr(err, "--round")
		}
		g.slot.Session = ses
		if s, ok := g.sched.Find(ses); ok {
			g.slot, g.haveSlot = s, true
		}
	case g.haveSched:
		s, ok := g.sched.Next(g.passes)
		if !ok {
			return event.BadInputf("every round of %s has a pass in the logbook: give --round for another", g.e.Name(event.ScheduleFile))
		}
		g.slot, g.haveSlot = s, true
	default:
		return event.BadInputf("which round? give --round (3, E3, T2 ...), or write %s with the day's call times", event.ScheduleFile)
	}
	return nil
}

// chooseCall is the call time: --at (on the schedule's race day, or the
// latest reading's, or today's), the schedule's, or now; and the lane.
func (g *gathering) chooseCall() error {
	start := g.e.Settings.DayStart
	day := start.Day(g.now)
	switch {
	case g.haveSched:
		day = g.sched.Date
	case len(g.log) > 0:
		day = start.Day(g.log[len(g.log)-1].Time)
	}
	g.call = g.now
	switch {
	case g.r.At != "":
		t, err := ParseWhen(g.r.At, day, start)
		if err != nil {
			return event.FlagErr(err, "--at")
		}
		g.call = t
	case g.haveSlot:
		g.call = g.slot.Call
	}
	g.lane = g.slot.Lane
	if g.r.Lane != "" {
		lane, err := logbook.ParseLane(g.r.Lane)
		if err != nil {
			return event.FlagErr(err, "--lane")
		}
		g.lane = lane
	}
	return nil
}

// readNotes reads the round's notes (the other lane's dial and car entered
// earlier, on the page say, the checklist ticked, the planned setup) and
// the other lane's dial, --opponent-dial over the noted one.
func (g *gathering) readNotes() error {
	r := &g.r
	notes, err := g.e.RoundNotes(g.call.Format(weather.DateLayout), g.slot.Session)
	if err != nil {
		if !event.IsBadInput(err) {
			return err
		}
		g.broken = append(g.broken, err)
	}
	g.notes, g.opp = notes, notes.OpponentDial
	if g.opp.Valid && r.OpponentDial == "" {
		g.warnings = append(g.warnings, fmt.Sprintf("the other lane's dial %s is the one noted for %s in %s (from the pit page); --opponent-dial replaces it",
			logbook.FormatSeconds(g.opp.Decimal, 2), g.slot.Session, event.RoundsFile))
	}
	if notes.OpponentCar != "" && r.Opponent.Car == "" { // named on the pit page
		r.Opponent.Car = notes.OpponentCar
	}
	if r.OpponentDial != "" {
		d, err := logbook.ParseSeconds("--opponent-dial", r.OpponentDial)
		if err != nil {
			return err
		}
		if err := event.RangeErr("--opponent-dial", d, logbook.DialRange); err != nil {
			return err
		}
		g.opp = decimal.NewNullDecimal(d)
	}
	return nil
}

// airAtCall is the air at the call: the race day's log forecast to it (the
// reading flags replace its fields), or the flags alone; checked against
// the ranges at the site.
func (g *gathering) airAtCall() error {
	e, r, start := g.e, g.r, g.e.Settings.DayStart
	// Only the call's race day's readings forecast its air.
	var dayLog []weather.Reading
	for _, rd := range g.log {
		if start.Same(rd.Time, g.call) {
			dayLog = append(dayLog, rd)
		}
	}
	if len(dayLog) == 0 && len(g.log) > 0 {
		g.warnings = append(g.warnings, fmt.Sprintf("no weather reading on the race day of %s: the air is the last reading, of %s; take a fresh one",
			start.Key(g.call), g.log[len(g.log)-1].Time.Format("2006-01-02 15:04")))
		dayLog = g.log[len(g.log)-1:]
	}
	var err error
	switch {
	case len(dayLog) > 0:
		last := dayLog[len(dayLog)-1]
		g.airNow = &last
		base := last
		g.source = "the " + last.Time.Format("15:04") + " reading"
		if f, ferr := weather.ForecastAt(dayLog, g.call, g.elev); ferr == nil {
			g.forecast = &f
			base = f.Reading
			g.source = "forecast for " + g.call.Format("15:04") + ": " + strings.Join(f.Notes, "; ")
			if !f.Trusted {
				g.warnings = append(g.warnings, "the weather forecast is not to be trusted: "+strings.Join(f.Notes, "; "))
			}
		} else {
			g.warnings = append(g.warnings, fmt.Sprintf("no forecast for the %s call (%v): the air is the %s reading", g.call.Format("15:04"), ferr, last.Time.Format("15:04")))
		}
		if g.air, err = r.Reading.ReadingAt(e.Settings.Units, g.call, &base); err != nil {
			return err
		}
		if r.Reading.Given() {
			g.source += ", with the flags given"
		}
	case r.Reading.Given():
		if g.air, err = r.Reading.ReadingAt(e.Settings.Units, g.call, nil); err != nil {
			return err
		}
		g.source = "the reading flags"
	default:
		return event.BadInputf("no air for the round: %s has no readings; add one with 'pitcard weather add' or give --temp, --baro and --humidity",
			e.Name(event.WeatherFile))
	}
	if err := ValidateFields(g.air, g.elev, e.Settings.Units); err != nil {
		return err
	}
	if w := g.air.PressureWarning(g.elev); w != "" {
		g.warnings = append(g.warnings, w)
	}
	g.air.Time = g.call
	return nil
}

// roundOptions reads what the crew set for the round: the track's prep,
// the weight as run, a change to the car, the planned setup.
func (g *gathering) roundOptions() error {
	e, r := g.e, g.r
	var err error
	if g.prepLvl, err = PrepLevel(r.Prep, g.trk); err != nil {
		return err
	}
	if r.Weight != "" {
		if g.weight, err = logbook.ParseWeightLb("--weight", r.Weight, e.Settings.Units.Weight); err != nil {
			return err
		}
	}
	if g.change, err = logbook.ParseChange("--change", r.Change); err != nil {
		return err
	}
	planned, noted, err := plannedSetup(r.Set, g.notes.Setup, g.car.Setup, e.Name(event.RoundsFile))
	if err != nil {
		return err
	}
	if noted != nil { // a noted setup that no longer reads: the card plans without it and says so
		g.broken = append(g.broken, noted)
	}
	g.planned = planned
	return nil
}

// otherLane is what is known of the other lane (its dial, and its car's
// history in the opponent book) and of our driver's reaction times.
func (g *gathering) otherLane() error {
	r := g.r
	book, err := g.e.OpponentBook()
	if err != nil && !event.IsBadInput(err) {
		return err
	}
	if err != nil { // a wrong header: the car's history is unknown, the card prints
		g.broken = append(g.broken, err)
	} else if bad := book.BadRows(); bad != nil && r.Opponent.Car != "" {
		g.broken = append(g.broken, bad)
	}
	if r.Opponent.Car != "" && !g.opp.Valid {
		g.warnings = append(g.warnings, fmt.Sprintf("--opponent %s: the chance to win needs the other lane's dial too (--opponent-dial)", r.Opponent.Car))
	}
	g.opponent, g.usRT, err = r.Opponent.Build(g.e.Settings, g.opp, g.passes, book)
	return err
}

// input is the card's input from what the steps found, with the crew's
// rules loaded and the problems the card prints.
func (g *gathering) input() (prep.Input, error) {
	e := g.e
	rules, err := scripts.Load(e.FS, e.Settings.RuleLimits)
	if err != nil {
		return prep.Input{}, err
	}
	in := prep.Input{
		Car: g.car, Track: g.trk, Tracks: g.tracks, Passes: g.passes,
		Settings: prep.Settings{Units: e.Settings.Units, DialStep: e.Settings.DialStep, BreakoutRisk: e.Settings.BreakoutRisk,
			MaxRuleAdjust: e.Settings.MaxAdjust, RuleLimits: e.Settings.RuleLimits, MaxReadingAge: e.Settings.MaxReadingAge,
			CrossCheckMax: e.Settings.CrossCheckMax,
			DayStart:      e.Settings.DayStart, Aborts: e.Settings.AbortWords, Changes: e.Settings.ChangeWords},
		Session: g.slot.Session, Lane: g.lane, OpponentDial: g.opp, Opponent: g.opponent, UsRT: g.usRT, PostBestForWin: e.Settings.PostBestForWin,
		Call: g.call, Now: g.now,
		Air: g.air, AirSource: g.source, LatestReading: g.airNow, Forecast: g.forecast, Elevation: g.elev, TrackPrep: g.prepLvl, WeightLb: g.weight,
		Change: g.change, Setup: g.planned,
		Rules: rules, RulesFS: e.FS, Ticked: g.notes.Ticked, HeldOut: e.HeldOut(),
	}
	for _, b := range g.broken {
		in.Problems = append(in.Problems, b.Error())
	}
	in.Problems = append(in.Problems, g.car.Warnings...)
	return in, nil
}

// plannedSetup is the round's planned setup: what was noted for it in
// rounds.csv (the pit page's form), each item given with --set replacing
// the noted one. A noted setup that no longer reads (an item car.yaml no
// longer names, a value now out of its range) is left out whole and comes
// back as bad, naming file: the card plans without it and says so; a bad
// --set is refused (err).
func plannedSetup(flags, noted []string, setup logbook.Setup, file string) (planned map[string]string, bad, err error) {
	planned, bad = logbook.ParseSetAssignments("the setup noted in "+file, noted, setup)
	if bad != nil {
		planned = map[string]string{}
		bad = event.BadInputf("%v; the card plans the last pass's setup (set it again on the pit page's setup form)", bad)
	}
	given, err := logbook.ParseSetAssignments("--set", flags, setup)
	if err != nil {
		return nil, nil, err
	}
	maps.Copy(planned, given)
	return planned, bad, nil
}
