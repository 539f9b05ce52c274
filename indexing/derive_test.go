package indexing

import (
	"context"
	"testing"

	"reticle/cell"
)

// TestDerivativesSubcell: a search that settled on a cell with its c axis
// doubled (an orthorhombic cell of invented edges, every line of the true
// cell indexed by the doubled one) is offered the true cell among the
// derivative lattices, and the ranking puts the true cell first: the
// doubled cell's extra lines are never seen.
func TestDerivativesSubcell(t *testing.T) {
	truth := cell.Must(cell.Orthorhombic, cell.P, 4.1, 5.3, 6.7)
	ls := modelLines(truth, cuKa1, 110, nil, 0.02, 0, 3)
	o := Options{Wavelength: cuKa1}.withDefaults()
	all := prepare(ls, o)
	first := all[:min(len(all), o.Lines)]
	doubled := truth
	doubled.C *= 2
	k := &cand{c: doubled, zero: 0.02, zeroFree: true}
	if !k.settle(first, cuKa1, 0, len(first)) {
		t.Fatal("the doubled cell does not index the lines")
	}
	k.figures(first, cuKa1)
	ranked := rankCands([]*cand{k}, first, all, o)
	want := map[cell.System]bool{cell.Orthorhombic: true, cell.Monoclinic: true, cell.Triclinic: true}
	more, err := derivatives(context.Background(), ranked, first, all, o, want, len(first)-2)
	if err != nil {
		t.Fatal(err)
	}
	ranked = rankCands(append(ranked, more...), first, all, o)
	got := ranked[0].c
	if got.System != cell.Orthorhombic || !sameLattice(truth, got, cuKa1, all[len(all)-1].tt) {
		t.Errorf("first %v, want the lattice of %v (%d derivative cells)", got, truth, len(more))
	}
}

// TestDerivativesHigher: a monoclinic cell whose β is 90° within its
// esds (an orthorhombic lattice) is offered in the orthorhombic system,
// which then ranks first.
func TestDerivativesHigher(t *testing.T) {
	truth := cell.Must(cell.Orthorhombic, cell.P, 4.1, 5.3, 6.7)
	ls := modelLines(truth, cuKa1, 110, nil, 0.02, 0, 5)
	o := Options{Wavelength: cuKa1}.withDefaults()
	all := prepare(ls, o)
	first := all[:min(len(all), o.Lines)]
	k := &cand{c: cell.Must(cell.Monoclinic, cell.P, 4.1, 5.3, 6.7, 90.01), zero: 0.02, zeroFree: true}
	if !k.settle(first, cuKa1, 0, len(first)) {
		t.Fatal("the monoclinic cell does not index the lines")
	}
	k.figures(first, cuKa1)
	ranked := rankCands([]*cand{k}, first, all, o)
	want := map[cell.System]bool{cell.Orthorhombic: true, cell.Monoclinic: true}
	more, err := derivatives(context.Background(), ranked, first, all, o, want, len(first)-2)
	if err != nil {
		t.Fatal(err)
	}
	ranked = rankCands(append(ranked, more...), first, all, o)
	if got := ranked[0].c; got.System != cell.Orthorhombic {
		t.Errorf("first %v, want orthorhombic", got)
	}
}
