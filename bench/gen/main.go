// Command gen writes the synthetic input of the scaling benchmark
// (bench/scaling.sh): the demo world of package fixtures — invented data,
// labelled synthetic in every file — at a chosen resolution and record
// length, as NetCDF-4 files compressed with deflate (the cfwrite default
// level), several years per file, with the study that analyses it.
//
//	go run ./bench/gen -out DIR [-resolution 1] [-years 40] [-years-per-file 10]
package main

import (
	"flag"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"time"

	"lidscope/fixtures"
)

func main() {
	if err := run(os.Args[1:]); err != nil {
		fmt.Fprintln(os.Stderr, "gen:", err)
		os.Exit(1)
	}
}

func run(args []string) error {
	fs := flag.NewFlagSet("gen", flag.ContinueOnError)
	out := fs.String("out", "", "folder for the synthetic files and study.yaml (required)")
	res := fs.Float64("resolution", 1, "grid spacing, degrees")
	years := fs.Int("years", 40, "record length, years of monthly means")
	perFile := fs.Int("years-per-file", 10, "years per file")
	force := fs.Bool("force", false, "replace an earlier world in the folder")
	if err := fs.Parse(args); err != nil {
		return err
	}
	if *out == "" || fs.NArg() != 0 {
		return fmt.Errorf("usage: gen -out DIR [-resolution DEG] [-years N] [-years-per-file N] [-force]")
	}
	o := fixtures.DefaultOptions()
	o.Name = strings.ReplaceAll(fmt.Sprintf("bench-%gdeg-%dy", *res, *years), ".", "p") // 0.25 → 0p25: dataset names take no dots
	o.Resolution = *res
	o.Years = *years
	o.YearsPerFile = *perFile
	o.Overwrite = *force
	start := time.Now()
	tr, err := fixtures.Generate(*out, o)
	if err != nil {
		return err
	}
	var size int64
	n := 0
	for _, files := range tr.Files {
		for _, f := range files {
			n++
			if st, err := os.Stat(filepath.Join(*out, f)); err == nil {
				size += st.Size()
			}
		}
	}
	fmt.Printf("wrote %s: %g° grid, %d years, %d files, %.1f MB, in %s\n", *out, *res, *years, n, float64(size)/1e6, time.Since(start).Round(time.Millisecond))
	return nil
}
