package logbook

import (
	"fmt"
	"math"
)

// Kinematic constants of the segment figures.
const (
	// StandardGravityFtS2 is standard gravity in ft/s²: 9.80665 m/s² exactly
	// (CGPM 1901; ISO 80000-3, CODATA) over 0.3048 m/ft = 32.1740 ft/s².
	StandardGravityFtS2 = 9.80665 / 0.3048
	// FtSPerMPH is one mile an hour in ft/s: 5280 ft / 3600 s, exactly 22/15.
	FtSPerMPH = 5280.0 / 3600.0
)

// AverageG is an average acceleration in g: a change of speed dvFtS (ft/s)
// over dt seconds (average acceleration = Δv/Δt), over standard gravity.
// NaN unless dt > 0 and both are finite. Any sign: a car slowing gives a
// negative figure.
func AverageG(dvFtS, dt float64) float64 {
	if !(dt > 0) || math.IsInf(dt, 0) || math.IsNaN(dvFtS) || math.IsInf(dvFtS, 0) {
		return math.NaN()
	}
	return dvFtS / dt / StandardGravityFtS2
}

// LaunchG is the average acceleration in g of a car covering dFt feet from
// rest in t seconds at constant acceleration: d = a·t²/2, so a = 2·d/t².
// It is the same figure as the average speed d/t reached at the segment's
// midpoint in time, t/2, from 0. NaN unless d ≥ 0 and t > 0.
//
// A slip's clock starts after about a foot of rollout, with the car already
// moving (common practice), so "from rest" is the trade's convention, not
// the car's state at the beam.
func LaunchG(dFt, t float64) float64 {
	if !(dFt >= 0) || math.IsInf(dFt, 0) {
		return math.NaN()
	}
	if !(t > 0) || math.IsInf(t, 0) {
		return math.NaN()
	}
	return 2 * dFt / (t * t) / StandardGravityFtS2
}

// Segment is the stretch of a pass between two consecutive timed marks of
// Timers (0→60, 60→330, 330→660, 660→1000, 1000→1320 ft).
//
// Average speed over a segment is its length over its time. Average
// acceleration is the change of average speed from the segment before over
// the time between the two segments' midpoints (in time); for the first
// segment, from rest, that is LaunchG. An average is always below the peak
// a data logger shows inside the segment.
type Segment struct {
	FromFt, ToFt float64 // ft, FromFt < ToFt
	// Timed is whether both ends were timed (and the time runs forward);
	// when false Missing says why in words and the figures are NaN.
	Timed   bool
	Missing string
	Time    float64 // s, > 0 when Timed
	// SpeedFtS is the average speed, ft/s (MPH gives it in mph).
	SpeedFtS float64
	// AccelG is the average acceleration into this segment, in g; NaN when
	// this or the segment before is not timed (HasAccel false).
	AccelG   float64
	HasAccel bool
}

// MPH is the segment's average speed in mph (NaN when not timed).
func (s Segment) MPH() float64 { return s.SpeedFtS / FtSPerMPH }

// Name is the segment as the crew says it: "0–60 ft", "60–330 ft".
func (s Segment) Name() string { return fmt.Sprintf("%.0f–%.0f ft", s.FromFt, s.ToFt) }

// Profile is a pass cut into its segments, with its traps.
type Profile struct {
	Segments []Segment
	// LaunchG is the average acceleration over the first 60 ft from rest
	// (2·60/t²), in g; HasLaunch false without a 60-ft time.
	LaunchG   float64
	HasLaunch bool
	// Traps are the trap speeds logged, mph, at 660 and 1320 ft (NaN where
	// not logged).
	Trap660, Trap1320 float64
}

// Segments cuts pass p into its segments up to distanceFt (660, 1000 or
// 1320: the timers past the car's finish are left out). A segment with an
// end the slip does not time is kept, with Missing saying so ("no 330-ft
// time on this slip"); nothing is filled in.
func Segments(p Pass, distanceFt float64) Profile {
	var ends []float64
	var times []float64
	var timed []bool
	ends = append(ends, 0)
	times = append(times, 0)
	timed = append(timed, true)
	for _, ft := range TimersFor(distanceFt) {
		t, ok := p.ETAt(ft)
		ends, times, timed = append(ends, ft), append(times, t), append(timed, ok && t > 0 && !math.IsInf(t, 0))
	}
	return cut(ends, times, timed, nullFloat(p.MPH660.Valid, p.MPH660.Decimal.InexactFloat64()), nullFloat(p.MPH1320.Valid, p.MPH1320.Decimal.InexactFloat64()))
}

