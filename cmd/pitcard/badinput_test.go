package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// The bad-input tour: for every command, wrong inputs (a wrong unit, a value
// out of range, a missing file, a corrupt row, an unknown flag, a failing
// rule) with the exit code and the words the message must contain. No Go
// panic or stack trace reaches the user.
func TestBadInputTour(t *testing.T) {
	good := demoCopy(t)
	bad := demoCopy(t)
	// corrupt copies of each file
	corruptRow := func(file, from, to string) string {
		dir := demoCopy(t)
		p := filepath.Join(dir, file)
		data, _ := os.ReadFile(p)
		if !strings.Contains(string(data), from) {
			t.Fatalf("%s lacks %q", file, from)
		}
		_ = os.WriteFile(p, []byte(strings.Replace(string(data), from, to, 1)), 0o644)
		return dir
	}
	badLog := corruptRow("logbook.csv", "2026-04-11,13:00", "2026-04-11,25:00")
	badWeather := corruptRow("weather.csv", "2026-06-13,14:00:00", "2026-06-13,14:00:00x")
	badCar := corruptRow("car.yaml", "weight_lb: 3350", "weight_lb: 33500")
	badTrack := corruptRow("track.yaml", "elevation_ft: 2240", "elevation_ft: high")
	badSettings := corruptRow("pitcard.yaml", "dial_step: 0.01", "dial_step: 0.5")
	badDayStart := corruptRow("pitcard.yaml", "tree: full", "tree: full\nday_starts: \"18:00\"")
	trackKey := corruptRow("track.yaml", "elevation_ft: 2240", "elevation_ft: 2240\nsurface: concrete")
	badLane := corruptRow("schedule.yaml", "lane: left", "lane: center")
	nanCar := corruptRow("car.yaml", "limit_et: 10.65", "limit_et: .nan")
	_ = os.WriteFile(filepath.Join(bad, "rules", "05-bad.lua"), []byte("function dial(ctx)\n  return ctx.nope.x\nend\n"), 0o644)
	// rules that are wrong in the crew's own words: a hook that is not a
	// function, a missing value handed to string.format, an error raised
	// with a table, NaN handed to pit.round_dial
	badRules := demoCopy(t)
	for name, src := range map[string]string{
		"05-number.lua": "dial = 0.01\n",
		"06-format.lua": "function notes(ctx)\n  return {string.format('%.0f °F', ctx.air.nothing)}\nend\n",
		"07-table.lua":  "function checks(ctx)\n  error({})\nend\n",
		"08-nan.lua":    "function dial(ctx)\n  return pit.round_dial(0/0), 'x'\nend\n",
	} {
		_ = os.WriteFile(filepath.Join(badRules, "rules", name), []byte(src), 0o644)
	}
	missing := filepath.Join(t.TempDir(), "nowhere")
	src := filepath.Join(t.TempDir(), "rows.csv")
	_ = os.WriteFile(src, []byte(slipHeader+"2026-07-01,18:00,X,E1,left,11.5,0.02,1.6,,,,11.5,,116,88,28.9,140,,,,,\n"), 0o644)
	// a bad row and a pass already in the logbook: both are listed
	badAndDup := filepath.Join(t.TempDir(), "both.csv")
	_ = os.WriteFile(badAndDup, []byte(slipHeader+"2026-07-01,18:00,X,E1,left,11.5,0.02,1.6,,,,11.5,,116,88,28.9,140,,,,,\n"+
		"2026-06-13,20:13,Juniper Bend Raceway,E2,left,11.46,0.028,1.608,4.684,7.305,9.569,11.495,93.56,117.06,84.05,27.6032,33.4,95.72,2.32,173,3350,\n"), 0o644)

	// two exports joined: the header again mid-file
	joined := filepath.Join(t.TempDir(), "joined.csv")
	_ = os.WriteFile(joined, []byte(slipHeader+"2026-07-01,18:00,X,E1,left,11.5,0.02,1.6,,,,11.5,,116,88,28.9,40,,,,,\n"+slipHeader+
		"2026-07-01,18:30,X,E2,left,11.5,0.02,1.6,,,,11.5,,116,88,28.9,40,,,,,\n"), 0o644)
	// a change that is not one line of text, and one too long to be a few words
	badChange := filepath.Join(t.TempDir(), "changes.csv")
	_ = os.WriteFile(badChange, []byte(strings.TrimSuffix(slipHeader, "\n")+",change\n"+
		"2026-07-01,18:00,X,E1,left,11.5,0.02,1.6,,,,11.5,,116,88,28.9,40,,,,,,\"new\nconverter\"\n"+
		"2026-07-01,18:30,X,E2,left,11.5,0.02,1.6,,,,11.5,,116,88,28.9,40,,,,,,"+strings.Repeat("new converter ", 20)+"\n"), 0o644)
	binary := filepath.Join(t.TempDir(), "season.xls")
	_ = os.WriteFile(binary, []byte("\xd0\xcf\x11\xe0\x00\x00binary"), 0o644)

	// column maps gone wrong
	mapsDir := t.TempDir()
	badMap := filepath.Join(mapsDir, "map.yaml")
	_ = os.WriteFile(badMap, []byte("kind: logbook\ntemp: {column: \"Temp (C)\", unit: Kelvin}\n"), 0o644)
	leftOut := filepath.Join(mapsDir, "left.yaml")
	_ = os.WriteFile(leftOut, []byte("time: {column: Stamp, format: \"02.01.2006 15:04\"}\ntemp: {column: \"Temp (C)\", unit: C}\nhumidity: {column: \"RH (%)\"}\n"), 0o644)
	sheet := filepath.Join(mapsDir, "sheet.csv")
	_ = os.WriteFile(sheet, []byte("Date;Time;Extra\n13/06/2026;20:13;1\n"), 0o644)

	// an opponent book with a reaction time of 4.5 s on line 3 (invented cars)
	oppBook := "car,date,round,dial,rt,et,breakout,notes\n4471,2026-06-12,E1,11.80,0.045,11.842,no,\n4471,2026-06-12,E2,11.80,4.5,11.851,no,\n"
	badOpp, badOppAdd := demoCopy(t), demoCopy(t)
	for _, d := range []string{badOpp, badOppAdd} {
		_ = os.WriteFile(filepath.Join(d, "opponents.csv"), []byte(oppBook), 0o644)
	}

	reading := []string{"--temp", "85F", "--baro", "27.6inHg", "--humidity", "35%"}
	type tc struct {
		args []string
		code int
		want []string
	}
	with := func(base []string, extra ...string) []string { return append(append([]string{}, base...), extra...) }
	tour := map[string][]tc{
		"air": {
			{with([]string{"air", "--dir", good, "--temp", "85K", "--baro", "27.6", "--humidity", "35"}), 2, []string{"--temp", "85K", "F or C"}},
			{with([]string{"air", "--dir", good, "--temp", "185F", "--baro", "27.6", "--humidity", "35"}), 2, []string{"--temp", "-40..140 °F"}},
			{with([]string{"air", "--dir", good, "--temp", "82,5F", "--baro", "27.6", "--humidity", "35"}), 2, []string{"--temp", "82,5F", "decimal point", "82.5F"}},
			{with([]string{"air", "--dir", missing, "--latest"}), 2, []string{"does not exist"}},
			{with([]string{"air", "--dir", badWeather, "--latest"}), 2, []string{"weather.csv line 3", "time"}},
			{with([]string{"air", "--dir", good, "--temperature", "85"}), 2, []string{"unknown flag", "--temperature"}},
			{with([]string{"air", "--dir", badTrack, "--latest"}), 2, []string{"track.yaml", "line 3"}},
			{with([]string{"air", "--dir", src, "--latest"}), 2, []string{"is a file, not an event folder"}},
		},
		"weather add": {
			{with([]string{"weather", "add", "--dir", good, "--temp", "85F", "--baro", "27.6psi", "--humidity", "35"}), 2, []string{"--baro", "psi"}},
			{with([]string{"weather", "add", "--dir", good, "--temp", "85F", "--baro", "27.6", "--humidity", "135"}), 2, []string{"--humidity", "0..100 %"}},
			{with([]string{"weather", "add", "--dir", good, "--time", "25:00"}, reading...), 2, []string{"--time", "HH:MM"}},
			{with([]string{"weather", "add", "--dir", badWeather}, reading...), 2, []string{"weather.csv line 3"}},
			{with([]string{"weather", "add", "--dir", good, "--wind", "90mph"}, reading...), 2, []string{"--wind", "0..60 mph"}},
			{with([]string{"weather", "add", "--demo"}, reading...), 2, []string{"read-only"}},
			// an airport figure typed as station pressure at 5,200 ft: refused, not a DA of 494 ft
			{[]string{"weather", "add", "--dir", good, "--elevation", "5200ft", "--temp", "80F", "--baro", "30.10", "--humidity", "30"}, 2, []string{"--baro", "30.10 inHg", "impossible as station pressure at 5200 ft", "--baro-kind altimeter"}},
			{[]string{"air", "--dir", good, "--elevation", "5200ft", "--temp", "80F", "--baro", "30.10", "--humidity", "30"}, 2, []string{"--baro", "--baro-kind altimeter"}},
		},
		"weather list/forecast": {
			{[]string{"weather", "list", "--dir", badWeather}, 2, []string{"weather.csv line 3"}},
			{[]string{"weather", "list", "--dir", good, "--format", "yaml"}, 2, []string{"--format", "yaml"}},
			{[]string{"weather", "forecast", "--dir", good, "--at", "23:59"}, 2, []string{"at most 3 h"}},
			{[]string{"weather", "forecast", "--dir", good, "--at", "noon"}, 2, []string{"--at", "HH:MM"}},
			{[]string{"weather", "forecast", "--dir", good, "--at", "10:00"}, 2, []string{"before the first reading"}},
			{[]string{"weather", "forecast", "--dir", good}, 2, []string{"--at is required"}},
		},
		"log add": {
			{[]string{"log", "add", "--dir", good, "--session", "E9", "--lane", "up", "--et1320", "11.5"}, 2, []string{"--lane", "left or right"}},
			{[]string{"log", "add", "--dir", good, "--session", "Q1", "--lane", "left", "--et1320", "11.5"}, 2, []string{"--session", "Q1"}},
			{[]string{"log", "add", "--dir", good, "--session", "E9", "--lane", "left", "--et1320", "11.5", "--mph1320", "250"}, 2, []string{"--mph1320", "not plausible"}},
			{[]string{"log", "add", "--dir", good, "--session", "E9", "--lane", "left", "--et1320", "eleven"}, 2, []string{"--et1320", "seconds"}},
			{[]string{"log", "add", "--dir", badLog, "--session", "E9", "--lane", "left", "--et1320", "11.5"}, 0, []string{"logbook.csv line", "time", "left out", "keeps them as they are"}},
			{[]string{"log", "add", "--dir", good, "--session", "E9", "--lane", "left", "--dial", "11.45", "--rt", ".02", "--et1320", "11.5", "--opponent-dial", ".044", "--opponent-rt", ".04", "--opponent-et", "12.1"}, 2, []string{"--opponent-dial", "0.044", "1.5..40 s"}},
			{[]string{"log", "add", "--dir", good, "--session", "E9", "--lane", "left", "--dial", "11.45", "--rt", ".02", "--et1320", "11.5", "--opponent-dial", "12.04", "--time", "20:41", "--opponent-rt", "40", "--opponent-et", "12.1"}, 2, []string{"--opponent-rt", "40", "-1..2 s"}},
			{[]string{"log", "add", "--dir", good, "--session", "E9", "--lane", "left", "--et1320", "11.5", "--time", "20:42", "--track", "Junipr Bend"}, 0, []string{`--track "Junipr Bend"`, "neither track.yaml's name", "Juniper Bend Raceway"}},
			{[]string{"log", "add", "--dir", good, "--session", "E9", "--lane", "left", "--et1320", "11.5", "--weight", "50"}, 2, []string{"--weight", "500..10000"}},
			{[]string{"log", "add", "--dir", good, "--session", "E9", "--lane", "left", "--et1320", "11.5", "--date", "2500-06-01"}, 2, []string{"--date", "2500-06-01", "in the future", "today is 2026-06-13"}},
			{[]string{"log", "add", "--dir", good, "--session", "E9", "--lane", "left", "--et1320", "11.5", "--change", strings.Repeat("new converter ", 20)}, 2, []string{"--change", "is 279 bytes long (at most 200)", "the rest goes in the notes"}},
			{[]string{"log", "add", "--dir", good, "--session", "E9", "--lane", "left", "--et1320", "11.5", "--change", "new\x1b[2Jconverter"}, 2, []string{"--change", `"new\x1b[2Jconverter"`, "control character", "one line"}},
		},
		"opponent book": {
			{[]string{"log", "opponents", "--dir", badOpp}, 2, []string{"opponents.csv line 3", `rt "4.5" is outside -1..2 s`, "4471"}},
			{[]string{"card", "--dir", badOpp, "--round", "E3", "--lane", "left", "--opponent-dial", "11.80", "--opponent", "4471"}, 2, []string{"opponents.csv line 3", "rt", "from 1 pass of car 4471 (1 event)"}},
			{[]string{"card", "--dir", good, "--round", "E3", "--lane", "left", "--opponent-dial", "11.80", "--opponent", strings.Repeat("9", 41)}, 2, []string{"--opponent", "longer than 40"}},
			{[]string{"log", "add", "--dir", good, "--session", "E9", "--lane", "left", "--et1320", "11.5", "--opponent", "4471"}, 2, []string{"--opponent 4471", "--opponent-dial, --opponent-rt, --opponent-et"}},
			// the bad row stays in the book through an append (checked below)
			{[]string{"log", "add", "--dir", badOppAdd, "--session", "E9", "--lane", "left", "--dial", "11.45", "--rt", ".02", "--et1320", "11.5", "--time", "20:44",
				"--opponent-dial", "11.80", "--opponent-rt", ".04", "--opponent-et", "11.83", "--opponent", "4471"}, 0, []string{"kept in", "as car 4471's"}},
		},
		"log import/list/stats": {
			{[]string{"log", "import", "--dir", good, missing}, 2, []string{"cannot read"}},
			{[]string{"log", "import", "--dir", good, src}, 2, []string{"rows.csv line 2", "humidity_pct", "0..100"}},
			{[]string{"log", "import", "--dir", good}, 2, []string{"accepts 1 arg"}},
			{[]string{"log", "import", "--dir", good, badAndDup}, 2, []string{"both.csv line 2", "humidity_pct", "line 3) is already in", "Nothing was imported"}},
			{[]string{"log", "import", "--dir", good, joined}, 2, []string{"joined.csv line 3", "header line again", "Nothing was imported"}},
			{[]string{"log", "import", "--dir", good, badChange}, 2, []string{"changes.csv line 2: change", "control character", "changes.csv line 4: change", "at most 200", "Nothing was imported"}},
			{[]string{"log", "import", "--dir", good, binary}, 2, []string{"season.xls is not a text (CSV) file", "save it from the spreadsheet as CSV"}},
			{[]string{"log", "list", "--dir", badLog}, 2, []string{"logbook.csv line"}},
			{[]string{"log", "list", "--dir", good, "--last", "x"}, 2, []string{"--last"}},
			{[]string{"log", "stats", "--dir", badLog}, 2, []string{"logbook.csv line"}},
			{[]string{"log", "stats", "--dir", good, "--format", "pdf"}, 2, []string{"--format"}},
			{[]string{"log", "stats", "--dir", good, "--since", "June"}, 2, []string{"--since", "YYYY-MM-DD"}},
			{[]string{"log", "diff", "--dir", good, missing}, 2, []string{"cannot read"}},
			{[]string{"log", "export", "--dir", good, "--map", missing}, 2, []string{"--map", "cannot read"}},
		},
		"maps and streams": {
			{[]string{"log", "import", "--dir", good, maps + "meter-export.csv", "--map", badMap}, 2, []string{"map.yaml line 2", "temp.unit", "Kelvin", "use F, C"}},
			{[]string{"log", "import", "--dir", good, sheet, "--map", maps + "spreadsheet-map.yaml"}, 2, []string{"spreadsheet-map.yaml line 9", `track.column "Track" is not a column of`, `"Date", "Time", "Extra"`}},
			{[]string{"log", "import", "--dir", good, maps + "meter-export.csv"}, 2, []string{"the guessed map is not enough", "time", "track"}},
			{[]string{"weather", "import", "--dir", good, maps + "meter-export.csv", "--map", leftOut}, 2, []string{"left.yaml line 1", "baro", "is required"}},
			{[]string{"weather", "add", "--dir", good, "file.txt"}, 2, []string{"takes - (readings from standard input)"}},
			{[]string{"weather", "add", "-", "--dir", good, "--temp", "80F"}, 2, []string{"not both"}},
		},
		"race": {
			{[]string{"race", "--left-dial", "14.2", "--left-rt", ".5", "--left-et", "14.3", "--right-dial", "13", "--right-rt", ".5"}, 2, []string{"--right-et is required"}},
			{[]string{"race", "--left-dial", "14.2s", "--left-rt", ".5", "--left-et", "14.3", "--right-dial", "13", "--right-rt", ".5", "--right-et", "13.1"}, 2, []string{"--left-dial"}},
			{[]string{"race", "--left-dial", "14.2", "--left-rt", ".5", "--left-et", "-1", "--right-dial", "13", "--right-rt", ".5", "--right-et", "13.1"}, 2, []string{"left-et", "1.5..40 s"}},
			{[]string{"race", "--tree", "christmas", "--left-dial", "14.2", "--left-rt", ".5", "--left-et", "14", "--right-dial", "13", "--right-rt", ".5", "--right-et", "13.1"}, 2, []string{"tree", "full or pro"}},
			{[]string{"race", "--rt-zero", "red", "--left-dial", "14.2", "--left-rt", ".5", "--left-et", "14", "--right-dial", "13", "--right-rt", ".5", "--right-et", "13.1"}, 2, []string{"rt-zero"}},
			// the other lane's figures are checked like ours: the dial's and the RT's ranges
			{[]string{"race", "--left-dial", "14.2", "--left-rt", "1000", "--left-et", "14.3", "--right-dial", "13", "--right-rt", ".5", "--right-et", "13.1"}, 2, []string{"--left-rt", "1000", "-1..2 s"}},
			{[]string{"race", "--left-dial", "14.2", "--left-rt", ".5", "--left-et", "14.3", "--right-dial", ".044", "--right-rt", ".5", "--right-et", "13.1"}, 2, []string{"--right-dial", "0.044", "1.5..40 s"}},
			{[]string{"race", "--left-dial", "14.2", "--left-rt", ".5", "--left-et", "1430", "--right-dial", "13", "--right-rt", ".5", "--right-et", "13.1"}, 2, []string{"--left-et", "1430", "1.5..40 s"}},
			{[]string{"race", "--left-mph", "fast", "--left-dial", "14.2", "--left-rt", ".5", "--left-et", "14", "--right-dial", "13", "--right-rt", ".5", "--right-et", "13.1"}, 2, []string{"--left-mph"}},
		},
		"dial": {
			{[]string{"dial", "--dir", good, "--et", "11.5"}, 2, []string{"--et and --sd together"}},
			{[]string{"dial", "--dir", good, "--et", "11.5", "--sd", "-1"}, 2, []string{"--sd"}},
			{[]string{"dial", "--dir", good, "--et", "fast", "--sd", "0.02"}, 2, []string{"--et"}},
			{[]string{"dial", "--dir", good, "--breakout-risk", "2"}, 2, []string{"--breakout-risk", "0.001..0.5"}},
			{[]string{"dial", "--dir", good, "--dial-step", "1"}, 2, []string{"--dial-step", "0.001..0.1"}},
			{[]string{"dial", "--dir", badSettings}, 2, []string{"dial_step"}},
			{[]string{"dial", "--dir", good, "--rows", "0"}, 2, []string{"--rows"}},
			// a bad value is named before a missing one, with its range
			{[]string{"dial", "--dir", good, "--track-temp", "abc"}, 2, []string{`--track-temp "abc"`, "not a number", "-20..200 °F"}},
			{[]string{"dial", "--dir", good, "--latest", "--track-temp", "900F"}, 2, []string{"--track-temp", "900", "-20..200 °F"}},
			// out of range with the rest of the reading missing: the value is answered first
			{[]string{"dial", "--dir", good, "--track-temp", "900F"}, 2, []string{`--track-temp "900 °F"`, "outside -20..200 °F"}},
			{[]string{"predict", "--dir", good, "--temp", "-80F"}, 2, []string{`--temp "-80 °F"`, "outside"}},
			{[]string{"dial", "--dir", good, "--change", "new\tconverter"}, 2, []string{"--change", `"new\tconverter"`, "control character"}},
			{[]string{"dial", "--dir", good, "--change", strings.Repeat("x", 500)}, 2, []string{"--change", "500 bytes long (at most 200)"}},
		},
		"predict": {
			{with([]string{"predict", "--dir", badCar}, reading...), 2, []string{"car.yaml", "weight_lb", "500..10000"}},
			{with([]string{"predict", "--dir", good, "--prep", "soaked"}, reading...), 2, []string{"--prep"}},
			{with([]string{"predict", "--dir", good, "--logbook", missing}, reading...), 2, []string{"cannot read"}},
			{with([]string{"predict", "--dir", badLog}, reading...), 2, []string{"logbook.csv line"}},
			{with([]string{"predict", "--dir", good, "--track-temp", "300F"}, reading...), 2, []string{"--track-temp", "-20..200"}},
			{[]string{"predict", "--dir", good, "--latest", "--track-temp", "abc"}, 2, []string{`--track-temp "abc"`, "not a number", "-20..200 °F"}},
			{[]string{"predict", "--dir", good, "--track-temp", "abc"}, 2, []string{`--track-temp "abc"`, "-20..200 °F"}},
			{[]string{"predict", "--dir", good, "--latest", "--wind", "breezy"}, 2, []string{`--wind "breezy"`, "0..60 mph"}},
			{[]string{"--units", "metric", "predict", "--dir", good, "--latest", "--track-temp", "hot"}, 2, []string{`--track-temp "hot"`, "-28.89..93.33 °C"}},
			{with([]string{"predict", "--dir", good, "--at", "09:00"}), 2, []string{"before the first reading"}},
		},
		"rules": {
			{[]string{"rules", "check", "--dir", bad}, 2, []string{"1 of 6 rules failed"}},
			{[]string{"rules", "check", "--dir", badRules}, 2, []string{"4 of 9 rules failed",
				"rules/05-number.lua:1: dial is a number, not a function",
				"rules/06-format.lua:2: string.format: argument 2 (for %.0f) is nil",
				"rules/07-table.lua:2: the rule raised an error with a table, not a message",
				"rules/08-nan.lua:2: pit.round_dial was given NaN (not a number)"}},
			{[]string{"rules", "list", "--dir", good, "--format", "xml"}, 2, []string{"--format"}},
			{[]string{"rules", "try", "--dir", good, "--round", "Z9"}, 2, []string{"--round"}},
			{[]string{"rules", "try", "--dir", good, "--lane", "middle"}, 2, []string{"--lane"}},
			{[]string{"rules", "try", "--dir", badSettings}, 2, []string{"dial_step"}},
			{[]string{"rules", "frobnicate", "--dir", good}, 2, []string{"unknown command"}},
		},
		"card": {
			{[]string{"card", "--dir", good, "--format", "pdf"}, 2, []string{"--format", "pdf"}},
			{[]string{"card", "--dir", good, "--opponent-dial", "11,4"}, 2, []string{"--opponent-dial"}},
			{[]string{"card", "--dir", good, "--at", "8pm"}, 2, []string{"--at"}},
			{[]string{"card", "--dir", good, "--track-temp", "abc"}, 2, []string{`--track-temp "abc"`, "-20..200 °F"}},
			{[]string{"card", "--dir", good, "--track-temp", "900F"}, 2, []string{`--track-temp "900 °F"`, "-20..200 °F"}},
			{[]string{"card", "--dir", good, "--change", "new\tconverter"}, 2, []string{"--change", `"new\tconverter"`, "control character"}},
			{[]string{"card", "--dir", good, "--change", strings.Repeat("x", 500)}, 2, []string{"--change", "500 bytes long (at most 200)"}},
			{[]string{"card", "--dir", badCar}, 2, []string{"car.yaml", "weight_lb"}},
			// a bad weather.csv row costs that row: the card prints from the rest (and the flags), names it, exits 2
			{with([]string{"card", "--dir", badWeather, "--round", "3", "--lane", "left"}, reading...), 2, []string{"POST THIS", "weather.csv line 3", "1 row(s) cannot be read, left out"}},
			{[]string{"card", "--dir", badWeather, "--round", "3", "--lane", "left", "--temp", "85F"}, 2, []string{"POST THIS", "weather.csv line 3"}},
			{[]string{"weather", "add", "--dir", badWeather, "--temp", "85F", "--baro", "27.6inHg", "--humidity", "30%"}, 2, []string{"weather.csv line 3", "nothing was written"}},
			{[]string{"card", "--dir", badTrack}, 2, []string{"track.yaml"}},
			{[]string{"card", "--dir", trackKey}, 2, []string{"track.yaml line", "\"surface\" is not a key of this file", "elevation_ft, heading_deg, name, prep"}},
			{[]string{"card", "--dir", badLane}, 2, []string{"schedule.yaml line 9", "lane \"center\"", "left or right"}},
			{[]string{"card", "--dir", badLane, "--round", "3", "--lane", "left"}, 2, []string{"POST THIS", "schedule.yaml line 9"}},
			{[]string{"card", "--dir", badDayStart}, 2, []string{"pitcard.yaml line 6", "day_starts \"18:00\"", "00:00..12:00"}},
			{[]string{"card", "--dir", nanCar}, 2, []string{"car.yaml line 16", "limit_et", "not a finite number"}},
			{[]string{"card", "--dir", good, "--out", filepath.Join(missing, "x", "card.html")}, 1, []string{"writing"}},
		},
		"round": {
			{[]string{"round", "--demo"}, 2, []string{"read-only"}},
			{[]string{"round", "--dir", missing}, 2, []string{"does not exist"}},
			{[]string{"round", "--dir", badCar, "--round", "X"}, 2, []string{"session"}},
			{[]string{"round", "--dir", good, "--lane", "up", "--no-log"}, 2, []string{"lane"}},
			{[]string{"round", "--dir", good, "extra"}, 2, []string{"unknown command"}},
		},
		"init/version": {
			{[]string{"init", good}, 2, []string{"never overwrites"}},
			{[]string{"init"}, 2, []string{"accepts 1 arg"}},
			{[]string{"version", "now"}, 2, []string{"unknown command"}},
			{[]string{"versoin"}, 2, []string{"unknown command"}},
			{[]string{"--units", "furlongs", "air", "--dir", good, "--latest"}, 2, []string{"units", "imperial or metric"}},
		},
	}
	defer func() { // nothing of the opponent book lost: its bad row is written back as it was
		data, _ := os.ReadFile(filepath.Join(badOppAdd, "opponents.csv"))
		if !strings.Contains(string(data), "4471,2026-06-12,E2,11.80,4.5,11.851,no,") || strings.Count(string(data), "\n") != 4 {
			t.Errorf("the opponent book after an append:\n%s", data)
		}
	}()
	for name, cases := range tour {
		for _, c := range cases {
			out, errs, code := pitcard(t, c.args...)
			all := out + errs
			if code != c.code {
				t.Errorf("%s: pitcard %s: exit %d, want %d\n%s", name, strings.Join(c.args, " "), code, c.code, all)
			}
			for _, w := range c.want {
				if !strings.Contains(all, w) {
					t.Errorf("%s: pitcard %s: %q lacks %q", name, strings.Join(c.args, " "), strings.TrimSpace(all), w)
				}
			}
			if strings.Contains(all, "goroutine ") || strings.Contains(all, "panic:") || strings.Contains(all, ".go:") {
				t.Errorf("%s: a stack trace reached the user:\n%s", name, all)
			}
		}
	}
}
