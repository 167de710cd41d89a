// Command demogen writes pitcard's demo event: an invented car, its invented
// home track and two others, a season's logbook and the weather log and
// round schedule of the demo race day. Every pass is the pass model's own
// run, with a known "true" calibration, in the weather of its moment, plus
// the scatter of a real car and driver, so the demo card tells a story the
// physics agrees with. The output is deterministic.
//
//	go run ./internal/demogen -out event/demo
//
// It is not part of the pitcard command: TestDemoIsUpToDate runs it to
// check that the committed demo is what it writes.
package main

import (
	"bytes"
	"flag"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"time"

	"github.com/shopspring/decimal"

	"pitcard/engine"
	"pitcard/logbook"
	"pitcard/weather"
)

// The invented world of the demo. The demo car's grip well (best 105 °F,
// 120 °F wide, engine.GripLossMax deep) loses grip as fast 30 °F from its
// best as the one its logbook was first written with (0.15 deep, 60 °F
// wide): 0.196 % per °F.
var (
	home    = engine.Track{Name: "Juniper Bend Raceway", ElevationFt: 2240, HeadingDeg: 72, Prep: "full"}
	low     = engine.Track{Name: "Salt Creek Dragway", ElevationFt: 460, HeadingDeg: 10, Prep: "full"}
	high    = engine.Track{Name: "Granite Pass Motorplex", ElevationFt: 5100, HeadingDeg: 300, Prep: "light"}
	car     = engine.Car{Name: "Whitlock 71 Ember", WeightLb: 3350, PowerHP: 520, Induction: engine.Natural, DistanceFt: 1320, Tire: "radial"}
	truth   = engine.Params{PowerScale: 0.96, TractionScale: 1.05, PressureExp: 0.95, TempExp: 0.5, TrackOptF: 105, TrackWidthF: 120}
	demoDay = time.Date(2026, 6, 13, 0, 0, 0, 0, time.Local)
)

// raceDay is one day of the season: where, and the afternoon-to-night air.
type raceDay struct {
	date       time.Time
	track      engine.Track
	tempStart  float64 // °F at the first pass
	tempDrop   float64 // °F it cools by the last
	baro       float64 // station inHg
	rh0, rh1   float64
	track0     float64 // track °F at the first pass
	sessions   []string
	firstPass  string // HH:MM
	minutesGap int
}

func main() {
	out := flag.String("out", "event/demo", "folder to write the demo event into")
	flag.Parse()
	n, r, err := generate(*out)
	if err != nil {
		fmt.Fprintln(os.Stderr, "demogen:", err)
		os.Exit(1)
	}
	fmt.Printf("wrote %d passes and %d readings to %s\n", n, r, *out)
}

// generate writes the demo event into out and returns how many passes and
// readings it wrote.
func generate(outDir string) (int, int, error) {
	rng := rand.New(rand.NewPCG(1971, 613))
	v := engine.NewVehicle(car, 0)
	passes := pastSeason(rng, &v)
	// A lifted run with its note, and a pedaled one nobody wrote down.
	lift(&passes[12], 0.42, 6.1, "lifted at 1000 ft: tire shake")
	lift(&passes[35], 0.38, 4.0, "")

	// The demo day at home: readings from 13:30 to 20:30, passes up to round 2.
	log := demoWeather(rng)
	passes = append(passes, demoDayPasses(rng, &v, log, demoSchedule[:5])...)
	writeDemo(outDir, passes, log)
	return len(passes), len(log), firstErr
}

// slot is one session of the demo day's schedule: when it is called to the
// lanes, and the lane when it is drawn ahead ("": not yet).
type slot struct{ session, call, lane string }

// demoSchedule is the demo race day's sessions.
var demoSchedule = []slot{
	{"T1", "15:10", ""}, {"T2", "16:40", ""}, {"T3", "18:05", ""}, {"E1", "19:15", ""}, {"E2", "20:05", ""},
	{"E3", "20:45", "left"}, {"E4", "21:30", ""}, {"E5", "22:10", ""},
}

