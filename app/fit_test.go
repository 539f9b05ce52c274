package main

import (
	"strings"
	"testing"
)

// TestWholePatternFit fits the demo's whole pattern from the window: the
// fit runs off the UI thread, joins the analysis, shows its figures in
// the refinement summary and the status; a second phase joins from the
// candidate list; a further phase far from the data costs a message and
// keeps the previous fit; choosing another candidate drops the fit.
func TestWholePatternFit(t *testing.T) {
	u := demoUI(t, "")
	mu := serialise(u)
	mu.Lock()
	u.fitWhole()
	shown := u.m.A.Pattern
	mu.Unlock()
	if shown != nil {
		t.Fatal("the whole pattern was fitted on the UI thread")
	}
	u.wait()
	pf := u.m.A.Pattern
	if pf == nil {
		t.Fatalf("no fit: status %q", u.status.Text)
	}
	if q := pf.Fit.Rwp / pf.Fit.Rexp; q > 1.5 {
		t.Errorf("Rwp/Rexp %.2f on the demo", q)
	}
	if !strings.Contains(u.paramsText.Text, "whole-pattern fit") || !strings.Contains(u.paramsText.Text, "Rwp") || !strings.Contains(u.status.Text, "Rwp") {
		t.Errorf("the fit is not shown: status %q\n%s", u.status.Text, u.paramsText.Text)
	}
	shot(t, u, "fit")
	// A further phase with no line in the scan: a message, the previous
	// fit kept.
	u.phasesEntry.SetText("cubic P a=0.7")
	u.fitWhole()
	u.wait()
	if u.m.A.Pattern != pf {
		t.Error("a failed fit replaced the previous one")
	}
	if !strings.Contains(u.status.Text, "could not be fitted") {
		t.Errorf("status after a failed fit: %q", u.status.Text)
	}
	// A candidate as a second phase.
	u.phasesEntry.SetText("")
	if len(u.phaseSel.Options) == 0 {
		t.Fatal("no candidate to add as a phase")
	}
	u.phaseSel.SetSelected(u.phaseSel.Options[0])
	if u.phasesEntry.Text == "" || strings.HasPrefix(u.phasesEntry.Text, "candidate") {
		t.Fatalf("the candidate's cell did not join the phases: %q", u.phasesEntry.Text)
	}
	u.m.Select(1)
	u.refreshAll()
	if u.m.A.Pattern != nil {
		t.Error("choosing another candidate kept the fit of the first")
	}
}
