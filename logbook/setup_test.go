package logbook

import (
	"bytes"
	"strings"
	"testing"
	"time"
)

var testSetup = Setup{
	{Name: "rear_psi", Unit: "psi", Range: []float64{6, 40}},
	{Name: "converter", Choices: []string{"stock", "5400-stall"}},
}

const setupBook = "date,time,track,session,lane,et60,et1320,rear_psi,converter,crew_note\n" +
	"2026-06-13,18:00,My Home Dragway,T1,left,1.61,11.5,16,stock,a\n" +
	"2026-06-13,18:30,My Home Dragway,T2,left,1.60,11.5,55,stock,b\n" +
	"2026-06-13,19:00,My Home Dragway,T3,left,1.60,11.5,15.5 psi,5400-STALL,c\n" +
	"2026-06-13,19:30,My Home Dragway,T4,left,1.60,11.5,,turbo,d\n" +
	"2026-06-13,20:00,My Home Dragway,T5,left,1.60,11.5,,,e\n"

// A setup column is typed by car.yaml: a bad cell sets its row aside with
// the file, line, column, value and the valid range or choices, and every
// other row still loads; a rewrite keeps the bad rows as they were
// (pitcard's own rules, no outside source).
func TestTypedSetupColumns(t *testing.T) {
	lb, err := ReadSetup(strings.NewReader(setupBook), "logbook.csv", time.UTC, 0, testSetup)
	if err != nil {
		t.Fatal(err)
	}
	if len(lb.Passes) != 3 || len(lb.Bad) != 2 {
		t.Fatalf("%d passes, bad %v", len(lb.Passes), lb.Bad)
	}
	for i, want := range [][]string{
		{"logbook.csv line 3", "rear_psi", `"55"`, "outside 6..40 psi"},
		{"logbook.csv line 5", "converter", `"turbo"`, "not one of stock, 5400-stall"},
	} {
		for _, w := range want {
			if !strings.Contains(lb.Bad[i].Error(), w) {
				t.Errorf("%q lacks %q", lb.Bad[i], w)
			}
		}
	}
	// "15.5 psi" is kept as the number, a choice as car.yaml spells it
	if p := lb.Passes[1]; p.Extra["rear_psi"] != "15.5" || p.Extra["converter"] != "5400-stall" || p.Extra["crew_note"] != "c" {
		t.Errorf("pass 2 setup %v", p.Extra)
	}
	if v, ok := testSetup[0].Value(lb.Passes[2]); ok {
		t.Errorf("a blank cell reads as %v", v)
	}
	var buf bytes.Buffer
	if err := lb.Write(&buf); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(buf.String(), ",55,stock,b") || !strings.Contains(buf.String(), ",turbo,d") {
		t.Errorf("a rewrite lost a bad row:\n%s", buf.String())
	}
	// untyped, the same file reads whole (the crew's columns as text)
	if lb, _ := ReadFile(strings.NewReader(setupBook), "logbook.csv", time.UTC); len(lb.Passes) != 5 {
		t.Errorf("untyped: %d passes", len(lb.Passes))
	}
	// export and import: the setup columns come back as they went
	buf.Reset()
	if err := WriteWith(&buf, lb.Passes, []string{"rear_psi", "converter"}); err != nil {
		t.Fatal(err)
	}
	back, err := ReadSetup(bytes.NewReader(buf.Bytes()), "export.csv", time.UTC, 0, testSetup)
	if err != nil || len(back.Bad) > 0 || len(back.Passes) != 3 {
		t.Fatalf("round trip: %v %v", err, back.Bad)
	}
	for i := range back.Passes {
		for _, it := range testSetup {
			if back.Passes[i].Extra[it.Name] != lb.Passes[i].Extra[it.Name] {
				t.Errorf("pass %d %s: %q, was %q", i, it.Name, back.Passes[i].Extra[it.Name], lb.Passes[i].Extra[it.Name])
			}
		}
	}
}

func TestParseSetAssignments(t *testing.T) {
	cases := []struct {
		sets []string
		want map[string]string
		err  string
	}{
		{[]string{"rear_psi=15.5", "converter=stock"}, map[string]string{"rear_psi": "15.5", "converter": "stock"}, ""},
		{[]string{" rear_psi = 15.50psi "}, map[string]string{"rear_psi": "15.5"}, ""},
		{[]string{"rear_psi=41"}, nil, `--set rear_psi "41" is outside 6..40 psi`},
		{[]string{"rear_psi=lots"}, nil, "is not a number of psi"},
		{[]string{"rear_psi=0x10"}, nil, "is not a number"},
		{[]string{"rear_psi=NaN"}, nil, "is not a number"},
		{[]string{"front_psi=20"}, nil, "names no setup item of car.yaml (items: rear_psi, converter)"},
		{[]string{"rear_psi"}, nil, "is not NAME=VALUE"},
		{[]string{"=3"}, nil, "is not NAME=VALUE"},
		{[]string{"rear_psi="}, nil, "gives rear_psi no value"},
		{[]string{"rear_psi=15", "rear_psi=16"}, nil, "a second time"},
		{[]string{"converter=turbo"}, nil, "is not one of stock, 5400-stall"},
	}
	for _, tc := range cases {
		got, err := ParseSetAssignments("--set", tc.sets, testSetup)
		if tc.err != "" {
			if err == nil || !strings.Contains(err.Error(), tc.err) {
				t.Errorf("%q: error %v, want %q", tc.sets, err, tc.err)
			}
			continue
		}
		if err != nil || len(got) != len(tc.want) {
			t.Errorf("%q: %v %v", tc.sets, got, err)
		}
		for k, v := range tc.want {
			if got[k] != v {
				t.Errorf("%q: %s = %q, want %q", tc.sets, k, got[k], v)
			}
		}
	}
}

// Any --set text: refused with the flag named, or read into a value its
// column accepts.
func FuzzParseSetAssignments(f *testing.F) {
	for _, s := range []string{"rear_psi=15.5", "converter=stock", "rear_psi=1e400", "x=", "rear_psi=-0", "converter=5400-STALL", "rear_psi==3"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		got, err := ParseSetAssignments("--set", []string{s}, testSetup)
		if err != nil {
			if !strings.Contains(err.Error(), "--set") {
				t.Fatalf("%q: error %q does not name the flag", s, err)
			}
			return
		}
		for k, v := range got {
			it, _ := testSetup.Item(k)
			if again, err := it.Check(k, v); err != nil || again != v {
				t.Fatalf("%q: kept %q, which reads back as %q, %v", s, v, again, err)
			}
		}
	})
}

func TestLastSetup(t *testing.T) {
	ps := []Pass{{Extra: map[string]string{"rear_psi": "16", "converter": "stock"}}, {Extra: map[string]string{"rear_psi": "15"}}, {}}
	got := LastSetup(ps, testSetup)
	if got["rear_psi"] != "15" || got["converter"] != "stock" {
		t.Errorf("last setup %v", got)
	}
}
