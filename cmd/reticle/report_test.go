package main

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"reticle/session"
	"strings"
	"testing"
	"time"
)

func TestReportCommand(t *testing.T) {
	dir := t.TempDir()
	date := time.Date(2026, 12, 1, 9, 0, 0, 0, time.UTC)
	var out, errb bytes.Buffer
	args := []string{"--out", dir, "--sample", "kiln 07", "--formula", "MgAl2O4", "--density", "3.58(2)", demo}
	if code := reportAt(context.Background(), args, &out, &errb, date); code != 0 {
		t.Fatalf("exit %d: %s", code, errb.String())
	}
	files := strings.Fields(out.String())
	if len(files) != 4 {
		t.Fatalf("wrote %q", files)
	}
	for _, f := range files {
		if st, err := os.Stat(f); err != nil || st.Size() == 0 {
			t.Errorf("%s: %v", f, err)
		}
	}
	jsonPath := filepath.Join(dir, "kiln-07.json")
	first, _ := os.ReadFile(jsonPath)
	// Again without --force: refused, nothing changed.
	out.Reset()
	errb.Reset()
	if code := reportAt(context.Background(), args, &out, &errb, date); code != 1 || !strings.Contains(errb.String(), "--force") {
		t.Errorf("second run: exit %d, %q", code, errb.String())
	}
	// Regenerated from the report's own JSON, into another directory.
	dir2 := t.TempDir()
	out.Reset()
	errb.Reset()
	if code := reportAt(context.Background(), []string{"--out", dir2, "--session", jsonPath}, &out, &errb, date); code != 0 {
		t.Fatalf("--session: exit %d: %s", code, errb.String())
	}
	again, _ := os.ReadFile(filepath.Join(dir2, "kiln-07.json"))
	if !bytes.Equal(first, again) {
		t.Error("the JSON regenerated from --session differs")
	}
	// A session whose scan has changed since it was saved: a warning.
	stale := filepath.Join(t.TempDir(), "stale.reticle.json")
	abs, _ := filepath.Abs(demo)
	if err := session.Write(stale, &session.Session{Scan: session.ScanRef{Path: abs, SHA256: "0123"}}, false); err != nil {
		t.Fatal(err)
	}
	if code, _, errs := runCmd("report", "--out", t.TempDir(), "--session", stale); code != 0 || !strings.Contains(errs, "has changed since the session was saved") {
		t.Errorf("changed scan: exit %d, %q", code, errs)
	}
	for _, test := range []struct {
		args []string
		code int
		msg  string
	}{
		{[]string{"report", demo}, 2, "--out DIR is required"},
		{[]string{"report", "--out", dir, "--paper", "A3", demo}, 2, "unknown paper"},
		{[]string{"report", "--out", dir}, 2, "no scan file"},
		{[]string{"report", "--out", dir, "--session", jsonPath, demo}, 2, "not both"},
		{[]string{"report", "--out", dir, "--session", demo}, 1, "not JSON"},
		{[]string{"report", "--out", filepath.Join(dir, "kiln-07.json"), "--force", demo}, 2, "is a file, not a folder"},
		{[]string{"report", "--out", dir2, "--force", "--candidate", "99", demo}, 1, "no candidate cell 99"},
		{[]string{"report", "--out", dir2, "--candidate", "-1", demo}, 2, "--candidate"},
	} {
		code, _, errs := runCmd(test.args...)
		if code != test.code || !strings.Contains(errs, test.msg) {
			t.Errorf("%v: exit %d, stderr %q; want %d and %q", test.args, code, errs, test.code, test.msg)
		}
	}
}

// TestReportMakesFolder: --out naming a folder that does not exist
// creates it (and says so); naming a file is refused with a clear
// message.
func TestReportMakesFolder(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "new", "folder")
	code, _, errs := runCmd("report", "--out", dir, demo)
	if code != 0 || !strings.Contains(errs, "created the folder") {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, ext := range []string{".pdf", ".cif", ".csv", ".json"} {
		if _, err := os.Stat(filepath.Join(dir, "kiln-trial-07"+ext)); err != nil {
			t.Error(err)
		}
	}
	file := filepath.Join(t.TempDir(), "plain")
	if err := os.WriteFile(file, nil, 0o644); err != nil {
		t.Fatal(err)
	}
	if code, _, errs := runCmd("report", "--out", file, demo); code == 0 || !strings.Contains(errs, "is a file, not a folder") {
		t.Fatalf("--out a file: exit %d: %s", code, errs)
	}
}
