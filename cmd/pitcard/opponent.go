package main

import (
	"fmt"
	"strconv"
	"strings"

	"github.com/shopspring/decimal"
	"github.com/spf13/cobra"

	"pitcard/engine"
	"pitcard/weather"
)

// opponentFlags describe the other lane, and our driver's reaction times,
// for the chance to win. Each default is a setting (pitcard.yaml).
type opponentFlags struct {
	Margin, SD, RTMean, RTSD string
	ETs, RTs                 []string
	OurRTMean, OurRTSD       string
}

func (o *opponentFlags) bind(cmd *cobra.Command) {
	fl := cmd.Flags()
	fl.StringVar(&o.Margin, "opponent-margin", "", "the other car's ET over its dial, mean, s (setting opponent_margin; default 0.02)")
	fl.StringVar(&o.SD, "opponent-sd", "", "the other car's ET over its dial, spread, s (setting opponent_margin_sd; default 0.03)")
	fl.StringVar(&o.RTMean, "opponent-rt-mean", "", "the other driver's reaction time, mean, s (setting opponent_rt_mean; default 0.04)")
	fl.StringVar(&o.RTSD, "opponent-rt-sd", "", "the other driver's reaction time, spread, s (setting opponent_rt_sd; default 0.025)")
	fl.StringSliceVar(&o.ETs, "opponent-et", nil, "the other car's ETs seen today (its slips), s; with --opponent-dial they give its margin")
	fl.StringSliceVar(&o.RTs, "opponent-rt", nil, "the other driver's reaction times seen today (its slips), s")
	fl.StringVar(&o.OurRTMean, "rt-mean", "", "our driver's reaction time, mean, s (default: from the logbook's, or setting rt_mean)")
	fl.StringVar(&o.OurRTSD, "rt-sd", "", "our driver's reaction time, spread, s (default: from the logbook's, or setting rt_sd)")
}

// seconds reads a flag's time in seconds within lo..hi.
func seconds(flag, v string, lo, hi float64) (float64, error) {
	x, err := strconv.ParseFloat(strings.TrimSpace(v), 64)
	if err != nil || !(x >= lo && x <= hi) {
		return 0, &weather.InputError{Field: flag, Value: v, Reason: fmt.Sprintf("is not a time in seconds within %g..%g", lo, hi)}
	}
	return x, nil
}

// build turns the flags, the settings and the logbook into the other lane
// and our driver's reaction times; nil when the opponent's dial is unknown.
func (o *opponentFlags) build(s settings, dial decimal.NullDecimal, passes []engine.Pass) (*engine.Opponent, engine.RTModel, error) {
	var logged []float64 // our reaction times, most recent first
	for i := len(passes) - 1; i >= 0; i-- {
		if p := passes[i]; p.RT.Valid && !engine.Aborted(p.Notes) {
			logged = append(logged, p.RT.Decimal.InexactFloat64())
		}
	}
	us := engine.NewRTModel(logged, s.RTMean, s.RTSD)
	if o.OurRTMean != "" || o.OurRTSD != "" {
		us = engine.RTModel{Mean: s.RTMean, SD: s.RTSD}
		var err error
		if o.OurRTMean != "" {
			if us.Mean, err = seconds("--rt-mean", o.OurRTMean, -1, 2); err != nil {
				return nil, us, err
			}
		}
		if o.OurRTSD != "" {
			if us.SD, err = seconds("--rt-sd", o.OurRTSD, 0.001, 1); err != nil {
				return nil, us, err
			}
		}
	}
	if !dial.Valid {
		return nil, us, nil
	}
	opp := &engine.Opponent{Dial: dial.Decimal, Margin: s.OppMargin, MarginSD: s.OppMarginSD, RT: engine.RTModel{Mean: s.OppRTMean, SD: s.OppRTSD}}
	list := func(flag string, vs []string, lo, hi float64) ([]float64, error) {
		var out []float64
		for _, v := range vs {
			x, err := seconds(flag, v, lo, hi)
			if err != nil {
				return nil, err
			}
			out = append(out, x)
		}
		return out, nil
	}
	ets, err := list("--opponent-et", o.ETs, engine.DialRange[0], engine.DialRange[1])
	if err != nil {
		return nil, us, err
	}
	if len(ets) > 0 { // what its slips showed: their margin over its dial
		d := dial.Decimal.InexactFloat64()
		for i := range ets {
			ets[i] -= d
		}
		m, sd := engine.MeanSD(ets)
		opp.Margin = m
		if len(ets) >= 3 {
			opp.MarginSD = sd
		}
	}
	rts, err := list("--opponent-rt", o.RTs, engine.RTRange[0], engine.RTRange[1])
	if err != nil {
		return nil, us, err
	}
	if len(rts) > 0 {
		opp.RT = engine.NewRTModel(rts, opp.RT.Mean, opp.RT.SD)
		if len(rts) < engine.MinRTSamples {
			m, sd := engine.MeanSD(rts)
			opp.RT.Mean = m
			if len(rts) >= 3 {
				opp.RT.SD = sd
			}
		}
	}
	for _, f := range []struct {
		flag string
		v    string
		dst  *float64
		lo   float64
		hi   float64
	}{{"--opponent-margin", o.Margin, &opp.Margin, -1, 2}, {"--opponent-sd", o.SD, &opp.MarginSD, 0.001, 1},
		{"--opponent-rt-mean", o.RTMean, &opp.RT.Mean, -1, 2}, {"--opponent-rt-sd", o.RTSD, &opp.RT.SD, 0.001, 1}} {
		if f.v == "" {
			continue
		}
		x, err := seconds(f.flag, f.v, f.lo, f.hi)
		if err != nil {
			return nil, us, err
		}
		*f.dst = x
		if f.flag == "--opponent-rt-mean" || f.flag == "--opponent-rt-sd" {
			opp.RT.Samples = nil
		}
	}
	return opp, us, nil
}
