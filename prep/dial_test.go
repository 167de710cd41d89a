package prep

import (
	"testing"

	"github.com/shopspring/decimal"
)

// The one formatter of a dial: the step's places, at least two, and never
// a typed dial rounded (common practice (no source): a dial-in board shows
// the dial as the driver wrote it).
func TestDialText(t *testing.T) {
	for _, tc := range []struct {
		d, step, want string
	}{
		{"11.41", "0.01", "11.41"},
		{"11.4", "0.01", "11.40"},
		{"11.415", "0.005", "11.415"},
		{"11.41", "0.005", "11.410"},
		{"10.125", "0.01", "10.125"}, // the other lane's, finer than our step
		{"10.120", "0.01", "10.12"},
		{"0.005", "0.01", "0.005"},
		{"-0.02", "0.01", "-0.02"},
	} {
		t.Run(tc.d+"@"+tc.step, func(t *testing.T) {
			if got := DialText(decimal.RequireFromString(tc.d), decimal.RequireFromString(tc.step)); got != tc.want {
				t.Errorf("DialText(%s, %s) = %s, want %s", tc.d, tc.step, got, tc.want)
			}
		})
	}
	if got := SignedDialText(decimal.RequireFromString("0.005"), decimal.RequireFromString("0.005")); got != "+0.005" {
		t.Errorf("SignedDialText = %s", got)
	}
}
