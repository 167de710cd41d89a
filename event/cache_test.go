package event_test

import (
	"bytes"
	"encoding/json"
	"os"
	"path/filepath"
	"testing"
	"time"

	"pitcard/engine"
	"pitcard/entry"
	"pitcard/event"
	"pitcard/prep"
)

// heldOutEntries reads a held-out cache's file as written: key → the three
// figures of one held-out prediction.
func heldOutEntries(t *testing.T, data []byte) map[string][3]float64 {
	t.Helper()
	var f struct {
		Entries map[string][3]float64 `json:"entries"`
	}
	if err := json.Unmarshal(data, &f); err != nil {
		t.Fatal(err)
	}
	return f.Entries
}

// A copy of the event starts warm from the predictions another folder of
// the process made (their keys digest everything a prediction is made
// from), and keeps them in its own cache file for the next process.
func TestFoldersShareTheProcessHeldOut(t *testing.T) {
	saved := event.ProcessHeldOut()
	t.Cleanup(func() { event.SetProcessHeldOut(saved) })
	event.SetProcessHeldOut(engine.NewHeldOutCache())
	now := time.Date(2026, 6, 13, 20, 30, 0, 0, time.Local) // the demo day's last reading
	card := func(dir string) map[string][3]float64 {
		t.Helper()
		if _, err := event.Create(dir, true, now); err != nil {
			t.Fatal(err)
		}
		e, err := event.Open(event.OpenOptions{Dir: dir})
		if err != nil {
			t.Fatal(err)
		}
		in, _, err := entry.GatherRound(e, entry.RoundRequest{Round: "E3"}, now)
		if !event.Usable(err) {
			t.Fatal(err)
		}
		prep.Gather(in)
		if err := e.KeepHeldOut(); err != nil {
			t.Fatal(err)
		}
		data, err := os.ReadFile(filepath.Join(dir, event.CacheDir, event.HeldOutFile))
		if err != nil {
			t.Fatalf("the card's held-out predictions were not kept: %v", err)
		}
		return heldOutEntries(t, data)
	}
	first := card(filepath.Join(t.TempDir(), "a"))
	if len(first) < engine.ScoredPasses {
		t.Fatalf("the demo's card kept %d held-out predictions, want at least %d", len(first), engine.ScoredPasses)
	}
	var buf bytes.Buffer
	if _, err := event.ProcessHeldOut().WriteTo(&buf); err != nil {
		t.Fatal(err)
	}
	if shared := heldOutEntries(t, buf.Bytes()); len(shared) != len(first) {
		t.Errorf("the process's cache has %d of the folder's %d predictions", len(shared), len(first))
	}
	// The process's entries moved by a second tell a lookup there from a
	// calibration made again.
	moved := map[string][3]float64{}
	for k, v := range first {
		v[0]++
		moved[k] = v
	}
	data, err := json.Marshal(map[string]any{"version": json.RawMessage(versionOf(t, buf.Bytes())), "entries": moved})
	if err != nil {
		t.Fatal(err)
	}
	event.SetProcessHeldOut(engine.ReadHeldOutCache(bytes.NewReader(data)))
	second := card(filepath.Join(t.TempDir(), "b"))
	for k, v := range moved {
		if second[k] != v {
			t.Errorf("the copy's entry %.8s… is %v, want the process's %v", k, second[k], v)
		}
	}
}

// versionOf is the version a held-out cache's file was written with.
func versionOf(t *testing.T, data []byte) []byte {
	t.Helper()
	var f struct {
		Version json.RawMessage `json:"version"`
	}
	if err := json.Unmarshal(data, &f); err != nil {
		t.Fatal(err)
	}
	return f.Version
}
