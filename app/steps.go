package main

import (
	"context"
	"errors"
	"fmt"
	"path/filepath"
	"slices"
	"strconv"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/theme"
	"fyne.io/fyne/v2/widget"

	"reticle/analysis"
	"reticle/cell"
	"reticle/density"
	"reticle/esd"
	"reticle/refine"
	"reticle/report"
	"reticle/scanfile"
)

// waveChoices are the radiation choices of the Scan step.
var waveChoices = []string{"from the file", "Cu", "CuKa1", "Co", "CoKa1", "Cr", "Fe", "Mo", "MoKa1", "Ag", "typed in Å"}

func (u *ui) scanStep() fyne.CanvasObject {
	u.scanInfo = widget.NewLabel("no scan open")
	u.scanInfo.TextStyle = fyne.TextStyle{Monospace: true}
	u.waveEntry = widget.NewEntry()
	u.waveEntry.SetPlaceHolder("wavelength in Å, e.g. 1.5405929")
	u.waveEntry.Disable()
	u.waveSel = widget.NewSelect(waveChoices, func(s string) {
		if s == "typed in Å" {
			u.waveEntry.Enable()
		} else {
			u.waveEntry.Disable()
		}
	})
	remembered := u.app.Preferences().String("wavelength")
	switch {
	case remembered == "":
		u.waveSel.SetSelected("from the file")
	case slices.Contains(waveChoices, remembered):
		u.waveSel.SetSelected(remembered)
	default:
		u.waveSel.SetSelected("typed in Å")
		u.waveEntry.SetText(remembered)
	}
	apply := widget.NewButton("Use this radiation", func() {
		w := u.waveSel.Selected
		var rad *scanfile.Radiation
		switch w {
		case "from the file":
			w = ""
		case "typed in Å":
			w = strings.TrimSpace(u.waveEntry.Text)
			fallthrough
		default:
			r, err := scanfile.ParseRadiation(w)
			if err != nil {
				u.showError("The wavelength is not usable", err, "Type a wavelength in Å between 0.1 and 5, e.g. 1.5405929, or pick an anode.")
				return
			}
			rad = &r
		}
		u.app.Preferences().SetString("wavelength", w)
		if u.m.Scan() == nil {
			return
		}
		s := u.m.Settings.Clone()
		s.Radiation = rad
		u.openWith(u.m.Path, s, 0, nil)
	})
	recentBox := container.NewVBox()
	u.fillRecent(recentBox)
	form := widget.NewForm(
		widget.NewFormItem("Radiation", container.NewBorder(nil, nil, u.waveSel, apply, u.waveEntry)),
	)
	return container.NewVScroll(container.NewVBox(
		widget.NewLabelWithStyle("The scan", fyne.TextAlignLeading, fyne.TextStyle{Bold: true}),
		u.scanInfo, form,
		widget.NewLabelWithStyle("Recent scans", fyne.TextAlignLeading, fyne.TextStyle{Bold: true}),
		recentBox,
	))
}

func (u *ui) fillRecent(box *fyne.Container) {
	box.RemoveAll()
	for _, p := range u.recent() {
		p := p
		if !fileExists(p) {
			continue
		}
		b := widget.NewButton(filepath.Base(p)+"   ("+filepath.Dir(p)+")", func() { u.open(p) })
		b.Alignment = widget.ButtonAlignLeading
		box.Add(b)
	}
	if len(box.Objects) == 0 {
		box.Add(widget.NewLabel("none yet"))
	}
}

// refreshScan shows the scan's facts.
func (u *ui) refreshScan() {
	s := u.m.Scan()
	if s == nil {
		return
	}
	lo, hi := s.Range()
	r := u.m.Ext.Result.Radiation
	u.scanInfo.SetText(fmt.Sprintf("file       %s\nSHA-256    %s\npoints     %d, %.3f–%.3f° 2θ, step %.4f°\nradiation  %s, λ(Kα1) %.7f Å\npeaks      %d extracted",
		u.m.Path, s.SHA256, s.Len(), lo, hi, s.Step(), r.Name, r.Lambda1, len(u.m.Ext.Result.Peaks)))
}

