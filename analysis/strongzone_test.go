package analysis

import (
	"testing"

	"reticle/cell"
	"reticle/internal/synth"
)

// TestStrongLinesLower: scans drawn by synth.Draw whose first lines hold
// a foreign phase's weak lines among the sample's, missed before the
// strong lines were searched in the lower systems too whenever the
// first lines were (indexing.Index), and before a cell whose lines fall
// mostly on another's could take that other as its second phase
// (indexing/pair.go, secondOf). Each was missed at 639e242: the first
// answer was a cubic P cell of 21.4 Å, a hexagonal P cell of 5.49 ×
// 33.2 Å, and a hexagonal P cell of 2.36 × 39.1 Å that took the true
// lattice as its second phase.
func TestStrongLinesLower(t *testing.T) {
	longUnderRace(t)
	for _, tc := range []struct {
		lat  synth.Lattice
		seed uint64
	}{
		// triclinic P, 3.345 × 3.768 × 3.535 Å; a hexagonal phase at 7 %
		// fills the first lines with weak ones
		{synth.Lattice{System: cell.Triclinic, Centring: cell.P}, 1798300000000000042},
		// orthorhombic F, 9.526 × 9.497 × 3.547 Å (0.3 % from
		// tetragonal); a hexagonal phase at 7 %
		{synth.Lattice{System: cell.Orthorhombic, Centring: cell.F}, 1798300000000000249},
		// orthorhombic C, 19.712 × 2.863 × 2.608 Å; a cubic phase at 3 %
		{synth.Lattice{System: cell.Orthorhombic, Centring: cell.C}, 1798300000000000079},
	} {
		blindFirst(t, tc.lat, tc.seed)
	}
}
