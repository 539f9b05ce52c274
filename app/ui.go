package main

import (
	"context"
	"errors"
	"fmt"
	"image/color"
	"os"
	"path/filepath"
	"strconv"
	"sync"
	"time"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/data/binding"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/layout"
	"fyne.io/fyne/v2/storage"
	"fyne.io/fyne/v2/theme"
	"fyne.io/fyne/v2/widget"

	"reticle/analysis"
	"reticle/esd"
	"reticle/figure"
	"reticle/peaks"
	"reticle/refine"
	"reticle/report"
	"reticle/scanfile"
)

var boxColour = color.NRGBA{0x00, 0x72, 0xb2, 0x40}

// ui is the window and its widgets over one Model.
type ui struct {
	app fyne.App
	win fyne.Window
	m   *Model

	plot      *plotView
	hover     *widget.Label
	status    *widget.Label
	scaleSel  *widget.Select
	axisSel   *widget.Select
	undoBtn   *widget.Button
	redoBtn   *widget.Button
	tabs      *container.AppTabs
	scanInfo  *widget.Label
	waveSel   *widget.Select
	waveEntry *widget.Entry

	peakTable *widget.Table
	cellTable *widget.Table
	cellCols  []cellColumn
	resTable  *widget.Table
	progress  binding.Float
	progBar   *widget.ProgressBar
	busy      *fyne.Container // the progress bar and Stop, shown while work runs
	cancelBtn *widget.Button
	runBtn    *widget.Button
	autoLabel *widget.Label
	// searchLabel says what the indexing searched and how clear its
	// answer is.
	searchLabel *widget.Label

	zeroCheck, dispCheck *widget.Check
	autoCheck            *widget.Check
	cellEntry            *widget.Entry
	phasesEntry          *widget.Entry  // further phases of a whole-pattern fit
	phaseSel             *widget.Select // a candidate to add as a phase
	fitBtn               *widget.Button
	radiusEntry          *widget.Entry
	standardEntry        *widget.Entry
	scalingSel           *widget.Select
	paramsText           *widget.Label
	formulaEntry         *widget.Entry
	densityEntry         *widget.Entry
	zEntry               *widget.Entry
	contentsText         *widget.Label
	refreshing           bool

	mu      sync.Mutex
	cancel  context.CancelFunc
	gen     int
	running sync.WaitGroup

	autosave string // path of the autosave file; empty: none
	dark     bool   // the dark theme is on: the figure follows it
	// autoLimit is the analysis time below which edits recompute the
	// candidates at once (AutoLimit; tests change it).
	autoLimit time.Duration
	// onUI runs a function on the UI thread and waits for it
	// (fyne.DoAndWait; tests serialise it with their own actions).
	onUI func(func())
	// analyse runs the analysis (analysis.Analyse; tests slow it down).
	analyse func(context.Context, *analysis.Extraction, analysis.Settings, analysis.Progress) (*analysis.Analysis, error)
}

// newUI builds the window; it opens nothing.
func newUI(a fyne.App) *ui {
	u := &ui{app: a, m: &Model{}, progress: binding.NewFloat(), autoLimit: AutoLimit, analyse: analysis.Analyse, onUI: fyne.DoAndWait}
	// The theme first, so that every widget is made in it.
	u.applyTheme(a.Preferences().StringWithFallback("theme", "light"))
	u.win = a.NewWindow("Reticle")
	u.win.Resize(fyne.NewSize(1280, 860))
	u.autosave = autosavePath()
	u.build()
	return u
}