// peakColumns are the peak table's columns.
var peakColumns = []string{"keep", "#", "2θ (°)", "d (Å)", "height", "I/I₀ (%)", "FWHM (°)", "η", "S/N", "hkl", "flags"}

// peakCell returns the text of a peak table cell (row ≥ 1) and, for the
// first column, whether the peak is kept.
func (u *ui) peakCell(row, col int) (string, bool) {
	a := u.m.A
	if a == nil || row < 1 || row > len(a.Peaks) {
		return "", false
	}
	i := row - 1
	p := a.Peaks[i]
	switch col {
	case 0:
		return "", !p.Rejected && !p.Companion()
	case 1:
		return strconv.Itoa(i + 1), false
	case 2:
		return esd.Format(p.TwoTheta, p.TwoThetaESD), false
	case 3:
		return esd.Format(p.D, p.DESD), false
	case 4:
		return fmt.Sprintf("%.0f", p.Height), false
	case 5:
		return fmt.Sprintf("%.1f", a.RelativeHeight(i)), false
	case 6:
		return fmt.Sprintf("%.4f", p.FWHM), false
	case 7:
		return fmt.Sprintf("%.2f", p.Eta), false
	case 8:
		return fmt.Sprintf("%.0f", p.SNR), false
	case 9:
		if c := u.m.Solution(); c != nil {
			if l, _, ok := c.Line(p.TwoTheta); ok && l.Indexed {
				return report.HKLText(l.HKL), false
			}
		}
		return "", false
	case 10:
		note := p.Flags.String()
		if p.Companion() {
			note = fmt.Sprintf("K-beta of %d", p.Parent+1)
		}
		if p.Rejected {
			note = strings.TrimSpace("rejected " + note)
		}
		return note, false
	}
	return "", false
}

// checkCell is a table cell that shows either a check box or a label.
func checkCell() fyne.CanvasObject {
	c := widget.NewCheck("", nil)
	l := widget.NewLabel("")
	l.Truncation = fyne.TextTruncateEllipsis
	return container.NewStack(c, l)
}

// checkTable makes a table whose row 0 holds the column titles and whose
// first column is a check box: cell gives a cell's text, or for column 0
// the box's state and whether it may change; toggle is called with the
// row (≥ 1) when the user ticks or unticks it.
func (u *ui) checkTable(titles []string, rows func() int, cell func(row, col int) (string, bool), enabled func(row int) bool, toggle func(row int)) *widget.Table {
	t := widget.NewTable(
		func() (int, int) { return rows() + 1, len(titles) },
		checkCell,
		func(id widget.TableCellID, o fyne.CanvasObject) {
			st := o.(*fyne.Container)
			c, l := st.Objects[0].(*widget.Check), st.Objects[1].(*widget.Label)
			c.OnChanged = nil
			if id.Row == 0 {
				c.Hide()
				l.Show()
				l.TextStyle = fyne.TextStyle{Bold: true}
				l.SetText(titles[id.Col])
				return
			}
			l.TextStyle = fyne.TextStyle{}
			text, on := cell(id.Row, id.Col)
			if id.Col != 0 {
				c.Hide()
				l.Show()
				l.SetText(text)
				return
			}
			l.Hide()
			c.Show()
			c.SetChecked(on)
			if enabled(id.Row) {
				c.Enable()
			} else {
				c.Disable()
			}
			row := id.Row
			c.OnChanged = func(bool) {
				if !u.refreshing {
					toggle(row)
				}
			}
		})
	t.StickyRowCount = 1
	return t
}

