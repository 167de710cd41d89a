// Package truthsim is a second drag-race simulator, for pitcard's tests only:
// a "truth" the pass model is scored against that is deliberately built on
// other physics than engine's, so a model that only fits its own world shows
// as one. It is never shipped in the pitcard command.
//
// Where engine integrates a point mass in speed with traction μ times the
// rear load and a power that follows the SAE J1349 factor, this simulator
// steps in time (0.5 ms) through an engine torque curve, a torque converter
// (K-factor and torque ratio) or a slipping clutch, gears with shift times,
// a wheelspin penalty, weight transfer from the last step's acceleration,
// yaw drag from the crosswind and a speed-dependent rolling resistance. Its
// air laws are its own: a natural engine follows dry-air pressure over the
// square root of temperature (the SAE J607 form), a turbo holds its boost
// and feels mostly the charge temperature, a centrifugal blower sits between,
// a nitrous shot follows bottle pressure. The tire grips best inside a band
// of surface temperature and loses grip on both sides (unequally), the track
// gains grip as rubber goes down through the day, each day brings its own
// tune-up and prep, fuel burns off through the day, and some runs are
// aborted, with a note or without.
//
// Every pass comes with its oracle: the same run without the per-pass noise,
// what a predictor that knew this physics, the car and the day exactly would
// have said. The spread of the logged times around it is the noise floor no
// predictor can beat.
package truthsim

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strconv"
	"strings"
	"time"

	"github.com/shopspring/decimal"

	"pitcard/engine"
	"pitcard/logbook"
	"pitcard/weather"
)

// Car is a car of the truth world, in its own terms.
type Car struct {
	Name      string
	Induction engine.Induction
	WeightLb  float64 // car and driver with full fuel
	FuelLb    float64 // fuel burnt through a day, at most
	BurnLb    float64 // fuel burnt per pass (with its burnout and return)
	PeakHP    float64 // at the simulator's own standard air (60 °F, 29.92 inHg dry)
	PeakRPM   float64 // rpm of peak power
	ShiftRPM  float64
	Gears     []float64
	Final     float64
	TireDiaIn float64
	Tire      string // street, radial, slick
	// Converter launch (StallRPM > 0) or clutch (LaunchRPM > 0).
	StallRPM, StallTR float64
	LaunchRPM         float64
	ShiftS            float64 // s of reduced drive per shift
	CdA, Crr          float64
	WheelbaseIn, CGIn float64
	RearPct           float64
	ShotHP            float64 // nitrous
	BoostPSI          float64 // turbo
	DistanceFt        float64
}

// Track is a track of the truth world.
type Track struct {
	Name        string
	ElevationFt float64
	HeadingDeg  float64
	// LessPrep is how far short of full prep the surface is kept, 0..1:
	// 0 is full prep (the fixed worlds' tracks), 0.5 is what track.yaml
	// calls light. The crew knows it (track.yaml's prep is PrepLevel).
	LessPrep float64
}

// PrepLevel is the track's prep as track.yaml's `prep` writes it, 0 none
// .. 1 full.
func (t Track) PrepLevel() float64 { return 1 - t.LessPrep }

// World is one car at one or more tracks, with its seed.
type World struct {
	Car   Car
	Track Track // the home track
	Seed  uint64
	// Days and PassesPerDay size the season (when Plan is nil).
	Days, PassesPerDay int
	// Others are the other tracks the car travels to (a drawn world's
	// elevation hops); the fixed worlds have none.
	Others []Track
	// Plan is a drawn world's season, day by day (its track and number of
	// passes); nil: Days days of PassesPerDay at Track.
	Plan []DayPlan
	// Laws is a drawn world's structure; nil: the fixed worlds' laws.
	Laws *Laws
	// Claim is how far the crew's car.yaml power is from the truth's (a
	// fraction: dyno sheets flatter, some crews guess low); CarYAML(Claim)
	// is the crew's car.yaml.
	Claim float64
}

// DayPlan is one race day of a drawn season.
type DayPlan struct {
	Track  int // 0: World.Track, i: World.Others[i-1]
	Passes int
}

// TrackOf is the track a DayPlan names.
func (w World) TrackOf(i int) Track {
	if i == 0 {
		return w.Track
	}
	return w.Others[i-1]
}

