package pitpage

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"html/template"
	"net/http"
	"net/url"
	"slices"
	"strings"
	"time"

	"pitcard/engine"
	"pitcard/entry"
	"pitcard/event"
	words "pitcard/internal/text"
	"pitcard/logbook"
	"pitcard/prep"
	"pitcard/scripts"
	"pitcard/weather"
)

// field is one input of a form. Name is the command line's flag without
// its dashes ("temp" for --temp), so a message event gives for a flag
// lands next to its field.
type field struct {
	Name, Label, Unit string
	Kind              string // "" (text), "radio" or "select"
	Options           []string
	Value             string
	Placeholder       string
	Help              string
	Mode              string // the phone keyboard: "decimal"
	Max               int
	Error             string
	// Flag is the command line's name of the field when it is not Name:
	// the slip's "session" is --round in the errors the page is given.
	Flag string
	// Focus: the first bad field of a refused form takes the focus, so a
	// keyboard or a screen reader starts where the fix is.
	Focus bool
}

// Describedby are the ids of the texts that describe f: its message, its help.
func (f field) Describedby() string {
	var ids []string
	if f.Error != "" {
		ids = append(ids, "e-"+f.Name)
	}
	if f.Help != "" {
		ids = append(ids, "h-"+f.Name)
	}
	return strings.Join(ids, " ")
}

// flag is the command line's name of f, as errors name it.
func (f field) flag() string {
	if f.Flag != "" {
		return f.Flag
	}
	return f.Name
}

func text(name, label, unit, placeholder string) field {
	return field{Name: name, Label: label, Unit: unit, Placeholder: placeholder, Mode: "decimal", Max: MaxFieldLen}
}

// oppCarField is the other car's number or name, as --opponent.
func oppCarField() field {
	return field{Name: "opponent", Label: "Other lane's car", Placeholder: "its number: 4471", Max: event.MaxCarLen,
		Help: "Its slips are kept in opponents.csv; the card then races against its history."}
}

// fill puts the posted values back into the form (a bad submission keeps
// every field as typed).
func fill(form []field, v url.Values) {
	for i := range form {
		if x, ok := v[form[i].Name]; ok && len(x) > 0 {
			form[i].Value = strings.TrimSpace(x[0])
		}
	}
}

// values reads a form's fields by name.
func values(v url.Values) func(string) string {
	return func(name string) string { return strings.TrimSpace(v.Get(name)) }
}

// attach puts err next to the field it names, in the form's words; an error
// naming no field goes to the top. It returns the top message.
//
// Which field an error is about is read from its structure, not its words:
// a *weather.InputError's Field is the flag's name, the field is found by
// it, and the message names the field by its label. It does not parse a
// message to find a field.
func attach(form []field, err error) string {
	named := flagsAsLabels(form)
	var ie *weather.InputError
	if errors.As(err, &ie) {
		if i := fieldOf(form, ie.Field); i >= 0 {
			c := *ie
			c.Field = form[i].Label
			form[i].Error = named.Replace(c.Error())
			return "Nothing was saved: fix the field marked below."
		}
	}
	return "Nothing was saved: " + named.Replace(err.Error())
}

// fieldOf is the index in form of the field whose flag is name (with or
// without its dashes: "--temp" or "temp"), or -1.
func fieldOf(form []field, name string) int {
	name = strings.TrimPrefix(name, "--")
	for i := range form {
		if form[i].flag() == name {
			return i
		}
	}
	return -1
}

// flagsAsLabels rewrites "--temp"-style flag names found inside a
// message's free text into the form's labels (“Air temp”). It is the
// fallback, kept because the event package writes its sentences for the
// command line ("give --baro with --temp", a reason naming another flag, an
// error that is not an InputError at all): a flag named inside a sentence
// has no structure to find it by, and a phone has no flags. Where an error
// has a Field, attach places and names it by that instead.
func flagsAsLabels(form []field) *strings.Replacer {
	pairs := []string{}
	for _, f := range form {
		pairs = append(pairs, "--"+f.flag(), "“"+f.Label+"”")
	}
	return strings.NewReplacer(pairs...)
}

