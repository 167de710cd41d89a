package weather

import (
	"fmt"
	"strings"
	"time"
)

// DayStart is the time of day a race day begins, as a duration since local
// midnight. A race night runs past midnight: the hours before DayStart
// belong to the race day that began the evening before, so a round called
// at 00:15, a reading at 00:10 and the evening's passes are one day for the
// schedule, the weather log's forecast, the model's "today" and the age of a
// reading. Zero is midnight (the calendar day). Valid range 00:00..12:00
// (DayStartRange); ParseDayStart refuses anything outside.
type DayStart time.Duration

// DefaultDayStart is the setting day_starts' default: 06:00. Sessions run
// from the morning into the small hours, and no session is called between
// the small hours and dawn (common practice, no source).
const DefaultDayStart = DayStart(6 * time.Hour)

// DayStartRange is the range of DayStart: a start after noon would split an
// afternoon's sessions between two race days.
var DayStartRange = [2]DayStart{0, DayStart(12 * time.Hour)}

// ParseDayStart reads a race day's start, "06:00" (24-hour HH:MM), within
// DayStartRange.
func ParseDayStart(s string) (DayStart, error) {
	t, err := time.Parse("15:04", strings.TrimSpace(s))
	if err != nil {
		return 0, inputErr("day_starts", s, "is not a time of day (use 24-hour HH:MM, e.g. 06:00)")
	}
	d := DayStart(time.Duration(t.Hour())*time.Hour + time.Duration(t.Minute())*time.Minute)
	if d < DayStartRange[0] || d > DayStartRange[1] {
		return 0, inputErr("day_starts", s, "is outside 00:00..12:00")
	}
	return d, nil
}

// String is s as HH:MM.
func (s DayStart) String() string {
	d := time.Duration(s)
	return fmt.Sprintf("%02d:%02d", int(d.Hours()), int(d.Minutes())%60)
}

// Day is the race day t belongs to: local midnight, in t's zone, of the
// calendar date the race day began on. It is read from t's wall clock, so a
// daylight-saving change in the night moves no reading to another day.
func (s DayStart) Day(t time.Time) time.Time {
	y, m, d := t.Date()
	wall := time.Duration(t.Hour())*time.Hour + time.Duration(t.Minute())*time.Minute + time.Duration(t.Second())*time.Second
	if wall < time.Duration(s) {
		d-- // time.Date normalizes day 0 to the month before
	}
	return time.Date(y, m, d, 0, 0, 0, 0, t.Location())
}

// Key is the race day of t as YYYY-MM-DD (DateLayout), for grouping.
func (s DayStart) Key(t time.Time) string { return s.Day(t).Format(DateLayout) }

// Same reports whether a and b are on the same race day.
func (s DayStart) Same(a, b time.Time) bool { return s.Key(a) == s.Key(b) }

// Clock reads a time of day, "00:15" or "21:40:30", on the race day that
// began on day's date in loc (a schedule's date; Day(t) for the race day of
// an instant t): a time before the day's start is on the next calendar date
// (a round called after midnight). A local time that does not exist (skipped
// by a daylight-saving change) is refused; see LocalTime.
func (s DayStart) Clock(text string, day time.Time, loc *time.Location) (time.Time, error) {
	h, m, sec, err := parseClock(text)
	if err != nil {
		return time.Time{}, err
	}
	y, mo, d := day.In(loc).Date()
	date := time.Date(y, mo, d, 0, 0, 0, 0, time.UTC) // only the date: no zone's midnight in the way
	if time.Duration(h)*time.Hour+time.Duration(m)*time.Minute+time.Duration(sec)*time.Second < time.Duration(s) {
		date = date.AddDate(0, 0, 1)
	}
	y, mo, d = date.Date()
	return LocalTime(y, mo, d, h, m, sec, loc, text)
}

// LocalTime is the instant of a wall-clock time in loc (the date a real
// one, the time within 00:00..23:59:59); text is the time as typed, for the
// message. A time a daylight-saving change skips (02:30 on a
// spring-forward night) is an *InputError saying so, never moved an hour
// (time.Date would). A time the fall-back hour repeats (01:30 twice) is its
// first occurrence, the one before the clocks go back: a logged time reads
// back as the same instant every time.
func LocalTime(y int, mo time.Month, d, h, m, sec int, loc *time.Location, text string) (time.Time, error) {
	t := time.Date(y, mo, d, h, m, sec, 0, loc)
	if t.Hour() != h || t.Minute() != m || t.Second() != sec {
		return time.Time{}, inputErr("time", text, "%s", skipped(t, loc))
	}
	// The repeated hour: an earlier instant with the same wall clock is the
	// first occurrence (a shift is an hour, or half an hour in a few zones).
	for _, back := range []time.Duration{time.Hour, 30 * time.Minute} {
		if e := t.Add(-back); e.Hour() == h && e.Minute() == m && e.Second() == sec && e.Day() == d {
			return e, nil
		}
	}
	return t, nil
}

// skipped says which local times a daylight-saving change skipped around
// t, time.Date's normalization of a wall clock that does not exist.
func skipped(t time.Time, loc *time.Location) string {
	start, end := t.ZoneBounds()
	change := end
	if end.IsZero() || t.Add(3*time.Hour).Before(end) {
		change = start // time.Date moved the time past the change
	}
	_, before := change.Add(-time.Second).Zone()
	from := change.In(time.FixedZone("", before)).Format("15:04")
	zone := loc.String()
	if zone == "Local" || zone == "" {
		zone = "the local time zone"
	}
	return fmt.Sprintf("on %s does not exist in %s: clocks went from %s to %s",
		change.In(loc).Format(DateLayout), zone, from, change.In(loc).Format("15:04"))
}

// parseClock reads "21:40" or "21:40:30".
func parseClock(s string) (h, m, sec int, err error) {
	for _, layout := range []string{"15:04", "15:04:05"} {
		if t, err := time.Parse(layout, strings.TrimSpace(s)); err == nil {
			return t.Hour(), t.Minute(), t.Second(), nil
		}
	}
	return 0, 0, 0, inputErr("time", s, "is not a time of day (use 24-hour HH:MM, e.g. 21:40)")
}
