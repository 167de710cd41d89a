package engine

import (
	"strings"
	"testing"
)

const setupCarHead = "weight_lb: 3350\npower_hp: 520\ninduction: natural\ndistance_ft: 1320\n"

// car.yaml's setup list: read, and each bad item refused with the file, the
// line, the field, the value and the valid form (pitcard's own rules, no
// outside source).
func TestReadCarSetup(t *testing.T) {
	c, err := ReadCar(strings.NewReader(setupCarHead+`setup:
  - {name: rear_psi, unit: psi, range: [6, 40], expect: {et60: 0.010}}
  - {name: launch_rpm, unit: rpm, range: [1000, 9000]}
  - {name: converter, choices: [stock, 5400-stall]}
`), "car.yaml")
	if err != nil {
		t.Fatal(err)
	}
	if len(c.Setup) != 3 || c.Setup[0].Expect["et60"] != 0.010 || c.Setup[1].Range[1] != 9000 || c.Setup[2].Numeric() {
		t.Fatalf("setup read as %+v", c.Setup)
	}
	if _, ok := c.Extra["setup"]; ok {
		t.Error("setup: is a key pitcard reads, not a crew key for the rules' car.extra")
	}
	cases := []struct {
		name, setup string
		want        []string
	}{
		{"duplicate", "  - {name: rear_psi, unit: psi, range: [6, 40]}\n  - {name: rear_psi, unit: psi, range: [6, 40]}\n",
			[]string{"car.yaml line 7", "setup[1].name", `"rear_psi"`, "setup[0] too"}},
		{"lo not below hi", "  - {name: rear_psi, unit: psi, range: [40, 6]}\n", []string{"car.yaml line 6", "setup[0].range", "lo below hi"}},
		{"one bound", "  - {name: rear_psi, unit: psi, range: [6]}\n", []string{"line 6", "setup[0].range", "[lo, hi]"}},
		{"no unit", "  - {name: rear_psi, range: [6, 40]}\n", []string{"line 6", "setup[0].unit", "is missing"}},
		{"no name", "  - {unit: psi, range: [6, 40]}\n", []string{"line 6", "setup[0].name", "is missing"}},
		{"bad name", "  - {name: Rear PSI, unit: psi, range: [6, 40]}\n", []string{"line 6", "setup[0].name", `"Rear PSI"`, "lower-case"}},
		{"a column of the logbook", "  - {name: weight_lb, unit: lb, range: [6, 40]}\n", []string{"setup[0].name", "already keeps"}},
		{"expect key", "  - {name: rear_psi, unit: psi, range: [6, 40], expect: {mph: 0.1}}\n", []string{"line 6", "setup[0].expect", `"mph"`, "et60", "et for the finish"}},
		{"expect too large", "  - {name: rear_psi, unit: psi, range: [6, 40], expect: {et: 1}}\n", []string{"setup[0].expect.et", "s per psi"}},
		{"both kinds", "  - {name: conv, unit: x, choices: [a, b]}\n", []string{"line 6", "setup[0].choices", "not both"}},
		{"one choice", "  - {name: conv, choices: [a]}\n", []string{"setup[0].choices", "fewer than two"}},
		{"choice twice", "  - {name: conv, choices: [a, b, a]}\n", []string{"setup[0].choices[2]", "twice"}},
		{"range not numbers", "  - {name: rear_psi, unit: psi, range: [six, 40]}\n", []string{"car.yaml line 6", "not a number"}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			_, err := ReadCar(strings.NewReader(setupCarHead+"setup:\n"+tc.setup), "car.yaml")
			if err == nil {
				t.Fatal("accepted")
			}
			for _, w := range tc.want {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("%q lacks %q", err, w)
				}
			}
		})
	}
}
