package prep

import (
	"fmt"
	"html/template"
	"io"
	"strings"
)

// RenderHTML writes the card as one self-contained HTML page (no network: the
// style and the chart are inline) that prints on one Letter or A4 page.
func RenderHTML(w io.Writer, c Card) error {
	return cardHTML.Execute(w, htmlData(c, nil))
}

// ChecklistForm makes the card's checklist a form of boxes the crew ticks:
// posted to Action with the round and the CSRF token; ReadOnly shows the
// boxes without letting them change.
type ChecklistForm struct {
	Action, Round, Day, CSRF string
	ReadOnly                 bool
}

// BodyOptions are what a page embedding the card adds to it.
type BodyOptions struct {
	// Checklist, when given, makes the checklist a form of boxes.
	Checklist *ChecklistForm
	// Warnings are said in the dial's box with the card's problems: a
	// warning that changes what the crew should believe is read with the
	// dial, not below the card.
	Warnings []string
}

// RenderHTMLBody writes the card's content alone, for a page of another
// front end to embed: no document, no style (the page brings its own
// stylesheet; the markup's classes are the print page's), the checklist as
// a form when opt.Checklist is given, the problems and opt.Warnings in the
// dial's box.
func RenderHTMLBody(w io.Writer, c Card, opt BodyOptions) error {
	d := htmlData(c, opt.Checklist)
	d.Beside = append(append([]string(nil), opt.Warnings...), d.V.Problems...)
	d.Embedded = true
	// A phone's chart beside the printed one: the page's style shows the
	// one laid out for the width it has.
	d.PhoneChart = template.HTML(ChartFor(c, PhoneChart))
	return cardHTML.ExecuteTemplate(w, "body", d)
}

type htmlCard struct {
	V     view
	Chart template.HTML
	Sub   string
	Form  *ChecklistForm
	// Beside are said in the dial's box (the problems among them), and
	// Embedded leaves the problems' lines below the top out.
	Beside     []string
	Embedded   bool
	PhoneChart template.HTML
}

func htmlData(c Card, form *ChecklistForm) htmlCard {
	v := newView(c)
	return htmlCard{V: v, Chart: template.HTML(Chart(c)), Sub: strings.Join(v.Subtitle, " · "), Form: form}
}

