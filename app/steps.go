package main

import (
	"fmt"
	"path/filepath"
	"slices"
	"strconv"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/widget"

	"reticle/peaks"
	"reticle/refine"
	"reticle/report"
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
		switch w {
		case "from the file":
			w = ""
		case "typed in Å":
			w = strings.TrimSpace(u.waveEntry.Text)
			if _, err := peaks.ParseRadiation(w); err != nil {
				u.showError("The wavelength is not usable", err, "Type a wavelength in Å between 0.1 and 5, e.g. 1.5405929, or pick an anode.")
				return
			}
		}
		u.app.Preferences().SetString("wavelength", w)
		if u.m.Scan == nil {
			return
		}
		s := cloneSettings(u.m.Settings)
		s.Wavelength = w
		u.openWith(u.m.Path, s, 0)
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
	s := u.m.Scan
	if s == nil {
		return
	}
	lo, hi := s.Range()
	r := u.m.Ext.Result.Radiation
	u.scanInfo.SetText(fmt.Sprintf("file       %s\nSHA-256    %s\npoints     %d, %.3f–%.3f° 2θ, step %.4f°\nradiation  %s, λ(Kα1) %.7f Å\npeaks      %d extracted",
		u.m.Path, s.SHA256, s.Len(), lo, hi, s.Step(), r.Name, r.Lambda1, len(u.m.Ext.Result.Peaks)))
}

// peakColumns are the peak table's columns.
var peakColumns = []string{"keep", "#", "2θ (°)", "d (Å)", "height", "FWHM (°)", "S/N", "hkl", "note"}

// peakCell returns the text of a peak table cell (row ≥ 1) and, for the
// first column, whether the peak is kept.
func (u *ui) peakCell(row, col int) (string, bool) {
	doc := u.m.Doc
	if doc == nil || row < 1 || row > len(doc.Peaks) {
		return "", false
	}
	i := row - 1
	p := doc.Peaks[i]
	hkl := ""
	if s := u.m.Solution(); s != nil {
		for _, l := range s.Lines {
			if l.Indexed && l.TwoTheta == p.TwoTheta {
				hkl = report.HKLText(l.HKL)
			}
		}
	}
	note := ""
	switch {
	case p.CompanionOf != nil:
		note = fmt.Sprintf("K-beta of %d", *p.CompanionOf+1)
	case strings.Contains(p.Flags, "user-added"):
		note = "added"
	}
	if p.Rejected {
		note = strings.TrimSpace("rejected " + note)
	}
	switch col {
	case 0:
		return "", !p.Rejected && p.CompanionOf == nil
	case 1:
		return strconv.Itoa(i + 1), false
	case 2:
		return peaks.FormatESD(p.TwoTheta, p.TwoThetaESD), false
	case 3:
		return peaks.FormatESD(p.D, p.DESD), false
	case 4:
		return fmt.Sprintf("%.0f", p.Height), false
	case 5:
		return fmt.Sprintf("%.4f", p.FWHM), false
	case 6:
		return fmt.Sprintf("%.0f", p.SNR), false
	case 7:
		return hkl, false
	case 8:
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
			if u.m.Doc == nil {
				return 0
			}
			return len(u.m.Doc.Peaks)
		},
		u.peakCell,
		func(row int) bool {
			p := u.m.Doc.Peaks[row-1]
			return p.CompanionOf == nil || p.Rejected
		},
		func(row int) { u.togglePeak(row - 1) })
	for i, w := range []float32{64, 40, 120, 130, 80, 96, 60, 150, 160} {
		u.peakTable.SetColumnWidth(i, w)
	}
	hint := widget.NewLabel("Untick a peak (or click its marker in the pattern) to leave it out of the indexing; click an empty spot of the pattern near a maximum to add a peak there. Undo: Ctrl+Z, redo: Ctrl+Y.")
	hint.Wrapping = fyne.TextWrapWord
	return container.NewBorder(hint, nil, nil, nil, u.peakTable)
}

var cellColumns = []string{"#", "system", "", "a (Å)", "c (Å)", "V (Å³)", "M20", "F_N", "indexed", "Z"}

