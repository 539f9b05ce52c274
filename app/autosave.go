package main

import (
	"os"
	"path/filepath"

	"fyne.io/fyne/v2/dialog"

	"reticle/session"
)

// autosavePath is where the state is saved after every change; it is
// removed when the window closes normally, so finding it at start means
// the program did not end cleanly.
func autosavePath() string {
	if p := os.Getenv("RETICLE_AUTOSAVE"); p != "" {
		return p
	}
	dir, err := os.UserConfigDir()
	if err != nil {
		return ""
	}
	return filepath.Join(dir, "reticle", "autosave.reticle.json")
}

// saveAutosave writes the current state to the autosave file.
func (u *ui) saveAutosave() {
	if u.autosave == "" || u.m.Scan() == nil {
		return
	}
	if err := os.MkdirAll(filepath.Dir(u.autosave), 0o755); err != nil {
		u.setStatus("autosave failed: %v", err)
		return
	}
	if err := session.Write(u.autosave, u.m.Session(), true); err != nil {
		u.setStatus("autosave failed: %v", err)
	}
}

// clearAutosave removes the autosave file after a normal exit.
func (u *ui) clearAutosave() {
	if u.autosave != "" {
		os.Remove(u.autosave)
	}
}

// offerRestore asks whether to reopen the state the last run left behind;
// it reports whether there was one.
func (u *ui) offerRestore(orElse func()) bool {
	if u.autosave == "" {
		return false
	}
	s, err := session.Read(u.autosave)
	if err != nil {
		return false
	}
	dialog.ShowConfirm("Restore the last session?",
		"Reticle did not close normally last time.\nReopen "+filepath.Base(s.Scan.Path)+" with its peak edits and chosen cell?",
		func(ok bool) {
			if ok {
				u.restoreSession(s)
				return
			}
			u.clearAutosave()
			if orElse != nil {
				orElse()
			}
		}, u.win)
	return true
}
