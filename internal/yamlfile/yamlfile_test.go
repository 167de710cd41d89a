package yamlfile

import (
	"strings"
	"testing"
)

type track struct {
	Name        string  `yaml:"name"`
	ElevationFt float64 `yaml:"elevation_ft"`
}

// Every case is a file a crew could write; the message must carry the file,
// the line and the key in words (YAML 1.2 spells non-finite floats .nan and
// .inf: YAML Ain't Markup Language 1.2.2, section 10.2.1.4).
func TestParseRefusesAndExplains(t *testing.T) {
	cases := []struct {
		yaml string
		want []string
	}{
		{"name: X\nlimit_et: .nan\n", []string{"car.yaml line 2", "limit_et", ".nan", "not a finite number"}},
		{"name: X\nmine:\n  top: -.inf\n", []string{"car.yaml line 3", "mine.top", "-.inf"}},
		{"name: X\nlist: [1, .Inf]\n", []string{"car.yaml line 2", "list[1]"}},
		{"name: X\nlimit_mph: 1e308\n", []string{"car.yaml line 2", "limit_mph", "far beyond"}},
		{"name: X\n  bad: indent\n", []string{"car.yaml line 2", "not valid YAML"}},
	}
	for _, tc := range cases {
		t.Run(tc.want[1], func(t *testing.T) {
			_, err := Parse([]byte(tc.yaml), "car.yaml")
			if err == nil {
				t.Errorf("%q: accepted", tc.yaml)
				return
			}
			for _, w := range tc.want {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("%q: %q lacks %q", tc.yaml, err, w)
				}
			}
		})
	}
	// quoted ".nan" is text the crew wrote on purpose
	if _, err := Parse([]byte("note: \".nan\"\n"), "car.yaml"); err != nil {
		t.Errorf("a quoted .nan was refused: %v", err)
	}
}

func TestYesNoIsPointedOut(t *testing.T) {
	d, err := Parse([]byte("name: X\nchute: yes\nbelts: true\nlabel: \"no\"\n"), "car.yaml")
	if err != nil {
		t.Fatal(err)
	}
	if len(d.Warnings) != 1 || !strings.Contains(d.Warnings[0], "car.yaml line 2: chute: yes is read as the text") ||
		!strings.Contains(d.Warnings[0], "true or false") {
		t.Errorf("warnings %q", d.Warnings)
	}
}

// YAML's own messages name Go types ("field surface not found in type
// engine.Track"); these say the key, the line and the keys the file holds.
func TestDecodeSpeaksPlainly(t *testing.T) {
	for _, tc := range []struct {
		yaml string
		want []string
		not  string
	}{
		{"name: X\nsurface: concrete\n", []string{"track.yaml line 2", "surface", "not a key of this file", "elevation_ft, name"}, "type"},
		{"name: X\nelevation_ft: high\n", []string{"track.yaml line 2", "elevation_ft", "high", "is not a number"}, "float64"},
	} {
		t.Run(tc.want[1], func(t *testing.T) {
			d, err := Parse([]byte(tc.yaml), "track.yaml")
			if err != nil {
				t.Fatal(err)
			}
			var v track
			err = d.Decode(&v, true)
			if err == nil {
				t.Errorf("%q decoded", tc.yaml)
				return
			}
			for _, w := range tc.want {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("%q lacks %q", err, w)
				}
			}
			if strings.Contains(err.Error(), tc.not) {
				t.Errorf("%q speaks Go: %q", err, tc.not)
			}
		})
	}
}

func FuzzParse(f *testing.F) {
	for _, s := range []string{"name: X\n", "a: .nan\n", "a: [1, 2]\nb: {c: yes}\n", "x: &a 1\ny: *a\n"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		d, err := Parse([]byte(s), "f.yaml")
		if err != nil {
			if !strings.Contains(err.Error(), "f.yaml") {
				t.Errorf("error without the file: %v", err)
			}
			return
		}
		var m map[string]any
		_ = d.Decode(&m, false)
	})
}