// cellCell returns the text of a candidate table cell (row ≥ 1).
func (u *ui) cellCell(row, col int) string {
	doc := u.m.Doc
	if doc == nil || row < 1 || row > len(doc.Solutions) {
		return ""
	}
	s := doc.Solutions[row-1]
	switch col {
	case 0:
		return strconv.Itoa(s.Rank)
	case 1:
		return s.System
	case 2:
		return s.Centring
	case 3:
		if s.Refined != nil {
			return peaks.FormatESD(s.A, s.AESD)
		}
		return fmt.Sprintf("%.5f", s.A)
	case 4:
		if s.System == "cubic" {
			return ""
		}
		if s.Refined != nil {
			return peaks.FormatESD(s.C, s.CESD)
		}
		return fmt.Sprintf("%.5f", s.C)
	case 5:
		return fmt.Sprintf("%.2f", s.Volume)
	case 6:
		return fmt.Sprintf("%.1f", s.M)
	case 7:
		return fmt.Sprintf("%.1f", s.FN)
	case 8:
		return fmt.Sprintf("%d/%d", s.Indexed, s.Indexed+s.Unindexed)
	case 9:
		if s.Contents == nil {
			return ""
		}
		z := strconv.Itoa(s.Contents.Z)
		if s.Contents.ZWhole != nil && !*s.Contents.ZWhole {
			z += " (not whole)"
		}
		return z
	}
	return ""
}

func (u *ui) cellsStep() fyne.CanvasObject {
	u.cellTable = widget.NewTable(
		func() (int, int) {
			if u.m.Doc == nil {
				return 1, len(cellColumns)
			}
			return len(u.m.Doc.Solutions) + 1, len(cellColumns)
		},
		func() fyne.CanvasObject { return widget.NewLabel("") },
		func(id widget.TableCellID, o fyne.CanvasObject) {
			l := o.(*widget.Label)
			if id.Row == 0 {
				l.TextStyle = fyne.TextStyle{Bold: true}
				l.SetText(cellColumns[id.Col])
				return
			}
			l.TextStyle = fyne.TextStyle{}
			l.SetText(u.cellCell(id.Row, id.Col))
		})
	u.cellTable.StickyRowCount = 1
	for i, w := range []float32{36, 110, 30, 130, 130, 90, 70, 70, 80, 110} {
		u.cellTable.SetColumnWidth(i, w)
	}
	u.cellTable.OnSelected = func(id widget.TableCellID) {
		if u.refreshing || id.Row < 1 || u.m.Doc == nil || id.Row-1 == u.m.Selected {
			return
		}
		u.m.Select(id.Row - 1)
		s := u.m.Solution()
		u.setStatus("showing solution %d: %s %s", id.Row, s.System, s.Centring)
		u.refreshAll()
		u.saveAutosave()
	}
	u.progBar = widget.NewProgressBarWithData(u.progress)
	u.cancelBtn = widget.NewButton("Stop", func() {
		u.mu.Lock()
		if u.cancel != nil {
			u.cancel()
		}
		u.mu.Unlock()
	})
	u.cancelBtn.Disable()
	u.runBtn = widget.NewButton("Recompute (F5)", u.recompute)
	u.autoLabel = widget.NewLabel("Cells follow every peak edit while a run takes under half a second. Select a row to show its ticks and indices.")
	u.autoLabel.Wrapping = fyne.TextWrapWord
	bar := container.NewBorder(nil, nil, nil, container.NewHBox(u.runBtn, u.cancelBtn), u.progBar)
	return container.NewBorder(container.NewVBox(bar, u.autoLabel), nil, nil, nil, u.cellTable)
}

var resColumns = []string{"use", "hkl", "2θ obs (°)", "2θ calc (°)", "Δ2θ (°)", "Δ/σ", ""}

func (u *ui) resCell(row, col int) (string, bool) {
	s := u.m.Solution()
	if s == nil || s.Refined == nil || row < 1 || row > len(s.Residuals) {
		return "", false
	}
	r := s.Residuals[row-1]
	switch col {
	case 0:
		return "", !r.Excluded
	case 1:
		return report.HKLText(r.HKL), false
	case 2:
		return peaks.FormatESD(r.TwoTheta, r.ESD), false
	case 3:
		return fmt.Sprintf("%.4f", r.TwoThetaCalc), false
	case 4:
		return fmt.Sprintf("%+.4f", r.Delta), false
	case 5:
		return fmt.Sprintf("%+.1f", r.Norm), false
	case 6:
		switch {
		case r.Excluded:
			return "left out", false
		case r.Flagged:
			return fmt.Sprintf("beyond %g esd", u.m.Doc.Settings.FlagLimit), false
		}
	}
	return "", false
}