// AllTracks are the home track and the others.
func (w World) AllTracks() []Track { return append([]Track{w.Track}, w.Others...) }

// Pass is one generated pass: the slip and conditions as a crew logs them,
// and what the truth knows of it.
type Pass struct {
	Logged logbook.Pass
	Oracle [5]float64 // the run without the per-pass noise, s (NaN past the distance)
	// Typical is the run without the noise and with the day's tune-up and
	// prep at their usual: what the physics alone says before the day shows
	// its hand.
	Typical [5]float64
	// TypicalMeasured is Typical in the conditions as logged (the meters'
	// small errors included): all a predictor can know of the air.
	TypicalMeasured [5]float64
	Aborted         bool // lifted, pedalled: not the car's time
	Day             int
	InDay           int // 0 for the day's first pass
	// ChangedHere: the car was changed (gear, converter, jets, tune) just
	// before this pass; the crew's words for it are in Logged.Notes.
	ChangedHere bool
	// Track is the track the pass ran at.
	Track Track
	// the hidden state of the pass, for Sensitivity
	dy   day
	c    cond
	mass float64
	car  Car
}

// Sensitivity is what the truth's physics says a change is worth to this
// pass's finish ET (noiseless, s): 10 °F more surface temperature, 10 °F
// warmer air (same dew point), 0.1 inHg less station pressure, an hour more
// rubber on the track.
func (w World) Sensitivity(p Pass) (track, air, baro, rubber float64) {
	w.Car = p.car
	fin := FinishIndex(w.Car.DistanceFt)
	base := w.simulate(p.dy, p.c, p.mass, quiet, false).et[fin]
	with := func(edit func(*cond)) float64 {
		c := p.c
		edit(&c)
		return w.simulate(p.dy, c, p.mass, quiet, false).et[fin] - base
	}
	return with(func(c *cond) { c.trackF += 10 }), with(func(c *cond) { c.tempF += 10 }),
		with(func(c *cond) { c.stationInHg -= 0.1 }), with(func(c *cond) { c.hoursIn += 1 })
}

// tire grip: peak μ, the band of best surface temperature (°F) and the
// losses outside it (fraction of μ per °F² below and above).
type tire struct {
	mu, lo, hi, cold, hot float64
	cliffF, cliffDrop     float64 // a drawn world's cliff (see Laws)
	cliffSide             int
}

func tireOf(kind string) tire {
	switch kind {
	case "street":
		return tire{mu: 1.45, lo: 85, hi: 115, cold: 0.00008, hot: 0.00006}
	case "slick":
		return tire{mu: 2.5, lo: 105, hi: 135, cold: 0.00012, hot: 0.00005}
	}
	return tire{mu: 2.0, lo: 95, hi: 125, cold: 0.0001, hot: 0.00007} // drag radial
}

// day is one race day's hidden state.
type day struct {
	date        time.Time
	tune        float64 // × engine power
	prep        float64 // × grip
	bottle      float64 // × nitrous shot
	tBase, tAmp float64 // °F: evening temperature and the afternoon's extra
	dew         float64 // °F
	baro, drift float64 // inHg station pressure at 13:00, and per hour
	wind, windD float64 // mph, from °
	clouds      float64 // 0..1: less sun on the track
	start       time.Time
	trk         Track
}

// conditions at one moment.
type cond struct {
	tempF, dewF, stationInHg, trackF float64
	windMPH, windFrom                float64
	hoursIn                          float64 // hours since the day's first pass
	soakMin                          float64 // minutes since the car's last pass; 0: first of the day
}

func (w World) rng(stream uint64) *rand.Rand { return rand.New(rand.NewPCG(w.Seed, stream)) }

