package event

import (
	"encoding/json"
	"fmt"
	"math"
	"strings"
	"time"

	"github.com/shopspring/decimal"

	"pitcard/engine"
	"pitcard/logbook"
	"pitcard/weather"
)

// PassJSON is one logged pass as the JSON of every front end ('log list
// --format json', the pit page's data): slip values as the slip prints
// them, conditions rounded to what the meters read. Its timers and traps
// have the shape of a prediction's ('predict', the card's "prediction"):
// [{distance_ft, et}] and [{distance_ft, mph}], numbers with the slip's
// digits. ET and MPH, keyed by the distance as text, are the older shape,
// kept for scripts written before (README, "Names").
type PassJSON struct {
	Time     string            `json:"time"`
	Track    string            `json:"track"`
	Session  string            `json:"session"`
	Lane     string            `json:"lane"`
	Dial     *string           `json:"dial"`
	RT       *string           `json:"rt"`
	Timers   []PassTimerJSON   `json:"timers"`
	Traps    []PassTrapJSON    `json:"traps"`
	ET       map[string]string `json:"et"`
	MPH      map[string]string `json:"mph"`
	TempF    *float64          `json:"temp_f"`
	BaroInHg *float64          `json:"baro_inhg"`
	RHPct    *float64          `json:"humidity_pct"`
	TrackF   *float64          `json:"track_temp_f"`
	DAFt     *float64          `json:"density_altitude_ft"`
	WeightLb *float64          `json:"weight_lb"`
	Notes    string            `json:"notes"`
	Change   string            `json:"change"` // what changed on the car before it; "" nothing
}

// PassTimerJSON is one timer of a pass: the ET to distance_ft.
type PassTimerJSON struct {
	DistanceFt float64     `json:"distance_ft"`
	ET         json.Number `json:"et"`
}

// PassTrapJSON is one trap speed of a pass, at distance_ft.
type PassTrapJSON struct {
	DistanceFt float64     `json:"distance_ft"`
	MPH        json.Number `json:"mph"`
}

// ElevationFor is the elevation of the track a pass ran at: this folder's
// track, or sea level for another (conditions are station pressure, so the
// density needs no elevation; only altimeter conversions would).
func ElevationFor(p logbook.Pass, trk engine.Track) weather.Length {
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
	s := logbook.FormatSeconds(d.Decimal, 0)
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
func PassAsJSON(p logbook.Pass, trk engine.Track) PassJSON {
	j := PassJSON{Time: p.Time.Format(time.RFC3339), Track: p.Track, Session: p.Session.String(), Lane: string(p.Lane),
		Dial: optSec(p.Dial), RT: optSec(p.RT), Timers: []PassTimerJSON{}, Traps: []PassTrapJSON{},
		ET: map[string]string{}, MPH: map[string]string{}, Notes: p.Notes, Change: p.Change}
	for i, ft := range logbook.TimerDistancesFt {
		if p.ET[i].Valid {
			et := logbook.FormatSeconds(p.ET[i].Decimal, 0)
			j.Timers = append(j.Timers, PassTimerJSON{ft, json.Number(et)})
			j.ET[fmt.Sprintf("%.0f", ft)] = et
		}
	}
	for _, tr := range []struct {
		ft  float64
		mph decimal.NullDecimal
	}{{660, p.MPH660}, {1320, p.MPH1320}} {
		if tr.mph.Valid {
			mph := logbook.FormatSeconds(tr.mph.Decimal, 0)
			j.Traps = append(j.Traps, PassTrapJSON{tr.ft, json.Number(mph)})
			j.MPH[fmt.Sprintf("%.0f", tr.ft)] = mph
		}
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
