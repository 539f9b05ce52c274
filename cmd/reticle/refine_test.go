package main

import (
	"encoding/json"
	"math"
	"os"
	"reticle/report"
	"sort"
	"strings"
	"testing"
)

// TestIndexRefinedFields checks that `index --json` carries the
// refinement's fields, and that the demo's cell (made with a = 8.083 Å,
// zero 0.018°, displacement 0.025 mm at R = 240 mm by
// assets/demo/make_demo.go) lies within 3 esd with both corrections.
func TestIndexRefinedFields(t *testing.T) {
	code, out, errs := runCmd("index", "--json", "--corrections", "zero,displacement", "--wavelength", "Cu", demo)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var doc struct{ Solutions []map[string]any }
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	first := doc.Solutions[0]
	for _, k := range []string{"a_esd", "c_esd", "volume", "volume_esd", "zero_shift", "zero_shift_esd", "displacement_mm", "chi2_reduced", "residuals", "correlation", "parameters"} {
		if _, ok := first[k]; !ok {
			t.Errorf("solution lacks %q", k)
		}
	}
	a, esd := first["a"].(float64), first["a_esd"].(float64)
	if !(esd > 0) || math.Abs(a-8.083) > 3*esd {
		t.Errorf("a = %.5f(%.5f), made with 8.083", a, esd)
	}
	if res := first["residuals"].([]any); len(res) < 15 {
		t.Errorf("%d residuals", len(res))
	}
}

func TestRefineCommand(t *testing.T) {
	code, out, errs := runCmd("refine", "--cell", "cubic F a=8.08", "--corrections", "both", "--json", demo)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var doc refineDocJSON
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	if doc.System != "cubic" || math.Abs(doc.A-8.083) > 3*doc.AESD || doc.Displacement == nil || len(doc.Residuals) < 15 {
		t.Errorf("refined %s a=%.5f(%.5f) disp %v, %d residuals", doc.System, doc.A, doc.AESD, doc.Displacement, len(doc.Residuals))
	}
	code, out, _ = runCmd("refine", "--cell", "cubic F a=8.08", "--exclude", "19.008", demo)
	if code != 0 || !strings.Contains(out, "excluded") || !strings.Contains(out, "volume") {
		t.Errorf("table: exit %d\n%s", code, out)
	}
	for _, test := range []struct {
		args []string
		code int
		msg  string
	}{
		{[]string{"refine", demo}, 2, "--cell is required"},
		{[]string{"refine", "--cell", "cubic Q a=3", demo}, 2, "unknown centring"},
		{[]string{"refine", "--cell", "cubic F a=8.08"}, 2, "no scan file"},
		{[]string{"refine", "--cell", "cubic F a=8.08", "--corrections", "tilt", demo}, 2, "unknown correction"},
		{[]string{"refine", "--cell", "cubic F a=8.08", "--radius", "-3", demo}, 2, "--radius"},
		{[]string{"refine", "--cell", "cubic F a=8.08", "--standard", "quartz", demo}, 2, "unknown standard"},
		{[]string{"refine", "--cell", "cubic F a=8.08", "--exclude", "x", demo}, 2, "not an angle"},
		{[]string{"refine", "--cell", "cubic F a=8.08", "--standard", "Si", demo}, 1, "standard Si-640d"},
		{[]string{"refine", "--cell", "cubic F a=8.08", "--scaling", "often", demo}, 2, "unknown scaling"},
		{[]string{"index", "--standard", "Si", demo}, 2, "belongs to reticle refine"},
	} {
		code, _, errs := runCmd(test.args...)
		if code != test.code || !strings.Contains(errs, test.msg) {
			t.Errorf("%v: exit %d, stderr %q; want %d and %q", test.args, code, errs, test.code, test.msg)
		}
	}
}

