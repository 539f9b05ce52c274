package main

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"time"

	"reticle/analysis"
	"reticle/peaks"
	"reticle/scanfile"
	"reticle/session"
)

// A Model is the state of one analysis in the desktop program: the scan's
// extraction, the settings (with the user's peak edits), the latest
// analysis and the chosen cell, with undo and redo of every change. It
// holds no widgets; the window shows it.
type Model struct {
	Path     string
	Ext      *analysis.Extraction
	Settings analysis.Settings
	A        *analysis.Analysis
	Selected int // index of the chosen candidate in A.Candidates

	// LastRun is how long the last analysis took; edits recompute the
	// candidates automatically while it stays below AutoLimit.
	LastRun time.Duration
	// analysed are the settings the analysis A was computed with.
	analysed analysis.Settings

	undo, redo []snapshot
}

// AutoLimit is the analysis time below which edits recompute the
// candidate cells at once.
const AutoLimit = 500 * time.Millisecond

// snapshot is what undo restores.
type snapshot struct {
	settings analysis.Settings
	selected int
}

// ErrNoScan: an action that needs a scan before one is open.
var ErrNoScan = errors.New("no scan is open")

// Open reads a scan and extracts its peaks with the settings (whose peak
// edits are fitted again). The history is cleared.
func (m *Model) Open(ctx context.Context, path string, s analysis.Settings) error {
	ext, err := analysis.ReadExtract(ctx, path, s, nil)
	if err != nil {
		return err
	}
	m.Opened(path, ext, s)
	return nil
}

// Opened makes a scan read and extracted elsewhere (on a worker) the open
// one, with its settings; the history is cleared.
func (m *Model) Opened(path string, ext *analysis.Extraction, s analysis.Settings) {
	m.Path, m.Ext, m.Settings = path, ext, s
	m.A, m.Selected, m.undo, m.redo = nil, 0, nil, nil
}

// Scan returns the open scan, or nil.
func (m *Model) Scan() *scanfile.Scan {
	if m.Ext == nil {
		return nil
	}
	return m.Ext.Scan
}

// Analyse indexes, refines and works out contents with the current
// settings; progress may be nil.
func (m *Model) Analyse(ctx context.Context, progress analysis.Progress) error {
	if m.Ext == nil {
		return ErrNoScan
	}
	t0 := time.Now()
	a, err := analysis.Analyse(ctx, m.Ext, m.Settings, progress)
	if err != nil {
		return err
	}
	m.Apply(a, time.Since(t0), m.Settings)
	return nil
}

// Apply takes the result of an analysis that took the given time, run on
// a copy of the state off the UI thread with the settings used, keeping
// the chosen cell. Edits made since then stay what the view shows (see
// sync), and the result is marked stale.
func (m *Model) Apply(a *analysis.Analysis, took time.Duration, used analysis.Settings) {
	m.A, m.LastRun = a, took
	m.analysed = used.Clone()
	if m.Selected >= len(a.Candidates) {
		m.Selected = 0
	}
	a.Chosen = m.Selected
	m.sync()
}

// Preview shows a provisional result (analysis.Reweigh) of the settings
// used until the full analysis arrives; the time of the last full run is
// kept.
func (m *Model) Preview(a *analysis.Analysis, used analysis.Settings) {
	m.Apply(a, m.LastRun, used)
}

// sync shows the edits of the settings on the peaks of the last result
// at once, before the candidates are found again: a peak the user
// rejected is shown rejected whatever the result was computed from.
func (m *Model) sync() {
	if m.A == nil {
		return
	}
	for i := range m.A.Peaks {
		m.A.Peaks[i].Rejected = m.Settings.IsRejected(m.A.Peaks[i].TwoTheta)
	}
}

// Stale reports whether the settings were edited after the analysis shown
// was started: its candidates and refinement are not yet those of the
// present settings.
func (m *Model) Stale() bool {
	if m.A == nil {
		return false
	}
	a, err1 := json.Marshal(m.analysed)
	b, err2 := json.Marshal(m.Settings)
	return err1 != nil || err2 != nil || !bytes.Equal(a, b)
}

// Solution returns the chosen candidate, or nil.
func (m *Model) Solution() *analysis.Candidate {
	if m.A == nil {
		return nil
	}
	return m.A.ChosenCandidate()
}

func (m *Model) push() {
	m.undo = append(m.undo, snapshot{m.Settings.Clone(), m.Selected})
	m.redo = nil
}

// TogglePeak accepts a rejected peak or rejects an accepted one (index
// into A.Peaks). K-beta companions are never indexed and cannot be
// accepted.
func (m *Model) TogglePeak(i int) error {
	if m.A == nil || i < 0 || i >= len(m.A.Peaks) {
		return fmt.Errorf("no peak %d", i+1)
	}
	m.push()
	m.Settings.Reject(m.A.Peaks[i].TwoTheta)
	m.sync()
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
func (m *Model) Change(edit func(*analysis.Settings)) {
	m.push()
	edit(&m.Settings)
	m.sync()
}

// ToggleExcluded leaves an indexed line out of the refinement, or takes it
// back.
func (m *Model) ToggleExcluded(tt float64) {
	m.push()
	m.Settings.Exclude(tt)
}

// Select chooses candidate k (an undoable step).
func (m *Model) Select(k int) {
	if m.A == nil || k < 0 || k >= len(m.A.Candidates) || k == m.Selected {
		return
	}
	m.push()
	m.Selected = k
	m.A.Chosen = k
	// A whole-pattern fit belongs to the cell it fitted.
	m.A.Pattern = nil
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
	*to = append(*to, snapshot{m.Settings.Clone(), m.Selected})
	return m.restore(last)
}

// restore sets a snapshot, refitting the added peaks when they differ.
func (m *Model) restore(s snapshot) error {
	if len(s.settings.Added) != len(m.Settings.Added) || !sameAngles(s.settings.Added, m.Settings.Added) {
		if err := m.Ext.Refit(s.settings.Added); err != nil {
			return err
		}
	}
	m.Settings, m.Selected = s.settings, s.selected
	if m.A != nil && m.Selected < len(m.A.Candidates) {
		if m.A.Chosen != m.Selected {
			m.A.Pattern = nil
		}
		m.A.Chosen = m.Selected
	}
	m.sync()
	return nil
}

func sameAngles(a, b []float64) bool {
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}

// Session returns the session that reopens this state.
func (m *Model) Session() *session.Session {
	s := &session.Session{Settings: m.Settings.Clone(), Solution: m.Selected + 1}
	if m.Ext != nil {
		s.Scan = session.ScanRef{Path: m.Path, SHA256: m.Ext.Scan.SHA256}
	}
	return s
}
