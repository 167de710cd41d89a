// Package pitpage is pitcard's second front end: the card and the
// between-rounds entries as web pages for the crew's phones, served from the
// event folder on the trailer's laptop.
//
// It does not read or write the event's data itself (the one file it
// writes is its own link tokens): every reading, slip and setup goes
// through package event, as the command line's do, so a reading typed on a
// phone is checked, locked and written exactly as 'pitcard weather add'
// would, and the card it shows is the card 'pitcard card' prints.
//
// Every page is rendered on the server with html/template and works without
// JavaScript; a small embedded script refreshes the card when the folder
// changes. Nothing is fetched from outside: the style, the script and the
// chart are in the binary.
package pitpage

import (
	"bytes"
	"crypto/sha256"
	"embed"
	"encoding/hex"
	"errors"
	"fmt"
	"html/template"
	"io"
	"io/fs"
	"net"
	"net/http"
	"net/url"
	"os"
	"path"
	"slices"
	"sort"
	"sync"
	"time"

	"pitcard/engine"
	"pitcard/entry"
	"pitcard/event"
	"pitcard/internal/printable"
	"pitcard/prep"
)

//go:embed assets
var assets embed.FS

// CookieName is the cookie a phone keeps its token in.
const CookieName = "pitcard_access"

// Limits on what one request may send.
const (
	MaxBody      = 32 << 10 // bytes of a form
	MaxFields    = 60
	MaxFieldLen  = 300  // bytes of one field
	MaxNotesLen  = 1000 // bytes of a notes field
	cookieMaxAge = 4 * 24 * time.Hour
)

// Config is what a Server serves.
type Config struct {
	// Open opens the event folder with its settings, afresh for every
	// request: a changed pitcard.yaml or car.yaml counts at once.
	Open   func() (*event.Folder, error)
	Tokens Tokens
	Now    func() time.Time // the clock; time.Now when nil
	// Log, when set, hears every write and every refused request, one
	// line each: the laptop's terminal shows who did what.
	Log io.Writer
	// Hosts are the host:port names the page is served at: the join
	// link's, and the laptop's other names. A request for another name is
	// refused, so a page of another site that points its own name at the
	// laptop (DNS rebinding) reads and writes nothing; an IP address on one
	// of their ports is always answered (no other site can make a phone ask
	// for it). Empty: any Host is answered.
	Hosts []string
}

// Server is the pit page's http.Handler.
type Server struct {
	cfg    Config
	mux    *http.ServeMux
	pages  map[string]*template.Template
	denied *template.Template
	logMu  sync.Mutex
	// refusals are the refused requests being counted, by client address
	// (logMu held).
	refusals map[string]*refusalGroup

	cards memo[gathered]
	// heldOut keeps the pass model's held-out predictions between cards.
	heldOut *engine.HeldOutCache
	making  chan struct{} // one card made at a time (gathered)
	// latest is the latest card made of each round, for a phone asking
	// while another is being made.
	latestMu sync.Mutex
	latest   map[string]gathered
	slips    slipLog
}

// New makes the pit page's handler.
func New(cfg Config) (*Server, error) {
	if cfg.Now == nil {
		cfg.Now = time.Now
	}
	if cfg.Tokens.Crew == "" || cfg.Tokens.View == "" || cfg.Tokens.Secret == "" {
		return nil, errors.New("pitpage: the crew, view and secret tokens are required")
	}
	s := &Server{cfg: cfg, mux: http.NewServeMux(), pages: map[string]*template.Template{}, heldOut: sharedHeldOut, making: make(chan struct{}, 1)}
	funcs := template.FuncMap{}
	base, err := template.New("").Funcs(funcs).ParseFS(assets, "assets/layout.html")
	if err != nil {
		return nil, err
	}
	for _, name := range []string{"card", "form", "list"} {
		t, err := template.Must(base.Clone()).ParseFS(assets, "assets/"+name+".html")
		if err != nil {
			return nil, err
		}
		s.pages[name] = t
	}
	if s.denied, err = template.ParseFS(assets, "assets/denied.html"); err != nil {
		return nil, err
	}
	s.routes()
	return s, nil
}