func (u *ui) build() {
	u.plot = newPlotView(u)
	u.hover = widget.NewLabel("")
	u.hover.TextStyle = fyne.TextStyle{Monospace: true}
	u.hover.Truncation = fyne.TextTruncateEllipsis
	u.status = widget.NewLabel("Open a scan to begin: press Open scan… (Ctrl+O), drop a file on the window, or pick a recent one on the Scan step.")
	u.status.Truncation = fyne.TextTruncateEllipsis
	u.scaleSel = widget.NewSelect([]string{"linear", "square root", "logarithmic"}, func(s string) {
		u.plot.opt.Scale = map[string]figure.Scale{"linear": figure.Linear, "square root": figure.SquareRoot, "logarithmic": figure.Logarithmic}[s]
		u.plot.render()
	})
	u.scaleSel.SetSelected("linear")
	u.axisSel = widget.NewSelect([]string{"2θ", "d"}, func(s string) {
		u.plot.opt.DAxis = s == "d"
		u.plot.render()
	})
	u.axisSel.SetSelected("2θ")
	reset := widget.NewButtonWithIcon("Whole scan", theme.ZoomFitIcon(), func() { u.plot.resetZoom() })
	u.undoBtn = widget.NewButtonWithIcon("Undo", theme.ContentUndoIcon(), u.undo)
	u.redoBtn = widget.NewButtonWithIcon("Redo", theme.ContentRedoIcon(), u.redo)
	open := widget.NewButtonWithIcon("Open scan…", theme.FolderOpenIcon(), u.openDialog)
	themeSel := widget.NewSelect([]string{"light", "dark"}, nil)
	th := u.app.Preferences().StringWithFallback("theme", "light")
	if th != "dark" {
		th = "light" // also when the preferences could not be read
	}
	themeSel.SetSelected(th)
	themeSel.OnChanged = func(s string) {
		u.applyTheme(s)
		u.app.Preferences().SetString("theme", s)
	}
	plotBar := container.NewHBox(open, u.undoBtn, u.redoBtn, widget.NewSeparator(),
		widget.NewLabel("intensity"), u.scaleSel, widget.NewLabel("axis"), u.axisSel, reset,
		layout.NewSpacer(), widget.NewLabel("theme"), themeSel)
	help := widget.NewLabel("Click a marker to reject or accept a peak · click elsewhere to add one · wheel: zoom · drag: pan · right-drag or Shift-drag: zoom to a box")
	help.Importance = widget.LowImportance
	top := container.NewBorder(plotBar, container.NewVBox(u.hover, help), nil, nil, u.plot)

	u.tabs = container.NewAppTabs(
		container.NewTabItem("1  Scan", u.scanStep()),
		container.NewTabItem("2  Peaks", u.peaksStep()),
		container.NewTabItem("3  Cells", u.cellsStep()),
		container.NewTabItem("4  Refinement", u.refineStep()),
		container.NewTabItem("5  Contents", u.contentsStep()),
		container.NewTabItem("6  Export", u.exportStep()),
	)
	u.tabs.OnSelected = func(*container.TabItem) {
		if u.m.A != nil {
			u.refreshAll()
		}
	}
	split := container.NewVSplit(top, u.tabs)
	split.Offset = 0.45
	// The progress of long work, with its Stop button, beside the
	// status line while work runs; hidden (taking no room) otherwise.
	u.progBar = widget.NewProgressBarWithData(u.progress)
	u.cancelBtn = widget.NewButton("Stop", func() {
		u.mu.Lock()
		if u.cancel != nil {
			u.cancel()
		}
		u.mu.Unlock()
	})
	u.busy = container.NewHBox(container.NewGridWrap(fyne.NewSize(240, u.cancelBtn.MinSize().Height), u.progBar), u.cancelBtn)
	u.busy.Hide()
	u.win.SetContent(container.NewBorder(nil, container.NewBorder(nil, nil, nil, u.busy, u.status), nil, nil, split))
	u.win.SetOnDropped(func(_ fyne.Position, uris []fyne.URI) {
		if len(uris) > 0 {
			u.open(uris[0].Path())
		}
	})
	u.win.SetMainMenu(u.mainMenu())
	u.shortcuts()
	u.updateButtons()
	u.syncFields()
}

// setStatus shows a message in the status line.
func (u *ui) setStatus(format string, args ...any) { u.status.SetText(fmt.Sprintf(format, args...)) }

func (u *ui) setHover(s string) { u.hover.SetText(s) }

// showError shows an error with what to do about it.
func (u *ui) showError(what string, err error, todo string) {
	msg := fmt.Sprintf("%s:\n%v", what, err)
	if todo != "" {
		msg += "\n\n" + todo
	}
	dialog.ShowError(errors.New(msg), u.win)
	u.setStatus("%s (see the message)", what)
}

