package main

import (
	"fmt"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/driver/desktop"
	"fyne.io/fyne/v2/widget"

	"reticle/report"
)

// A command is one action of the menu, with its keyboard shortcut (none
// when key is empty): the menu, the shortcut list and the canvas's
// bindings are made from one table.
type command struct {
	label string
	key   fyne.KeyName
	mod   fyne.KeyModifier
	do    func()
}

// shortcutText prints a command's shortcut, e.g. "Ctrl+O".
func (c command) shortcutText() string {
	if c.key == "" {
		return ""
	}
	var parts []string
	if c.mod&fyne.KeyModifierShortcutDefault != 0 {
		parts = append(parts, "Ctrl")
	}
	if c.mod&fyne.KeyModifierShift != 0 {
		parts = append(parts, "Shift")
	}
	return strings.Join(append(parts, string(c.key)), "+")
}

// menus lists the window's menus and their commands, in order.
func (u *ui) menus() []struct {
	name  string
	items []command
} {
	ctrl := fyne.KeyModifierShortcutDefault
	return []struct {
		name  string
		items []command
	}{
		{"File", []command{
			{"Open scan…", fyne.KeyO, ctrl, u.openDialog},
			{"Open a session…", "", 0, u.openSessionDialog},
			{"Save the session…", fyne.KeyS, ctrl, u.saveSessionDialog},
			{"Write the report (PDF, CIF, CSV, JSON)…", fyne.KeyE, ctrl, u.reportDialog},
		}},
		{"Edit", []command{
			{"Undo", fyne.KeyZ, ctrl, u.undo},
			{"Redo", fyne.KeyY, ctrl, u.redo},
			{"Settings…", fyne.KeyComma, ctrl, u.settingsDialog},
		}},
		{"View", []command{
			{"Whole scan", fyne.KeyR, ctrl, func() { u.plot.resetZoom() }},
			{"Recompute (F5)", fyne.KeyF5, 0, u.recompute},
		}},
		{"Help", []command{
			{"Keyboard and mouse", fyne.KeyF1, 0, u.shortcutsDialog},
			{"About Reticle", "", 0, u.aboutDialog},
		}},
	}
}

// mainMenu builds the window's menu (Fyne adds Quit to the first).
func (u *ui) mainMenu() *fyne.MainMenu {
	var ms []*fyne.Menu
	for _, m := range u.menus() {
		var items []*fyne.MenuItem
		for _, c := range m.items {
			it := fyne.NewMenuItem(c.label, c.do)
			if c.key != "" {
				it.Shortcut = &desktop.CustomShortcut{KeyName: c.key, Modifier: c.mod}
			}
			items = append(items, it)
		}
		ms = append(ms, fyne.NewMenu(m.name, items...))
	}
	return fyne.NewMainMenu(ms...)
}

// shortcuts binds the keyboard: every command's shortcut, and
// Ctrl+Shift+Z for redo too.
func (u *ui) shortcuts() {
	c := u.win.Canvas()
	for _, m := range u.menus() {
		for _, cmd := range m.items {
			if cmd.key == "" {
				continue
			}
			do := cmd.do
			c.AddShortcut(&desktop.CustomShortcut{KeyName: cmd.key, Modifier: cmd.mod}, func(fyne.Shortcut) { do() })
		}
	}
	c.AddShortcut(&desktop.CustomShortcut{KeyName: fyne.KeyZ, Modifier: fyne.KeyModifierShortcutDefault | fyne.KeyModifierShift}, func(fyne.Shortcut) { u.redo() })
}

// shortcutsText lists the keyboard shortcuts and the mouse's actions.
func (u *ui) shortcutsText() string {
	var b strings.Builder
	b.WriteString("Keyboard\n")
	for _, m := range u.menus() {
		for _, c := range m.items {
			if c.key != "" {
				fmt.Fprintf(&b, "  %-13s %s\n", c.shortcutText(), strings.TrimSuffix(c.label, " (F5)"))
			}
		}
	}
	fmt.Fprintf(&b, "  %-13s %s\n", "Ctrl+Shift+Z", "Redo")
	b.WriteString("\nMouse, on the pattern\n")
	for _, l := range [][2]string{
		{"click a marker", "reject or accept that peak"},
		{"click elsewhere", "add a peak at the nearest maximum"},
		{"wheel", "zoom about the pointer"},
		{"drag", "pan"},
		{"right-drag, Shift-drag", "zoom to a box"},
	} {
		fmt.Fprintf(&b, "  %-22s %s\n", l[0], l[1])
	}
	return b.String()
}

func (u *ui) shortcutsDialog() {
	t := widget.NewLabel(u.shortcutsText())
	t.TextStyle = fyne.TextStyle{Monospace: true}
	dialog.ShowCustom("Keyboard and mouse", "Close", t, u.win)
}

// aboutText names the program, its version and what it is for.
func aboutText() string {
	return fmt.Sprintf("%s %s\n\nFrom a powder diffraction scan to a refined unit cell, its density and\nits formula units per cell, with standard uncertainties.\n\nRunning a diffractometer involves ionising radiation: follow your\ninstitution's radiation-safety rules.", report.Program, report.Version)
}

func (u *ui) aboutDialog() {
	dialog.ShowInformation("About Reticle", aboutText(), u.win)
}
