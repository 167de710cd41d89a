package event

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path"
	"path/filepath"
	"slices"
	"strings"
	"time"

	"github.com/shopspring/decimal"

	"pitcard/bracket"
	"pitcard/engine"
	"pitcard/internal/safefile"
	"pitcard/internal/text"
	"pitcard/logbook"
	"pitcard/prep"
	"pitcard/scripts"
	"pitcard/weather"
)

// An opened event folder: its settings (read by the front end: flags,
// environment, pitcard.yaml), its files read and checked, its writes locked
// and atomic. The command line and any other front end take the folder
// from here, so both read and write it the same way.

// inputErr marks an error as the crew's to fix (a front end maps it to its
// "bad input" answer: exit code 2 on the command line).
type inputErr struct{ error }

func (e inputErr) BadInput() bool { return true }
func (e inputErr) Unwrap() error  { return e.error }

func userErrf(f string, a ...any) error { return inputErr{fmt.Errorf(f, a...)} }

// BadInputf is an error the crew is to fix, formatted as fmt.Errorf
// formats (%w keeps the wrapped error reachable): IsBadInput reports it,
// and a front end gives its "bad input" answer (exit code 2 on the command
// line). Package entry and bringin make theirs with it.
func BadInputf(format string, a ...any) error { return userErrf(format, a...) }

// Settings are pitcard.yaml's values after flags and environment.
type Settings struct {
	Units         weather.Units
	DialStep      decimal.Decimal
	BreakoutRisk  float64
	Tree          bracket.Tree
	RTZero        bracket.RTZero
	MaxAdjust     decimal.Decimal
	RuleLimits    scripts.Limits
	MaxReadingAge time.Duration // a reading older than this is flagged on the card
	CrossCheckMax float64       // s: the model this far from the plain cross-check is flagged
	// DayStart is when a race day begins (day_starts): the night's hours
	// before it are the day before's, for the schedule, the weather log's
	// day, the model's "today" and a time typed without a date.
	DayStart weather.DayStart
	// The other lane's defaults and ours, s (common practice, from memory:
	// see the README), and which dial to post.
	OppMargin, OppMarginSD, OppRTMean, OppRTSD, RTMean, RTSD float64
	PostBestForWin                                           bool
	// AbortWords mark a pass in the logbook as not the car's time:
	// logbook.DefaultAbortWords and the crew's own (abort_words).
	AbortWords logbook.AbortWords
	// ChangeWords say in a pass's notes that the car was changed:
	// logbook.DefaultChangeWords and the crew's own (change_words).
	ChangeWords logbook.ChangeWords
}

// Folder is an opened event folder (or the demo).
type Folder struct {
	Dir      string // on disk; "" for the demo
	FS       fs.FS
	Demo     bool
	Settings Settings
	// Files given by flags (--car, --track, --logbook) in place of the folder's.
	CarPath, TrackPath, LogbookPath string
	// Loc is the zone of the folder's local times; nil is time.Local (Zone).
	Loc *time.Location
	// heldOut is the cache of the model's held-out predictions (HeldOut).
	heldOut *engine.HeldOutCache
}

// Zone is the zone of the folder's local times: its files' dates and times
// and a time typed.
func (e *Folder) Zone() *time.Location {
	if e.Loc == nil {
		return time.Local
	}
	return e.Loc
}

// OpenFile opens a folder file, or the file a flag named in its place.
func (e *Folder) OpenFile(file, override string) (fs.File, string, error) {
	if override != "" {
		f, err := os.Open(override)
		if err != nil {
			return nil, override, userErrf("cannot read %s: %v", override, errors.Unwrap(err))
		}
		return f, override, nil
	}
	f, err := e.FS.Open(file)
	return f, e.Name(file), err
}

// Name is how messages refer to a file of the folder.
func (e *Folder) Name(file string) string {
	if p := e.Path(file); p != filepath.Join(e.Dir, file) {
		return p // a file named by --car-file, --track-file or --logbook-file
	}
	if e.Demo {
		return "demo/" + file
	}
	return filepath.Join(e.Dir, file)
}

// Path is a file's path on disk: the folder's, or the file a flag named in
// its place (--logbook-file, ...).
func (e *Folder) Path(file string) string {
	switch {
	case file == LogbookFile && e.LogbookPath != "":
		return e.LogbookPath
	case file == CarFile && e.CarPath != "":
		return e.CarPath
	case file == TrackFile && e.TrackPath != "":
		return e.TrackPath
	}
	return filepath.Join(e.Dir, file)
}

