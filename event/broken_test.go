package event

import (
	"errors"
	"io/fs"
	"strings"
	"testing"

	"pitcard/weather"
)

// TestBrokenInputUnwraps checks that errors.Is and errors.As reach the
// errors a BrokenInput collects (Go's multi-error Unwrap() []error), while
// the BrokenInput itself is still what Usable and IsBadInput see.
func TestBrokenInputUnwraps(t *testing.T) {
	ie := &weather.InputError{File: "car.yaml", Line: 4, Field: "weight_lb", Value: "heavy", Reason: "is not a number"}
	missing := &fs.PathError{Op: "open", Path: "weather.csv", Err: fs.ErrNotExist}
	b := BrokenInput{[]error{errors.New("opponent book: 1 row left out"), ie, missing}}

	t.Run("As finds the InputError inside", func(t *testing.T) {
		var got *weather.InputError
		if !errors.As(b, &got) || got != ie {
			t.Errorf("errors.As: got %v, want the car.yaml error", got)
		}
	})
	t.Run("Is reaches a wrapped fs.ErrNotExist", func(t *testing.T) {
		if !errors.Is(b, fs.ErrNotExist) {
			t.Error("errors.Is(BrokenInput, fs.ErrNotExist) = false")
		}
	})
	t.Run("Is does not invent a match", func(t *testing.T) {
		if errors.Is(b, fs.ErrPermission) {
			t.Error("errors.Is(BrokenInput, fs.ErrPermission) = true")
		}
	})
	t.Run("still usable and bad input", func(t *testing.T) {
		if !Usable(b) || !IsBadInput(b) {
			t.Errorf("Usable = %v, IsBadInput = %v; want both true", Usable(b), IsBadInput(b))
		}
	})
	t.Run("message lists every error", func(t *testing.T) {
		if got := b.Error(); strings.Count(got, "\n") != 2 || !strings.Contains(got, "weight_lb") {
			t.Errorf("Error() = %q", got)
		}
	})
}
