package weather

import (
	"fmt"
	"math"
	"strconv"
	"time"
)

// PressureKind says what a barometer figure is. Handheld track meters read
// station pressure (the real pressure where the car runs, "uncorrected");
// airport reports and phone apps give the altimeter setting (station pressure
// reduced to sea level), which needs the track's elevation to undo. Mixing the
// two is the most common weather mistake at a track, so the kind is explicit.
type PressureKind int

// Pressure kinds.
const (
	StationPressure PressureKind = iota
	AltimeterSetting
)

// String is the kind as weather.csv's baro_kind writes it.
func (k PressureKind) String() string {
	if k == AltimeterSetting {
		return "altimeter"
	}
	return "station"
}

// ParsePressureKind reads "station" (also "uncorrected", "stn") or "altimeter"
// (also "sea-level", "corrected", "alt").
func ParsePressureKind(s string) (PressureKind, error) {
	switch s {
	case "station", "stn", "uncorrected", "":
		return StationPressure, nil
	case "altimeter", "alt", "sea-level", "sealevel", "corrected":
		return AltimeterSetting, nil
	}
	return 0, inputErr("baro-kind", s, "is not a pressure kind (use station or altimeter)")
}

// Reading is one set of readings at the track.
type Reading struct {
	Time     time.Time
	Temp     Temperature  // air temperature; valid −40..140 °F
	Baro     Pressure     // as read, of kind BaroKind
	BaroKind PressureKind // station pressure or altimeter setting
	// Humidity: either the relative humidity (fraction 0..1) or the dew point.
	RH          float64
	DewPointSet bool        // true: DewPoint is given and RH is ignored
	DewPoint    Temperature // not above Temp
	Wind        Speed       // valid 0..60 mph
	WindFrom    float64     // compass degrees the wind blows from, 0..360
	// WindDirUnknown: a wind speed was read without its direction; it then
	// counts as neither head- nor tailwind.
	WindDirUnknown bool
	// WindUnknown: the wind was not read at all (Wind and WindFrom are 0
	// and say nothing); the physics takes it as still air, the card says
	// "not read", never "calm".
	WindUnknown bool
	TrackTemp   Temperature // track surface; valid −20..200 °F when HasTrackTemp
	HasTrack    bool
	Note        string // free text
}

// Valid ranges of a reading (pitcard's limits: the extremes a drag strip sees,
// with room to spare).
var (
	TempRange      = [2]float64{-40, 140}     // °F
	StationRange   = [2]float64{15, 32.5}     // inHg
	ElevationRange = [2]float64{-1500, 15000} // ft
	WindRange      = [2]float64{0, 60}        // mph
	TrackTempRange = [2]float64{-20, 200}     // °F
)

// RangeText is the valid range of a reading's field, in units u, as
// ValidateIn says it ("-20..200 °F" for "track-temp"), so a value that does
// not even parse can be answered with what would have been taken. "" for a
// field without a range of its own here.
func RangeText(field string, u Units) string {
	temp := func(r [2]float64) string {
		return trimFloat(Fahrenheit(r[0]).In(u.Temp)) + ".." + trimFloat(Fahrenheit(r[1]).In(u.Temp)) + " " + u.Temp.String()
	}
	switch field {
	case "temp":
		return temp(TempRange)
	case "track-temp":
		return temp(TrackTempRange)
	case "humidity":
		return "0..100 %"
	case "wind":
		return trimFloat(MPH(WindRange[0]).In(u.Speed)) + ".." + trimFloat(MPH(WindRange[1]).In(u.Speed)) + " " + u.Speed.String()
	case "baro":
		return trimFloat(InHg(StationRange[0]).In(u.Pressure)) + ".." + trimFloat(InHg(StationRange[1]).In(u.Pressure)) + " " + u.Pressure.String()
	}
	return ""
}

func outside(v float64, r [2]float64) bool { return !(v >= r[0] && v <= r[1]) } // NaN is outside