func (u *ui) peaksStep() fyne.CanvasObject {
	u.peakTable = u.checkTable(peakColumns,
		func() int {
			if u.m.A == nil {
				return 0
			}
			return len(u.m.A.Peaks)
		},
		u.peakCell,
		func(row int) bool {
			p := u.m.A.Peaks[row-1]
			return !p.Companion() || p.Rejected
		},
		func(row int) { u.togglePeak(row - 1) })
	for i, w := range []float32{64, 40, 120, 130, 80, 80, 96, 50, 60, 150, 170} {
		u.peakTable.SetColumnWidth(i, w)
	}
	hint := widget.NewLabel("Untick a peak (or click its marker in the pattern) to leave it out of the indexing; click an empty spot of the pattern near a maximum to add a peak there. Undo: Ctrl+Z, redo: Ctrl+Y.")
	hint.Wrapping = fyne.TextWrapWord
	return container.NewBorder(hint, nil, nil, nil, u.peakTable)
}

// cellColumn is a column of the candidate table.
type cellColumn struct {
	title string
	width float32
	text  func(u *ui, c *analysis.Candidate) string
}

// paramColumn shows one cell parameter with its esd.
func paramColumn(title string, i int) cellColumn {
	return cellColumn{title, 120, func(u *ui, c *analysis.Candidate) string {
		p, e := c.Cell().Params(), c.Covariance().ESD().Values()
		if e[i] > 0 {
			return esd.Format(p[i], e[i])
		}
		if i >= 3 {
			return fmt.Sprintf("%.3f", p[i])
		}
		return fmt.Sprintf("%.5f", p[i])
	}}
}

// cellColumns are the candidate table's columns for the candidates shown:
// b, α, β and γ only when some candidate's system leaves them free.
func (u *ui) cellColumns() []cellColumn {
	free := map[string]bool{}
	if u.m.A != nil {
		for _, c := range u.m.A.Candidates {
			for _, n := range c.Cell().System.FreeNames() {
				free[n] = true
			}
		}
	}
	cols := []cellColumn{
		{"#", 36, func(_ *ui, c *analysis.Candidate) string { return strconv.Itoa(c.Rank) }},
		{"system", 110, func(_ *ui, c *analysis.Candidate) string { return c.Cell().System.String() }},
		{"centring", 70, func(_ *ui, c *analysis.Candidate) string { return c.Cell().Centring.String() }},
		paramColumn("a (Å)", 0),
	}
	for i, p := range []struct {
		name, title string
	}{{"b", "b (Å)"}, {"c", "c (Å)"}, {"alpha", "α (°)"}, {"beta", "β (°)"}, {"gamma", "γ (°)"}} {
		if free[p.name] || p.name == "c" {
			cols = append(cols, paramColumn(p.title, i+1))
		}
	}
	return append(cols,
		cellColumn{"V (Å³)", 110, func(_ *ui, c *analysis.Candidate) string { v, e := c.Volume(); return esd.Format(v, e) }},
		cellColumn{"probability", 90, func(_ *ui, c *analysis.Candidate) string { return report.Percent(c.Probability) }},
		cellColumn{"M_N", 64, func(_ *ui, c *analysis.Candidate) string { return fmt.Sprintf("%.1f", c.M) }},
		cellColumn{"F_N", 64, func(_ *ui, c *analysis.Candidate) string { return fmt.Sprintf("%.1f", c.FN) }},
		cellColumn{"indexed", 70, func(_ *ui, c *analysis.Candidate) string {
			return fmt.Sprintf("%d/%d", c.Indexed, c.Indexed+c.Unindexed)
		}},
		cellColumn{"Z", 100, func(_ *ui, c *analysis.Candidate) string {
			if c.Contents == nil {
				return ""
			}
			z := strconv.Itoa(c.Contents.Z)
			if !c.Contents.Whole {
				z += " (not whole)"
			}
			return z
		}},
	)
}

