package heldout

import (
	"fmt"
	"strings"
)

// Table is the report in Markdown: a row per world, then the figures
// across worlds, the predictor's beside PlainRule's.
func (r Report) Table() string {
	var b strings.Builder
	b.WriteString("| world | passes | scored | floor s | MAE s | ratio | plain MAE s | plain ratio | worst vs oracle s | 95 % cover | breakout at 10 % |\n")
	b.WriteString("|---|---:|---:|---:|---:|---:|---:|---:|---:|---:|---:|\n")
	for _, w := range r.Worlds {
		m, p := w.Model, w.Plain
		if m.N == 0 {
			fmt.Fprintf(&b, "| %s | %d | 0 | | | | | | | | |\n", w.Name, w.Passes)
			continue
		}
		fmt.Fprintf(&b, "| %s | %d | %d | %.4f | %.4f | %.2f | %.4f | %.2f | %.3f / %.3f | %s / %s | %s / %s |\n",
			w.Name, w.Passes, m.N, w.Floor, m.MAE, m.Ratio, p.MAE, p.Ratio, m.Oracle, p.Oracle,
			share(m.Covered, m.N), share(p.Covered, p.N), share(m.Broke, m.N), share(p.Broke, p.N))
	}
	b.WriteString("\n| across worlds | predictor | plain rule |\n|---|---:|---:|\n")
	fmt.Fprintf(&b, "| passes scored | %d | %d |\n", r.Model.N, r.Plain.N)
	fmt.Fprintf(&b, "| median ratio to floor (worlds of %d+ passes scored) | %.2f | %.2f |\n", MinScored, r.Model.MedianRatio, r.Plain.MedianRatio)
	fmt.Fprintf(&b, "| 90th percentile ratio to floor | %.2f | %.2f |\n", r.Model.P90Ratio, r.Plain.P90Ratio)
	fmt.Fprintf(&b, "| car-days more than %.2f s worse than the plain rule | %d of %d | |\n", WorseBy, r.WorseDays, r.CarDays)
	fmt.Fprintf(&b, "| the same for the truth-knowing predictor (the floor) | %d of %d | |\n", r.FloorWorseDays, r.CarDays)
	fmt.Fprintf(&b, "| worst miss of the noiseless truth, s | %.3f | %.3f |\n", r.Model.Oracle, r.Plain.Oracle)
	fmt.Fprintf(&b, "| the same for the truth-knowing predictor (the floor) | %.3f | |\n", r.FloorOracle)
	fmt.Fprintf(&b, "| 95 %% interval coverage | %.1f %% | %.1f %% |\n", 100*r.Model.Coverage, 100*r.Plain.Coverage)
	fmt.Fprintf(&b, "| breakout share of the %.0f %%-risk dial | %.1f %% | %.1f %% |\n", 100*Risk, 100*r.Model.Breakout, 100*r.Plain.Breakout)
	fmt.Fprintf(&b, "\nworst miss of the truth (predictor): %s\n", r.Model.OracleWorld)
	return b.String()
}

func share(k, n int) string {
	if n == 0 {
		return "–"
	}
	return fmt.Sprintf("%.0f %%", 100*float64(k)/float64(n))
}

// LostDays lists the car-days where the predictor's mean miss is more than
// WorseBy worse than the plain rule's (Markdown), for finding where a
// predictor loses.
func (r Report) LostDays() string {
	var b strings.Builder
	b.WriteString("\n| world | day | passes | floor s | predictor MAE s | plain MAE s |\n|---|---:|---:|---:|---:|---:|\n")
	for _, w := range r.Worlds {
		for _, d := range w.Days {
			if d.Model > d.Plain+WorseBy {
				fmt.Fprintf(&b, "| %s | %d | %d | %.4f | %.4f | %.4f |\n", w.Name, d.Day, d.N, d.Floor, d.Model, d.Plain)
			}
		}
	}
	return b.String()
}

// AblationHeader heads the rows of AblationRow (Markdown).
func AblationHeader() string {
	return "| switched off | median ratio | 90th pct ratio | car-days lost | worst vs truth s | 95 % cover | breakout at 10 % |\n|---|---:|---:|---:|---:|---:|---:|\n"
}

// AblationRow is the report's figures across worlds in one line, for the
// ablation table; mechanism "" is pitcard as it ships.
func (r Report) AblationRow(mechanism string) string {
	if mechanism == "" {
		mechanism = "nothing (as it ships)"
	}
	return fmt.Sprintf("| %s | %.2f | %.2f | %d of %d | %.3f | %.1f %% | %.1f %% |\n", mechanism, r.Model.MedianRatio, r.Model.P90Ratio,
		r.WorseDays, r.CarDays, r.Model.Oracle, 100*r.Model.Coverage, 100*r.Model.Breakout)
}
