package prep

import (
	"fmt"
	"math"
	"strings"

	"pitcard/engine"
)

// Chart draws, as inline SVG, the logbook's finish ETs against density
// altitude, the calibrated model's line for today's track and wind (with
// today's correction), today's passes, left-out passes, and the predicted
// point with its interval. It returns "" when there is nothing to draw.
func Chart(c Card) string {
	in := c.Input
	dist := in.Car.DistanceFt
	if dist == 0 || len(c.Prediction.Timers) == 0 {
		return ""
	}
	type pt struct {
		x, y       float64
		today, out bool
		label      string
	}
	left := map[string]bool{}
	for _, o := range c.Prediction.Outliers {
		left[o.Pass.Key()] = true
	}
	var pts []pt
	for _, p := range in.Passes {
		et, ok := p.ETAt(dist)
		if !ok || !p.HasAir {
			continue
		}
		pts = append(pts, pt{x: p.Air.Derive(0).DensityAltitude.Feet(), y: et, today: in.Settings.DayStart.Same(p.Time, in.Call),
			out: left[p.Key()] || engine.Aborted(p.Notes), label: p.Session.String()})
	}
	f := c.Prediction.Finish()
	predX := c.AirCall.DensityAltitude.Feet()
	xs, ys := []float64{predX}, []float64{f.Low, f.High}
	for _, p := range pts {
		if !p.out {
			xs, ys = append(xs, p.x), append(ys, p.y)
		}
	}
	xlo, xhi := minmax(xs)
	ylo, yhi := minmax(ys)
	xlo, xhi = math.Floor((xlo-250)/500)*500, math.Ceil((xhi+250)/500)*500
	pad := math.Max((yhi-ylo)*0.08, 0.02)
	ylo, yhi = ylo-pad, yhi+pad

	const W, H, L, R, T, B = 420.0, 200.0, 44.0, 10.0, 14.0, 30.0
	sx := func(x float64) float64 { return L + (x-xlo)/(xhi-xlo)*(W-L-R) }
	sy := func(y float64) float64 { return T + (yhi-y)/(yhi-ylo)*(H-T-B) }
	var b strings.Builder
	fmt.Fprintf(&b, `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 %.0f %.0f" role="img" aria-label="ET against density altitude">`, W, H)
	fmt.Fprintf(&b, `<title>%s ET against density altitude</title>`, TimerName(dist))
	fmt.Fprintf(&b, `<rect x="%.1f" y="%.1f" width="%.1f" height="%.1f" fill="none" stroke="#999" stroke-width="0.6"/>`, L, T, W-L-R, H-T-B)
	// grid and ticks
	for x := xlo; x <= xhi+1; x += tickStep(xhi - xlo) {
		fmt.Fprintf(&b, `<line x1="%.1f" y1="%.1f" x2="%.1f" y2="%.1f" stroke="#ddd" stroke-width="0.5"/>`, sx(x), T, sx(x), H-B)
		fmt.Fprintf(&b, `<text x="%.1f" y="%.1f" font-size="7" text-anchor="middle">%.0f</text>`, sx(x), H-B+9, x)
	}
	ystep := niceStep((yhi - ylo) / 5)
	for y := math.Ceil(ylo/ystep) * ystep; y <= yhi; y += ystep {
		fmt.Fprintf(&b, `<line x1="%.1f" y1="%.1f" x2="%.1f" y2="%.1f" stroke="#ddd" stroke-width="0.5"/>`, L, sy(y), W-R, sy(y))
		fmt.Fprintf(&b, `<text x="%.1f" y="%.1f" font-size="7" text-anchor="end">%.2f</text>`, L-3, sy(y)+2.5, y)
	}
	fmt.Fprintf(&b, `<text x="%.1f" y="%.1f" font-size="8" text-anchor="middle">Density altitude (ft)</text>`, (L+W-R)/2, H-6)
	fmt.Fprintf(&b, `<text x="10" y="%.1f" font-size="8" text-anchor="middle" transform="rotate(-90 10 %.1f)">%s ET (s)</text>`, (T+H-B)/2, (T+H-B)/2, TimerName(dist))
	// the model's line: today's track and wind, corrected as today's prediction is
	bias := f.ET - c.Prediction.Model.ETAt(dist)
	var line []string
	for i := 0; i <= 16; i++ {
		x := xlo + (xhi-xlo)*float64(i)/16
		r := engine.ThinnerAir(in.Air, x-predX)
		env := engine.NewEnv(r, in.Track.HeadingDeg, in.Prep, c.Prediction.Env.MassKg)
		y := engine.Simulate(&c.Fit.Vehicle, c.Fit.Params, env, dist).ETAt(dist) + bias
		if y >= ylo && y <= yhi {
			line = append(line, fmt.Sprintf("%.1f,%.1f", sx(x), sy(y)))
		}
	}
	if len(line) > 1 {
		fmt.Fprintf(&b, `<polyline points="%s" fill="none" stroke="#1f5fa8" stroke-width="1.4"/>`, strings.Join(line, " "))
	}
	for _, p := range pts {
		if p.y < ylo || p.y > yhi || p.x < xlo || p.x > xhi {
			continue
		}
		switch {
		case p.out:
			fmt.Fprintf(&b, `<path d="M%.1f %.1fl4 4m0 -4l-4 4" stroke="#b00" stroke-width="1"/>`, sx(p.x)-2, sy(p.y)-2)
		case p.today:
			fmt.Fprintf(&b, `<circle cx="%.1f" cy="%.1f" r="2.6" fill="#e07b00"/><text x="%.1f" y="%.1f" font-size="6">%s</text>`, sx(p.x), sy(p.y), sx(p.x)+3.5, sy(p.y)-2, p.label)
		default:
			fmt.Fprintf(&b, `<circle cx="%.1f" cy="%.1f" r="1.8" fill="#888"/>`, sx(p.x), sy(p.y))
		}
	}
	// the prediction with its interval
	px := sx(predX)
	fmt.Fprintf(&b, `<line x1="%.1f" y1="%.1f" x2="%.1f" y2="%.1f" stroke="#111" stroke-width="1.4"/>`, px, sy(f.Low), px, sy(f.High))
	fmt.Fprintf(&b, `<path d="M%.1f %.1fl4 4l-4 4l-4 -4z" fill="#111"/>`, px, sy(f.ET)-4)
	fmt.Fprintf(&b, `<text x="%.1f" y="%.1f" font-size="7" font-weight="bold">next %.3f</text>`, px+6, sy(f.ET)+2.5, f.ET)
	// legend
	fmt.Fprintf(&b, `<g font-size="6.5"><circle cx="%.0f" cy="8" r="1.8" fill="#888"/><text x="%.0f" y="10">logbook</text>`, L+4, L+8)
	fmt.Fprintf(&b, `<circle cx="%.0f" cy="8" r="2.4" fill="#e07b00"/><text x="%.0f" y="10">today</text>`, L+44, L+48)
	fmt.Fprintf(&b, `<path d="M%.0f 6l4 4m0 -4l-4 4" stroke="#b00"/><text x="%.0f" y="10">left out</text>`, L+76, L+83)
	fmt.Fprintf(&b, `<line x1="%.0f" y1="8" x2="%.0f" y2="8" stroke="#1f5fa8" stroke-width="1.4"/><text x="%.0f" y="10">model, today's track and wind</text>`, L+118, L+130, L+133)
	fmt.Fprintf(&b, `<path d="M%.0f 4l4 4l-4 4l-4 -4z" fill="#111"/><text x="%.0f" y="10">prediction, 95 %% interval</text></g>`, L+236, L+242)
	b.WriteString(`</svg>`)
	return b.String()
}

func minmax(v []float64) (float64, float64) {
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, x := range v {
		lo, hi = math.Min(lo, x), math.Max(hi, x)
	}
	return lo, hi
}

func tickStep(span float64) float64 {
	switch {
	case span > 8000:
		return 2000
	case span > 4000:
		return 1000
	}
	return 500
}

// niceStep rounds a step up to 1, 2 or 5 times a power of ten.
func niceStep(s float64) float64 {
	p := math.Pow(10, math.Floor(math.Log10(s)))
	for _, m := range []float64{1, 2, 5, 10} {
		if m*p >= s {
			return m * p
		}
	}
	return 10 * p
}
