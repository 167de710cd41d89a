package prep

import (
	"fmt"
	"math"
	"strings"

	"pitcard/engine"
	"pitcard/logbook"
)

// ChartLayout is what a chart is laid out for: its drawing's size in user
// units and its labels' size in the same units. A chart drawn Width px
// wide shows its labels Font px tall; the tick spacing, the margins, the
// legend's rows and the labels' places all follow from the two.
type ChartLayout struct {
	Name          string  // the svg's class, "chart-print"
	Width, Height float64 // the viewBox
	Font          float64 // the labels' size
}

var (
	// PrintChart is beside the dial on a printed sheet (about 120 mm
	// wide: 7 units print about 2 mm tall) and on a wide screen.
	PrintChart = ChartLayout{Name: "chart-print", Width: 420, Height: 200, Font: 7}
	// PhoneChart is the width of a phone's column, 340 px at 360 px less
	// the page's margins: drawn about 1:1, its labels are 13 px tall, 12 px
	// being the least a phone's label may be.
	PhoneChart = ChartLayout{Name: "chart-phone", Width: 340, Height: 300, Font: 13}
)

// Chart draws the chart for the printed card (PrintChart).
func Chart(c Card) string { return ChartFor(c, PrintChart) }

// charWidth is an average glyph's width as a share of the font size, a
// little wide for DejaVu Sans and system fonts' digits, so that a label's
// estimated box holds the drawn one.
const charWidth = 0.64

// box is a rectangle in user units.
type box struct{ x0, y0, x1, y1 float64 }

func (a box) meets(b box) bool { return a.x0 < b.x1 && b.x0 < a.x1 && a.y0 < b.y1 && b.y0 < a.y1 }

func (a box) inside(b box) bool { return a.x0 >= b.x0 && a.x1 <= b.x1 && a.y0 >= b.y0 && a.y1 <= b.y1 }

// textBox is the box of text drawn from (x, y) with its baseline at y:
// the ascent and descent of DejaVu Sans (0.93 and 0.24 of the size),
// padded by pad on every side.
func textBox(s string, x, y, font, pad float64, anchor string) box {
	w := float64(len([]rune(s))) * charWidth * font
	switch anchor {
	case "end":
		x -= w
	case "middle":
		x -= w / 2
	}
	return box{x - pad, y - 0.93*font - pad, x + w + pad, y + 0.24*font + pad}
}

// ChartFor draws, as inline SVG laid out for lay, the logbook's finish ETs
// against density altitude, the calibrated model's line for today's track
// and wind (with today's correction), today's passes, left-out passes, and
// the predicted point with its interval. It returns "" when there is
// nothing to draw. No label overlaps another label or a marker: a today's
// pass whose label finds no free place is drawn unlabelled.
func ChartFor(c Card, lay ChartLayout) string {
	dist := c.Input.Car.DistanceFt
	if dist == 0 || len(c.Prediction.Timers) == 0 {
		return ""
	}
	pts, earlier, earlierOut := splitEarlier(chartPasses(c))
	f := c.Prediction.Finish()
	predX := c.AirCall.DensityAltitude.Feet()
	ms := lay.Font / 7 // markers grow with the text
	legend := chartLegend(lay, ms, len(earlier), earlierOut)
	fr := newChartFrame(lay, legend.height, pts, earlier, predX, f)
	var b strings.Builder
	fr.drawAxes(&b, lay.Name, dist)
	b.WriteString(fr.modelLine(c, predX, f))
	b.WriteString(shadeCells(earlier, fr.plot, fr.sx, fr.sy))
	labels := chartLabels{b: &b, fr: fr}
	todays := labels.drawMarkers(pts)
	px := labels.drawPrediction(predX, f)
	// The labels: the prediction's first, then today's passes, each at the
	// first free place around its marker. The prediction's label may also
	// go above or below its interval, or, among a crowd of passes, to a
	// corner of the plot.
	gap := fr.fs * 0.4
	L, R, T, B, W, H, fs := fr.L, fr.R, fr.T, fr.B, fr.W, fr.H, fr.fs
	labels.place(fmt.Sprintf("next %.3f", f.ET), px, fr.sy(f.ET), 4*ms, true,
		labelAt{px, fr.sy(f.High) - gap, "middle"}, labelAt{px, fr.sy(f.Low) + gap + fs, "middle"},
		labelAt{L + gap, T + gap + fs, "start"}, labelAt{W - R - gap, T + gap + fs, "end"},
		labelAt{W - R - gap, H - B - gap - fs*0.3, "end"}, labelAt{L + gap, H - B - gap - fs*0.3, "start"})
	for _, p := range todays {
		labels.place(p.label, fr.sx(p.x), fr.sy(p.y), 2.6*ms, false)
	}
	b.WriteString(legend.svg)
	b.WriteString(`</svg>`)
	return b.String()
}

