package output

import (
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"strings"

	"lidscope/accumulate"
	"lidscope/internal/jsonnum"
	"lidscope/internal/stage"
)

// Test hooks: called after each file is staged and before each file is
// moved to its final name; a non-nil error makes Write fail there.
var (
	hookStaged func(name string) error
	hookCommit func(name string) error
)

// Write writes a run's results into dir (created if missing): maps.nc,
// series.nc, series.csv, regions.csv, summary.json and provenance.json (see
// the package documentation for their contents). It returns their paths.
//
// Every file is first written into a hidden staging directory inside dir
// and moved to its final name only when all of them are complete. On any
// error nothing of this run is left under a final name: files already moved
// are removed again and, with Force, the outputs they replaced are put back.
// Without Force, Write refuses before writing anything when any output file
// already exists in dir; other files in dir are never touched. A directory
// that Write created is removed again when it fails.
func Write(dir string, acc *accumulate.Acc, meta Meta, opt Options) (_ Files, err error) {
	c, err := check(acc, meta)
	if err != nil {
		return nil, err
	}
	if dir == "" {
		return nil, invalid("the output directory is empty; give a directory name")
	}
	st, err := os.Stat(dir)
	switch {
	case err == nil && !st.IsDir():
		return nil, fmt.Errorf("output: %s is a file, not a directory; give a directory for the outputs", dir)
	case err != nil && !errors.Is(err, fs.ErrNotExist):
		return nil, fmt.Errorf("output: %w", err)
	}
	created := err != nil
	if err := preflight(dir, opt.Force); err != nil {
		return nil, err
	}
	if err := os.MkdirAll(dir, 0o777); err != nil {
		return nil, fmt.Errorf("output: cannot create the output directory: %w", err)
	}
	defer func() {
		if err != nil && created {
			os.Remove(dir) // only if still empty
		}
	}()
	sd, err := stage.New(dir, ".lidscope-output-")
	if err != nil {
		return nil, fmt.Errorf("output: cannot write in %s (the directory must be writable): %w", dir, err)
	}
	defer sd.Remove()
	if err := c.stageAll(sd, dir); err != nil {
		return nil, err
	}
	sd.BeforeMove = hookCommit
	if err := sd.Commit(OutputNames(), opt.Force); err != nil {
		if !opt.Force && errors.Is(err, fs.ErrExist) {
			return nil, fmt.Errorf("output: %w. Allow replacing it (Options.Force) or choose another directory", err)
		}
		return nil, fmt.Errorf("output: %w", err)
	}
	var files Files
	for _, n := range OutputNames() {
		files = append(files, filepath.Join(dir, n))
	}
	return files, nil
}

// preflight refuses, without Force, when an output exists already, and
// always when an output name is taken by something that is not a file.
func preflight(dir string, force bool) error {
	exist, err := stage.Existing(dir, OutputNames())
	if err != nil {
		return fmt.Errorf("output: %w", err)
	}
	if len(exist) > 0 && !force {
		return fmt.Errorf("output: %s already holds outputs of a run (%s): %w; nothing was written. Choose another directory, remove them, or allow replacing them (Options.Force)",
			dir, strings.Join(exist, ", "), fs.ErrExist)
	}
	return nil
}

// digest returns the size and SHA-256 of a staged file.
func digest(p, name string) (provOutput, error) {
	f, err := os.Open(p)
	if err != nil {
		return provOutput{}, err
	}
	defer f.Close()
	h := sha256.New()
	n, err := io.Copy(h, f)
	if err != nil {
		return provOutput{}, err
	}
	return provOutput{Name: name, Size: num{Value: float64(n), Units: "byte"}, SHA256: hex.EncodeToString(h.Sum(nil))}, nil
}

// Stager is where a writer puts its files before they are committed:
// a runfolder.Stage (a whole run folder, committed by its owner) or a
// stage.Dir.
type Stager interface {
	Path(name string) string
	WriteFile(name string, b []byte) error
}

// Stage writes the run's result files (the six files Write writes) into
// st and does not commit them: the caller commits the whole run folder
// (package runfolder). dir is the final folder, named in messages.
func Stage(st Stager, dir string, acc *accumulate.Acc, meta Meta) error {
	c, err := check(acc, meta)
	if err != nil {
		return err
	}
	return c.stageAll(st, dir)
}

func (c *checked) stageAll(sd Stager, dir string) error {
	notes := c.notes
	if _, _, _, _, note := c.periodAxis(); note != "" {
		notes = append(notes, note)
	}
	var outs []provOutput
	stageFile := func(name string, write func(path string) error) error {
		p := sd.Path(name)
		if err := write(p); err != nil {
			return fmt.Errorf("output: writing %s in %s: %w", name, dir, err)
		}
		if hookStaged != nil {
			if err := hookStaged(name); err != nil {
				return fmt.Errorf("output: writing %s in %s: %w", name, dir, err)
			}
		}
		if name != ProvenanceJSON {
			po, err := digest(p, name)
			if err != nil {
				return fmt.Errorf("output: writing %s in %s: %w", name, dir, err)
			}
			outs = append(outs, po)
		}
		return nil
	}
	// Each file is made by write (given the staged path) or by bytes.
	steps := []struct {
		name  string
		write func(path string) error
		bytes func() ([]byte, error)
	}{
		{name: MapsNC, write: func(p string) error { return c.writeMaps(p, notes) }},
		{name: SeriesNC, write: func(p string) error { return c.writeSeriesNC(p, notes) }},
		{name: SeriesCSV, bytes: c.seriesCSV},
		{name: RegionsCSV, bytes: c.regionsCSV},
		{name: SummaryJSON, bytes: func() ([]byte, error) { return jsonnum.Marshal(c.summary(notes)) }},
		{name: ProvenanceJSON, bytes: func() ([]byte, error) { return jsonnum.Marshal(c.provenance(notes, outs)) }},
	}
	for _, s := range steps {
		write := s.write
		if s.bytes != nil {
			write = func(string) error {
				b, err := s.bytes()
				if err != nil {
					return err
				}
				return sd.WriteFile(s.name, b)
			}
		}
		if err := stageFile(s.name, write); err != nil {
			return err
		}
	}
	return nil
}
