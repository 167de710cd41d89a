package engine

import (
	"math"
	"strings"
	"sync"

	"pitcard/logbook"
	"pitcard/weather"
)

// The physics of one pass: a point mass pushed by the rear tires, the push
// limited by traction (μ times the rear load, with weight transfer) until
// the engine's power is the limit, against aerodynamic drag in the air of the
// day (with the wind along the track) and rolling resistance.
//
// The force depends on speed only, so the pass is integrated in speed rather
// than time: t(v) = ∫ m/F du and x(v) = ∫ m·u/F du, by Simpson's rule between
// nodes placed at every kink (the traction-to-power crossover, each shift).
// Timers are then read off by cubic Hermite interpolation, which is exact to
// well under a thousandth with a few hundred force evaluations a pass.

// Defaults of the optional car.yaml fields (assumptions for an ordinary
// full-bodied bracket car; calibration absorbs what they get wrong).
const (
	// DefaultDrivetrainLoss is the share of flywheel power lost before the
	// tires: an automatic, solid axle.
	DefaultDrivetrainLoss = 0.15
	// DefaultCdA is the drag area, m²: Cd 0.38 × 2.0 m² frontal area.
	DefaultCdA = 0.75
	// DefaultRollingCoeff is a drag tire's rolling resistance coefficient.
	DefaultRollingCoeff = 0.015
	// DefaultWheelbaseIn is the wheelbase, in.
	DefaultWheelbaseIn = 108.0
	// DefaultCGHeightIn is the centre of gravity's height, in.
	DefaultCGHeightIn = 20.0
	// DefaultRearWeightPct is the share of the weight on the rear axle, %.
	DefaultRearWeightPct = 48.0
	// DefaultShiftTime is the time of one shift, s, with gears given.
	DefaultShiftTime = 0.15
	// DefaultPowerFraction is the share of peak power the engine delivers
	// through the gears at speed when no gearing is given: the rpm falls at
	// every shift (assumption, from memory). At low speed the converter or
	// clutch slips and first gear is short: LaunchPowerLoss of it is lost at
	// a standstill, fading exponentially over LaunchPowerSpeed (30 m/s, about
	// 67 mph). The shape puts a car's eighth-to-quarter ratios inside the
	// trade's bands; calibration fits the level.
	DefaultPowerFraction = 0.88
	// LaunchPowerLoss is the share of power lost at a standstill (see
	// DefaultPowerFraction).
	LaunchPowerLoss = 0.40
	// LaunchPowerSpeed is the speed, m/s, over which the launch loss fades
	// (see DefaultPowerFraction).
	LaunchPowerSpeed = 30.0
	// Rollout is how far the car moves before the clock starts: the front
	// tire has to clear the staging beam (common practice: about a foot).
	Rollout = 1.0 * MetrePerFt
	// TrapLengthFt is the length over which trap speed is averaged: the 66 ft
	// before the eighth and the finish (common practice, no source).
	TrapLengthFt = 66.0
)

// MetrePerFt is the international foot.
const MetrePerFt = weather.MetrePerFt

const g0 = weather.GravitySI

// Vehicle is the physical car, from car.yaml with every default applied.
type Vehicle struct {
	PowerW      float64 // peak flywheel power in SAE J1349 standard air, W
	NitrousW    float64 // added nitrous power, W (ignores the air)
	Induction   Induction
	Efficiency  float64 // 1 − drivetrain loss
	CdA         float64 // m²
	Crr         float64
	RearStatic  float64 // share of weight on the rear tires
	HOverL      float64 // CG height over wheelbase
	TireMu      float64
	TireBestF   float64 // surface temperature the tire grips best at, °F (the prior's)
	TireRadius  float64 // m; 0 = no gearing given
	Gears       []float64
	FinalDrive  float64
	ShiftTime   float64 // s
	PeakRPM     float64
	ShiftRPM    float64
	LaunchRPM   float64
	Automatic   bool
	PowerFrac   float64 // average share of power, simple mode
	MassKg      float64 // car and driver as in car.yaml
	DistanceFt  float64
	DefaultPrep float64
}

