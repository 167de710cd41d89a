package main

import (
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"strings"

	"github.com/jedib0t/go-pretty/v6/table"
	"github.com/shopspring/decimal"
	"github.com/spf13/cobra"

	"pitcard/entry"
	"pitcard/event"
	"pitcard/internal/text"
	"pitcard/prep"
	"pitcard/scripts"
)

func newRulesCmd(s *IOStreams, g *globalOptions) *cobra.Command {
	cmd := &cobra.Command{
		Use:   "rules",
		Short: "The crew's Lua rules: list them, check they load, try them on given conditions",
		Long: `The crew's rules are Lua files in the event folder's rules/, run in name order
for every round. A rule file may define dial(ctx) (an adjustment to the
recommended dial, in seconds, and a reason), checks(ctx) (checklist items:
pass, warn, fail, or confirm for a box to tick) and notes(ctx) (setup notes).
Rules run sandboxed, with a time and memory budget per call: a rule that fails
becomes a failed check on the card naming its file and line, and the others go on.`,
		Example: "  pitcard rules list\n  pitcard rules check\n  pitcard rules try --round 3 --lane left --at 20:45",
	}
	cmd.AddCommand(newRulesListCmd(s, g), newRulesCheckCmd(s, g), newRulesTryCmd(s, g))
	groupCmd(cmd)
	return cmd
}

func newRulesListCmd(s *IOStreams, g *globalOptions) *cobra.Command {
	var format string
	cmd := &cobra.Command{
		Use:     "list",
		Short:   "List the rule files and what each defines",
		Example: "  pitcard rules list\n  pitcard rules list --demo --format json",
		Args:    cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			if err := checkFormat(format, "text", "markdown", "json"); err != nil {
				return err
			}
			e, err := g.open(cmd)
			if err != nil {
				return err
			}
			rules, err := scripts.Load(e.FS, e.Settings.RuleLimits)
			if err != nil {
				return err
			}
			if format == "json" {
				type item struct {
					File    string   `json:"file"`
					Defines []string `json:"defines"`
					Error   string   `json:"error,omitempty"`
				}
				out := []item{}
				for _, r := range rules {
					it := item{File: r.File, Defines: r.Defines}
					if it.Defines == nil {
						it.Defines = []string{}
					}
					if r.Err != nil {
						it.Error = r.Err.Error()
					}
					out = append(out, it)
				}
				return writeJSON(s.Out, out)
			}
			if len(rules) == 0 {
				fmt.Fprintf(s.Out, "%s has no rules (*.lua). 'pitcard init' writes the rules that ship with pitcard.\n", e.Name(event.RulesDir))
				return nil
			}
			t := newTable(s, "Rules in "+e.Name(event.RulesDir))
			t.AppendHeader(table.Row{"File", "Defines", "What it says it does"})
			for _, r := range rules {
				def := strings.Join(r.Defines, ", ")
				if r.Err != nil {
					def = "does not load: " + r.Err.Error()
				}
				t.AppendRow(table.Row{r.File, def, firstComment(r.Source)})
			}
			render(s, t, format)
			return nil
		},
	}
	cmd.Flags().StringVar(&format, "format", "text", "text, markdown or json")
	withOut(cmd, s)
	return cmd
}

// firstComment is the first sentence of a rule's opening comment: what it
// says it does. A sentence may run over several comment lines.
func firstComment(src string) string {
	var words []string
	for _, line := range strings.Split(src, "\n") {
		line = strings.TrimSpace(line)
		if !strings.HasPrefix(line, "--") {
			if line == "" && len(words) == 0 {
				continue
			}
			break
		}
		c := strings.TrimSpace(strings.TrimLeft(line, "-"))
		if c == "" {
			if len(words) > 0 {
				break
			}
			continue
		}
		words = append(words, c)
	}
	joined := strings.Join(words, " ")
	if i := strings.Index(joined, ". "); i >= 0 {
		joined = joined[:i+1]
	}
	return joined
}

