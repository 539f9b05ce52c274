package main

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"runtime"
	"sort"
	"strings"
	"sync"

	"github.com/vbauerster/mpb/v8"
	"github.com/vbauerster/mpb/v8/decor"

	"reticle/report"
)

// expandInputs turns the command line's inputs into scan files, in the
// order given: a folder stands for the files in it (sorted by name, hidden
// files and subfolders left out), a pattern with *, ? or [ for the files
// it matches (sorted). An input that names nothing is kept, so that its
// error is reported in its place.
func expandInputs(args []string) []string {
	var out []string
	for _, a := range args {
		if fi, err := os.Stat(a); err == nil && fi.IsDir() {
			ents, err := os.ReadDir(a)
			if err != nil {
				out = append(out, a)
				continue
			}
			for _, e := range ents {
				if e.Type().IsRegular() && !strings.HasPrefix(e.Name(), ".") {
					out = append(out, filepath.Join(a, e.Name()))
				}
			}
			continue
		} else if err == nil {
			out = append(out, a)
			continue
		}
		if strings.ContainsAny(a, "*?[") {
			if ms, err := filepath.Glob(a); err == nil && len(ms) > 0 {
				sort.Strings(ms)
				out = append(out, ms...)
				continue
			}
		}
		out = append(out, a)
	}
	return out
}

// forEach calls work(i) for i in [0, n) on jobs goroutines and, when
// stderr is a terminal and there is more than one item, shows a progress
// bar there. Each work(i) writes only its own results, so the caller
// prints them in input order afterwards. order, when not nil, is the
// order in which to start the items (the largest first keeps every core
// busy to the end). work reports whether its item finished, that is was
// not cut short by ctx (an item that failed for a reason of its own has
// finished). Once ctx is cancelled no item is started; done reports the
// items that finished.
func forEach(ctx context.Context, n, jobs int, stderr io.Writer, label string, order []int, work func(i int) bool) (done []bool) {
	done = make([]bool, n)
	// --jobs N holds the whole run to N cores, since each analysis also
	// spreads its own work over the cores it may use.
	if jobs < runtime.GOMAXPROCS(0) {
		defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(max(jobs, 1)))
	}
	jobs = max(1, min(jobs, n))
	var bars *mpb.Progress
	var bar *mpb.Bar
	if f, ok := stderr.(*os.File); ok && n > 1 && isTerminal(f) {
		bars = mpb.New(mpb.WithOutput(f), mpb.WithWidth(40))
		bar = bars.AddBar(int64(n), mpb.BarRemoveOnComplete(),
			mpb.PrependDecorators(decor.Name(label+" "), decor.CountersNoUnit("%d/%d")),
			mpb.AppendDecorators(decor.Percentage()))
	}
	next := make(chan int)
	var wg sync.WaitGroup
	for w := 0; w < jobs; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range next {
				done[i] = work(i)
				if bar != nil {
					bar.Increment()
				}
			}
		}()
	}
feed:
	for k := 0; k < n; k++ {
		i := k
		if order != nil {
			i = order[k]
		}
		select {
		case next <- i:
		case <-ctx.Done():
			break feed
		}
	}
	close(next)
	wg.Wait()
	if bars != nil {
		if ctx.Err() != nil {
			bars.Shutdown()
		} else {
			bars.Wait()
		}
	}
	return done
}

// finished reports whether work that ended with err was not cut short by
// its context.
func finished(err error) bool {
	return !errors.Is(err, context.Canceled) && !errors.Is(err, context.DeadlineExceeded)
}

// interrupted says which scans a command had finished when it was
// stopped, and returns exitInterrupted. Nothing else is written: a
// report's files are written under a temporary name and renamed, so a
// scan not finished leaves none.
func interrupted(c command, files []string, done []bool, stderr io.Writer) int {
	var fin []string
	for i, f := range files {
		if done[i] {
			fin = append(fin, f)
		}
	}
	fmt.Fprintf(stderr, "reticle %s: stopped; %d of %d scans were finished", commandNames[c], len(fin), len(files))
	if len(fin) > 0 {
		fmt.Fprintf(stderr, ": %s", strings.Join(fin, ", "))
	}
	fmt.Fprintln(stderr)
	return exitInterrupted
}

// isTerminal reports whether f is a character device (a terminal).
func isTerminal(f *os.File) bool {
	fi, err := f.Stat()
	return err == nil && fi.Mode()&os.ModeCharDevice != 0
}

// writeSummary writes the summary table of a batch as base.csv and
// base.json, replacing existing files only with force. It returns the
// paths written.
func writeSummary(base string, rows []report.SummaryRow, force bool) ([]string, error) {
	var csvb, jsonb bytes.Buffer
	if err := report.WriteSummaryCSV(&csvb, rows); err != nil {
		return nil, err
	}
	if err := report.WriteSummaryJSON(&jsonb, rows); err != nil {
		return nil, err
	}
	var written []string
	for _, f := range []struct {
		path string
		data []byte
	}{{base + ".csv", csvb.Bytes()}, {base + ".json", jsonb.Bytes()}} {
		if err := report.SafeWrite(f.path, f.data, force); err != nil {
			return written, fmt.Errorf("summary %s: %w", f.path, err)
		}
		written = append(written, f.path)
	}
	return written, nil
}

// largestFirst returns the indices of files, the largest file first (a
// proxy for the time its analysis takes); files that cannot be read go
// last.
func largestFirst(files []string) []int {
	size := make([]int64, len(files))
	idx := make([]int, len(files))
	for i, f := range files {
		idx[i] = i
		if fi, err := os.Stat(f); err == nil {
			size[i] = fi.Size()
		}
	}
	sort.SliceStable(idx, func(a, b int) bool { return size[idx[a]] > size[idx[b]] })
	return idx
}

// finishBatch ends command c's batch: it writes the summary table when
// base is set, says how many scans failed when there were several, and
// returns the exit status (status, or 1 when the summary could not be
// written).
func finishBatch(c command, base string, rows []report.SummaryRow, force bool, status int, stderr io.Writer) int {
	name := commandNames[c]
	if base != "" {
		written, err := writeSummary(base, rows, force)
		if err != nil {
			fmt.Fprintf(stderr, "reticle %s: %v\n", name, err)
			return 1
		}
		for _, f := range written {
			fmt.Fprintf(stderr, "reticle %s: summary written to %s\n", name, f)
		}
	}
	if failed := countFailed(rows); failed > 0 && len(rows) > 1 {
		fmt.Fprintf(stderr, "reticle %s: %d of %d scans failed\n", name, failed, len(rows))
	}
	return status
}

// countFailed counts the scans of a batch that failed.
func countFailed(rows []report.SummaryRow) int {
	n := 0
	for _, r := range rows {
		if r.Status == report.StatusFailed {
			n++
		}
	}
	return n
}
