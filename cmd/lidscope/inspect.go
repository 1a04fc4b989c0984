package main

import (
	"encoding/json"
	"fmt"
	"io"
	"strings"

	"github.com/spf13/cobra"

	"lidscope/cf"
	"lidscope/pipeline"
)

func init() { addCommand(newInspectCmd) }

// inspectOptions are the options of `lidscope inspect`.
type inspectOptions struct {
	Files []string
	JSON  bool
	// MemoryBudget bounds what reading one time step of a field may take.
	MemoryBudget byteSize
}

func newInspectCmd(e *env) *cobra.Command {
	var o inspectOptions
	cmd := &cobra.Command{
		Use:   "inspect FILE...",
		Short: "report what lidscope recognises in NetCDF files, and every problem",
		Long: `Reports, for each NetCDF file, which variables lidscope recognises for which role,
how they will be decoded (units conversion, packing, fill values, grid, levels, time),
and every problem found; with several files, whether their grids match. Exits with
status 1 when a file cannot be used.`,
		Example: `  lidscope inspect obs/sst/*.nc obs/air_temperature/*.nc obs/low_cloud/*.nc obs/land_area_fraction.nc
  lidscope inspect obs/sst/*.nc --json`,
		Args:              minArgs(1, "give at least one file"),
		ValidArgsFunction: fileArgs(netcdfExts...),
		RunE: func(cmd *cobra.Command, args []string) error {
			o.Files = args
			return runInspect(o, e.stdout)
		},
	}
	cmd.Flags().BoolVar(&o.JSON, "json", false, "write the report as JSON")
	addInspectMemoryBudget(cmd.Flags(), &o.MemoryBudget)
	return cmd
}

// runInspect writes the inspect report; it returns errFailed when any file
// is unusable (the report already says why).
func runInspect(o inspectOptions, w io.Writer) error {
	reports := make([]*cf.FileReport, 0, len(o.Files))
	ok := true
	for _, p := range o.Files {
		r := cf.InspectWith(p, cf.InspectOptions{MemoryBudget: int64(o.MemoryBudget)})
		ok = ok && r.Usable
		reports = append(reports, r)
	}
	if o.JSON {
		enc := json.NewEncoder(w)
		enc.SetIndent("", "  ")
		if err := enc.Encode(reports); err != nil {
			return err
		}
	} else {
		for i, r := range reports {
			if i > 0 {
				fmt.Fprintln(w)
			}
			writeReport(w, r)
		}
		if len(reports) > 1 {
			if gr, err := pipeline.CompareGrids(reports); err == nil {
				fmt.Fprintf(w, "\ngrids: %s\n", gr)
			} else {
				fmt.Fprintf(w, "\ngrids: cannot compare: %v\n", err)
			}
		}
		if gr, err := pipeline.CompareGrids(reports); err == nil {
			writeGridMemory(w, gr)
		}
	}
	if !ok {
		return errFailed
	}
	return nil
}

func writeReport(w io.Writer, r *cf.FileReport) {
	status := "usable"
	if !r.Usable {
		status = "NOT USABLE"
	}
	fmt.Fprintf(w, "%s  [%s]\n", cf.QuotePath(r.Path), status)
	if r.Format != "" {
		var dims []string
		for _, d := range r.Dims {
			s := fmt.Sprintf("%s=%d", d.Name, d.Len)
			if d.Unlimited {
				s += " (unlimited)"
			}
			dims = append(dims, s)
		}
		fmt.Fprintf(w, "  format: %s; dimensions: %s\n", r.Format, strings.Join(dims, ", "))
	}
	for _, f := range r.Fields {
		fmt.Fprintf(w, "  %s ← variable %s (%s)\n", f.Role, f.Var, f.How)
		line := func(k, v string) {
			if v != "" {
				fmt.Fprintf(w, "      %-9s %s\n", k+":", v)
			}
		}
		line("units", f.Conversion)
		if f.Conversion == "" {
			line("units", fmt.Sprintf("%q", f.Units))
		}
		line("grid", f.Grid)
		line("level", f.Level)
		line("time", f.Time)
		line("decoding", f.Decoding)
		if f.Min != nil {
			line("sample", fmt.Sprintf("%.5g … %.5g %s (after conversion)", *f.Min, *f.Max, f.SIUnits))
		}
		for _, n := range f.Notes {
			line("note", n)
		}
		for _, p := range f.Problems {
			line("PROBLEM", p)
		}
	}
	if len(r.Other) > 0 {
		fmt.Fprintf(w, "  not used: %s\n", strings.Join(r.Other, ", "))
	}
	for _, p := range r.Problems {
		fmt.Fprintf(w, "  PROBLEM: %s\n", p)
	}
}
