package report

import (
	"bytes"
	"context"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"reticle/analysis"
	"reticle/cell"
	"reticle/refine"
)

// TestPatternRecords: a whole-pattern fit joins the records. The CIF
// carries the R factors under the powder dictionary's names (with the
// values of the fit, as fractions) and one profile loop of as many rows
// as the scan has points; the PDF gains its section; the rows name the
// agreement.
func TestPatternRecords(t *testing.T) {
	a := demoAnalysis(t)
	pf, err := analysis.FitPattern(context.Background(), a.Extraction, []cell.Cell{a.ChosenCandidate().Cell()}, a.Settings, nil)
	if err != nil {
		t.Fatal(err)
	}
	a.Pattern = pf
	var buf bytes.Buffer
	if err := WriteCIF(&buf, a, goldenDate); err != nil {
		t.Fatal(err)
	}
	cif := buf.String()
	if loops := checkCIFCategories(t, strings.NewReader(cif)); loops != 3 {
		t.Errorf("%d loops, want the peaks', the reflections' and the profile's", loops)
	}
	for _, item := range []string{"_pd_proc_ls_prof_R_factor", "_pd_proc_ls_prof_wR_factor", "_pd_proc_ls_prof_wR_expected", "_refine_ls_goodness_of_fit_all", "_pd_calc_intensity_total"} {
		if !strings.Contains(cif, item+"\n") && !strings.Contains(cif, item+" ") {
			t.Errorf("the CIF lacks %s", item)
		}
	}
	got, err := strconv.ParseFloat(strings.Fields(cif[strings.Index(cif, "_pd_proc_ls_prof_wR_factor"):])[1], 64)
	if err != nil || math.Abs(got-pf.Fit.Rwp) > 1e-5 {
		t.Errorf("wR factor %g (%v) for Rwp %g", got, err, pf.Fit.Rwp)
	}
	loop := cif[strings.Index(cif, "_pd_proc_intensity_bkg_calc")+len("_pd_proc_intensity_bkg_calc\n"):]
	if n := strings.Count(loop, "\n"); n != a.Scan.Len() {
		t.Errorf("%d profile rows for %d points", n, a.Scan.Len())
	}
	rows := Text(PatternRows(pf))
	if !strings.Contains(rows, "Rwp") || !strings.Contains(rows, "phase 1") {
		t.Errorf("rows:\n%s", rows)
	}
	dir := t.TempDir()
	if d := os.Getenv("RETICLE_SHOTS"); d != "" {
		dir = d
	}
	p := filepath.Join(dir, "whole-pattern-fit.pdf")
	f, err := os.Create(p)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	if err := WritePDF(f, a, A4, goldenDate); err != nil {
		t.Fatal(err)
	}
}

// TestPatternProfileRows: the row of each phase's profile lists the
// terms the phase refined and says, for a further phase, which it took
// from the main phase.
func TestPatternProfileRows(t *testing.T) {
	main := cell.Must(cell.Cubic, cell.F, 5.6402)
	other := cell.Must(cell.Tetragonal, cell.P, 4.5937, 2.9587)
	param := func(names ...string) []refine.Param {
		var out []refine.Param
		for _, n := range names {
			out = append(out, refine.Param{Name: n, Value: 0.01, ESD: 0.001, Unit: "°"})
		}
		return out
	}
	for _, tc := range []struct {
		name   string
		params []refine.Param
		want   string
	}{
		{"shared", param("a", "c"), "the main phase's"},
		{"own size", param("a", "c", "Y"), "Y 0.0100(10) ° (its own size term; the rest the main phase's)"},
		{"own size and strain", param("a", "c", "U", "X", "Y"), "U 0.0100(10) °, X 0.0100(10) °, Y 0.0100(10) ° (its own size and strain terms; V and W the main phase's)"},
	} {
		fit := &refine.PatternResult{Phases: []refine.PatternPhase{
			{Cell: main, Params: param("a", "U", "V", "W", "X", "Y")},
			{Cell: other, Params: tc.params},
		}}
		rows := PatternRows(&analysis.PatternFit{Texts: []string{"main", "other"}, Fit: fit})
		got := ""
		for _, r := range rows {
			if r.Label == "phase 2 profile" {
				got = r.Value
			}
		}
		if got != tc.want {
			t.Errorf("%s: row %q, want %q", tc.name, got, tc.want)
		}
	}
}
