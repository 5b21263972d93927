package main

import (
	"context"
	"fmt"
	"runtime"
	"runtime/debug"

	"github.com/seine-ml/seine/nn"
)

const versionHelp = `Prints the module version (from the build information: a tagged version
when installed with go install MODULE@VERSION, "(devel)" in a checkout), the
library version written into model files, the Go version, the platform and
the matrix-multiply backend of this build.
`

func runVersion(ctx context.Context, e *env, args []string) error {
	fs := newFlags("version", e)
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	mod, path := "(unknown)", "github.com/seine-ml/seine"
	if bi, ok := debug.ReadBuildInfo(); ok {
		mod, path = bi.Main.Version, bi.Main.Path
		if path == "" {
			path = "github.com/seine-ml/seine"
		}
		if mod == "" {
			mod = "(devel)"
		}
	}
	fmt.Fprintf(e.stdout, "seine %s (%s)\n", mod, path)
	fmt.Fprintf(e.stdout, "  library   %s (written into model summaries)\n", nn.Version)
	fmt.Fprintf(e.stdout, "  go        %s\n", runtime.Version())
	fmt.Fprintf(e.stdout, "  platform  %s/%s\n", runtime.GOOS, runtime.GOARCH)
	fmt.Fprintf(e.stdout, "  matrices  %s\n", nn.Backend())
	return nil
}