var cardHTML = template.Must(template.New("card").Funcs(template.FuncMap{
	"status": statusWord,
	"cls":    func(s string) string { return "st-" + s },
	"marked": func(t table, i int) bool { return i == t.Marked },
	"join":   strings.Join,
	"pct":    func(f float64) string { return fmt.Sprintf("%.1f %%", 100*f) },
}).Parse(`<!DOCTYPE html>
<html lang="en"><head><meta charset="utf-8">
<title>pitcard: {{.V.Title}}</title>
<style>
@page { size: auto; margin: 8mm; }
* { box-sizing: border-box; }
body { font: 9px/1.3 "DejaVu Sans", "Helvetica Neue", Arial, sans-serif; color: #111; margin: 0 auto; max-width: 194mm; }
h1 { font-size: 16px; margin: 0; }
.sub { color: #333; margin: 1px 0 4px; }
.top { display: flex; gap: 8px; align-items: stretch; }
.dial { border: 3px solid #111; padding: 4px 10px; text-align: center; min-width: 52mm; flex: 0 1 98mm; }
.dial .label { font-size: 10px; font-weight: bold; }
.dial .num { font-size: 44px; font-weight: bold; line-height: 1; }
.dial ul { text-align: left; margin: 3px 0 0; padding-left: 12px; }
.alert { color: #a00; font-weight: bold; }
.dial .stop { color: #a00; font-weight: bold; }
.dial p.stop { font-size: 10.5px; text-align: left; margin: 1px 0 3px; }
.grid { display: grid; grid-template-columns: 1fr 1fr; gap: 4px 10px; margin-top: 4px; }
table { border-collapse: collapse; width: 100%; }
h2 { text-align: left; font-weight: bold; font-size: 10.5px; padding: 2px 0; margin: 0; }
th, td { border-bottom: 1px solid #ccc; padding: 1px 3px; text-align: left; vertical-align: top; }
td.n, th.n { text-align: right; }
tr.mark td { font-weight: bold; background: #eee; }
ul.basis, ul.notes { margin: 2px 0; padding-left: 12px; }
.checks { list-style: none; padding: 0; margin: 0; }
.checks li { margin: 1px 0; }
.box { display: inline-block; width: 9px; height: 9px; border: 1px solid #111; margin-right: 4px; }
.st-pass b { color: #060; } .st-warn b { color: #a60; } .st-fail b { color: #a00; }
.cautions { border-top: 2px solid #111; margin-top: 5px; padding-top: 3px; font-weight: bold; }
.cautions p { margin: 1px 0; }
svg { width: 100%; height: auto; }
.chart { flex: 1; }
.box.ticked { font-size: 8px; line-height: 8px; text-align: center; }
.small { color: #444; }
</style></head><body>
{{template "body" .}}
</body></html>
{{define "body"}}<h1>pitcard · {{.V.Title}}</h1>
<p class="sub">{{.Sub}}</p>
<div class="top">
  <div class="dial">{{if .V.Stop}}<div class="num stop">STOP</div><p class="stop">{{.V.Stop}}</p>{{end}}{{if .V.Dial}}<div class="label">{{if .V.Stop}}THE DIAL ONCE THE FAILED CHECKS ARE CLEARED{{else}}POST THIS DIAL-IN{{end}}</div><div class="num">{{.V.Dial}}</div>
    <ul>{{range .V.DialLines}}<li>{{.}}</li>{{end}}</ul>{{if .V.DialAlert}}<p class="alert">Check: {{.V.DialAlert}}</p>{{end}}
    {{else if .V.NoDial}}<div class="label">NO DIAL YET</div><p class="alert">{{.V.NoDial}}</p>{{if .V.Guide}}<p>{{.V.Guide}}</p>{{end}}
    {{else}}<div class="label">NO DIAL</div><p class="alert">See the problems.</p>{{end}}{{if .Beside}}<ul class="beside">{{range .Beside}}<li>{{.}}</li>{{end}}</ul>{{end}}</div>
  <div class="chart">{{.PhoneChart}}{{.Chart}}</div>
</div>
{{if not .Embedded}}{{range .V.Problems}}<p class="alert">Problem: {{.}}</p>{{end}}{{end}}
<div class="grid">
  <div>{{template "table" .V.Air}}<p class="small">{{.V.AirNote}}</p></div>
  <div>{{if .V.Prediction.Rows}}{{template "table" .V.Prediction}}<ul class="basis">{{range .V.Basis}}<li>{{.}}</li>{{end}}</ul>{{end}}</div>
  <div>{{if .V.Options.Rows}}{{template "table" .V.Options}}{{if .V.OptionsNote}}<p class="small">{{.V.OptionsNote}}</p>{{end}}{{end}}
       {{if .V.Rules.Rows}}{{template "table" .V.Rules}}{{end}}</div>
  <div><h2>Checklist</h2>{{if .Form}}{{template "checkform" .}}{{else}}<ul class="checks">{{range .V.Checks}}<li class="{{cls .Status}}">{{if eq .Status "confirm"}}<span class="box{{if .Ticked}} ticked{{end}}">{{if .Ticked}}✓{{end}}</span>{{else}}<b>{{status .Status}}</b> {{end}}{{.Label}}{{if .Note}}: <span class="small">{{.Note}}</span>{{end}}{{if .Ticked}} <span class="small">(ticked {{.Ticked}})</span>{{end}}</li>{{end}}</ul>{{end}}
       {{if .V.Notes}}<h2>Setup notes</h2><ul class="notes">{{range .V.Notes}}<li>{{.}}</li>{{end}}</ul>{{end}}
       {{if .V.Record.Rows}}<div class="record">{{template "table" .V.Record}}<p class="small">{{.V.RecordNote}}</p></div>{{end}}</div>
</div>
<div class="cautions">{{range .V.Cautions}}<p>⚠ {{.}}</p>{{end}}</div>
{{end}}
{{define "checkform"}}<form method="post" action="{{.Form.Action}}" class="checkform" id="checklist">{{if not .Form.ReadOnly}}<input type="hidden" name="csrf" value="{{.Form.CSRF}}"><input type="hidden" name="round" value="{{.Form.Round}}"><input type="hidden" name="day" value="{{.Form.Day}}">{{end}}
<ul class="checks">{{$ro := .Form.ReadOnly}}{{range .V.Checks}}<li class="{{cls .Status}}">{{if eq .Status "confirm"}}<label><input type="checkbox" name="tick" value="{{.Label}}"{{if .Ticked}} checked{{end}}{{if $ro}} disabled{{end}}> {{.Label}}{{if .Note}}: <span class="small">{{.Note}}</span>{{end}}{{if .Ticked}} <span class="small">(ticked {{.Ticked}})</span>{{end}}</label>{{else}}<b>{{status .Status}}</b> {{.Label}}{{if .Note}}: <span class="small">{{.Note}}</span>{{end}}{{end}}</li>{{end}}</ul>
{{if not $ro}}<button type="submit" class="save-ticks">Save the checklist</button>{{end}}</form>{{end}}
{{define "table"}}<h2>{{.Title}}</h2><table>{{if .Header}}<tr>{{range $i, $h := .Header}}{{if $h}}<th{{if $i}} class="n"{{end}}>{{$h}}</th>{{else}}<td></td>{{end}}{{end}}</tr>{{end}}
{{$t := .}}{{range $i, $r := .Rows}}<tr{{if marked $t $i}} class="mark"{{end}}>{{range $j, $c := $r}}<td{{if $j}} class="n"{{end}}>{{$c}}</td>{{end}}</tr>
{{end}}</table>{{end}}`))