// Season generates the world's season: Days race days a week apart, each
// with PassesPerDay passes from early afternoon into the night.
//
// A drawn world (Laws set) follows its Plan, and draws what the fixed
// worlds lack from a second stream, so the fixed worlds' seasons are the
// same as before drawn worlds existed.
func (w World) Season() []Pass {
	r := w.rng(1)
	r2 := w.rng(2) // the drawn worlds' extras
	L := w.laws()
	plan := w.plan()
	car := w.Car
	var out []Pass
	start := time.Date(2026, 4, 4, 0, 0, 0, 0, time.UTC)
	for d, dp := range plan {
		trk := w.TrackOf(dp.Track)
		date := start.AddDate(0, 0, 7*d)
		season := math.Sin(math.Pi * float64(d) / float64(max(len(plan)-1, 1))) // spring → summer → autumn
		dy := raceDay(trk, date, season, L, r)
		fuel := 0.0
		t := dy.start
		soak := 0.0
		for k := range dp.Passes {
			change := L.changeAt(len(out))
			if change != nil {
				car = change.apply(car)
			}
			ww := w
			ww.Car, ww.Track = car, trk
			c := w.conditions(dy, t, r)
			c.soakMin = soak
			p := w.seasonPass(ww, L, dy, c, t, car.WeightLb-fuel, d, k, change, r, r2)
			out = append(out, p)
			fuel = math.Min(fuel+car.BurnLb, car.FuelLb)
			gap := time.Duration(40+r.IntN(50)) * time.Minute
			if L.ShortTurn > 0 && r2.Float64() < L.ShortTurn {
				gap = time.Duration(12+r2.IntN(18)) * time.Minute // called back quickly: the car is still hot
			}
			t = t.Add(gap)
			soak = gap.Minutes()
		}
	}
	return out
}

// raceDay draws one race day at trk on date (season: 0 in spring and
// autumn, 1 in high summer): the car's tune and prep that day, the day's
// air and when the first pass runs. It draws from r in a fixed order, which
// a change here would alter for every world.
func raceDay(trk Track, date time.Time, season float64, L *Laws, r *rand.Rand) day {
	dy := day{
		trk:    trk,
		date:   date,
		tune:   1 + L.TuneSD*r.NormFloat64(),
		prep:   1 + L.PrepSD*r.NormFloat64(),
		bottle: 1 + 0.03*r.NormFloat64(),
		tBase:  58 + 22*season + 6*r.NormFloat64(),
		tAmp:   10 + 6*r.Float64(),
		baro:   29.92*math.Pow(1-6.8753e-6*trk.ElevationFt, 5.2559) + 0.25*r.NormFloat64(),
		drift:  0.012 * r.NormFloat64(),
		wind:   math.Abs(4 + 4*r.NormFloat64()),
		windD:  360 * r.Float64(),
		clouds: r.Float64() * 0.6,
		start:  date.Add(time.Duration(12*60+r.IntN(180)) * time.Minute),
	}
	dy.dew = dy.tBase - 8 - 18*r.Float64()
	return dy
}

// seasonPass runs the k-th pass of day d at time t in conditions c, with
// the car and track of ww at mass lb: the pass as run, the oracle's and a
// typical day's elapsed times, and the pass as the crew logs it (their
// reading and slip). It does not move the clock or burn fuel.
func (w World) seasonPass(ww World, L *Laws, dy day, c cond, t time.Time, mass float64, d, k int, change *Change, r, r2 *rand.Rand) Pass {
	abort := r.Float64() < 0.04
	noise := noiseOf(r)
	ran := ww.simulate(dy, c, mass, noise, abort)
	oracle := ww.simulate(dy, c, mass, quiet, false)
	usual := dy
	usual.tune, usual.prep, usual.bottle = 1, 1, 1
	typical := ww.simulate(usual, c, mass, quiet, false)
	// the crew's reading: taken minutes before the pass in a drawn world
	read, readAt := c, t
	if L.LagMin[1] > 0 {
		lag := L.LagMin[0] + (L.LagMin[1]-L.LagMin[0])*r2.Float64()
		readAt = t.Add(-time.Duration(lag * float64(time.Minute)))
		read = w.conditions(dy, readAt, r2)
	}
	p := ww.logged(read, readAt, t, k, mass, ran, r, r2)
	typicalMeasured := ww.simulate(usual, measuredConditions(c, p, dy.trk), mass, quiet, false)
	if abort && r.Float64() < 0.5 {
		p.Notes = "lifted"
	}
	if change != nil {
		p.Notes = strings.TrimPrefix(change.Words+"; "+p.Notes, "; ")
		p.Notes = strings.TrimSuffix(p.Notes, "; ")
	}
	return Pass{Logged: p, Oracle: oracle.et, Typical: typical.et, TypicalMeasured: typicalMeasured.et,
		Aborted: abort, Day: d, InDay: k, ChangedHere: change != nil, Track: dy.trk, dy: dy, c: c, mass: mass, car: ww.Car}
}

