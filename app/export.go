package main

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"time"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/storage"
	"fyne.io/fyne/v2/theme"
	"fyne.io/fyne/v2/widget"

	"reticle/report"
	"reticle/session"
)

func (u *ui) exportStep() fyne.CanvasObject {
	sample := widget.NewEntry()
	sample.SetPlaceHolder("sample name for the records (none: they name the scan by its file)")
	sample.OnChanged = func(s string) { u.m.Settings.Sample = s }
	write := widget.NewButtonWithIcon("Write the report (PDF, CIF, CSV, JSON)…", theme.DocumentSaveIcon(), u.reportDialog)
	session := widget.NewButtonWithIcon("Save the session…", theme.DocumentSaveIcon(), u.saveSessionDialog)
	reopen := widget.NewButtonWithIcon("Open a session…", theme.FolderOpenIcon(), u.openSessionDialog)
	copyCell := widget.NewButtonWithIcon("Copy the cell", theme.ContentCopyIcon(), func() {
		t := u.cellText()
		if t == "" {
			u.setStatus("no cell to copy yet")
			return
		}
		u.app.Clipboard().SetContent(t)
		u.setStatus("copied: %s", t)
	})
	note := widget.NewLabel("The report embeds every setting: `reticle report --session` with the JSON (or with a saved session) makes it again. Existing files are only replaced after you agree.")
	note.Wrapping = fyne.TextWrapWord
	return container.NewVScroll(container.NewVBox(
		widget.NewForm(widget.NewFormItem("Sample", sample)),
		write, copyCell, session, reopen, note,
	))
}

// reportDialog asks for a folder and writes the report there.
func (u *ui) reportDialog() {
	if u.m.A == nil {
		u.setStatus("open a scan first")
		return
	}
	d := dialog.NewFolderOpen(func(l fyne.ListableURI, err error) {
		if err != nil {
			u.showError("The folder dialog failed", err, "")
			return
		}
		if l == nil {
			return
		}
		u.writeReport(l.Path(), false)
	}, u.win)
	if u.m.Path != "" {
		if l, err := storage.ListerForURI(storage.NewFileURI(filepath.Dir(u.m.Path))); err == nil {
			d.SetLocation(l)
		}
	}
	d.Show()
}

// writeReport writes the four records into dir, asking before replacing.
func (u *ui) writeReport(dir string, force bool) {
	a := *u.m.A
	a.Settings.Sample = u.m.Settings.Sample
	files, err := report.WriteAll(dir, &a, paperFor(u.app), time.Now(), force)
	if errors.Is(err, report.ErrExists) {
		dialog.ShowConfirm("Replace the report?", fmt.Sprintf("%v\n\nReplace the existing files?", err), func(ok bool) {
			if ok {
				u.writeReport(dir, true)
			}
		}, u.win)
		return
	}
	if err != nil {
		u.showError("The report could not be written", err, "Choose a folder you can write to.")
		return
	}
	u.setStatus("wrote %s, %s, %s and %s", filepath.Base(files.PDF), filepath.Base(files.CIF), filepath.Base(files.CSV), filepath.Base(files.JSON))
}

// paperFor is the paper size remembered in the preferences.
func paperFor(a fyne.App) report.Paper {
	p, err := report.ParsePaper(a.Preferences().StringWithFallback("paper", "A4"))
	if err != nil {
		return report.A4
	}
	return p
}

func (u *ui) saveSessionDialog() {
	if u.m.Scan() == nil {
		u.setStatus("open a scan first")
		return
	}
	d := dialog.NewFileSave(func(w fyne.URIWriteCloser, err error) {
		if err != nil {
			u.showError("The save dialog failed", err, "")
			return
		}
		if w == nil {
			return
		}
		path := w.URI().Path()
		w.Close()
		// The dialog has already asked before replacing a file.
		if err := session.Write(path, u.m.Session(), true); err != nil {
			u.showError("The session could not be saved", err, "Choose a folder you can write to.")
			return
		}
		u.setStatus("session saved to %s", path)
	}, u.win)
	d.SetFileName(report.BaseName(u.m.A) + ".reticle.json")
	d.Show()
}

func (u *ui) openSessionDialog() {
	u.pickFile([]string{".json"}, u.openSession)
}

// openSession reopens a saved session, warning when the scan has changed.
func (u *ui) openSession(path string) {
	s, err := session.Read(path)
	if err != nil {
		u.showError("The session could not be read", err, "Choose a session saved by Reticle, or the JSON of one of its reports.")
		return
	}
	u.restoreSession(s)
}

// restoreSession opens a session's scan with its settings and choice.
func (u *ui) restoreSession(s *session.Session) {
	if !fileExists(s.Scan.Path) {
		u.showError("The session's scan is missing", fmt.Errorf("%s: %w", s.Scan.Path, os.ErrNotExist), "Put the scan back where it was, then open the session again.")
		return
	}
	u.m.Settings = s.Settings
	u.syncFields()
	// The scan is read on a worker: its SHA-256 is compared once it is
	// open, not with the scan open before.
	u.openWith(s.Scan.Path, s.Settings, s.Solution, func() {
		if scan := u.m.Scan(); s.Scan.SHA256 != "" && scan != nil && scan.SHA256 != s.Scan.SHA256 {
			dialog.ShowInformation("The scan has changed",
				fmt.Sprintf("%s is not the file the session was saved with (its SHA-256 differs).\nThe peaks and cells shown come from the file as it is now.", s.Scan.Path), u.win)
		}
	})
}
