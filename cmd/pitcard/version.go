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
			fmt.Fprintf(s.Out, "pitcard %s\n", versionString())
			return nil
		},
	}
}

// versionString is "dev (abc123def456), go1.26 linux/amd64": the release, or
// the commit a development build was made from, and the toolchain.
func versionString() string {
	v := version
	if info, ok := debug.ReadBuildInfo(); ok && v == "dev" {
		for _, st := range info.Settings {
			if st.Key == "vcs.revision" && len(st.Value) >= 12 {
				v = "dev (" + st.Value[:12] + ")"
			}
		}
	}
	return fmt.Sprintf("%s, %s %s/%s", v, runtime.Version(), runtime.GOOS, runtime.GOARCH)
}