// measuredConditions is c as the crew's meters read it in the logged pass
// p at trk. A surface not read is one a predictor cannot know: the floor
// takes the truth's (a floor a shade lower than can be reached).
func measuredConditions(c cond, p logbook.Pass, trk Track) cond {
	measured := c
	a := p.Air.Derive(weather.Feet(trk.ElevationFt))
	measured.tempF, measured.dewF, measured.stationInHg = p.Air.Temp.Fahrenheit(), a.DewPoint.Fahrenheit(), a.Station.InHg()
	measured.windMPH, measured.windFrom = p.Air.Wind.MPH(), p.Air.WindFrom
	if p.Air.HasTrack {
		measured.trackF = p.Air.TrackTemp.Fahrenheit()
	}
	return measured
}

// Passes is the number of passes in the season.
func (w World) Passes() int {
	n := 0
	for _, d := range w.plan() {
		n += d.Passes
	}
	return n
}

// plan is the season day by day.
func (w World) plan() []DayPlan {
	if w.Plan != nil {
		return w.Plan
	}
	out := make([]DayPlan, w.Days)
	for i := range out {
		out[i] = DayPlan{Track: 0, Passes: w.PassesPerDay}
	}
	return out
}

// The temperature of the air follows the afternoon down into the night; the
// track holds the sun's heat and loses it after sunset.
func (w World) conditions(dy day, t time.Time, r *rand.Rand) cond {
	hour := float64(t.Hour()) + float64(t.Minute())/60
	warm := math.Max(0, math.Cos((hour-15)/12*math.Pi)) // 1 at 15:00, 0 from 21:00
	temp := dy.tBase + dy.tAmp*warm + 0.6*r.NormFloat64()
	sun := math.Max(0, math.Cos((hour-13.5)/14*math.Pi)) // the sun on the surface
	track := temp + (1-dy.clouds)*45*sun*sun + 3 + 1.5*r.NormFloat64()
	hours := t.Sub(dy.start).Hours()
	gust := 1.5 * r.NormFloat64()
	return cond{tempF: temp, dewF: math.Min(dy.dew+0.3*r.NormFloat64(), temp-1), stationInHg: dy.baro + dy.drift*(hour-13),
		trackF: track, windMPH: math.Max(0, dy.wind*(0.6+0.4*warm)+gust), windFrom: math.Mod(dy.windD+10*r.NormFloat64()+360, 360), hoursIn: hours}
}

// noise is one pass's random departures: the launch (grip), the engine, the
// shifts.
type noise struct{ grip, power, shift float64 }

var quiet = noise{1, 1, 0}

func noiseOf(r *rand.Rand) noise {
	return noise{grip: 1 + 0.012*r.NormFloat64(), power: 1 + 0.003*r.NormFloat64(), shift: 0.008 * r.NormFloat64()}
}

// vaporHPa is the vapour pressure at dew point d °F (Magnus–Tetens, the
// simulator's own choice: pitcard's weather package uses Buck).
func vaporHPa(dF float64) float64 {
	c := (dF - 32) / 1.8
	return 6.1078 * math.Exp(17.27*c/(c+237.3))
}

// airFactor is engine power relative to the simulator's standard air.
// A drawn world's laws change the exponents and may set a boost
// controller's altitude limit (see Laws).
func (w World) airFactor(c cond) float64 {
	const stdK, stdDry = 519.67 / 1.8, 29.92
	L := w.laws()
	k := (c.tempF + 459.67) / 1.8
	dry := c.stationInHg - vaporHPa(c.dewF)/33.8639
	na := dry / stdDry * math.Sqrt(stdK/k)
	switch w.Car.Induction {
	case engine.Turbo: // boost held: the charge temperature after the intercooler, a little back pressure
		f := math.Pow(stdK/k, L.ChargeExp) * (1 + L.BackPressure*(dry/stdDry-1))
		if L.BoostLimitInHg > 0 && dry < L.BoostLimitInHg {
			// past the compressor's limit the boost falls with the air: the
			// manifold pressure follows the inlet's
			f *= dry / L.BoostLimitInHg
		}
		return f
	case engine.Supercharged: // a centrifugal blower with a bypass valve: part way
		return math.Pow(na, L.BlowerExp)
	}
	return math.Pow(na, L.NaturalExp)
}

