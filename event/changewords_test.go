package event

import (
	"os"
	"path/filepath"
	"pitcard/logbook"
	"strings"
	"testing"
	"time"
)

// The setting change_words adds the crew's own words for a change to
// pitcard's, from pitcard.yaml (a list) or the environment (comma-separated);
// a value that is not a list of words is named.
func TestChangeWordsSetting(t *testing.T) {
	dir := t.TempDir()
	if _, err := Create(dir, false, time.Now()); err != nil {
		t.Fatal(err)
	}
	settings := filepath.Join(dir, SettingsFile)
	orig, err := os.ReadFile(settings)
	if err != nil || !strings.Contains(string(orig), "change_words: []\n") {
		t.Fatalf("the starter pitcard.yaml must list change_words: %v", err)
	}
	const notes = "chute packed tighter"
	for _, tc := range []struct {
		name, yaml, env string
		noted           bool
		err             string
	}{
		{"pitcard's own only", "", "", false, ""},
		{"a list in pitcard.yaml", "change_words: [chute packed, new slicks]\n", "", true, ""},
		{"comma-separated in the environment", "", "new slicks, chute packed", true, ""},
		{"not a list of words", "change_words: [[x]]\n", "", false, "change_words"},
		{"a map", "change_words: {a: 1}\n", "", false, "change_words"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			yaml := string(orig)
			if tc.yaml != "" {
				yaml = strings.Replace(yaml, "change_words: []\n", tc.yaml, 1)
			}
			if err := os.WriteFile(settings, []byte(yaml), 0o644); err != nil {
				t.Fatal(err)
			}
			env := func(k string) string {
				if k == "PITCARD_CHANGE_WORDS" {
					return tc.env
				}
				return ""
			}
			e, err := Open(OpenOptions{Dir: dir, Env: env})
			if tc.err != "" {
				if err == nil || !strings.Contains(err.Error(), tc.err) || !IsBadInput(err) {
					t.Fatalf("want a bad-input error naming %s, got %v", tc.err, err)
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			if _, ok := logbook.ChangeNoted(logbook.Pass{Notes: notes}, e.Settings.ChangeWords); ok != tc.noted {
				t.Errorf("%q noted as a change: %v, want %v", notes, ok, tc.noted)
			}
			if _, ok := logbook.ChangeNoted(logbook.Pass{Notes: "retuned"}, e.Settings.ChangeWords); !ok {
				t.Error("pitcard's own words must stay")
			}
		})
	}
}
