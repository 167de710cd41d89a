package weather

import (
	"fmt"
	"math"
	"slices"
	"sort"
	"time"
)

// Limits of the weather log's forecast.
const (
	// MaxAhead is the furthest pitcard forecasts past the last reading: beyond
	// a few hours a straight-line trend says nothing about the evening air.
	MaxAhead = 3 * time.Hour
	// TrendWindow is how far back from the last reading the trend looks.
	TrendWindow = 2 * time.Hour
	// MinTrendReadings and MinTrendSpan are the least a trend needs.
	MinTrendReadings = 3
	MinTrendSpan     = 20 * time.Minute
	// NoisyDAFeet: when readings scatter more than this around their trend
	// (one standard error of the forecast density altitude), the forecast is
	// flagged as not to be trusted.
	NoisyDAFeet = 250.0
	// MeterDAFeet is the least uncertainty of a forecast density altitude:
	// a handheld meter resolves about 0.5 °F and 0.01 inHg, together about
	// 30 ft of DA (from memory), however straight the trend.
	MeterDAFeet = 30.0
)

// TrackTrendReach is, in °F, how far past the highest or lowest track reading of
// its window a forecast's track temperature may go. A surface warms and
// cools on a curve (sun up, sun down), which a straight line run forward
// overshoots (common practice, no source).
const TrackTrendReach = 10.0

// Forecast is the air expected at a future time from the weather log's trend.
type Forecast struct {
	At       time.Time
	Reading  Reading       // forecast air; station pressure and dew point
	Air      Air           // every figure derived from Reading
	Used     int           // readings the forecast leaned on
	Span     time.Duration // time from the first to the last of those readings
	Ahead    time.Duration // from the last reading to At (≤ 0 inside the log)
	DAError  Length        // one standard error of the forecast density altitude
	Trusted  bool          // false: too short or too noisy a log; see Notes
	Notes    []string      // what the forecast leaned on and any doubt, in words
	Interval bool          // true: At lies inside the log, interpolated
}

// ForecastAt forecasts the air at time at from log (readings of one day at one
// track, at elevation elev). Inside the log's time range it interpolates
// between the two readings around at; after the last reading it extends the
// straight-line trend of the last TrendWindow, up to MaxAhead. Too few readings
// for a trend carry the last reading forward, flagged untrusted.
func ForecastAt(log []Reading, at time.Time, elev Length) (Forecast, error) {
	if len(log) == 0 {
		return Forecast{}, inputErr("weather log", "", "has no readings (add one with `pitcard weather add`)")
	}
	if !slices.IsSortedFunc(log, func(a, b Reading) int { return a.Time.Compare(b.Time) }) {
		log = slices.Clone(log)
		SortLog(log)
	}
	first, last := log[0], log[len(log)-1]
	f := Forecast{At: at, Ahead: at.Sub(last.Time)}
	if at.Before(first.Time) {
		return f, inputErr("at", at.Format("15:04"), "is before the first reading of the log (%s)", first.Time.Format("15:04"))
	}
	if f.Ahead > MaxAhead {
		return f, inputErr("at", at.Format("15:04"),
			"is %s after the last reading (%s); pitcard forecasts at most %s ahead: take a fresh reading",
			roundMin(f.Ahead), last.Time.Format("15:04"), roundMin(MaxAhead))
	}
	if f.Ahead <= 0 {
		return interpolate(log, at, elev, f), nil
	}

	// The trend window: the last TrendWindow of readings.
	start := sort.Search(len(log), func(i int) bool { return !log[i].Time.Before(last.Time.Add(-TrendWindow)) })
	win := log[start:]
	f.Used, f.Span = len(win), last.Time.Sub(win[0].Time)
	if f.Used < MinTrendReadings || f.Span < MinTrendSpan {
		return carryForward(f, len(win), last, elev), nil
	}
	return trendAhead(f, win, elev), nil
}

// carryForward is the forecast from a window of n readings too few or too
// short to trend: the last reading carried forward unchanged to f.At, and
// untrusted, with a note saying why.
func carryForward(f Forecast, n int, last Reading, elev Length) Forecast {
	f.Reading = last
	f.Reading.Time = f.At
	f.Air = f.Reading.Derive(elev)
	f.Used = 1
	f.Notes = append(f.Notes, fmt.Sprintf("too short to trend: %d reading%s over %s in the last %s; "+
		"the %s reading is carried forward unchanged (a trend needs %d readings over %s)",
		n, map[bool]string{true: "", false: "s"}[n == 1], roundMin(f.Span), roundMin(TrendWindow), last.Time.Format("15:04"), MinTrendReadings, roundMin(MinTrendSpan)))
	return f
}

