package pitpage

import (
	"errors"
	"testing"

	"pitcard/weather"
)

// TestAttachByField: an InputError is placed by its Field, named by the
// field's label; a flag inside free text is rewritten into its label; an
// error naming no field of the form goes to the top. The form's words are
// this page's own (no source).
func TestAttachByField(t *testing.T) {
	form := func() []field {
		return []field{text("temp", "Air temp", "°F", ""), text("baro", "Barometer", "inHg", ""),
			{Name: "session", Label: "Round", Flag: "round"}}
	}
	tests := []struct {
		name      string
		err       error
		top       string
		field     int // index of the field marked, or -1
		fieldText string
	}{
		{"field with dashes", &weather.InputError{Field: "--temp", Value: "400", Reason: "is outside -40..140 °F"},
			"Nothing was saved: fix the field marked below.", 0, `Air temp "400" is outside -40..140 °F`},
		{"field without dashes, another flag in the reason", &weather.InputError{Field: "baro", Value: "31", Reason: "needs --temp too"},
			"Nothing was saved: fix the field marked below.", 1, `Barometer "31" needs “Air temp” too`},
		{"field by its flag, not its name", &weather.InputError{Field: "round", Value: "Q9", Reason: "is not a round"},
			"Nothing was saved: fix the field marked below.", 2, `Round "Q9" is not a round`},
		{"a field the form has not", &weather.InputError{Field: "wind", Value: "x", Reason: "is not a number"},
			`Nothing was saved: wind "x" is not a number`, -1, ""},
		{"free text only", errors.New("give --baro with --temp"),
			"Nothing was saved: give “Barometer” with “Air temp”", -1, ""},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			f := form()
			if got := attach(f, tc.err); got != tc.top {
				t.Errorf("top = %q, want %q", got, tc.top)
			}
			for i := range f {
				want := ""
				if i == tc.field {
					want = tc.fieldText
				}
				if f[i].Error != want {
					t.Errorf("field %s: %q, want %q", f[i].Name, f[i].Error, want)
				}
			}
		})
	}
}