// savedWords are the card page's confirmations, by what was saved.
var savedWords = map[string]string{
	"reading":   "The reading is saved: the card below uses it.",
	"checklist": "The checklist is saved.",
	"opponent":  "The other lane's dial is saved: the card below races against it.",
	"setup":     "The planned setup is saved: the card below predicts with it.",
}

func (s *Server) cardPage(q *request) {
	round := q.r.URL.Query().Get("round")
	p := q.newPage("Card", "card")
	p.Rounds, p.Refresh, p.Stamp = q.rounds(), true, stamp(q.folder)
	p.Saved = savedWords[q.r.URL.Query().Get("saved")]
	g := s.gathered(q, round)
	c, warnings, err := g.card, g.warnings, g.err
	if g.stamp != "" {
		p.Stamp = g.stamp // a card made before the latest change reloads when the new one is ready
	}
	if err != nil {
		p.Warnings = warnings
		p.Round = round
		p.Error = "No card: " + err.Error()
		s.render(q, "card", p, http.StatusOK)
		return
	}
	in := c.Input
	p.Round, p.Day = in.Session.String(), in.Call.Format(weather.DateLayout)
	p.Elimination = in.Session.Kind == logbook.Elimination
	p.Title = c.Title
	if len(in.Car.Setup) > 0 {
		planned, last := prep.PlannedSetup(in)
		p.Setup = setupLine(in.Car.Setup, planned, last)
		if p.Setup == "" {
			p.Setup = "none logged yet"
		}
	}
	csrf := ""
	if q.role == Crew {
		csrf = s.cfg.Tokens.CSRF(q.token)
	}
	body := g.body(csrf, !p.CanWrite, func() renderedBody {
		var body bytes.Buffer
		form := &prep.ChecklistForm{Action: "/checklist", Round: p.Round, Day: p.Day, CSRF: csrf, ReadOnly: !p.CanWrite}
		err := prep.RenderHTMLBody(&body, c, prep.BodyOptions{Checklist: form, Warnings: plainAll(q.folder, warnings)})
		return renderedBody{body.String(), err}
	})
	if body.err != nil {
		p.Error = "The card could not be drawn: " + body.err.Error()
	}
	p.Card = template.HTML(body.html)
	if in.OpponentDial.Valid {
		p.OppDial = logbook.FormatSeconds(in.OpponentDial.Decimal, 2)
	}
	f := text("opponent-dial", "Other lane's dial", "s", "11.62")
	f.Value, f.Help = p.OppDial, "As posted on its window; blank clears it. The card then shows the chance to win for each dial."
	car := oppCarField()
	if notes, err := q.folder.RoundNotes(p.Day, in.Session); err == nil {
		car.Value = notes.OpponentCar
	}
	p.Form = []field{f, car}
	s.render(q, "card", p, http.StatusOK)
}

// readingForm is the fields of 'weather add', in the event's units, with
// the last reading's values as placeholders.
func readingForm(e *event.Folder) []field {
	u := e.Settings.Units
	temp, press, speed := u.Temp.String(), u.Pressure.String(), u.Speed.String()
	form := []field{
		text("temp", "Air temperature", temp, ""),
		text("baro", "Barometer", press, ""),
		{Name: "baro-kind", Label: "Barometer kind", Kind: "select", Options: []string{"station", "altimeter"}, Value: "station",
			Help: "Station: a meter at the track, uncorrected. Altimeter: an airport's or an app's sea-level figure."},
		text("humidity", "Relative humidity", "%", ""),
		text("dewpoint", "Dew point (instead of humidity)", temp, ""),
		text("wind", "Wind speed", speed, ""),
		text("wind-from", "Wind from", "° (0 = north)", ""),
		text("track-temp", "Track surface", temp, ""),
		{Name: "time", Label: "Time of the reading", Placeholder: "now (or 21:40)", Max: 40, Help: "Blank for now."},
		{Name: "notes", Label: "Notes", Max: MaxNotesLen},
	}
	trk, terr := e.Track()
	if terr != nil {
		return form
	}
	log, _, err := e.ReadableWeather(trk.Elevation())
	if err != nil || len(log) == 0 {
		return form
	}
	last := log[len(log)-1]
	a := last.Derive(trk.Elevation())
	ph := map[string]string{
		"temp": last.Temp.Format(u.Temp, 1), "baro": a.Station.Format(u.Pressure),
		"humidity": fmt.Sprintf("%.0f%%", a.RH*100), "dewpoint": a.DewPoint.Format(u.Temp, 0),
	}
	if last.Wind > 0 || !last.WindDirUnknown {
		ph["wind"] = last.Wind.Format(u.Speed, 0)
	}
	if !last.WindDirUnknown {
		ph["wind-from"] = fmt.Sprintf("%.0f", last.WindFrom)
	}
	if last.HasTrack {
		ph["track-temp"] = last.TrackTemp.Format(u.Temp, 0)
	}
	for i := range form {
		if v, ok := ph[form[i].Name]; ok {
			form[i].Placeholder = v
		}
	}
	return form
}