func newRulesCheckCmd(s *IOStreams, g *globalOptions) *cobra.Command {
	return &cobra.Command{
		Use:     "check",
		Short:   "Load and validate every rule; exit 2 when any fails",
		Example: "  pitcard rules check",
		Args:    cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			e, err := g.open(cmd)
			if err != nil {
				return err
			}
			rules, err := scripts.Load(e.FS, e.Settings.RuleLimits)
			if err != nil {
				return err
			}
			// Run the hooks too, on the folder's next round, when it can be gathered.
			ran := map[string][]*scripts.Error{}
			hooks := "loaded only"
			if in, _, err := entry.GatherRound(e, entry.RoundRequest{}, s.Now()); err == nil {
				for _, r := range prep.Gather(in).Rules {
					ran[r.File] = r.Errors
				}
				hooks = "loaded and run on " + in.Session.Long()
			} else if in, _, err := entry.GatherRound(e, entry.RoundRequest{Round: "1"}, s.Now()); err == nil {
				for _, r := range prep.Gather(in).Rules {
					ran[r.File] = r.Errors
				}
				hooks = "loaded and run on round 1"
			}
			bad := 0
			for _, r := range rules {
				switch {
				case r.Err != nil:
					bad++
					fmt.Fprintf(s.Out, "FAIL  %s\n", r.Err)
				case len(r.Defines) == 0:
					bad++
					fmt.Fprintf(s.Out, "FAIL  %s: defines none of dial, checks, notes\n", r.File)
				case len(ran[r.File]) > 0:
					bad++
					fmt.Fprintf(s.Out, "FAIL  %s\n", ran[r.File][0])
				default:
					fmt.Fprintf(s.Out, "ok    %s (%s)\n", r.File, strings.Join(r.Defines, ", "))
				}
			}
			fmt.Fprintf(s.Out, "(rules %s)\n", hooks)
			if bad > 0 {
				return userErrf("%d of %s failed", bad, text.Plural(len(rules), "rule"))
			}
			fmt.Fprintf(s.Out, "All %s load.\n", text.Plural(len(rules), "rule"))
			return nil
		},
	}
}

type rulesTryOptions struct {
	g      *globalOptions
	s      *IOStreams
	round  roundFlags
	Format string
}

func newRulesTryCmd(s *IOStreams, g *globalOptions) *cobra.Command {
	o := &rulesTryOptions{g: g, s: s}
	cmd := &cobra.Command{
		Use:   "try",
		Short: "Run every rule on given conditions and show what each returned, its log and its run time",
		Long: `Gathers a round as the card would (the prediction, the dial options) for the
conditions given, runs every rule on it, and prints what each returned: its
dial adjustment and reason, its checklist items, its notes, the lines it
logged with pit.log or print, and how long it took.`,
		Example: "  pitcard rules try --round 3 --lane left --at 20:45\n  pitcard rules try --round E2 --lane right --temp 88F --baro 27.55inHg --humidity 30% --track-temp 135F",
		Args:    cobra.NoArgs,
		RunE:    func(cmd *cobra.Command, _ []string) error { return rulesTryRun(cmd, o) },
	}
	o.round.bind(cmd)
	cmd.Flags().StringVar(&o.Format, "format", "text", "text or json")
	return cmd
}

func rulesTryRun(cmd *cobra.Command, o *rulesTryOptions) error {
	if err := checkFormat(o.Format, "text", "json"); err != nil {
		return err
	}
	e, err := o.g.open(cmd)
	if err != nil {
		return err
	}
	in, warnings, err := entry.GatherRound(e, o.round.request(), o.s.Now())
	if err != nil {
		return err
	}
	for _, w := range warnings {
		o.s.warn(w)
	}
	// The card cuts a rule's long texts and points here: show them whole.
	in.Settings.RuleLimits.MaxText = math.MaxInt
	c := prep.Gather(in)
	if o.Format == "json" {
		return errors.Join(writeJSON(o.s.Out, rulesTryJSON(in, c)), failedChecks(c.Failed))
	}
	printRulesTry(o.s.Out, in, c)
	// A failed check stops the dial here as on the card (exit 3).
	return failedChecks(c.Failed)
}

// ruleCheckJSON is one check of a rule as 'rules try --format json' writes it.
type ruleCheckJSON struct {
	Label  string `json:"label"`
	Status string `json:"status"`
	Note   string `json:"note"`
}

// ruleResultJSON is one rule's run as 'rules try --format json' writes it:
// lists are [] rather than null when empty.
type ruleResultJSON struct {
	File    string          `json:"file"`
	Defines []string        `json:"defines"`
	Adjust  string          `json:"adjust,omitempty"`
	Reason  string          `json:"reason,omitempty"`
	Checks  []ruleCheckJSON `json:"checks"`
	Notes   []string        `json:"notes"`
	Log     []string        `json:"log"`
	Errors  []string        `json:"errors"`
	TookMS  float64         `json:"took_ms"`
}

