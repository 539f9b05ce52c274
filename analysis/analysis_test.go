package analysis

import (
	"context"
	"encoding/json"
	"math"
	"math/rand/v2"
	"os"
	"reflect"
	"strings"
	"testing"
	"time"

	"reticle/cell"
	"reticle/density"
	"reticle/esd"
	"reticle/internal/synth"
	"reticle/peaks"
	"reticle/refine"
	"reticle/scanfile"
)

const demoPath = "../assets/demo/kiln-trial-07.xy"

// cuKa1, cuKa2: Cu K-alpha wavelengths in Å (Hölzer et al. 1997, from
// memory).
const cuKa1, cuKa2 = 1.5405929, 1.5444274

func demo(t testing.TB, s Settings) *Analysis {
	t.Helper()
	a, err := Open(context.Background(), demoPath, s, nil)
	if err != nil {
		t.Fatal(err)
	}
	return a
}

// simulated makes a scan of the phases with the instrument errors given,
// through the project's generator (internal/synth) and the plain-text
// reader.
func simulated(t testing.TB, seed uint64, in synth.Instrument, phases ...synth.Phase) *scanfile.Scan {
	t.Helper()
	in.Lambda1, in.Lambda2 = cuKa1, cuKa2
	s := synth.Simulate(synth.Spec{Phases: phases, Instrument: in, From: 15, To: 120, Step: 0.02, Peak: 20000}, rand.New(rand.NewPCG(seed, 1)))
	scan, err := scanfile.Parse("simulated.xy", s.Text("simulated scan (internal/synth)\nAnode: Cu"))
	if err != nil {
		t.Fatal(err)
	}
	return scan
}

// TestRunDemo: the demo scan (a spinel, cubic F, made by
// assets/demo/make_demo.go) comes out cubic F first, refined.
func TestRunDemo(t *testing.T) {
	a := demo(t, Settings{})
	c := a.ChosenCandidate()
	if c == nil || c.Refined == nil || c.Cell().System != cell.Cubic || c.Cell().Centring != cell.F {
		t.Fatalf("first candidate %+v", c)
	}
	if len(a.Lines) < 15 || a.Search == nil {
		t.Errorf("%d lines", len(a.Lines))
	}
}

// TestEdits rejects a peak and excludes a line: the indexing sees one
// line fewer, the refinement fits one fewer.
func TestEdits(t *testing.T) {
	a := demo(t, Settings{})
	var s Settings
	s.Reject(a.Peaks[0].TwoTheta)
	b := demo(t, s)
	if !b.Peaks[0].Rejected || len(b.Lines) != len(a.Lines)-1 {
		t.Errorf("rejecting a peak: %d lines (was %d)", len(b.Lines), len(a.Lines))
	}
	s.Reject(a.Peaks[0].TwoTheta + EditTolerance/2) // the same peak: taken back
	if len(s.Rejected) != 0 {
		t.Errorf("rejecting again did not restore: %v", s.Rejected)
	}
	first := a.ChosenCandidate().Refined
	s.Exclude(first.Residuals[2].TwoTheta)
	c := demo(t, s)
	r := c.ChosenCandidate().Refined
	if r.Fitted != first.Fitted-1 || !r.Residuals[2].Excluded {
		t.Errorf("excluding a line: %d fitted (was %d)", r.Fitted, first.Fitted)
	}
	// Re-running after the extraction gives the same analysis.
	again, err := Analyse(context.Background(), c.Extraction, s, nil)
	if err != nil || !reflect.DeepEqual(again.ChosenCandidate().Refined.Cell, r.Cell) {
		t.Errorf("re-run differs: %v", err)
	}
}