// readingPage and slipPage start their forms' pages, for showing the form
// and for answering its post alike.
func (q *request) readingPage(round string) page {
	p := q.newPage("Reading", "reading")
	p.Round, p.Heading, p.Action, p.Submit = round, "A weather reading", "/reading", "Save the reading"
	p.Form = readingForm(q.folder)
	return p
}

func (q *request) slipPage(round string) page {
	p := q.newPage("Slip", "slip")
	p.Round, p.Heading, p.Action, p.Submit = round, "The time slip", "/slip", "Log the pass"
	return p
}

func (s *Server) readingPage(q *request) {
	p := q.readingPage(q.r.URL.Query().Get("round"))
	p.Intro = "The figures in italics are the last reading's. A bare number is read in the event's units; 28.92inHg or 979hPa also work."
	s.render(q, "form", p, http.StatusOK)
}

func (s *Server) postReading(q *request) {
	v := values(q.r.PostForm)
	p := q.readingPage(v("round"))
	fill(p.Form, q.r.PostForm)
	nr := entry.NewReading{Fields: entry.ReadingFields{
		Temp: v("temp"), Baro: v("baro"), BaroKind: v("baro-kind"), Humidity: v("humidity"), DewPoint: v("dewpoint"),
		Wind: v("wind"), WindFrom: v("wind-from"), TrackTemp: v("track-temp"),
	}, Time: v("time"), Notes: v("notes"), Replace: v("replace") == "yes"}
	added, err := entry.AddReading(q.folder, nr, q.now)
	if err != nil {
		var same *event.SameMinute
		if errors.As(err, &same) {
			p.Form = append(p.Form, field{Name: "replace", Label: "Replace the reading already logged at " + same.Old.Time.Format("15:04") + "?",
				Kind: "select", Options: []string{"no", "yes"}, Value: "no"})
		}
		p.Error = attach(p.Form, err)
		s.render(q, "form", p, http.StatusUnprocessableEntity)
		return
	}
	r := added.Reading
	s.logf("reading %s added by the crew from %s: %s, DA %s", r.Time.Format("15:04"), q.r.RemoteAddr,
		r.Temp.Format(q.folder.Settings.Units.Temp, 1), r.Derive(added.Elevation).DensityAltitude.FormatDensityAltitude(q.folder.Settings.Units.Length))
	http.Redirect(q.w, q.r, "/?saved=reading"+roundParam(p.Round), http.StatusSeeOther)
}

func roundParam(round string) string {
	if round == "" {
		return ""
	}
	return "&round=" + url.QueryEscape(round)
}