// TestLabScans refines the first solution of every "lab" scan of the
// public benchmark (zero shift and displacement present, R = 240 mm, per
// its README) and compares with the truth, logging the figures for the
// record. Two settings are checked:
//   - displacement refined (zero held at 0): the median relative cell
//     error must be at most 1e-4; the unmodelled zero shift leaves most
//     cells several esds off, which the log states;
//   - zero shift and displacement both refined: the esds are honest (at
//     most 2 of the 17 cells beyond 3 esd) but larger, for the lab scans
//     end near 110°, where a, the zero shift and the displacement
//     correlate above 0.99 (median relative error at most 2e-4).
func TestLabScans(t *testing.T) {
	if testing.Short() {
		t.Skip("benchmark scans take a while")
	}
	const bench = "../../../shared/bench/public"
	raw, err := os.ReadFile(bench + "/truth.json")
	if err != nil {
		t.Skip("no benchmark beside the repository")
	}
	var truth []struct {
		File, System, Tier, Tube, Wavelength string
		Doublet                              bool
		A, C                                 float64
	}
	if err := json.Unmarshal(raw, &truth); err != nil {
		t.Fatal(err)
	}
	for _, test := range []struct {
		corrections string
		maxMedian   float64
		maxOutside  int
	}{
		{"displacement", 1e-4, -1}, // beyond 3 esd: recorded, not limited
		{"zero,displacement", 2e-4, 2},
	} {
		var rel []float64
		outside, n := 0, 0
		for _, tr := range truth {
			if tr.Tier != "lab" {
				continue
			}
			wl := tr.Wavelength
			if tr.Doublet {
				wl = tr.Tube
			}
			code, out, errs := runCmd("index", "--json", "--corrections", test.corrections, "--wavelength", wl, bench+"/"+tr.File)
			if code != 0 {
				t.Fatalf("%s: %s", tr.File, errs)
			}
			var doc struct{ Solutions []report.Solution }
			if err := json.Unmarshal([]byte(out), &doc); err != nil || len(doc.Solutions) == 0 {
				t.Fatalf("%s: %v", tr.File, err)
			}
			s := doc.Solutions[0]
			if s.Refined == nil {
				t.Errorf("%s: not refined: %s", tr.File, s.RefineError)
				continue
			}
			n++
			e := math.Max(math.Abs(s.A-tr.A)/tr.A, math.Abs(s.C-tr.C)/tr.C)
			rel = append(rel, e)
			za, zc := math.Abs(s.A-tr.A)/s.AESD, math.Abs(s.C-tr.C)/s.CESD
			if za > 3 || zc > 3 {
				outside++
			}
			t.Logf("%s: %s %s %s: a %.5f (true %.5f, %.1f esd) c %.5f (true %.5f, %.1f esd), relative error %.1e", test.corrections, tr.File, s.System, s.Centring, s.A, tr.A, za, s.C, tr.C, zc, e)
		}
		sort.Float64s(rel)
		median := rel[len(rel)/2]
		t.Logf("%s refined, %d lab scans: median relative cell error %.2e, %d cells beyond 3 esd", test.corrections, n, median, outside)
		if median > test.maxMedian || test.maxOutside >= 0 && outside > test.maxOutside {
			t.Errorf("%s: median relative error %.2e (limit %.0e), %d cells beyond 3 esd (limit %d)", test.corrections, median, test.maxMedian, outside, test.maxOutside)
		}
	}
}

func TestContentsCommand(t *testing.T) {
	code, out, errs := runCmd("contents", "--cell", "cubic F a=5.6402(3)", "--formula", "NaCl", "--density", "2.16(1)", "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var c report.Contents
	if err := json.Unmarshal([]byte(out), &c); err != nil {
		t.Fatal(err)
	}
	// Rock salt holds 4 formula units (common practice); its X-ray
	// density is 2.1634 g/cm³ (density package's hand-worked test).
	if c.Z != 4 || !c.ZFromDensity || c.ZWhole == nil || !*c.ZWhole || math.Abs(c.Density-2.1634) > 1e-4 || c.AtomsPerCell != 8 {
		t.Errorf("%+v", c)
	}
	code, out, _ = runCmd("contents", "--cell", "cubic F a=5.6402", "--formula", "NaCl", "--z", "4")
	if code != 0 || !strings.Contains(out, "2.16339") && !strings.Contains(out, "2.1634") {
		t.Errorf("exit %d:\n%s", code, out)
	}
	for _, test := range []struct {
		args []string
		code int
		msg  string
	}{
		{[]string{"contents", "--formula", "NaCl", "--z", "4"}, 2, "--cell and --formula are required"},
		{[]string{"contents", "--cell", "cubic F a=5.64", "--formula", "NaCL", "--z", "4"}, 2, "character 4"},
		{[]string{"contents", "--cell", "cubic F a=5.64", "--formula", "NaCl"}, 2, "give --z N or a measured --density"},
		{[]string{"contents", "--cell", "cubic F a=5.64", "--formula", "NaCl", "--density", "heavy"}, 2, "--density"},
		{[]string{"contents", "--cell", "cubic F a=5.64", "--formula", "NaCl", "--z", "4", demo}, 2, "unexpected argument"},
		{[]string{"index", "--formula", "NaCl", demo}, 2, "needs a measured density"},
		{[]string{"index", "--density", "2.1", demo}, 2, "needs a formula"},
	} {
		code, _, errs := runCmd(test.args...)
		if code != test.code || !strings.Contains(errs, test.msg) {
			t.Errorf("%v: exit %d, stderr %q; want %d and %q", test.args, code, errs, test.code, test.msg)
		}
	}
}

// TestIndexWithDensity: the demo spinel (MgAl2O4, made with a = 8.083 Å)
// at its handbook density 3.58 g/cm³ (from memory) holds Z = 8 (common
// practice for spinels); every cell whose Z comes out fractional ranks
// below it.
func TestIndexWithDensity(t *testing.T) {
	code, out, errs := runCmd("index", "--json", "--formula", "MgAl2O4", "--density", "3.58(2)", demo)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var doc struct{ Solutions []report.Solution }
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	first := doc.Solutions[0]
	if first.Contents == nil || first.Contents.Z != 8 || !*first.Contents.ZWhole {
		t.Fatalf("first solution contents %+v", first.Contents)
	}
	seenFractional := false
	for i, s := range doc.Solutions {
		if s.Rank != i+1 {
			t.Errorf("rank %d at position %d", s.Rank, i+1)
		}
		w := *s.Contents.ZWhole
		if w && seenFractional {
			t.Errorf("a whole-Z cell ranks below a fractional one at %d", i+1)
		}
		seenFractional = seenFractional || !w
	}
}
