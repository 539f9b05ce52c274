package main

import (
	"fmt"
	"strconv"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/widget"

	"reticle/analysis"
	"reticle/cell"
	"reticle/refine"
	"reticle/report"
)

// A settingsForm holds the settings dialog's fields: every analysis
// setting of the command line that the steps do not show, and the paper
// size of the report.
type settingsForm struct {
	threshold, background, ka2  *widget.Entry
	systems                     *widget.CheckGroup
	searchLower                 *widget.Check
	weighByPattern              *widget.Check
	tolerance, unindexed, flags *widget.Entry
	transparency                *widget.Check
	paper                       *widget.Select
}

// number formats a setting for its field: empty for the default (0).
func number(v float64) string {
	if v == 0 {
		return ""
	}
	return strconv.FormatFloat(v, 'g', -1, 64)
}

// newSettingsForm fills the fields from the settings, defaults shown as
// placeholders.
func newSettingsForm(s analysis.Settings, paper report.Paper) *settingsForm {
	def := analysis.Settings{}.Resolved(nil)
	entry := func(v, d float64, unit string) *widget.Entry {
		e := widget.NewEntry()
		e.SetText(number(v))
		e.SetPlaceHolder(fmt.Sprintf("default %s %s", strconv.FormatFloat(d, 'g', -1, 64), unit))
		return e
	}
	f := &settingsForm{
		threshold:  entry(s.Threshold, def.Threshold, "esd"),
		background: entry(s.BackgroundWidth, def.BackgroundWidth, "° 2θ"),
		ka2:        entry(s.KAlpha2Ratio, def.KAlpha2Ratio, ""),
		tolerance:  entry(s.Tolerance, def.Tolerance, "° 2θ"),
		flags:      entry(s.FlagLimit, def.FlagLimit, "esd"),
	}
	f.unindexed = widget.NewEntry()
	f.unindexed.SetPlaceHolder("default: a share of the lines")
	switch {
	case s.Unindexed > 0:
		f.unindexed.SetText(strconv.Itoa(s.Unindexed))
	case s.Unindexed < 0:
		f.unindexed.SetText("0")
	}
	var names, on []string
	for _, sys := range cell.Systems {
		names = append(names, sys.String())
	}
	f.systems = widget.NewCheckGroup(names, nil)
	f.systems.Horizontal = true
	if len(s.Systems) == 0 {
		on = names
	}
	for _, sys := range s.Systems {
		on = append(on, sys.String())
	}
	f.systems.SetSelected(on)
	f.searchLower = widget.NewCheck("search the lower systems even when a higher cell explains the lines", nil)
	f.searchLower.SetChecked(s.SearchLower)
	f.weighByPattern = widget.NewCheck("weigh the close candidates by the whole pattern's weak lines", nil)
	f.weighByPattern.SetChecked(!s.LinesOnly)
	f.transparency = widget.NewCheck("refine the sample transparency too", nil)
	f.transparency.SetChecked(s.Corrections != nil && s.Corrections.Has(refine.Transparency))
	f.paper = widget.NewSelect([]string{string(report.A4), string(report.Letter)}, nil)
	f.paper.SetSelected(string(paper))
	return f
}

// items lays the fields out under headings.
func (f *settingsForm) items() []*widget.FormItem {
	head := func(t string) *widget.FormItem {
		l := widget.NewLabel(t)
		l.TextStyle = fyne.TextStyle{Bold: true}
		return widget.NewFormItem("", l)
	}
	note := widget.NewLabel("When these change, the peaks are found again and Undo starts anew.")
	note.Importance = widget.LowImportance
	return []*widget.FormItem{
		head("Peaks"),
		widget.NewFormItem("", note),
		widget.NewFormItem("Detection threshold (esd)", f.threshold),
		widget.NewFormItem("Background width (° 2θ)", f.background),
		widget.NewFormItem("Kα2/Kα1 ratio", f.ka2),
		head("Cells"),
		widget.NewFormItem("Systems searched", f.systems),
		widget.NewFormItem("", f.searchLower),
		widget.NewFormItem("", f.weighByPattern),
		widget.NewFormItem("Tolerance (° 2θ)", f.tolerance),
		widget.NewFormItem("Unindexed lines allowed", f.unindexed),
		head("Refinement"),
		widget.NewFormItem("", f.transparency),
		widget.NewFormItem("Flag limit (esd)", f.flags),
		head("Report"),
		widget.NewFormItem("Paper size", f.paper),
	}
}