// pastSeason runs the season before the demo day: nine race days at the
// three invented tracks, each pass in its day's air drawn from rng.
func pastSeason(rng *rand.Rand, v *engine.Vehicle) []logbook.Pass {
	stn := func(t engine.Track, alt float64) float64 { // a station pressure for an altimeter setting
		return weather.StationFromAltimeter(weather.InHg(alt), t.Elevation()).InHg()
	}
	days := []raceDay{
		{time.Date(2026, 3, 28, 0, 0, 0, 0, time.Local), low, 64, 10, stn(low, 30.12), 0.45, 0.70, 88, []string{"test", "test", "test", "test", "test", "test", "test"}, "11:00", 40},
		{time.Date(2026, 4, 11, 0, 0, 0, 0, time.Local), home, 71, 18, stn(home, 30.05), 0.25, 0.45, 104, []string{"T1", "T2", "T3", "E1", "E2", "E3", "E4"}, "13:00", 55},
		{time.Date(2026, 4, 18, 0, 0, 0, 0, time.Local), low, 69, 12, stn(low, 30.21), 0.50, 0.75, 96, []string{"T1", "T2", "E1", "E2", "E3"}, "12:00", 60},
		{time.Date(2026, 4, 25, 0, 0, 0, 0, time.Local), home, 78, 14, stn(home, 29.88), 0.20, 0.35, 116, []string{"T1", "T2", "E1", "E2", "E3"}, "14:00", 60},
		{time.Date(2026, 5, 9, 0, 0, 0, 0, time.Local), low, 86, 16, stn(low, 29.95), 0.55, 0.80, 128, []string{"T1", "T2", "T3", "E1", "E2", "E3", "E4", "E5"}, "13:30", 50},
		{time.Date(2026, 5, 16, 0, 0, 0, 0, time.Local), high, 74, 22, stn(high, 30.02), 0.15, 0.30, 112, []string{"T1", "T2", "E1", "E2", "E3", "E4"}, "12:30", 55},
		{time.Date(2026, 5, 23, 0, 0, 0, 0, time.Local), home, 84, 24, stn(home, 30.10), 0.20, 0.40, 126, []string{"T1", "T2", "T3", "E1", "E2", "E3"}, "15:00", 50},
		{time.Date(2026, 5, 30, 0, 0, 0, 0, time.Local), home, 90, 20, stn(home, 29.92), 0.18, 0.32, 134, []string{"T1", "T2", "T3", "E1", "E2", "E3", "E4", "E5", "E6"}, "13:30", 45},
		{time.Date(2026, 6, 6, 0, 0, 0, 0, time.Local), home, 93, 17, stn(home, 29.97), 0.22, 0.38, 139, []string{"T1", "T2", "T3", "E1", "E2", "E3", "E4"}, "14:00", 55},
	}
	var passes []logbook.Pass
	for _, d := range days {
		first, _ := weather.ParseClock(d.firstPass, d.date, time.Local)
		n := len(d.sessions)
		for k, s := range d.sessions {
			frac := float64(k) / math.Max(float64(n-1), 1)
			r := weather.Reading{
				Time:      first.Add(time.Duration(k*d.minutesGap) * time.Minute),
				Temp:      weather.Fahrenheit(d.tempStart - d.tempDrop*frac + rng.NormFloat64()*0.6),
				Baro:      weather.InHg(d.baro + 0.03*frac + rng.NormFloat64()*0.01),
				RH:        d.rh0 + (d.rh1-d.rh0)*frac,
				Wind:      weather.MPH(math.Max(0, 6-3*frac+rng.NormFloat64()*1.5)),
				WindFrom:  math.Mod(200+rng.NormFloat64()*25+360, 360),
				TrackTemp: weather.Fahrenheit(d.track0 - 1.7*d.tempDrop*frac + rng.NormFloat64()),
				HasTrack:  true,
			}
			passes = append(passes, pass(rng, v, d.track, r, s, k))
		}
	}
	return passes
}

