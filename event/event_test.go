package event

import (
	"io/fs"
	"testing"
	"testing/fstest"
)

func TestDemoOverlay(t *testing.T) {
	rules := fstest.MapFS{"rules/a.lua": {Data: []byte("-- a")}}
	d := Demo(rules)
	if _, err := fs.ReadFile(d, "rules/a.lua"); err != nil {
		t.Fatal(err)
	}
	if _, err := fs.ReadFile(d, "car.yaml"); err != nil {
		t.Fatal(err)
	}
	if m, _ := fs.Glob(d, "rules/*.lua"); len(m) != 1 {
		t.Errorf("glob %v", m)
	}
	if st, err := fs.Stat(d, "rules"); err != nil || !st.IsDir() {
		t.Errorf("rules/: %v", err)
	}
	var n int
	_ = fs.WalkDir(d, ".", func(p string, e fs.DirEntry, err error) error {
		if err == nil && !e.IsDir() {
			n++
		}
		return err
	})
	if n < 8 {
		t.Errorf("walked %d files", n)
	}
	if _, err := fs.ReadFile(Starter(), "schedule.yaml"); err != nil {
		t.Error(err)
	}
}
