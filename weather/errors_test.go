package weather

import (
	"strings"
	"testing"
)

// A value of 1e308 parsed as a decimal used to print as 309 digits. (No
// source: the expected strings are pitcard's own message format, and
// 1e308 is near the largest float64, IEEE 754.)
func TestInputErrorKeepsHugeValuesShort(t *testing.T) {
	huge := "1" + strings.Repeat("0", 308)
	got := (&InputError{Field: "et", Value: huge, Reason: "is outside 3.5..40 s"}).Error()
	if got != `et "1e+308" is outside 3.5..40 s` {
		t.Errorf("got %q", got)
	}
	long := strings.Repeat("x", 500)
	if got := (&InputError{Field: "notes", Value: long, Reason: "is too long"}).Error(); len(got) > 100 || !strings.Contains(got, "(500 characters)") {
		t.Errorf("got %q", got)
	}
}