func rangeErr(field string, v float64, unit string, r [2]float64) *InputError {
	return inputErr(field, trimFloat(v)+" "+unit, "is outside %s..%s %s", trimFloat(r[0]), trimFloat(r[1]), unit)
}

func trimFloat(v float64) string {
	s := fmt.Sprintf("%.2f", v)
	for len(s) > 1 && s[len(s)-1] == '0' {
		s = s[:len(s)-1]
	}
	if s[len(s)-1] == '.' {
		s = s[:len(s)-1]
	}
	return s
}

// CheckElevation reports an elevation outside −1500..15000 ft.
func CheckElevation(h Length) error {
	if outside(h.Feet(), ElevationRange) {
		return rangeErr("elevation", h.Feet(), "ft", ElevationRange)
	}
	return nil
}

// Station is the station pressure of the reading at elevation h.
func (r Reading) Station(h Length) Pressure {
	if r.BaroKind == AltimeterSetting {
		return StationFromAltimeter(r.Baro, h)
	}
	return r.Baro
}

// CheckTemp reports a temperature outside rg (°F), the value and the range
// said in units u as Validate says them: "68 °C ... is outside -40..60 °C".
func CheckTemp(field string, t Temperature, rg [2]float64, u Units) error {
	if outside(t.Fahrenheit(), rg) {
		return rangeErr(field, t.In(u.Temp), u.Temp.String(), [2]float64{Fahrenheit(rg[0]).In(u.Temp), Fahrenheit(rg[1]).In(u.Temp)})
	}
	return nil
}

// Validate checks every field of the reading taken at elevation h against its
// valid range and returns the first that fails, naming the field, the value,
// its unit and the range (in imperial units: ValidateIn speaks the crew's).
func (r Reading) Validate(h Length) error { return r.ValidateIn(h, Imperial) }

// ValidateIn is Validate with the value and its range said in units u: a
// metric crew's 68 (°C) is "68 °C ... outside -40..60 °C", never "154.4 °F".
func (r Reading) ValidateIn(h Length, u Units) error {
	if outside(h.Feet(), ElevationRange) {
		return rangeErr("elevation", h.In(u.Length), u.Length.String(), [2]float64{Feet(ElevationRange[0]).In(u.Length), Feet(ElevationRange[1]).In(u.Length)})
	}
	temp := func(field string, t Temperature, rg [2]float64) error { return CheckTemp(field, t, rg, u) }
	pres := func(p float64) [2]float64 { // a range in inHg, in the crew's unit
		return [2]float64{InHg(p).In(u.Pressure), InHg(StationRange[1]).In(u.Pressure)}
	}
	if err := temp("temp", r.Temp, TempRange); err != nil {
		return err
	}
	if r.BaroKind == AltimeterSetting && outside(r.Baro.InHg(), StationRange) {
		return rangeErr("baro", r.Baro.In(u.Pressure), u.Pressure.String(), pres(StationRange[0]))
	}
	if p := r.Station(h); outside(p.InHg(), StationRange) {
		if r.BaroKind == AltimeterSetting {
			return inputErr("baro", trimFloat(r.Baro.In(u.Pressure))+" "+u.Pressure.String(),
				"gives station pressure %s %s at %s %s, outside %s..%s %s", trimFloat(p.In(u.Pressure)), u.Pressure,
				trimFloat(h.In(u.Length)), u.Length, trimFloat(pres(StationRange[0])[0]), trimFloat(pres(StationRange[0])[1]), u.Pressure)
		}
		return rangeErr("baro", p.In(u.Pressure), u.Pressure.String(), pres(StationRange[0]))
	}
	if err := r.checkStationAt(h, u); err != nil {
		return err
	}
	if r.DewPointSet {
		if r.DewPoint > r.Temp+1e-9 {
			return inputErr("dewpoint", r.DewPoint.Format(u.Temp, 1),
				"is above the air temperature %s (the dew point can be at most the air temperature)", r.Temp.Format(u.Temp, 1))
		}
		if err := temp("dewpoint", r.DewPoint, [2]float64{-100, TempRange[1]}); err != nil {
			return err
		}
	} else if pct := r.RH * 100; outside(pct, [2]float64{0, 100}) {
		return rangeErr("humidity", pct, "%", [2]float64{0, 100})
	}
	if w := r.Wind.MPH(); outside(w, WindRange) {
		return rangeErr("wind", r.Wind.In(u.Speed), u.Speed.String(), [2]float64{MPH(WindRange[0]).In(u.Speed), MPH(WindRange[1]).In(u.Speed)})
	}
	if outside(r.WindFrom, [2]float64{0, 360}) {
		return rangeErr("wind-from", r.WindFrom, "°", [2]float64{0, 360})
	}
	if r.HasTrack {
		if err := temp("track-temp", r.TrackTemp, TrackTempRange); err != nil {
			return err
		}
	}
	return nil
}