// slipForm is the fields of 'log add', for a car that runs dist feet and a
// crew that weighs in unit w (a bare weight is read in it).
func slipForm(dist float64, w weather.WeightUnit) []field {
	form := []field{
		{Name: "session", Label: "Round", Placeholder: "E3, T2 ...", Max: 20, Flag: "round"},
		{Name: "lane", Label: "Lane", Kind: "radio", Options: []string{"left", "right"}},
		text("dial", "Dial-in", "s", "blank for a time trial"),
		text("rt", "Reaction time", "s", ".021 (negative: red light)"),
		text("et60", "60 ft", "s", ""),
		text("et330", "330 ft", "s", ""),
		text("et660", "1/8 mile ET", "s", ""),
		text("mph660", "1/8 mile speed", "mph", ""),
		text("et1000", "1000 ft", "s", ""),
		text("et1320", "1/4 mile ET", "s", ""),
		text("mph1320", "1/4 mile speed", "mph", ""),
		{Name: "notes", Label: "Notes", Placeholder: "lifted, pedaled, new tires ...", Max: MaxNotesLen},
		{Name: "change", Label: "What changed on the car", Placeholder: "new converter, +2 psi boost ...", Max: logbook.MaxChangeLen,
			Help: "Before this pass; blank if nothing changed."},
		text("opponent-dial", "Other lane's dial", "s", ""),
		text("opponent-rt", "Other lane's reaction time", "s", ""),
		text("opponent-et", "Other lane's ET", "s", ""),
		oppCarField(),
		{Name: "time", Label: "Time of the pass", Placeholder: "now (or 20:47)", Max: 40, Help: "Blank for now."},
		{Name: "weight", Label: "Weight as run", Unit: w.String(), Placeholder: "car.yaml's", Mode: "decimal", Max: 20},
	}
	out := form[:0]
	for _, f := range form {
		if (f.Name == "et1000" && dist < 1000) || ((f.Name == "et1320" || f.Name == "mph1320") && dist < 1320) {
			continue
		}
		out = append(out, f)
	}
	return out
}

// slipDefaults preselects the slip: the round and lane of the card, its
// dial, the other lane's noted dial.
func (s *Server) slipDefaults(q *request, round string) ([]field, string) {
	c, _, err := s.gather(q, round)
	dist := 1320.0
	if err == nil && c.Input.Car.DistanceFt > 0 {
		dist = c.Input.Car.DistanceFt
	}
	form := slipForm(dist, q.folder.Settings.Units.Weight)
	if err != nil {
		return form, round
	}
	in := c.Input
	set := map[string]string{"session": in.Session.String(), "lane": string(in.Lane)}
	if c.HasFinal && in.Session.Kind == logbook.Elimination {
		set["dial"] = prep.DialText(c.FinalDial, in.Settings.DialStep)
	}
	if in.OpponentDial.Valid {
		set["opponent-dial"] = prep.DialText(in.OpponentDial.Decimal, in.Settings.DialStep)
	}
	// The setup the car runs: the round's planned, else the last pass's.
	planned, last := prep.PlannedSetup(in)
	form = append(form, setupFields(in.Car.Setup, planned, last)...)
	for i := range form {
		if v, ok := set[form[i].Name]; ok {
			form[i].Value = v
		}
	}
	return form, in.Session.String()
}

func (s *Server) slipPage(q *request) {
	if id := q.r.URL.Query().Get("logged"); id != "" {
		s.slipDone(q, id)
		return
	}
	p := q.slipPage("")
	p.Form, p.Round = s.slipDefaults(q, q.r.URL.Query().Get("round"))
	p.Intro = "Times in seconds as the slip prints them (.021, 11.538). The air is taken from the weather log's reading nearest the pass."
	s.render(q, "form", p, http.StatusOK)
}

