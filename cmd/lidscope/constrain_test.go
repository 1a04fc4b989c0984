package main

import (
	"bytes"
	"strings"
	"testing"
)

// TestConstrainErrors: mistakes on the command line are usage errors
// (status 2) that say what to give; runs that are not factor runs fail
// (status 1) naming the folder.
func TestConstrainErrors(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	cases := []struct {
		args   []string
		status int
		want   string
	}{
		{[]string{"constrain", "a", "b"}, 2, "give the observational run folder"},
		{[]string{"constrain", "a", "b", "c"}, 2, "--out DIR"},
		{[]string{"constrain", "a", "b", "c", "--out", dir + "/x"}, 2, "--warming"},
		{[]string{"constrain", "a", "b", "c", "--out", dir + "/x", "--warming", "4"}, 2, "has no units"},
		{[]string{"constrain", "a", "b", "c", "--out", dir + "/x", "--warming", "4K", "--level", "95"}, 2, "between 0 and 1"},
		{[]string{"constrain", dir, dir, dir, "--out", dir + "/x", "--warming", "4K"}, 1, dir},
	}
	for _, c := range cases {
		var out, errb bytes.Buffer
		if got := run(c.args, &out, &errb); got != c.status || !strings.Contains(errb.String(), c.want) {
			t.Errorf("%v: status %d (want %d), stderr %q (want it to mention %q)", c.args, got, c.status, errb.String(), c.want)
		}
	}
}
