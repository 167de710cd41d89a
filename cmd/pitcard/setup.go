package main

import (
	"strings"

	"pitcard/event"
	"pitcard/logbook"
)

// setupLine says the setup a pass was logged with, each item given by
// --set or kept from the last pass: "Setup: rear_psi 15.5 psi, converter
// stock (kept)"; "" when car.yaml names none.
func setupLine(e *event.Folder, p logbook.Pass, set []string) string {
	car, err := e.Car()
	if err != nil || len(car.Setup) == 0 {
		return ""
	}
	given := map[string]bool{}
	for _, s := range set {
		n, _, _ := strings.Cut(s, "=")
		given[strings.TrimSpace(n)] = true
	}
	var parts []string
	for _, it := range car.Setup {
		v := p.Extra[it.Name]
		if v == "" {
			parts = append(parts, it.Name+" not recorded")
			continue
		}
		part := it.Name + " " + v
		if it.Unit != "" {
			part += " " + it.Unit
		}
		if !given[it.Name] {
			part += " (kept from the last pass)"
		}
		parts = append(parts, part)
	}
	return "Setup: " + strings.Join(parts, ", ") + "."
}

// setupColumns are the names of car.yaml's setup items: the logbook
// columns an export carries beside pitcard's own.
func setupColumns(e *event.Folder) []string {
	car, err := e.Car()
	if err != nil {
		return nil
	}
	var cols []string
	for _, it := range car.Setup {
		cols = append(cols, it.Name)
	}
	return cols
}
