package main

import (
	"errors"
	"fmt"
	"io/fs"
	"time"

	"github.com/jedib0t/go-pretty/v6/table"
	"github.com/spf13/cobra"

	"pitcard/entry"
	"pitcard/event"
	"pitcard/prep"
	"pitcard/weather"
)

type airOptions struct {
	g       *globalOptions
	s       *IOStreams
	reading readingFlags
	Latest  bool
	Format  string
}

func newAirCmd(s *IOStreams, g *globalOptions) *cobra.Command {
	o := &airOptions{g: g, s: s}
	cmd := &cobra.Command{
		Use:   "air",
		Short: "Every figure of the air from one reading: density altitude, air density, correction factors",
		Long: `Turns one weather reading into the figures a crew reasons with: density and
pressure altitude, air density and relative air density, vapor pressure, dew
point, grains of water, and the engine correction factors SAE J1349 (1990 and
2004), STD (SAE J607) and DIN 70020.

Give the reading with flags, or --latest for the weather log's last reading
(flags then replace single fields of it). Bare numbers take the units of the
'units' setting; a number with a unit (88F, 31C, 986hPa) is read as typed.
Pressure is station pressure, as handheld meters read it, unless
--baro-kind altimeter says it is an airport's sea-level setting.`,
		Example: `  pitcard air --temp 88F --baro 28.92inHg --humidity 40% --elevation 1850ft
  pitcard air --latest --track-temp 118F
  pitcard air --demo --format json`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error { return airRun(cmd, o) },
	}
	o.reading.bind(cmd)
	cmd.Flags().BoolVar(&o.Latest, "latest", false, "use the weather log's last reading")
	cmd.Flags().StringVar(&o.Format, "format", "text", "text, markdown or json")
	withOut(cmd, s)
	return cmd
}

func airRun(cmd *cobra.Command, o *airOptions) error {
	if err := checkFormat(o.Format, "text", "markdown", "json"); err != nil {
		return err
	}
	e, err := o.g.open(cmd)
	if err != nil {
		return err
	}
	trk, trkErr := e.Track()
	_, statErr := fs.Stat(e.FS, event.TrackFile)
	missing := trkErr != nil && errors.Is(statErr, fs.ErrNotExist) && e.TrackPath == ""
	// Outside an event folder, a station reading still gives every figure
	// but the altimeter setting, the one that needs the elevation.
	elevKnown := true
	var elev weather.Length
	switch {
	case missing && o.reading.Elevation == "" && !o.Latest && !e.Demo && o.reading.BaroKind != "altimeter":
		elevKnown = false
	case trkErr != nil && o.reading.Elevation == "":
		return trkErr
	default:
		if elev, err = o.reading.SiteElevation(e.Settings.Units, trk.Elevation(), trkErr == nil); err != nil {
			return err
		}
	}
	var base *weather.Reading
	var leftOut error // weather.csv rows that could not be read: named after the output, exit 2
	if o.Latest || (e.Demo && !o.reading.Given()) {
		log, bad, err := e.ReadableWeather(elev)
		if err != nil {
			return err
		}
		if bad != nil {
			leftOut = bad
		}
		if len(log) == 0 {
			return userErrf("%s has no readings: add one with 'pitcard weather add'", e.Name(event.WeatherFile))
		}
		base = &log[len(log)-1]
	}
	r, err := o.reading.ReadingAt(e.Settings.Units, o.s.Now(), base)
	if err != nil {
		return orLatest(err)
	}
	if err := entry.ValidateFields(r, elev, e.Settings.Units); err != nil {
		return err
	}
	if w := r.PressureWarning(elev); w != "" && elevKnown {
		o.s.warn(w)
	}
	if !elevKnown {
		fmt.Fprintf(o.s.Err, "pitcard: no %s here and no --elevation: every figure below is from the station pressure; the altimeter setting is left out (it needs the elevation)\n", event.TrackFile)
	}
	rep := newAirReport(r, elev, trk.HeadingDeg, trk.Name != "")
	if !elevKnown {
		rep.AltimeterSettingInHg, rep.ElevationFt = nil, nil
		rep.Warnings = []string{"the track elevation is unknown: no altimeter setting"}
	}
	if o.Format == "json" {
		return errors.Join(writeJSON(o.s.Out, rep), leftOut)
	}
	title := "Air"
	if trk.Name != "" {
		title += " at " + trk.Name
	}
	title += ", " + r.Time.Format("2006-01-02 15:04")
	t := newTable(o.s, title)
	airRows(t, r, r.Derive(elev), elev, elevKnown, trk.HeadingDeg, trk.Name != "", e.Settings.Units, stationNote(r))
	render(o.s, t, o.Format)
	return leftOut
}

