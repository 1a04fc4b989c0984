// Package fanout runs N child processes of one program side by side, reads
// the progress lines they print, and stops all of them when its context is
// cancelled. It is how `lidscope run --jobs N` runs the pieces of a record
// (each child has its own netCDF-C library instance, which is not
// thread-safe); the scheduling is the operating system's.
package fanout

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"io"
	"os/exec"
	"strconv"
	"strings"
	"sync"
	"time"
)

// ProgressPrefix starts the progress lines a child prints on its standard
// output: "PREFIX DONE TOTAL".
const ProgressPrefix = "lidscope-progress"

// ProgressLine formats one progress line.
func ProgressLine(done, total int) string {
	return fmt.Sprintf("%s %d %d\n", ProgressPrefix, done, total)
}

// Job is one child process.
type Job struct {
	Name string   // how messages call it
	Args []string // program arguments (without the program)
}

// Spec describes a fan-out.
type Spec struct {
	Program string   // the executable
	Env     []string // the children's environment (nil: this process's)
	Jobs    []Job
	// Progress, when set, is told each progress line of job i.
	Progress func(i, done, total int)
	// Stderr receives the children's standard error, a line at a time
	// with the job's name in front (nil: discarded).
	Stderr io.Writer
	// Grace is how long a child may take to stop after SIGTERM before it
	// is killed (default 10 s).
	Grace time.Duration
}

// Error is the failure of one job.
type Error struct {
	Job    string
	Err    error
	Output string // its last lines of standard output, for the message
}

func (e *Error) Error() string { return fmt.Sprintf("%s: %v", e.Job, e.Err) }
func (e *Error) Unwrap() error { return e.Err }

// Run starts every job at once and waits for all of them. When ctx is
// cancelled, or when one job fails, every other child gets SIGTERM (and
// SIGKILL after Grace) and Run waits until all have ended, so no child
// outlives it. The children also get SIGTERM when this process dies
// (Linux parent-death signal). It returns the first failure (a *Error) or
// ctx.Err().
func Run(ctx context.Context, s Spec) error {
	if len(s.Jobs) == 0 {
		return nil
	}
	grace := s.Grace
	if grace == 0 {
		grace = 10 * time.Second
	}
	ctx, cancel := context.WithCancel(ctx)
	defer cancel()
	var (
		mu    sync.Mutex
		first error
		wg    sync.WaitGroup
	)
	fail := func(err error) {
		mu.Lock()
		if first == nil {
			first = err
		}
		mu.Unlock()
		cancel()
	}
	var errMu sync.Mutex // one child's line at a time on Stderr
	for i, j := range s.Jobs {
		cmd := exec.CommandContext(ctx, s.Program, j.Args...)
		cmd.Env = s.Env
		setProcAttrs(cmd)
		cmd.Cancel = func() error { return terminate(cmd) }
		cmd.WaitDelay = grace
		var tail tailBuffer
		progress := func(line string) {
			if rest, ok := strings.CutPrefix(line, ProgressPrefix+" "); ok {
				if f := strings.Fields(rest); len(f) == 2 && s.Progress != nil {
					d, e1 := strconv.Atoi(f[0])
					t, e2 := strconv.Atoi(f[1])
					if e1 == nil && e2 == nil {
						s.Progress(i, d, t)
					}
				}
				return
			}
			tail.add(line)
		}
		name := j.Name
		stderr := func(line string) {
			tail.add(line)
			if s.Stderr != nil {
				errMu.Lock()
				fmt.Fprintf(s.Stderr, "%s: %s\n", name, line)
				errMu.Unlock()
			}
		}
		outW, errW := &lineWriter{line: progress}, &lineWriter{line: stderr}
		cmd.Stdout, cmd.Stderr = outW, errW
		if err := cmd.Start(); err != nil {
			fail(&Error{Job: j.Name, Err: err})
			break
		}
		wg.Add(1)
		go func() {
			defer wg.Done()
			err := cmd.Wait()
			outW.flush()
			errW.flush()
			if err != nil && ctx.Err() == nil {
				fail(&Error{Job: name, Err: err, Output: tail.String()})
			}
		}()
	}
	wg.Wait()
	mu.Lock()
	defer mu.Unlock()
	if first != nil {
		return first
	}
	return ctx.Err()
}

// Failed reports whether err is the failure of a job (not a cancellation).
func Failed(err error) (*Error, bool) {
	var e *Error
	ok := errors.As(err, &e)
	return e, ok
}

// lineWriter calls line for every complete line written to it (exec
// copies a child's output into it on its own goroutine).
type lineWriter struct {
	mu   sync.Mutex
	buf  []byte
	line func(string)
}

func (w *lineWriter) Write(p []byte) (int, error) {
	w.mu.Lock()
	defer w.mu.Unlock()
	w.buf = append(w.buf, p...)
	for {
		i := bytes.IndexByte(w.buf, '\n')
		if i < 0 {
			break
		}
		w.line(string(w.buf[:i]))
		w.buf = w.buf[i+1:]
	}
	return len(p), nil
}

// flush passes on a last line without a newline.
func (w *lineWriter) flush() {
	w.mu.Lock()
	defer w.mu.Unlock()
	if len(w.buf) > 0 {
		w.line(string(w.buf))
		w.buf = nil
	}
}

// tailBuffer keeps the last lines written to it.
type tailBuffer struct {
	mu    sync.Mutex
	lines []string
}

func (t *tailBuffer) add(s string) {
	t.mu.Lock()
	defer t.mu.Unlock()
	t.lines = append(t.lines, s)
	if len(t.lines) > 20 {
		t.lines = t.lines[len(t.lines)-20:]
	}
}

func (t *tailBuffer) String() string {
	t.mu.Lock()
	defer t.mu.Unlock()
	var b bytes.Buffer
	for _, l := range t.lines {
		b.WriteString(l)
		b.WriteByte('\n')
	}
	return b.String()
}