func (u *ui) refineStep() fyne.CanvasObject {
	setCorr := func(bool) {
		if u.refreshing {
			return
		}
		var c []string
		if u.zeroCheck.Checked {
			c = append(c, "zero")
		}
		if u.dispCheck.Checked {
			c = append(c, "displacement")
		}
		corr := strings.Join(c, ",")
		if corr == "" {
			corr = "none"
		}
		u.m.Change(func(s *report.Settings) { s.Corrections = corr })
		u.edited()
	}
	u.zeroCheck = widget.NewCheck("zero shift", setCorr)
	u.dispCheck = widget.NewCheck("sample displacement", setCorr)
	u.refreshing = true
	u.zeroCheck.SetChecked(true)
	u.refreshing = false
	u.radiusEntry = widget.NewEntry()
	u.radiusEntry.SetText(strconv.FormatFloat(refine.DefaultRadius, 'g', -1, 64))
	u.radiusEntry.OnSubmitted = func(t string) {
		r, err := strconv.ParseFloat(strings.TrimSpace(t), 64)
		if err != nil || !(r > 0) {
			u.showError("The goniometer radius is not usable", fmt.Errorf("%q", t), "Type the radius of your goniometer in mm, e.g. 240.")
			return
		}
		u.m.Change(func(s *report.Settings) { s.Radius = r })
		u.edited()
	}
	u.scalingSel = widget.NewSelect([]string{"significant", "above-one", "always", "never"}, func(v string) {
		if u.refreshing || u.m.Scan == nil {
			return
		}
		u.m.Change(func(s *report.Settings) { s.Scaling = v })
		u.edited()
	})
	u.refreshing = true
	u.scalingSel.SetSelected("significant")
	u.refreshing = false
	u.paramsText = widget.NewLabel("")
	u.paramsText.TextStyle = fyne.TextStyle{Monospace: true}
	u.paramsText.Wrapping = fyne.TextWrapWord
	u.resTable = u.checkTable(resColumns,
		func() int {
			if s := u.m.Solution(); s != nil && s.Refined != nil {
				return len(s.Residuals)
			}
			return 0
		},
		u.resCell,
		func(int) bool { return true },
		func(row int) {
			u.m.ToggleExcluded(u.m.Solution().Residuals[row-1].TwoTheta)
			u.edited()
		})
	for i, w := range []float32{44, 130, 120, 100, 90, 60, 110} {
		u.resTable.SetColumnWidth(i, w)
	}
	form := widget.NewForm(
		widget.NewFormItem("Refine", container.NewHBox(u.zeroCheck, u.dispCheck)),
		widget.NewFormItem("Goniometer radius (mm)", u.radiusEntry),
		widget.NewFormItem("Scale esds by χ²_red", u.scalingSel),
	)
	left := container.NewBorder(form, nil, nil, nil, container.NewVScroll(u.paramsText))
	split := container.NewHSplit(left, u.resTable)
	split.Offset = 0.42
	return split
}