func (s *Server) routes() {
	m := s.mux
	m.HandleFunc("GET /join/{token}", s.join)
	m.HandleFunc("GET /static/{file}", s.static)
	m.HandleFunc("GET /{$}", s.reader(s.cardPage))
	m.HandleFunc("GET /reading", s.reader(s.readingPage))
	m.HandleFunc("POST /reading", s.writer(s.postReading))
	m.HandleFunc("GET /slip", s.reader(s.slipPage))
	m.HandleFunc("POST /slip", s.writer(s.postSlip))
	m.HandleFunc("POST /checklist", s.writer(s.postChecklist))
	m.HandleFunc("POST /opponent", s.writer(s.postOpponent))
	m.HandleFunc("GET /setup", s.reader(s.setupPage))
	m.HandleFunc("POST /setup", s.writer(s.postSetup))
	m.HandleFunc("GET /passes", s.reader(s.passesPage))
	m.HandleFunc("GET /weather", s.reader(s.weatherPage))
	m.HandleFunc("GET /changes", s.reader(s.changes))
}

// ServeHTTP sets the security headers every answer carries, then routes.
func (s *Server) ServeHTTP(w http.ResponseWriter, r *http.Request) {
	h := w.Header()
	// Nothing from outside: the page's own style and script, the chart inline.
	h.Set("Content-Security-Policy", "default-src 'none'; style-src 'self'; script-src 'self'; img-src 'self' data:; "+
		"connect-src 'self'; form-action 'self'; frame-ancestors 'none'; base-uri 'none'")
	h.Set("X-Content-Type-Options", "nosniff")
	h.Set("X-Frame-Options", "DENY")
	// No address of the page leaves it; same-origin rather than no-referrer
	// because under no-referrer a browser sends "Origin: null" with the
	// page's own forms, and null is refused.
	h.Set("Referrer-Policy", "same-origin")
	h.Set("Cache-Control", "no-store")
	h.Set("Cross-Origin-Opener-Policy", "same-origin")
	if !s.knownHost(r.Host) {
		s.deny(w, r, "This address is not the pit page's: open the crew's or the view link as 'pitcard serve' printed it.")
		return
	}
	if role, _ := s.roleOf(r); role != Nobody {
		trust(r)
	}
	s.mux.ServeHTTP(w, r)
}

// request is one authorized request: who sent it and the folder it reads.
type request struct {
	w      http.ResponseWriter
	r      *http.Request
	role   Role
	token  string
	folder *event.Folder
	now    time.Time
}

func (s *Server) roleOf(r *http.Request) (Role, string) {
	c, err := r.Cookie(CookieName)
	if err != nil {
		return Nobody, ""
	}
	return s.cfg.Tokens.RoleOf(c.Value), c.Value
}

// reader lets a crew or view token through.
func (s *Server) reader(h func(*request)) http.HandlerFunc {
	return func(w http.ResponseWriter, r *http.Request) {
		role, tok := s.roleOf(r)
		if role == Nobody {
			s.deny(w, r, "This page needs the crew's link or the view link: no valid token came with the request.")
			return
		}
		if q := s.open(w, r, role, tok); q != nil {
			h(q)
		}
	}
}