// NewVehicle turns a car description into a physical vehicle. powerHP
// overrides car.PowerHP (for a power estimated from the traps).
func NewVehicle(c Car, powerHP float64) Vehicle {
	or := func(v, d float64) float64 {
		if v == 0 {
			return d
		}
		return v
	}
	if powerHP == 0 {
		powerHP = c.PowerHP
	}
	v := Vehicle{
		PowerW:     powerHP * WattPerHP,
		NitrousW:   c.NitrousHP * WattPerHP,
		Induction:  c.Induction,
		Efficiency: 1 - or(c.DrivetrainLoss, DefaultDrivetrainLoss),
		CdA:        or(c.CdA, DefaultCdA),
		Crr:        or(c.RollingCoeff, DefaultRollingCoeff),
		RearStatic: or(c.RearWeightPct, DefaultRearWeightPct) / 100,
		HOverL:     or(c.CGHeightIn, DefaultCGHeightIn) / or(c.WheelbaseIn, DefaultWheelbaseIn),
		TireMu:     TireMu(c.Tire),
		TireBestF:  TireBestF(c.Tire),
		PowerFrac:  DefaultPowerFraction,
		MassKg:     c.WeightLb * weather.KgPerLb,
		DistanceFt: c.DistanceFt,
		Automatic:  !strings.EqualFold(c.Transmission, "manual"),
	}
	if c.Induction != Nitrous {
		v.NitrousW = 0
	}
	if len(c.Gears) > 0 && c.FinalDrive > 0 && c.TireDiameterIn > 0 {
		v.Gears = c.Gears
		v.FinalDrive = c.FinalDrive
		v.TireRadius = c.TireDiameterIn * 0.0254 / 2
		v.ShiftTime = or(c.ShiftTimeS, DefaultShiftTime)
		v.PeakRPM = or(c.PeakRPM, 6000)
		v.ShiftRPM = or(c.ShiftRPM, v.PeakRPM*1.08)
		v.LaunchRPM = or(c.LaunchRPM, v.PeakRPM*0.55)
	}
	return v
}

// WattPerHP is one mechanical horsepower (550 ft·lbf/s).
const WattPerHP = 745.69987

// Params are the parameters calibration fits to the car's logbook.
type Params struct {
	PowerScale    float64 // × the car's power (1 = car.yaml is right)
	TractionScale float64 // × the tire's μ
	// How the engine's power follows the air: power ∝ (dry-air pressure /
	// 99 kPa)^PressureExp × (298.15 K / air temperature)^TempExp. SAE J607's
	// correction is exactly 1 and ½ (a natural engine breathes dry air by
	// pressure over the square root of temperature); a boost-controlled
	// engine feels the pressure much less.
	PressureExp, TempExp float64
	// The tire's grip against the surface temperature: best at TrackOptF,
	// in a well TrackWidthF wide (see TrackTempFactor).
	TrackOptF, TrackWidthF float64
	// SeenTrackF is the range of surface temperatures (°F, low and high)
	// the fit saw; the zero value, none. Beyond it the fitted band is not
	// extrapolated (see Grip).
	SeenTrackF [2]float64
}

// Grip is the share of best-temperature grip at surface temperature tF as
// the model predicts it. Inside the surface temperatures the fit saw, it is
// the fitted band (TrackTempFactor). Beyond them the fitted band is not
// extrapolated, since no pass pins its shape there: the edge's value is
// carried on by the tire's prior response (PriorGrip), which is gentle,
// bounded and monotone on each side of the tire's best temperature.
func (p Params) Grip(tF, tireBestF float64) float64 {
	fitted := TrackTempFactor(weather.Fahrenheit(tF), p.TrackOptF, p.TrackWidthF)
	lo, hi := p.SeenTrackF[0], p.SeenTrackF[1]
	if !(hi >= lo) || (lo == 0 && hi == 0) || (tF >= lo && tF <= hi) {
		return fitted
	}
	edge := math.Max(lo, math.Min(hi, tF))
	return TrackTempFactor(weather.Fahrenheit(edge), p.TrackOptF, p.TrackWidthF) * PriorGrip(tF, tireBestF) / PriorGrip(edge, tireBestF)
}

// DefaultParams are the prior's center for a car of induction ind on drag
// radials: what car.yaml says, SAE J607's air law for a natural engine
// (a boost-controlled turbo or blower about a third to a half of its
// pressure exponent, from memory; a nitrous shot not at all).
func DefaultParams(ind Induction) Params {
	p := Params{PowerScale: 1, TractionScale: 1, PressureExp: 1, TempExp: 0.5, TrackOptF: TrackBestF, TrackWidthF: TrackWidthDefaultF}
	switch ind {
	case Turbo:
		p.PressureExp = 0.3
	case Supercharged:
		p.PressureExp = 0.5
	}
	return p
}