// Writable refuses to write into the demo.
func (e *Folder) Writable() error {
	if e.Demo {
		return userErrf("the demo event is read-only: run 'pitcard init --demo DIR' for a copy you can change")
	}
	return nil
}

// Track reads the folder's track.yaml.
func (e *Folder) Track() (engine.Track, error) {
	f, name, err := e.OpenFile(TrackFile, e.TrackPath)
	if err != nil {
		if errors.Is(err, fs.ErrNotExist) {
			return engine.Track{}, userErrf("%s is missing: pitcard needs the track's elevation (create the folder with 'pitcard init')", name)
		}
		return engine.Track{}, err
	}
	defer f.Close()
	return engine.ReadTrack(f, name)
}

// Car reads the folder's car.yaml.
func (e *Folder) Car() (engine.Car, error) {
	f, name, err := e.OpenFile(CarFile, e.CarPath)
	if err != nil {
		if errors.Is(err, fs.ErrNotExist) {
			return engine.Car{}, userErrf("%s is missing: pitcard needs the car's weight, power, induction and distance (create the folder with 'pitcard init')", name)
		}
		return engine.Car{}, err
	}
	defer f.Close()
	return engine.ReadCar(f, name)
}

// readLogbook reads the logbook keeping its latest keep passes (0: all).
// A last line without its line end that a writer is appending right now is
// taken as not there yet; one no writer holds is torn, and set aside.
func (e *Folder) readLogbook(keep int) (*logbook.Logbook, string, error) {
	lb, name, err := e.readLogbookHeld(keep, false)
	if err != nil || lb == nil {
		return lb, name, err
	}
	for i, b := range lb.Bad {
		if b.Reason == logbook.TornReason && !e.Demo && !safefile.Torn(e.Path(LogbookFile)) {
			lb.Bad = slices.Delete(lb.Bad, i, i+1)
			lb.BadRows = slices.Delete(lb.BadRows, i, i+1)
			break
		}
	}
	return lb, name, err
}

// LastSetup is the value each item of setup had on the logbook's last pass
// before t that recorded it (logbook.LastSetup). It reads the last passes,
// from the end of the file, and the whole logbook only when they do not
// hold every item's value.
func (e *Folder) LastSetup(t time.Time, setup logbook.Setup) (map[string]string, error) {
	// The last passes, from the end of the file, most often hold every
	// item's last value; when not (an item unrecorded for long, a pass
	// earlier than them), the whole logbook is read.
	const window = 200
	var last map[string]string
	for _, keep := range []int{window, 0} {
		lb, _, err := e.readLogbook(keep)
		if err != nil {
			return nil, err
		}
		before := lb.Passes
		for i, q := range before {
			if !q.Time.Before(t) {
				before = before[:i]
				break
			}
		}
		last = logbook.LastSetup(before, setup)
		if len(last) == len(setup) || len(lb.Passes) < window {
			break
		}
	}
	return last, nil
}

// readLogbookHeld is readLogbook for a caller that holds the logbook's lock
// (held: a last line without its line end is torn).
func (e *Folder) readLogbookHeld(keep int, held bool) (*logbook.Logbook, string, error) {
	f, name, err := e.OpenFile(LogbookFile, e.LogbookPath)
	if errors.Is(err, fs.ErrNotExist) {
		return &logbook.Logbook{}, name, nil
	}
	if err != nil {
		return nil, name, err
	}
	defer f.Close()
	setup := e.Setup()
	if ra, ok := f.(io.ReaderAt); ok && keep > 0 {
		// The recent window, read from the end of the file (see
		// logbook.ReadLast for what that leaves unchecked).
		if st, err := f.Stat(); err == nil && st.Mode().IsRegular() {
			lb, err := logbook.ReadLast(ra, st.Size(), name, e.Zone(), setup, keep)
			if err != nil || lb != nil {
				return lb, name, err
			}
		}
	}
	lb, err := logbook.ReadSetup(f, name, e.Zone(), keep, setup)
	return lb, name, err
}

// Setup is car.yaml's setup items, which type the logbook's columns of
// their names; a car.yaml that cannot be read types none (the command that
// needs the car says why).
func (e *Folder) Setup() logbook.Setup {
	car, err := e.Car()
	if err != nil {
		return nil
	}
	return car.Setup
}

