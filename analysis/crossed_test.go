package analysis

import (
	"testing"

	"reticle/cell"
	"reticle/internal/synth"
)

// TestCrossed: a whole-pattern cell on the other side of a higher metric
// from the peaks' cell, whose departure the peaks measured, is crossed;
// one on the same side, one from peaks that did not measure the
// departure, and one whose mirror is its own lattice are not. Cells
// invented; the rhombohedral ones are on hexagonal axes near the cubic P
// metric (c/a = √(3/2), α = 90°; the peaks' cell has α = 89.88°).
func TestCrossed(t *testing.T) {
	tI := func(a, c float64) cell.Cell { return cell.Must(cell.Tetragonal, cell.I, a, c) }
	hR := func(a, c float64) cell.Cell { return cell.Must(cell.Rhombohedral, cell.R, a, c) }
	oP := func(a, b, c float64) cell.Cell { return cell.Must(cell.Orthorhombic, cell.P, a, b, c) }
	esd := func(x float64) cell.ESD { return cell.ESD{A: x, B: x, C: x} }
	for _, tc := range []struct {
		name    string
		c       cell.Cell
		e       cell.ESD
		pattern cell.Cell
		want    bool
	}{
		{"tetragonal, c < a to c > a", tI(8.9035, 8.8762), esd(0.002), tI(8.8811, 8.9038), true},
		{"tetragonal, same side", tI(8.9035, 8.8762), esd(0.002), tI(8.9010, 8.8790), false},
		{"tetragonal, departure within 2 esds", tI(8.9035, 8.8762), esd(0.02), tI(8.8811, 8.9038), false},
		{"rhombohedral, across α = 90°", hR(5.657, 6.95), esd(0.001), hR(5.657, 6.907), true},
		{"rhombohedral, same side", hR(5.657, 6.95), esd(0.001), hR(5.657, 6.945), false},
		{"orthorhombic, a and b exchanged", oP(5.000, 5.020, 7.000), esd(0.001), oP(5.020, 5.000, 7.000), false},
		{"orthorhombic, far from tetragonal", oP(5.000, 5.200, 7.000), esd(0.001), oP(5.001, 5.199, 7.000), false},
	} {
		if got := crossed(tc.c, tc.e, tc.pattern); got != tc.want {
			t.Errorf("%s: crossed(%v, %v) = %v, want %v", tc.name, tc.c, tc.pattern, got, tc.want)
		}
	}
}

// TestPolishKeepsMeasuredSign: a scan drawn by synth.Draw of a
// tetragonal I cell 0.3 % from cubic metric (a = 8.903, c = 8.877 Å,
// doublet, 4409 counts) whose 400 and 004 lines the peak search
// resolves (40.54 and 40.67°): the peak positions give c < a, and the
// whole-pattern fit converged to c > a (a = 8.881, c = 8.904 Å), the
// split components' free intensities exchanged. The cell kept is the
// peaks', and it is the true one.
func TestPolishKeepsMeasuredSign(t *testing.T) {
	longUnderRace(t)
	a, _, _, _ := blindFirst(t, synth.Lattice{System: cell.Tetragonal, Centring: cell.I}, 1796600000000000354)
	if c := a.Candidates[0]; c.Pattern != nil {
		t.Errorf("the whole-pattern cell %v was kept (%s)", c.Cell(), c.PolishNote)
	}
}
