package engine

import (
	"errors"
	"strings"
	"testing"

	"pitcard/logbook"
	"pitcard/weather"
)

func TestReadTrack(t *testing.T) {
	trk, err := ReadTrack(strings.NewReader("name: Test Strip\nelevation_ft: 2240\nheading_deg: 72\n"), "track.yaml")
	if err != nil || trk.Name != "Test Strip" || trk.ElevationFt != 2240 || trk.HeadingDeg != 72 || trk.Prep != "full" {
		t.Fatalf("%+v %v", trk, err)
	}
	// The international foot is 0.3048 m exactly (standard definition): 2240 ft = 682.752 m.
	if m := trk.Elevation().Metres(); m < 682.751 || m > 682.753 {
		t.Errorf("elevation %v m", m)
	}
}

func TestReadTrackErrors(t *testing.T) {
	cases := []struct{ yaml, want string }{
		{"name: X\nelevation_ft: 16000\n", "elevation_ft \"16000 ft\" is outside -1500..15000 ft"},
		{"name: X\nelevation: 900\n", "line 2"},
		{"name: X\nelevation_ft: high\n", "line 2"},
		{"elevation_ft: 900\n", "name is missing"},
		{"name: X\nheading_deg: 400\n", "heading_deg"},
		{"name: [\n", "track.yaml"},
	}
	for _, tc := range cases {
		_, err := ReadTrack(strings.NewReader(tc.yaml), "track.yaml")
		var ie *weather.InputError
		if !errors.As(err, &ie) || !strings.Contains(err.Error(), tc.want) || !strings.Contains(err.Error(), "track.yaml") {
			t.Errorf("%q: error %v, want it to contain %q and the file", tc.yaml, err, tc.want)
		}
	}
}

func FuzzReadTrack(f *testing.F) {
	f.Add("name: Test Strip\nelevation_ft: 2240\nheading_deg: 72\nprep: light\n")
	f.Add("name: X\nelevation_ft: -1e308\n")
	f.Add("- a\n- b\n")
	f.Fuzz(func(t *testing.T, s string) {
		trk, err := ReadTrack(strings.NewReader(s), "track.yaml")
		if err != nil {
			if !strings.Contains(err.Error(), "track.yaml") {
				t.Fatalf("error %q does not name the file", err)
			}
			return
		}
		if weather.CheckElevation(trk.Elevation()) != nil || trk.Name == "" {
			t.Fatalf("accepted %+v", trk)
		}
	})
}

func FuzzReadCar(f *testing.F) {
	f.Add("weight_lb: 3350\npower_hp: 520\ninduction: natural\ndistance_ft: 1320\n")
	f.Add("weight_lb: 3350\npower_hp: 0\ninduction: turbo\ndistance_ft: 660\ngears: [2.48, 1.48, 1.0]\nfinal_drive: 3.73\ntire_diameter_in: 28\n")
	f.Add("weight_lb: 3350\ninduction: nitrous\nnitrous_hp: 150\ndistance_ft: 1000\nlimit_et: 10.0\nchute: false\nextra: {a: [1, 2]}\n")
	f.Add("weight_lb: [1]\n")
	f.Add("weight_lb: 3350\ninduction: natural\ndistance_ft: 1320\nsetup:\n  - {name: rear_psi, unit: psi, range: [6, 40], expect: {et60: 0.01}}\n  - {name: converter, choices: [stock, 5400-stall]}\n")
	f.Fuzz(func(t *testing.T, s string) {
		c, err := ReadCar(strings.NewReader(s), "car.yaml")
		if err != nil {
			if !strings.Contains(err.Error(), "car.yaml") {
				t.Fatalf("error %q does not name the file", err)
			}
			return
		}
		if c.Validate("car.yaml") != nil {
			t.Fatalf("accepted an invalid car %+v", c)
		}
		// every accepted car simulates without blowing up (physics sanity)
		v := NewVehicle(c, 300)
		run := Simulate(&v, DefaultParams(c.Induction), NewEnv(j1349Air, 0, 1, v.MassKg), c.DistanceFt)
		if !(run.ETAt(c.DistanceFt) > 0) {
			t.Fatalf("car %+v ran %v", c, run.ET)
		}
	})
}

func FuzzParseSlipFields(f *testing.F) {
	for _, s := range []string{"T1", "E3", "round 2", "test", ".520", "-.012", "11.538", "left", "R"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		if _, err := logbook.ParseSession(s); err != nil && !strings.Contains(err.Error(), "session") {
			t.Fatalf("session error %q", err)
		}
		if d, err := logbook.ParseSeconds("rt", s); err != nil && !strings.Contains(err.Error(), "rt") {
			t.Fatalf("seconds error %q", err)
		} else if err == nil && logbook.FormatSeconds(d, 3) == "" {
			t.Fatal("empty format")
		}
		if _, err := logbook.ParseLane(s); err != nil && !strings.Contains(err.Error(), "lane") {
			t.Fatalf("lane error %q", err)
		}
		if _, err := ParsePrep(s); err != nil && !strings.Contains(err.Error(), "prep") {
			t.Fatalf("prep error %q", err)
		}
	})
}

// A track.yaml whose name is typed in another Unicode form than the
// logbook's (é as one code point, or e and a combining accent) names the
// same track: ReadTrack keeps the name as logbook.TrackName does.
func TestTrackYAMLNameUnicodeForms(t *testing.T) {
	nfc, nfd := "Caf\u00e9 Raceway", "Cafe\u0301 Raceway"
	trk, err := ReadTrack(strings.NewReader("name: "+nfd+"\nelevation_ft: 900\n"), "track.yaml")
	if err != nil || trk.Name != logbook.TrackName(nfc) {
		t.Errorf("track.yaml name %q, logbook's %q (%v)", trk.Name, logbook.TrackName(nfc), err)
	}
}