// RecentPasses is how many of the logbook's latest passes a card, a
// prediction or a dial reads, from the end of the file (the rows before them
// are not checked: logbook.ReadLast): far more than a fit uses, far less
// than ten seasons.
const RecentPasses = 5000

// RecentLogbook is Logbook for the commands that only predict: the last
// RecentPasses good passes, read from the end of the file; a bad row is
// named only when it is among them (Logbook, for log list and log stats,
// names every one).
func (e *Folder) RecentLogbook() ([]logbook.Pass, error) { return e.readPasses(RecentPasses) }

// Logbook is the folder's good passes. Rows it could not read come back as
// a *LeftOutRows error beside the passes: the caller uses the passes and
// says what was left out.
func (e *Folder) Logbook() ([]logbook.Pass, error) { return e.readPasses(0) }

func (e *Folder) readPasses(keep int) ([]logbook.Pass, error) {
	lb, name, err := e.readLogbook(keep)
	if err != nil {
		return nil, err
	}
	if len(lb.Bad) > 0 {
		return lb.Passes, e.RowsLeftOut(name, lb.Bad, len(lb.Passes))
	}
	return lb.Passes, nil
}

// BackupOf is the .bak of a file when there is one.
func (e *Folder) BackupOf(name string) string {
	if e.Demo {
		return ""
	}
	bak := name + ".bak"
	if e.LogbookPath == "" {
		bak = e.Path(LogbookFile) + ".bak"
	}
	if _, err := os.Stat(bak); err == nil {
		return bak
	}
	return ""
}

// RowsLeftOut is the error for the rows of the logbook file name that
// could not be read, beside the read good passes, naming its .bak when
// there is one. It does not read the file.
func (e *Folder) RowsLeftOut(name string, rows logbook.RowErrors, read int) *LeftOutRows {
	return &LeftOutRows{file: name, bak: e.BackupOf(name), rows: rows, read: read}
}

// LeftOutRows are the rows of a logbook that could not be read: the rest of
// the logbook is used, and these are named so the crew can fix them.
type LeftOutRows struct {
	file string
	bak  string // the previous version, when there is one
	rows logbook.RowErrors
	read int // the good rows
}

// Error lists the rows left out (the first ten) and how to fix them.
func (l *LeftOutRows) Error() string {
	var b strings.Builder
	fmt.Fprintf(&b, "%s: %s left out (the other %s are used):", l.file, text.Plural(len(l.rows), "row"), text.Plural(l.read, "pass"))
	for i, r := range l.rows {
		if i == 10 {
			fmt.Fprintf(&b, "\n  ... and %d more", len(l.rows)-i)
			break
		}
		b.WriteString("\n  " + r.Error())
	}
	b.WriteString("\nFix the row(s) in a text editor; pitcard keeps them as they are until then")
	if l.bak != "" {
		fmt.Fprintf(&b, " (the version before the last write is %s)", l.bak)
	}
	return b.String()
}

// BadInput marks the rows as the crew's to fix.
func (l *LeftOutRows) BadInput() bool { return true }

// OnlyLeftOut reports whether err is nothing worse than rows left out.
func OnlyLeftOut(err error) bool {
	var l *LeftOutRows
	return err == nil || errors.As(err, &l)
}

// OtherTracks reads tracks/NAME.yaml, the other tracks the logbook names.
func (e *Folder) OtherTracks() (map[string]engine.Track, error) {
	out := map[string]engine.Track{}
	entries, err := fs.ReadDir(e.FS, "tracks")
	if errors.Is(err, fs.ErrNotExist) {
		return out, nil
	}
	if err != nil {
		return nil, err
	}
	for _, de := range entries {
		if de.IsDir() || !strings.HasSuffix(de.Name(), ".yaml") {
			continue
		}
		p := path.Join("tracks", de.Name())
		f, err := e.FS.Open(p)
		if err != nil {
			return nil, err
		}
		t, err := engine.ReadTrack(f, e.Name(p))
		f.Close()
		if err != nil {
			return nil, err
		}
		out[strings.ToLower(t.Name)] = t
	}
	return out, nil
}

// ScheduleFile is the race day's schedule in an event folder.
const ScheduleFile = "schedule.yaml"

