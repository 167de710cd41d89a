package truthsim

import (
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
)

// Laws are the structure of a world that Draw picks at random: the shape of
// the tire's grip curve, the air law of the induction, the size of the day
// effects and of the rubber build-up, the meters' bias, how old a reading is
// at the pass, heat soak, the gaps in a slip, and the car changes. The
// fixed worlds (Worlds) run on fixedLaws.
type Laws struct {
	// Grip: the tire's band of best surface temperature moves by ShiftF
	// (°F, both ends) and widens by WidenF at its hot end; the losses below
	// and above it are scaled by ColdScale and HotScale (a symmetric curve
	// has them equal in °F², Symmetric). A cliff: past CliffF °F beyond the
	// band's edge on side CliffSide (+1 hot, −1 cold) a further CliffDrop of
	// μ is lost over a few °F (a greasy surface, or a cold one that will
	// not bite). CliffDrop 0: no cliff.
	ShiftF, WidenF        float64
	ColdScale, HotScale   float64
	Symmetric             bool
	CliffF, CliffDrop     float64
	CliffSide             int
	NaturalExp, BlowerExp float64 // natural and nitrous engine: (J607 ratio)^NaturalExp; blower: ^BlowerExp
	// Turbo: (std K / K)^ChargeExp · (1 + BackPressure·(dry/std − 1)); a
	// boost controller holds it down to BoostLimitInHg of dry pressure (0:
	// no limit), below which the boost falls with the air.
	ChargeExp, BackPressure float64
	BoostLimitInHg          float64
	BoostLimitFt            float64 // the limit as a standard-atmosphere altitude, for the log
	TuneSD, PrepSD          float64 // day effects: SD of the day's × power and × grip
	Rubber, RubberHours     float64 // grip gained as rubber goes down (fraction) and its time constant, h
	Bias                    Bias    // the crew's meters, as read minus as is
	LagMin                  [2]float64
	// ShortTurn is the share of passes called back quickly (12–30 min);
	// SoakLoss is the power a car lost to heat soak with no rest at all
	// (fraction), fading to none after 45 min.
	ShortTurn, SoakLoss float64
	// FinishOnly, No1000, NoTrackTemp: shares of slips with only the finish
	// timed, without the 1000-ft timer, without the surface temperature.
	FinishOnly, No1000, NoTrackTemp float64
	Changes                         []Change // by pass index, in order
}

// Bias is how far the crew's meters read from the truth.
type Bias struct{ TempF, DewF, BaroInHg, TrackF float64 }

// Change is a car change made before pass At (its index in the season).
type Change struct {
	At    int
	Words string // what the crew wrote on the slip
	// What changed: power ×HP (jets, tune, boost), the shot ×Shot, the
	// rear gear (Final), the converter's stall (StallRPM), the clutch's
	// launch rpm (LaunchRPM); zero leaves it.
	HP, Shot                   float64
	Final, StallRPM, LaunchRPM float64
	BoostPSI                   float64
}

func (c Change) apply(car Car) Car {
	car.Gears = slices.Clone(car.Gears)
	if c.HP > 0 {
		car.PeakHP *= c.HP
	}
	if c.Shot > 0 {
		car.ShotHP *= c.Shot
	}
	if c.Final > 0 {
		car.Final = c.Final
	}
	if c.StallRPM > 0 {
		car.StallRPM = c.StallRPM
	}
	if c.LaunchRPM > 0 {
		car.LaunchRPM = c.LaunchRPM
	}
	car.BoostPSI += c.BoostPSI
	return car
}

// fixedLaws are the laws of the fixed worlds: the values truthsim had
// before worlds were drawn, so Worlds' seasons are unchanged.
var fixedLaws = Laws{ColdScale: 1, HotScale: 1, NaturalExp: 1, BlowerExp: 0.55, ChargeExp: 0.6, BackPressure: 0.12,
	TuneSD: 0.012, PrepSD: 0.02, Rubber: 0.035, RubberHours: 2.5}

func (w World) laws() *Laws {
	if w.Laws == nil {
		return &fixedLaws
	}
	return w.Laws
}

func (l *Laws) changeAt(i int) *Change {
	for k := range l.Changes {
		if l.Changes[k].At == i {
			return &l.Changes[k]
		}
	}
	return nil
}

// tire is the kind's grip curve under these laws.
func (l *Laws) tire(kind string) tire {
	t := tireOf(kind)
	t.lo += l.ShiftF
	t.hi += l.ShiftF + l.WidenF
	t.cold *= l.ColdScale
	t.hot *= l.HotScale
	if l.Symmetric {
		t.hot = t.cold
	}
	t.cliffF, t.cliffDrop, t.cliffSide = l.CliffF, l.CliffDrop, l.CliffSide
	return t
}

// loss is the share of peak μ lost at surface temperature f °F.
func (t tire) loss(f float64) float64 {
	loss := 0.0
	switch {
	case f < t.lo:
		loss = t.cold * sq(t.lo-f)
	case f > t.hi:
		loss = t.hot * sq(f-t.hi)
	}
	if t.cliffDrop > 0 {
		edge := t.hi + t.cliffF
		if t.cliffSide < 0 {
			edge = t.lo - t.cliffF
		}
		loss += t.cliffDrop / (1 + math.Exp(-float64(t.cliffSide)*(f-edge)/2.5))
	}
	return loss
}

