package bracket_test

import (
	"fmt"

	"github.com/shopspring/decimal"

	"pitcard/bracket"
)

// Settling a race from the two time slips (invented cars, an invented
// evening): the left lane dials 11.45 and runs 11.47 off a .021 light; the
// right lane dials 12.10 and runs 12.08, under its dial. The right lane
// broke out, so the left lane wins though it reached the finish second.
func ExampleSettle() {
	d := decimal.RequireFromString
	left := bracket.LaneRun{Dial: d("11.45"), RT: d(".021"), ET: d("11.47"), MPH: decimal.NewNullDecimal(d("117.2"))}
	right := bracket.LaneRun{Dial: d("12.10"), RT: d(".034"), ET: d("12.08"), MPH: decimal.NewNullDecimal(d("108.9"))}
	o, err := bracket.Settle(left, right, bracket.RaceRules{Tree: bracket.FullTree, RTZero: bracket.FromGreen})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println("winner:", o.Winner, "on", o.Reason)
	fmt.Println(o.Explanation)
	fmt.Println("first to the finish:", o.First, "by", o.MarginS, "s")
	fmt.Println("left package:", o.Left.Package, "right over its dial:", o.Right.OverDial)
	// Output:
	// winner: left on breakout
	// right broke out by 0.020 (12.080 on a 12.10 dial)
	// first to the finish: right by 0.027 s
	// left package: 0.041 right over its dial: -0.02
}
