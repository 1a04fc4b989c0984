package main

import (
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"sort"
	"strings"

	"github.com/spf13/cobra"

	"lidscope/cf"
	"lidscope/config"
)

// studyInitOptions are the options of `lidscope study init`.
type studyInitOptions struct {
	Files []string
	Out   string // --output FILE; "" prints to stdout
	Force bool
}

// studyCheckOptions are the options of `lidscope study check`.
type studyCheckOptions struct {
	Study string
	Set   map[string]string
}

func init() { addCommand(newStudyCmd) }

func newStudyCmd(e *env) *cobra.Command {
	cmd := &cobra.Command{
		Use:   "study (init | check)",
		Short: "write a starter study from NetCDF files, or check a study",
		Long: `A study is the file that says which files hold which roles and how to analyse them
(see the package documentation of config for every key).

  init   inspects NetCDF files and writes a commented starter study
  check  loads a study, reports every problem and prints its resolved form`,
		Args: cobra.ArbitraryArgs,
		RunE: groupRunE,
	}
	cmd.AddCommand(newStudyInitCmd(e), newStudyCheckCmd(e))
	return cmd
}

func newStudyInitCmd(e *env) *cobra.Command {
	var o studyInitOptions
	var outDir string
	cmd := &cobra.Command{
		Use:   "init FILE... [--output study.yaml]",
		Short: "write a commented starter study from NetCDF files",
		Long: `Inspects the NetCDF files and writes a commented starter study: each role with its
files and variable, suggested overrides for what inspect flagged, and every default
written out. The study is one file: it is printed, or written to --output FILE (-o FILE),
with its file names relative to that file's folder.`,
		Example: `  lidscope study init obs/sst/*.nc obs/air_temperature/*.nc obs/low_cloud/*.nc obs/land_area_fraction.nc
  lidscope study init obs/sst/*.nc obs/air_temperature/*.nc obs/low_cloud/*.nc obs/land_area_fraction.nc --output obs.yaml`,
		Args:              minArgs(1, "give at least one NetCDF file"),
		ValidArgsFunction: fileArgs(netcdfExts...),
		RunE: func(cmd *cobra.Command, args []string) error {
			if outDir != "" {
				return usageErr("study init writes one file: name it with --output FILE (-o FILE); --out always names a folder")
			}
			o.Files = args
			if o.Out != "" {
				switch strings.ToLower(filepath.Ext(o.Out)) {
				case ".yaml", ".yml":
				default:
					return usageErr("--output %s: the starter study is YAML; name the file .yaml", o.Out)
				}
			}
			return runStudyInit(o, e.stdout, e.stderr)
		},
	}
	addOutputFile(cmd.Flags(), &o.Out, "write the study to this file (.yaml) instead of printing it")
	addForce(cmd.Flags(), &o.Force, "overwrite the --output file if it exists")
	cmd.Flags().StringVar(&outDir, "out", "", "")
	_ = cmd.Flags().MarkHidden("out")
	return cmd
}

// runStudyInit inspects the files and prints or writes the starter.
func runStudyInit(o studyInitOptions, stdout, stderr io.Writer) error {
	reports := make([]*cf.FileReport, len(o.Files))
	paths := make([]string, len(o.Files))
	for i, f := range o.Files {
		reports[i] = cf.Inspect(f)
		paths[i] = f
		if o.Out != "" {
			paths[i] = relativeTo(filepath.Dir(o.Out), f)
		}
	}
	text := config.Starter(reports, paths)
	if o.Out == "" {
		_, err := io.WriteString(stdout, text)
		return err
	}
	flags := os.O_WRONLY | os.O_CREATE | os.O_EXCL
	if o.Force {
		flags = os.O_WRONLY | os.O_CREATE | os.O_TRUNC
	}
	f, err := os.OpenFile(o.Out, flags, 0o644)
	if errors.Is(err, os.ErrExist) {
		return fmt.Errorf("%s exists; lidscope does not overwrite it without --force", o.Out)
	}
	if err != nil {
		return fmt.Errorf("writing the study: %w", err)
	}
	if _, err := io.WriteString(f, text); err != nil {
		f.Close()
		return fmt.Errorf("writing the study %s: %w", o.Out, err)
	}
	if err := f.Close(); err != nil {
		return fmt.Errorf("writing the study %s: %w", o.Out, err)
	}
	fmt.Fprintf(stdout, "wrote %s\n", o.Out)
	name, from := config.StarterName(reports)
	fmt.Fprintf(stdout, "dataset %s: named after %s; rename it under datasets: in %s as you like\n", name, from, o.Out)
	if _, err := config.Load(o.Out, config.LoadOptions{LookupEnv: config.NoEnvironment}); err != nil {
		fmt.Fprintf(stderr, "note: the starter does not load yet; edit it where marked MISSING or CHECK:\n%v\n", err)
	} else {
		fmt.Fprintf(stdout, "it loads; review the lines marked CHECK (lidscope study check %s)\n", o.Out)
	}
	return nil
}

