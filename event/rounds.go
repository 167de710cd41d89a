package event

import (
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"slices"
	"strings"
	"time"

	"github.com/shopspring/decimal"

	"pitcard/internal/safefile"
	"pitcard/logbook"
	"pitcard/weather"
)

// RoundsFile keeps what the crew notes for a round before it runs: the other
// lane's dial as it is learnt in the staging lanes, and the checklist items
// ticked. The card reads it (the command line's and the page's alike), so a
// dial entered on a phone is the one the laptop's card races against.
const RoundsFile = "rounds.csv"

var roundsHeader = []string{"date", "session", "entry", "value", "at"}

const (
	entryOpponentDial = "opponent_dial"
	entryOpponentCar  = "opponent_car"
	entryChecked      = "checked"
	// entrySetup is one planned setup item, "name=value" (the pit page's
	// planned setup form; card --set gives the same on the command line).
	entrySetup = "setup"
)

// RoundNotes are a round's notes: the other lane's dial (or none) and the
// checklist items ticked, by label, with when.
type RoundNotes struct {
	OpponentDial decimal.NullDecimal
	// OpponentCar is the other car named on the pit page ("" none).
	OpponentCar string
	Ticked      map[string]time.Time
	// Setup is the planned setup noted for the round, "name=value" each
	// (the pit page's setup form), in the order noted.
	Setup []string
}

type roundEntry struct {
	date, session, entry, value string
	at                          time.Time
}

// readRounds reads rounds.csv (none yet: no entries).
func (e *Folder) readRounds() ([]roundEntry, error) {
	data, err := fs.ReadFile(e.FS, RoundsFile)
	if errors.Is(err, fs.ErrNotExist) {
		return nil, nil
	}
	if err != nil {
		return nil, err
	}
	name := e.Name(RoundsFile)
	r, head, err := weather.OpenCSV(bytes.NewReader(bytes.TrimPrefix(data, []byte("\xef\xbb\xbf"))), name)
	if err != nil || head == nil {
		return nil, err
	}
	if !slices.Equal(head, roundsHeader) {
		return nil, userErrf("%s line 1: the header is not %s (fix or delete the file: it holds only the checklist ticks and the other lane's dials)",
			name, strings.Join(roundsHeader, ","))
	}
	var out []roundEntry
	for {
		rec, err := r.Read()
		if err == io.EOF {
			return out, nil
		}
		if err != nil {
			return nil, weather.CSVError(name, err)
		}
		if len(rec) != len(roundsHeader) {
			line, _ := r.FieldPos(0)
			return nil, &weather.InputError{File: name, Line: line, Field: "row", Reason: fmt.Sprintf("has %d fields, the header has %d", len(rec), len(roundsHeader))}
		}
		line, _ := r.FieldPos(0)
		at, err := time.ParseInLocation(time.RFC3339, rec[4], time.Local)
		if err != nil {
			return nil, &weather.InputError{File: name, Line: line, Field: "at", Value: rec[4], Reason: "is not a time as 2006-01-02T15:04:05-07:00"}
		}
		if !slices.Contains([]string{entryOpponentDial, entryOpponentCar, entryChecked, entrySetup}, rec[2]) {
			return nil, &weather.InputError{File: name, Line: line, Field: "entry", Value: rec[2], Reason: "is not opponent_dial, opponent_car, checked or setup"}
		}
		out = append(out, roundEntry{date: rec[0], session: rec[1], entry: rec[2], value: rec[3], at: at})
	}
}

// RoundNotes are the notes of one round: session ses on date (YYYY-MM-DD).
func (e *Folder) RoundNotes(date string, ses logbook.Session) (RoundNotes, error) {
	n := RoundNotes{Ticked: map[string]time.Time{}}
	entries, err := e.readRounds()
	if err != nil {
		return n, err
	}
	for _, x := range entries {
		if x.date != date || x.session != ses.String() {
			continue
		}
		switch x.entry {
		case entryOpponentDial:
			if d, err := decimal.NewFromString(x.value); err == nil {
				n.OpponentDial = decimal.NewNullDecimal(d)
			}
		case entryOpponentCar:
			n.OpponentCar = x.value
		case entryChecked:
			n.Ticked[x.value] = x.at
		case entrySetup:
			n.Setup = append(n.Setup, x.value)
		}
	}
	return n, nil
}

