package session

import (
	"bytes"
	"context"
	"errors"
	"os"
	"path/filepath"
	"reflect"
	"testing"

	"reticle/analysis"
	"reticle/density"
	"reticle/report"
	"reticle/scanfile"
)

// FuzzRead: any file either fails with an error or reads into a
// session that names a scan.
func FuzzRead(f *testing.F) {
	f.Add(`{"format":"reticle-session","version":1,"scan":{"path":"a.xy","sha256":"ab"},"settings":{},"solution":1}`)
	f.Add(`{"program":"Reticle","schema":1,"file":"a.xy","settings":{"formula":"NaCl"}}`)
	f.Add(`{"format":"reticle-session","version":9}`)
	f.Add(`[]`)
	dir := f.TempDir()
	f.Fuzz(func(t *testing.T, s string) {
		p := filepath.Join(dir, "s.json")
		if err := os.WriteFile(p, []byte(s), 0o644); err != nil {
			t.Fatal(err)
		}
		got, err := Read(p)
		if err != nil {
			return
		}
		if got.Scan.Path == "" {
			t.Fatalf("%q: a session without a scan was accepted", s)
		}
	})
}

// TestRoundTrip writes a session and reads it back, reads a report's
// result document as a session, and refuses a foreign JSON file.
func TestRoundTrip(t *testing.T) {
	f, err := density.ParseFormula("MgAl2O4")
	if err != nil {
		t.Fatal(err)
	}
	settings := analysis.Settings{Sample: "Kiln trial 07", Formula: &f}
	dir := t.TempDir()
	s := &Session{Scan: ScanRef{Path: "kiln.xy", SHA256: "ab"}, Settings: settings, Solution: 2}
	p := filepath.Join(dir, "s.json")
	if err := Write(p, s, false); err != nil {
		t.Fatal(err)
	}
	if err := Write(p, s, false); !errors.Is(err, report.ErrExists) {
		t.Errorf("second write without replace: %v", err)
	}
	got, err := Read(p)
	if err != nil || !reflect.DeepEqual(got, s) {
		t.Errorf("read back %+v, %v", got, err)
	}
	scan, err := scanfile.ReadFile("../assets/demo/kiln-trial-07.xy")
	if err != nil {
		t.Fatal(err)
	}
	a, err := analysis.Run(context.Background(), scan, settings, nil)
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	report.WriteJSON(&buf, a)
	q := filepath.Join(dir, "r.json")
	os.WriteFile(q, buf.Bytes(), 0o644)
	got, err = Read(q)
	if err != nil || got.Scan.SHA256 != a.Scan.SHA256 || !reflect.DeepEqual(got.Settings, a.Settings) {
		t.Errorf("from a result document: %+v, %v", got, err)
	}
	os.WriteFile(q, []byte(`{"format":"something-else"}`), 0o644)
	if _, err := Read(q); err == nil {
		t.Error("a foreign JSON file read as a session")
	}
}