func (u *ui) cellsStep() fyne.CanvasObject {
	u.cellTable = widget.NewTable(
		func() (int, int) {
			n := 0
			if u.m.A != nil {
				n = len(u.m.A.Candidates)
			}
			return n + 1, len(u.cellCols)
		},
		func() fyne.CanvasObject { return widget.NewLabel("") },
		func(id widget.TableCellID, o fyne.CanvasObject) {
			l := o.(*widget.Label)
			if id.Col >= len(u.cellCols) {
				l.SetText("")
				return
			}
			if id.Row == 0 {
				l.TextStyle = fyne.TextStyle{Bold: true}
				l.SetText(u.cellCols[id.Col].title)
				return
			}
			l.TextStyle = fyne.TextStyle{}
			if u.m.A == nil || id.Row > len(u.m.A.Candidates) {
				l.SetText("")
				return
			}
			l.SetText(u.cellCols[id.Col].text(u, &u.m.A.Candidates[id.Row-1]))
		})
	u.cellTable.StickyRowCount = 1
	u.setCellColumns()
	u.cellTable.OnSelected = func(id widget.TableCellID) {
		if u.refreshing || id.Row < 1 || u.m.A == nil || id.Row-1 == u.m.Selected {
			return
		}
		u.m.Select(id.Row - 1)
		c := u.m.Solution().Cell()
		u.setStatus("showing candidate %d: %s %s", id.Row, c.System, c.Centring)
		u.refreshAll()
		u.saveAutosave()
	}
	u.runBtn = widget.NewButton("Recompute (F5)", u.recompute)
	u.autoLabel = widget.NewLabel("Cells follow every peak edit while a run takes under half a second. Select a row to show its ticks and indices.")
	u.autoLabel.Wrapping = fyne.TextWrapWord
	bar := container.NewHBox(u.runBtn)
	u.searchLabel = widget.NewLabel("")
	u.searchLabel.Wrapping = fyne.TextWrapWord
	return container.NewBorder(container.NewVBox(bar, u.autoLabel), u.searchLabel, nil, nil, u.cellTable)
}

// setCellColumns chooses the candidate table's columns for the current
// candidates and sets their widths.
func (u *ui) setCellColumns() {
	u.cellCols = u.cellColumns()
	for i, c := range u.cellCols {
		u.cellTable.SetColumnWidth(i, c.width)
	}
}

var resColumns = []string{"in fit", "hkl", "2θ obs (°)", "2θ calc (°)", "Δ2θ (°)", "Δ/σ", "note"}

func (u *ui) resCell(row, col int) (string, bool) {
	c := u.m.Solution()
	if c == nil || c.Refined == nil || row < 1 || row > len(c.Refined.Residuals) {
		return "", false
	}
	r := c.Refined.Residuals[row-1]
	switch col {
	case 0:
		return "", !r.Excluded
	case 1:
		return report.HKLText(r.HKL), false
	case 2:
		return esd.Format(r.TwoTheta, r.ESD), false
	case 3:
		return fmt.Sprintf("%.4f", r.TwoThetaCalc), false
	case 4:
		return fmt.Sprintf("%+.4f", r.Delta), false
	case 5:
		return fmt.Sprintf("%+.1f", r.Sigmas), false
	case 6:
		switch {
		case r.Excluded:
			return "excluded", false
		case r.Flagged:
			return fmt.Sprintf("beyond %g esd", c.Refined.FlagLimit), false
		}
	}
	return "", false
}

