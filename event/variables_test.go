package event

import (
	"os"
	"regexp"
	"testing"
)

// Every PITCARD_ variable CI sets for the tests is one pitcard knows: a
// name missing from developerVariables makes every command refuse to run
// under CI (it happened with PITCARD_AXE).
func TestCIsVariablesAreKnown(t *testing.T) {
	script, err := os.ReadFile("../.ci/run")
	if err != nil {
		t.Fatal(err)
	}
	for _, name := range regexp.MustCompile(`PITCARD_[A-Z_]+`).FindAllString(string(script), -1) {
		if err := checkVariables([]string{name + "=x"}); err != nil {
			t.Errorf(".ci/run sets %s: %v", name, err)
		}
	}
}
