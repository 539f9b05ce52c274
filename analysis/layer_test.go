package analysis

import (
	"testing"

	"reticle/cell"
	"reticle/internal/synth"
)

// TestShortEdgeLayers: scans drawn by synth.Draw of cells with one edge
// of about 3 Å beside edges of 12–25 Å, whose first forty lines hold
// only eight or nine lines off the zone of the long edges, too few for
// a second zone of the lattice to be found; the third axis is found from
// the layers over that zone (indexing/layer.go). Before, a monoclinic
// cell with a third edge of 9–11 Å that indexed the few lines off the
// zone by chance came first, stated at 0.65–1.00.
func TestShortEdgeLayers(t *testing.T) {
	longUnderRace(t)
	for _, tc := range []struct {
		lat  synth.Lattice
		seed uint64
	}{
		// orthorhombic P, 3.494 × 12.253 × 25.176 Å (drawn as
		// monoclinic with β = 90°)
		{synth.Lattice{System: cell.Monoclinic, Centring: cell.P}, 1796800000000000222},
		// monoclinic P, a = 3.072, b = 23.892, c = 11.937 Å, β = 102.1°
		{synth.Lattice{System: cell.Monoclinic, Centring: cell.P}, 1796800000000000278},
		// monoclinic C, a = 2.853, b = 17.243, c = 18.160 Å, β = 115.7°
		{synth.Lattice{System: cell.Monoclinic, Centring: cell.C}, 1796800000000000209},
	} {
		a, _, _, _ := blindFirst(t, tc.lat, tc.seed)
		if p := a.Candidates[0].Solution.Probability; p < 0.9 {
			t.Errorf("seed %d: first stated at %.2f, want at least 0.9", tc.seed, p)
		}
	}
}
