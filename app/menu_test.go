package main

import (
	"strings"
	"testing"

	"reticle/report"
)

// TestMenu: the window has a menu whose commands carry their shortcuts,
// the shortcut list names every one, and the about box names the version.
func TestMenu(t *testing.T) {
	u := newTestUI(t, "")
	mm := u.win.MainMenu()
	if mm == nil {
		t.Fatal("no menu")
	}
	var labels []string
	for _, m := range mm.Items {
		labels = append(labels, m.Label)
	}
	if got := strings.Join(labels, " "); got != "File Edit View Help" {
		t.Errorf("menus %q", got)
	}
	list := u.shortcutsText()
	n := 0
	for _, m := range u.menus() {
		for _, c := range m.items {
			if c.key == "" {
				continue
			}
			n++
			if !strings.Contains(list, c.shortcutText()) {
				t.Errorf("the shortcut list lacks %s (%s)", c.shortcutText(), c.label)
			}
		}
	}
	if n < 8 {
		t.Errorf("only %d commands have shortcuts", n)
	}
	if a := aboutText(); !strings.Contains(a, report.Version) || !strings.Contains(a, "radiation-safety") {
		t.Errorf("about box: %q", a)
	}
}