// SetOpponentDial notes the other lane's dial for a round ("" clears it).
func (e *Folder) SetOpponentDial(date string, ses logbook.Session, dial string, now time.Time) error {
	value := ""
	if strings.TrimSpace(dial) != "" {
		d, err := logbook.ParseSeconds("--opponent-dial", dial)
		if err != nil {
			return err
		}
		if err := RangeErr("--opponent-dial", d, logbook.DialRange); err != nil {
			return err
		}
		value = d.String()
	}
	return e.editRounds(func(es []roundEntry) []roundEntry {
		es = slices.DeleteFunc(es, func(x roundEntry) bool {
			return x.date == date && x.session == ses.String() && x.entry == entryOpponentDial
		})
		if value != "" {
			es = append(es, roundEntry{date, ses.String(), entryOpponentDial, value, now})
		}
		return es
	})
}

// SetOpponentCar notes the other car of a round, by its number or name
// (--opponent; "" clears it): the card races against its history.
func (e *Folder) SetOpponentCar(date string, ses logbook.Session, car string, now time.Time) error {
	value := ""
	if strings.TrimSpace(car) != "" {
		c, err := ParseCar("--opponent", car)
		if err != nil {
			return err
		}
		value = c
	}
	// Unchanged (most often: no car named, none noted): nothing written.
	if n, err := e.RoundNotes(date, ses); err == nil && n.OpponentCar == value {
		return nil
	}
	return e.editRounds(func(es []roundEntry) []roundEntry {
		es = slices.DeleteFunc(es, func(x roundEntry) bool {
			return x.date == date && x.session == ses.String() && x.entry == entryOpponentCar
		})
		if value != "" {
			es = append(es, roundEntry{date, ses.String(), entryOpponentCar, value, now})
		}
		return es
	})
}

// SetPlannedSetup notes the planned setup of a round: sets are "name=value"
// for items of the car's setup, each checked as --set checks it (a blank
// value drops the item: the card then plans the last pass's). It replaces
// what was noted before for the round; nothing is written when nothing
// changed.
func (e *Folder) SetPlannedSetup(date string, ses logbook.Session, sets []string, setup logbook.Setup, now time.Time) error {
	var given []string
	for _, s := range sets {
		if name, v, ok := strings.Cut(s, "="); !ok || strings.TrimSpace(v) != "" || strings.TrimSpace(name) == "" {
			given = append(given, s)
		}
	}
	planned, err := logbook.ParseSetAssignments("--set", given, setup)
	if err != nil {
		return err
	}
	var values []string
	for _, it := range setup { // car.yaml's order
		if v, ok := planned[it.Name]; ok {
			values = append(values, it.Name+"="+v)
		}
	}
	if n, err := e.RoundNotes(date, ses); err == nil && slices.Equal(n.Setup, values) {
		return nil
	}
	return e.editRounds(func(es []roundEntry) []roundEntry {
		es = slices.DeleteFunc(es, func(x roundEntry) bool {
			return x.date == date && x.session == ses.String() && x.entry == entrySetup
		})
		for _, v := range values {
			es = append(es, roundEntry{date, ses.String(), entrySetup, v, now})
		}
		return es
	})
}

// SetTicks makes the round's ticked checklist items exactly ticked; an item
// already ticked keeps the time it was ticked.
func (e *Folder) SetTicks(date string, ses logbook.Session, ticked []string, now time.Time) error {
	for _, t := range ticked {
		if len(t) > 200 {
			return &weather.InputError{Field: "checklist item", Value: t, Reason: "is longer than 200 characters"}
		}
	}
	return e.editRounds(func(es []roundEntry) []roundEntry {
		had := map[string]time.Time{}
		es = slices.DeleteFunc(es, func(x roundEntry) bool {
			mine := x.date == date && x.session == ses.String() && x.entry == entryChecked
			if mine {
				had[x.value] = x.at
			}
			return mine
		})
		seen := map[string]bool{} // a label sent twice is ticked once
		for _, t := range ticked {
			if seen[t] {
				continue
			}
			seen[t] = true
			at, ok := had[t]
			if !ok {
				at = now
			}
			es = append(es, roundEntry{date, ses.String(), entryChecked, t, at})
		}
		return es
	})
}

// editRounds rewrites rounds.csv under its lock, atomically.
func (e *Folder) editRounds(edit func([]roundEntry) []roundEntry) error {
	if err := e.Writable(); err != nil {
		return err
	}
	path := e.Path(RoundsFile)
	unlock, err := safefile.Lock(path)
	if err != nil {
		return err
	}
	defer unlock()
	entries, err := e.readRounds()
	if err != nil {
		return err
	}
	entries = edit(entries)
	return safefile.Write(path, func(w io.Writer) error {
		cw := csv.NewWriter(w)
		_ = cw.Write(roundsHeader)
		for _, x := range entries {
			_ = cw.Write([]string{x.date, x.session, x.entry, x.value, x.at.Format(time.RFC3339)})
		}
		cw.Flush()
		if err := cw.Error(); err != nil {
			return fmt.Errorf("writing %s: %w", e.Name(RoundsFile), err)
		}
		return nil
	})
}
