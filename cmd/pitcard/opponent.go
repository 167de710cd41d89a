package main

import (
	"pitcard/entry"

	"github.com/spf13/cobra"
)

// roundFlagHelp is the help of --round, one flag for the round on every
// command (log add's --session is its old name).
const roundFlagHelp = "the round: T1, T2 ... time trials, E1, E2 ... eliminations (a bare 3 is E3), or test"

// opponentFlags describe the other lane, and our driver's reaction times,
// for the chance to win. Each default is a setting (pitcard.yaml).
type opponentFlags struct{ entry.OpponentFields }

func (o *opponentFlags) bind(cmd *cobra.Command) {
	fl := cmd.Flags()
	fl.StringVar(&o.Car, "opponent", "", "the other car's number or name (4471): its slips in opponents.csv set its margin, spread and reaction times")
	fl.StringVar(&o.Margin, "opponent-margin", "", "the other lane's ET over its dial, mean, s (setting opponent_margin; default 0.02)")
	fl.StringVar(&o.SD, "opponent-margin-sd", "", "the other lane's ET over its dial, spread, s (setting opponent_margin_sd; default 0.03)")
	fl.StringVar(&o.SD, "opponent-sd", "", "")
	deprecate(fl, "opponent-sd", "use --opponent-margin-sd (the setting opponent_margin_sd)")
	fl.StringVar(&o.RTMean, "opponent-rt-mean", "", "the other lane's reaction time, mean, s (setting opponent_rt_mean; default 0.04)")
	fl.StringVar(&o.RTSD, "opponent-rt-sd", "", "the other lane's reaction time, spread, s (setting opponent_rt_sd; default 0.025)")
	fl.StringSliceVar(&o.ETs, "opponent-et", nil, "the other lane's ETs seen today (its slips), s, a list: 11.52,11.49 or the flag repeated; with --opponent-dial they give its margin")
	fl.StringSliceVar(&o.RTs, "opponent-rt", nil, "the other lane's reaction times seen today (its slips), s, a list")
	fl.StringVar(&o.OurRTMean, "rt-mean", "", "our driver's reaction time, mean, s (default: from the logbook's, or setting rt_mean)")
	fl.StringVar(&o.OurRTSD, "rt-sd", "", "our driver's reaction time, spread, s (default: from the logbook's, or setting rt_sd)")
}