// writer lets only the crew token through, with the form's CSRF token, a
// same-origin request and a body within the limits.
func (s *Server) writer(h func(*request)) http.HandlerFunc {
	return func(w http.ResponseWriter, r *http.Request) {
		role, tok := s.roleOf(r)
		switch role {
		case Nobody:
			s.deny(w, r, "Nothing was written: this needs the crew's link, and no valid token came with the request.")
			return
		case Viewer:
			s.deny(w, r, "Nothing was written: the view link only reads. Entries need the crew's link.")
			return
		}
		if why := foreignOrigin(r); why != "" {
			s.deny(w, r, "Nothing was written: "+why)
			return
		}
		r.Body = http.MaxBytesReader(w, r.Body, MaxBody)
		if err := r.ParseForm(); err != nil {
			var tooBig *http.MaxBytesError
			if errors.As(err, &tooBig) {
				s.logRefusal(r, fmt.Sprintf("a %d-byte form from %s (limit %d)", r.ContentLength, r.RemoteAddr, MaxBody))
				http.Error(w, fmt.Sprintf("Nothing was written: the form is larger than %d KiB.", MaxBody>>10), http.StatusRequestEntityTooLarge)
				return
			}
			http.Error(w, "Nothing was written: "+formReadWords(err), http.StatusBadRequest)
			return
		}
		if len(r.PostForm) > MaxFields {
			http.Error(w, fmt.Sprintf("Nothing was written: the form has %d fields (at most %d).", len(r.PostForm), MaxFields), http.StatusRequestEntityTooLarge)
			return
		}
		for k, vs := range r.PostForm {
			limit := MaxFieldLen
			if k == "notes" {
				limit = MaxNotesLen
			}
			for _, v := range vs {
				if len(v) > limit {
					http.Error(w, fmt.Sprintf("Nothing was written: the field %q is %d bytes long (at most %d).", k, len(v), limit), http.StatusRequestEntityTooLarge)
					return
				}
			}
		}
		if !s.cfg.Tokens.CheckCSRF(tok, r.PostForm.Get("csrf")) {
			s.deny(w, r, "Nothing was written: the form's security token is missing or out of date. Open the page again and resend.")
			return
		}
		if q := s.open(w, r, role, tok); q != nil {
			h(q)
		}
	}
}

// open opens the folder for a request; on failure it answers and returns nil.
func (s *Server) open(w http.ResponseWriter, r *http.Request, role Role, tok string) *request {
	e, err := s.cfg.Open()
	if err != nil {
		status := http.StatusInternalServerError
		if event.IsBadInput(err) {
			status = http.StatusOK // the crew's to fix: said on the page
		}
		p := page{Title: "The event folder", Nav: "card", Error: forPhone(nil, "The event folder could not be opened: "+err.Error())}
		w.WriteHeader(status)
		_ = s.pages["list"].ExecuteTemplate(w, "layout", p)
		return nil
	}
	return &request{w: w, r: r, role: role, token: tok, folder: e, now: e.DemoClock(s.cfg.Now())}
}

func (s *Server) deny(w http.ResponseWriter, r *http.Request, why string) {
	s.logRefusal(r, fmt.Sprintf("%s %s from %s: %s", r.Method, r.URL.EscapedPath(), r.RemoteAddr, why))
	w.Header().Set("Content-Type", "text/html; charset=utf-8")
	w.WriteHeader(http.StatusForbidden)
	_ = s.denied.ExecuteTemplate(w, "denied", why)
}

func (s *Server) logf(format string, a ...any) {
	if s.cfg.Log == nil {
		return
	}
	s.logMu.Lock()
	defer s.logMu.Unlock()
	s.writeLog(fmt.Sprintf(format, a...))
}

// writeLog writes one line to the log, logMu held. A path, a header or a
// field a request sent is in it: printable.Line keeps its escape sequences
// from reaching the terminal and its line breaks from forging lines.
func (s *Server) writeLog(line string) {
	fmt.Fprintf(s.cfg.Log, "%s %s\n", s.cfg.Now().Format("15:04:05"), printable.Line(line))
}

// refusalWindow is how long the refusals of one client address are counted
// into one line: a script trying tokens cannot flood the crew's terminal.
const refusalWindow = time.Minute

// refusalGroup is the refusals of one client address since the first was
// logged.
type refusalGroup struct {
	since time.Time
	more  int    // refused after the first, not logged one by one
	last  string // the latest of them
}

// logRefusal logs a refused request: the first from its address in a
// minute as it is, the others as one count when the minute is over (at the
// address's next refusal, or by a timer when none comes).
func (s *Server) logRefusal(r *http.Request, what string) {
	if s.cfg.Log == nil {
		return
	}
	addr := r.RemoteAddr
	if h, _, err := net.SplitHostPort(addr); err == nil {
		addr = h
	}
	now := s.cfg.Now()
	s.logMu.Lock()
	defer s.logMu.Unlock()
	if g := s.refusals[addr]; g != nil {
		if now.Sub(g.since) < refusalWindow {
			g.more++
			g.last = what
			return
		}
		s.endRefusals(addr, g)
	}
	if s.refusals == nil {
		s.refusals = map[string]*refusalGroup{}
	}
	g := &refusalGroup{since: now}
	s.refusals[addr] = g
	s.writeLog("refused " + what)
	time.AfterFunc(refusalWindow, func() {
		s.logMu.Lock()
		defer s.logMu.Unlock()
		if s.refusals[addr] == g {
			s.endRefusals(addr, g)
		}
	})
}

