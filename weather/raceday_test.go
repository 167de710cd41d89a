package weather

import (
	"bytes"
	"strings"
	"testing"
	"time"
)

func chicago(t testing.TB) *time.Location {
	t.Helper()
	loc, err := time.LoadLocation("America/Chicago")
	if err != nil {
		t.Skipf("no zone database: %v", err)
	}
	return loc
}

// The race day: a night's hours before day_starts belong to the day that
// began the evening before (common practice, no source: a race night runs
// past midnight).
func TestRaceDay(t *testing.T) {
	loc := chicago(t)
	at := func(y int, m time.Month, d, h, minute int) time.Time { return time.Date(y, m, d, h, minute, 0, 0, loc) }
	cases := []struct {
		name  string
		start DayStart
		t     time.Time
		want  string
	}{
		{"evening", DefaultDayStart, at(2026, 6, 13, 22, 0), "2026-06-13"},
		{"after midnight", DefaultDayStart, at(2026, 6, 14, 0, 10), "2026-06-13"},
		{"just before the start", DefaultDayStart, at(2026, 6, 14, 5, 59), "2026-06-13"},
		{"at the start", DefaultDayStart, at(2026, 6, 14, 6, 0), "2026-06-14"},
		{"across a month", DefaultDayStart, at(2026, 7, 1, 1, 0), "2026-06-30"},
		{"across a year", DefaultDayStart, at(2027, 1, 1, 2, 0), "2026-12-31"},
		{"midnight start is the calendar", 0, at(2026, 6, 14, 0, 10), "2026-06-14"},
		{"spring-forward night", DefaultDayStart, at(2026, 3, 8, 3, 30), "2026-03-07"},
		{"fall-back night, second 01:30", DefaultDayStart, at(2026, 11, 1, 1, 30).Add(time.Hour), "2026-10-31"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			if got := tc.start.Key(tc.t); got != tc.want {
				t.Errorf("race day of %v = %s, want %s", tc.t, got, tc.want)
			}
			if d := tc.start.Day(tc.t); d.Hour() != 0 || d.Location() != loc {
				t.Errorf("Day = %v, want local midnight", d)
			}
		})
	}
	if !DefaultDayStart.Same(at(2026, 6, 13, 15, 10), at(2026, 6, 14, 0, 24)) {
		t.Error("15:10 and 00:24 the next calendar day are one race day")
	}
}

// A time of day on a race day: before the start it is the next calendar date.
func TestRaceDayClock(t *testing.T) {
	loc := chicago(t)
	day := time.Date(2026, 6, 13, 0, 0, 0, 0, loc)
	cases := []struct {
		clock string
		ref   time.Time
		want  time.Time
	}{
		{"20:45", day, time.Date(2026, 6, 13, 20, 45, 0, 0, loc)},
		{"00:15", day, time.Date(2026, 6, 14, 0, 15, 0, 0, loc)},
		{"00:15", DefaultDayStart.Day(time.Date(2026, 6, 14, 0, 24, 0, 0, loc)), time.Date(2026, 6, 14, 0, 15, 0, 0, loc)}, // the race day of a clock after midnight
		{"23:50", DefaultDayStart.Day(time.Date(2026, 6, 14, 0, 24, 0, 0, loc)), time.Date(2026, 6, 13, 23, 50, 0, 0, loc)},
		{"06:00", day, time.Date(2026, 6, 13, 6, 0, 0, 0, loc)},
		{"05:59:30", day, time.Date(2026, 6, 14, 5, 59, 30, 0, loc)},
	}
	for _, tc := range cases {
		t.Run(tc.clock+" from "+tc.ref.Format("01-02 15:04"), func(t *testing.T) {
			got, err := DefaultDayStart.Clock(tc.clock, tc.ref, loc)
			if err != nil || !got.Equal(tc.want) {
				t.Errorf("got %v, %v; want %v", got, err, tc.want)
			}
		})
	}
}