// trendAhead is the forecast f.Ahead past the window win's last reading: a
// straight line fitted to each of temperature, station pressure and dew
// point (never above the temperature), the window's mean wind, the track's
// own trend (trackTrend), and how far to trust it (judgeTrend).
func trendAhead(f Forecast, win []Reading, elev Length) Forecast {
	last := win[len(win)-1]
	x := make([]float64, len(win)) // minutes from the last reading
	temp, stn, dew, da := make([]float64, len(win)), make([]float64, len(win)), make([]float64, len(win)), make([]float64, len(win))
	var track, trackX []float64
	var windSum float64
	for i, r := range win {
		x[i] = r.Time.Sub(last.Time).Minutes()
		a := r.Derive(elev)
		temp[i], stn[i], dew[i], da[i] = r.Temp.Fahrenheit(), a.Station.InHg(), a.DewPoint.Fahrenheit(), a.DensityAltitude.Feet()
		if r.HasTrack {
			track, trackX = append(track, r.TrackTemp.Fahrenheit()), append(trackX, x[i])
		}
		windSum += r.Wind.MPH()
	}
	x0 := f.Ahead.Minutes()
	tF := fitLine(x, temp).at(x0)
	dF := math.Min(fitLine(x, dew).at(x0), tF)
	f.Reading = Reading{
		Time: f.At, Temp: Fahrenheit(tF), Baro: InHg(fitLine(x, stn).at(x0)), BaroKind: StationPressure,
		DewPointSet: true, DewPoint: Fahrenheit(dF),
		Wind: MPH(windSum / float64(len(win))), WindFrom: last.WindFrom, WindDirUnknown: last.WindDirUnknown, WindUnknown: last.WindUnknown,
	}
	f = trackTrend(f, trackX, track, last, x0)
	f.Air = f.Reading.Derive(elev)
	daFit := fitLine(x, da)
	f.DAError = Feet(math.Max(daFit.predictionError(x0), MeterDAFeet))
	return judgeTrend(f, win[0].Time, last.Time)
}

// trackTrend sets the forecast's track temperature: the trend of the
// track readings (°F at minutes trackX from the last reading) at x0 when
// there are enough, else the last reading's, else none.
func trackTrend(f Forecast, trackX, track []float64, last Reading, x0 float64) Forecast {
	switch {
	case len(track) >= MinTrendReadings:
		t := fitLine(trackX, track).at(x0)
		// A surface's straight line run far ahead climbs without end (the
		// sun goes down); held to within TrackTrendReach of what was read.
		lo, hi := slices.Min(track)-TrackTrendReach, slices.Max(track)+TrackTrendReach
		if held := math.Max(lo, math.Min(hi, t)); held != t {
			f.Notes = append(f.Notes, fmt.Sprintf("the track's trend (%.0f °F) held to %.0f °F, within %.0f °F of the readings it rests on", t, held, TrackTrendReach))
			t = held
		}
		f.Reading.HasTrack, f.Reading.TrackTemp = true, Fahrenheit(t)
	case last.HasTrack:
		f.Reading.HasTrack, f.Reading.TrackTemp = true, last.TrackTemp
	}
	return f
}

// judgeTrend notes the trend a forecast rests on (from to to) and says
// whether to trust it: not when its density altitude scatters more than
// NoisyDAFeet, nor when it reaches further ahead than the trend reaches
// back. It changes no figure of the forecast.
func judgeTrend(f Forecast, from, to time.Time) Forecast {
	f.Trusted = true
	f.Notes = append(f.Notes, fmt.Sprintf("trend of %d readings over %s (%s–%s), %s ahead of the last",
		f.Used, roundMin(f.Span), from.Format("15:04"), to.Format("15:04"), roundMin(f.Ahead)))
	if f.DAError.Feet() > NoisyDAFeet {
		f.Trusted = false
		f.Notes = append(f.Notes, fmt.Sprintf("too noisy to trust: the readings scatter ±%.0f ft of density altitude around their trend "+
			"(more than %.0f ft); check the meter and take a fresh reading", f.DAError.Feet(), NoisyDAFeet))
	} else if f.Ahead > f.Span {
		// Further ahead than the trend reaches back is a guess at the
		// trend's own continuation, not a measurement of it.
		f.Trusted = false
		f.Notes = append(f.Notes, fmt.Sprintf("not to be trusted: forecasting %s ahead on %s of trend (a forecast is trusted only as far ahead as its trend reaches back); take a fresh reading nearer the call",
			roundMin(f.Ahead), roundMin(f.Span)))
	}
	return f
}

