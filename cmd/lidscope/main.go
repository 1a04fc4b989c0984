// Command lidscope computes lower-tropospheric stability (LTS), estimated
// inversion strength (EIS) and SST-regime diagnostics from CF-compliant NetCDF
// files.
//
// The command line is a tree of cobra commands (root.go). Each command lives
// in its own file: a constructor newXCmd(*env) that declares the flags into
// an options struct, and a runX(options, writers) function that calls the
// library and that tests call directly. main is the only place that exits.
package main

import (
	"context"
	"os"
)

// version is the lidscope version, written into every output's provenance.
// Release builds may set it with -ldflags "-X main.version=...".
var version = "0.1.0-dev"

func main() {
	sc := &signalCatcher{}
	os.Exit(execute(context.Background(), os.Args[1:], &env{
		stdout:  os.Stdout,
		stderr:  os.Stderr,
		signals: sc.context,
		stopped: sc.caught,
	}))
}
