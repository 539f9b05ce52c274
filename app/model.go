package main

import (
	"context"
	"errors"
	"fmt"
	"math"
	"slices"
	"time"

	"reticle/peaks"
	"reticle/report"
)

// A Model is the state of one analysis in the desktop program: the scan,
// its extraction, the settings (with the user's peak edits), the latest
// result and the chosen solution, with undo and redo of every change. It
// holds no widgets; the window shows it.
type Model struct {
	Path     string
	Scan     *peaks.Scan
	Ext      *report.Extraction
	Settings report.Settings
	Doc      *report.Document
	Selected int // index of the chosen solution in Doc.Solutions

	// LastRun is how long the last analysis took; edits recompute the
	// candidates automatically while it stays below AutoLimit.
	LastRun time.Duration

	undo, redo []snapshot
}

// AutoLimit is the analysis time below which edits recompute the
// candidate cells at once.
const AutoLimit = 500 * time.Millisecond

// snapshot is what undo restores.
type snapshot struct {
	settings report.Settings
	selected int
}

// ErrNoScan: an action that needs a scan before one is open.
var ErrNoScan = errors.New("no scan is open")

// Open reads a scan and extracts its peaks with the settings (whose peak
// edits are fitted again). The history is cleared.
func (m *Model) Open(ctx context.Context, path string, s report.Settings) error {
	scan, err := peaks.ReadFile(path)
	if err != nil {
		return err
	}
	ext, err := report.Extract(ctx, scan, s, nil)
	if err != nil {
		return err
	}
	m.Path, m.Scan, m.Ext, m.Settings = path, scan, ext, s
	m.Doc, m.Selected, m.undo, m.redo = nil, 0, nil, nil
	return nil
}

// Analyse indexes, refines and works out contents with the current
// settings; progress may be nil.
func (m *Model) Analyse(ctx context.Context, progress report.Progress) error {
	if m.Ext == nil {
		return ErrNoScan
	}
	t0 := time.Now()
	doc, err := report.Analyse(ctx, m.Ext, m.Settings, progress)
	if err != nil {
		return err
	}
	m.Apply(doc, time.Since(t0))
	return nil
}

// Apply takes the result of an analysis that took the given time (run on
// a copy of the state, off the UI thread).
func (m *Model) Apply(doc *report.Document, took time.Duration) {
	m.Doc, m.LastRun = doc, took
	if m.Selected >= len(doc.Solutions) {
		m.Selected = 0
	}
}

// Solution returns the chosen solution, or nil.
func (m *Model) Solution() *report.Solution {
	if m.Doc == nil || m.Selected < 0 || m.Selected >= len(m.Doc.Solutions) {
		return nil
	}
	return &m.Doc.Solutions[m.Selected]
}

func (m *Model) push() {
	m.undo = append(m.undo, snapshot{cloneSettings(m.Settings), m.Selected})
	m.redo = nil
}

func cloneSettings(s report.Settings) report.Settings {
	s.Systems = slices.Clone(s.Systems)
	s.Rejected = slices.Clone(s.Rejected)
	s.Added = slices.Clone(s.Added)
	s.Excluded = slices.Clone(s.Excluded)
	return s
}

// TogglePeak accepts a rejected peak or rejects an accepted one (index
// into Doc.Peaks). K-beta companions are never indexed and cannot be
// accepted.
func (m *Model) TogglePeak(i int) error {
	if m.Doc == nil || i < 0 || i >= len(m.Doc.Peaks) {
		return fmt.Errorf("no peak %d", i+1)
	}
	p := m.Doc.Peaks[i]
	m.push()
	if p.Rejected {
		m.Settings.Rejected = slices.DeleteFunc(m.Settings.Rejected, func(x float64) bool { return math.Abs(x-p.TwoTheta) <= 0.005 })
	} else {
		m.Settings.Rejected = append(m.Settings.Rejected, p.TwoTheta)
	}
	return nil
}

// AddPeak fits a peak near tt (degrees 2θ) that the extraction missed.
func (m *Model) AddPeak(tt float64) (peaks.Peak, error) {
	if m.Ext == nil {
		return peaks.Peak{}, ErrNoScan
	}
	p, err := m.Ext.Add(tt)
	if err != nil {
		return p, err
	}
	// The step is recorded only once the fit has succeeded; the
	// settings are still those before it.
	m.push()
	m.Settings.Added = append(m.Settings.Added, tt)
	return p, nil
}

// Change applies an edit of the settings (corrections, formula, ...) as
// one undoable step.
func (m *Model) Change(edit func(*report.Settings)) {
	m.push()
	edit(&m.Settings)
}

// ToggleExcluded leaves an indexed line out of the refinement, or takes it
// back.
func (m *Model) ToggleExcluded(tt float64) {
	m.push()
	n := len(m.Settings.Excluded)
	m.Settings.Excluded = slices.DeleteFunc(m.Settings.Excluded, func(x float64) bool { return math.Abs(x-tt) <= 0.005 })
	if len(m.Settings.Excluded) == n {
		m.Settings.Excluded = append(m.Settings.Excluded, tt)
	}
}

// Select chooses solution k (an undoable step).
func (m *Model) Select(k int) {
	if m.Doc == nil || k < 0 || k >= len(m.Doc.Solutions) || k == m.Selected {
		return
	}
	m.push()
	m.Selected = k
}

// CanUndo and CanRedo report whether there is a step to take.
func (m *Model) CanUndo() bool { return len(m.undo) > 0 }

// CanRedo reports whether an undone step can be redone.
func (m *Model) CanRedo() bool { return len(m.redo) > 0 }

// Undo restores the state before the last change; the caller analyses
// again.
func (m *Model) Undo() error { return m.step(&m.undo, &m.redo) }

// Redo takes again the last undone step.
func (m *Model) Redo() error { return m.step(&m.redo, &m.undo) }

// step restores the last snapshot of from, saving the present in to.
func (m *Model) step(from, to *[]snapshot) error {
	if len(*from) == 0 {
		return nil
	}
	last := (*from)[len(*from)-1]
	*from = (*from)[:len(*from)-1]
	*to = append(*to, snapshot{cloneSettings(m.Settings), m.Selected})
	return m.restore(last)
}

// restore sets a snapshot, refitting the added peaks when they differ.
func (m *Model) restore(s snapshot) error {
	if !slices.Equal(s.settings.Added, m.Settings.Added) {
		m.Ext.Added, m.Ext.Profile = nil, m.Ext.Result.Profile
		for _, tt := range s.settings.Added {
			if _, err := m.Ext.Add(tt); err != nil {
				return err
			}
		}
	}
	m.Settings, m.Selected = s.settings, s.selected
	return nil
}

// Session returns the session that reopens this state.
func (m *Model) Session() *report.Session {
	s := &report.Session{Settings: cloneSettings(m.Settings), Solution: m.Selected + 1}
	if m.Scan != nil {
		s.Scan = report.ScanRef{Path: m.Path, SHA256: m.Scan.SHA256}
	}
	return s
}