// demoDayPasses runs the demo day's sessions run so far at home, each
// eight minutes after its call, in the air the day's weather log forecasts.
func demoDayPasses(rng *rand.Rand, v *engine.Vehicle, log []weather.Reading, run []slot) []logbook.Pass {
	var passes []logbook.Pass
	for k, sc := range run {
		call, _ := weather.ParseClock(sc.call, demoDay, time.Local)
		when := call.Add(8 * time.Minute)
		f, err := weather.ForecastAt(log, when, home.Elevation())
		if err != nil {
			panic(err)
		}
		r := f.Reading
		r.Baro, r.BaroKind = f.Air.Station, weather.StationPressure
		r.RH, r.DewPointSet = f.Air.RH, false
		passes = append(passes, pass(rng, v, home, r, sc.session, k))
	}
	return passes
}

// writeDemo writes the demo folder into outDir: logbook, weather log,
// track files, car.yaml and the day's schedule. A failure is kept in
// firstErr, not returned.
func writeDemo(outDir string, passes []logbook.Pass, log []weather.Reading) {
	must(os.MkdirAll(filepath.Join(outDir, "tracks"), 0o755))
	var lb bytes.Buffer
	must(logbook.Write(&lb, passes))
	must(os.WriteFile(filepath.Join(outDir, "logbook.csv"), lb.Bytes(), 0o644))
	var wb bytes.Buffer
	must(weather.WriteLog(&wb, log))
	must(os.WriteFile(filepath.Join(outDir, "weather.csv"), wb.Bytes(), 0o644))
	must(os.WriteFile(filepath.Join(outDir, "track.yaml"), trackYAML(home, "the demo's home strip, a quarter mile on a high desert mesa"), 0o644))
	must(os.WriteFile(filepath.Join(outDir, "tracks", "salt-creek.yaml"), trackYAML(low, "a low, humid river-valley strip"), 0o644))
	must(os.WriteFile(filepath.Join(outDir, "tracks", "granite-pass.yaml"), trackYAML(high, "a mountain strip with thin air and light prep"), 0o644))
	must(os.WriteFile(filepath.Join(outDir, "car.yaml"), []byte(carYAML), 0o644))
	var sb bytes.Buffer
	fmt.Fprintf(&sb, "# The demo race day's schedule: when each session is called to the lanes.\ndate: %s\nsessions:\n", demoDay.Format("2006-01-02"))
	for _, sc := range demoSchedule {
		if sc.lane != "" {
			fmt.Fprintf(&sb, "  - {session: %s, call: \"%s\", lane: %s}\n", sc.session, sc.call, sc.lane)
			continue
		}
		fmt.Fprintf(&sb, "  - {session: %s, call: \"%s\"}\n", sc.session, sc.call)
	}
	must(os.WriteFile(filepath.Join(outDir, "schedule.yaml"), sb.Bytes(), 0o644))
}

// pass is the model's run in r with a driver's scatter: 60 ft ±0.008 s
// carried 1.5× to the finish, ±0.009 s more of its own (0.015 s in all).
func pass(rng *rand.Rand, v *engine.Vehicle, t engine.Track, r weather.Reading, session string, k int) logbook.Pass {
	prep, _ := engine.ParsePrep(t.Prep)
	run := engine.Simulate(v, truth, engine.NewEnv(r, t.HeadingDeg, prep, v.MassKg), 1320)
	s, err := logbook.ParseSession(session)
	must(err)
	p := logbook.Pass{Time: r.Time, Track: t.Name, Session: s, Lane: []logbook.Lane{logbook.Left, logbook.Right}[k%2], Air: r, HasAir: true, WeightLb: car.WeightLb}
	e0 := rng.NormFloat64() * 0.008
	gain := [5]float64{1, 1.3, 1.4, 1.5, 1.5}
	sd := [5]float64{0, 0.005, 0.007, 0.008, 0.009}
	for j := range logbook.TimerDistancesFt {
		p.ET[j] = dec(run.ET[j]+e0*gain[j]+rng.NormFloat64()*sd[j], 3)
	}
	p.MPH660 = dec(run.MPH660+rng.NormFloat64()*0.25, 2)
	p.MPH1320 = dec(run.MPH1320+rng.NormFloat64()*0.3, 2)
	rt := 0.012 + math.Abs(rng.NormFloat64())*0.025
	p.RT = dec(rt, 3)
	if s.Kind == logbook.Elimination {
		// the crew dials a few hundredths under what the car runs
		p.Dial = dec(math.Floor((run.ET[4]-0.03)*100)/100, 2)
	}
	r.Baro, r.BaroKind = weather.Pressure(r.Baro), weather.StationPressure
	return p
}