// Schedule reads the folder's schedule.yaml, if there is one.
func (e *Folder) Schedule() (prep.Schedule, bool, error) {
	f, err := e.FS.Open(ScheduleFile)
	if errors.Is(err, fs.ErrNotExist) {
		return prep.Schedule{}, false, nil
	}
	if err != nil {
		return prep.Schedule{}, false, err
	}
	defer f.Close()
	s, err := prep.ReadSchedule(f, e.Name(ScheduleFile), e.Zone(), e.Settings.DayStart)
	return s, err == nil, err
}

// ClockFor is the clock of a round: now, or, when schedule.yaml is for
// another race day that the weather log holds, that day at its last reading
// (a race day replayed). A schedule of another day the log lacks is taken
// for today. One clock serves the whole round: the card, the reading, the
// slip. Days are race days (day_starts): past midnight is still the
// evening's day.
func (e *Folder) ClockFor(sched prep.Schedule, haveSched bool, log []weather.Reading, now time.Time) (time.Time, prep.Schedule, []string) {
	start := e.Settings.DayStart
	if !haveSched || e.Demo || sched.Date.Format(weather.DateLayout) == start.Key(now) {
		return now, sched, nil
	}
	var dayEnd *weather.Reading
	for i := range log {
		if start.Key(log[i].Time) == sched.Date.Format(weather.DateLayout) {
			dayEnd = &log[i]
		}
	}
	if dayEnd != nil {
		return dayEnd.Time, sched, []string{fmt.Sprintf("%s is for %s, not today: the round is on that day, its clock at the day's last reading (%s)",
			e.Name(ScheduleFile), sched.Date.Format("2006-01-02"), dayEnd.Time.Format("15:04"))}
	}
	return now, sched.OnDay(now), []string{fmt.Sprintf("%s is dated %s but today is %s: its call times are taken for today (update its date)",
		e.Name(ScheduleFile), sched.Date.Format("2006-01-02"), start.Key(now))}
}

// SameMinute is the error of a reading the weather log already has one in
// the minute of.
type SameMinute struct {
	file string
	Old  weather.Reading
}

// Error names the file and the minute, and the two ways out.
func (s *SameMinute) Error() string {
	return fmt.Sprintf("%s already has a reading at %s: give another --time, or --replace to put this one in its place",
		s.file, s.Old.Time.Format("2006-01-02 15:04"))
}

// BadInput marks the error as the crew's to fix.
func (s *SameMinute) BadInput() bool { return true }

// AppendReading adds a reading to the weather log under its lock, and
// returns how many readings the log holds. A reading in a minute the log
// already has is refused (*SameMinute), or with replace takes its place.
// A reading later than the last is appended (appendReading: constant time
// in the log's size); anything else rewrites the log.
func (e *Folder) AppendReading(r weather.Reading, elev weather.Length, replace bool) (int, error) {
	path := e.Path(WeatherFile)
	unlock, err := safefile.Lock(path)
	if err != nil {
		return 0, err
	}
	defer unlock()
	if target, err := safefile.Resolve(path); err == nil && !e.Demo {
		if n, done := e.appendReading(target, r, elev); done {
			return n, nil
		}
	}
	log, err := e.weatherLog(elev, true)
	if bad := new(weather.BadReadings); errors.As(err, &bad) {
		// Writing the log back would drop the rows that cannot be read.
		return 0, fmt.Errorf("%w\nnothing was written: correct or delete the row(s) named, then add the reading again", err)
	}
	if err != nil {
		return 0, err
	}
	for i, old := range log {
		if old.Time.Truncate(time.Minute).Equal(r.Time.Truncate(time.Minute)) {
			if !replace {
				return 0, &SameMinute{file: e.Name(WeatherFile), Old: old}
			}
			log = append(log[:i], log[i+1:]...)
			break
		}
	}
	log = append(log, r)
	weather.SortLog(log)
	if err := safefile.Write(path, func(w io.Writer) error { return weather.WriteLog(w, log) }); err != nil {
		return 0, err
	}
	if target, err := safefile.Resolve(path); err == nil {
		writeCount(target, len(log), 0)
	}
	return len(log), nil
}

// ReadableWeather is WeatherLog for a command that only reads it: the
// readings that can be read, and apart from them the rows that cannot (nil
// when every row reads), for the command to name; err is a log that cannot
// be read at all. A command that writes the log uses WeatherLog and refuses.
func (e *Folder) ReadableWeather(elev weather.Length) ([]weather.Reading, *weather.BadReadings, error) {
	log, err := e.WeatherLog(elev)
	if bad := new(weather.BadReadings); errors.As(err, &bad) {
		return log, bad, nil
	}
	return log, nil, err
}

