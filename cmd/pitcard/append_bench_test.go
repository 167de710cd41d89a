package main

import (
	"bytes"
	"fmt"
	"strings"
	"testing"
	"time"
)

// benchLogAdd is 'pitcard log add' of one slip into a copy of the demo
// whose logbook holds n passes, each slip a minute after the last: the
// append path. The first slip, before the clock starts, takes the full
// rewrite (the folder has no count file yet).
func benchLogAdd(b *testing.B, n int) {
	dir := bigFolder(b, n)
	at := time.Date(2026, 7, 1, 9, 0, 0, 0, time.Local)
	add := func() {
		var out, errb bytes.Buffer
		s := &IOStreams{In: strings.NewReader(""), Out: &out, Err: &errb, Now: func() time.Time { return at.Add(time.Hour) }}
		args := []string{"log", "add", "--dir", dir, "--date", at.Format("2006-01-02"), "--time", at.Format("15:04"),
			"--round", "T1", "--lane", "left", "--rt", "0.031", "--et60", "1.601", "--et1320", "11.452", "--mph1320", "117.6"}
		if code := run(args, s); code != 0 {
			b.Fatal(fmt.Sprint(code, errb.String()))
		}
		at = at.Add(time.Minute)
	}
	add()
	b.ResetTimer()
	for b.Loop() {
		add()
	}
}

// BenchmarkLogAdd1000 and BenchmarkLogAdd100000: a slip costs the same
// whatever the logbook's size (target: 100k within 2x of 1k).
func BenchmarkLogAdd1000(b *testing.B)   { benchLogAdd(b, 1000) }
func BenchmarkLogAdd100000(b *testing.B) { benchLogAdd(b, 100000) }