func (s *Server) postSlip(q *request) {
	v := values(q.r.PostForm)
	p := q.slipPage(v("round"))
	dist := 1320.0
	var setup logbook.Setup
	if car, err := q.folder.Car(); err == nil {
		if car.DistanceFt > 0 {
			dist = car.DistanceFt
		}
		setup = car.Setup
	}
	p.Form = append(slipForm(dist, q.folder.Settings.Units.Weight), setupFields(setup, nil, nil)...)
	fill(p.Form, q.r.PostForm)
	np := entry.NewPass{Session: v("session"), Lane: v("lane"), Dial: v("dial"), RT: v("rt"), Weight: v("weight"), Notes: v("notes"), Change: v("change"),
		ET60: v("et60"), ET330: v("et330"), ET660: v("et660"), ET1000: v("et1000"), ET1: v("et1320"),
		MPH660: v("mph660"), MPH1320: v("mph1320"), OppDial: v("opponent-dial"), OppRT: v("opponent-rt"), OppET: v("opponent-et"),
		OppCar: v("opponent"), Set: setupValues(setup, q.r.PostForm)}
	if t := v("time"); t != "" {
		start := q.folder.Settings.DayStart
		when, err := entry.ParseWhen(t, start.Day(q.now), start)
		if err != nil {
			p.Error = attach(p.Form, err)
			s.render(q, "form", p, http.StatusUnprocessableEntity)
			return
		}
		np.Date, np.Time = when.Format(weather.DateLayout), when.Format(weather.TimeLayout)
	}
	key := slipKey(q.r.PostForm)
	if was, ago, ok := s.slips.recent(key, s.cfg.Now()); ok {
		p.Error = fmt.Sprintf("Nothing was saved: this same slip was logged at %s, %s ago (%s): a reload or a second tap sends a form again. "+
			"If the car really made another pass with these very figures, give its time of day.", was.at.Format("15:04"), agoWords(ago), was.short)
		s.render(q, "form", p, http.StatusUnprocessableEntity)
		return
	}
	lp, err := entry.AddPass(q.folder, np, q.now)
	if err != nil {
		p.Error = attach(p.Form, err)
		s.render(q, "form", p, http.StatusUnprocessableEntity)
		return
	}
	pass := lp.Pass
	et, ft, _ := pass.Finish()
	res := slipResult{at: pass.Time, short: fmt.Sprintf("%s, %s lane, %s s", pass.Session.Long(), pass.Lane, logbook.FormatSeconds(et, 3)), logged: fmt.Sprintf("Logged %s, %s lane, at %s: %s s at %.0f ft (%s in the logbook).", pass.Session.Long(), pass.Lane,
		pass.Time.Format("15:04"), logbook.FormatSeconds(et, 3), ft, words.Plural(lp.Count, "pass"))}
	s.logf("slip %s %s lane added by the crew from %s: %s s", pass.Session, pass.Lane, q.r.RemoteAddr, logbook.FormatSeconds(et, 3))
	if lp.Source != "" {
		res.said = append(res.said, "Conditions from "+lp.Source+".")
	}
	if lp.Decided != "" {
		res.said = append(res.said, lp.Decided)
	}
	res.said = append(res.said, lp.Warnings...)
	if lp.Opponent != nil {
		res.said = append(res.said, "The other lane's slip is kept as car "+lp.Opponent.Car+"'s.")
	}
	if lp.OpponentErr != nil {
		res.said = append(res.said, lp.OpponentErr.Error())
	}
	// The answer is a redirect to the result: a reload shows it again and
	// posts nothing.
	id := s.slips.add(key, res, s.cfg.Now())
	http.Redirect(q.w, q.r, "/slip?logged="+id, http.StatusSeeOther)
}

// slipDone is the page of a logged slip, by the id its post redirected to.
func (s *Server) slipDone(q *request, id string) {
	p := q.slipPage("")
	// No form under the result: the next slip starts from the next round's
	// defaults.
	p.CanWrite, p.Heading = false, "The pass is logged"
	if res, ok := s.slips.result(id); ok {
		p.Saved, p.Said = res.logged, res.said
		p.Intro = "Open the card for the next round, or the slip page for another pass."
	} else {
		// An id this page did not hand out, or one it no longer keeps: it
		// cannot say whether anything was logged, so it does not claim it.
		p.Heading = "No such confirmation"
		p.Intro = "This page keeps no confirmation by that name (it keeps the last few, and none from before it was restarted): the Passes page lists what is logged."
	}
	s.render(q, "form", p, http.StatusOK)
}

// roundOf reads the round and day a checklist or dial form names.
func roundOf(v func(string) string) (logbook.Session, string, error) {
	ses, err := logbook.ParseSession(v("round"))
	if err != nil {
		return ses, "", err
	}
	day := v("day")
	if _, err := time.Parse(weather.DateLayout, day); err != nil {
		return ses, "", &weather.InputError{Field: "day", Value: day, Reason: "is not a date as YYYY-MM-DD"}
	}
	return ses, day, nil
}