// apply returns the settings s with the fields' values, or an error
// naming the field at fault.
func (f *settingsForm) apply(s analysis.Settings) (analysis.Settings, report.Paper, error) {
	s = s.Clone()
	read := func(name string, e *widget.Entry, to *float64) error {
		t := strings.TrimSpace(e.Text)
		if t == "" {
			*to = 0
			return nil
		}
		v, err := strconv.ParseFloat(t, 64)
		if err != nil || !(v > 0) {
			return fmt.Errorf("%s: want a positive number, got %q", name, t)
		}
		*to = v
		return nil
	}
	for _, x := range []struct {
		name string
		e    *widget.Entry
		to   *float64
	}{
		{"Detection threshold", f.threshold, &s.Threshold},
		{"Background width", f.background, &s.BackgroundWidth},
		{"Kα2/Kα1 ratio", f.ka2, &s.KAlpha2Ratio},
		{"Tolerance", f.tolerance, &s.Tolerance},
		{"Flag limit", f.flags, &s.FlagLimit},
	} {
		if err := read(x.name, x.e, x.to); err != nil {
			return s, "", err
		}
	}
	switch t := strings.TrimSpace(f.unindexed.Text); t {
	case "":
		s.Unindexed = 0
	default:
		n, err := strconv.Atoi(t)
		if err != nil || n < 0 {
			return s, "", fmt.Errorf("Unindexed lines allowed: want a number of lines, 0 or more, got %q", t)
		}
		s.Unindexed = n
		if n == 0 {
			s.Unindexed = -1
		}
	}
	s.Systems = nil
	if len(f.systems.Selected) == 0 {
		return s, "", fmt.Errorf("Systems searched: choose at least one")
	}
	if len(f.systems.Selected) < len(cell.Systems) {
		for _, name := range f.systems.Selected {
			sys, err := cell.ParseSystem(name)
			if err != nil {
				return s, "", err
			}
			s.Systems = append(s.Systems, sys)
		}
	}
	s.SearchLower = f.searchLower.Checked
	s.LinesOnly = !f.weighByPattern.Checked
	c := refine.DefaultCorrections
	if s.Corrections != nil {
		c = *s.Corrections
	}
	if f.transparency.Checked {
		c |= refine.Transparency
	} else {
		c &^= refine.Transparency
	}
	s.Corrections = &c
	paper, err := report.ParsePaper(f.paper.Selected)
	if err != nil {
		return s, "", err
	}
	if err := s.Check(); err != nil {
		return s, "", err
	}
	return s, paper, nil
}

// peaksChanged reports whether the settings that the extraction of peaks
// reads differ.
func peaksChanged(a, b analysis.Settings) bool {
	return a.Threshold != b.Threshold || a.BackgroundWidth != b.BackgroundWidth || a.KAlpha2Ratio != b.KAlpha2Ratio
}

// settingsDialog shows every analysis setting; Apply takes them as one
// step that Undo takes back, or, when the settings of the peaks changed,
// finds the peaks again (the scan is opened anew with the settings and
// the user's edits; Undo starts from there).
func (u *ui) settingsDialog() {
	f := newSettingsForm(u.m.Settings, paperFor(u.app))
	d := dialog.NewForm("Settings", "Apply", "Cancel", f.items(), func(ok bool) {
		if !ok {
			return
		}
		u.applySettings(f)
	}, u.win)
	d.Resize(fyne.NewSize(760, 560))
	d.Show()
}

// applySettings takes the form's values.
func (u *ui) applySettings(f *settingsForm) {
	s, paper, err := f.apply(u.m.Settings)
	if err != nil {
		u.showError("The settings were not applied", err, "Correct the field named and apply again; an empty field takes the default.")
		return
	}
	u.app.Preferences().SetString("paper", string(paper))
	if u.m.Ext == nil {
		u.m.Settings = s
		u.setStatus("settings kept for the next scan")
		return
	}
	again := peaksChanged(u.m.Settings, s)
	u.m.Change(func(x *analysis.Settings) { *x = s })
	u.syncFields()
	if again {
		// The extraction reads these: the scan is read and its peaks
		// found again, the user's edits kept.
		u.openWith(u.m.Path, u.m.Settings, u.m.Selected+1, nil)
		return
	}
	u.edited()
}
