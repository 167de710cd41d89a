package pitpage

import (
	"net/http"
	"net/url"
	"strings"
	"testing"
)

// FuzzTokensFile: any tokens file is read or refused with its path, never a
// panic; tokens read are at least 32 characters, crew and view different.
func FuzzTokensFile(f *testing.F) {
	f.Add("crew: " + strings.Repeat("a", 32) + "\nview: " + strings.Repeat("b", 32) + "\nsecret: " + strings.Repeat("c", 32) + "\n")
	f.Add("# comment\ncrew:x\n")
	f.Add("")
	f.Fuzz(func(t *testing.T, data string) {
		tok, err := parseTokens([]byte(data), "/f/.pitcard-tokens")
		if err != nil {
			if !strings.Contains(err.Error(), "/f/.pitcard-tokens") {
				t.Fatalf("the error does not name the file: %v", err)
			}
			return
		}
		if len(tok.Crew) < 32 || len(tok.View) < 32 || len(tok.Secret) < 32 || tok.Crew == tok.View {
			t.Fatalf("accepted weak tokens %+v", tok)
		}
	})
}

// FuzzReadingForm: any reading form is saved (303) or refused (422 or 413)
// with a message; never a 5xx, never a panic.
func FuzzReadingForm(f *testing.F) {
	f.Add("81.5", "27.62", "station", "41", "", "4", "180", "88", "20:40", "notes")
	f.Add("300F", "27.6psi", "gauge", "140", "50", "-1", "400", "x", "25:99", "")
	f.Add("", "", "", "", "", "", "", "", "", "")
	f.Add("NaN", "1e308", "altimeter", "Inf", "-Inf", "1e-300", "NaN", "0x10", "2026-06-13 20:41", "\x00")
	f.Fuzz(func(t *testing.T, temp, baro, kind, rh, dew, wind, from, track, when, notes string) {
		fx := newFixture(t)
		v := url.Values{"temp": {temp}, "baro": {baro}, "baro-kind": {kind}, "humidity": {rh}, "dewpoint": {dew}, "wind": {wind},
			"wind-from": {from}, "track-temp": {track}, "time": {when}, "notes": {notes}}
		w := fx.post("/reading", v)
		switch w.Code {
		case http.StatusSeeOther:
		case http.StatusUnprocessableEntity:
			if !strings.Contains(w.Body.String(), `class="error"`) {
				t.Fatalf("refused without a message:\n%s", w.Body)
			}
		case http.StatusRequestEntityTooLarge, http.StatusBadRequest:
		default:
			t.Fatalf("answer %d:\n%s", w.Code, w.Body)
		}
	})
}
