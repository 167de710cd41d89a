package entry

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"strings"
	"time"

	"pitcard/event"
	"pitcard/weather"
)

// Readings from a stream: a logging script or a serial-port reader piping
// into 'pitcard weather add -', one reading per line, as the flags
// (temp=88F baro=28.92inHg humidity=40%) or as CSV rows under a header in
// weather.csv's columns.

// streamKeys are the keys a line may give: the flags of 'weather add'.
var streamKeys = []string{"temp", "baro", "baro-kind", "humidity", "dewpoint", "wind", "wind-from", "track-temp", "time", "notes"}

// ParseReadingLine reads one key=value line into a reading as typed. A
// value with spaces is written in double quotes (notes="shade on the line").
func ParseReadingLine(line string) (NewReading, error) {
	var nr NewReading
	f := &nr.Fields
	fields := map[string]*string{"temp": &f.Temp, "baro": &f.Baro, "baro-kind": &f.BaroKind, "humidity": &f.Humidity,
		"dewpoint": &f.DewPoint, "wind": &f.Wind, "wind-from": &f.WindFrom, "track-temp": &f.TrackTemp,
		"time": &nr.Time, "notes": &nr.Notes}
	seen := map[string]bool{}
	rest := strings.TrimSpace(line)
	for rest != "" {
		eq := strings.IndexByte(rest, '=')
		if eq <= 0 {
			word, _, _ := strings.Cut(rest, " ")
			return nr, &weather.InputError{Field: "line", Value: word, Reason: "is not key=value (keys: " + strings.Join(streamKeys, ", ") + ")"}
		}
		key := strings.ToLower(strings.TrimSpace(rest[:eq]))
		rest = rest[eq+1:]
		var val string
		if strings.HasPrefix(rest, `"`) {
			end := strings.IndexByte(rest[1:], '"')
			if end < 0 {
				return nr, &weather.InputError{Field: key, Value: rest, Reason: "has an opening quote without its closing one"}
			}
			val, rest = rest[1:1+end], rest[2+end:]
		} else {
			val, rest, _ = strings.Cut(rest, " ")
		}
		rest = strings.TrimSpace(rest)
		if strings.TrimSpace(val) == "" {
			return nr, &weather.InputError{Field: key, Reason: "has no value (write key=value with no space after =)"}
		}
		if seen[key] {
			return nr, &weather.InputError{Field: key, Value: val, Reason: "is given twice on the line"}
		}
		seen[key] = true
		dst := fields[key]
		if dst == nil {
			return nr, &weather.InputError{Field: "key", Value: key, Reason: "is not a key of a reading (keys: " + strings.Join(streamKeys, ", ") + ")"}
		}
		*dst = val
	}
	if !seen["temp"] && !seen["baro"] {
		return nr, &weather.InputError{Field: "line", Value: line, Reason: "has no temp= nor baro=: not a reading"}
	}
	return nr, nil
}

// StreamLine is what became of one line of a stream.
type StreamLine struct {
	Line  int
	Added *AddedReading
	Err   error
}

// StreamReadings reads readings from r, one a line, and writes each to the
// weather log as it comes (blank lines and # comments are passed over). Each
// line's outcome goes to report; a bad line is reported and skipped. It
// returns how many lines were bad. now is the clock of a line without time=;
// with replace, a reading in a minute already logged takes its place (a
// logger reading every few seconds keeps the minute's latest).
func StreamReadings(e *event.Folder, r io.Reader, now func() time.Time, replace bool, report func(StreamLine)) (bad int, err error) {
	lr := lineReader{br: bufio.NewReader(r)}
	var header string
	var elev weather.Length // the track's, once rows come as CSV
	n := 0
	for {
		raw, over, rerr := lr.next()
		if rerr != nil && !errors.Is(rerr, io.EOF) {
			return bad, fmt.Errorf("reading standard input: %w", rerr)
		}
		if errors.Is(rerr, io.EOF) && raw == nil && over == 0 {
			break
		}
		n++
		var out StreamLine
		out.Line = n
		if over > 0 {
			// Never echo it: a runaway logger's line can be megabytes.
			out.Err = &weather.InputError{File: "standard input", Line: n, Field: "line",
				Reason: fmt.Sprintf("of %d bytes is longer than %d KB, the most a reading's line may be", over, maxStreamLine>>10)}
			bad++
			report(out)
			continue
		}
		line := strings.TrimSpace(strings.TrimPrefix(string(raw), "\ufeff"))
		if line == "" || strings.HasPrefix(line, "#") {
			continue
		}
		switch {
		case header == "" && !strings.Contains(line, "=") && strings.Contains(line, ","):
			header = line // CSV rows follow, in weather.csv's columns
			if elev, _, err = SiteElevation(e, ReadingFields{}); err != nil {
				return bad, err
			}
			if _, err := weather.ReadLog(strings.NewReader(header+"\n"), "standard input", 0, e.Zone()); err != nil {
				var ie *weather.InputError
				if errors.As(err, &ie) {
					ie.Line = n
				}
				return bad + 1, err
			}
			continue
		case header != "":
			log, rerr := weather.ReadLog(strings.NewReader(header+"\n"+line+"\n"), "standard input", elev, e.Zone())
			if rerr == nil && len(log) == 1 {
				var n int
				if n, rerr = e.AppendReading(log[0], elev, replace); rerr == nil {
					out.Added = &AddedReading{Reading: log[0], Elevation: elev, Count: n}
				}
			}
			out.Err = rerr
		default:
			nr, perr := ParseReadingLine(line)
			nr.Replace = replace
			if perr == nil {
				var a AddedReading
				if a, perr = AddReading(e, nr, now()); perr == nil {
					out.Added = &a
				}
			}
			out.Err = perr
		}
		if out.Err != nil {
			var ie *weather.InputError
			if errors.As(out.Err, &ie) {
				ie.File, ie.Line = "standard input", n
				ie.Field = strings.TrimPrefix(ie.Field, "--") // the line's key, not a flag
			}
			if !event.IsBadInput(out.Err) {
				return bad, out.Err // a failing disk: stop, the rest would fail too
			}
			bad++
		}
		report(out)
	}
	return bad, nil
}

// maxStreamLine is the longest line of a stream read as a reading: a
// reading's line is under 200 bytes, so 64 KB is only ever a logger gone wrong.
const maxStreamLine = 64 << 10

// lineReader reads a stream's lines ended by LF, CRLF or a bare CR (old
// loggers and spreadsheets end lines with CR alone). It never waits for the
// byte after a CR, so a CR-only logger's line is read as it arrives.
type lineReader struct {
	br     *bufio.Reader
	lastCR bool // the last line ended with CR: an LF right after it is its CRLF's
}

// next returns the next line without its ending. A line longer than
// maxStreamLine is read to its end and dropped: line is nil and over is its
// length. At the end of the stream err is io.EOF (with the last line, if it
// had no ending).
func (l *lineReader) next() (line []byte, over int, err error) {
	var buf []byte
	n := 0
	for {
		c, err := l.br.ReadByte()
		if err != nil {
			if n > maxStreamLine {
				return nil, n, err
			}
			if n == 0 {
				return nil, 0, err
			}
			return buf, 0, err
		}
		if c == '\n' && l.lastCR && n == 0 {
			l.lastCR = false
			continue
		}
		l.lastCR = false
		if c == '\n' || c == '\r' {
			l.lastCR = c == '\r'
			if n > maxStreamLine {
				return nil, n, nil
			}
			return buf, 0, nil
		}
		n++
		if n <= maxStreamLine {
			buf = append(buf, c)
		}
	}
}
