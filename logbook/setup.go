package logbook

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"

	"pitcard/internal/csvtext"
	"pitcard/weather"
)

// SetupItem is one of the crew's setup items, as car.yaml's setup: list
// names it: a number with its unit and range (rear tire psi, launch rpm,
// shock clicks, ballast lb), or a choice among named settings (tire set,
// converter, tune). The logbook keeps it as a column of its own, headed by
// its name.
type SetupItem struct {
	// Name is the item's logbook column: lower-case letters, digits and _.
	Name string `yaml:"name"`
	// Unit is a numeric item's unit ("psi", "rpm", "clicks"), for the card.
	Unit string `yaml:"unit"`
	// Range is a numeric item's valid range, [lo, hi] with lo < hi.
	Range []float64 `yaml:"range"`
	// Choices are a choice item's settings; a numeric item has none.
	Choices []string `yaml:"choices"`
	// Expect is what the crew already believes a numeric item is worth, s
	// per unit (+: slower as the value rises), by timer: "et60" for the
	// 60 ft, "et" for the finish. It is the prior of 'pitcard log setup'.
	Expect map[string]float64 `yaml:"expect"`
}

// Numeric reports whether the item is a number (not a choice).
func (s SetupItem) Numeric() bool { return len(s.Choices) == 0 }

// Setup is car.yaml's setup items, in the file's order.
type Setup []SetupItem

// Item is the item named name, and whether there is one.
func (s Setup) Item(name string) (SetupItem, bool) {
	for _, it := range s {
		if it.Name == name {
			return it, true
		}
	}
	return SetupItem{}, false
}

// SetupExpectKeys are the timers an item's expect: may name: the 60 ft and
// the finish.
var SetupExpectKeys = []string{"et60", "et"}

// maxSetupItems bounds car.yaml's setup list (a crew's items, not a table).
const maxSetupItems = 40

// Validate checks the setup list of car.yaml (file names it in messages):
// each name unique, a column pitcard does not already keep, and either a
// unit with a range lo < hi (and expect keys et60 or et) or two or more
// choices. Field names the item's place ("setup[1].range") so the YAML
// reader can put its line on the message.
func (s Setup) Validate(file string) error {
	bad := func(field string, v any, reason string) error {
		return &weather.InputError{File: file, Field: field, Value: fmt.Sprint(v), Reason: reason}
	}
	if len(s) > maxSetupItems {
		return bad("setup", len(s), fmt.Sprintf("items are too many (at most %d)", maxSetupItems))
	}
	seen := map[string]int{}
	for i, it := range s {
		at := fmt.Sprintf("setup[%d]", i)
		if it.Name == "" {
			return bad(at+".name", "", "is missing (the item's logbook column, e.g. rear_psi)")
		}
		if !validSetupName(it.Name) {
			return bad(at+".name", it.Name, "is not a column name (lower-case letters, digits and _, starting with a letter, at most 32)")
		}
		if _, ok := fieldIndex[it.Name]; ok || it.Name == "date" {
			return bad(at+".name", it.Name, "is a column pitcard already keeps (name the item otherwise, e.g. "+it.Name+"_setup)")
		}
		if j, dup := seen[it.Name]; dup {
			return bad(at+".name", it.Name, fmt.Sprintf("is the name of setup[%d] too: each item is named once", j))
		}
		seen[it.Name] = i
		if len(it.Choices) > 0 {
			if len(it.Range) > 0 || it.Unit != "" || len(it.Expect) > 0 {
				return bad(at+".choices", strings.Join(it.Choices, ", "), "are given with a unit, range or expect: an item is a number (unit, range) or a choice (choices), not both")
			}
			if len(it.Choices) < 2 {
				return bad(at+".choices", strings.Join(it.Choices, ", "), "are fewer than two (a choice among two or more settings)")
			}
			for j, c := range it.Choices {
				if strings.TrimSpace(c) != c || c == "" || strings.ContainsAny(c, ",\"\n\r\t") {
					return bad(fmt.Sprintf("%s.choices[%d]", at, j), c, "is not a setting's name (a word or two, no commas, quotes or spaces at its ends)")
				}
				if slices.Index(it.Choices, c) < j {
					return bad(fmt.Sprintf("%s.choices[%d]", at, j), c, "is listed twice")
				}
			}
			continue
		}
		if it.Unit == "" {
			return bad(at+".unit", "", "is missing (a number's unit, e.g. psi, rpm, clicks; or give choices: [...])")
		}
		if len(it.Range) != 2 {
			return bad(at+".range", fmt.Sprint(it.Range), "is not [lo, hi] (the item's valid range, e.g. [6, 40])")
		}
		if !(it.Range[0] < it.Range[1]) {
			return bad(at+".range", fmt.Sprint(it.Range), "is not [lo, hi] with lo below hi")
		}
		for k, v := range it.Expect {
			if !slices.Contains(SetupExpectKeys, k) {
				return bad(at+".expect", k, "is not a timer of expect (et60 for the 60 ft, et for the finish)")
			}
			if per := math.Abs(v) * (it.Range[1] - it.Range[0]); !(per <= 5) {
				return bad(at+".expect."+k, v, fmt.Sprintf("is not an effect in s per %s (over the whole range it moves the time by %.3g s; at most 5)", it.Unit, per))
			}
		}
	}
	return nil
}

func validSetupName(n string) bool {
	if len(n) == 0 || len(n) > 32 || n[0] < 'a' || n[0] > 'z' {
		return false
	}
	for _, r := range n {
		if !(r >= 'a' && r <= 'z' || r >= '0' && r <= '9' || r == '_') {
			return false
		}
	}
	return true
}