func TestParseDayStart(t *testing.T) {
	for _, tc := range []struct {
		in   string
		want DayStart
		err  string
	}{
		{"06:00", DefaultDayStart, ""}, {"0:00", 0, ""}, {"12:00", DayStart(12 * time.Hour), ""},
		{"04:30", DayStart(4*time.Hour + 30*time.Minute), ""},
		{"12:01", 0, "outside 00:00..12:00"}, {"18:00", 0, "outside 00:00..12:00"}, {"six", 0, "not a time of day"}, {"25:00", 0, "not a time of day"},
	} {
		t.Run(tc.in, func(t *testing.T) {
			got, err := ParseDayStart(tc.in)
			if tc.err != "" {
				if err == nil || !strings.Contains(err.Error(), tc.err) || !strings.Contains(err.Error(), "day_starts") {
					t.Errorf("ParseDayStart(%q) = %v, %v; want an error saying %q", tc.in, got, err, tc.err)
				}
				return
			}
			if err != nil || got != tc.want || got.String() != (time.Time{}).Add(time.Duration(tc.want)).Format("15:04") {
				t.Errorf("ParseDayStart(%q) = %v (%s), %v", tc.in, time.Duration(got), got, err)
			}
		})
	}
}

// Daylight saving (America/Chicago 2026: clocks from 02:00 CST to 03:00 CDT
// on March 8, from 02:00 CDT back to 01:00 CST on November 1; tz database):
// a skipped time is refused, never moved an hour; a repeated one is its first.
func TestLocalTimeAcrossDaylightSaving(t *testing.T) {
	loc := chicago(t)
	spring := time.Date(2026, 3, 8, 0, 0, 0, 0, loc)
	for _, clock := range []string{"02:00", "02:30", "02:59"} {
		t.Run("skipped "+clock, func(t *testing.T) {
			got, err := ParseClock(clock, spring, loc)
			want := `time "` + clock + `" on 2026-03-08 does not exist in America/Chicago: clocks went from 02:00 to 03:00`
			if err == nil || err.Error() != want {
				t.Errorf("ParseClock(%s) = %v, %v; want the error %q", clock, got, err, want)
			}
			if _, err := DefaultDayStart.Clock(clock, time.Date(2026, 3, 7, 20, 0, 0, 0, loc), loc); err == nil {
				t.Errorf("Clock(%s) on the race night accepted it", clock)
			}
		})
	}
	for _, tc := range []struct {
		clock string
		want  time.Time
	}{
		{"01:59", time.Date(2026, 3, 8, 7, 59, 0, 0, time.UTC)},
		{"03:00", time.Date(2026, 3, 8, 8, 0, 0, 0, time.UTC)},
	} {
		t.Run(tc.clock, func(t *testing.T) {
			if got, err := ParseClock(tc.clock, spring, loc); err != nil || !got.Equal(tc.want) {
				t.Errorf("ParseClock(%s) = %v, %v; want %v", tc.clock, got, err, tc.want)
			}
		})
	}
	fall := time.Date(2026, 11, 1, 0, 0, 0, 0, loc)
	got, err := ParseClock("01:30", fall, loc)
	if want := time.Date(2026, 11, 1, 6, 30, 0, 0, time.UTC); err != nil || !got.Equal(want) {
		t.Errorf("01:30 on the fall-back night = %v, %v; want its first occurrence %v (CDT)", got, err, want)
	}
}

// A weather log with a time the clocks skipped is refused at its line, not
// read an hour early and written back so; a log across the fall-back hour
// is written back as it was.
func TestWeatherLogAcrossDaylightSaving(t *testing.T) {
	loc := chicago(t)
	head := "date,time,temp_f,baro_inhg,baro_kind,humidity_pct,dewpoint_f,wind_mph,wind_from_deg,track_temp_f,notes\n"
	bad := head + "2026-03-08,01:45:00,51,29.1,station,60,,0,0,,\n2026-03-08,02:30:00,50,29.1,station,61,,0,0,,\n"
	_, err := ReadLog(strings.NewReader(bad), "weather.csv", Feet(600), loc)
	if err == nil || !strings.Contains(err.Error(), "weather.csv line 3") || !strings.Contains(err.Error(), "does not exist in America/Chicago") {
		t.Errorf("a skipped time in weather.csv: %v", err)
	}
	good := head + "2026-11-01,00:50:00,51,29.1,station,60,,0,0,,\n2026-11-01,01:30:00,50,29.1,station,61,,0,0,,\n2026-11-01,03:10:00,49,29.1,station,62,,0,0,,\n"
	log, err := ReadLog(strings.NewReader(good), "weather.csv", Feet(600), loc)
	if err != nil {
		t.Fatal(err)
	}
	var b bytes.Buffer
	if err := WriteLog(&b, log); err != nil {
		t.Fatal(err)
	}
	if b.String() != good {
		t.Errorf("written back:\n%s\nwant:\n%s", b.String(), good)
	}
}
