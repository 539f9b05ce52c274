package report

import (
	"bufio"
	"bytes"
	"context"
	"flag"
	"math"
	"os"
	"strconv"
	"strings"
	"testing"
	"time"

	"reticle/analysis"
	"reticle/cell"
	"reticle/density"
	"reticle/indexing"
	"reticle/refine"
	"reticle/scanfile"
)

var regen = flag.Bool("regen", false, "rewrite the golden CIF in testdata/reference (then rerun its gemmi script)")

const demoPath = "../assets/demo/kiln-trial-07.xy"

// demoSettings are the settings of the demo report: the fictional kiln
// trial's spinel with the handbook density of MgAl2O4, 3.58 g/cm³ (from
// memory), refining the zero shift and the displacement that the demo's
// generator put in.
var demoSettings = func() analysis.Settings {
	f, _ := density.ParseFormula("MgAl2O4")
	m, _ := density.ParseMeasured("3.58(2)")
	corr := refine.Zero | refine.Displacement
	return analysis.Settings{Sample: "Kiln trial 07", Formula: &f, Density: &m, Corrections: &corr}
}()

// goldenDate is the date of the golden files.
var goldenDate = time.Date(2026, 12, 1, 12, 0, 0, 0, time.UTC)

func demoAnalysis(t testing.TB) *analysis.Analysis {
	t.Helper()
	scan, err := scanfile.ReadFile(demoPath)
	if err != nil {
		t.Fatal(err)
	}
	// The records name the scan as the reference files do.
	scan.Path = "assets/demo/kiln-trial-07.xy"
	a, err := analysis.Run(context.Background(), scan, demoSettings, nil)
	if err != nil {
		t.Fatal(err)
	}
	return a
}

// TestCIFReadByGemmi checks the demo's CIF against what gemmi 0.5.7
// (Debian python3-gemmi) read from it: testdata/reference/gemmi_cif.py
// parsed testdata/reference/kiln-trial-07.cif into
// kiln-trial-07.cif.gemmi.tsv. The CIF written now must equal the one
// gemmi read, and gemmi's values must equal the JSON document's to the
// digits printed.
func TestCIFReadByGemmi(t *testing.T) {
	a := demoAnalysis(t)
	var buf bytes.Buffer
	if err := WriteCIF(&buf, a, goldenDate); err != nil {
		t.Fatal(err)
	}
	const golden = "../testdata/reference/kiln-trial-07.cif"
	if *regen {
		if err := os.WriteFile(golden, buf.Bytes(), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	want, err := os.ReadFile(golden)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(buf.Bytes(), want) {
		t.Fatalf("the demo's CIF differs from %s (run go test -regen, then testdata/reference/gemmi_cif.py)", golden)
	}
	f, err := os.Open(golden + ".gemmi.tsv")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	s := a.ChosenCandidate()
	ce := s.Cell()
	v, _ := s.Volume()
	json := map[string]float64{
		"_cell_length_a": ce.A, "_cell_length_b": ce.B, "_cell_length_c": ce.C,
		"_cell_angle_alpha": ce.Alpha, "_cell_angle_beta": ce.Beta, "_cell_angle_gamma": ce.Gamma,
		"_cell_volume": v, "_diffrn_radiation_wavelength": a.Radiation.Lambda1,
		"_cell_formula_units_Z": float64(s.Contents.Z), "_exptl_crystal_density_diffrn": s.Contents.Density,
		"_cell_measurement_reflns_used": float64(s.Indexed),
	}
	var rows int
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		fs := strings.Split(sc.Text(), "\t")
		switch fs[0] {
		case "value":
			// value, tag, number as gemmi read it, decimals printed
			v, _ := strconv.ParseFloat(fs[2], 64)
			dec, _ := strconv.Atoi(fs[3])
			want, ok := json[fs[1]]
			if !ok {
				continue
			}
			delete(json, fs[1])
			if math.Abs(v-want) > 0.5*math.Pow(10, -float64(dec))+1e-12 {
				t.Errorf("%s: gemmi read %s, the JSON has %.10g", fs[1], fs[2], want)
			}
		case "system":
			if fs[1] != ce.System.String() {
				t.Errorf("crystal system %q, analysis %q", fs[1], ce.System)
			}
		case "refln":
			// refln, h, k, l, d, 2θ obs, 2θ calc
			var l indexing.IndexedLine
			var calc float64
			for _, c := range s.Lines {
				if c.Indexed && math.Abs(c.TwoTheta-atof(fs[5])) < 1e-5 {
					l = c
					_, rr, _ := s.Line(c.TwoTheta)
					calc = rr.TwoThetaCalc
				}
			}
			var h cell.HKL
			found := false
			for _, x := range l.HKL {
				if strconv.Itoa(x[0]) == fs[1] && strconv.Itoa(x[1]) == fs[2] && strconv.Itoa(x[2]) == fs[3] {
					h, found = x, true
				}
			}
			if !l.Indexed || !found || math.Abs(atof(fs[6])-calc) > 5e-6 {
				t.Errorf("reflection %v: no such line in the analysis (%+v)", fs[1:], l)
				continue
			}
			if d := ce.D(h); math.Abs(d-atof(fs[4])) > 5e-7 {
				t.Errorf("reflection %v: d %s, cell gives %.7f", fs[1:4], fs[4], d)
			}
			rows++
		}
	}
	if len(json) > 0 {
		t.Errorf("gemmi did not read %v", json)
	}
	// One row per reflection: a line that coincident reflections index
	// (5 1 1 and 3 3 3) has one per reflection.
	nRefl := 0
	for _, l := range s.Lines {
		if l.Indexed {
			nRefl += len(l.HKL)
		}
	}
	if rows != nRefl {
		t.Errorf("gemmi read %d reflections, the indexed lines have %d", rows, nRefl)
	}
}

func atof(s string) float64 {
	v, _ := strconv.ParseFloat(s, 64)
	return v
}