// endRefusals logs the count of g's refusals, logMu held.
func (s *Server) endRefusals(addr string, g *refusalGroup) {
	delete(s.refusals, addr)
	if g.more > 0 {
		s.writeLog(fmt.Sprintf("refused %d more requests from %s since %s (the last: %s)", g.more, addr, g.since.Format("15:04:05"), g.last))
	}
}

// join takes the token from a link once, keeps it as a cookie and
// continues to the card.
func (s *Server) join(w http.ResponseWriter, r *http.Request) {
	tok := r.PathValue("token")
	role := s.cfg.Tokens.RoleOf(tok)
	if role == Nobody {
		s.deny(w, r, "This link's token is not (or no longer) valid: the crew chief may have made new links with 'pitcard serve --new-tokens'.")
		return
	}
	http.SetCookie(w, &http.Cookie{Name: CookieName, Value: tok, Path: "/", HttpOnly: true, SameSite: http.SameSiteStrictMode,
		MaxAge: int(cookieMaxAge / time.Second)})
	s.logf("a phone joined with the %s link from %s", role, r.RemoteAddr)
	// A page that continues, not a redirect: a link opened from another app
	// is a navigation from another site, and a redirect's next request
	// belongs to that chain, so the Strict cookie would not go with it. The
	// refresh is the page's own navigation, same-site, and the cookie goes.
	w.Header().Set("Content-Type", "text/html; charset=utf-8")
	_ = s.denied.ExecuteTemplate(w, "joined", role.String())
}

// static serves the embedded style and script.
func (s *Server) static(w http.ResponseWriter, r *http.Request) {
	name := r.PathValue("file")
	types := map[string]string{"pit.css": "text/css; charset=utf-8", "pit.js": "text/javascript; charset=utf-8"}
	ct, ok := types[name]
	if !ok {
		http.NotFound(w, r)
		return
	}
	data, err := assets.ReadFile(path.Join("assets", name))
	if err != nil {
		http.NotFound(w, r)
		return
	}
	w.Header().Set("Content-Type", ct)
	w.Header().Set("Cache-Control", "max-age=300")
	_, _ = w.Write(data)
}

// page is what the layout and a page's content are rendered from.
type page struct {
	Title, Nav string
	Round      string // the round shown, "E3"
	Day        string // its date, YYYY-MM-DD
	// Elimination: the round has another lane (not a time trial or a test).
	Elimination bool
	Rounds      []string
	CanWrite    bool
	ReadOnly    string // why entries are not offered, when they are not
	CSRF        string
	Refresh     bool
	Stamp       string
	Saved       string
	Error       string
	Warnings    []string
	Card        template.HTML
	OppDial     string
	// Setup is the round's planned setup in one line ("" when car.yaml
	// names no setup items).
	Setup   string
	Heading string
	Intro   string
	Action  string
	Submit  string
	Form    []field
	Said    []string
	Tables  []listTable
}

// RoundQuery keeps the round in the navigation's links.
func (p page) RoundQuery() string {
	if p.Round == "" {
		return ""
	}
	return "?round=" + url.QueryEscape(p.Round)
}

type listTable struct {
	Title  string
	Header []string
	Rows   [][]string
	Note   string
}

// newPage starts a page for q: who may write, the CSRF token.
func (q *request) newPage(title, nav string) page {
	p := page{Title: title, Nav: nav, CSRF: "", CanWrite: q.role == Crew && !q.folder.Demo}
	switch {
	case q.folder.Demo:
		p.ReadOnly = "The demo event is read-only: its forms are shown, not offered. Serve a folder of your own to enter readings and slips."
	case q.role != Crew:
		p.ReadOnly = "View link: this phone reads the card; entries need the crew's link."
	}
	return p
}

