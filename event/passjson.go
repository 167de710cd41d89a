package event

import (
	"fmt"
	"math"
	"strings"
	"time"

	"github.com/shopspring/decimal"

	"pitcard/engine"
	"pitcard/weather"
)

// PassJSON is one logged pass as the JSON of every front end ('log list
// --format json', the pit page's data): slip values as the slip prints
// them, conditions rounded to what the meters read.
type PassJSON struct {
	Time     string            `json:"time"`
	Track    string            `json:"track"`
	Session  string            `json:"session"`
	Lane     string            `json:"lane"`
	Dial     *string           `json:"dial"`
	RT       *string           `json:"rt"`
	ET       map[string]string `json:"et"`
	MPH      map[string]string `json:"mph"`
	TempF    *float64          `json:"temp_f"`
	BaroInHg *float64          `json:"baro_inhg"`
	RHPct    *float64          `json:"humidity_pct"`
	TrackF   *float64          `json:"track_temp_f"`
	DAFt     *float64          `json:"density_altitude_ft"`
	WeightLb *float64          `json:"weight_lb"`
	Notes    string            `json:"notes"`
}

// ElevationFor is the elevation of the track a pass ran at: this folder's
// track, or sea level for another (conditions are station pressure, so the
// density needs no elevation; only altimeter conversions would).
func ElevationFor(p engine.Pass, trk engine.Track) weather.Length {
	if strings.EqualFold(p.Track, trk.Name) {
		return trk.Elevation()
	}
	return 0
}

// optSec is a slip time as printed, or nil when not timed.
func optSec(d decimal.NullDecimal) *string {
	if !d.Valid {
		return nil
	}
	s := engine.FormatSeconds(d.Decimal, 0)
	return &s
}

// OptFloat is v rounded to dec decimals, or nil (JSON null) when not ok.
func OptFloat(v float64, ok bool, dec int) *float64 {
	if !ok {
		return nil
	}
	p := math.Pow(10, float64(dec))
	r := math.Round(v*p) / p
	return &r
}

// PassAsJSON is p as JSON; trk is the folder's track (for the elevation).
func PassAsJSON(p engine.Pass, trk engine.Track) PassJSON {
	j := PassJSON{Time: p.Time.Format(time.RFC3339), Track: p.Track, Session: p.Session.String(), Lane: string(p.Lane),
		Dial: optSec(p.Dial), RT: optSec(p.RT), ET: map[string]string{}, MPH: map[string]string{}, Notes: p.Notes}
	for i, ft := range engine.Timers {
		if p.ET[i].Valid {
			j.ET[fmt.Sprintf("%.0f", ft)] = engine.FormatSeconds(p.ET[i].Decimal, 0)
		}
	}
	if p.MPH660.Valid {
		j.MPH["660"] = engine.FormatSeconds(p.MPH660.Decimal, 0)
	}
	if p.MPH1320.Valid {
		j.MPH["1320"] = engine.FormatSeconds(p.MPH1320.Decimal, 0)
	}
	if p.HasAir {
		j.TempF = OptFloat(p.Air.Temp.Fahrenheit(), true, 2)
		j.BaroInHg = OptFloat(p.Air.Baro.InHg(), true, 3)
		j.RHPct = OptFloat(p.Air.RH*100, true, 1)
		j.DAFt = OptFloat(weather.RoundDensityAltitude(p.Air.Derive(ElevationFor(p, trk)).DensityAltitude.Feet(), weather.UnitFt), true, 0)
	}
	j.TrackF = OptFloat(p.Air.TrackTemp.Fahrenheit(), p.Air.HasTrack, 1)
	j.WeightLb = OptFloat(p.WeightLb, p.WeightLb > 0, 1)
	return j
}
