package main

import (
	"context"
	"slices"
	"strings"
	"sync"
	"testing"
	"time"

	"reticle/analysis"
)

// slowly makes every analysis take at least d longer, a stage slower than
// the limit for recomputing at once.
func slowly(u *ui, d time.Duration) {
	u.analyse = func(ctx context.Context, e *analysis.Extraction, s analysis.Settings, p analysis.Progress) (*analysis.Analysis, error) {
		select {
		case <-time.After(d):
		case <-ctx.Done():
			return nil, ctx.Err()
		}
		return analysis.Analyse(ctx, e, s, p)
	}
}

// serialise makes the test's goroutine stand for the UI thread: what the
// workers hand to the UI thread runs under the returned lock, which the
// test holds for its own actions during a run.
func serialise(u *ui) *sync.Mutex {
	mu := new(sync.Mutex)
	u.onUI = func(f func()) {
		mu.Lock()
		defer mu.Unlock()
		f()
	}
	return mu
}

// rejectedShown reports whether the peak table shows peak i (0-based)
// rejected: unticked, with "rejected" in its flags.
func rejectedShown(u *ui, i int) bool {
	note, _ := u.peakCell(i+1, slices.Index(peakColumns, "flags"))
	_, ticked := u.peakCell(i+1, 0)
	return strings.Contains(note, "rejected") && !ticked
}

// TestSlowRun checks that the window shows every edit at once when the
// analysis is slow: a peak rejected while a run that started before the
// edit is still going, or after a run slower than the limit for
// recomputing at once, is shown rejected at once and stays so when the
// run ends; the stale result says so, and a later run includes the edit.
func TestSlowRun(t *testing.T) {
	u := demoUI(t, "")
	mu := serialise(u)
	const peak = 2
	if rejectedShown(u, peak) {
		t.Fatalf("peak %d is rejected after opening", peak+1)
	}

	// A run slower than the limit: the edit waits for Recompute.
	slowly(u, 600*time.Millisecond)
	u.autoLimit = 500 * time.Millisecond
	u.recompute()
	u.wait()
	if u.m.LastRun < u.autoLimit {
		t.Fatalf("the slowed run took %v", u.m.LastRun)
	}
	u.togglePeak(peak)
	if !rejectedShown(u, peak) {
		t.Fatalf("peak %d rejected after a slow run is not shown rejected", peak+1)
	}
	if !u.m.Stale() || !strings.Contains(u.status.Text, "Recompute") {
		t.Errorf("after the edit: stale %v, status %q", u.m.Stale(), u.status.Text)
	}
	u.togglePeak(peak) // accepted again

	// An edit while a run is going, which started before it.
	u.recompute()
	time.Sleep(100 * time.Millisecond)
	mu.Lock()
	u.togglePeak(peak)
	shown := rejectedShown(u, peak)
	busy := u.busy.Visible()
	mu.Unlock()
	if !shown {
		t.Fatalf("peak %d rejected during a run is not shown rejected at once", peak+1)
	}
	if !busy {
		t.Error("the progress bar and Stop are hidden while a run goes on")
	}
	u.wait()
	if u.busy.Visible() {
		t.Error("the progress bar and Stop take room when no work runs")
	}
	if !rejectedShown(u, peak) {
		t.Fatalf("the run that started before the edit shows peak %d accepted again", peak+1)
	}
	if !u.m.Stale() || !strings.Contains(u.status.Text, "Recompute") {
		t.Errorf("the result of the run started before the edit: stale %v, status %q", u.m.Stale(), u.status.Text)
	}
	tt := u.m.A.Peaks[peak].TwoTheta
	u.recompute()
	u.wait()
	if u.m.Stale() || !rejectedShown(u, peak) {
		t.Fatalf("after Recompute: stale %v, peak shown rejected %v", u.m.Stale(), rejectedShown(u, peak))
	}
	for _, l := range u.m.A.Lines {
		if l.TwoTheta == tt {
			t.Fatalf("the rejected peak at %.3f° is still a line after Recompute", tt)
		}
	}

	// Fast enough to recompute at once: an edit during a run starts a new
	// run, and the older one's result is dropped.
	u.autoLimit = time.Hour
	u.recompute()
	time.Sleep(100 * time.Millisecond)
	mu.Lock()
	u.togglePeak(peak) // accepted again, and a new run
	mu.Unlock()
	u.wait()
	if u.m.Stale() || rejectedShown(u, peak) {
		t.Fatalf("after an edit during a run: stale %v, peak shown rejected %v", u.m.Stale(), rejectedShown(u, peak))
	}
}

// TestTypedCellOffUI refines a typed cell off the UI thread: the call returns
// before the refinement has finished, and its result is shown after.
func TestTypedCellOffUI(t *testing.T) {
	u := demoUI(t, "")
	mu := serialise(u)
	mu.Lock()
	u.refineTyped("cubic F a=8.08")
	before := u.paramsText.Text
	mu.Unlock()
	if strings.Contains(before, "typed cell") {
		t.Fatal("the typed cell was refined on the UI thread")
	}
	u.wait()
	if got := u.paramsText.Text; !strings.Contains(got, "typed cell cubic F a=8.08") || !strings.Contains(u.status.Text, "8.08") {
		t.Fatalf("after the refinement: text %q, status %q", got, u.status.Text)
	}
}
