package prep

import (
	"strings"
	"testing"
)

// A chart's marks do not grow with the logbook: of 600 passes it draws
// the latest ChartMarks one by one and shades the rest in cells, the
// legend saying how many (pitcard's own layout rule, no source); a short
// logbook is drawn pass by pass with no shading.
func TestChartDrawsTheLatestAndShadesTheRest(t *testing.T) {
	for _, tc := range []struct {
		passes      int
		marks       int // circles: the logbook's and the legend's two
		shaded      bool
		legendWords string
	}{
		{60, 60 + 2, false, ">logbook<"},
		{600, ChartMarks + 2, true, ">500 earlier, darker where more<"},
	} {
		c := Gather(input(modelLogbook(tc.passes), nil, nil))
		for _, lay := range []ChartLayout{PrintChart, PhoneChart} {
			svg := ChartFor(c, lay)
			if svg == "" {
				t.Fatalf("%d passes, %s: no chart", tc.passes, lay.Name)
			}
			if n := strings.Count(svg, "<circle"); n != tc.marks {
				t.Errorf("%d passes, %s: %d circles, want %d", tc.passes, lay.Name, n, tc.marks)
			}
			if got := strings.Contains(svg, `fill-opacity="0.`); got != tc.shaded {
				t.Errorf("%d passes, %s: shaded cells %v, want %v", tc.passes, lay.Name, got, tc.shaded)
			}
			if !strings.Contains(svg, tc.legendWords) {
				t.Errorf("%d passes, %s: the legend lacks %q", tc.passes, lay.Name, tc.legendWords)
			}
			if len(svg) > 16000 {
				t.Errorf("%d passes, %s: the chart is %d bytes, want at most 16,000", tc.passes, lay.Name, len(svg))
			}
		}
	}
}

// thousands groups digits by three (common practice, no source).
func TestThousands(t *testing.T) {
	for n, want := range map[int]string{0: "0", 999: "999", 1000: "1,000", 4935: "4,935", 100000: "100,000", 1234567: "1,234,567"} {
		if got := thousands(n); got != want {
			t.Errorf("thousands(%d) = %q, want %q", n, got, want)
		}
	}
}