func (s *Server) render(q *request, name string, p page, status int) {
	if q.role == Crew {
		p.CSRF = s.cfg.Tokens.CSRF(q.token)
	}
	p = plainPage(q.folder, p)
	for i := range p.Form {
		if p.Form[i].Error != "" {
			p.Form[i].Focus = true
			break
		}
	}
	if status == http.StatusUnprocessableEntity { // the laptop hears every refusal, not only 403s
		why := p.Error
		for _, f := range p.Form {
			if f.Error != "" { // the field marked says more than "fix the field marked below"
				why = f.Name + ": " + f.Error
				break
			}
		}
		s.logRefusal(q.r, fmt.Sprintf("%s %s from %s: %s", q.r.Method, q.r.URL.EscapedPath(), q.r.RemoteAddr, why))
	}
	var buf bytes.Buffer
	if err := s.pages[name].ExecuteTemplate(&buf, "layout", p); err != nil {
		http.Error(q.w, "rendering the page: "+err.Error(), http.StatusInternalServerError)
		return
	}
	q.w.Header().Set("Content-Type", "text/html; charset=utf-8")
	q.w.WriteHeader(status)
	_, _ = q.w.Write(buf.Bytes())
}

// stamp changes whenever a file of the folder does: the card's refresh.
func stamp(e *event.Folder) string {
	return filesStamp(e, []string{event.SettingsFile, event.CarFile, event.TrackFile, event.LogbookFile, event.WeatherFile,
		event.ScheduleFile, event.RoundsFile}, event.RulesDir, "tracks")
}

func filesStamp(e *event.Folder, names []string, dirs ...string) string {
	if e.Demo {
		return "demo"
	}
	h := sha256.New()
	names = append([]string(nil), names...)
	for _, dir := range dirs {
		if m, err := fs.ReadDir(e.FS, dir); err == nil {
			for _, d := range m {
				names = append(names, dir+"/"+d.Name())
			}
		}
	}
	// Files given in place of the folder's (--car-file ...) count too.
	for _, p := range []string{e.CarPath, e.TrackPath, e.LogbookPath} {
		if p != "" {
			if st, err := os.Stat(p); err == nil {
				fmt.Fprintf(h, "%s %d %d %s\n", p, st.Size(), st.ModTime().UnixNano(), fileID(st))
			}
		}
	}
	sort.Strings(names)
	for _, n := range names {
		if st, err := fs.Stat(e.FS, n); err == nil {
			fmt.Fprintf(h, "%s %d %d %s\n", n, st.Size(), st.ModTime().UnixNano(), fileID(st))
		}
	}
	return hex.EncodeToString(h.Sum(nil))[:16]
}

func (s *Server) changes(q *request) {
	q.w.Header().Set("Content-Type", "application/json")
	fmt.Fprintf(q.w, "{\"stamp\":%q}\n", stamp(q.folder))
}

// gather makes the card of the round asked for (the schedule's next when
// none is), as the command line's card does.
func (s *Server) gather(q *request, round string) (prep.Card, []string, error) {
	c := s.gathered(q, round)
	return c.card, c.warnings, c.err
}

// gathered is gather's card with the folder stamp it was made from. Cards
// are kept while nothing they are made from changes: the same folder files
// (the stamp), the same round and the same minute of the clock. One card is
// made at a time, its held-out scoring on one core, so the slips and
// readings being posted keep a core to be written on; while one is being
// made, a phone asking for another is answered at once with the latest card
// of its round, marked as such and carrying the stamp it was made from, so
// the page reloads when the new card is ready (a phone waiting for a card
// would hold one of the server's few connections).
func (s *Server) gathered(q *request, round string) gathered {
	now := stamp(q.folder)
	minute := q.now.Truncate(time.Minute).Format(time.RFC3339)
	key := now + "|" + round + "|" + minute
	if c, ok := s.cards.peek(key); ok {
		return c
	}
	select {
	case s.making <- struct{}{}:
	default:
		if last, ok := s.latestCard(round); ok {
			last.warnings = append(slices.Clone(last.warnings), "the logbook or the weather changed since this card was made: a new card is being made and the page reloads with it")
			last.bodies = nil // its warnings are not the kept body's
			return last
		}
		s.making <- struct{}{}
	}
	defer func() { <-s.making }()
	c := s.cards.get(key, func() gathered {
		in, warnings, err := entry.GatherRound(q.folder, entry.RoundRequest{Round: round}, q.now)
		if !event.Usable(err) {
			return gathered{warnings: warnings, err: err, stamp: now}
		}
		in.HeldOut = s.heldOut
		return gathered{card: prep.Gather(in), warnings: warnings, stamp: now, bodies: &memo[renderedBody]{}}
	})
	s.keepLatest(round, c)
	return c
}

