package main

import (
	"fmt"
	"runtime"
	"runtime/debug"

	"github.com/spf13/cobra"
)

// version is set at release build time with -ldflags "-X main.version=v1.2.3".
var version = "dev"

func newVersionCmd(s *IOStreams) *cobra.Command {
	return &cobra.Command{
		Use:     "version",
		Short:   "Print pitcard's version",
		Example: "  pitcard version",
		Args:    cobra.NoArgs,
		RunE: func(*cobra.Command, []string) error {
			v := version
			if info, ok := debug.ReadBuildInfo(); ok && v == "dev" {
				for _, st := range info.Settings {
					if st.Key == "vcs.revision" && len(st.Value) >= 12 {
						v = "dev (" + st.Value[:12] + ")"
					}
				}
			}
			fmt.Fprintf(s.Out, "pitcard %s, %s %s/%s\n", v, runtime.Version(), runtime.GOOS, runtime.GOARCH)
			return nil
		},
	}
}