func nullFloat(ok bool, v float64) float64 {
	if !ok {
		return math.NaN()
	}
	return v
}

// cut makes the segments between consecutive marks: ends[0] is 0 ft at
// 0 s, always timed.
func cut(ends, times []float64, timed []bool, trap660, trap1320 float64) Profile {
	pr := Profile{LaunchG: math.NaN(), Trap660: trap660, Trap1320: trap1320}
	prev := Segment{Timed: true} // rest: speed 0 at time 0, a segment of no time
	for i := 1; i < len(ends); i++ {
		s := Segment{FromFt: ends[i-1], ToFt: ends[i], Time: math.NaN(), SpeedFtS: math.NaN(), AccelG: math.NaN()}
		switch {
		case !timed[i-1]:
			s.Missing = fmt.Sprintf("no %.0f-ft time on this slip", ends[i-1])
		case !timed[i]:
			s.Missing = fmt.Sprintf("no %.0f-ft time on this slip", ends[i])
		case !(times[i] > times[i-1]):
			s.Missing = fmt.Sprintf("the %.0f-ft time is not after the %s time", ends[i], markName(ends[i-1]))
		default:
			s.Timed = true
			s.Time = times[i] - times[i-1]
			s.SpeedFtS = (ends[i] - ends[i-1]) / s.Time
		}
		if s.Timed && prev.Timed {
			// From one segment's average speed to the next's, over the time
			// between their midpoints; from rest the first is 2·d/t².
			prevTime := prev.Time
			prevSpeed := prev.SpeedFtS
			if i == 1 {
				prevTime, prevSpeed = 0, 0
			}
			s.AccelG = AverageG(s.SpeedFtS-prevSpeed, (prevTime+s.Time)/2)
			s.HasAccel = !math.IsNaN(s.AccelG)
		}
		if i == 1 && s.Timed {
			pr.LaunchG, pr.HasLaunch = LaunchG(s.ToFt, s.Time), true
		}
		pr.Segments = append(pr.Segments, s)
		prev = s
	}
	return pr
}

func markName(ft float64) string {
	if ft == 0 {
		return "start"
	}
	return fmt.Sprintf("%.0f-ft", ft)
}

// SegmentDiff is one segment of two passes side by side.
type SegmentDiff struct {
	This, Other Segment
	// Diff is this pass's segment time less the other's, s (+ slower,
	// − quicker); Carried the same with the other's time carried to this
	// pass's air (NaN without a factor). OK false when either is not timed.
	Diff, Carried float64
	OK            bool
}

// Compare sets this and other side by side, segment by segment (the
// shorter profile's segments). carry scales the other pass's times to this
// pass's conditions (AirCarry); pass NaN or 0 for none. A pass against
// itself gives zeros.
func Compare(this, other Profile, carry float64) []SegmentDiff {
	n := min(len(this.Segments), len(other.Segments))
	out := make([]SegmentDiff, n)
	for i := range n {
		a, b := this.Segments[i], other.Segments[i]
		d := SegmentDiff{This: a, Other: b, Diff: math.NaN(), Carried: math.NaN()}
		if a.Timed && b.Timed {
			d.OK = true
			d.Diff = a.Time - b.Time
			if carry > 0 && !math.IsInf(carry, 0) {
				d.Carried = a.Time - b.Time*carry
			}
		}
		out[i] = d
	}
	return out
}

// Largest is the index of the timed segment with the largest |Diff| (or
// |Carried| when carried is true), or -1 when none is timed.
func Largest(d []SegmentDiff, carried bool) int {
	best, at := -1.0, -1
	for i, x := range d {
		v := x.Diff
		if carried {
			v = x.Carried
		}
		if !x.OK || math.IsNaN(v) {
			continue
		}
		if math.Abs(v) > best {
			best, at = math.Abs(v), i
		}
	}
	return at
}

// AirCarry is the factor that carries a time run in air with SAE J1349
// correction factor cfFrom to air with cfTo: (cfTo/cfFrom)^(1/3). Power
// observed ∝ 1/CF, and ET ∝ (weight/power)^(1/3) (Huntington, Rod & Custom
// 1958; Fox, Am. J. Physics 1973), the rule engine.AirCarried applies to a
// whole pass; here it scales every segment alike. NaN unless both factors
// are positive and finite.
func AirCarry(cfFrom, cfTo float64) float64 {
	if !(cfFrom > 0) || !(cfTo > 0) || math.IsInf(cfFrom, 0) || math.IsInf(cfTo, 0) {
		return math.NaN()
	}
	return math.Cbrt(cfTo / cfFrom)
}
