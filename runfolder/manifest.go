package runfolder

import (
	"crypto/rand"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"sort"
	"time"
)

// ManifestFile is the commit marker of a run folder: written last into the
// staging folder, it lists every file of the run. A folder without it holds
// no committed run.
const ManifestFile = "run-manifest.json"

// ManifestFormat tags the manifest.
const ManifestFormat = "lidscope-run-manifest/1"

// Entry is one file of a run.
type Entry struct {
	Name   string `json:"name"` // slash-separated, relative to the run folder
	Size   int64  `json:"size"`
	SHA256 string `json:"sha256"`
}

// Manifest lists a committed run's files.
type Manifest struct {
	Format string `json:"format"`
	// RunID is random, different for every commit.
	RunID     string    `json:"run_id"`
	Committed time.Time `json:"committed"`
	Version   string    `json:"lidscope_version,omitempty"`
	// Files are the run's results (the files directly in the folder):
	// readers check that each is there with its size.
	Files []Entry `json:"files"`
	// Extras are the files in subfolders (the figures), listed as the run
	// drew them; lidscope plot may redraw them later, so readers do not
	// check them.
	Extras []Entry `json:"extras,omitempty"`
}

// Has reports whether the run's results include name.
func (m *Manifest) Has(name string) bool {
	for _, e := range m.Files {
		if e.Name == name {
			return true
		}
	}
	return false
}

// owns reports whether the top-level entry name of a folder belongs to the
// run (a result, the manifest, or a subfolder that holds extras).
func (m *Manifest) owns(name string) bool {
	if name == ManifestFile || m.Has(name) {
		return true
	}
	for _, e := range m.Extras {
		if first, _, _ := cut(e.Name); first == name {
			return true
		}
	}
	return false
}

func cut(name string) (string, string, bool) {
	for i := 0; i < len(name); i++ {
		if name[i] == '/' {
			return name[:i], name[i+1:], true
		}
	}
	return name, "", false
}

func newRunID() string {
	var b [12]byte
	if _, err := rand.Read(b[:]); err != nil {
		return fmt.Sprintf("%x", time.Now().UnixNano())
	}
	return hex.EncodeToString(b[:])
}

// readManifest reads dir's manifest; ok is false when there is none.
func readManifest(dir string) (m *Manifest, ok bool, err error) {
	p := filepath.Join(dir, ManifestFile)
	b, err := os.ReadFile(p)
	if os.IsNotExist(err) {
		return nil, false, nil
	}
	if err != nil {
		return nil, false, err
	}
	m = &Manifest{}
	if err := json.Unmarshal(b, m); err != nil {
		return nil, true, fmt.Errorf("%s is damaged (%v): run again to rewrite the folder", p, err)
	}
	if m.Format != ManifestFormat {
		return nil, true, fmt.Errorf("%s has format %q, this lidscope reads %q: run again with this version", p, m.Format, ManifestFormat)
	}
	return m, true, nil
}

// scan lists, syncs and checksums every file under dir (except the
// manifest) into a manifest.
func scan(dir string) (*Manifest, error) {
	m := &Manifest{Format: ManifestFormat, RunID: newRunID(), Committed: time.Now().UTC()}
	err := filepath.WalkDir(dir, func(p string, d os.DirEntry, err error) error {
		if err != nil {
			return err
		}
		if p == dir {
			return nil
		}
		rel, err := filepath.Rel(dir, p)
		if err != nil {
			return err
		}
		rel = filepath.ToSlash(rel)
		if d.IsDir() {
			return nil
		}
		if !d.Type().IsRegular() {
			return fmt.Errorf("staged %s is not a regular file", rel)
		}
		if rel == ManifestFile {
			return fmt.Errorf("%s was staged by a writer: that name is the commit marker", ManifestFile)
		}
		e, err := hashFile(p, true)
		if err != nil {
			return err
		}
		e.Name = rel
		if _, _, sub := cut(rel); sub {
			m.Extras = append(m.Extras, e)
		} else {
			m.Files = append(m.Files, e)
		}
		return nil
	})
	sort.Slice(m.Files, func(i, j int) bool { return m.Files[i].Name < m.Files[j].Name })
	sort.Slice(m.Extras, func(i, j int) bool { return m.Extras[i].Name < m.Extras[j].Name })
	return m, err
}

// hashFile returns the size and SHA-256 of a file, syncing it to disk
// first when sync is set.
func hashFile(p string, sync bool) (Entry, error) {
	f, err := os.OpenFile(p, os.O_RDWR, 0)
	if !sync {
		f, err = os.Open(p)
	}
	if err != nil {
		return Entry{}, err
	}
	defer f.Close()
	if sync {
		if err := f.Sync(); err != nil {
			return Entry{}, fmt.Errorf("syncing %s: %w", p, err)
		}
	}
	h := sha256.New()
	n, err := io.Copy(h, f)
	if err != nil {
		return Entry{}, fmt.Errorf("reading %s: %w", p, err)
	}
	return Entry{Size: n, SHA256: hex.EncodeToString(h.Sum(nil))}, nil
}
