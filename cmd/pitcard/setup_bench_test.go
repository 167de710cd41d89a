package main

import (
	"bytes"
	"encoding/csv"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// setupBigFolder is bigFolder with ten setup items in car.yaml (eight
// numbers, two choices) and a column of each in every row, the numbers
// varying pass to pass.
func setupBigFolder(b *testing.B, n int) string {
	b.Helper()
	dir := bigFolder(b, n)
	var items strings.Builder
	items.WriteString("\nsetup:\n")
	for k := range 8 {
		fmt.Fprintf(&items, "  - {name: item%d, unit: clicks, range: [0, 40], expect: {et60: 0.001}}\n", k)
	}
	items.WriteString("  - {name: tires, choices: [a, b]}\n  - {name: tune, choices: [mild, wild]}\n")
	car, _ := os.ReadFile(filepath.Join(dir, "car.yaml"))
	writeBench(b, filepath.Join(dir, "car.yaml"), append(car, items.String()...))
	path := filepath.Join(dir, "logbook.csv")
	f, _ := os.Open(path)
	rows, err := csv.NewReader(f).ReadAll()
	f.Close()
	if err != nil {
		b.Fatal(err)
	}
	for k := range 8 {
		rows[0] = append(rows[0], fmt.Sprintf("item%d", k))
	}
	rows[0] = append(rows[0], "tires", "tune")
	for i := 1; i < len(rows); i++ {
		for k := range 8 {
			rows[i] = append(rows[i], fmt.Sprint(10+(i*(k+3))%9))
		}
		rows[i] = append(rows[i], "a", "mild")
	}
	var buf bytes.Buffer
	_ = csv.NewWriter(&buf).WriteAll(rows)
	writeBench(b, path, buf.Bytes())
	return dir
}

func writeBench(b *testing.B, path string, data []byte) {
	b.Helper()
	if err := os.WriteFile(path, data, 0o644); err != nil {
		b.Fatal(err)
	}
}

func benchRun(b *testing.B, args ...string) {
	b.Helper()
	var out, errb bytes.Buffer
	s := &IOStreams{In: strings.NewReader(""), Out: &out, Err: &errb, Now: func() time.Time { return fixedNow }}
	if code := run(args, s); code != 0 {
		b.Fatal(fmt.Sprint(code, errb.String()))
	}
}

// BenchmarkLogSetup is the whole 'pitcard log setup' of ten setup items on
// a 5,000-pass logbook: every row read and its setup cells checked, the
// fit, the ten items' effects.
func BenchmarkLogSetup(b *testing.B) {
	dir := setupBigFolder(b, 5000)
	for b.Loop() {
		benchRun(b, "log", "setup", "--dir", dir)
	}
}

// BenchmarkCardSetup10Items5000 is the whole card with ten setup items on
// a 5,000-pass logbook and two of them planned (--set).
func BenchmarkCardSetup10Items5000(b *testing.B) {
	dir := setupBigFolder(b, 5000)
	for b.Loop() {
		benchRun(b, "card", "--dir", dir, "--round", "3", "--lane", "left", "--set", "item0=12", "--set", "item3=15")
	}
}