// DefaultParamsFor is DefaultParams with the tire's best surface temperature.
func DefaultParamsFor(c Car) Params {
	p := DefaultParams(c.Induction)
	p.TrackOptF = TireBestF(c.Tire)
	return p
}

// Env is the conditions of one pass, reduced to what the physics uses.
type Env struct {
	Density   float64             // air density, kg/m³
	CF        float64             // SAE J1349 correction factor
	DryRatio  float64             // dry-air pressure over 99 kPa
	TempRatio float64             // 298.15 K over the air temperature
	Headwind  float64             // wind against the car, m/s (negative: tailwind)
	TrackTemp weather.Temperature // surface temperature
	Prep      float64             // 0 none .. 1 full
	MassKg    float64             // car and driver as run
}

// NewEnv is the Env of reading r for a car running on compass heading
// heading, on a surface prepped to prep, weighing massKg. Without a track
// temperature the surface is taken as the air plus 10 °F (assumption).
func NewEnv(r weather.Reading, heading, prep, massKg float64) Env {
	a := r.Derive(0) // conditions are station pressure: no elevation needed
	track := r.TrackTemp
	if !r.HasTrack {
		track = weather.Fahrenheit(r.Temp.Fahrenheit() + 10)
	}
	return Env{Density: a.Density, CF: a.CFJ1349, DryRatio: float64(a.Dry) / 99000, TempRatio: 298.15 / float64(r.Temp),
		Headwind:  float64(r.HeadwindComponent(heading)),
		TrackTemp: track, Prep: prep, MassKg: massKg}
}

// Run is one simulated pass.
type Run struct {
	ET      [5]float64 // elapsed time at each of Timers, s; NaN past the distance
	MPH     [5]float64 // speed at each timer, mph (instantaneous)
	MPH660  float64    // trap speed: average over the 66 ft before 660 ft
	MPH1320 float64    // trap speed: average over the 66 ft before 1320 ft
	PeakG   float64    // peak acceleration, g
	// ClockStart is the time from first motion to the clock starting (the
	// rollout), StartSpeed the speed then: the car is already moving.
	ClockStart, StartSpeed float64
	AvgG60                 float64 // average acceleration over the first 60 ft, g
	Power                  float64 // wheel power available in this air, W
	Mu                     float64 // tire friction coefficient on this surface
	Limited                float64 // speed where traction stops limiting, m/s
}

// ETAt is the simulated elapsed time at timer ft.
func (r Run) ETAt(ft float64) float64 {
	if i := logbook.TimerIndex(ft); i >= 0 {
		return r.ET[i]
	}
	return math.NaN()
}

// piece is one stretch of the integrated pass: a smooth stretch between
// speed nodes (Hermite), or a shift (the car coasts for the shift time).
type piece struct {
	coast          bool
	v0, v1         float64
	t0, t1, x0, x1 float64
	dt0, dt1       float64 // dt/dv at the ends
	dx0, dx1       float64 // dx/dv at the ends
}

// piecePool holds the pieces' buffers of finished simulations: a
// calibration runs hundreds of thousands of passes, and a buffer in use
// again stays in the cache where a fresh one would be allocated and cleared.
var piecePool = sync.Pool{New: func() any { b := make([]piece, 0, 256); return &b }} // a pass is ~150 pieces

// Simulate runs one pass of vehicle v with parameters p in env, to
// distanceFt (660, 1000 or 1320).
func Simulate(v *Vehicle, p Params, env Env, distanceFt float64) Run {
	buf := piecePool.Get().(*[]piece)
	run, pieces := simulate(v, p, env, distanceFt, (*buf)[:0])
	*buf = pieces
	piecePool.Put(buf)
	return run
}