// StationMargin is how far, in feet, the pressure altitude of a station
// pressure may lie below the track's elevation. The highest sea-level
// pressure on record, about 1084 hPa (Siberia, 1968; from memory), is a
// pressure altitude of −1,870 ft (NWS formula), and weather keeps sea-level
// pressure mostly within 950..1050 hPa (+1,770..−990 ft). 2,500 ft leaves
// room for a meter's error beyond the record, and still catches an airport's
// altimeter setting typed as station pressure at any track above 2,500 ft.
const StationMargin = 2500

// checkStationAt refuses a station pressure the air cannot have at
// elevation h: one whose pressure altitude is more than StationMargin below
// h. Such a figure is an altimeter setting (reduced to sea level) entered as
// station pressure; taken as station it gives a density altitude thousands of
// feet too low.
// u are the crew's units the figures are said in.
func (r Reading) checkStationAt(h Length, u Units) error {
	if r.BaroKind != StationPressure {
		return nil
	}
	pa := PressureAltitude(r.Baro).Feet()
	if pa >= h.Feet()-StationMargin {
		return nil
	}
	most := StationFromPressureAltitude(Feet(h.Feet() - StationMargin))
	places := 2
	if u.Pressure != UnitInHg {
		places = 0
	}
	return inputErr("baro", r.Baro.Format(u.Pressure),
		"is impossible as station pressure at %s (at most about %s there: it would be the pressure %s lower, "+
			"beyond any sea-level pressure on record); an airport or app figure is an altimeter setting: say --baro-kind altimeter (baro_kind altimeter in a file)",
		h.Format(u.Length), strconv.FormatFloat(most.In(u.Pressure), 'f', places, 64)+" "+u.Pressure.String(), Feet(h.Feet()-pa).Format(u.Length))
}

// PressureWarning returns a warning when the barometer figure looks like the
// other kind for a track at elevation h, or "" when it is believable. Sea-level
// reduced pressure (altimeter setting) stays within about 28.5..30.85 inHg
// almost always (common practice, from memory: the records are about 25.7
// and 32.1); a true station pressure at elevation is lower by about
// 1 inHg per 1000 ft.
func (r Reading) PressureWarning(h Length) string {
	const lo, hi = 28.5, 30.85 // inHg (965..1045 hPa): altimeter settings outside it are rare
	if math.Abs(h.Feet()) < 500 {
		return "" // the two kinds differ by less than the weather does
	}
	v := r.Baro.InHg()
	switch r.BaroKind {
	case StationPressure:
		a := AltimeterFromStation(r.Baro, h).InHg()
		if (a < lo || a > hi) && v >= lo && v <= hi {
			return fmt.Sprintf("baro %.2f inHg is entered as station pressure, but at %.0f ft it would mean "+
				"a sea-level altimeter setting of %.2f inHg, which is rare; "+
				"it looks like an altimeter (sea-level) setting: use --baro-kind altimeter if it came from an airport report or app",
				v, h.Feet(), a)
		}
	case AltimeterSetting:
		if v < lo || v > hi {
			return fmt.Sprintf("baro %.2f inHg is entered as an altimeter setting, but sea-level settings are rarely outside %.2f..%.2f inHg; "+
				"it looks like a station (uncorrected) pressure: use --baro-kind station if it came from a handheld meter",
				v, lo, hi)
		}
	}
	return ""
}

