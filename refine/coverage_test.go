package refine

import (
	"context"
	"math"
	"math/rand/v2"
	"testing"

	"reticle/indexing"
)

// TestCoverage checks that the uncertainties are honest: over many
// simulated line lists with Gaussian errors of known σ, the refined
// parameters fall within one esd of the truth about 68.3 % of the time and
// within two esds about 95.4 % (the normal distribution's 1σ and 2σ
// fractions). Each system gets 6,000 draws, a third each without
// corrections, with a zero shift refined, and with a zero shift and a
// displacement refined, so that every parameter has at least 2,000. The cells are handbook values from memory (NaCl,
// rutile, magnesium, corundum on hexagonal axes); any cells would do.
func TestCoverage(t *testing.T) {
	draws := 6000
	if testing.Short() {
		draws = 300
	}
	cells := []indexing.Cell{
		indexing.NewCell(indexing.Cubic, indexing.F, 5.6402, 0),
		indexing.NewCell(indexing.Tetragonal, indexing.P, 4.5937, 2.9587),
		indexing.NewCell(indexing.Hexagonal, indexing.P, 3.2094, 5.2108),
		indexing.NewCell(indexing.Rhombohedral, indexing.R, 4.7589, 12.991),
	}
	for _, cell := range cells {
		t.Run(cell.System.String(), func(t *testing.T) {
			rng := rand.New(rand.NewPCG(uint64(cell.System)+1, 7))
			within1, within2 := map[string]int{}, map[string]int{}
			count := map[string]int{}
			for d := 0; d < draws; d++ {
				tr := truth{cell: cell, radius: 240}
				opt := Options{Wavelength: cuKa1, Radius: 240}
				switch d % 3 {
				case 1:
					tr.zero = 0.2*rng.Float64() - 0.1
					opt.Zero = true
				case 2:
					tr.zero = 0.2*rng.Float64() - 0.1
					tr.disp = 0.2*rng.Float64() - 0.1
					opt.Zero, opt.Displacement = true, true
				}
				obs := synthLines(tr, rng)
				// Start away from the truth, as a real refinement does.
				start := cell
				start.A *= 1.0005
				start.B *= 1.0005
				start.C *= 0.9995
				res, err := Refine(context.Background(), start, obs, opt)
				if err != nil {
					t.Fatal(err)
				}
				want := map[string]float64{"a": cell.A, "c": cell.C, "zero": tr.zero, "displacement": tr.disp}
				for _, p := range res.Params {
					z := math.Abs(p.Value-want[p.Name]) / p.ESD
					count[p.Name]++
					if z <= 1 {
						within1[p.Name]++
					}
					if z <= 2 {
						within2[p.Name]++
					}
				}
			}
			for _, name := range []string{"a", "c", "zero", "displacement"} {
				n := count[name]
				if n == 0 {
					continue
				}
				f1, f2 := float64(within1[name])/float64(n), float64(within2[name])/float64(n)
				t.Logf("%s: %d draws, within 1 esd %.3f, within 2 esd %.3f", name, n, f1, f2)
				if testing.Short() {
					continue
				}
				if math.Abs(f1-0.68) > 0.03 || math.Abs(f2-0.95) > 0.015 {
					t.Errorf("%s: within 1 esd %.3f (want 0.68 ± 0.03), within 2 esd %.3f (want 0.95 ± 0.015)", name, f1, f2)
				}
			}
		})
	}
}
