package indexing

import (
	"context"
	"testing"

	"reticle/cell"
)

// TestShortEdgeTriclinic: a triclinic cell with one short edge (3.8 Å
// beside 6.8 and 12.7 Å; a cell of the property test, invented), its
// first 30 lines with Cu K-alpha1, a zero error of −0.05° and two foreign
// lines, 9.500° and 11.016°, among the first eight (the true lines there
// fall at 6.92°, 13.29°, 13.92°, 14.53°, 15.50° and 18.54°). The zone
// that completes its lattice has an axis beyond the eighth line; with
// the first 16 lines as zone axes the true lattice comes first (with 8
// it does not).
func TestShortEdgeTriclinic(t *testing.T) {
	want := cell.Cell{System: cell.Triclinic, Centring: cell.P, A: 6.77122, B: 12.73253, C: 3.79923, Alpha: 86.39, Beta: 79.202, Gamma: 84.951}
	refs := cell.Reflections(want, 40)[:30]
	ttmax := ttOf(refs[19].Q, cuKa1)
	ls := modelLines(want, cuKa1, ttOf(refs[29].Q, cuKa1)+0.01, nil, -0.05, 0, 57)
	ls = append(ls, cell.Line{TwoTheta: 9.500, ESD: 0.005}, cell.Line{TwoTheta: 11.016, ESD: 0.005})
	res, err := Index(context.Background(), ls, Options{Wavelength: cuKa1}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if len(res.Solutions) == 0 || !sameLattice(want, res.Solutions[0].Cell, cuKa1, ttmax) {
		got := "none"
		if len(res.Solutions) > 0 {
			got = res.Solutions[0].String()
		}
		t.Errorf("first %s, want the lattice of %v", got, want)
	}
}
