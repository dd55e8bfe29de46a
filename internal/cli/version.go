package cli

import (
	"fmt"
	"runtime/debug"
)

func cmdVersion(e *Env, args []string) int {
	fs := newFlags(e, "version")
	pos, err := parse(fs, args)
	if err != nil {
		return flagErr(e, fs, err)
	}
	if len(pos) > 0 {
		return usageErr(e, "version", "takes no arguments")
	}
	bi, _ := debug.ReadBuildInfo()
	fmt.Fprintln(e.Stdout, versionLine(bi))
	return ExitOK
}

// versionLine describes a build from the information the Go toolchain records in the binary:
// the module version (set by go install path@version), the VCS revision and time, and
// whether the working tree had uncommitted changes.
func versionLine(bi *debug.BuildInfo) string {
	if bi == nil {
		return "rfledger (no build information)"
	}
	v := bi.Main.Version
	if v == "" || v == "(devel)" {
		v = "devel"
	}
	s := "rfledger " + v
	var rev, when, dirty string
	for _, kv := range bi.Settings {
		switch kv.Key {
		case "vcs.revision":
			rev = kv.Value
		case "vcs.time":
			when = kv.Value
		case "vcs.modified":
			dirty = kv.Value
		}
	}
	switch {
	case rev == "":
		s += ", revision unknown (built without version control information)"
	default:
		if len(rev) > 12 {
			rev = rev[:12]
		}
		s += ", revision " + rev
		if when != "" {
			s += " of " + when
		}
		if dirty == "true" {
			s += ", with uncommitted changes"
		}
	}
	if bi.GoVersion != "" {
		s += ", " + bi.GoVersion
	}
	return s
}
