package main

import (
	"regexp"
	"strings"
	"testing"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/test"
	"fyne.io/fyne/v2/widget"

	"reticle/internal/glossary"
	"reticle/report"
)

// TestWindowVocabulary walks every step of the window with the demo open
// and checks every name it shows — tab titles, buttons, check boxes,
// form labels, choices and table columns — against the glossary.
func TestWindowVocabulary(t *testing.T) {
	terms, err := glossary.Terms()
	if err != nil {
		t.Fatal(err)
	}
	u := demoUI(t, "")
	names := map[string]bool{}
	for _, c := range peakColumns {
		names[c] = true
	}
	for _, c := range resColumns {
		names[c] = true
	}
	for _, c := range u.cellColumns() {
		names[c.title] = true
	}
	step := regexp.MustCompile(`^\d+\s+`)
	var walk func(o fyne.CanvasObject)
	walk = func(o fyne.CanvasObject) {
		switch w := o.(type) {
		case *container.AppTabs:
			for _, it := range w.Items {
				names[step.ReplaceAllString(it.Text, "")] = true
				walk(it.Content)
			}
			return
		case *widget.Button:
			if !strings.Contains(w.Text, "(/") && !strings.Contains(w.Text, "(.") { // a recent scan
				names[w.Text] = true
			}
		case *widget.Check:
			names[w.Text] = true
		case *widget.CheckGroup:
			for _, opt := range w.Options {
				names[opt] = true
			}
			return
		case *widget.Label:
			if w.TextStyle.Bold { // a heading of the settings
				names[w.Text] = true
			}
		case *widget.Accordion:
			for _, it := range w.Items {
				names[it.Title] = true
				walk(it.Detail)
			}
			return
		case *widget.Form:
			for _, it := range w.Items {
				names[it.Text] = true
				walk(it.Widget)
			}
			return
		case *widget.Select:
			// Anode names come from the radiation table, and the
			// phases to add are cells in the cell text form.
			if w != u.waveSel && w != u.phaseSel {
				for _, opt := range w.Options {
					names[opt] = true
				}
			}
		case *fyne.Container:
			for _, c := range w.Objects {
				walk(c)
			}
			return
		}
		if wid, ok := o.(fyne.Widget); ok {
			for _, c := range test.WidgetRenderer(wid).Objects() {
				walk(c)
			}
		}
	}
	walk(u.win.Content())
	// The menus and the settings dialog.
	for _, m := range u.win.MainMenu().Items {
		names[m.Label] = true
		for _, it := range m.Items {
			names[it.Label] = true
		}
	}
	walk(widget.NewForm(newSettingsForm(u.m.Settings, report.A4).items()...))
	names[u.phaseSel.PlaceHolder] = true
	delete(names, "")
	for n := range names {
		if !terms[n] {
			t.Errorf("the window shows %q, which is not in the glossary", n)
		}
	}
	t.Logf("%d names checked", len(names))
	if len(names) < 60 {
		t.Errorf("only %d names found: the walk missed part of the window", len(names))
	}
}

// TestTypedCell: the cell text that Copy the cell puts on the clipboard
// is accepted by the window's cell entry and refined.
func TestTypedCell(t *testing.T) {
	u := demoUI(t, "")
	text := u.cellText()
	u.cellEntry.SetText(text)
	u.cellEntry.OnSubmitted(text)
	u.wait()
	if got := u.paramsText.Text; !strings.Contains(got, "typed cell "+text) || !strings.Contains(got, "cubic F") {
		t.Fatalf("typed %q: %q (status %q)", text, got, u.status.Text)
	}
}