func (u *ui) refineStep() fyne.CanvasObject {
	setCorr := func(bool) {
		if u.refreshing {
			return
		}
		var c refine.Corrections
		if u.zeroCheck.Checked {
			c |= refine.Zero
		}
		if u.dispCheck.Checked {
			c |= refine.Displacement
		}
		u.m.Change(func(s *analysis.Settings) { s.Corrections = &c })
		u.edited()
	}
	u.zeroCheck = widget.NewCheck("zero shift", setCorr)
	u.dispCheck = widget.NewCheck("sample displacement", setCorr)
	// Automatic: the data choose the model; unticked, the model the
	// data chose last becomes the fixed starting point.
	u.autoCheck = widget.NewCheck("chosen from the data", func(on bool) {
		if u.refreshing {
			return
		}
		c := refine.DefaultCorrections
		if !on {
			c = refine.Zero
			if sol := u.m.Solution(); sol != nil && sol.Refined != nil {
				c = sol.Refined.ChosenCorrections()
			}
		}
		u.m.Change(func(s *analysis.Settings) { s.Corrections = &c })
		u.syncFields()
		u.edited()
	})
	u.radiusEntry = widget.NewEntry()
	u.radiusEntry.OnSubmitted = func(t string) {
		r, err := strconv.ParseFloat(strings.TrimSpace(t), 64)
		if err != nil || !(r > 0) {
			u.showError("The goniometer radius is not usable", fmt.Errorf("%q", t), "Type the radius of your goniometer in mm, e.g. 240.")
			return
		}
		u.m.Change(func(s *analysis.Settings) { s.Radius = r })
		u.edited()
	}
	u.scalingSel = widget.NewSelect([]string{refine.ScaleSignificant.String(), refine.ScaleAboveOne.String(), refine.ScaleAlways.String(), refine.ScaleNever.String()}, func(v string) {
		if u.refreshing || u.m.Scan() == nil {
			return
		}
		sc, err := refine.ParseScaling(v)
		if err != nil {
			return
		}
		u.m.Change(func(s *analysis.Settings) { s.Scaling = sc })
		u.edited()
	})
	u.standardEntry = widget.NewEntry()
	u.standardEntry.SetPlaceHolder("none; or Si, LaB6, Si-640d, or a cell such as cubic F a=5.43119")
	u.standardEntry.OnSubmitted = func(t string) {
		t = strings.TrimSpace(t)
		var st *refine.Standard
		if t != "" && !strings.EqualFold(t, "none") {
			v, err := refine.ParseStandard(t)
			if err != nil {
				u.showError("The internal standard is not usable", err, "Name a built-in standard (Si, LaB6, Si-640c, Si-640d, LaB6-660a, LaB6-660c) or type its cell, e.g. cubic F a=5.43119(1).")
				return
			}
			st = &v
		}
		u.m.Change(func(s *analysis.Settings) {
			s.Standard = st
			if st != nil && s.Corrections != nil && *s.Corrections == refine.None {
				c := refine.Zero | refine.Displacement
				s.Corrections = &c
			}
		})
		u.syncFields()
		u.edited()
	}
	u.paramsText = widget.NewLabel("")
	u.paramsText.TextStyle = fyne.TextStyle{Monospace: true}
	u.paramsText.Wrapping = fyne.TextWrapWord
	u.resTable = u.checkTable(resColumns,
		func() int {
			if c := u.m.Solution(); c != nil && c.Refined != nil {
				return len(c.Refined.Residuals)
			}
			return 0
		},
		u.resCell,
		func(int) bool { return true },
		func(row int) {
			u.m.ToggleExcluded(u.m.Solution().Refined.Residuals[row-1].TwoTheta)
			u.edited()
		})
	for i, w := range []float32{64, 120, 120, 100, 90, 60, 110} {
		u.resTable.SetColumnWidth(i, w)
	}
	u.cellEntry = widget.NewEntry()
	u.cellEntry.SetPlaceHolder("refine a cell you know, e.g. cubic F a=8.08 (Enter)")
	u.cellEntry.OnSubmitted = u.refineTyped
	u.phasesEntry = widget.NewEntry()
	u.phasesEntry.SetPlaceHolder("none; or cells separated by ;, e.g. cubic F a=5.43119")
	u.phasesEntry.OnSubmitted = func(string) { u.fitWhole() }
	u.phaseSel = widget.NewSelect(nil, func(v string) {
		if u.refreshing || v == "" {
			return
		}
		// The choice's cell text joins the further phases.
		if i := strings.Index(v, ": "); i >= 0 {
			t := strings.TrimSpace(u.phasesEntry.Text)
			if t != "" {
				t += "; "
			}
			u.phasesEntry.SetText(t + v[i+2:])
		}
		u.refreshing = true
		u.phaseSel.ClearSelected()
		u.refreshing = false
	})
	u.phaseSel.PlaceHolder = "add a candidate as a phase"
	u.fitBtn = widget.NewButtonWithIcon("Fit the whole pattern", theme.MediaPlayIcon(), u.fitWhole)
	form := widget.NewForm(
		widget.NewFormItem("Typed cell", u.cellEntry),
		widget.NewFormItem("Whole pattern", container.NewHBox(u.fitBtn)),
		widget.NewFormItem("Further phases", container.NewBorder(nil, nil, nil, u.phaseSel, u.phasesEntry)),
		widget.NewFormItem("Corrections", container.NewHBox(u.autoCheck, u.zeroCheck, u.dispCheck)),
	)
	// The settings changed less often fold away, so that the summary
	// below has the room.
	more := widget.NewAccordion(widget.NewAccordionItem("Radius, esd scaling and internal standard", widget.NewForm(
		widget.NewFormItem("Goniometer radius (mm)", u.radiusEntry),
		widget.NewFormItem("Scale esds by χ²_red", u.scalingSel),
		widget.NewFormItem("Internal standard", u.standardEntry),
	)))
	left := container.NewBorder(container.NewVBox(form, more), nil, nil, nil, container.NewVScroll(u.paramsText))
	split := container.NewHSplit(left, u.resTable)
	split.Offset = 0.42
	return split
}