// prepGrip is the share of full-prep grip on a surface kept less short of
// full prep (the truth's own curve: the engine's is a straight line).
func prepGrip(less float64) float64 { return 1 - 0.32*math.Pow(less, 1.3) }

// standardDryInHg is the dry pressure of the U.S. Standard Atmosphere 1976
// at h ft (less a typical 0.25 inHg of vapour), the truth's way of naming a
// boost controller's altitude limit.
func standardDryInHg(h float64) float64 {
	return 29.92*math.Pow(1-6.8753e-6*h, 5.2559) - 0.25
}

// The invented tracks a drawn world's car travels between.
var trackNames = []string{"Mesquite Flat", "Harrow Ridge", "Bluestem Valley", "Quarry Point", "Iron Prairie",
	"Juniper Hollow", "Copperhead Basin", "Willow Draw", "Sandhill Crossing", "Red Shale Park", "Pinecone Pass", "Otter Bend"}

// Draw draws a world of the family: one of the fixed worlds' cars, changed
// in power, weight, gearing and converter, at one to three invented tracks
// (some more than 2,000 ft apart, some less prepped), with laws drawn at
// random (see Laws) and a logbook of 2 to 300 passes. The same seed draws
// the same world. Seeds: DEVELOPERS.md (tuning 1–40, held out 100001–).
func Draw(seed uint64) World {
	r := rand.New(rand.NewPCG(seed, 0x5eed))
	u := func(lo, hi float64) float64 { return lo + (hi-lo)*r.Float64() }
	fixed := Worlds()
	tpl := fixed[r.IntN(len(fixed))]
	car := tpl.Car
	car.Gears = slices.Clone(car.Gears)
	car.PeakHP = math.Round(car.PeakHP * u(0.8, 1.25))
	car.ShotHP = math.Round(car.ShotHP * u(0.8, 1.3))
	car.WeightLb = math.Round(car.WeightLb * u(0.92, 1.08))
	car.Final = math.Round(car.Final*u(0.93, 1.07)*100) / 100
	if car.StallRPM > 0 {
		car.StallRPM = math.Round(car.StallRPM*u(0.9, 1.1)/100) * 100
	}
	if r.Float64() < 0.35 {
		car.DistanceFt = []float64{660, 1000, 1320}[r.IntN(3)]
	}
	car.Name = fmt.Sprintf("draw %d: %s %s-tire %.0f-ft car", seed, car.Induction, car.Tire, car.DistanceFt)

	w := World{Car: car, Seed: seed, Claim: math.Max(-0.12, math.Min(0.12, 0.05*r.NormFloat64()))}
	w.Track, w.Others = drawTracks(r)
	w.Plan = drawPlan(r, len(w.Others))
	w.Days = len(w.Plan)
	total := 0
	for _, d := range w.Plan {
		total += d.Passes
	}
	w.PassesPerDay = (total + w.Days - 1) / w.Days
	w.Laws = drawLaws(r, car, total)
	return w
}

// drawTracks draws a home track and up to two others.
func drawTracks(r *rand.Rand) (Track, []Track) {
	u := func(lo, hi float64) float64 { return lo + (hi-lo)*r.Float64() }
	names := slices.Clone(trackNames)
	r.Shuffle(len(names), func(i, j int) { names[i], names[j] = names[j], names[i] })
	track := func(i int, elev float64) Track {
		t := Track{Name: names[i], ElevationFt: math.Round(elev/10) * 10, HeadingDeg: math.Round(u(0, 360))}
		if r.Float64() < 0.25 {
			t.LessPrep = math.Round(u(0.2, 0.6)*100) / 100
		}
		return t
	}
	home := track(0, u(0, 5500))
	n := 0
	if r.Float64() < 0.5 {
		n = 1 + r.IntN(2)
	}
	var others []Track
	for i := range n {
		e := home.ElevationFt + u(-1500, 1500)
		if r.Float64() < 0.6 { // a hop over the mountains
			e = home.ElevationFt + u(2000, 4500)
			if r.Float64() < 0.5 && home.ElevationFt > 2200 {
				e = home.ElevationFt - u(2000, home.ElevationFt+100)
			}
		}
		others = append(others, track(i+1, math.Max(-100, math.Min(7500, e))))
	}
	return home, others
}

// drawPlan draws a season of 2 to 300 passes (log-uniform), a few to a
// dozen a day, most days at home.
func drawPlan(r *rand.Rand, others int) []DayPlan {
	total := int(math.Round(math.Exp(math.Log(2) + r.Float64()*math.Log(150))))
	perDay := 3 + r.IntN(6)
	var plan []DayPlan
	for left := total; left > 0; {
		n := min(max(perDay+r.IntN(5)-2, 1), left)
		trk := 0
		if others > 0 && r.Float64() < 0.4 {
			trk = 1 + r.IntN(others)
		}
		plan = append(plan, DayPlan{Track: trk, Passes: n})
		left -= n
	}
	return plan
}

