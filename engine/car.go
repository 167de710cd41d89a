package engine

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"slices"
	"strings"

	"go.yaml.in/yaml/v3"

	"pitcard/internal/yamlfile"
	"pitcard/logbook"

	"pitcard/weather"
)

// Induction is how the engine gets its air, which decides how its power
// follows the weather.
type Induction string

// Induction types.
const (
	Natural      Induction = "natural"      // power ∝ 1/CF
	Turbo        Induction = "turbo"        // boost-controlled: follows the air partly
	Supercharged Induction = "supercharged" // belt-driven blower: follows the air partly
	Nitrous      Induction = "nitrous"      // natural engine plus a nitrous shot that ignores the air
)

// Car describes the car, as written in car.yaml. Only WeightLb, PowerHP,
// Induction and DistanceFt are required; every other field has the default
// written beside it.
type Car struct {
	// Name for the card.
	Name string `yaml:"name"`
	// WeightLb is car and driver as raced, lb. Valid range 500..10000.
	WeightLb float64 `yaml:"weight_lb"`
	// PowerHP is the engine's peak power at the flywheel, hp. Valid range
	// 20..12000. 0 means unknown: pitcard estimates it from the logbook's traps.
	PowerHP float64 `yaml:"power_hp"`
	// Induction: natural, turbo, supercharged or nitrous.
	Induction Induction `yaml:"induction"`
	// NitrousHP is the nitrous shot's added power, hp (nitrous only; default 0).
	NitrousHP float64 `yaml:"nitrous_hp"`
	// DistanceFt is the distance raced: 660, 1000 or 1320 ft.
	DistanceFt float64 `yaml:"distance_ft"`

	// Optional physics; zero means the default in brackets.
	DrivetrainLoss float64   `yaml:"drivetrain_loss"` // fraction of flywheel power lost to the wheels (0.15)
	CdA            float64   `yaml:"cda_m2"`          // drag coefficient × frontal area, m² (0.75)
	RollingCoeff   float64   `yaml:"rolling_coeff"`   // rolling-resistance coefficient (0.015)
	WheelbaseIn    float64   `yaml:"wheelbase_in"`    // in (108)
	CGHeightIn     float64   `yaml:"cg_height_in"`    // center of gravity above ground, in (20)
	RearWeightPct  float64   `yaml:"rear_weight_pct"` // static weight on the rear tires, % (48)
	TireDiameterIn float64   `yaml:"tire_diameter_in"`
	Gears          []float64 `yaml:"gears"` // transmission ratios, first gear first
	FinalDrive     float64   `yaml:"final_drive"`
	ShiftTimeS     float64   `yaml:"shift_time_s"` // s per shift (0.15 with gears)
	PeakRPM        float64   `yaml:"peak_rpm"`     // rpm of peak power
	ShiftRPM       float64   `yaml:"shift_rpm"`
	LaunchRPM      float64   `yaml:"launch_rpm"`
	Tire           string    `yaml:"tire"`         // street, radial or slick (radial)
	Transmission   string    `yaml:"transmission"` // automatic (converter) or manual (automatic)

	// Setup are the crew's setup items (rear tire psi, launch rpm, converter
	// ...): each a logbook column of its own, typed and checked.
	Setup logbook.Setup `yaml:"setup"`

	// Extra holds any other keys the crew adds; the rules see them.
	Extra map[string]any `yaml:"-"`
	// Warnings are what a person should hear about the file (a yes/no
	// written as text), with file and line.
	Warnings []string `yaml:"-"`
}

// ReadCar reads a car.yaml; name is the file's name for messages. Keys pitcard
// does not know are kept in Extra for the crew's rules, not refused.
func ReadCar(r io.Reader, name string) (Car, error) {
	data, err := io.ReadAll(r)
	if err != nil {
		return Car{}, err
	}
	var c Car
	doc, err := yamlfile.Parse(data, name)
	if err != nil {
		return c, err
	}
	if err := doc.Decode(&c, false); err != nil {
		return c, err
	}
	c.Warnings = doc.Warnings
	var all map[string]any
	_ = doc.Decode(&all, false)
	known := carKeys()
	for k, v := range all {
		if !slices.Contains(known, k) {
			if c.Extra == nil {
				c.Extra = map[string]any{}
			}
			c.Extra[k] = v
		}
	}
	if c.Induction == "" {
		c.Induction = Natural
	}
	return c, doc.At(atItem(doc, c.Validate(name)))
}