// airReport is the JSON form of `pitcard air`. The first block of keys is
// documented in the README and stays stable; scripts rely on them. A figure
// that is also a column of the logbook or the weather log has that column's
// name (dewpoint_f, baro_inhg); the older names stay as aliases of the same
// value (README, "Names").
type airReport struct {
	DensityAltitudeFt     float64 `json:"density_altitude_ft"`
	PressureAltitudeFt    float64 `json:"pressure_altitude_ft"`
	AirDensityKgM3        float64 `json:"air_density_kg_m3"`
	RelativeAirDensityPct float64 `json:"relative_air_density_pct"`
	VaporPressureHPa      float64 `json:"vapor_pressure_hpa"`
	DewPointF             float64 `json:"dewpoint_f"`
	GrainsPerLb           float64 `json:"grains_per_lb"`
	CFSAEJ1349            float64 `json:"cf_sae_j1349"`
	CFSAEJ13492004        float64 `json:"cf_sae_j1349_2004"`
	CFSTD                 float64 `json:"cf_std"`
	CFDIN70020            float64 `json:"cf_din70020"`
	VirtualTempF          float64 `json:"virtual_temp_f"`
	BaroInHg              float64 `json:"baro_inhg"`

	// Aliases kept for scripts written before the names were one.
	OldDewPointF        float64 `json:"dew_point_f"`
	StationPressureInHg float64 `json:"station_pressure_inhg"`

	Time                  string   `json:"time"`
	TempF                 float64  `json:"temp_f"`
	HumidityPct           float64  `json:"humidity_pct"`
	AltimeterSettingInHg  *float64 `json:"altimeter_setting_inhg"`
	SaturationPressureHPa float64  `json:"saturation_vapor_pressure_hpa"`
	DryAirPressureHPa     float64  `json:"dry_air_pressure_hpa"`
	ElevationFt           *float64 `json:"elevation_ft"`
	WindMph               *float64 `json:"wind_mph"`
	WindFromDeg           *float64 `json:"wind_from_deg"`
	HeadwindMph           *float64 `json:"headwind_mph"`
	TrackTempF            *float64 `json:"track_temp_f"`
	Warnings              []string `json:"warnings"`
}

func newAirReport(r weather.Reading, elev weather.Length, heading float64, haveHeading bool) airReport {
	a := r.Derive(elev)
	rep := airReport{
		DensityAltitudeFt:     weather.RoundDensityAltitude(a.DensityAltitude.Feet(), weather.UnitFt),
		PressureAltitudeFt:    round(a.PressureAltitude.Feet(), 0),
		AirDensityKgM3:        round(a.Density, 5),
		RelativeAirDensityPct: round(a.RelativeDensity, 2),
		VaporPressureHPa:      round(a.Vapor.HPa(), 2),
		DewPointF:             round(a.DewPoint.Fahrenheit(), 1),
		GrainsPerLb:           round(a.Grains, 1),
		CFSAEJ1349:            round(a.CFJ1349, 4),
		CFSAEJ13492004:        round(a.CFJ1349v2004, 4),
		CFSTD:                 round(a.CFSTD, 4),
		CFDIN70020:            round(a.CFDIN, 4),
		VirtualTempF:          round(a.VirtualTemp.Fahrenheit(), 1),
		BaroInHg:              round(a.Station.InHg(), 3),
		Time:                  r.Time.Format(time.RFC3339),
		TempF:                 round(r.Temp.Fahrenheit(), 1),
		HumidityPct:           round(a.RH*100, 1),
		AltimeterSettingInHg:  event.OptFloat(a.Altimeter.InHg(), true, 3),
		SaturationPressureHPa: round(a.Saturation.HPa(), 2),
		DryAirPressureHPa:     round(a.Dry.HPa(), 2),
		ElevationFt:           event.OptFloat(elev.Feet(), true, 0),
		WindMph:               event.OptFloat(r.Wind.MPH(), !r.WindUnknown, 1),
		WindFromDeg:           event.OptFloat(r.WindFrom, !r.WindDirUnknown && !r.WindUnknown, 0),
		Warnings:              []string{},
	}
	rep.OldDewPointF, rep.StationPressureInHg = rep.DewPointF, rep.BaroInHg
	if haveHeading && !r.WindUnknown {
		hw := round(r.HeadwindComponent(heading).MPH(), 1)
		rep.HeadwindMph = &hw
	}
	if r.HasTrack {
		tt := round(r.TrackTemp.Fahrenheit(), 1)
		rep.TrackTempF = &tt
	}
	if w := r.PressureWarning(elev); w != "" {
		rep.Warnings = append(rep.Warnings, w)
	}
	return rep
}