// open reads a scan with the remembered radiation and analyses it.
func (u *ui) open(path string) {
	var s analysis.Settings
	if w := u.app.Preferences().String("wavelength"); w != "" {
		if r, err := scanfile.ParseRadiation(w); err == nil {
			s.Radiation = &r
		}
	}
	u.openWith(path, s, 0, nil)
}

// openWith opens a scan with given settings; solution is the rank to
// select after the analysis (0: the best); then, when not nil, runs on
// the UI thread once the scan is open.
//
// Reading and extraction run on a worker, with the progress bar and the
// Stop button, so that a scan of a million points does not hold the
// window; the scan open so far stays until the new one is ready.
func (u *ui) openWith(path string, s analysis.Settings, solution int, then func()) {
	var ext *analysis.Extraction
	u.work(fmt.Sprintf("reading %s…", path), func(ctx context.Context, p analysis.Progress) (err error) {
		ext, err = analysis.ReadExtract(ctx, path, s, p)
		return err
	}, func(err error) {
		if err != nil {
			if errors.Is(err, context.Canceled) {
				u.setStatus("stopped reading %s; the scan shown is the one open before", path)
				return
			}
			u.showError("The scan could not be opened", err, "Check that the file is a two- or three-column export (2θ, counts, optional esd) or a powder CIF; the message names the line at fault.")
			return
		}
		u.m.Opened(path, ext, s)
		u.opened(path, solution)
		if then != nil {
			then()
		}
	})
}

// work runs job on a worker, with the progress bar and the Stop button,
// after cancelling the run still going. done then runs on the UI thread
// with job's error, unless a later run has started meanwhile: its result
// is stale and dropped.
func (u *ui) work(status string, job func(context.Context, analysis.Progress) error, done func(error)) {
	u.mu.Lock()
	if u.cancel != nil {
		u.cancel()
	}
	ctx, cancel := context.WithCancel(context.Background())
	u.cancel = cancel
	u.gen++
	gen := u.gen
	u.mu.Unlock()
	u.setStatus("%s", status)
	u.progress.Set(0)
	u.busy.Show()
	u.running.Add(1)
	go func() {
		defer u.running.Done()
		err := job(ctx, func(stage analysis.Stage, n, total int) {
			u.progress.Set(analysis.Fraction(stage, n, total))
		})
		u.onUI(func() {
			u.mu.Lock()
			current := gen == u.gen
			u.mu.Unlock()
			if !current {
				return
			}
			u.busy.Hide()
			done(err)
		})
	}()
}

// opened shows a scan just read and starts its analysis.
func (u *ui) opened(path string, solution int) {
	u.win.SetTitle("Reticle — " + filepath.Base(path))
	u.addRecent(path)
	u.plot.opt.XMin, u.plot.opt.XMax = 0, 0
	u.refreshScan()
	u.recomputeThen(func() {
		if solution > 0 && u.m.A != nil && solution <= len(u.m.A.Candidates) {
			u.m.Selected = solution - 1
			u.m.A.Chosen = u.m.Selected
			u.refreshAll()
		}
	})
}

// recompute runs the analysis off the UI thread.
func (u *ui) recompute() { u.recomputeThen(nil) }

func (u *ui) recomputeThen(after func()) {
	if u.m.Ext == nil {
		return
	}
	// A copy of what the analysis reads: edits on the UI thread do not
	// touch it.
	ext := u.m.Ext.Clone()
	settings := u.m.Settings.Clone()
	earlier := u.m.A
	var a *analysis.Analysis
	var took time.Duration
	u.work("finding cells…", func(ctx context.Context, p analysis.Progress) (err error) {
		t0 := time.Now()
		// After an edit of the lines, the earlier candidates weighed
		// again are shown at once, while the full search runs.
		if q, err := analysis.Reweigh(ctx, ext, settings, earlier, nil); err == nil {
			quick := time.Since(t0)
			u.onUI(func() {
				if ctx.Err() != nil {
					return
				}
				u.m.Preview(q, settings)
				u.refreshAll()
				u.setStatus("%d lines: the last candidates weighed again in %.0f ms; searching anew…", len(q.Lines), quick.Seconds()*1000)
			})
		}
		a, err = u.analyse(ctx, ext, settings, p)
		took = time.Since(t0)
		return err
	}, func(err error) {
		if err != nil {
			if errors.Is(err, context.Canceled) {
				u.setStatus("stopped; the cells shown are from the last complete run")
				return
			}
			u.showError("The analysis failed", err, "Check the settings on the Scan step (wavelength) and the peaks kept on the Peaks step.")
			return
		}
		u.m.Apply(a, took, settings)
		u.progress.Set(1)
		u.refreshAll()
		u.saveAutosave()
		n := len(a.Candidates)
		if u.m.Stale() {
			u.setStatus("edited during the run: press Recompute (F5) on the Cells step to update the candidates (the last run took %.1f s)", took.Seconds())
		} else if n == 0 {
			u.setStatus("%d lines: no cell explains them within the search bounds (%.0f ms)", len(a.Lines), took.Seconds()*1000)
		} else {
			c := u.m.Solution().Cell()
			u.setStatus("%d lines, %d candidate cells in %.0f ms; showing %d: %s %s", len(a.Lines), n, took.Seconds()*1000, u.m.Selected+1, c.System, c.Centring)
		}
		if after != nil {
			after()
		}
	})
}