// refineTyped refines a cell typed in the cell text form (the form every
// cell the program prints takes) against the scan's lines, with the
// current settings, and shows the result beside the candidates'.
func (u *ui) refineTyped(text string) {
	text = strings.TrimSpace(text)
	if text == "" || u.m.Ext == nil {
		return
	}
	c, _, err := cell.Parse(text)
	if err != nil {
		u.showError("The cell is not usable", err, "Type the system, the centring and the free parameters, e.g. tetragonal I a=3.98 c=9.55 or monoclinic C a=9.41 b=5.38 c=6.12 beta=102.4; every cell the program shows can be pasted here.")
		return
	}
	// Off the UI thread, on copies: the bootstrap of the corrections'
	// choice takes a while.
	ext, settings := u.m.Ext.Clone(), u.m.Settings.Clone()
	var r *refine.Result
	u.work("refining the typed cell…", func(ctx context.Context, _ analysis.Progress) (err error) {
		r, err = analysis.RefineCell(ctx, ext, c, settings)
		return err
	}, func(err error) {
		if errors.Is(err, context.Canceled) {
			u.setStatus("stopped; the typed cell was not refined")
			return
		}
		if err != nil {
			u.showError("The typed cell could not be refined", err, "Check that the cell is close to the lines (within about 1 % in d) and that the wavelength on the Scan step is right.")
			return
		}
		var b strings.Builder
		fmt.Fprintf(&b, "typed cell %s\n", text)
		b.WriteString(report.Text(report.RefinementRows(r)))
		for _, w := range r.Warnings {
			fmt.Fprintf(&b, "note: %s\n", w)
		}
		u.paramsText.SetText(b.String())
		u.progress.Set(1)
		u.setStatus("typed cell refined: %s", cell.Format(r.Cell, r.ESD))
	})
}