// airRows adds the air figures to t in the crew's units.
// airRows are every figure of the air; pressureNote says where the station
// pressure came from (read, from an altimeter setting, forecast).
func airRows(t table.Writer, r weather.Reading, a weather.Air, elev weather.Length, elevKnown bool, heading float64, haveHeading bool, u weather.Units, pressureNote string) {
	altimeter, altNote := a.Altimeter.Format(u.Pressure), "sea-level equivalent at "+elev.Format(u.Length)
	if !elevKnown {
		altimeter, altNote = "–", "needs the track's elevation (--elevation or track.yaml)"
	}
	t.AppendHeader(table.Row{"Figure", "Value", "Notes"})
	t.AppendRows([]table.Row{
		{"Density altitude", a.DensityAltitude.FormatDensityAltitude(u.Length), fmt.Sprintf("standard air at %s would be this dense", a.DensityAltitude.FormatDensityAltitude(u.Length))},
		{"Pressure altitude", a.PressureAltitude.Format(u.Length), ""},
		{"Relative air density", fmt.Sprintf("%.1f %%", a.RelativeDensity), "of dry air at 15 °C, 1013.25 hPa"},
		{"Air density", fmt.Sprintf("%.4f kg/m³", a.Density), ""},
		{"Air temperature", r.Temp.Format(u.Temp, 1), ""},
		{"Station pressure", a.Station.Format(u.Pressure), pressureNote},
		{"Altimeter setting", altimeter, altNote},
		{"Relative humidity", fmt.Sprintf("%.0f %%", a.RH*100), ""},
		{"Dew point", a.DewPoint.Format(u.Temp, 0), ""},
		{"Vapor pressure", fmt.Sprintf("%.2f hPa", a.Vapor.HPa()), fmt.Sprintf("saturation %.2f hPa", a.Saturation.HPa())},
		{"Water", water(a, u), "of dry air"},
		{"Virtual temperature", a.VirtualTemp.Format(u.Temp, 1), "dry air this warm would be as dense"},
	})
	t.AppendSeparator()
	t.AppendRows([]table.Row{
		{"CF SAE J1349", fmt.Sprintf("%.4f", a.CFJ1349), "1990; 25 °C, 99 kPa dry"},
		{"CF SAE J1349 (2004)", fmt.Sprintf("%.4f", a.CFJ1349v2004), ""},
		{"CF STD (J607)", fmt.Sprintf("%.4f", a.CFSTD), "60 °F, 29.92 inHg dry"},
		{"CF DIN 70020", fmt.Sprintf("%.4f", a.CFDIN), "20 °C, 1013 hPa"},
	})
	t.AppendSeparator()
	wind, note := windText(r, u), ""
	if haveHeading && r.Wind > 0 {
		note = prep.HeadwindWords(r, heading, u)
	}
	t.AppendRow(table.Row{"Wind", wind, note})
	if r.HasTrack {
		t.AppendRow(table.Row{"Track temperature", r.TrackTemp.Format(u.Temp, 0), ""})
	}
}

func stationNote(r weather.Reading) string {
	if r.BaroKind == weather.AltimeterSetting {
		return "from the altimeter setting " + r.Baro.Format(weather.UnitInHg)
	}
	return "as read"
}

// windText is "6 mph from 210°", "calm", or "not read".
func windText(r weather.Reading, u weather.Units) string {
	if r.WindUnknown {
		return "not read"
	}
	if r.Wind.MPH() < 0.5 {
		return "calm"
	}
	if r.WindDirUnknown {
		return r.Wind.Format(u.Speed, 0) + ", direction not read"
	}
	return r.Wind.Format(u.Speed, 0) + fmt.Sprintf(" from %03.0f°", r.WindFrom)
}

// water is the air's water content: grains per lb (the U.S. trade's unit),
// or grams per kg in metric (7000 grains = 1 lb, so g/kg = grains/lb ÷ 7).
func water(a weather.Air, u weather.Units) string {
	if u.Temp == weather.DegC {
		return fmt.Sprintf("%.1f g/kg", a.Grains/7)
	}
	return fmt.Sprintf("%.0f grains/lb", a.Grains)
}
