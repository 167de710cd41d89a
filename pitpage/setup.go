package pitpage

import (
	"fmt"
	"net/http"
	"net/url"
	"strings"

	"pitcard/logbook"
	"pitcard/prep"
	"pitcard/weather"
)

// The car's setup on the page: the slip form logs the setup the car ran,
// and the setup page notes the setup planned for a round (rounds.csv), which
// the card predicts with, as card --set does on the command line.

// setupFieldPrefix names a setup item's form field: "set-rear_psi".
const setupFieldPrefix = "set-"

// setupFields are car.yaml's setup items as form fields, each valued by
// value (the planned or the last pass's) and helped by the last pass's.
// A refused --set names the item ("--set rear_psi"): Flag puts the
// message on its field.
func setupFields(setup logbook.Setup, value, last map[string]string) []field {
	var out []field
	for _, it := range setup {
		f := field{Name: setupFieldPrefix + it.Name, Label: "Setup: " + strings.ReplaceAll(it.Name, "_", " "), Value: value[it.Name],
			Max: MaxFieldLen, Flag: "set " + it.Name}
		if l := last[it.Name]; l != "" {
			f.Help = "Last pass: " + strings.TrimSpace(l+" "+it.Unit) + "."
		} else {
			f.Help = "Not logged yet."
		}
		if it.Numeric() {
			f.Unit, f.Mode = it.Unit, "decimal"
			f.Placeholder = fmt.Sprintf("%g to %g", it.Range[0], it.Range[1])
		} else {
			f.Kind, f.Options = "select", append([]string{""}, it.Choices...)
		}
		out = append(out, f)
	}
	return out
}

// setupValues are the setup items a form sent, as --set's name=value (a
// blank item is left out: the last pass's is kept).
func setupValues(setup logbook.Setup, form url.Values) []string {
	var sets []string
	for _, it := range setup {
		if v := strings.TrimSpace(form.Get(setupFieldPrefix + it.Name)); v != "" {
			sets = append(sets, it.Name+"="+v)
		}
	}
	return sets
}

// setupLine says the round's planned setup (prep.PlannedSetup: the last
// pass's where nothing is planned) against the last pass, for the card
// page: "rear psi 15 psi (last 16), converter stock".
func setupLine(setup logbook.Setup, planned, last map[string]string) string {
	var parts []string
	for _, it := range setup {
		v := planned[it.Name]
		if v == "" {
			continue
		}
		s := strings.ReplaceAll(it.Name, "_", " ") + " " + strings.TrimSpace(v+" "+it.Unit)
		if l := last[it.Name]; l != "" && l != v {
			s += " (last " + l + ")"
		}
		parts = append(parts, s)
	}
	return strings.Join(parts, ", ")
}

// setupPage is the round's planned setup form.
func (s *Server) setupPage(q *request) {
	p := q.newPage("Setup", "card")
	c, _, err := s.gather(q, q.r.URL.Query().Get("round"))
	if err != nil {
		p.Heading, p.Error = "Setup", "No round to plan: "+err.Error()
		s.render(q, "form", p, http.StatusOK)
		return
	}
	in := c.Input
	p.Round, p.Day = in.Session.String(), in.Call.Format(weather.DateLayout)
	p.Heading, p.Action, p.Submit = "Setup for "+in.Session.Long(), "/setup", "Save the planned setup"
	p.Intro = "What the car will run this round: the card predicts with it. Blank keeps the last pass's."
	if len(in.Car.Setup) == 0 {
		p.Intro = "car.yaml names no setup items: list them under setup: (see the README) and they are asked here."
	}
	_, last := prep.PlannedSetup(in)
	p.Form = setupFields(in.Car.Setup, in.Setup, last) // the planned items only: blank keeps the last pass's
	s.render(q, "form", p, http.StatusOK)
}

// postSetup notes the round's planned setup in rounds.csv.
func (s *Server) postSetup(q *request) {
	v := values(q.r.PostForm)
	p := q.newPage("Setup", "card")
	p.Round, p.Heading, p.Action, p.Submit = v("round"), "Setup", "/setup", "Save the planned setup"
	car, err := q.folder.Car()
	if err != nil {
		p.Error = "Nothing was saved: " + err.Error()
		s.render(q, "form", p, http.StatusUnprocessableEntity)
		return
	}
	p.Form = setupFields(car.Setup, nil, nil)
	fill(p.Form, q.r.PostForm)
	ses, day, err := roundOf(v)
	if err == nil {
		p.Day, p.Heading = day, "Setup for "+ses.Long()
		err = q.folder.SetPlannedSetup(day, ses, setupValues(car.Setup, q.r.PostForm), car.Setup, q.now)
	}
	if err != nil {
		p.Error = attach(p.Form, err)
		s.render(q, "form", p, http.StatusUnprocessableEntity)
		return
	}
	s.logf("planned setup for %s set to %q by the crew from %s", ses, strings.Join(setupValues(car.Setup, q.r.PostForm), " "), q.r.RemoteAddr)
	http.Redirect(q.w, q.r, "/?saved=setup"+roundParam(ses.String()), http.StatusSeeOther)
}