// wait blocks until the running analyses have finished (tests).
func (u *ui) wait() { u.running.Wait() }

// edited runs after every edit: candidates follow at once when the last
// run was fast, otherwise the Recompute button is offered.
func (u *ui) edited() {
	u.updateButtons()
	if u.m.LastRun < u.autoLimit {
		u.recompute()
		return
	}
	u.setStatus("edited: press Recompute (F5) on the Cells step to update the candidates (the last run took %.1f s)", u.m.LastRun.Seconds())
	u.refreshAll()
	u.saveAutosave()
}

func (u *ui) togglePeak(i int) {
	if err := u.m.TogglePeak(i); err != nil {
		u.setStatus("%v", err)
		return
	}
	u.edited()
}

func (u *ui) addPeak(tt float64) {
	p, err := u.m.AddPeak(tt)
	if err != nil {
		if errors.Is(err, peaks.ErrNoPeak) {
			u.setStatus("no peak to add near %.3f°: %v", tt, err)
			return
		}
		u.showError("The peak could not be added", err, "Click closer to the maximum you want to add.")
		return
	}
	u.setStatus("added a peak at %s° (height %.0f)", esd.Format(p.TwoTheta, p.TwoThetaESD), p.Height)
	u.edited()
}

func (u *ui) undo() {
	if !u.m.CanUndo() {
		return
	}
	if err := u.m.Undo(); err != nil {
		u.showError("Undo failed", err, "")
	}
	u.syncFields()
	u.edited()
}

func (u *ui) redo() {
	if !u.m.CanRedo() {
		return
	}
	if err := u.m.Redo(); err != nil {
		u.showError("Redo failed", err, "")
	}
	u.syncFields()
	u.edited()
}

func (u *ui) updateButtons() {
	if u.m.CanUndo() {
		u.undoBtn.Enable()
	} else {
		u.undoBtn.Disable()
	}
	if u.m.CanRedo() {
		u.redoBtn.Enable()
	} else {
		u.redoBtn.Disable()
	}
}

// refreshAll brings every view in step with the model.
func (u *ui) refreshAll() {
	u.refreshing = true
	defer func() { u.refreshing = false }()
	u.plot.render()
	u.peakTable.Refresh()
	u.setCellColumns()
	u.cellTable.Refresh()
	if u.m.A != nil && u.m.Selected < len(u.m.A.Candidates) {
		id := widget.TableCellID{Row: u.m.Selected + 1, Col: 0}
		u.cellTable.Select(id)
		if u.m.Selected == 0 {
			u.cellTable.ScrollToTop()
		} else {
			u.cellTable.ScrollTo(id)
		}
	}
	u.searchLabel.SetText("")
	if u.m.A != nil && u.m.A.Search != nil {
		u.searchLabel.SetText(report.SearchText(u.m.A.Search))
	}
	u.resTable.Refresh()
	u.paramsText.SetText(u.paramsSummary())
	u.contentsText.SetText(u.contentsSummary())
	u.fillPhaseChoices()
	u.showChosenCorrections()
	u.updateButtons()
}