// paramsSummary describes the chosen candidate's refinement.
func (u *ui) paramsSummary() string {
	c := u.m.Solution()
	if c == nil {
		return "No cell yet."
	}
	ce := c.Cell()
	head := fmt.Sprintf("%s %s  (candidate %d)\n", ce.System, ce.Centring, u.m.Selected+1)
	if c.Refined == nil {
		return head + fmt.Sprintf("not refined: %v\n", c.RefineErr)
	}
	var b strings.Builder
	b.WriteString(head)
	b.WriteString(report.Text(append(append(report.CellSourceRows(c), report.RefinementRows(c.Refined)...),
		report.Row{Label: "figures of merit", Value: fmt.Sprintf("M_N %.1f, F_N %.1f (%.4f°, %d) with N = %d", c.M, c.FN, c.FNMeanDiff, c.FNPossible, c.FigureLines)})))
	for _, w := range c.Refined.Warnings {
		fmt.Fprintf(&b, "note: %s\n", w)
	}
	if pf := report.PatternOf(u.m.A, c); pf != nil {
		b.WriteString("\nwhole-pattern fit\n")
		b.WriteString(report.Text(report.PatternRows(pf)))
	}
	return b.String()
}

// fillPhaseChoices lists the candidates other than the chosen one as
// further phases of a whole-pattern fit.
func (u *ui) fillPhaseChoices() {
	var opts []string
	if a := u.m.A; a != nil {
		for i := range a.Candidates {
			if i != a.Chosen {
				opts = append(opts, fmt.Sprintf("candidate %d: %s", i+1, a.Candidates[i].Cell()))
			}
		}
	}
	u.phaseSel.SetOptions(opts)
}

// fitWhole fits every point of the scan with the chosen cell and the
// further phases typed, off the UI thread; the fit joins the analysis
// it was made for (an edit made meanwhile drops it, as it drops every
// result of the analysis it supersedes).
func (u *ui) fitWhole() {
	a := u.m.A
	c := a.ChosenCandidate()
	if c == nil || u.m.Ext == nil {
		u.showError("There is no cell to fit", fmt.Errorf("no candidate cell"), "Index the lines first, or refine a typed cell and choose it.")
		return
	}
	cells := []cell.Cell{c.Cell()}
	for _, t := range strings.Split(u.phasesEntry.Text, ";") {
		if t = strings.TrimSpace(t); t == "" || strings.EqualFold(t, "none") {
			continue
		}
		pc, _, err := cell.Parse(t)
		if err != nil {
			u.showError("A further phase is not usable", fmt.Errorf("%q: %w", t, err), "Type each further phase's cell as the program prints cells, e.g. cubic F a=5.43119, separated by semicolons.")
			return
		}
		cells = append(cells, pc)
	}
	ext, settings := u.m.Ext.Clone(), u.m.Settings.Clone()
	var pf *analysis.PatternFit
	u.work("fitting the whole pattern…", func(ctx context.Context, progress analysis.Progress) (err error) {
		pf, err = analysis.FitPattern(ctx, ext, cells, settings, progress)
		return err
	}, func(err error) {
		switch {
		case errors.Is(err, context.Canceled):
			u.setStatus("stopped; the whole pattern was not fitted")
			return
		case err != nil:
			u.showError("The whole pattern could not be fitted", err, "A whole-pattern fit needs cells whose lines lie within about 1 % in d of the peaks; check the further phases and the wavelength. The previous result stays.")
			return
		case u.m.A != a || a.Chosen != u.m.Selected:
			u.setStatus("the analysis changed while the pattern was fitted: press Fit the whole pattern again")
			return
		}
		a.Pattern = pf
		u.refreshAll()
		u.setStatus("whole-pattern fit: Rwp %.2f %%, Rexp %.2f %%, GoF %.3f (%d phase(s))", 100*pf.Fit.Rwp, 100*pf.Fit.Rexp, pf.Fit.GoF, len(pf.Fit.Phases))
	})
}

