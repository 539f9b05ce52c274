package report

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
	"time"

	"reticle/analysis"
	"reticle/cell"
	"reticle/esd"
	"reticle/scanfile"
)

// TestDemoTruth checks the demo's refined cell against the value the
// demo's generator used, a = 8.083 Å (assets/demo/make_demo.go), under
// the corrections it simulated (a zero shift and a sample displacement):
// within two esds. The spinel's formula units per cell, Z = 8, follow
// from its handbook density (common practice).
func TestDemoTruth(t *testing.T) {
	a := demoAnalysis(t)
	c := a.ChosenCandidate()
	if c == nil || c.Refined == nil || c.Contents == nil {
		t.Fatalf("no refined cell with contents: %+v", c)
	}
	ce := c.Cell()
	if ce.System != cell.Cubic || ce.Centring != cell.F || c.Contents.Z != 8 {
		t.Fatalf("first cell %v, Z %d", ce, c.Contents.Z)
	}
	const truth = 8.083 // the demo generator's cell edge, Å
	e := c.Refined.ESD.A
	if d := math.Abs(ce.A-truth) / e; d > 2 {
		t.Errorf("a = %s Å, %.1f esd from the generator's %.3f Å", esd.Format(ce.A, e), d, truth)
	}
	t.Logf("a = %s Å, %.2f esd from %.3f Å", esd.Format(ce.A, e), (ce.A-truth)/e, truth)
}

// TestDemoTruthDefaults: with the default settings (the corrections
// chosen from the data, the cell from the whole pattern when that gives
// it more precisely) the demo's cell is within two esds of the
// generator's 8.083 Å too, and the method is recorded.
func TestDemoTruthDefaults(t *testing.T) {
	scan, err := scanfile.ReadFile(demoPath)
	if err != nil {
		t.Fatal(err)
	}
	a, err := analysis.Run(context.Background(), scan, analysis.Settings{}, nil)
	if err != nil {
		t.Fatal(err)
	}
	c := a.ChosenCandidate()
	if c == nil || c.Refined == nil || c.Refined.Selection == nil {
		t.Fatalf("no refined cell with a choice of corrections: %+v", c)
	}
	const truth = 8.083 // the demo generator's cell edge, Å
	ce, e := c.Cell(), c.Covariance().ESD().A
	if d := math.Abs(ce.A-truth) / e; ce.System != cell.Cubic || d > 2 {
		t.Errorf("%s: a = %s Å, %.1f esd from the generator's %.3f Å", ce, esd.Format(ce.A, e), d, truth)
	}
	t.Logf("a = %s Å, %.2f esd from %.3f Å; %s", esd.Format(ce.A, e), (ce.A-truth)/e, truth, c.Refined.Selection.Reason())
	// The CIF names the method: the choice and the averaging over it.
	var b bytes.Buffer
	if err := WriteCIF(&b, a, time.Date(2026, 1, 2, 0, 0, 0, 0, time.UTC)); err != nil {
		t.Fatal(err)
	}
	want := "chosen from the data (lowest BIC: " + c.Refined.Selection.Chosen.String() + "), cell and corrections the mean of that choice over 400 bootstrap sets"
	if c.Pattern != nil {
		want = "whole-pattern fit (Pawley)"
	}
	if !strings.Contains(b.String(), want) {
		t.Errorf("the CIF does not record the choice %q:\n%s", want, b.String()[:min(b.Len(), 800)])
	}
}

func TestCSVRoundTrip(t *testing.T) {
	a := demoAnalysis(t)
	var buf bytes.Buffer
	if err := WriteCSV(&buf, a); err != nil {
		t.Fatal(err)
	}
	got, err := ReadCSV(&buf)
	if err != nil {
		t.Fatal(err)
	}
	want := PeakRows(a)
	if !reflect.DeepEqual(got, want) {
		t.Fatalf("round trip differs:\n%+v\n%+v", got[0], want[0])
	}
	indexed := 0
	for _, r := range got {
		if r.Indexed && r.HKL != "" {
			indexed++
		}
	}
	if indexed != a.Candidates[0].Indexed {
		t.Errorf("%d rows with hkl, %d lines indexed", indexed, a.Candidates[0].Indexed)
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
	an := demoAnalysis(t)
	for _, paper := range []Paper{A4, Letter} {
		var buf bytes.Buffer
		if err := WritePDF(&buf, an, paper, goldenDate); err != nil {
			t.Fatal(err)
		}
		raw := buf.Bytes()
		pages := bytes.Count(raw, []byte("/Type /Page\n")) + bytes.Count(raw, []byte("/Type /Page\r")) + bytes.Count(raw, []byte("/Type /Page/"))
		if pages < 2 || pages > 4 {
			t.Errorf("%s: %d pages", paper, pages)
		}
		text := pdfText(t, raw)
		p := an.Candidates[0].Refined.Params[0]
		a := esd.Format(p.Value, p.ESD)
		rowsIndexed := 0
		for _, r := range PeakRows(an) {
			if r.Indexed {
				rowsIndexed++
			}
		}
		for _, want := range []string{"Refined cell report: Kiln trial 07", a + " Å", an.Scan.SHA256, "2026-12-01", "Limitations", "Settings used", "M_N", "MgAl2O4",
			fmt.Sprintf("%d indexed by the reported cell", rowsIndexed)} {
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
		f, err := WriteAll(dir, demoAnalysis(t), A4, date, false)
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
	a := demoAnalysis(t)
	f, err := WriteAll(dir, a, A4, goldenDate, false)
	if err != nil {
		t.Fatal(err)
	}
	os.WriteFile(f.CSV, []byte("the user's own notes"), 0o644)
	if _, err := WriteAll(dir, a, A4, goldenDate, false); !errors.Is(err, ErrExists) {
		t.Fatalf("overwrote without permission: %v", err)
	}
	if b, _ := os.ReadFile(f.CSV); string(b) != "the user's own notes" {
		t.Fatal("an existing file was changed")
	}
	if _, err := WriteAll(dir, a, A4, goldenDate, true); err != nil {
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
