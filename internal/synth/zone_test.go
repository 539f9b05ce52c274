package synth

import (
	"testing"

	"reticle/cell"
)

// TestZoneOnly checks the zone test on cells whose short edge puts every
// line off its zone beyond the scan's end, or not.
func TestZoneOnly(t *testing.T) {
	// An orthorhombic cell with b = 2.53 Å: its first line off the
	// (h0l) zone is 010, d = 2.53 Å, 2θ = 35.5° for Cu K-alpha1.
	long := cell.Must(cell.Orthorhombic, cell.P, 24.6, 2.53, 18.4)
	mono := cell.Must(cell.Monoclinic, cell.C, 29.6, 3.18, 18.3, 98)
	for _, tc := range []struct {
		name string
		c    cell.Cell
		to   float64 // scan end, degrees 2θ (Cu K-alpha1)
		want bool
	}{
		{"short b, scan to 34°", long, 34, true},
		{"short b, scan to 37°", long, 37, false},
		{"monoclinic C, short b, scan to 27°", mono, 27, true},
		{"monoclinic C, short b, scan to 60°", mono, 60, false},
		{"cubic F", cell.Must(cell.Cubic, cell.F, 5.64), 40, false},
		{"hexagonal, short c, scan to 36°", cell.Must(cell.Hexagonal, cell.P, 12, 2.4), 36, true},
		{"hexagonal, short c, scan to 38°", cell.Must(cell.Hexagonal, cell.P, 12, 2.4), 38, false},
	} {
		if got := ZoneOnly(tc.c, cell.QOf(tc.to, cuKa1)); got != tc.want {
			t.Errorf("%s: got %v, want %v", tc.name, got, tc.want)
		}
	}
}