// chartPasses is the logbook's passes with their air and a time at the
// distance raced, as the chart's points: left out when the prediction left
// them out or their notes say aborted.
func chartPasses(c Card) []pt {
	in := c.Input
	dist := in.Car.DistanceFt
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
			out: left[p.Key()] || logbook.Aborted(p.Notes), label: p.Session.String()})
	}
	return pts
}

// splitEarlier keeps a long logbook's latest ChartMarks passes (and all of
// today's) to be drawn one by one; the earlier ones are returned apart, to
// be summarised as shaded cells, so the chart's size does not grow with
// the logbook, and the earlier left-out ones only counted. A logbook of
// ChartMarks or fewer is returned whole.
func splitEarlier(pts []pt) (recent, earlier []pt, earlierOut int) {
	if len(pts) <= ChartMarks {
		return pts, nil, 0
	}
	recent = make([]pt, 0, ChartMarks)
	for i, p := range pts {
		switch {
		case i >= len(pts)-ChartMarks || p.today:
			recent = append(recent, p)
		case p.out:
			earlierOut++
		default:
			earlier = append(earlier, p)
		}
	}
	return recent, earlier, earlierOut
}

// chartFrame is a chart's geometry: the ranges it shows (density altitude
// in ft across, ET in s up), the drawing's size, its labels' and markers'
// sizes and the margins around the plot.
type chartFrame struct {
	xlo, xhi, ylo, yhi float64
	W, H, fs, ms       float64
	L, R, T, B         float64 // the margins: left, right, top (the legend), bottom
	plot               box
}

// newChartFrame fits the frame to the drawn passes that are not left out,
// the earlier ones and the prediction's interval, with the legend's
// height (legendH) above the plot.
func newChartFrame(lay ChartLayout, legendH float64, pts, earlier []pt, predX float64, f engine.Timer) *chartFrame {
	xs, ys := []float64{predX}, []float64{f.Low, f.High}
	for _, p := range pts {
		if !p.out {
			xs, ys = append(xs, p.x), append(ys, p.y)
		}
	}
	for _, p := range earlier {
		xs, ys = append(xs, p.x), append(ys, p.y)
	}
	fr := &chartFrame{W: lay.Width, H: lay.Height, fs: lay.Font, ms: lay.Font / 7}
	xlo, xhi := minmax(xs)
	ylo, yhi := minmax(ys)
	fr.xlo, fr.xhi = math.Floor((xlo-250)/500)*500, math.Ceil((xhi+250)/500)*500
	pad := math.Max((yhi-ylo)*0.08, 0.02)
	fr.ylo, fr.yhi = ylo-pad, yhi+pad
	// The margins hold the ticks' labels and the axes' titles.
	fs := fr.fs
	fr.L = fs*(1.4+charWidth*5) + 3
	fr.R, fr.T, fr.B = charWidth*fs*2.5, legendH, fs*2.9 // R: half the last tick's label
	fr.plot = box{fr.L, fr.T, fr.W - fr.R, fr.H - fr.B}
	return fr
}