// ruleAsJSON is one rule's run for the JSON, its adjustment in the dial's
// digits.
func ruleAsJSON(r scripts.Result, step decimal.Decimal) ruleResultJSON {
	x := ruleResultJSON{File: r.File, Defines: r.Defines, Checks: []ruleCheckJSON{}, Notes: r.Notes, Log: r.Log, Errors: []string{}, TookMS: round(float64(r.Took.Microseconds())/1000, 2)}
	if r.HasAdjust {
		x.Adjust, x.Reason = prep.DialText(r.Adjust, step), r.Reason
	}
	for _, ch := range r.Checks {
		x.Checks = append(x.Checks, ruleCheckJSON{ch.Label, ch.Status, ch.Note})
	}
	for _, e := range r.Errors {
		x.Errors = append(x.Errors, e.Error())
	}
	if x.Notes == nil {
		x.Notes = []string{}
	}
	if x.Log == nil {
		x.Log = []string{}
	}
	return x
}

// rulesTryJSON is the whole 'rules try --format json' answer: the round,
// every rule's run, the rules' total and the dials before and after them
// (numbers with the dial's digits, null when there is none). It writes
// nothing.
func rulesTryJSON(in prep.Input, c prep.Card) map[string]any {
	out := []ruleResultJSON{}
	for _, r := range c.Rules {
		out = append(out, ruleAsJSON(r, in.Settings.DialStep))
	}
	j := map[string]any{"round": c.Title, "session": in.Session.String(), "lane": string(in.Lane), "rules": out,
		"rule_total": json.Number(prep.DialText(c.TotalAdjust, in.Settings.DialStep)), "flag": c.AdjustFlag,
		"recommended_dial": nil, "final_dial": nil, "checks_failed": append([]string{}, c.Failed...)}
	if c.PlanErr == nil && len(c.Plan.Options) > 0 { // numbers with the dial's digits, null when there is none
		j["recommended_dial"] = json.Number(recommendedText(c))
	}
	if c.HasFinal {
		j["final_dial"] = json.Number(finalText(c))
	}
	return j
}

// printRulesTry prints 'rules try' as text: the recommended dial, then
// each rule's adjustment, checks, notes and log lines, then the final dial
// and the flag. It does not print a rule's errors (the card names them) and
// does not decide the exit code.
func printRulesTry(w io.Writer, in prep.Input, c prep.Card) {
	fmt.Fprintf(w, "%s, called %s. Recommended dial before the rules: %s.\n", c.Title, in.Call.Format("15:04"), recommendedText(c))
	for _, r := range c.Rules {
		fmt.Fprintf(w, "\n%s (%s) took %.1f ms\n", r.File, strings.Join(r.Defines, ", "), float64(r.Took.Microseconds())/1000)
		if r.HasAdjust {
			fmt.Fprintf(w, "  dial %s s: %s\n", prep.SignedDialText(r.Adjust, in.Settings.DialStep), r.Reason)
		}
		for _, ch := range r.Checks {
			fmt.Fprintf(w, "  [%s] %s", ch.Status, ch.Label)
			if ch.Note != "" {
				fmt.Fprintf(w, ": %s", ch.Note)
			}
			fmt.Fprintln(w)
		}
		for _, n := range r.Notes {
			fmt.Fprintf(w, "  note: %s\n", n)
		}
		for _, l := range r.Log {
			fmt.Fprintf(w, "  log: %s\n", l)
		}
	}
	if c.HasFinal {
		fmt.Fprintf(w, "\nRules add %s s: final dial %s.\n", prep.SignedDialText(c.TotalAdjust, in.Settings.DialStep), finalText(c))
	}
	if c.AdjustFlag != "" {
		fmt.Fprintln(w, "Flag: "+c.AdjustFlag)
	}
}

func recommendedText(c prep.Card) string {
	if c.PlanErr != nil || len(c.Plan.Options) == 0 {
		return "none (no prediction)"
	}
	return prep.DialText(c.Plan.Recommended, c.Input.Settings.DialStep)
}

func finalText(c prep.Card) string {
	if !c.HasFinal {
		return ""
	}
	return prep.DialText(c.FinalDial, c.Input.Settings.DialStep)
}