func (s *Server) postChecklist(q *request) {
	v := values(q.r.PostForm)
	ses, day, err := roundOf(v)
	if err == nil {
		err = s.roundsItems(q, ses, day, q.r.PostForm["tick"])
	}
	if err == nil {
		err = q.folder.SetTicks(day, ses, q.r.PostForm["tick"], q.now)
	}
	// The page's script saves a box as it is ticked and asks for JSON: the
	// words to say and the folder's new stamp (its own write is no news).
	script := strings.Contains(q.r.Header.Get("Accept"), "application/json")
	if err != nil {
		msg := "Nothing was saved: " + forPhone(q.folder, err.Error())
		s.logRefusal(q.r, fmt.Sprintf("%s %s from %s: %s", q.r.Method, q.r.URL.EscapedPath(), q.r.RemoteAddr, err.Error()))
		if script {
			answerJSON(q.w, http.StatusUnprocessableEntity, map[string]string{"error": msg})
			return
		}
		http.Error(q.w, msg, http.StatusUnprocessableEntity)
		return
	}
	s.logf("checklist of %s saved by the crew from %s: %d ticked", ses, q.r.RemoteAddr, len(q.r.PostForm["tick"]))
	if script {
		answerJSON(q.w, http.StatusOK, map[string]string{"stamp": stamp(q.folder),
			"saved": fmt.Sprintf("The checklist is saved: %s ticked.", words.Plural(len(q.r.PostForm["tick"]), "item"))})
		return
	}
	http.Redirect(q.w, q.r, "/?saved=checklist"+roundParam(ses.String())+"#checklist", http.StatusSeeOther)
}

func answerJSON(w http.ResponseWriter, status int, v map[string]string) {
	w.Header().Set("Content-Type", "application/json")
	w.WriteHeader(status)
	_ = json.NewEncoder(w).Encode(v)
}

// roundsItems checks that ticked are items to tick of ses's card, and day
// its day: the form offers nothing else, so anything else was not sent by
// the page.
func (s *Server) roundsItems(q *request, ses logbook.Session, day string, ticked []string) error {
	c, _, err := s.gather(q, ses.String())
	if err != nil {
		return fmt.Errorf("%s has no card to tick: %w", ses.Long(), err)
	}
	if d := c.Input.Call.Format(weather.DateLayout); d != day {
		return &weather.InputError{Field: "day", Value: day, Reason: fmt.Sprintf("is not the round's day: %s's card is for %s", ses.Long(), d)}
	}
	items := map[string]bool{}
	var names []string
	for _, ch := range c.Checks {
		if ch.Status == scripts.Confirm {
			items[ch.Label] = true
			names = append(names, "“"+ch.Label+"”")
		}
	}
	for _, t := range ticked {
		if !items[t] {
			return &weather.InputError{Field: "checklist item", Value: t, Reason: fmt.Sprintf("is not one of %s's items to tick (they are %s)",
				ses.Long(), strings.Join(names, ", "))}
		}
	}
	return nil
}

func (s *Server) postOpponent(q *request) {
	v := values(q.r.PostForm)
	ses, day, err := roundOf(v)
	if err == nil && strings.TrimSpace(v("opponent")) != "" {
		_, err = event.ParseCar("--opponent", v("opponent")) // checked first: a bad name leaves the dial as it was too
	}
	if err == nil {
		if err = q.folder.SetOpponentDial(day, ses, v("opponent-dial"), q.now); err == nil {
			err = q.folder.SetOpponentCar(day, ses, v("opponent"), q.now)
		}
	}
	if err != nil {
		p := q.newPage("Card", "card")
		p.Round = v("round")
		p.Form = []field{text("opponent-dial", "Other lane's dial", "s", "11.62"), oppCarField()}
		fill(p.Form, q.r.PostForm)
		p.Error = attach(p.Form, err)
		p.Heading, p.Action, p.Submit = "The other lane", "/opponent", "Save the other lane's dial"
		if ses, _, rerr := roundOf(v); rerr == nil {
			// The round and its day as the card's form sent them: shown, kept hidden.
			p.Heading, p.Day = "The other lane, "+ses.Long()+", "+day, day
		}
		s.render(q, "form", p, http.StatusUnprocessableEntity)
		return
	}
	s.logf("other lane's dial for %s set to %q by the crew from %s", ses, v("opponent-dial"), q.r.RemoteAddr)
	http.Redirect(q.w, q.r, "/?saved=opponent"+roundParam(ses.String()), http.StatusSeeOther)
}