// sx is where density altitude x is drawn across.
func (fr *chartFrame) sx(x float64) float64 {
	return fr.L + (x-fr.xlo)/(fr.xhi-fr.xlo)*(fr.W-fr.L-fr.R)
}

// sy is where ET y is drawn down.
func (fr *chartFrame) sy(y float64) float64 {
	return fr.T + (fr.yhi-y)/(fr.yhi-fr.ylo)*(fr.H-fr.T-fr.B)
}

// drawAxes opens the svg (class name) and draws the plot's border, the
// ticks, as many as their labels leave room for, and the axes' titles.
func (fr *chartFrame) drawAxes(b *strings.Builder, name string, dist float64) {
	W, H, fs, L, R, T, B := fr.W, fr.H, fr.fs, fr.L, fr.R, fr.T, fr.B
	fmt.Fprintf(b, `<svg xmlns="http://www.w3.org/2000/svg" class="%s" viewBox="0 0 %.0f %.0f" role="img" aria-label="ET against density altitude">`, name, W, H)
	fmt.Fprintf(b, `<title>%s ET against density altitude</title>`, TimerName(dist))
	fmt.Fprintf(b, `<rect x="%.1f" y="%.1f" width="%.1f" height="%.1f" fill="none" stroke="#999" stroke-width="0.6"/>`, L, T, W-L-R, H-T-B)
	xstep := tickStep(fr.xhi-fr.xlo, (W-L-R)/(charWidth*fs*6))
	for x := fr.xlo; x <= fr.xhi+1; x += xstep {
		fmt.Fprintf(b, `<line x1="%.1f" y1="%.1f" x2="%.1f" y2="%.1f" stroke="#ddd" stroke-width="0.5"/>`, fr.sx(x), T, fr.sx(x), H-B)
		fmt.Fprintf(b, `<text x="%.1f" y="%.1f" font-size="%g" text-anchor="middle">%.0f</text>`, fr.sx(x), H-B+fs*1.1, fs, x)
	}
	ystep := niceStep((fr.yhi - fr.ylo) / math.Max(2, math.Min(5, (H-T-B)/(fs*2.2))))
	for y := math.Ceil(fr.ylo/ystep) * ystep; y <= fr.yhi; y += ystep {
		fmt.Fprintf(b, `<line x1="%.1f" y1="%.1f" x2="%.1f" y2="%.1f" stroke="#ddd" stroke-width="0.5"/>`, L, fr.sy(y), W-R, fr.sy(y))
		fmt.Fprintf(b, `<text x="%.1f" y="%.1f" font-size="%g" text-anchor="end">%.2f</text>`, L-3, fr.sy(y)+fs*0.35, fs, y)
	}
	fmt.Fprintf(b, `<text x="%.1f" y="%.1f" font-size="%g" text-anchor="middle">Density altitude (ft)</text>`, (L+W-R)/2, H-fs*0.35, fs)
	fmt.Fprintf(b, `<text x="%.1f" y="%.1f" font-size="%g" text-anchor="middle" transform="rotate(-90 %.1f %.1f)">%s ET (s)</text>`,
		fs*1.05, (T+H-B)/2, fs, fs*1.05, (T+H-B)/2, TimerName(dist))
}

// modelLine is the model's line across the plot: today's track and wind,
// corrected as today's prediction f is, simulated at 17 density altitudes
// (predX is today's). "" when fewer than two of its points fall inside.
func (fr *chartFrame) modelLine(c Card, predX float64, f engine.Timer) string {
	in := c.Input
	dist := in.Car.DistanceFt
	bias := f.ET - c.Prediction.Model.ETAt(dist)
	var line []string
	for i := 0; i <= 16; i++ {
		x := fr.xlo + (fr.xhi-fr.xlo)*float64(i)/16
		r := engine.ThinnerAir(in.Air, x-predX)
		env := engine.NewEnv(r, in.Track.HeadingDeg, in.TrackPrep, c.Prediction.Env.MassKg)
		y := engine.Simulate(&c.Fit.Vehicle, c.Fit.Params, env, dist).ETAt(dist) + bias
		if y >= fr.ylo && y <= fr.yhi {
			line = append(line, fmt.Sprintf("%.1f,%.1f", fr.sx(x), fr.sy(y)))
		}
	}
	if len(line) <= 1 {
		return ""
	}
	return fmt.Sprintf(`<polyline points="%s" fill="none" stroke="#1f5fa8" stroke-width="%.1f"/>`, strings.Join(line, " "), 1.4*math.Sqrt(fr.ms))
}