// relativeTo writes path relative to dir when it can, else absolute.
func relativeTo(dir, path string) string {
	ad, err1 := filepath.Abs(dir)
	ap, err2 := filepath.Abs(path)
	if err1 != nil || err2 != nil {
		return path
	}
	if r, err := filepath.Rel(ad, ap); err == nil {
		return r
	}
	return ap
}

func newStudyCheckCmd(e *env) *cobra.Command {
	o := studyCheckOptions{}
	set := setFlags{}
	cmd := &cobra.Command{
		Use:   "check STUDY",
		Short: "check a study and print its resolved form",
		Long: `Loads a study with the LIDSCOPE_* environment and the --set overrides, reports every
problem (file:line: key: message), and prints the fully resolved study and its SHA-256.`,
		Example: `  lidscope study check obs/study.yaml
  lidscope study check obs/study.yaml --set analysis.threshold=1.0`,
		Args:              exactArgs(1, "give exactly one study file"),
		ValidArgsFunction: fileArgs(studyExts...),
		RunE: func(cmd *cobra.Command, args []string) error {
			o.Study = args[0]
			o.Set = set
			return runStudyCheck(o, e.stdout)
		},
	}
	addSet(cmd.Flags(), set, "override a study key, KEY=VALUE (e.g. analysis.threshold=1.0); repeatable")
	return cmd
}

// runStudyCheck loads the study (with the process environment) and
// prints its resolved text and hash.
func runStudyCheck(o studyCheckOptions, w io.Writer) error {
	r, err := config.Load(o.Study, config.LoadOptions{Flags: o.Set})
	if err != nil {
		return err
	}
	for _, ov := range r.Overrides {
		fmt.Fprintf(w, "# %s = %s (%s)\n", ov.Key, ov.Value, ov.Origin)
	}
	fmt.Fprintf(w, "# sha256 %s\n", r.Hash())
	writeEnsemble(w, r, "# ")
	writeMemoryEstimates(w, r)
	_, err = io.WriteString(w, r.Resolved())
	return err
}

// writeEnsemble lists the datasets of the study's ensemble block, one a
// line after prefix: the name and the folder it was matched from
// (ensemble.folders) or the values that made it (ensemble.over).
func writeEnsemble(w io.Writer, r *config.Study, prefix string) {
	if len(r.Ensemble) == 0 {
		return
	}
	wd := 0
	for _, m := range r.Ensemble {
		wd = max(wd, len(m.Name))
	}
	fmt.Fprintf(w, "%sensemble: %d datasets\n", prefix, len(r.Ensemble))
	for _, m := range r.Ensemble {
		from := m.Folder
		if from != "" {
			from = "folder " + from
		} else {
			var kv []string
			for _, k := range sortedValueKeys(m.Values) {
				kv = append(kv, k+"="+m.Values[k])
			}
			from = strings.Join(kv, ", ")
		}
		fmt.Fprintf(w, "%s  %-*s  %s\n", prefix, wd, m.Name, from)
	}
}

func sortedValueKeys(m map[string]string) []string {
	out := make([]string, 0, len(m))
	for k := range m {
		out = append(out, k)
	}
	sort.Strings(out)
	return out
}
