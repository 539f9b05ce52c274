package report

import (
	"bytes"
	"errors"
	"os"
	"os/exec"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
	"time"

	"reticle/peaks"
)

// TestRunDemo checks the pipeline on the demo scan (made as cubic F,
// a = 8.083 Å, MgAl2O4 spinel, by assets/demo/make_demo.go): the first
// cell is cubic F with Z = 8, the spinel's formula units per cell
// (common practice).
func TestRunDemo(t *testing.T) {
	doc := demoDoc(t)
	s := doc.Solutions[0]
	if s.System != "cubic" || s.Centring != "F" || s.Refined == nil || s.Contents == nil || s.Contents.Z != 8 {
		t.Fatalf("first solution %s %s, refined %v, contents %+v", s.System, s.Centring, s.Refined != nil, s.Contents)
	}
	if doc.Settings.Threshold != 4.5 || doc.Settings.Corrections != "zero" || len(doc.Settings.Systems) != 4 {
		t.Errorf("settings not resolved: %+v", doc.Settings)
	}
	if doc.Program != Program || doc.Schema != Schema || len(doc.SHA256) != 64 || doc.Lines < 15 {
		t.Errorf("document %+v", doc)
	}
}

func TestRejectedPeaks(t *testing.T) {
	doc := demoDoc(t)
	scan, _ := peaks.ReadFile(demoPath)
	s := demoSettings
	s.Rejected = []float64{doc.Peaks[0].TwoTheta}
	doc2, err := Run(t.Context(), scan, s, nil)
	if err != nil {
		t.Fatal(err)
	}
	if !doc2.Peaks[0].Rejected || doc2.Lines != doc.Lines-1 || doc2.Solutions[0].Indexed+doc2.Solutions[0].Unindexed != doc.Lines-1 {
		t.Errorf("rejecting one peak: %d lines (was %d), first peak rejected %v", doc2.Lines, doc.Lines, doc2.Peaks[0].Rejected)
	}
}

func TestCSVRoundTrip(t *testing.T) {
	doc := demoDoc(t)
	var buf bytes.Buffer
	if err := WriteCSV(&buf, doc, 0); err != nil {
		t.Fatal(err)
	}
	got, err := ReadCSV(&buf)
	if err != nil {
		t.Fatal(err)
	}
	want := PeakRows(doc, 0)
	if !reflect.DeepEqual(got, want) {
		t.Fatalf("round trip differs:\n%+v\n%+v", got[0], want[0])
	}
	indexed := 0
	for _, r := range got {
		if r.Indexed && r.HKL != "" {
			indexed++
		}
	}
	if indexed != doc.Solutions[0].Indexed {
		t.Errorf("%d rows with hkl, %d lines indexed", indexed, doc.Solutions[0].Indexed)
	}
	for _, bad := range []string{"", "a,b\n", strings.Join(csvHeader, ",") + "\n1,x" + strings.Repeat(",", len(csvHeader)-2) + "\n"} {
		if _, err := ReadCSV(strings.NewReader(bad)); !errors.Is(err, ErrCSV) {
			t.Errorf("%q: %v", bad, err)
		}
	}
}

// pdfText extracts a PDF's text layer with pdftotext (Debian
// poppler-utils, which make test installs).
func pdfText(t *testing.T, pdf []byte) string {
	t.Helper()
	bin, err := exec.LookPath("pdftotext")
	if err != nil {
		t.Fatal("pdftotext (poppler-utils) is needed to read the PDF's text layer: apt-get install poppler-utils")
	}
	dir := t.TempDir()
	p := filepath.Join(dir, "r.pdf")
	os.WriteFile(p, pdf, 0o644)
	out, err := exec.Command(bin, "-layout", p, "-").Output()
	if err != nil {
		t.Fatalf("pdftotext: %v", err)
	}
	return string(out)
}

func TestPDF(t *testing.T) {
	doc := demoDoc(t)
	for _, paper := range []Paper{A4, Letter} {
		var buf bytes.Buffer
		if err := WritePDF(&buf, doc, 0, paper, goldenDate); err != nil {
			t.Fatal(err)
		}
		raw := buf.Bytes()
		pages := bytes.Count(raw, []byte("/Type /Page\n")) + bytes.Count(raw, []byte("/Type /Page\r")) + bytes.Count(raw, []byte("/Type /Page/"))
		if pages < 2 || pages > 4 {
			t.Errorf("%s: %d pages", paper, pages)
		}
		text := pdfText(t, raw)
		a := doc.Solutions[0].Params[0].Text
		for _, want := range []string{"Refined cell report: Kiln trial 07", a + " Å", doc.SHA256, "2026-12-01", "Limitations", "Settings used", "M18", "MgAl2O4"} {
			if !strings.Contains(text, want) {
				t.Errorf("%s: text layer lacks %q", paper, want)
			}
		}
		if strings.Count(text, "\f") != pages {
			t.Errorf("%s: %d form feeds for %d pages", paper, strings.Count(text, "\f"), pages)
		}
	}
}

