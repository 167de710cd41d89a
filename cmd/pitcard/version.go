package main

import (
	"fmt"
	"runtime"
	"runtime/debug"

	"github.com/spf13/cobra"
)

// version and commit are set at release build time (go run ./internal/release)
// with -ldflags "-X main.version=v1.2.3 -X main.commit=abc123...". A build
// without them takes the commit from the build's VCS stamp, where go build
// made one.
var (
	version = "dev"
	commit  = ""
)

func newVersionCmd(s *IOStreams) *cobra.Command {
	return &cobra.Command{
		Use:     "version",
		Short:   "Print pitcard's version and the commit it was built from",
		Example: "  pitcard version",
		Args:    cobra.NoArgs,
		RunE: func(*cobra.Command, []string) error {
			fmt.Fprintf(s.Out, "pitcard %s\n", versionString())
			return nil
		},
	}
}

// versionString is "v1.2.3 (commit abc123def456), go1.26 linux/amd64": the
// release, the commit it was built from and the toolchain.
func versionString() string {
	var settings []debug.BuildSetting
	if info, ok := debug.ReadBuildInfo(); ok {
		settings = info.Settings
	}
	return describeVersion(version, commit, settings) + fmt.Sprintf(", %s %s/%s", runtime.Version(), runtime.GOOS, runtime.GOARCH)
}

// describeVersion is "VERSION (commit C)": the commit stamped by -ldflags,
// else the build's vcs.revision (with "+changes" when vcs.modified says the
// tree had uncommitted changes), else "unknown commit". Commits are cut to
// 12 characters.
func describeVersion(version, commit string, settings []debug.BuildSetting) string {
	if version == "" {
		version = "dev"
	}
	modified := false
	if commit == "" {
		for _, st := range settings {
			switch st.Key {
			case "vcs.revision":
				commit = st.Value
			case "vcs.modified":
				modified = st.Value == "true"
			}
		}
	}
	if commit == "" {
		return version + " (unknown commit)"
	}
	if len(commit) > 12 {
		commit = commit[:12]
	}
	if modified {
		commit += "+changes"
	}
	return version + " (commit " + commit + ")"
}
