package output

import (
	"math"
	"runtime"
	"time"

	"lidscope/internal/jsonnum"
	"lidscope/netcdf"
)

type provenance struct {
	Format          string `json:"format"`
	FormatVersion   int    `json:"format_version"`
	LidscopeVersion string `json:"lidscope_version"`
	Command         string `json:"command"`
	Dataset         string `json:"dataset"`
	Title           string `json:"title"`
	// Study, StudyHash, Conventions and Files carry the names the study
	// and the NetCDF files use for the same things (vocab).
	Study       string      `json:"study"`
	StudyHash   string      `json:"study_hash"`
	Conventions string      `json:"conventions"`
	Regime      sumRegime   `json:"regime_definition"`
	Files       []provInput `json:"files"`
	Run         provRun     `json:"run"`
	Host        provHost    `json:"host"`
	// Time describes the time coordinate (as the NetCDF variable time).
	Time    provTime     `json:"time"`
	Outputs []provOutput `json:"outputs"`
	Notes   []string     `json:"notes"`
}

type provInput struct {
	Role     string `json:"role"`
	Path     string `json:"path"`
	Size     num    `json:"size"`
	Modified string `json:"modified"`
	SHA256   string `json:"sha256"`
}

type provRun struct {
	Start    string `json:"start"`
	End      string `json:"end"`
	Duration num    `json:"duration"`
	// Piece is K/N for a run over one piece of the record.
	Piece string `json:"piece,omitempty"`
	// Batch names the batch jobs that ran it.
	Batch []string `json:"batch,omitempty"`
}

type provHost struct {
	OS        string `json:"os"`
	Arch      string `json:"arch"`
	GoVersion string `json:"go_version"`
	CPUs      num    `json:"cpus"`
	NetCDF    string `json:"netcdf_c_library"`
}

type provTime struct {
	Units    string `json:"units"`
	Calendar string `json:"calendar"`
	Steps    num    `json:"time_steps"`
	Bounds   string `json:"bounds"`
}

// provOutput is one file written before provenance.json, with its digest.
type provOutput struct {
	Name   string `json:"name"`
	Size   num    `json:"size"`
	SHA256 string `json:"sha256"`
}

func rfc3339(t time.Time) string {
	if t.IsZero() {
		return ""
	}
	return t.UTC().Format(time.RFC3339Nano)
}

// provenance builds provenance.json; outs are the files already staged.
func (c *checked) provenance(notes []string, outs []provOutput) provenance {
	m := c.meta
	p := provenance{
		Format: ProvenanceFormat, FormatVersion: FormatVersion,
		LidscopeVersion: m.Version, Command: m.Command, Dataset: m.Dataset, Title: m.Title,
		Study: m.Study, StudyHash: m.StudyHash,
		Conventions: m.MetricsConventions,
		Files:       []provInput{},
		Run:         provRun{Start: rfc3339(m.Start), End: rfc3339(m.End), Duration: num{Value: math.NaN(), Units: "s"}, Piece: m.Piece, Batch: m.Batch},
		Host: provHost{OS: runtime.GOOS, Arch: runtime.GOARCH, GoVersion: runtime.Version(),
			CPUs: jsonnum.Count(runtime.NumCPU()), NetCDF: netcdf.LibVersion()},
		Time:    provTime{Units: m.TimeUnits, Calendar: m.Calendar, Steps: jsonnum.Count(len(c.acc.Series)), Bounds: "none"},
		Outputs: outs,
		Notes:   append([]string{}, notes...),
	}
	p.Regime = c.summaryRegime()
	if !m.Start.IsZero() && !m.End.IsZero() {
		p.Run.Duration = num{Value: m.End.Sub(m.Start).Seconds(), Units: "s"}
	}
	if m.TimeBounds != nil {
		p.Time.Bounds = "given by the run"
	}
	for _, f := range m.Inputs {
		p.Files = append(p.Files, provInput{Role: f.Role, Path: f.Path, Size: num{Value: float64(f.Size), Units: "byte"}, Modified: rfc3339(f.ModTime), SHA256: f.SHA256})
	}
	return p
}

func (c *checked) summaryRegime() sumRegime {
	d := c.meta.Regimes.Summarize()
	return sumRegime{
		Text: d.Text, Rule: d.Rule, Delta: num{Value: d.Delta, Units: "K"}, HalfWidth: num{Value: d.HalfWidth, Units: "K"},
		Percentile: num{Value: d.Percentile, Units: "%"},
		Band:       sumBand{South: num{Value: d.Band.South, Units: "degrees_north"}, North: num{Value: d.Band.North, Units: "degrees_north"}},
		Index:      regimeIndexText(),
	}
}