// chartLabels draws the markers and places the labels on a chart,
// keeping the boxes already taken so that nothing is drawn over them.
type chartLabels struct {
	b     *strings.Builder
	fr    *chartFrame
	taken []box
}

// labelAt is a place for a label: its anchor is by the side of the
// marker it is on, unless given.
type labelAt struct {
	x, y   float64
	anchor string
}

// drawMarkers draws the passes inside the plot, each taking its place
// from the labels, and returns today's, to be labelled.
func (l *chartLabels) drawMarkers(pts []pt) (todays []pt) {
	fr, ms := l.fr, l.fr.ms
	for _, p := range pts {
		if p.y < fr.ylo || p.y > fr.yhi || p.x < fr.xlo || p.x > fr.xhi {
			continue
		}
		x, y := fr.sx(p.x), fr.sy(p.y)
		switch {
		case p.out:
			fmt.Fprintf(l.b, `<path d="M%.1f %.1fl%.1f %.1fm0 %.1fl%.1f %.1f" stroke="#b00" stroke-width="1"/>`, x-2*ms, y-2*ms, 4*ms, 4*ms, -4*ms, -4*ms, 4*ms)
			l.taken = append(l.taken, box{x - 2*ms, y - 2*ms, x + 2*ms, y + 2*ms})
		case p.today:
			fmt.Fprintf(l.b, `<circle cx="%.1f" cy="%.1f" r="%.1f" fill="#e07b00"/>`, x, y, 2.6*ms)
			l.taken = append(l.taken, box{x - 2.6*ms, y - 2.6*ms, x + 2.6*ms, y + 2.6*ms})
			todays = append(todays, p)
		default:
			fmt.Fprintf(l.b, `<circle cx="%.1f" cy="%.1f" r="%.1f" fill="#888"/>`, x, y, 1.8*ms)
			l.taken = append(l.taken, box{x - 1.8*ms, y - 1.8*ms, x + 1.8*ms, y + 1.8*ms})
		}
	}
	return todays
}

// drawPrediction draws the prediction f at density altitude predX with
// its interval, taking their place from the labels, and returns where it
// is drawn across. It draws no label: place does.
func (l *chartLabels) drawPrediction(predX float64, f engine.Timer) (px float64) {
	fr, ms := l.fr, l.fr.ms
	px = fr.sx(predX)
	fmt.Fprintf(l.b, `<line x1="%.1f" y1="%.1f" x2="%.1f" y2="%.1f" stroke="#111" stroke-width="%.1f"/>`, px, fr.sy(f.Low), px, fr.sy(f.High), 1.4*math.Sqrt(ms))
	fmt.Fprintf(l.b, `<path d="M%.1f %.1fl%.1f %.1fl%.1f %.1fl%.1f %.1fz" fill="#111"/>`, px, fr.sy(f.ET)-4*ms, 4*ms, 4*ms, -4*ms, 4*ms, -4*ms, -4*ms)
	l.taken = append(l.taken, box{px - 4*ms, fr.sy(f.ET) - 4*ms, px + 4*ms, fr.sy(f.ET) + 4*ms}, box{px - ms, fr.sy(f.High), px + ms, fr.sy(f.Low)})
	return px
}