// TestReproducible writes the records twice with different dates: the
// CSV and JSON are identical, the CIF and the PDF's text differ in the
// date line only; with the same date every file is identical byte for
// byte.
func TestReproducible(t *testing.T) {
	write := func(date time.Time) (Files, map[string][]byte) {
		dir := t.TempDir()
		f, err := WriteAll(dir, demoDoc(t), 0, A4, date, false)
		if err != nil {
			t.Fatal(err)
		}
		out := map[string][]byte{}
		for _, p := range []string{f.PDF, f.CIF, f.CSV, f.JSON} {
			b, err := os.ReadFile(p)
			if err != nil {
				t.Fatal(err)
			}
			out[filepath.Ext(p)] = b
		}
		return f, out
	}
	_, a := write(goldenDate)
	_, b := write(goldenDate)
	_, c := write(goldenDate.Add(49 * time.Hour))
	for ext := range a {
		if !bytes.Equal(a[ext], b[ext]) {
			t.Errorf("%s differs between two runs on the same date", ext)
		}
	}
	for _, ext := range []string{".csv", ".json"} {
		if !bytes.Equal(a[ext], c[ext]) {
			t.Errorf("%s depends on the date", ext)
		}
	}
	diffLines := func(x, y string) []string {
		xl, yl := strings.Split(x, "\n"), strings.Split(y, "\n")
		if len(xl) != len(yl) {
			return []string{"line counts differ"}
		}
		var d []string
		for i := range xl {
			if xl[i] != yl[i] {
				d = append(d, xl[i])
			}
		}
		return d
	}
	if d := diffLines(string(a[".cif"]), string(c[".cif"])); len(d) != 1 || !strings.HasPrefix(d[0], "_audit_creation_date") {
		t.Errorf("CIF lines differing: %q", d)
	}
	if d := diffLines(pdfText(t, a[".pdf"]), pdfText(t, c[".pdf"])); len(d) != 1 || !strings.Contains(d[0], "Date") {
		t.Errorf("PDF text lines differing: %q", d)
	}
}

func TestSafeWrites(t *testing.T) {
	dir := t.TempDir()
	doc := demoDoc(t)
	f, err := WriteAll(dir, doc, 0, A4, goldenDate, false)
	if err != nil {
		t.Fatal(err)
	}
	os.WriteFile(f.CSV, []byte("the user's own notes"), 0o644)
	if _, err := WriteAll(dir, doc, 0, A4, goldenDate, false); !errors.Is(err, ErrExists) {
		t.Fatalf("overwrote without permission: %v", err)
	}
	if b, _ := os.ReadFile(f.CSV); string(b) != "the user's own notes" {
		t.Fatal("an existing file was changed")
	}
	if _, err := WriteAll(dir, doc, 0, A4, goldenDate, true); err != nil {
		t.Fatal(err)
	}
	if b, _ := os.ReadFile(f.CSV); !bytes.HasPrefix(b, []byte("peak,two_theta_deg")) {
		t.Error("--force did not replace the file")
	}
	entries, _ := os.ReadDir(dir)
	for _, e := range entries {
		if strings.HasSuffix(e.Name(), ".tmp") {
			t.Errorf("temporary file left: %s", e.Name())
		}
	}
	if len(entries) != 4 {
		t.Errorf("%d files in the directory, want 4", len(entries))
	}
	if err := SafeWrite(filepath.Join(dir, "no-such-dir", "x"), []byte("x"), true); err == nil {
		t.Error("writing into a missing directory succeeded")
	}
}

func TestSessionRoundTrip(t *testing.T) {
	dir := t.TempDir()
	s := &Session{Scan: ScanRef{Path: "kiln.xy", SHA256: "ab"}, Settings: demoSettings, Solution: 2}
	p := filepath.Join(dir, "s.json")
	if err := WriteSession(p, s, false); err != nil {
		t.Fatal(err)
	}
	if err := WriteSession(p, s, false); !errors.Is(err, ErrExists) {
		t.Errorf("second write without replace: %v", err)
	}
	got, err := ReadSession(p)
	if err != nil || !reflect.DeepEqual(got, s) {
		t.Errorf("read back %+v, %v", got, err)
	}
	doc := demoDoc(t)
	var buf bytes.Buffer
	WriteJSON(&buf, doc)
	q := filepath.Join(dir, "r.json")
	os.WriteFile(q, buf.Bytes(), 0o644)
	got, err = ReadSession(q)
	if err != nil || got.Scan.SHA256 != doc.SHA256 || !reflect.DeepEqual(got.Settings, doc.Settings) {
		t.Errorf("from a result document: %+v, %v", got, err)
	}
	os.WriteFile(q, []byte(`{"format":"something-else"}`), 0o644)
	if _, err := ReadSession(q); err == nil {
		t.Error("a foreign JSON file read as a session")
	}
}