// simulate is Simulate, integrating into pieces (empty, with room); it
// returns the pieces too, for their buffer. One numeric loop: the force is
// written out in it, and each quotient of a node is carried to the next
// step, rather than computed again (the calibration's cost is this loop).
func simulate(v *Vehicle, p Params, env Env, distanceFt float64, pieces []piece) (Run, []piece) {
	var run Run
	m := env.MassKg
	if m <= 0 {
		m = v.MassKg
	}
	// builtin max and min: the special cases of math.Max and math.Min (NaN,
	// ±0, ±Inf) and inlined
	air := math.Pow(max(env.DryRatio, 0.3), p.PressureExp) * math.Pow(max(env.TempRatio, 0.5), p.TempExp)
	power := v.Efficiency * (v.PowerW*p.PowerScale*air + v.NitrousW)
	mu := v.TireMu * p.TractionScale * PrepFactor(env.Prep) * p.Grip(env.TrackTemp.Fahrenheit(), v.TireBestF)
	run.Power, run.Mu = power, mu
	// Traction with weight transfer: F = μ(m g r + F h/L) ⇒ F = μ m g r/(1 − μ h/L),
	// at most μ m g (every pound on the rear tires: the front wheels are up).
	trac := mu * m * g0
	if d := 1 - mu*v.HOverL; d > 0 {
		trac = min(trac, mu*m*g0*v.RearStatic/d)
	}
	roll := v.Crr * m * g0
	half := 0.5 * env.Density * v.CdA
	headwind := env.Headwind
	end := distanceFt*MetrePerFt + 1
	var peak float64
	t, x, u := 0.0, 0.0, 0.0

	// simple mode's wheel power at u is pp·(1 − LaunchPowerLoss·e^(−u/LaunchPowerSpeed)), W
	pp := power * v.PowerFrac
	// crossover: the speed where power, not traction, limits (simple mode)
	cross := 0.0
	if len(v.Gears) == 0 {
		lo, hi := 0.0, 200.0
		for range 50 {
			mid := (lo + hi) / 2
			if mid*trac < pp*(1-LaunchPowerLoss*math.Exp(-mid/LaunchPowerSpeed)) {
				lo = mid
			} else {
				hi = mid
			}
		}
		cross = lo
	}
	gear := -1
	if len(v.Gears) > 0 {
		gear = 0
	}
	// net is the tire force at speed u in the current gear (gear < 0: simple
	// mode) less drag (with the wind) and rolling resistance.
	net := func(u float64) float64 {
		var drive float64
		switch {
		case gear >= 0:
			drive = gearedDrive(v, gear, u, power, trac)
		case u <= cross:
			drive = trac
		default:
			drive = pp * (1 - LaunchPowerLoss*math.Exp(-u/LaunchPowerSpeed)) / u
		}
		a := u + headwind
		return drive - half*a*math.Abs(a) - roll
	}
	shiftAt := func(gi int) float64 {
		if gi < 0 || gi >= len(v.Gears)-1 {
			return math.Inf(1)
		}
		return v.ShiftRPM / 1.03 * 2 * math.Pi / 60 * v.TireRadius / (v.Gears[gi] * v.FinalDrive)
	}
	const dv = 0.4 // m/s between nodes
	// the force at u from the last node, and its m/F and m·u/F, when still in its gear
	carried, carriedDt, carriedDx, haveCarry := 0.0, 0.0, 0.0, false
	shift := shiftAt(gear)
	for x < end {
		f0, dt0, dx0 := carried, carriedDt, carriedDx
		if !haveCarry {
			f0 = net(u)
			dt0, dx0 = m/f0, m*u/f0
		}
		if f0 < 0.01*m*g0 { // at terminal speed: cruise to the end
			pieces = append(pieces, piece{coast: true, v0: u, v1: u, t0: t, x0: x, t1: t + (end-x)/max(u, 0.1), x1: end})
			break
		}
		peak = max(peak, f0/(m*g0))
		next := u + dv
		if gear < 0 && u < cross && next > cross {
			next = cross // node at the crossover kink
		}
		if next > shift {
			next = shift
		}
		if next <= u {
			next = u + 1e-6
		}
		mid := (u + next) / 2
		fm, f1 := net(mid), net(next)
		if fm <= 0 || f1 <= 0 {
			pieces = append(pieces, piece{coast: true, v0: u, v1: u, t0: t, x0: x, t1: t + (end-x)/max(u, 0.1), x1: end})
			break
		}
		h := next - u
		dt1, dx1 := m/f1, m*next/f1
		dt := h / 6 * (dt0 + 4*m/fm + dt1)
		dx := h / 6 * (dx0 + 4*m*mid/fm + dx1)
		pieces = append(pieces, piece{v0: u, v1: next, t0: t, t1: t + dt, x0: x, x1: x + dx,
			dt0: dt0, dt1: dt1, dx0: dx0, dx1: dx1})
		t, x, u = t+dt, x+dx, next
		carried, carriedDt, carriedDx, haveCarry = f1, dt1, dx1, true
		if u >= shift && x < end { // shift: no drive for the shift time
			haveCarry = false
			a := u + headwind
			decel := (half*a*math.Abs(a) + roll) / m
			du := decel * v.ShiftTime
			pieces = append(pieces, piece{coast: true, v0: u, v1: u - du, t0: t, t1: t + v.ShiftTime, x0: x, x1: x + (u-du/2)*v.ShiftTime})
			t, x, u = t+v.ShiftTime, x+(u-du/2)*v.ShiftTime, u-du
			gear++
			shift = shiftAt(gear)
		}
	}
	t0, u0 := timeAt(pieces, Rollout)
	run.ClockStart, run.StartSpeed = t0, u0
	var clock [len(run.ET)]float64 // time from first motion at each timer, for the traps
	for i, ft := range logbook.TimerDistancesFt {
		if ft > distanceFt {
			run.ET[i], run.MPH[i] = math.NaN(), math.NaN()
			continue
		}
		ti, ui := timeAt(pieces, ft*MetrePerFt)
		clock[i] = ti
		run.ET[i], run.MPH[i] = ti-t0, ui/weather.MpsPerMph
		if ft == 60 {
			run.AvgG60 = (ui - u0) / (ti - t0) / g0
		}
	}
	// a trap ends at a timer: its end's time is the timer's, looked up once
	trap := func(ft float64) float64 {
		t1 := clock[logbook.TimerIndex(ft)]
		ta, _ := timeAt(pieces, (ft-TrapLengthFt)*MetrePerFt)
		return TrapLengthFt * MetrePerFt / (t1 - ta) / weather.MpsPerMph
	}
	run.MPH660, run.MPH1320 = trap(660), math.NaN()
	if distanceFt >= 1320 {
		run.MPH1320 = trap(1320)
	}
	run.PeakG = peak
	run.Limited = cross
	return run, pieces
}

