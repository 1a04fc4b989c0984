package main

import (
	"bytes"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"github.com/spf13/pflag"
)

// `lidscope man-pages` (make man) writes one man page per command of the
// tree, each a roff page with the sections of man-pages(7) (NAME,
// SYNOPSIS, DESCRIPTION, OPTIONS; Linux man-pages project, common
// practice) that lists every flag of its command; with groff installed,
// the pages render without warnings.
func TestManPages(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "man")
	var out, errb bytes.Buffer
	if code := run([]string{"man-pages", "--out", dir}, &out, &errb); code != 0 {
		t.Fatalf("exit %d: %s", code, errb.String())
	}
	root := newRoot(&env{stdout: &bytes.Buffer{}, stderr: &bytes.Buffer{}})
	root.InitDefaultCompletionCmd()
	n := 0
	for _, c := range allCommands(root) {
		if c != root && !c.IsAvailableCommand() {
			continue
		}
		n++
		name := strings.ReplaceAll(c.CommandPath(), " ", "-") + ".1"
		b, err := os.ReadFile(filepath.Join(dir, name))
		if err != nil {
			t.Errorf("no man page for %s: %v", c.CommandPath(), err)
			continue
		}
		page := string(b)
		for _, s := range []string{".TH \"LIDSCOPE\" \"1\"", ".SH NAME", ".SH SYNOPSIS", ".SH DESCRIPTION", c.Short} {
			if !strings.Contains(page, s) {
				t.Errorf("%s lacks %q", name, s)
			}
		}
		c.LocalFlags().VisitAll(func(f *pflag.Flag) {
			if !f.Hidden && !strings.Contains(page, `\fB--`+f.Name+`\fP`) {
				t.Errorf("%s does not list --%s", name, f.Name)
			}
		})
		if groff, err := exec.LookPath("groff"); err == nil {
			cmd := exec.Command(groff, "-man", "-Tutf8", "-ww", "-z", filepath.Join(dir, name))
			if msg, err := cmd.CombinedOutput(); err != nil || len(msg) > 0 {
				t.Errorf("groff on %s: %v\n%s", name, err, msg)
			}
		}
	}
	if !strings.Contains(out.String(), "wrote ") || n < 10 {
		t.Errorf("%d pages checked; stdout %q", n, out.String())
	}
}