// TestStandard: a simulated cubic phase (a = 4.2117 Å, an invented round
// value of the size of MgO's cell) mixed with silicon SRM 640d, with a
// zero shift and a displacement. With the standard named, its lines are
// kept out of the indexing, fix the corrections, and the unknown's cell
// lies within 3 esd of the truth.
func TestStandard(t *testing.T) {
	si, _ := refine.LookupStandard("Si-640d")
	truth := cell.Must(cell.Cubic, cell.F, 4.2117)
	scan := simulated(t, 3, synth.Instrument{Zero: 0.04, Displacement: 0.06},
		synth.Phase{Cell: truth}, synth.Phase{Cell: si.Cell, Scale: 0.6})
	corr := refine.Zero | refine.Displacement
	a, err := Run(context.Background(), scan, Settings{Standard: &si, Corrections: &corr}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if len(a.StandardLines) < 6 {
		t.Fatalf("%d standard lines found", len(a.StandardLines))
	}
	c := a.ChosenCandidate()
	if c == nil || c.Refined == nil || c.Refined.StandardFit == nil {
		t.Fatalf("no refinement with the standard: %+v", c)
	}
	ce, e := c.Cell(), c.Refined.ESD.A
	if ce.System != cell.Cubic || math.Abs(ce.A-truth.A) > 3*e {
		t.Errorf("cell %s, truth %v", esd.Format(ce.A, e), truth)
	}
	z, _ := c.Refined.Param("zero")
	if !z.Fixed {
		t.Errorf("zero shift not marked as the standard's: %+v", z)
	}
}

// TestRefineCell refines known cells of every system from starting
// values 0.5 % off, on simulated scans with a zero shift: every refined
// parameter within 3 esd of the truth. The cells are invented, of the
// size of common materials.
func TestRefineCell(t *testing.T) {
	for i, truth := range []cell.Cell{
		cell.Must(cell.Tetragonal, cell.I, 3.2523, 4.9461),
		cell.Must(cell.Orthorhombic, cell.P, 5.0896, 4.5248, 7.3133),
		cell.Must(cell.Monoclinic, cell.C, 9.41, 5.38, 6.12, 102.4),
		{System: cell.Triclinic, Centring: cell.P, A: 6.12, B: 10.69, C: 5.96, Alpha: 82.35, Beta: 107.33, Gamma: 102.6},
	} {
		scan := simulated(t, uint64(10+i), synth.Instrument{Zero: 0.03}, synth.Phase{Cell: truth})
		e, err := Extract(context.Background(), scan, Settings{}, nil)
		if err != nil {
			t.Fatal(err)
		}
		start := truth
		start.A *= 1.005
		start.C *= 0.995
		r, err := RefineCell(context.Background(), e, start.Symmetrize(), Settings{})
		if err != nil {
			t.Fatalf("%v: %v", truth, err)
		}
		want := truth.Params()
		for _, p := range r.Params {
			for k, n := range cell.ParamNames {
				if n == p.Name && math.Abs(p.Value-want[k]) > 3*p.ESD {
					t.Errorf("%s %s: %s, truth %g", truth.System, p.Name, esd.Format(p.Value, p.ESD), want[k])
				}
			}
		}
		// Dense patterns hold a few blends that the extraction fits as
		// one peak away from both lines: at most 3 % of the lines.
		t.Logf("%s: %d lines fitted, %d overlapped, %d unmatched", truth.System, r.Fitted, len(r.Overlapped), len(r.Unmatched))
		if n := r.Fitted + len(r.Overlapped); len(r.Unmatched) > max(2, n*3/100) {
			t.Errorf("%s: %d of %d lines unmatched", truth.System, len(r.Unmatched), n+len(r.Unmatched))
		}
	}
}

// TestSettingsJSON: settings survive JSON (sessions and documents).
func TestSettingsJSON(t *testing.T) {
	f, _ := density.ParseFormula("CuSO4·5H2O")
	m, _ := density.ParseMeasured("2.28(1)")
	si, _ := refine.ParseStandard("cubic F a=5.43119(1)")
	r, _ := scanfile.ParseRadiation("CoKa1")
	corr := refine.Zero | refine.Transparency
	s := Settings{Sample: "kiln 7", Radiation: &r, Systems: []cell.System{cell.Cubic, cell.Monoclinic}, Corrections: &corr,
		Scaling: refine.ScaleNever, Standard: &si, Formula: &f, Density: &m, Z: 2, Rejected: []float64{20.1}, Excluded: []float64{30}}
	b, err := json.Marshal(s)
	if err != nil {
		t.Fatal(err)
	}
	var back Settings
	if err := json.Unmarshal(b, &back); err != nil {
		t.Fatalf("%s: %v", b, err)
	}
	if back.Radiation.Lambda1 != r.Lambda1 || back.Radiation.Doublet() || *back.Corrections != corr || back.Standard.Cell != si.Cell ||
		back.Formula.Text != f.Text || *back.Density != m || !reflect.DeepEqual(back.Systems, s.Systems) || back.Scaling != refine.ScaleNever {
		t.Errorf("round trip:\n%s\n%+v", b, back)
	}
	if err := json.Unmarshal([]byte(`{"systems":["cubic","pentagonal"]}`), &back); err == nil {
		t.Error("an unknown system was read")
	}
}

// TestCheck: settings no analysis can use are refused with the setting's
// name.
func TestCheck(t *testing.T) {
	none := refine.None
	si, _ := refine.LookupStandard("Si")
	m, _ := density.ParseMeasured("2")
	for _, s := range []Settings{
		{KAlpha2Ratio: 2}, {Threshold: -1}, {Radius: -240}, {Z: -1}, {Density: &m},
		{Standard: &si, Corrections: &none}, {Systems: []cell.System{99}},
	} {
		if err := s.Check(); err == nil {
			t.Errorf("%+v accepted", s)
		}
	}
}

// TestRelativeHeight: I/I₀ is the height over the highest peak's, K-beta
// companions left out of the highest.
func TestRelativeHeight(t *testing.T) {
	mk := func(h float64, f peaks.Flags) Peak { return Peak{Peak: peaks.Peak{Height: h, Flags: f, Parent: -1}} }
	a := &Analysis{Peaks: []Peak{mk(400, 0), mk(1000, peaks.FlagKBeta), mk(800, 0), mk(200, 0)}}
	for i, want := range []float64{50, 125, 100, 25} {
		if got := a.RelativeHeight(i); math.Abs(got-want) > 1e-12 {
			t.Errorf("peak %d: I/I0 %g, want %g", i+1, got, want)
		}
	}
	if got := a.RelativeHeight(4); !math.IsNaN(got) {
		t.Errorf("a peak beyond the list: %g, want NaN", got)
	}
}

// TestSettingsUnindexedKey: the unindexed lines allowed are written as
// "unindexed" and read under that name and the earlier "impurities".
func TestSettingsUnindexedKey(t *testing.T) {
	for _, c := range []struct {
		in   string
		want int
	}{
		{`{"impurities":3}`, 3},
		{`{"unindexed":2}`, 2},
		{`{"unindexed":-1,"impurities":4}`, -1},
		{`{"sample":"kiln trial 12"}`, 0},
	} {
		var s Settings
		if err := json.Unmarshal([]byte(c.in), &s); err != nil {
			t.Fatalf("%s: %v", c.in, err)
		}
		if s.Unindexed != c.want {
			t.Errorf("%s: unindexed %d, want %d", c.in, s.Unindexed, c.want)
		}
	}
	out, err := json.Marshal(Settings{Unindexed: 5, Sample: "kiln trial 12"})
	if err != nil || !strings.Contains(string(out), `"unindexed":5`) || strings.Contains(string(out), "impurities") {
		t.Errorf("written as %s (%v)", out, err)
	}
	var back Settings
	if err := json.Unmarshal(out, &back); err != nil || back.Sample != "kiln trial 12" || back.Unindexed != 5 {
		t.Errorf("read back %+v (%v)", back, err)
	}
}

// sizeOf returns the number of cases and the seed of a randomized test:
// short and the fixed seed normally; with RETICLE_LONG set, long and the
// seed of the test's flag, or a fresh one (to be printed) when it is 0.
func sizeOf(short, long int, fixed, flagged uint64) (int, uint64) {
	if os.Getenv("RETICLE_LONG") == "" {
		return short, fixed
	}
	if flagged == 0 {
		flagged = uint64(time.Now().UnixNano())
	}
	return long, flagged
}