// torqueNm is the engine's torque at rpm in standard air: a curve peaking at
// 75 % of the power peak's rpm, falling away on both sides.
func (w World) torqueNm(rpm float64) float64 {
	peakT := w.Car.PeakHP * 745.7 / (w.Car.PeakRPM * 2 * math.Pi / 60) * 1.08
	x := (rpm - 0.75*w.Car.PeakRPM) / (0.75 * w.Car.PeakRPM)
	return peakT * math.Max(0.35, 1-0.55*x*x)
}

// run is one simulated pass: the elapsed time at each timer and the trap
// speeds over the 66 ft before 660 and 1320 ft (NaN past the distance).
type run struct {
	et    [5]float64
	traps [2]float64
}

// simulate steps one pass in time.
// It stays long: an integration loop whose state each step carries to the next reads best whole.
func (w World) simulate(dy day, c cond, massLb float64, n noise, abort bool) run {
	car := w.Car
	const dt = 0.0005
	g := 9.80665
	m := massLb * 0.45359237
	radius := car.TireDiaIn * 0.0254 / 2
	k := (c.tempF + 459.67) / 1.8
	dryPa := (c.stationInHg - vaporHPa(c.dewF)/33.8639) * 3386.389
	rho := dryPa/(287.058*k) + vaporHPa(c.dewF)*100/(461.495*k)
	L := w.laws()
	power := w.airFactor(c) * dy.tune * n.power
	if L.SoakLoss > 0 && c.soakMin > 0 {
		// heat soak: a car called back quickly runs a hotter intake
		power *= 1 - L.SoakLoss*math.Max(0, 1-c.soakMin/45)
	}
	ti := L.tire(car.Tire)
	loss := ti.loss(c.trackF)
	rubber := 1 + L.Rubber*(1-math.Exp(-c.hoursIn/L.RubberHours))
	mu := ti.mu * math.Max(0.55, 1-loss) * rubber * dy.prep * n.grip
	if dy.trk.LessPrep > 0 {
		mu *= prepGrip(dy.trk.LessPrep)
	}
	rad := (c.windFrom - dy.trk.HeadingDeg) * math.Pi / 180
	head := c.windMPH * 0.44704 * math.Cos(rad)
	cross := math.Abs(c.windMPH * 0.44704 * math.Sin(rad))
	shot := 0.0
	if car.Induction == engine.Nitrous {
		shot = car.ShotHP * 745.7 * dy.bottle * (1 + 0.01*c.hoursIn) // the bottle warms through the night
	}
	// the rear suspension's anti-squat plants the tires harder than the CG
	// height alone would: half again the static transfer
	rear, hl := car.RearPct/100, 1.5*car.CGIn/car.WheelbaseIn
	end := car.DistanceFt * 0.3048
	// the marks: the five timers, then the start of each trap
	marks := []float64{60, 330, 594, 660, 1000, 1254, 1320}
	at := make([]float64, len(marks))
	for i := range at {
		at[i] = math.NaN()
	}
	x, v, t, a := 0.0, 0.0, 0.0, 0.0
	omega := 0.0 // engine speed, rpm
	if car.StallRPM > 0 {
		omega = car.StallRPM * 0.6
	} else {
		omega = car.LaunchRPM
	}
	gear, shiftLeft := 0, 0.0
	start, next := math.NaN(), 0
	const inertia = 0.22 // kg m², engine and converter or flywheel
	for step := 0; step < 200000 && x < end+1; step++ {
		ratio := car.Gears[gear] * car.Final
		wheelRPM := v / radius * 60 / (2 * math.Pi) * ratio // the engine side of the drivetrain
		engT := w.torqueNm(omega) * power
		if shot > 0 && omega > 0.5*car.PeakRPM {
			engT += shot / (omega * 2 * math.Pi / 60)
		}
		if abort && x > 0.45*end {
			engT = 0
		}
		var outT float64 // torque into the gearbox
		if car.StallRPM > 0 {
			kf := car.StallRPM / math.Sqrt(w.torqueNm(car.StallRPM)*power*1.05)
			sr := math.Min(wheelRPM/math.Max(omega, 1), 1)
			inT := sq(omega/kf) * (1 - math.Pow(sr, 6))
			if sr > 0.9 {
				inT = math.Max(inT, engT) // locked up
			}
			tr := 1.0
			if sr < 0.85 {
				tr = car.StallTR - (car.StallTR-1)*sr/0.85
			}
			outT = inT * tr
			omega += (engT - inT) / inertia * dt * 60 / (2 * math.Pi)
			omega = math.Max(omega, wheelRPM)
		} else { // clutch: slips at launch, then locked
			if omega > wheelRPM*1.02 {
				capT := 1.6 * engT * math.Min(1, 0.6+t/0.5)
				outT = capT
				omega += (engT - capT) / inertia * dt * 60 / (2 * math.Pi)
				omega = math.Max(omega, wheelRPM)
			} else {
				omega, outT = wheelRPM, engT
			}
		}
		if shiftLeft > 0 {
			outT *= 0.25
			shiftLeft -= dt
		}
		drive := outT * ratio * 0.88 / radius
		grip := mu * m * (g*rear + a*hl)
		if drive > grip {
			drive = 0.92 * grip // wheelspin
		}
		vRel := v + head
		yaw := 1.0
		if vRel > 5 {
			yaw = 1 + 1.2*sq(cross/vRel)
		}
		drag := 0.5*rho*car.CdA*yaw*vRel*math.Abs(vRel) + car.Crr*(1+v/60)*m*g
		a = (drive - drag) / m
		v = math.Max(v+a*dt, 0)
		xNew := x + v*dt
		t += dt
		if math.IsNaN(start) && xNew >= 0.3048 {
			start = t - dt*(xNew-0.3048)/(xNew-x)
		}
		for next < len(marks) && marks[next] <= car.DistanceFt && xNew >= marks[next]*0.3048 {
			at[next] = t - dt*(xNew-marks[next]*0.3048)/(xNew-x) - start
			next++
		}
		x = xNew
		if gear < len(car.Gears)-1 && omega >= car.ShiftRPM && shiftLeft <= 0 {
			gear++
			shiftLeft = car.ShiftS + n.shift
			omega = wheelRPM * car.Gears[gear] / car.Gears[gear-1]
		}
	}
	out := run{et: [5]float64{at[0], at[1], at[3], at[4], at[6]}, traps: [2]float64{math.NaN(), math.NaN()}}
	for j, ends := range [][2]int{{2, 3}, {5, 6}} {
		if d := at[ends[1]] - at[ends[0]]; d > 0 {
			out.traps[j] = 66 / d / 1.46667
		}
	}
	return out
}