// Air is every figure pitcard derives from one reading.
type Air struct {
	Station          Pressure    // station pressure
	Altimeter        Pressure    // the altimeter setting equivalent at the track's elevation
	Saturation       Pressure    // saturation vapor pressure at the air temperature
	Vapor            Pressure    // partial pressure of water vapor
	Dry              Pressure    // partial pressure of dry air, station − vapor
	DewPoint         Temperature // dew point
	RH               float64     // relative humidity, fraction 0..1
	Density          float64     // kg/m³
	RelativeDensity  float64     // percent of standard dry air at 15 °C, 1013.25 hPa
	VirtualTemp      Temperature // virtual temperature
	PressureAltitude Length
	DensityAltitude  Length
	Grains           float64 // grains of water per lb of dry air
	CFJ1349          float64 // SAE J1349 (1990)
	CFJ1349v2004     float64 // SAE J1349 (2004 revision)
	CFSTD            float64 // SAE J607 "STD"
	CFDIN            float64 // DIN 70020
}

// Derive computes every air figure of reading r taken at elevation h. It does
// not validate; call Validate first for input a person typed.
func (r Reading) Derive(h Length) Air {
	var a Air
	a.Station = r.Station(h)
	a.Altimeter = AltimeterFromStation(a.Station, h)
	a.Saturation = SaturationVaporPressure(r.Temp)
	if r.DewPointSet {
		a.Vapor = SaturationVaporPressure(r.DewPoint)
		a.DewPoint = r.DewPoint
		a.RH = float64(a.Vapor / a.Saturation)
	} else {
		a.Vapor = Pressure(r.RH * float64(a.Saturation))
		a.RH = r.RH
		a.DewPoint = DewPoint(a.Vapor)
	}
	a.Dry = a.Station - a.Vapor
	a.Density = AirDensity(a.Station, r.Temp, a.Vapor)
	a.RelativeDensity = 100 * a.Density / StandardDensity
	a.VirtualTemp = VirtualTemperature(a.Station, r.Temp, a.Vapor)
	a.PressureAltitude = PressureAltitude(a.Station)
	a.DensityAltitude = DensityAltitude(a.Density)
	a.Grains = GrainsPerLb(a.Vapor, a.Station)
	a.CFJ1349 = CFSAEJ1349(r.Temp, a.Dry)
	a.CFJ1349v2004 = CFSAEJ1349v2004(r.Temp, a.Dry)
	a.CFSTD = CFSTD(r.Temp, a.Dry)
	a.CFDIN = CFDIN70020(r.Temp, a.Station)
	return a
}

// HeadwindComponent is the part of the wind blowing against a car running on
// compass heading heading (degrees): positive is a headwind, negative a tailwind.
func (r Reading) HeadwindComponent(heading float64) Speed {
	if r.WindDirUnknown {
		return 0
	}
	return Speed(float64(r.Wind) * math.Cos((r.WindFrom-heading)*math.Pi/180))
}

// Same reports whether two readings at a track of elevation elev hold the
// same values to the precision a prompt shows them (0.1 °F, 0.01 inHg, 1 %
// humidity, 1 °F of track, 1 mph of wind): the same reading entered twice.
func (r Reading) Same(o Reading, elev Length) bool {
	near := func(a, b, tol float64) bool { return math.Abs(a-b) <= tol }
	a, b := r.Derive(elev), o.Derive(elev)
	track := r.HasTrack == o.HasTrack && (!r.HasTrack || near(float64(r.TrackTemp), float64(o.TrackTemp), 0.3))
	return near(float64(r.Temp), float64(o.Temp), 0.06) && near(float64(a.Station), float64(b.Station), 20) && near(a.RH, b.RH, 0.006) &&
		track && near(float64(r.Wind), float64(o.Wind), 0.25) && r.WindDirUnknown == o.WindDirUnknown && r.WindUnknown == o.WindUnknown &&
		(r.Wind == 0 || near(r.WindFrom, o.WindFrom, 0.5))
}