// latestCard is the latest card made of round.
func (s *Server) latestCard(round string) (gathered, bool) {
	s.latestMu.Lock()
	defer s.latestMu.Unlock()
	c, ok := s.latest[round]
	return c, ok
}

func (s *Server) keepLatest(round string, c gathered) {
	s.latestMu.Lock()
	defer s.latestMu.Unlock()
	if s.latest == nil || len(s.latest) >= maxMemo {
		s.latest = map[string]gathered{}
	}
	s.latest[round] = c
}

type gathered struct {
	card     prep.Card
	warnings []string
	err      error
	stamp    string // the folder's when the card was made
	// bodies are the card's rendered HTML, kept with it (so dropped with
	// it when the folder changes), one per checklist form (its CSRF token
	// and whether it may be sent); nil: render each time.
	bodies *memo[renderedBody]
}

// renderedBody is a card's HTML as the page embeds it, or why it could not
// be drawn.
type renderedBody struct {
	html string
	err  error
}

// body is the card's HTML for a checklist form with the CSRF token csrf,
// read-only or not: rendered by render once per card and form.
func (g gathered) body(csrf string, readOnly bool, render func() renderedBody) renderedBody {
	if g.bodies == nil {
		return render()
	}
	return g.bodies.get(fmt.Sprintf("%s|%t", csrf, readOnly), render)
}

// sharedHeldOut is the held-out predictions every Server of the process
// keeps: its keys are digests of everything a prediction is made from, so
// one folder's entries are right for another's with the same passes (a
// copy of the event), and a server restarted in the process starts warm.
// Bounded by engine.MaxHeldOutEntries; scored on one core (see gathered).
// It sits in front of the process-wide cache every event folder's shares,
// so a card the command line made in this process is warm here too.
var sharedHeldOut = engine.NewHeldOutCache().OnCores(1).Behind(event.ProcessHeldOut())

// memo keeps values by key, made once: a caller asking for a value being
// made waits for it. It holds at most maxMemo values, then starts afresh:
// the keys of one folder state are few (the rounds phones look at, this
// minute), and a card of a 100,000-pass logbook holds its latest 5,000
// passes (~3 MB), so old states must not pile up.
type memo[V any] struct {
	mu sync.Mutex
	m  map[string]*memoEntry[V]
}

type memoEntry[V any] struct {
	ready chan struct{}
	v     V
}

const maxMemo = 8

// peek is the value kept for key, if it is made.
func (c *memo[V]) peek(key string) (V, bool) {
	c.mu.Lock()
	e, ok := c.m[key]
	c.mu.Unlock()
	var zero V
	if !ok {
		return zero, false
	}
	select {
	case <-e.ready:
		return e.v, true
	default:
		return zero, false
	}
}

func (c *memo[V]) get(key string, build func() V) V {
	c.mu.Lock()
	e, ok := c.m[key]
	if !ok {
		if c.m == nil || len(c.m) >= maxMemo {
			c.m = map[string]*memoEntry[V]{}
		}
		e = &memoEntry[V]{ready: make(chan struct{})}
		c.m[key] = e
	}
	c.mu.Unlock()
	if ok {
		<-e.ready
		return e.v
	}
	defer close(e.ready)
	e.v = build()
	return e.v
}

// rounds are the schedule's sessions, for the round links.
func (q *request) rounds() []string {
	sched, ok, err := q.folder.Schedule()
	if !ok || err != nil {
		return nil
	}
	var out []string
	for _, s := range sched.Sessions {
		out = append(out, s.Session.String())
	}
	return out
}