// atItem puts the line of a setup item on a message about a key it lacks
// ("setup[2].unit is missing": the line of setup[2]).
func atItem(doc *yamlfile.Doc, err error) error {
	var ie *weather.InputError
	if !errors.As(err, &ie) || ie.Line != 0 || doc.Line(ie.Field) != 0 || !strings.HasPrefix(ie.Field, "setup[") {
		return err
	}
	item, _, _ := strings.Cut(ie.Field, "]")
	if l := doc.Line(item + "]"); l > 0 {
		return ie.At(doc.File, l)
	}
	return err
}

func carKeys() []string {
	var keys []string
	var probe Car
	out, _ := yaml.Marshal(probe)
	var m map[string]any
	_ = yaml.NewDecoder(bytes.NewReader(out)).Decode(&m)
	for k := range m {
		keys = append(keys, k)
	}
	return keys
}

// Validate checks the car's fields against their ranges.
func (c Car) Validate(file string) error {
	bad := func(field string, v any, reason string) error {
		return &weather.InputError{File: file, Field: field, Value: fmt.Sprint(v), Reason: reason}
	}
	if !(c.WeightLb >= logbook.WeightRangeLb[0] && c.WeightLb <= logbook.WeightRangeLb[1]) {
		if c.WeightLb == 0 {
			return bad("weight_lb", "", "is missing (car and driver as raced, lb, 500..10000)")
		}
		return bad("weight_lb", c.WeightLb, logbook.WeightRangeWords)
	}
	if c.PowerHP != 0 && !(c.PowerHP >= 20 && c.PowerHP <= 12000) {
		return bad("power_hp", c.PowerHP, "is outside 20..12000 hp (or leave it out to estimate it from the traps)")
	}
	switch c.Induction {
	case Natural, Turbo, Supercharged, Nitrous:
	default:
		return bad("induction", c.Induction, "is not an induction type (natural, turbo, supercharged or nitrous)")
	}
	if c.NitrousHP < 0 || c.NitrousHP > 2000 {
		return bad("nitrous_hp", c.NitrousHP, "is outside 0..2000 hp")
	}
	switch c.DistanceFt {
	case 660, 1000, 1320:
	case 0:
		return bad("distance_ft", "", "is missing (660, 1000 or 1320)")
	default:
		return bad("distance_ft", c.DistanceFt, "is not a raced distance (660, 1000 or 1320 ft)")
	}
	if c.DrivetrainLoss < 0 || c.DrivetrainLoss > 0.5 {
		return bad("drivetrain_loss", c.DrivetrainLoss, "is outside 0..0.5")
	}
	if c.CdA < 0 || c.CdA > 5 {
		return bad("cda_m2", c.CdA, "is outside 0..5 m²")
	}
	if c.RollingCoeff < 0 || c.RollingCoeff > 0.1 {
		return bad("rolling_coeff", c.RollingCoeff, "is outside 0..0.1")
	}
	if c.WheelbaseIn != 0 && !(c.WheelbaseIn >= 60 && c.WheelbaseIn <= 400) {
		return bad("wheelbase_in", c.WheelbaseIn, "is outside 60..400 in")
	}
	if c.CGHeightIn != 0 && !(c.CGHeightIn >= 5 && c.CGHeightIn <= 60) {
		return bad("cg_height_in", c.CGHeightIn, "is outside 5..60 in")
	}
	if c.RearWeightPct != 0 && !(c.RearWeightPct >= 20 && c.RearWeightPct <= 90) {
		return bad("rear_weight_pct", c.RearWeightPct, "is outside 20..90 %")
	}
	if c.TireDiameterIn != 0 && !(c.TireDiameterIn >= 15 && c.TireDiameterIn <= 40) {
		return bad("tire_diameter_in", c.TireDiameterIn, "is outside 15..40 in")
	}
	for i, g := range c.Gears {
		if !(g > 0.3 && g < 8) {
			return bad(fmt.Sprintf("gears[%d]", i), g, "is outside 0.3..8")
		}
		if i > 0 && g >= c.Gears[i-1] {
			return bad(fmt.Sprintf("gears[%d]", i), g, "should be lower than the gear before it")
		}
	}
	if c.FinalDrive != 0 && !(c.FinalDrive >= 1.5 && c.FinalDrive <= 8) {
		return bad("final_drive", c.FinalDrive, "is outside 1.5..8")
	}
	if c.ShiftTimeS < 0 || c.ShiftTimeS > 1.5 {
		return bad("shift_time_s", c.ShiftTimeS, "is outside 0..1.5 s")
	}
	switch strings.ToLower(c.Transmission) {
	case "", "automatic", "manual":
	default:
		return bad("transmission", c.Transmission, "is not a transmission (automatic or manual)")
	}
	switch strings.ToLower(c.Tire) {
	case "", "street", "radial", "slick":
	default:
		return bad("tire", c.Tire, "is not a tire kind (street, radial or slick)")
	}
	return c.Setup.Validate(file)
}