// logged is what the crew writes down: the slip to the thousandth, the
// weather as their meters read it (a little off), the weight when weighed.
//
// c is the reading's conditions, taken at readAt (a drawn world's reading
// is minutes old at the pass); t is the pass's time. r2 draws a drawn
// world's meter gaps (timers and surface not read).
func (w World) logged(c cond, readAt, t time.Time, k int, massLb float64, ran run, r, r2 *rand.Rand) logbook.Pass {
	L := w.laws()
	trk := w.Track
	et := ran.et
	ses := logbook.Session{Kind: logbook.TimeTrial, N: k + 1}
	if k >= 3 {
		ses = logbook.Session{Kind: logbook.Elimination, N: k - 2}
	}
	p := logbook.Pass{Time: t, Track: trk.Name, Session: ses, Lane: []logbook.Lane{logbook.Left, logbook.Right}[r.IntN(2)]}
	for i, ft := range logbook.TimerDistancesFt {
		if ft <= w.Car.DistanceFt && !math.IsNaN(et[i]) {
			p.ET[i] = decimal.NewNullDecimal(decimal.NewFromFloat(et[i]).Round(3))
		}
	}
	if v := ran.traps[0]; !math.IsNaN(v) {
		p.MPH660 = decimal.NewNullDecimal(decimal.NewFromFloat(v + 0.25*r.NormFloat64()).Round(2))
	}
	if v := ran.traps[1]; !math.IsNaN(v) {
		p.MPH1320 = decimal.NewNullDecimal(decimal.NewFromFloat(v + 0.25*r.NormFloat64()).Round(2))
	}
	b := L.Bias
	p.Air = weather.Reading{Time: readAt, Temp: weather.Fahrenheit(round(c.tempF+0.4*r.NormFloat64()+b.TempF, 1)),
		Baro: weather.InHg(round(c.stationInHg+0.008*r.NormFloat64()+b.BaroInHg, 2)), BaroKind: weather.StationPressure,
		DewPointSet: true, DewPoint: weather.Fahrenheit(round(math.Min(c.dewF+0.8*r.NormFloat64()+b.DewF, c.tempF), 1)),
		Wind: weather.MPH(round(c.windMPH, 0)), WindFrom: round(c.windFrom, 0),
		TrackTemp: weather.Fahrenheit(round(c.trackF+2.5*r.NormFloat64()+b.TrackF, 0)), HasTrack: true}
	// the log keeps relative humidity, as a meter shows it
	a := p.Air.Derive(weather.Feet(trk.ElevationFt))
	p.Air.DewPointSet, p.Air.RH = false, math.Round(a.RH*100)/100
	p.HasAir = true
	if r.Float64() < 0.7 {
		p.WeightLb = math.Round(massLb/5) * 5
	}
	if L.NoTrackTemp > 0 && r2.Float64() < L.NoTrackTemp {
		p.Air.HasTrack, p.Air.TrackTemp = false, 0
	}
	fin := FinishIndex(w.Car.DistanceFt)
	switch u := r2.Float64(); {
	case u < L.FinishOnly: // a slip with only the finish (a handwritten note of the ET)
		for i := range p.ET {
			if i != fin {
				p.ET[i] = decimal.NullDecimal{}
			}
		}
		if fin > 2 { // the eighth's trap, unless it is the finish's
			p.MPH660 = decimal.NullDecimal{}
		}
	case u < L.FinishOnly+L.No1000 && fin > 3: // the 1000-ft clock was down
		p.ET[3] = decimal.NullDecimal{}
	}
	return p
}

