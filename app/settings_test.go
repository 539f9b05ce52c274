package main

import (
	"slices"
	"testing"

	"reticle/cell"
	"reticle/refine"
	"reticle/report"
)

// TestSettingsDialog applies the settings dialog's fields: indexing
// settings as one undoable step, a bad value refused with the settings
// kept, and a peak setting finding the peaks again.
func TestSettingsDialog(t *testing.T) {
	u := demoUI(t, "")
	peaksBefore := len(u.m.A.Peaks)

	f := newSettingsForm(u.m.Settings, report.A4)
	f.tolerance.SetText("0.05")
	f.systems.SetSelected([]string{"cubic", "tetragonal"})
	f.transparency.SetChecked(true)
	f.paper.SetSelected("Letter")
	u.applySettings(f)
	u.wait()
	s := u.m.Settings
	if s.Tolerance != 0.05 || !slices.Equal(s.Systems, []cell.System{cell.Cubic, cell.Tetragonal}) || s.Corrections == nil || !s.Corrections.Has(refine.Transparency) {
		t.Fatalf("settings after Apply: tolerance %g, systems %v, corrections %v", s.Tolerance, s.Systems, s.Corrections)
	}
	if got := paperFor(u.app); got != report.Letter {
		t.Errorf("paper %q, want Letter", got)
	}
	if u.m.Stale() || len(u.m.A.Candidates) == 0 || u.m.A.Candidates[0].Cell().System != cell.Cubic {
		t.Fatalf("after Apply: stale %v, first candidate %v", u.m.Stale(), u.m.A.Candidates)
	}
	u.undo()
	u.wait()
	if u.m.Settings.Tolerance != 0 || u.m.Settings.Systems != nil {
		t.Errorf("Undo left tolerance %g, systems %v", u.m.Settings.Tolerance, u.m.Settings.Systems)
	}

	f = newSettingsForm(u.m.Settings, report.A4)
	f.threshold.SetText("-3")
	before := u.m.Settings
	u.applySettings(f)
	if u.m.Settings.Threshold != before.Threshold {
		t.Errorf("a negative threshold was applied: %g", u.m.Settings.Threshold)
	}

	f = newSettingsForm(u.m.Settings, report.A4)
	f.threshold.SetText("14")
	u.applySettings(f)
	u.wait()
	if u.m.Settings.Threshold != 14 || len(u.m.A.Peaks) >= peaksBefore {
		t.Errorf("threshold 14: %g applied, %d peaks (were %d)", u.m.Settings.Threshold, len(u.m.A.Peaks), peaksBefore)
	}
}