func (u *ui) contentsStep() fyne.CanvasObject {
	u.formulaEntry = widget.NewEntry()
	u.formulaEntry.SetPlaceHolder("e.g. MgAl2O4, Fe0.95O, CuSO4·5H2O")
	u.densityEntry = widget.NewEntry()
	u.densityEntry.SetPlaceHolder("g/cm³ with esd, e.g. 3.58(2)")
	u.zEntry = widget.NewEntry()
	u.zEntry.SetPlaceHolder("optional: formula units per cell")
	apply := widget.NewButton("Work out the contents", u.applyContents)
	u.formulaEntry.OnSubmitted = func(string) { u.applyContents() }
	u.densityEntry.OnSubmitted = func(string) { u.applyContents() }
	u.zEntry.OnSubmitted = func(string) { u.applyContents() }
	u.contentsText = widget.NewLabel("")
	u.contentsText.TextStyle = fyne.TextStyle{Monospace: true}
	u.contentsText.Wrapping = fyne.TextWrapWord
	form := widget.NewForm(
		widget.NewFormItem("Formula", u.formulaEntry),
		widget.NewFormItem("Measured density", u.densityEntry),
		widget.NewFormItem("Z", u.zEntry),
	)
	return container.NewBorder(container.NewVBox(form, apply), nil, nil, nil, container.NewVScroll(u.contentsText))
}

// applyContents takes the formula, density and Z fields into the settings.
func (u *ui) applyContents() {
	ft := strings.TrimSpace(u.formulaEntry.Text)
	dt := strings.TrimSpace(u.densityEntry.Text)
	zt := strings.TrimSpace(u.zEntry.Text)
	z := 0
	if zt != "" {
		v, err := strconv.Atoi(zt)
		if err != nil || v < 1 {
			u.showError("Z is not usable", fmt.Errorf("%q", zt), "Type a whole number of formula units per cell, or leave Z empty (a measured density then decides it, or the plausible values are listed).")
			return
		}
		z = v
	}
	var f *density.Formula
	if ft != "" {
		v, err := density.ParseFormula(ft)
		if err != nil {
			u.showError("The formula is not usable", err, "Element symbols start with a capital (Co, not CO); counts may be decimal (Fe0.95O); hydrates use · or * (CuSO4·5H2O).")
			return
		}
		f = &v
	}
	var m *density.Measured
	if dt != "" {
		v, err := density.ParseMeasured(dt)
		if err != nil {
			u.showError("The density is not usable", err, "Type the measured density in g/cm³ with its esd, e.g. 3.58(2).")
			return
		}
		m = &v
	}
	if f == nil && (m != nil || z != 0) {
		u.showError("The contents need a formula", fmt.Errorf("a density or Z without a formula gives no contents"), "Type the formula of one formula unit, e.g. MgAl2O4.")
		return
	}
	if f != nil && m == nil && z == 0 {
		u.showError("The contents need a density or Z", fmt.Errorf("formula %s alone gives no number of formula units", ft), "Type the measured density (e.g. 3.58(2) g/cm³) or Z.")
		return
	}
	u.m.Change(func(st *analysis.Settings) { st.Formula, st.Density, st.Z = f, m, z })
	u.edited()
}

// contentsSummary describes the chosen candidate's contents.
func (u *ui) contentsSummary() string {
	cand := u.m.Solution()
	if cand == nil {
		return ""
	}
	if cand.Contents == nil {
		if cand.ContentsErr != nil {
			return fmt.Sprintf("No contents: %v", cand.ContentsErr)
		}
		return "Type a formula to see the X-ray density for each plausible Z; add a measured density (or Z) to fix the formula units per cell."
	}
	ce := cand.Cell()
	return fmt.Sprintf("%s %s cell\n", ce.System, ce.Centring) + report.Text(report.ContentsRows(cand.Contents, *u.m.Settings.Formula, u.m.Settings.Density))
}

// cellText is the chosen cell as the clipboard receives it: its text
// form, which --cell and the cell entries read back.
func (u *ui) cellText() string {
	c := u.m.Solution()
	if c == nil {
		return ""
	}
	return cell.Format(c.Cell(), c.Covariance().ESD())
}
