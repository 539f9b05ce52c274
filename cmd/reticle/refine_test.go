package main

import (
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strconv"

	"reticle/cell"
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
	code, out, errs := runCmd("index", "--json", "--corrections", "zero+displacement", "--wavelength", "Cu", demo)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var doc struct{ Solutions []map[string]any }
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	first := doc.Solutions[0]
	for _, k := range []string{"a_esd", "volume", "volume_esd", "zero_shift", "refinement", "cell"} {
		if _, ok := first[k]; !ok {
			t.Errorf("solution lacks %q", k)
		}
	}
	ref := first["refinement"].(map[string]any)
	for _, k := range []string{"zero_shift", "zero_shift_esd", "displacement_mm", "chi2_reduced", "residuals", "correlation", "parameters", "corrections"} {
		if _, ok := ref[k]; !ok {
			t.Errorf("refinement lacks %q", k)
		}
	}
	a, esd := first["a"].(float64), first["a_esd"].(float64)
	if !(esd > 0) || math.Abs(a-8.083) > 3*esd {
		t.Errorf("a = %.5f(%.5f), made with 8.083", a, esd)
	}
	if res := ref["residuals"].([]any); len(res) < 15 {
		t.Errorf("%d residuals", len(res))
	}
}

func TestRefineCommand(t *testing.T) {
	code, out, errs := runCmd("refine", "--cell", "cubic F a=8.08", "--corrections", "zero+displacement", "--json", demo)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var doc refineDocJSON
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	if doc.System != cell.Cubic || math.Abs(doc.A-8.083) > 3*doc.AESD || doc.Refined.Displacement == nil || len(doc.Refined.Residuals) < 15 {
		t.Errorf("refined %s a=%.5f(%.5f) disp %v, %d residuals", doc.System, doc.A, doc.AESD, doc.Refined.Displacement, len(doc.Refined.Residuals))
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
		{[]string{"refine", "--cell", "cubic F a=8.08", "--frob", demo}, 2, "unknown option --frob"},
		{[]string{"refine", "--cell", "cubic F a=8.08"}, 2, "no scan file"},
		{[]string{"refine", "--cell", "cubic F a=8.08", "--corrections", "tilt", demo}, 2, "unknown correction"},
		{[]string{"refine", "--cell", "cubic F a=8.08", "--radius", "-3", demo}, 2, "--radius"},
		{[]string{"refine", "--cell", "cubic F a=8.08", "--corrections", "none", "--standard", "Si", demo}, 2, "choose at least one"},
		{[]string{"refine", "--cell", "cubic F a=8.08", "--standard", "quartz", demo}, 2, "unknown standard"},
		{[]string{"refine", "--cell", "cubic F a=8.08", "--exclude", "x", demo}, 2, "not an angle"},
		{[]string{"refine", "--cell", "cubic F a=8.08", "--standard", "Si", demo}, 1, "standard Si-640d"},
		{[]string{"refine", "--cell", "cubic F a=8.08", "--scaling", "often", demo}, 2, "unknown scaling"},
		{[]string{"index", "--standard", "Si", demo}, 1, "standard Si-640d"},
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
		{"zero+displacement", 2e-4, 2},
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
		{[]string{"contents", "--cell", "cubic P a=1.5", "--formula", "NaCl"}, 1, "no Z gives at least 5 Å³ per atom"},
		{[]string{"contents", "--cell", "cubic F a=5.64", "--formula", "NaCl", "--density", "heavy"}, 2, "density"},
		{[]string{"contents", "--cell", "cubic F a=5.64", "--formula", "NaCl", "--z", "4", demo}, 2, "unexpected argument"},

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

// TestContentsAgainstPeriodictable: the X-ray density of copper sulfate
// pentahydrate in a triclinic cell with Z = 2 agrees with the one
// periodictable's masses give (testdata/reference/periodictable_density.py,
// Debian python3-periodictable) within three of its stated esds:
// periodictable carries an older IUPAC table than 2021 (S 32.065, O
// 15.9994), which moves the molar mass by 0.008 g/mol, inside the 2021
// uncertainty.
func TestContentsAgainstPeriodictable(t *testing.T) {
	raw, err := os.ReadFile("../../testdata/reference/periodictable_density.tsv")
	if err != nil {
		t.Fatal(err)
	}
	var want float64
	for _, line := range strings.Split(string(raw), "\n") {
		if f := strings.Split(line, "\t"); len(f) == 5 && f[0] == "CuSO4·5H2O" {
			want, _ = strconv.ParseFloat(f[4], 64)
		}
	}
	if want == 0 {
		t.Fatal("no golden density")
	}
	code, out, errs := runCmd("contents", "--cell", "triclinic P a=6.12 b=10.69 c=5.96 alpha=82.35 beta=107.33 gamma=102.6", "--formula", "CuSO4·5H2O", "--z", "2", "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var c report.Contents
	if err := json.Unmarshal([]byte(out), &c); err != nil {
		t.Fatal(err)
	}
	if math.Abs(c.Density-want) > 3*c.DensityESD {
		t.Errorf("X-ray density %.6f(%.6f) g/cm³, periodictable %.6f", c.Density, c.DensityESD, want)
	}
	t.Logf("X-ray density %.6f(%.6f) g/cm³, periodictable %.6f g/cm³", c.Density, c.DensityESD, want)
}

// TestPublicLowRefine refines the monoclinic and orthorhombic scans of the
// public low-symmetry benchmark (../shared/bench/public-low, when present
// beside the repository) from their truth cells rounded to 0.5 %, with
// the zero shift and displacement its lab scans carry: every refined
// parameter within 3 esd of truth.json. It measures; the benchmark's
// files are not part of the project.
func TestPublicLowRefine(t *testing.T) {
	if testing.Short() {
		t.Skip("benchmark scans take a while")
	}
	const bench = "../../../shared/bench/public-low"
	raw, err := os.ReadFile(bench + "/truth.json")
	if err != nil {
		t.Skip("no benchmark beside the repository")
	}
	var truth []struct {
		File, System, Centring, Tier, Tube string
		Wavelength                         any
		Doublet                            bool
		A, B, C, Alpha, Beta, Gamma        float64
	}
	if err := json.Unmarshal(raw, &truth); err != nil {
		t.Fatal(err)
	}
	n := 0
	for _, tr := range truth {
		if tr.System != "monoclinic" && tr.System != "orthorhombic" {
			continue
		}
		round := func(v float64) float64 { return math.Round(v*200) / 200 } // 0.5 % steps of 1 Å
		start := fmt.Sprintf("%s %s a=%g b=%g c=%g", tr.System, tr.Centring, round(tr.A*1.004), round(tr.B*0.996), round(tr.C*1.003))
		if tr.System == "monoclinic" {
			start += fmt.Sprintf(" beta=%g", math.Round(tr.Beta*1.004*10)/10)
		}
		wl := fmt.Sprint(tr.Wavelength)
		corr := "zero"
		if tr.Tier == "lab" {
			corr = "zero+displacement"
		}
		code, out, errs := runCmd("refine", "--json", "--cell", start, "--corrections", corr, "--wavelength", wl, bench+"/"+tr.File)
		if code != 0 {
			t.Errorf("%s: exit %d: %s", tr.File, code, errs)
			continue
		}
		var doc refineDocJSON
		if err := json.Unmarshal([]byte(out), &doc); err != nil {
			t.Fatal(err)
		}
		want := map[string]float64{"a": tr.A, "b": tr.B, "c": tr.C, "beta": tr.Beta}
		var parts []string
		for _, p := range doc.Refined.Params {
			w, ok := want[p.Name]
			if !ok {
				continue
			}
			z := (p.Value - w) / p.ESD
			parts = append(parts, fmt.Sprintf("%s %s (%+.1f esd)", p.Name, p.Text, z))
			if !(p.ESD > 0) || math.Abs(z) > 3 {
				t.Errorf("%s %s: %s, truth %g (%.1f esd)", tr.File, p.Name, p.Text, w, z)
			}
		}
		t.Logf("%s %s %s from %q: %s", tr.File, tr.System, tr.Tier, start, strings.Join(parts, ", "))
		n++
	}
	if n == 0 {
		t.Error("no orthorhombic or monoclinic scan in the benchmark")
	}
}

// TestContentsPlausibleZ: a formula without a measured density or Z gives
// the X-ray density of every plausible Z, the most plausible marked.
func TestContentsPlausibleZ(t *testing.T) {
	code, out, errs := runCmd("contents", "--cell", "rhombohedral R a=4.759 c=12.992", "--formula", "Al2O3", "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var doc report.Contents
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	// Corundum: Z = 6 on hexagonal axes, 3.99 g/cm³ (handbook values
	// recalled from memory).
	if !doc.ZGuessed || doc.Z != 6 || len(doc.Plausible) < 2 || math.Abs(doc.Density-3.99) > 0.01 {
		t.Errorf("Z %d (guessed %v), density %.3f, plausible %+v", doc.Z, doc.ZGuessed, doc.Density, doc.Plausible)
	}
}

// TestCellTextRoundTrip: the first cell text that index prints, given
// back to refine --cell, refines without error (the demo, and the lab
// scans of the public benchmark when it lies beside the repository).
func TestCellTextRoundTrip(t *testing.T) {
	type scan struct{ path, wl string }
	scans := []scan{{demo, "Cu"}}
	if raw, err := os.ReadFile("../../../shared/bench/public/truth.json"); err == nil {
		var truth []struct{ File, Tier, Tube string }
		if err := json.Unmarshal(raw, &truth); err != nil {
			t.Fatal(err)
		}
		for _, tr := range truth {
			if tr.Tier == "lab" {
				scans = append(scans, scan{"../../../shared/bench/public/" + tr.File, tr.Tube})
			}
		}
	}
	for _, s := range scans {
		code, out, errs := runCmd("index", "--json", "--wavelength", s.wl, s.path)
		if code != 0 {
			t.Fatalf("%s: %s", s.path, errs)
		}
		var doc struct{ Solutions []struct{ Cell string } }
		if err := json.Unmarshal([]byte(out), &doc); err != nil || len(doc.Solutions) == 0 {
			t.Fatalf("%s: %v", s.path, err)
		}
		text := doc.Solutions[0].Cell
		if code, _, errs := runCmd("refine", "--cell", text, "--wavelength", s.wl, s.path); code != 0 {
			t.Errorf("%s: refine --cell %q: %s", s.path, text, errs)
		}
	}
}

// TestFitCommand fits the demo scan's whole pattern with its cell
// (made with a = 8.083 Å, assets/demo/make_demo.go): the JSON has
// refine's keys at the top level and the fit's figures, the cell lies
// within 3 esd, Rwp/Rexp is near 1 (the demo's lines are the model's
// shape), and --curves adds the curves; a cell far off is fitted but
// warned about.
func TestFitCommand(t *testing.T) {
	code, out, errs := runCmd("fit", "--json", "--curves", "--cell", "cubic F a=8.08", demo)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var doc []map[string]any
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		var one map[string]any
		if err := json.Unmarshal([]byte(out), &one); err != nil {
			t.Fatal(err)
		}
		doc = []map[string]any{one}
	}
	d := doc[0]
	for _, k := range []string{"a", "a_esd", "volume", "volume_esd", "cell", "rwp", "rexp", "chi2", "gof", "phases", "curves", "esd_scaling"} {
		if _, ok := d[k]; !ok {
			t.Errorf("the document lacks %q", k)
		}
	}
	a, e := d["a"].(float64), d["a_esd"].(float64)
	if !(e > 0) || math.Abs(a-8.083) > 3*e {
		t.Errorf("a = %.5f(%.5f), made with 8.083", a, e)
	}
	if q := d["rwp"].(float64) / d["rexp"].(float64); q > 1.3 {
		t.Errorf("Rwp/Rexp = %.2f", q)
	}
	cv := d["curves"].(map[string]any)
	if n := len(cv["calculated"].([]any)); n != int(d["points"].(float64)) {
		t.Errorf("%d calculated points of %v", n, d["points"])
	}
	refl := d["phases"].([]any)[0].(map[string]any)["reflections"].([]any)
	if len(refl) < 15 {
		t.Errorf("%d reflections", len(refl))
	}
	code, out, _ = runCmd("fit", "--cell", "cubic F a=9.0", demo)
	if code != 0 || !strings.Contains(out, "part of the pattern unexplained") {
		t.Errorf("a cell far off: exit %d, output lacks the warning:\n%s", code, out)
	}
	if code, _, errs := runCmd("fit", demo); code != 2 || !strings.Contains(errs, "--cell is required") {
		t.Errorf("without --cell: exit %d, %q", code, errs)
	}
}

// TestReportFitPattern: report --fit-pattern adds the whole-pattern fit
// to the records: the JSON's figures (the cell within 3 esd of the 8.083
// Å the demo was made with) and the CIF's R factor and profile.
func TestReportFitPattern(t *testing.T) {
	dir := t.TempDir()
	if code, _, errs := runCmd("report", "--fit-pattern", "--out", dir, demo); code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	// readOne reads the one file of the folder with the extension.
	readOne := func(ext string) []byte {
		t.Helper()
		names, err := filepath.Glob(filepath.Join(dir, "*"+ext))
		if err != nil || len(names) != 1 {
			t.Fatalf("%s files: %v %v", ext, names, err)
		}
		data, err := os.ReadFile(names[0])
		if err != nil {
			t.Fatal(err)
		}
		return data
	}
	var doc struct {
		Fit *struct {
			Rwp, Rexp float64
			Phases    []struct {
				A    float64 `json:"a"`
				AESD float64 `json:"a_esd"`
			}
		} `json:"whole_pattern_fit"`
	}
	if err := json.Unmarshal(readOne(".json"), &doc); err != nil || doc.Fit == nil || len(doc.Fit.Phases) != 1 {
		t.Fatalf("no whole_pattern_fit in the JSON: %v", err)
	}
	if p := doc.Fit.Phases[0]; !(p.AESD > 0) || math.Abs(p.A-8.083) > 3*p.AESD {
		t.Errorf("a = %.5f(%.5f), made with 8.083", p.A, p.AESD)
	}
	text := readOne(".cif")
	for _, item := range []string{"_pd_proc_ls_prof_wR_factor", "_pd_calc_intensity_total"} {
		if !strings.Contains(string(text), item) {
			t.Errorf("the CIF lacks %s", item)
		}
	}
}