// showChosenCorrections ticks, while the data choose the corrections, the
// boxes of the model they chose for the selected cell. The caller holds
// u.refreshing.
func (u *ui) showChosenCorrections() {
	if !u.autoCheck.Checked {
		return
	}
	var c refine.Corrections
	if sol := u.m.Solution(); sol != nil && sol.Refined != nil {
		c = sol.Refined.ChosenCorrections()
	}
	u.zeroCheck.SetChecked(c.Has(refine.Zero))
	u.dispCheck.SetChecked(c.Has(refine.Displacement))
}

// syncFields sets the entry fields from the settings (after undo).
func (u *ui) syncFields() {
	u.refreshing = true
	defer func() { u.refreshing = false }()
	s := u.m.Settings.Resolved(u.m.Scan())
	c := refine.DefaultCorrections
	if s.Corrections != nil {
		c = *s.Corrections
	}
	auto := c.Has(refine.Auto)
	u.autoCheck.SetChecked(auto)
	if auto {
		u.zeroCheck.Disable()
		u.dispCheck.Disable()
		u.showChosenCorrections()
	} else {
		u.zeroCheck.Enable()
		u.dispCheck.Enable()
		u.zeroCheck.SetChecked(c.Has(refine.Zero))
		u.dispCheck.SetChecked(c.Has(refine.Displacement))
	}
	u.radiusEntry.SetText(strconv.FormatFloat(s.Radius, 'g', -1, 64))
	u.scalingSel.SetSelected(s.Scaling.String())
	u.standardEntry.SetText("")
	if s.Standard != nil {
		u.standardEntry.SetText(s.Standard.Name)
	}
	u.formulaEntry.SetText("")
	if s.Formula != nil {
		u.formulaEntry.SetText(s.Formula.Text)
	}
	u.densityEntry.SetText("")
	if s.Density != nil {
		u.densityEntry.SetText(s.Density.String())
	}
	if s.Z > 0 {
		u.zEntry.SetText(strconv.Itoa(s.Z))
	} else {
		u.zEntry.SetText("")
	}
}

func (u *ui) openDialog() {
	u.pickFile([]string{".xy", ".xye", ".csv", ".txt", ".dat", ".cif", ".asc"}, u.open)
}

// pickFile shows a file dialog (in the open scan's folder) for files with
// the given extensions and hands the chosen path to use.
func (u *ui) pickFile(exts []string, use func(path string)) {
	d := dialog.NewFileOpen(func(r fyne.URIReadCloser, err error) {
		if err != nil {
			u.showError("The file dialog failed", err, "")
			return
		}
		if r == nil {
			return
		}
		path := r.URI().Path()
		r.Close()
		use(path)
	}, u.win)
	d.SetFilter(storage.NewExtensionFileFilter(exts))
	if u.m.Path != "" {
		if l, err := storage.ListerForURI(storage.NewFileURI(filepath.Dir(u.m.Path))); err == nil {
			d.SetLocation(l)
		}
	}
	d.Show()
}

// recent files, newest first, remembered between sessions.
func (u *ui) recent() []string { return u.app.Preferences().StringList("recent") }

func (u *ui) addRecent(path string) {
	if abs, err := filepath.Abs(path); err == nil {
		path = abs
	}
	list := []string{path}
	for _, p := range u.recent() {
		if p != path && len(list) < 8 {
			list = append(list, p)
		}
	}
	u.app.Preferences().SetStringList("recent", list)
}

// applyTheme sets the light or the dark variant of the theme.
func (u *ui) applyTheme(name string) {
	v := theme.VariantLight
	if name == "dark" {
		v = theme.VariantDark
	}
	u.dark = v == theme.VariantDark
	u.app.Settings().SetTheme(fixedVariant{theme.DefaultTheme(), v})
	if u.plot != nil {
		u.plot.render()
	}
}

// fixedVariant is the default theme held to one variant (light or dark).
type fixedVariant struct {
	fyne.Theme
	v fyne.ThemeVariant
}

func (f fixedVariant) Color(n fyne.ThemeColorName, _ fyne.ThemeVariant) color.Color {
	return f.Theme.Color(n, f.v)
}

// fileExists reports whether path names an existing file.
func fileExists(path string) bool {
	_, err := os.Stat(path)
	return err == nil
}