// gearedDrive is the tire force, N, at speed u in gear gi with the engine's
// power (W at PeakRPM) in this air, at most the traction trac.
func gearedDrive(v *Vehicle, gi int, u, power, trac float64) float64 {
	ratio := v.Gears[gi] * v.FinalDrive
	shaft := u / v.TireRadius * ratio * 60 / (2 * math.Pi) // rpm the wheels turn the engine
	rpm := max(shaft*1.03, v.LaunchRPM)                    // converter or clutch slip
	r := rpm / v.PeakRPM
	pe := power * max(r+r*r-r*r*r, 0.05) // W at this rpm: peak at PeakRPM
	torque := pe / (rpm * 2 * math.Pi / 60)
	tm := 1.0
	if v.Automatic {
		tm = 1 + max(0, 1-shaft/rpm/0.85) // converter torque multiplication, 2:1 at stall
	}
	return min(trac, torque*ratio*tm/v.TireRadius)
}

// timeAt is the time and speed at which the car has traveled s meters.
func timeAt(pieces []piece, s float64) (float64, float64) {
	lo, hi := 0, len(pieces)-1
	for lo < hi { // the first piece ending at or beyond s
		mid := (lo + hi) / 2
		if pieces[mid].x1 < s {
			lo = mid + 1
		} else {
			hi = mid
		}
	}
	p := pieces[lo]
	if p.coast {
		if p.x1 == p.x0 {
			return p.t0, p.v0
		}
		w := (s - p.x0) / (p.x1 - p.x0)
		return p.t0 + w*(p.t1-p.t0), p.v0 + w*(p.v1-p.v0)
	}
	// Solve x(v) = s on the Hermite cubic by Newton from the linear guess.
	h := p.v1 - p.v0
	w := (s - p.x0) / (p.x1 - p.x0)
	w = max(0, min(1, w))
	for range 6 {
		xw, dxw := hermite(w, p.x0, p.x1, p.dx0*h, p.dx1*h)
		if dxw <= 0 {
			break
		}
		next := max(0, min(1, w-(xw-s)/dxw))
		if next == w {
			break // a fixed point: the steps left would give w again
		}
		w = next
	}
	tw, _ := hermite(w, p.t0, p.t1, p.dt0*h, p.dt1*h)
	return tw, p.v0 + w*h
}

// hermite is the cubic Hermite interpolant on [0,1] with end values a, b and
// end slopes ma, mb, and its derivative.
func hermite(w, a, b, ma, mb float64) (float64, float64) {
	w2, w3 := w*w, w*w*w
	v := (2*w3-3*w2+1)*a + (w3-2*w2+w)*ma + (-2*w3+3*w2)*b + (w3-w2)*mb
	d := (6*w2-6*w)*a + (3*w2-4*w+1)*ma + (-6*w2+6*w)*b + (3*w2-2*w)*mb
	return v, d
}