// place draws text at the first free place around the marker at (x, y),
// reach from its centre: to either side, above and below, then further
// out, then at the places more. A label with no free place is not drawn.
func (l *chartLabels) place(text string, x, y, reach float64, bold bool, more ...labelAt) {
	fs := l.fr.fs
	var spots []labelAt
	for _, ring := range []float64{1, 2.5} {
		gap := reach*ring + fs*0.3
		spots = append(spots, labelAt{x + gap, y + fs*0.35, ""}, labelAt{x + gap, y - gap*0.3, ""}, labelAt{x + gap, y + fs*0.9, ""},
			labelAt{x - gap, y + fs*0.35, ""}, labelAt{x - gap, y - gap*0.3, ""}, labelAt{x - gap, y + fs*0.9, ""},
			labelAt{x, y - gap, ""}, labelAt{x, y + gap + fs*0.8, ""})
	}
	for _, at := range append(spots, more...) {
		anchor := at.anchor
		switch {
		case anchor != "":
		case at.x < x:
			anchor = "end"
		case at.x == x:
			anchor = "middle"
		default:
			anchor = "start"
		}
		tb := textBox(text, at.x, at.y, fs, fs*0.15, anchor)
		if !tb.inside(l.fr.plot) || l.isTaken(tb) {
			continue
		}
		weight := ""
		if bold {
			weight = ` font-weight="bold"`
		}
		fmt.Fprintf(l.b, `<text x="%.1f" y="%.1f" font-size="%g"%s text-anchor="%s">%s</text>`, at.x, at.y, fs, weight, anchor, text)
		l.taken = append(l.taken, tb)
		return
	}
}

// isTaken reports whether tb meets a box already taken.
func (l *chartLabels) isTaken(tb box) bool {
	for _, o := range l.taken {
		if tb.meets(o) {
			return true
		}
	}
	return false
}

// legendPart is one entry of the chart's legend: its marker as SVG drawn
// at (0, 0), and its words.
type legendPart struct {
	marker string
	words  string
	room   float64 // the marker's width, in markers' units
}

// chartLegend lays the legend out in rows above the plot, as many as the
// width needs; height is the room it takes, the plot's top margin.
func chartLegend(lay ChartLayout, ms float64, earlier, earlierOut int) (out struct {
	svg    string
	height float64
}) {
	fs := lay.Font
	parts := []legendPart{
		{fmt.Sprintf(`<circle cx="0" cy="0" r="%.1f" fill="#888"/>`, 1.8*ms), "logbook", 3.6},
		{fmt.Sprintf(`<circle cx="0" cy="0" r="%.1f" fill="#e07b00"/>`, 2.4*ms), "today", 4.8},
		{fmt.Sprintf(`<path d="M%.1f %.1fl%.1f %.1fm0 %.1fl%.1f %.1f" stroke="#b00"/>`, -2*ms, -2*ms, 4*ms, 4*ms, -4*ms, -4*ms, 4*ms), "left out", 4},
		{fmt.Sprintf(`<line x1="%.1f" y1="0" x2="%.1f" y2="0" stroke="#1f5fa8" stroke-width="1.4"/>`, -6*ms, 6*ms), "model, today's track and wind", 12},
		{fmt.Sprintf(`<path d="M0 %.1fl%.1f %.1fl%.1f %.1fl%.1f %.1fz" fill="#111"/>`, -4*ms, 4*ms, 4*ms, -4*ms, 4*ms, -4*ms, -4*ms), "prediction, 95 % interval", 8},
	}
	if earlier+earlierOut > 0 {
		parts[0].words = fmt.Sprintf("latest %d", ChartMarks)
		words := fmt.Sprintf("%s earlier, darker where more", thousands(earlier))
		if earlierOut > 0 {
			words += fmt.Sprintf(" (%s left out not drawn)", thousands(earlierOut))
		}
		parts = append(parts, legendPart{fmt.Sprintf(`<rect x="%.1f" y="%.1f" width="%.1f" height="%.1f" fill="#888" fill-opacity="0.45"/>`, -2.5*ms, -2.5*ms, 5*ms, 5*ms), words, 5})
	}
	var b strings.Builder
	rowH := fs * 1.3
	x, row := fs*0.4, 0
	for _, p := range parts {
		mark := p.room * ms
		w := mark + fs*0.3 + float64(len([]rune(p.words)))*charWidth*fs
		if x > fs*0.4 && x+w > lay.Width {
			x, row = fs*0.4, row+1
		}
		cy := fs*0.2 + rowH*float64(row) + rowH/2
		fmt.Fprintf(&b, `<g transform="translate(%.1f %.1f)">%s</g>`, x+mark/2, cy, p.marker)
		fmt.Fprintf(&b, `<text x="%.1f" y="%.1f" font-size="%g">%s</text>`, x+mark+fs*0.3, cy+fs*0.35, fs, p.words)
		x += w + fs
	}
	out.svg = b.String()
	out.height = fs*0.2 + rowH*float64(row+1) + fs*0.6
	return out
}

