package config

import (
	"errors"
	"io/fs"
	"path/filepath"
	"strings"
	"testing"
)

// A study path that does not exist is told what to give instead (common
// practice for error messages in this project: what, where, what to do).
func TestLoadMissingStudySaysWhatToDo(t *testing.T) {
	path := filepath.Join(t.TempDir(), "obs.yaml")
	_, err := Load(path, LoadOptions{})
	if err == nil || !errors.Is(err, fs.ErrNotExist) {
		t.Fatalf("Load of a missing study: %v, want a not-exist error", err)
	}
	for _, want := range []string{path + " does not exist", "lidscope study init"} {
		if !strings.Contains(err.Error(), want) {
			t.Errorf("Load: %v, want %q", err, want)
		}
	}
}