// passesPage is today's passes, each predicted from the passes before it,
// against what it ran.
func (s *Server) passesPage(q *request) {
	p := q.newPage("Passes", "passes")
	p.Heading = "Today's passes"
	c, _, err := s.gather(q, q.r.URL.Query().Get("round"))
	if err != nil {
		p.Error = "No passes to show: " + err.Error()
		s.render(q, "list", p, http.StatusOK)
		return
	}
	in := c.Input
	p.Round = in.Session.String()
	p.Refresh, p.Stamp = true, stamp(q.folder)
	dist := in.Car.DistanceFt
	t := listTable{Title: fmt.Sprintf("%s, %s: predicted against actual", words.OrDash(in.Track.Name), in.Call.Format("Mon 2006-01-02")),
		Header: []string{"Pass", "Lane", "Predicted", "Ran", "Off by"}}
	for _, l := range c.Record {
		pred, off := "—", "—"
		if l.Predicted == l.Predicted { // not NaN
			pred, off = fmt.Sprintf("%.3f", l.Predicted), fmt.Sprintf("%+.3f", l.Error)
		}
		name := l.Pass.Session.String() + " " + l.Pass.Time.Format("15:04")
		if l.Pass.Notes != "" {
			name += " (" + l.Pass.Notes + ")"
		}
		t.Rows = append(t.Rows, []string{name, string(l.Pass.Lane), pred, fmt.Sprintf("%.3f", l.Actual), off})
	}
	if len(t.Rows) == 0 {
		p.Intro = "No pass logged on " + in.Call.Format("2006-01-02") + " yet."
	} else {
		t.Note = fmt.Sprintf("Each pass predicted from the passes before it, at %.0f ft; mean miss %.3f s.", dist, c.RecordMAE)
	}
	p.Tables = append([]listTable{t}, segmentTables(c.Record, dist, in.Track, q.folder.Settings.Units.Speed)...)
	s.render(q, "list", p, http.StatusOK)
}

// segmentTables are today's passes cut into their segments (logbook.Segments),
// each against the pass before it today, with the air taken out where both
// logged their weather: what 'pitcard log compare --with last' prints.
func segmentTables(record []prep.RecordLine, dist float64, trk engine.Track, speed weather.SpeedUnit) []listTable {
	var out []listTable
	cell := func(v float64, ok bool, format string) string {
		if !ok || v != v {
			return "—"
		}
		return fmt.Sprintf(format, v)
	}
	for k, l := range record {
		pr := logbook.Segments(l.Pass, dist)
		t := listTable{Title: l.Pass.Session.String() + " " + l.Pass.Time.Format("15:04") + ": segments",
			Header: []string{"Segment", "Time s", "Avg " + speed.String(), "g", "vs before"}}
		var diffs []logbook.SegmentDiff
		carried := false
		if k > 0 {
			before := record[k-1].Pass
			carry, ok := event.AirCarryBetween(l.Pass, before, trk)
			carried = ok
			diffs = logbook.Compare(pr, logbook.Segments(before, dist), carry)
		}
		for i, sg := range pr.Segments {
			vs := "—"
			if i < len(diffs) && diffs[i].OK {
				vs = cell(diffs[i].Diff, true, "%+.3f")
				if carried {
					vs = cell(diffs[i].Carried, true, "%+.3f")
				}
			}
			t.Rows = append(t.Rows, []string{sg.Name(), cell(sg.Time, sg.Timed, "%.3f"),
				cell(weather.MPH(sg.MPH()).In(speed), sg.Timed, "%.1f"), cell(sg.AccelG, sg.HasAccel, "%.2f"), vs})
		}
		var note []string
		if pr.HasLaunch {
			note = append(note, fmt.Sprintf("Launch %.2f g over the first 60 ft from rest.", pr.LaunchG))
		}
		for _, sg := range pr.Segments {
			if !sg.Timed && !slices.Contains(note, sg.Missing+".") {
				note = append(note, sg.Missing+".")
			}
		}
		switch {
		case k == 0:
			note = append(note, "The day's first pass: nothing before it to set it against.")
		case carried:
			note = append(note, "vs before: this segment's time less the pass before's, carried to this air by the SAE J1349 factors' cube root (+ slower).")
		default:
			note = append(note, "vs before: this segment's time less the pass before's, as run: the air is not taken out (+ slower).")
		}
		t.Note = strings.Join(note, " ")
		out = append(out, t)
	}
	if len(out) > 0 {
		out[len(out)-1].Note += " Average acceleration over a segment is below the peak a data logger shows."
	}
	return out
}

