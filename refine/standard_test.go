package refine

import (
	"context"
	"math"
	"math/rand/v2"
	"testing"

	"reticle/cell"
)

// mixture simulates an unknown phase with an internal standard: both
// phases' lines carry the same zero shift and displacement.
func mixture(unknown cell.Cell, std Standard, zero, disp float64, rng *rand.Rand) []Observation {
	obs := synthLines(truth{cell: unknown, zero: zero, disp: disp, radius: 240}, rng)
	for _, o := range synthLines(truth{cell: std.Cell, zero: zero, disp: disp, radius: 240}, rng) {
		o.Standard = true
		obs = append(obs, o)
	}
	return obs
}

// TestStandard refines rutile (handbook cell from memory) mixed with
// silicon SRM 640d: the standard's lines fix the zero shift and the
// displacement, which are then applied to rutile; over 1,000 draws the
// cell lies within one esd about 68 % of the time, so the curve's
// uncertainty reaches the cell.
func TestStandard(t *testing.T) {
	si, err := LookupStandard("Si")
	if err != nil {
		t.Fatal(err)
	}
	rutile := testCells[1]
	rng := rand.New(rand.NewPCG(21, 4))
	opt := Options{Wavelength: cuKa1, Corrections: Zero | Displacement, Standard: &si}
	draws := 1000
	if testing.Short() {
		draws = 100
	}
	within := 0
	for d := 0; d < draws; d++ {
		zero, disp := 0.2*rng.Float64()-0.1, 0.2*rng.Float64()-0.1
		obs := mixture(rutile, si, zero, disp, rng)
		res, err := Refine(context.Background(), rutile, obs, opt)
		if err != nil {
			t.Fatal(err)
		}
		if d == 0 {
			z, _ := res.Param("zero")
			if !z.Fixed || res.StandardFit == nil || res.StandardFit.Fitted == 0 {
				t.Fatalf("zero from the standard not marked fixed: %+v", res.Params)
			}
			z0, zu := res.Zero()
			d0, du := res.Displacement()
			if math.Abs(z0-zero) > 4*zu || math.Abs(d0-disp) > 4*du {
				t.Errorf("corrections %.4f° %.4f mm, truth %.4f° %.4f mm", z0, d0, zero, disp)
			}
			if len(res.Residuals)+len(res.StandardFit.Residuals) != len(obs) {
				t.Errorf("%d + %d residuals for %d lines", len(res.Residuals), len(res.StandardFit.Residuals), len(obs))
			}
		}
		if math.Abs(res.Cell.A-rutile.A) <= res.ESD.A {
			within++
		}
	}
	f := float64(within) / float64(draws)
	t.Logf("a within 1 esd in %.3f of %d draws", f, draws)
	// 0.045 is three binomial standard deviations of a fraction of 0.68
	// over 1,000 draws (√(0.68·0.32/1000) = 0.0148).
	if !testing.Short() && math.Abs(f-0.68) > 0.045 {
		t.Errorf("a within 1 esd in %.3f of draws, want 0.68 ± 0.045", f)
	}
}

// TestRefineLines assigns lines to a typed cell that is 0.1 % off, with an
// impurity line and the standard's lines mixed in, and refines.
func TestRefineLines(t *testing.T) {
	si, _ := LookupStandard("Si-640d")
	rutile := testCells[1]
	rng := rand.New(rand.NewPCG(8, 8))
	obs := mixture(rutile, si, 0.05, 0.08, rng)
	var lines []Observation
	for _, o := range obs {
		lines = append(lines, Observation{Line: o.Line})
	}
	lines = append(lines, Observation{Line: cell.Line{TwoTheta: 33.333, ESD: 0.003}}) // no line of either phase
	lines[0].Excluded = true
	start := cell.Must(cell.Tetragonal, cell.P, 4.59, 2.96)
	res, err := RefineLines(context.Background(), start, lines, Options{Wavelength: cuKa1, Corrections: Zero | Displacement, Standard: &si}, Matching{})
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(res.Cell.A-rutile.A) > 4*res.ESD.A || math.Abs(res.Cell.C-rutile.C) > 4*res.ESD.C {
		t.Errorf("cell %v, truth %v (esds %.6f %.6f)", res.Cell, rutile, res.ESD.A, res.ESD.C)
	}
	found := false
	for _, l := range res.Unmatched {
		if l.TwoTheta == 33.333 {
			found = true
		}
	}
	if !found {
		t.Errorf("impurity line not among the unmatched: %v", res.Unmatched)
	}
	nStd := res.StandardFit.Fitted + len(res.Overlapped)
	if nStd < 8 {
		t.Errorf("only %d standard lines assigned", res.StandardFit.Fitted)
	}
	if !res.Residuals[0].Excluded && !res.StandardFit.Residuals[0].Excluded {
		t.Errorf("the excluded line was fitted")
	}
}

func TestLookupStandard(t *testing.T) {
	for _, name := range []string{"Si", "lab6", "Si-640c", "LaB6-660a"} {
		if _, err := LookupStandard(name); err != nil {
			t.Errorf("%s: %v", name, err)
		}
	}
	if _, err := LookupStandard("quartz"); err == nil {
		t.Error("unknown standard accepted")
	}
}