// interpolate gives the air at a time inside the log, between its neighbours.
func interpolate(log []Reading, at time.Time, elev Length, f Forecast) Forecast {
	j := sort.Search(len(log), func(i int) bool { return !log[i].Time.Before(at) })
	f.Interval, f.Trusted = true, true
	if log[j].Time.Equal(at) || j == 0 {
		f.Reading, f.Used = log[j], 1
		f.Air = f.Reading.Derive(elev)
		f.Notes = append(f.Notes, "the reading of "+log[j].Time.Format("15:04"))
		return f
	}
	a, b := log[j-1], log[j]
	w := at.Sub(a.Time).Seconds() / b.Time.Sub(a.Time).Seconds()
	lerp := func(p, q float64) float64 { return p + w*(q-p) }
	aa, ba := a.Derive(elev), b.Derive(elev)
	t := lerp(a.Temp.Fahrenheit(), b.Temp.Fahrenheit())
	f.Reading = Reading{
		Time: at, Temp: Fahrenheit(t),
		Baro: InHg(lerp(aa.Station.InHg(), ba.Station.InHg())), BaroKind: StationPressure,
		DewPointSet: true, DewPoint: Fahrenheit(math.Min(t, lerp(aa.DewPoint.Fahrenheit(), ba.DewPoint.Fahrenheit()))),
		Wind: MPH(lerp(a.Wind.MPH(), b.Wind.MPH())), WindFrom: b.WindFrom, WindDirUnknown: b.WindDirUnknown, WindUnknown: b.WindUnknown,
	}
	if a.HasTrack && b.HasTrack {
		f.Reading.HasTrack, f.Reading.TrackTemp = true, Fahrenheit(lerp(a.TrackTemp.Fahrenheit(), b.TrackTemp.Fahrenheit()))
	}
	f.Air = f.Reading.Derive(elev)
	f.Used, f.Span = 2, b.Time.Sub(a.Time)
	f.Notes = append(f.Notes, fmt.Sprintf("between the readings of %s and %s", a.Time.Format("15:04"), b.Time.Format("15:04")))
	return f
}

// line is a least-squares straight line y = a + b·x with what its prediction
// error needs.
type line struct {
	a, b, xMean, sxx, s float64
	n                   int
}

func fitLine(x, y []float64) line {
	n := float64(len(x))
	var mx, my float64
	for i := range x {
		mx += x[i]
		my += y[i]
	}
	mx, my = mx/n, my/n
	var sxx, sxy float64
	for i := range x {
		sxx += (x[i] - mx) * (x[i] - mx)
		sxy += (x[i] - mx) * (y[i] - my)
	}
	l := line{xMean: mx, sxx: sxx, n: len(x)}
	if sxx > 0 {
		l.b = sxy / sxx
	}
	l.a = my - l.b*mx
	if len(x) > 2 {
		var ss float64
		for i := range x {
			r := y[i] - l.at(x[i])
			ss += r * r
		}
		l.s = math.Sqrt(ss / (n - 2))
	}
	return l
}

func (l line) at(x float64) float64 { return l.a + l.b*x }

// predictionError is one standard error of a new observation at x.
func (l line) predictionError(x float64) float64 {
	if l.sxx == 0 {
		return l.s
	}
	return l.s * math.Sqrt(1+1/float64(l.n)+(x-l.xMean)*(x-l.xMean)/l.sxx)
}

func roundMin(d time.Duration) string {
	m := int(math.Round(d.Minutes()))
	if m < 60 {
		return fmt.Sprintf("%d min", m)
	}
	if m%60 == 0 {
		return fmt.Sprintf("%d h", m/60)
	}
	return fmt.Sprintf("%d h %02d min", m/60, m%60)
}