// drawLaws draws a world's laws for car over a season of total passes.
func drawLaws(r *rand.Rand, car Car, total int) *Laws {
	u := func(lo, hi float64) float64 { return lo + (hi-lo)*r.Float64() }
	l := Laws{ShiftF: u(-10, 10), WidenF: u(-10, 10), ColdScale: u(0.4, 2.5), HotScale: u(0.4, 2.5),
		NaturalExp: u(0.85, 1.15), BlowerExp: u(0.35, 0.8), ChargeExp: u(0.4, 0.8), BackPressure: u(0.05, 0.25),
		TuneSD: u(0.004, 0.025), PrepSD: u(0.005, 0.045), Rubber: u(0, 0.07), RubberHours: u(1, 5),
		Bias:      Bias{TempF: 1.2 * r.NormFloat64(), DewF: 1.5 * r.NormFloat64(), BaroInHg: 0.03 * r.NormFloat64(), TrackF: 3 * r.NormFloat64()},
		LagMin:    [2]float64{3, 15},
		ShortTurn: u(0, 0.25), SoakLoss: u(0.003, 0.012),
	}
	switch r.IntN(3) {
	case 0:
		l.Symmetric = true
	case 1: // asymmetric: the scales as drawn
	case 2:
		l.CliffSide = []int{-1, 1}[r.IntN(2)]
		l.CliffF, l.CliffDrop = u(0, 15), u(0.06, 0.18)
	}
	if r.Float64() < 0.5 { // a boost controller that holds power up to an altitude
		l.BackPressure = 0
		l.BoostLimitFt = math.Round(u(1500, 7000)/100) * 100
		l.BoostLimitInHg = standardDryInHg(l.BoostLimitFt)
	}
	if r.Float64() < 0.6 {
		l.FinishOnly, l.No1000, l.NoTrackTemp = u(0, 0.15), u(0, 0.2), u(0, 0.3)
	}
	if total >= 6 {
		for range r.IntN(4) {
			l.Changes = append(l.Changes, drawChange(r, car, 2+r.IntN(total-2)))
		}
		slices.SortFunc(l.Changes, func(a, b Change) int { return a.At - b.At })
		l.Changes = slices.CompactFunc(l.Changes, func(a, b Change) bool { return a.At == b.At })
	}
	return &l
}

// drawChange draws one car change before pass at, in a crew's words.
func drawChange(r *rand.Rand, car Car, at int) Change {
	pick := func(s ...string) string { return s[r.IntN(len(s))] }
	c := Change{At: at}
	kinds := []string{"gear", "tune"}
	switch {
	case car.StallRPM > 0:
		kinds = append(kinds, "converter")
	default:
		kinds = append(kinds, "launch")
	}
	switch car.Induction {
	case "turbo":
		kinds = append(kinds, "boost")
	case "nitrous":
		kinds = append(kinds, "shot")
	}
	switch kinds[r.IntN(len(kinds))] {
	case "gear":
		c.Final = []float64{3.55, 3.73, 3.90, 4.10, 4.30, 4.56}[r.IntN(6)]
		c.Words = fmt.Sprintf(pick("changed rear gear to %.2f", "%.2f gear in", "went to a %.2f rear"), c.Final)
	case "converter":
		c.StallRPM = math.Max(2400, math.Round((car.StallRPM+(300+100*float64(r.IntN(6)))*float64([]int{-1, 1}[r.IntN(2)]))/100)*100)
		c.Words = pick("new converter", fmt.Sprintf("swapped to the %.0f stall", c.StallRPM), fmt.Sprintf("converter swap, %.0f stall", c.StallRPM))
	case "launch":
		d := 200 + 100*float64(r.IntN(5))
		if r.IntN(2) == 0 {
			d = -d
		}
		c.LaunchRPM = car.LaunchRPM + d
		c.Words = pick(fmt.Sprintf("launch rpm %+.0f", d), fmt.Sprintf("leaving at %.0f now", c.LaunchRPM))
	case "boost":
		psi := float64(1 + r.IntN(3))
		if r.IntN(3) == 0 {
			psi = -psi
		}
		// about 2.5 % more power a psi near 14 psi (from memory)
		c.BoostPSI, c.HP = psi, 1+0.025*psi
		dir := "up"
		if psi < 0 {
			dir = "down"
		}
		c.Words = pick(fmt.Sprintf("%+.0f psi boost", psi), fmt.Sprintf("boost %+.0f psi", psi), fmt.Sprintf("turned the boost %s %.0f psi", dir, math.Abs(psi)))
	case "shot":
		c.Shot = 1 + 0.15*float64([]int{-1, 1}[r.IntN(2)])
		c.Words = pick("changed the nitrous jet", "new jet on the kit")
	default: // the tune
		c.HP = 1 + 0.04*(2*r.Float64()-1)
		if c.HP >= 1 {
			c.Words = pick("retuned", "more timing", "jetted up one", "new tune")
		} else {
			c.Words = pick("retuned", "took 2 degrees out", "jetted down one", "richer tune")
		}
	}
	return c
}
