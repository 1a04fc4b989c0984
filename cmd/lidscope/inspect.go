package main

import (
	"encoding/json"
	"fmt"
	"io"
	"path/filepath"
	"strings"

	"github.com/spf13/cobra"

	"lidscope/cf"
	"lidscope/config"
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
		Use:   "inspect (FILE... | STUDY)",
		Short: "report what lidscope recognises in NetCDF files, and every problem",
		Long: `Reports, for each NetCDF file, which variables lidscope recognises for which role,
how they will be decoded (units conversion, packing, fill values, grid, levels, time),
and every problem found; with several files, whether their grids match. Exits with
status 1 when a file cannot be used.

Given a study (.yaml, .yml, .toml or .json), lists its datasets as run would take them,
an ensemble block expanded (each dataset with the folder or values it came from), and
under each dataset the files of each role, each marked usable or with its problems.`,
		Example: `  lidscope inspect obs/sst/*.nc obs/air_temperature/*.nc obs/low_cloud/*.nc obs/land_area_fraction.nc
  lidscope inspect obs/sst/*.nc --json
  lidscope inspect obs/study.yaml`,
		Args:              minArgs(1, "give at least one file"),
		ValidArgsFunction: fileArgs(netcdfExts...),
		RunE: func(cmd *cobra.Command, args []string) error {
			o.Files = args
			if len(args) == 1 && isStudyFile(args[0]) {
				return runInspectStudy(o, e.stdout)
			}
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
			// a fraction's "1" is left out, as in the demo's console
			// lines (the JSON keeps units "1")
			u := " " + f.SIUnits
			if f.SIUnits == "1" || f.SIUnits == "" {
				u = ""
			}
			line("sample", fmt.Sprintf("%.5g … %.5g%s (after conversion)", *f.Min, *f.Max, u))
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

// isStudyFile reports whether path names a study (by its extension).
func isStudyFile(path string) bool {
	switch strings.ToLower(filepath.Ext(path)) {
	case ".yaml", ".yml", ".toml", ".json":
		return true
	}
	return false
}

// inspectDataset is one dataset of `inspect STUDY`.
type inspectDataset struct {
	Name string `json:"name"`
	// Folder and Values say where an ensemble's dataset came from.
	Folder string                      `json:"folder,omitempty"`
	Values map[string]string           `json:"values,omitempty"`
	Files  map[string][]*cf.FileReport `json:"files"`
}

// runInspectStudy lists the study's datasets (the ensemble expanded) and
// checks every file of each; exit status 1 when one cannot be used.
func runInspectStudy(o inspectOptions, w io.Writer) error {
	r, err := config.Load(o.Files[0], config.LoadOptions{})
	if err != nil {
		return err
	}
	member := map[string]config.EnsembleMember{}
	for _, m := range r.Ensemble {
		member[m.Name] = m
	}
	ok := true
	seen := map[string]*cf.FileReport{}
	var sets []inspectDataset
	for _, d := range r.Datasets {
		ds := inspectDataset{Name: d.Name, Files: map[string][]*cf.FileReport{}}
		if m, in := member[d.Name]; in {
			ds.Folder, ds.Values = m.Folder, m.Values
		}
		for _, role := range d.Roles() {
			for _, p := range d.Inputs[role] {
				rep, done := seen[p]
				if !done {
					rep = cf.InspectWith(p, cf.InspectOptions{MemoryBudget: int64(o.MemoryBudget)})
					seen[p] = rep
				}
				ok = ok && rep.Usable
				ds.Files[string(role)] = append(ds.Files[string(role)], rep)
			}
		}
		sets = append(sets, ds)
	}
	if o.JSON {
		enc := json.NewEncoder(w)
		enc.SetIndent("", "  ")
		if err := enc.Encode(struct {
			Study    string           `json:"study"`
			Datasets []inspectDataset `json:"datasets"`
		}{r.Path, sets}); err != nil {
			return err
		}
	} else {
		fmt.Fprintf(w, "study %s: %d dataset(s)\n", cf.QuotePath(r.Path), len(r.Datasets))
		writeEnsemble(w, r, "")
		for i, ds := range sets {
			from := ""
			if ds.Folder != "" {
				from = " (ensemble, folder " + ds.Folder + ")"
			} else if ds.Values != nil {
				from = " (ensemble)"
			}
			fmt.Fprintf(w, "\ndataset %s%s\n", ds.Name, from)
			for _, role := range r.Datasets[i].Roles() {
				reps := ds.Files[string(role)]
				fmt.Fprintf(w, "  %s: %d file(s)\n", role, len(reps))
				for _, rep := range reps {
					status := "usable"
					if !rep.Usable {
						status = "NOT USABLE"
					}
					fmt.Fprintf(w, "    %s  [%s]\n", cf.QuotePath(rep.Path), status)
					for _, p := range rep.Problems {
						fmt.Fprintf(w, "      PROBLEM: %s\n", p)
					}
					for _, f := range rep.Fields {
						for _, p := range f.Problems {
							fmt.Fprintf(w, "      PROBLEM (%s): %s\n", f.Var, p)
						}
					}
				}
			}
		}
	}
	if !ok {
		return errFailed
	}
	return nil
}
