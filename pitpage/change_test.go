package pitpage

import (
	"html"
	"net/http"
	"strings"
	"testing"
)

// The slip form asks what changed on the car: the field is there, limited
// as the logbook keeps it; a good change is logged as typed (commas and
// quotes too); a change that is too long or holds a control character is
// refused under its field, the slip kept, nothing written.
func TestSlipFormCarriesTheChange(t *testing.T) {
	f := newFixture(t)
	page := f.do("GET", "/slip", testTokens.Crew, nil).Body.String()
	if !strings.Contains(page, `name="change" type="text" value="" placeholder="new converter, &#43;2 psi boost ..." maxlength="200"`) {
		t.Errorf("the slip form lacks its change field, limited to 200 bytes:\n%s", page)
	}
	for _, c := range []struct {
		name, change string
		code         int
		want         string
	}{
		{"too long", strings.Repeat("new gear ", 28), http.StatusUnprocessableEntity, "at most 200"},
		{"a control character", "new\x1b[2Jconverter", http.StatusUnprocessableEntity, "control character"},
		{"a line break", "new\nconverter", http.StatusUnprocessableEntity, "control character"},
		{"past the form's field limit", strings.Repeat("x", MaxFieldLen+1), http.StatusRequestEntityTooLarge, `the field "change" is 301 bytes long`},
	} {
		t.Run(c.name, func(t *testing.T) {
			before := f.snapshot()
			v := slip()
			v.Set("change", c.change)
			w := f.post("/slip", v)
			body := w.Body.String()
			if w.Code != c.code {
				t.Fatalf("%d, want %d\n%s", w.Code, c.code, body)
			}
			msg := html.UnescapeString(body)
			if c.code == http.StatusUnprocessableEntity {
				msg = html.UnescapeString(fieldError(body, "change"))
				if fieldValue(body, "notes") != "good launch" {
					t.Error("the other fields must be kept")
				}
			}
			if !strings.Contains(msg, c.want) {
				t.Errorf("want %q in %q", c.want, msg)
			}
			f.unchanged(before, c.name)
		})
	}
	v := slip()
	v.Set("change", `swapped to the "5400" stall, +2 psi`)
	if w := f.post("/slip", v); w.Code != http.StatusSeeOther {
		t.Fatalf("a good slip with its change: %d\n%s", w.Code, w.Body)
	}
	lb := strings.TrimRight(f.file("logbook.csv"), "\n")
	if !strings.HasSuffix(lb, `,good launch,"swapped to the ""5400"" stall, +2 psi"`) {
		t.Errorf("the logbook must hold the change:\n%s", lb[strings.LastIndex(lb, "\n")+1:])
	}
}
