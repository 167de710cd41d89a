package main

import (
	"bytes"
	"os"
	"path/filepath"
	"testing"
)

// The committed demo event is exactly what the generator writes from the
// current pass model: a change to the physics must regenerate it
// (go run ./internal/demogen -out event/demo), so the demo's numbers always
// agree with the model (the demo is invented data; the check is of
// consistency, common practice for generated fixtures).
func TestDemoIsUpToDate(t *testing.T) {
	dir := t.TempDir()
	passes, readings, err := generate(dir)
	if err != nil {
		t.Fatal(err)
	}
	if passes < 60 || readings < 12 {
		t.Errorf("demo has %d passes and %d readings; want at least 60 and 12", passes, readings)
	}
	for _, f := range []string{"logbook.csv", "weather.csv", "car.yaml", "track.yaml", "schedule.yaml", "tracks/salt-creek.yaml", "tracks/granite-pass.yaml"} {
		want, err := os.ReadFile(filepath.Join(dir, f))
		if err != nil {
			t.Fatal(err)
		}
		got, err := os.ReadFile(filepath.Join("..", "..", "event", "demo", f))
		if err != nil || !bytes.Equal(got, want) {
			t.Errorf("event/demo/%s is not what the generator writes now: run go run ./internal/demogen -out event/demo", f)
		}
	}
}
