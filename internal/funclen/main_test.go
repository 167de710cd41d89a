package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// A function's length is counted from its func line to its closing brace;
// methods carry their receiver's type; tests and testdata are left out
// (the tool's own rules, no outside source).
func TestScanCountsLines(t *testing.T) {
	dir := t.TempDir()
	src := "package x\n\nfunc short() {}\n\ntype T struct{}\n\nfunc (t *T) long() {\n" + strings.Repeat("\t_ = 1\n", 5) + "}\n"
	for name, text := range map[string]string{"x.go": src, "x_test.go": src, "testdata/y.go": src} {
		path := filepath.Join(dir, name)
		if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	long, total, err := scan(dir, 3)
	if err != nil {
		t.Fatal(err)
	}
	if total != 2 || len(long) != 1 || long[0].where != "x.go: T.long" || long[0].lines != 7 {
		t.Errorf("total %d, long %+v", total, long)
	}
	var b strings.Builder
	report(&b, long, total, 3)
	if b.String() != "   7 x.go: T.long\n1 of 2 functions over 3 lines\n" {
		t.Errorf("report:\n%s", b.String())
	}
}
