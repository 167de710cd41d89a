package main

import (
	"runtime/debug"
	"testing"
)

// What 'pitcard version' says for each way a binary can be built (common
// practice (no source): a release names its version and commit).
func TestDescribeVersion(t *testing.T) {
	rev := []debug.BuildSetting{{Key: "vcs.revision", Value: "0123456789abcdef0123"}, {Key: "vcs.modified", Value: "false"}}
	dirty := []debug.BuildSetting{{Key: "vcs.revision", Value: "0123456789abcdef0123"}, {Key: "vcs.modified", Value: "true"}}
	for _, c := range []struct {
		version, commit string
		settings        []debug.BuildSetting
		want            string
	}{
		{"v1.4.0", "fedcba9876543210", nil, "v1.4.0 (commit fedcba987654)"},
		{"v1.4.0", "abc", rev, "v1.4.0 (commit abc)"},
		{"dev", "", rev, "dev (commit 0123456789ab)"},
		{"dev", "", dirty, "dev (commit 0123456789ab+changes)"},
		{"dev", "", nil, "dev (unknown commit)"},
		{"", "", nil, "dev (unknown commit)"},
	} {
		if got := describeVersion(c.version, c.commit, c.settings); got != c.want {
			t.Errorf("describeVersion(%q, %q, %v) = %q, want %q", c.version, c.commit, c.settings, got, c.want)
		}
	}
}
