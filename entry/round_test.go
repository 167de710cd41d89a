package entry

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"pitcard/event"
	"pitcard/logbook"
)

func TestRoundNotesPersistAndReachTheCard(t *testing.T) {
	dir := t.TempDir()
	if _, err := event.Create(dir, true, time.Now()); err != nil {
		t.Fatal(err)
	}
	if data, err := os.ReadFile(filepath.Join(dir, event.IgnoreFile)); err != nil || !strings.Contains(string(data), event.TokensFile) {
		t.Fatalf(".gitignore must leave out the tokens file: %q %v", data, err)
	}
	e, err := event.Open(event.OpenOptions{Dir: dir})
	if err != nil {
		t.Fatal(err)
	}
	now := time.Date(2026, 6, 13, 20, 30, 0, 0, time.Local) // the demo day's last reading
	day := now.Format("2006-01-02")
	ses := logbook.Session{Kind: logbook.Elimination, N: 3}
	if err := e.SetOpponentDial(day, ses, "11.62", now); err != nil {
		t.Fatal(err)
	}
	if err := e.SetOpponentDial(day, ses, "72.5", now); err == nil || !strings.Contains(err.Error(), "--opponent-dial") {
		t.Fatalf("a dial out of range must be refused naming the field: %v", err)
	}
	if err := e.SetTicks(day, ses, []string{"Tire pressures set", "Tire pressures set", "Fuel"}, now); err != nil {
		t.Fatal(err)
	}
	later := now.Add(5 * time.Minute)
	if err := e.SetTicks(day, ses, []string{"Fuel", "Belts"}, later); err != nil {
		t.Fatal(err)
	}
	n, err := e.RoundNotes(day, ses)
	if err != nil {
		t.Fatal(err)
	}
	if !n.OpponentDial.Valid || n.OpponentDial.Decimal.String() != "11.62" {
		t.Errorf("opponent dial %v, want 11.62", n.OpponentDial)
	}
	if len(n.Ticked) != 2 || !n.Ticked["Fuel"].Equal(now.Truncate(time.Second)) || !n.Ticked["Belts"].Equal(later.Truncate(time.Second)) {
		t.Errorf("ticks %v: Fuel keeps its first time, Belts is new, the unticked one is gone", n.Ticked)
	}
	other, _ := e.RoundNotes(day, logbook.Session{Kind: logbook.Elimination, N: 4})
	if other.OpponentDial.Valid || len(other.Ticked) > 0 {
		t.Errorf("another round's notes leaked: %+v", other)
	}
	in, warnings, err := GatherRound(e, RoundRequest{Round: "E3"}, now)
	if !event.Usable(err) {
		t.Fatal(err)
	}
	if !strings.Contains(strings.Join(warnings, "\n"), "11.62 is the one noted for E3 in rounds.csv") {
		t.Errorf("the card must say where the other lane's dial came from: %q", warnings)
	}
	if !in.OpponentDial.Valid || in.OpponentDial.Decimal.String() != "11.62" || len(in.Ticked) != 2 {
		t.Errorf("the card must race the noted dial and show the ticks: %v %v (%v, call %v)", in.OpponentDial, in.Ticked, err, in.Call)
	}
	in, _, _ = GatherRound(e, RoundRequest{Round: "E3", OpponentDial: "11.70"}, now)
	if in.OpponentDial.Decimal.String() != "11.7" {
		t.Errorf("a dial given for the card wins over the noted one: %v", in.OpponentDial)
	}
}