// paramsSummary describes the chosen solution's refinement.
func (u *ui) paramsSummary() string {
	s := u.m.Solution()
	if s == nil {
		return "No cell yet."
	}
	var b strings.Builder
	fmt.Fprintf(&b, "%s %s  (solution %d)\n", s.System, s.Centring, u.m.Selected+1)
	if s.Refined == nil {
		fmt.Fprintf(&b, "not refined: %s\n", s.RefineError)
		return b.String()
	}
	for _, p := range s.Params {
		note := ""
		if p.FromStandard {
			note = " (internal standard)"
		}
		fmt.Fprintf(&b, "%-13s %s %s%s\n", p.Name, p.Text, p.Unit, note)
	}
	fmt.Fprintf(&b, "%-13s %s Å³\n", "volume", peaks.FormatESD(s.Volume, s.VolumeESD))
	scaled := "not scaled"
	if s.Scaled {
		scaled = "esds scaled by it"
	}
	fmt.Fprintf(&b, "χ²_red %.3f, %d degrees of freedom (%s)\n", s.Chi2Reduced, s.DOF, scaled)
	fmt.Fprintf(&b, "M%d %.1f   F%d %.1f (%.4f°, %d)\n", s.N, s.M, s.N, s.FN, s.FNMeanDiff, s.FNPossible)
	if len(s.ParamNames) > 1 {
		b.WriteString("correlations:")
		for i := range s.ParamNames {
			for j := i + 1; j < len(s.ParamNames); j++ {
				fmt.Fprintf(&b, " %s–%s %+.3f", s.ParamNames[i], s.ParamNames[j], s.Correlation[i][j])
			}
		}
		b.WriteString("\n")
	}
	for _, w := range s.Warnings {
		fmt.Fprintf(&b, "note: %s\n", w)
	}
	return b.String()
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
	f := strings.TrimSpace(u.formulaEntry.Text)
	d := strings.TrimSpace(u.densityEntry.Text)
	zt := strings.TrimSpace(u.zEntry.Text)
	z := 0
	if zt != "" {
		v, err := strconv.Atoi(zt)
		if err != nil || v < 1 {
			u.showError("Z is not usable", fmt.Errorf("%q", zt), "Type a whole number of formula units per cell, or leave Z empty and give a measured density.")
			return
		}
		z = v
	}
	s := cloneSettings(u.m.Settings)
	s.Formula, s.Density, s.Z = f, d, z
	if f != "" && d == "" && z == 0 {
		u.showError("The contents need a density or Z", fmt.Errorf("formula %s alone gives no number of formula units", f), "Type the measured density (e.g. 3.58(2) g/cm³) or Z.")
		return
	}
	if _, err := s.Check(); err != nil {
		u.showError("The contents cannot be worked out", err, "Element symbols start with a capital (Co, not CO); counts may be decimal (Fe0.95O); hydrates use · or * (CuSO4·5H2O); the density is in g/cm³ with its esd, e.g. 3.58(2).")
		return
	}
	u.m.Change(func(st *report.Settings) { st.Formula, st.Density, st.Z = f, d, z })
	u.edited()
}

// contentsSummary describes the chosen solution's contents.
func (u *ui) contentsSummary() string {
	s := u.m.Solution()
	if s == nil {
		return ""
	}
	c := s.Contents
	if c == nil {
		return "Type a formula and a measured density (or Z) to see formula units, X-ray density and atoms per cell."
	}
	var b strings.Builder
	fmt.Fprintf(&b, "%s %s cell, %s (M = %s g/mol)\n", s.System, s.Centring, c.Formula, peaks.FormatESD(c.MolarMass, c.MolarMassESD))
	if c.ZEst != nil {
		fmt.Fprintf(&b, "Z from the density   %s", peaks.FormatESD(*c.ZEst, *c.ZEstESD))
		if !*c.ZWhole {
			b.WriteString("  — not whole for this lattice: the cell, formula or density is wrong")
		}
		b.WriteString("\n")
	}
	how := "given"
	if c.ZFromDensity {
		how = "nearest allowed"
	}
	fmt.Fprintf(&b, "Z                    %d (%s; %d lattice point(s), %g per point)\n", c.Z, how, c.LatticePoints, c.UnitsPerLattice)
	fmt.Fprintf(&b, "X-ray density        %s g/cm³\n", c.DensityText)
	if c.Measured != nil {
		fmt.Fprintf(&b, "measured density     %s g/cm³ (%+.1fσ)\n", peaks.FormatESD(*c.Measured, *c.MeasuredESD), *c.Discrepancy)
	}
	fmt.Fprintf(&b, "atoms per cell       %g\n", c.AtomsPerCell)
	fmt.Fprintf(&b, "formula mass / cell  %.3f g/mol\n", c.CellMass)
	return b.String()
}

// cellText is the chosen cell as the clipboard receives it.
func (u *ui) cellText() string {
	s := u.m.Solution()
	if s == nil {
		return ""
	}
	if s.Refined == nil {
		return fmt.Sprintf("%s %s a=%.5f c=%.5f", s.System, s.Centring, s.A, s.C)
	}
	parts := []string{s.System, s.Centring, "a=" + peaks.FormatESD(s.A, s.AESD)}
	switch s.System {
	case "cubic":
	case "orthorhombic":
		parts = append(parts, "b="+peaks.FormatESD(s.B, s.BESD), "c="+peaks.FormatESD(s.C, s.CESD))
	default:
		parts = append(parts, "c="+peaks.FormatESD(s.C, s.CESD))
	}
	return strings.Join(parts, " ") + fmt.Sprintf("  V=%s Å³", peaks.FormatESD(s.Volume, s.VolumeESD))
}
