package main

import (
	"fmt"
	"io"
	"runtime"
	"runtime/debug"

	"lipoplan/optimise"
)

// writeVersion prints lipoplan's version (the module version and VCS
// revision the binary was built from, when Go recorded them), the Go
// toolchain and platform, and the engines that solve.
func writeVersion(w io.Writer) {
	version, rev := "(devel)", ""
	if bi, ok := debug.ReadBuildInfo(); ok {
		if bi.Main.Version != "" {
			version = bi.Main.Version
		}
		for _, s := range bi.Settings {
			switch s.Key {
			case "vcs.revision":
				rev = s.Value
				if len(rev) > 12 {
					rev = rev[:12]
				}
			case "vcs.modified":
				if s.Value == "true" && rev != "" {
					rev += "+modified"
				}
			}
		}
	}
	if rev != "" {
		version += " " + rev
	}
	fmt.Fprintf(w, "lipoplan %s (%s, %s/%s)\n", version, runtime.Version(), runtime.GOOS, runtime.GOARCH)
	fmt.Fprintf(w, "engine: %s\n", optimise.EngineInfo())
}
