package printable

import "testing"

func TestLine(t *testing.T) {
	for _, tc := range []struct{ name, in, want string }{
		{"plain", "lifted at 1000 ft", "lifted at 1000 ft"},
		{"unicode kept", "track 93 °F · ≤ 0.015", "track 93 °F · ≤ 0.015"},
		{"escape and clear screen", "ok\x1b[2J\x1b[31mRED", `ok\x1b[2J\x1b[31mRED`},
		{"forged line", "fine\r\nFAKE PASS", "fine  FAKE PASS"},
		{"bell and DEL", "a\x07b\x7fc", `a\x07b\x7fc`},
		{"C1 CSI", "a\u009bb", `a\x9bb`},
		{"bidi override", "a\u202eb", `a\u202eb`},
		{"broken UTF-8", "a\xffb", `a\xffb`},
	} {
		t.Run(tc.name, func(t *testing.T) {
			if got := Line(tc.in); got != tc.want {
				t.Errorf("Line(%q) = %q, want %q", tc.in, got, tc.want)
			}
		})
	}
}

func FuzzLine(f *testing.F) {
	f.Add("ok\x1b[2J\r\n")
	f.Fuzz(func(t *testing.T, s string) {
		out := Line(s)
		for _, r := range out {
			if control(r) || r == '\n' || r == '\r' || r == '\t' {
				t.Fatalf("Line(%q) = %q keeps a control %U", s, out, r)
			}
		}
	})
}
