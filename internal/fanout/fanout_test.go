package fanout

import (
	"context"
	"strings"
	"sync"
	"testing"
	"time"
)

func sh(name, script string) Job { return Job{Name: name, Args: []string{"-c", script}} }

func TestRunReadsProgressAndWaits(t *testing.T) {
	var mu sync.Mutex
	last := map[int][2]int{}
	var errs strings.Builder
	err := Run(context.Background(), Spec{Program: "/bin/sh", Stderr: &syncWriter{b: &errs},
		Jobs: []Job{
			sh("a", `printf '`+ProgressPrefix+` 1 2\nhello\n`+ProgressPrefix+` 2 2\n'; echo oops >&2`),
			sh("b", `printf '`+ProgressPrefix+` 3 3\n'`),
		},
		Progress: func(i, done, total int) { mu.Lock(); last[i] = [2]int{done, total}; mu.Unlock() },
	})
	if err != nil {
		t.Fatal(err)
	}
	if last[0] != [2]int{2, 2} || last[1] != [2]int{3, 3} {
		t.Errorf("progress %v", last)
	}
	if errs.String() != "a: oops\n" {
		t.Errorf("stderr %q", errs.String())
	}
}

// One failing job stops the others (SIGTERM) and is the error.
func TestRunStopsTheOthersOnFailure(t *testing.T) {
	start := time.Now()
	err := Run(context.Background(), Spec{Program: "/bin/sh", Jobs: []Job{
		sh("slow", "sleep 30"),
		sh("bad", "echo broken; exit 3"),
	}})
	e, ok := Failed(err)
	if !ok || e.Job != "bad" || !strings.Contains(e.Output, "broken") {
		t.Fatalf("error %v (%#v)", err, e)
	}
	if d := time.Since(start); d > 10*time.Second {
		t.Errorf("the slow job was not stopped: %v", d)
	}
}

// A cancelled context stops every child and Run returns its error.
func TestRunCancel(t *testing.T) {
	ctx, cancel := context.WithTimeout(context.Background(), 200*time.Millisecond)
	defer cancel()
	err := Run(ctx, Spec{Program: "/bin/sh", Jobs: []Job{sh("a", "sleep 30"), sh("b", "sleep 30")}})
	if err != context.DeadlineExceeded {
		t.Fatalf("error %v, want the context's", err)
	}
}

func TestCPUs(t *testing.T) {
	t.Setenv("SLURM_CPUS_PER_TASK", "7")
	if n := CPUs(); n != 7 {
		t.Errorf("with SLURM_CPUS_PER_TASK=7: %d", n)
	}
	t.Setenv("SLURM_CPUS_PER_TASK", "")
	if n := CPUs(); n < 1 {
		t.Errorf("%d CPUs", n)
	}
}

type syncWriter struct {
	mu sync.Mutex
	b  *strings.Builder
}

func (w *syncWriter) Write(p []byte) (int, error) {
	w.mu.Lock()
	defer w.mu.Unlock()
	return w.b.Write(p)
}