// Check reads one cell of the item's column (field names it in messages:
// the column, or the --set flag): a number in the item's range, or one of
// its choices; a blank cell is "not recorded". It returns the cell as the
// logbook keeps it (a number as typed without its unit, a choice as
// car.yaml spells it).
func (s SetupItem) Check(field, v string) (string, error) {
	v = strings.TrimSpace(v)
	if v == "" {
		return "", nil
	}
	if !s.Numeric() {
		for _, c := range s.Choices {
			if strings.EqualFold(c, v) {
				return c, nil
			}
		}
		return "", &weather.InputError{Field: field, Value: v, Reason: "is not one of " + strings.Join(s.Choices, ", ")}
	}
	num := v
	if s.Unit != "" {
		num = strings.TrimSpace(strings.TrimSuffix(strings.TrimSuffix(num, s.Unit), strings.ToLower(s.Unit)))
	}
	x, err := strconv.ParseFloat(num, 64)
	if err != nil || math.IsNaN(x) || math.IsInf(x, 0) || strings.ContainsAny(num, "xXpP_") {
		return "", &weather.InputError{Field: field, Value: v, Reason: fmt.Sprintf("is not a number of %s (e.g. %s)", s.Unit, s.example())}
	}
	if x < s.Range[0] || x > s.Range[1] {
		return "", &weather.InputError{Field: field, Value: v, Reason: fmt.Sprintf("is outside %s..%s %s", fmtNum(s.Range[0]), fmtNum(s.Range[1]), s.Unit)}
	}
	return strconv.FormatFloat(x, 'f', -1, 64), nil
}

func (s SetupItem) example() string { return fmtNum((s.Range[0] + s.Range[1]) / 2) }

func fmtNum(x float64) string { return strconv.FormatFloat(x, 'f', -1, 64) }

// Value is a numeric item's value on pass p, and whether it was recorded
// (and reads as a number).
func (s SetupItem) Value(p Pass) (float64, bool) {
	v, ok := p.Extra[s.Name]
	if !ok || v == "" {
		return 0, false
	}
	x, err := strconv.ParseFloat(v, 64)
	return x, err == nil
}

// ParseSetAssignments reads --set flags ("rear_psi=15.5", one item each)
// against the car's setup: each name an item of car.yaml, each value
// checked as its column is. The result maps a name to the cell the logbook
// keeps; an item given twice is refused.
func ParseSetAssignments(flag string, sets []string, setup Setup) (map[string]string, error) {
	out := map[string]string{}
	for _, s := range sets {
		name, v, ok := strings.Cut(s, "=")
		name = strings.TrimSpace(name)
		if !ok || name == "" {
			return nil, &weather.InputError{Field: flag, Value: s, Reason: "is not NAME=VALUE (e.g. --set rear_psi=15.5)"}
		}
		it, ok := setup.Item(name)
		if !ok {
			names := make([]string, len(setup))
			for i, x := range setup {
				names[i] = x.Name
			}
			reason := "names no setup item of car.yaml (it has none: list them under setup:)"
			if len(names) > 0 {
				reason = "names no setup item of car.yaml (items: " + strings.Join(names, ", ") + ")"
			}
			return nil, &weather.InputError{Field: flag, Value: s, Reason: reason}
		}
		if _, dup := out[name]; dup {
			return nil, &weather.InputError{Field: flag, Value: s, Reason: "gives " + name + " a second time"}
		}
		cell, err := it.Check(flag+" "+name, v)
		if err != nil {
			return nil, err
		}
		if cell == "" {
			return nil, &weather.InputError{Field: flag, Value: s, Reason: "gives " + name + " no value"}
		}
		out[name] = cell
	}
	return out, nil
}

// LastSetup is the latest value of each setup item among passes (in time
// order): what a new pass's setup defaults to. An item never recorded is
// absent.
func LastSetup(passes []Pass, setup Setup) map[string]string {
	out := map[string]string{}
	for i := len(passes) - 1; i >= 0 && len(out) < len(setup); i-- {
		for _, it := range setup {
			if _, done := out[it.Name]; done {
				continue
			}
			if v := passes[i].Extra[it.Name]; v != "" {
				out[it.Name] = v
			}
		}
	}
	return out
}

// setupColumns are the setup items among a file's own columns, by index.
type setupColumn struct {
	item  SetupItem
	index int
}

// checkSetup checks a row's setup cells, and rewrites each as the logbook
// keeps it.
func checkSetup(cols []setupColumn, rec []string) *weather.InputError {
	for _, c := range cols {
		cell, err := c.item.Check(c.item.Name, rec[c.index])
		if err != nil {
			var ie *weather.InputError
			if errors.As(err, &ie) {
				return ie
			}
			// Check gives only InputErrors; another kind is still the cell's fault
			// (its words only: what to check for is the InputError).
			return &weather.InputError{Field: c.item.Name, Value: rec[c.index], Reason: "is not valid: " + err.Error()}
		}
		rec[c.index] = cell
	}
	return nil
}

// WriteWith is Write with the crew's columns extra after logbook.csv's
// (the setup items' among them), each pass's value as it keeps it: an
// export that imports back with its setup.
func WriteWith(w io.Writer, passes []Pass, extra []string) error {
	if len(extra) == 0 {
		return Write(w, passes)
	}
	cw := csv.NewWriter(w)
	cols := writtenColumns(passes)
	if err := cw.Write(append(append([]string(nil), cols...), extra...)); err != nil {
		return err
	}
	for _, p := range passes {
		rec := PassRecord(p)[:len(cols)]
		for i, c := range cols {
			if textColumns[c] {
				rec[i] = csvtext.Cell(rec[i])
			}
		}
		for _, x := range extra {
			rec = append(rec, csvtext.Cell(p.Extra[x]))
		}
		cw.Write(rec)
	}
	cw.Flush()
	return cw.Error()
}