// weatherPage is the day's weather log with its density altitude and the
// trend to the round's call.
func (s *Server) weatherPage(q *request) {
	p := q.newPage("Weather", "weather")
	p.Heading = "The weather log"
	p.Refresh, p.Stamp = true, stamp(q.folder)
	e := q.folder
	u := e.Settings.Units
	trk, err := e.Track()
	if err != nil {
		p.Error = err.Error()
		s.render(q, "list", p, http.StatusOK)
		return
	}
	elev := trk.Elevation()
	log, err := e.WeatherLog(elev)
	if err != nil {
		p.Error = err.Error()
		s.render(q, "list", p, http.StatusOK)
		return
	}
	if len(log) == 0 {
		p.Intro = "No readings yet: add one on the Reading page."
		s.render(q, "list", p, http.StatusOK)
		return
	}
	start := q.folder.Settings.DayStart // the latest reading's race day, past midnight included
	day := start.Key(log[len(log)-1].Time)
	t := listTable{Title: fmt.Sprintf("%s, %s", words.OrDash(trk.Name), day), Header: []string{"Time", "Air", "Baro", "RH", "Track", "DA"}}
	var today []weather.Reading
	for _, r := range log {
		if start.Key(r.Time) != day {
			continue
		}
		today = append(today, r)
		a := r.Derive(elev)
		track := ""
		if r.HasTrack {
			track = r.TrackTemp.Format(u.Temp, 0)
		}
		t.Rows = append(t.Rows, []string{r.Time.Format("15:04"), r.Temp.Format(u.Temp, 1), a.Station.Format(u.Pressure),
			fmt.Sprintf("%.0f %%", a.RH*100), track, a.DensityAltitude.FormatDensityAltitude(u.Length)})
	}
	// Newest first: the top row is the one the crew looks for.
	for i, j := 0, len(t.Rows)-1; i < j; i, j = i+1, j-1 {
		t.Rows[i], t.Rows[j] = t.Rows[j], t.Rows[i]
	}
	c, _, gerr := s.gather(q, q.r.URL.Query().Get("round"))
	if gerr == nil {
		p.Round = c.Input.Session.String()
		call := c.Input.Call
		if f, err := weather.ForecastAt(today, call, elev); err == nil {
			trend := fmt.Sprintf("At the %s call (%s): density altitude %s ± %s, %s.", call.Format("15:04"), c.Input.Session.Long(),
				f.Air.DensityAltitude.FormatDensityAltitude(u.Length), f.DAError.Format(u.Length), f.Reading.Temp.Format(u.Temp, 1))
			p.Said = append(p.Said, trend, words.UpperFirst(strings.Join(f.Notes, "; "))+".")
			if !f.Trusted {
				p.Said = append(p.Said, "Not to be trusted: take a fresh reading.")
			}
		} else {
			p.Said = append(p.Said, "No trend to the "+call.Format("15:04")+" call: "+err.Error())
		}
	}
	p.Tables = []listTable{t}
	s.render(q, "list", p, http.StatusOK)
}