func minmax(v []float64) (float64, float64) {
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, x := range v {
		lo, hi = math.Min(lo, x), math.Max(hi, x)
	}
	return lo, hi
}

// tickStep is the density altitude's tick spacing: the smallest of 500,
// 1000, 2000 and 5000 ft that gives at most most ticks over span.
func tickStep(span, most float64) float64 {
	for _, s := range []float64{500, 1000, 2000} {
		if span/s <= most {
			return s
		}
	}
	return 5000
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

// pt is a pass on the chart: its density altitude and ET, whether it is
// today's or left out, and its label (its session).
type pt struct {
	x, y       float64
	today, out bool
	label      string
}

// ChartMarks is how many of the logbook's latest passes a chart draws one
// by one (and all of today's): the earlier ones are shaded cells, so a
// chart of ten seasons is the size of one of a season.
const ChartMarks = 100

// Shading of the earlier passes: a grid of cellsX by cellsY cells over the
// plot, each holding any drawn in one of shadeLevels greys by its count
// against the fullest cell's.
const (
	cellsX, cellsY = 24, 12
	shadeLevels    = 4
)

// shadeCells draws the earlier passes, those inside the plot, as the grid's
// cells that hold any, darker where more (one path per shade, so the
// drawing's size is bounded by the grid, whatever the count).
func shadeCells(earlier []pt, plot box, sx, sy func(float64) float64) string {
	if len(earlier) == 0 {
		return ""
	}
	var count [cellsX * cellsY]int
	cw, ch := (plot.x1-plot.x0)/cellsX, (plot.y1-plot.y0)/cellsY
	most := 0
	for _, p := range earlier {
		x, y := sx(p.x), sy(p.y)
		if x < plot.x0 || x > plot.x1 || y < plot.y0 || y > plot.y1 {
			continue
		}
		i := min(int((x-plot.x0)/cw), cellsX-1) + cellsX*min(int((y-plot.y0)/ch), cellsY-1)
		count[i]++
		most = max(most, count[i])
	}
	var b strings.Builder
	for level := 1; level <= shadeLevels; level++ {
		var d strings.Builder
		for i, n := range count {
			if n == 0 || (n*shadeLevels+most-1)/most != level {
				continue
			}
			fmt.Fprintf(&d, "M%.1f %.1fh%.1fv%.1fh%.1fz", plot.x0+float64(i%cellsX)*cw, plot.y0+float64(i/cellsX)*ch, cw, ch, -cw)
		}
		if d.Len() > 0 {
			fmt.Fprintf(&b, `<path d="%s" fill="#888" fill-opacity="%.2f"/>`, d.String(), 0.6*float64(level)/shadeLevels)
		}
	}
	return b.String()
}

// thousands is n with a comma between its thousands: "4,935".
func thousands(n int) string {
	s := fmt.Sprint(n)
	for i := len(s) - 3; i > 0; i -= 3 {
		s = s[:i] + "," + s[i:]
	}
	return s
}