// WeatherLog reads the folder's weather.csv (none yet: an empty log).
// A last line without its line end that a writer is appending right now is
// taken as not there yet.
func (e *Folder) WeatherLog(elev weather.Length) ([]weather.Reading, error) {
	return e.weatherLog(elev, false)
}

// weatherLog is WeatherLog; held: the caller holds the log's lock (a last
// line without its line end is torn, and read as it is).
func (e *Folder) weatherLog(elev weather.Length, held bool) ([]weather.Reading, error) {
	data, err := fs.ReadFile(e.FS, WeatherFile)
	if errors.Is(err, fs.ErrNotExist) {
		return nil, nil
	}
	if err != nil {
		return nil, err
	}
	if n := len(data); n > 0 && data[n-1] != '\n' && data[n-1] != '\r' && !held && !e.Demo && !safefile.Torn(e.Path(WeatherFile)) {
		data = data[:bytes.LastIndexByte(data, '\n')+1] // being appended: not there yet
	}
	return weather.ReadLog(bytes.NewReader(data), e.Name(WeatherFile), elev, e.Zone())
}

// Saved is what SaveLogbook did.
type Saved struct {
	// Count is how many passes the logbook holds after the save.
	Count int
	// Kept names the rows of the logbook pitcard cannot read, written back
	// as they were, to be said (nil: none).
	Kept error
}

// SaveLogbook merges passes into the folder's logbook under its lock: all or
// nothing, duplicates refused. Rows of the logbook pitcard cannot read are
// written back as they were (and returned in Saved.Kept, to be said); the crew's
// own columns, the logbook's and those of extra, keep their values.
//
// One pass later than every logged pass, whose columns the file has, is
// appended (appendPass: constant time in the logbook's size); anything else
// reads and rewrites the whole file, keeping the old one as .bak.
func (e *Folder) SaveLogbook(add []logbook.Pass, extra ...string) (Saved, error) {
	var kept error
	path := e.Path(LogbookFile)
	unlock, err := safefile.Lock(path)
	if err != nil {
		return Saved{}, err
	}
	defer unlock()
	if len(add) == 1 && !e.Demo {
		if target, rerr := safefile.Resolve(path); rerr == nil {
			n, done, err := e.appendPass(target, e.Name(LogbookFile), add[0], extra)
			if done {
				return Saved{Count: n}, err
			}
		}
	}
	lb, name, err := e.readLogbookHeld(0, true)
	if err != nil {
		return Saved{}, err
	}
	if len(lb.Bad) > 0 {
		kept = &LeftOutRows{file: name, bak: e.BackupOf(name), rows: lb.Bad, read: len(lb.Passes)}
		if !lb.Kept() {
			return Saved{}, userErrf("%v\nNothing was written: a row that is not even valid CSV (an unmatched quote) could not be kept through a rewrite; fix it first", kept)
		}
	}
	seen := map[string]logbook.Pass{}
	for _, p := range lb.Passes {
		seen[p.Key()] = p
	}
	var dups logbook.RowErrors
	for _, p := range add {
		if o, ok := seen[p.Key()]; ok {
			dups = append(dups, DuplicateOf(p, o, name))
		}
	}
	if len(dups) > 0 {
		return Saved{}, dups
	}
	lb.Passes = append(lb.Passes, add...)
	logbook.SortPasses(lb.Passes)
	for _, x := range extra {
		if !slices.Contains(lb.Extra, x) {
			lb.Extra = append(lb.Extra, x)
		}
	}
	if err := safefile.Write(path, lb.Write); err != nil {
		return Saved{}, err
	}
	if target, err := safefile.Resolve(path); err == nil {
		writeCount(target, len(lb.Passes), len(lb.Bad))
	}
	return Saved{Count: len(lb.Passes), Kept: kept}, nil
}

// DuplicateOf says that p is already in the logbook file named file as o.
func DuplicateOf(p, o logbook.Pass, file string) *weather.InputError {
	where := "this pass"
	if p.Line > 0 {
		where = fmt.Sprintf("line %d", p.Line)
	}
	return &weather.InputError{Field: "pass", Value: p.Time.Format("2006-01-02 15:04") + " " + string(p.Lane),
		Reason: fmt.Sprintf("(%s) is already in %s at line %d: the same pass entered twice", where, file, o.Line)}
}
