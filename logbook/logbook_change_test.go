package logbook

import (
	"bytes"
	"strings"
	"testing"
	"time"
)

// The change column: written beside the notes, read back as typed (commas,
// quotes, a leading = kept from a spreadsheet's formulas); a file without it
// reads, is rewritten without the column while no pass has a change, and gets the
// column after its own ones when one does.
func TestLogbookChangeColumn(t *testing.T) {
	passes, err := Read(strings.NewReader(header+goodRow), "logbook.csv", time.UTC)
	if err != nil {
		t.Fatal(err)
	}
	for _, change := range []string{`4.10 gear, "big" converter`, "=+2 psi", "swapped to the 5400 stall"} {
		t.Run(change, func(t *testing.T) {
			p := passes[0]
			p.Change = change
			var buf bytes.Buffer
			if err := Write(&buf, []Pass{p}); err != nil {
				t.Fatal(err)
			}
			if h, _, _ := strings.Cut(buf.String(), "\n"); !strings.HasSuffix(h, ",notes,change") {
				t.Errorf("header %q: the change goes beside the notes", h)
			}
			again, err := Read(&buf, "logbook.csv", time.UTC)
			if err != nil {
				t.Fatal(err)
			}
			if again[0].Change != change {
				t.Errorf("read back %q, wrote %q", again[0].Change, change)
			}
		})
	}

	// An older logbook without the column: read with no change, rewritten
	// with its own columns in their order (the crew's fuel too), the change
	// added after them.
	old := "date,time,track,session,lane,fuel,et60,et1320,notes\n" +
		"2026-06-13,18:42,Test Strip,E1,left,8 gal,1.612,11.538,good pass\n"
	lb, err := ReadFile(strings.NewReader(old), "logbook.csv", time.UTC)
	if err != nil || len(lb.Passes) != 1 || len(lb.Bad) != 0 {
		t.Fatalf("an old logbook: %v, %+v", err, lb)
	}
	if lb.Passes[0].Change != "" {
		t.Errorf("no change column, change %q", lb.Passes[0].Change)
	}
	var same bytes.Buffer
	if err := lb.Write(&same); err != nil || strings.Contains(same.String(), "change") {
		t.Errorf("an old logbook with no change rewritten with the column:\n%s", same.String())
	}
	if Columns[len(Columns)-1] != ChangeColumn {
		t.Error("the change must stay the last of Columns: Write leaves it off by length")
	}
	added := lb.Passes[0]
	added.Time, added.Session, added.Change = added.Time.Add(time.Hour), Session{Elimination, 2}, "new converter, 5400 stall"
	lb.Passes = append(lb.Passes, added)
	var buf bytes.Buffer
	if err := lb.Write(&buf); err != nil {
		t.Fatal(err)
	}
	written := buf.String()
	want := "date,time,track,session,lane,fuel,et60,et1320,notes,dial,rt,et330,et660,et1000,mph660,mph1320,temp_f,baro_inhg,humidity_pct,track_temp_f,wind_mph,wind_from_deg,weight_lb,change\n" +
		"2026-06-13,18:42,Test Strip,E1,left,8 gal,1.612,11.538,good pass,,,,,,,,,,,,,,,\n" +
		"2026-06-13,19:42,Test Strip,E2,left,8 gal,1.612,11.538,good pass,,,,,,,,,,,,,,,\"new converter, 5400 stall\"\n"
	if written != want {
		t.Errorf("rewritten:\n%s\nwant\n%s", written, want)
	}
	again, err := ReadFile(&buf, "logbook.csv", time.UTC)
	if err != nil || len(again.Passes) != 2 || again.Passes[1].Change != "new converter, 5400 stall" || again.Passes[0].Change != "" {
		t.Fatalf("read back: %v, %+v", err, again)
	}
}

// A row whose change cannot be kept (a line break, too long) is set aside
// with its file, line and column, the rest read.
func TestLogbookBadChange(t *testing.T) {
	h := "date,time,track,session,lane,et1320,change\n"
	file := h + "2026-06-13,18:42,Test Strip,E1,left,11.538,\"new\nconverter\"\n" +
		"2026-06-13,19:42,Test Strip,E2,left,11.538," + strings.Repeat("x", MaxChangeLen+1) + "\n" +
		"2026-06-13,20:42,Test Strip,E3,left,11.538,new converter\n"
	lb, err := ReadFile(strings.NewReader(file), "logbook.csv", time.UTC)
	if err != nil {
		t.Fatal(err)
	}
	if len(lb.Passes) != 1 || lb.Passes[0].Change != "new converter" || len(lb.Bad) != 2 {
		t.Fatalf("%d passes, %d bad: %v", len(lb.Passes), len(lb.Bad), lb.Bad)
	}
	for i, want := range [][]string{{"logbook.csv line 2", "change", "control character"}, {"logbook.csv line 4", "change", "at most 200"}} {
		for _, w := range want {
			if !strings.Contains(lb.Bad[i].Error(), w) {
				t.Errorf("bad row %d: %q lacks %q", i, lb.Bad[i], w)
			}
		}
	}
}