// lift turns a pass into one the driver got out of: slower from 660 ft on.
func lift(p *logbook.Pass, lost, mph float64, note string) {
	for j, ft := range logbook.TimerDistancesFt {
		if ft > 660 {
			et := p.ET[j].Decimal.InexactFloat64() + lost*(ft-660)/660
			p.ET[j] = dec(et, 3)
		}
	}
	p.MPH1320 = dec(p.MPH1320.Decimal.InexactFloat64()-mph*1.8, 2)
	p.Notes = note
}

func dec(v float64, places int32) decimal.NullDecimal {
	return decimal.NewNullDecimal(decimal.NewFromFloat(v).Round(places))
}

// demoWeather is the demo day's weather log: a hot desert afternoon cooling
// into the evening, a reading every 15–30 minutes.
func demoWeather(rng *rand.Rand) []weather.Reading {
	clocks := []string{"13:30", "14:00", "14:30", "15:00", "15:20", "15:45", "16:15", "16:40", "17:00", "17:30",
		"17:50", "18:15", "18:40", "19:00", "19:20", "19:45", "20:05", "20:30"}
	var out []weather.Reading
	for _, c := range clocks {
		t, _ := weather.ParseClock(c, demoDay, time.Local)
		x := float64(t.Hour()) + float64(t.Minute())/60
		temp := 96 - 0.9*(x-15.5)*(x-15.5)
		if x > 15.5 {
			temp = 96 - 2.6*(x-15.5)
		}
		track := 142 - 2.2*math.Pow(math.Max(x-13.5, 0), 1.6)/2*2
		out = append(out, weather.Reading{
			Time: t, Temp: weather.Fahrenheit(math.Round((temp+rng.NormFloat64()*0.25)*10) / 10),
			Baro: weather.InHg(math.Round((27.52+0.012*(x-13.5)+rng.NormFloat64()*0.006)*100) / 100), BaroKind: weather.StationPressure,
			DewPointSet: true, DewPoint: weather.Fahrenheit(math.Round((48+0.6*(x-13.5)+rng.NormFloat64()*0.3)*10) / 10),
			Wind: weather.MPH(math.Round(math.Max(2, 9-0.9*(x-13.5)+rng.NormFloat64()))), WindFrom: math.Round(215 - 6*(x-13.5)),
			TrackTemp: weather.Fahrenheit(math.Round(track)), HasTrack: true,
		})
	}
	return out
}

func trackYAML(t engine.Track, what string) []byte {
	return fmt.Appendf(nil, "# Invented for pitcard's demo: %s.\nname: %s\nelevation_ft: %.0f\nheading_deg: %.0f\nprep: %s\n", what, t.Name, t.ElevationFt, t.HeadingDeg, t.Prep)
}

const carYAML = `# Invented for pitcard's demo: Dana Whitlock's V8 door car, the Ember, crewed by
# her brother Theo. Every name, number and pass in this folder is made up.
name: Whitlock 71 Ember
weight_lb: 3350
power_hp: 520
induction: natural
distance_ft: 1320
tire: radial
transmission: automatic

# The crew's own fields, for their rules (pitcard keeps keys it does not know).
# Safety limits of THIS car, which pitcard's built-in safety checks compare
# the prediction with. These are the invented Ember's own numbers, from its
# invented tech card; no rulebook's. Yours come from your sanctioning body's
# current rulebook and your track's tech inspection.
limit_et: 10.65            # s, at the distance raced (the 1/4 mile here)
limit_mph: 126             # mph, at the distance raced
chute: false
chute_needed_mph: 141      # mph
belts_expire: "2027-03"    # YYYY-MM or MM/YYYY
`

var firstErr error

func must(err error) {
	if err != nil && firstErr == nil {
		firstErr = err
	}
}