func sq(x float64) float64 { return x * x }

func round(v float64, d int) float64 {
	p := math.Pow(10, float64(d))
	return math.Round(v*p) / p
}

// CarYAML is what the crew writes in car.yaml for this car: the weight with
// full fuel rounded, the power the dyno sheet claimed (off by a few
// percent), the induction, distance and tire; no gearing.
func (w World) CarYAML(claimOff float64) engine.Car {
	tr := "automatic"
	if w.Car.StallRPM == 0 {
		tr = "manual"
	}
	hp := w.Car.PeakHP * (1 + claimOff)
	if w.Car.Induction == engine.Nitrous {
		hp = w.Car.PeakHP * (1 + claimOff)
	}
	return engine.Car{Name: w.Car.Name, WeightLb: math.Round(w.Car.WeightLb/10) * 10, PowerHP: math.Round(hp),
		Induction: w.Car.Induction, NitrousHP: w.Car.ShotHP, DistanceFt: w.Car.DistanceFt, Tire: w.Car.Tire, Transmission: tr}
}

// EngineTrack is the home track as a crew's track.yaml says it.
func (w World) EngineTrack() engine.Track { return w.Track.Engine() }

// Engine is the track as a crew's track.yaml says it: its prep "full", or
// the level as a number.
func (t Track) Engine() engine.Track {
	prep := "full"
	if t.LessPrep > 0 {
		prep = strconv.FormatFloat(t.PrepLevel(), 'f', 2, 64)
	}
	return engine.Track{Name: t.Name, ElevationFt: t.ElevationFt, HeadingDeg: t.HeadingDeg, Prep: prep}
}

// String names the world in a test's log.
func (w World) String() string {
	return fmt.Sprintf("%s (%s, %s tire, %.0f ft, %.0f ft up)", w.Car.Name, w.Car.Induction, w.Car.Tire, w.Car.DistanceFt, w.Track.ElevationFt)
}

// Worlds are the seasons pitcard's pass model is scored on: natural,
// turbo, supercharged and nitrous cars; eighth, 1000-ft and quarter-mile
// racing; street tires to slicks; converters and clutches; sea level to
// 5000 ft. Invented cars at invented tracks.
func Worlds() []World {
	// the claims are engine/generalise_test.go's: how far each crew's
	// car.yaml power is from the truth's
	claims := map[uint64]float64{101: 0.06, 202: -0.05, 303: 0.10, 404: 0.0, 505: -0.08, 606: 0.04}
	w := func(seed uint64, c Car, t Track) World {
		return World{Car: c, Track: t, Seed: seed, Days: 12, PassesPerDay: 7, Claim: claims[seed]}
	}
	low := Track{Name: "Saltmarsh Flats", ElevationFt: 20, HeadingDeg: 350}
	mid := Track{Name: "Cedar Bench", ElevationFt: 2500, HeadingDeg: 75}
	high := Track{Name: "Granite Mesa", ElevationFt: 5000, HeadingDeg: 200}
	return []World{
		w(101, Car{Name: "NA radial bracket car", Induction: engine.Natural, WeightLb: 3350, FuelLb: 60, BurnLb: 7, PeakHP: 520, PeakRPM: 6200, ShiftRPM: 6600,
			Gears: []float64{2.48, 1.48, 1.0}, Final: 4.10, TireDiaIn: 28, Tire: "radial", StallRPM: 3800, StallTR: 2.0, ShiftS: 0.10,
			CdA: 0.78, Crr: 0.016, WheelbaseIn: 108, CGIn: 20, RearPct: 47, DistanceFt: 1320}, mid),
		w(202, Car{Name: "turbo slick eighth-miler", Induction: engine.Turbo, WeightLb: 3100, FuelLb: 40, BurnLb: 5, PeakHP: 850, PeakRPM: 6800, ShiftRPM: 7200,
			Gears: []float64{1.76, 1.0}, Final: 3.73, TireDiaIn: 30, Tire: "slick", StallRPM: 4500, StallTR: 2.2, ShiftS: 0.08, BoostPSI: 14,
			CdA: 0.72, Crr: 0.018, WheelbaseIn: 110, CGIn: 19, RearPct: 50, DistanceFt: 660}, low),
		w(303, Car{Name: "blown radial 1000-ft car", Induction: engine.Supercharged, WeightLb: 3500, FuelLb: 50, BurnLb: 8, PeakHP: 900, PeakRPM: 7000, ShiftRPM: 7400,
			Gears: []float64{2.48, 1.48, 1.0}, Final: 3.73, TireDiaIn: 29, Tire: "radial", StallRPM: 4200, StallTR: 2.1, ShiftS: 0.09,
			CdA: 0.80, Crr: 0.016, WheelbaseIn: 108, CGIn: 21, RearPct: 46, DistanceFt: 1000}, high),
		w(404, Car{Name: "nitrous street-tire stick car", Induction: engine.Nitrous, WeightLb: 3200, FuelLb: 50, BurnLb: 6, PeakHP: 400, ShotHP: 150, PeakRPM: 6500, ShiftRPM: 7000,
			Gears: []float64{2.95, 1.94, 1.34, 1.0}, Final: 3.73, TireDiaIn: 27, Tire: "street", LaunchRPM: 4500, ShiftS: 0.25,
			CdA: 0.74, Crr: 0.015, WheelbaseIn: 106, CGIn: 21, RearPct: 45, DistanceFt: 1320}, low),
		w(505, Car{Name: "NA street-tire eighth-miler", Induction: engine.Natural, WeightLb: 3600, FuelLb: 60, BurnLb: 5, PeakHP: 330, PeakRPM: 5500, ShiftRPM: 5800,
			Gears: []float64{2.74, 1.54, 1.0}, Final: 3.55, TireDiaIn: 27, Tire: "street", StallRPM: 3000, StallTR: 2.0, ShiftS: 0.12,
			CdA: 0.85, Crr: 0.014, WheelbaseIn: 112, CGIn: 22, RearPct: 44, DistanceFt: 660}, high),
		w(606, Car{Name: "turbo radial quarter-miler", Induction: engine.Turbo, WeightLb: 3400, FuelLb: 60, BurnLb: 8, PeakHP: 700, PeakRPM: 6500, ShiftRPM: 6900,
			Gears: []float64{2.48, 1.48, 1.0}, Final: 3.55, TireDiaIn: 28, Tire: "radial", StallRPM: 4000, StallTR: 2.1, ShiftS: 0.09, BoostPSI: 12,
			CdA: 0.76, Crr: 0.016, WheelbaseIn: 108, CGIn: 20, RearPct: 47, DistanceFt: 1320}, mid),
	}
}

// FinishIndex is the index in logbook.Timers of a distance's finish line.
func FinishIndex(ft float64) int {
	for i, t := range logbook.TimerDistancesFt {
		if t == ft {
			return i
		}
	}
	return len(logbook.TimerDistancesFt) - 1
}
