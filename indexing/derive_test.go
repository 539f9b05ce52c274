package indexing

import (
	"context"
	"math"
	"testing"

	"reticle/cell"
)

// settledOn returns the default options, the lines of truth (modelLines
// to 110° 2θ, Cu K-alpha1, zero offset 0.02°, noise drawn from seed) and
// the first of them, with the cand of cell c settled on the first lines
// (windows widened by extra, degrees 2θ), every one indexed; it fails
// the test when c does not index them.
func settledOn(t *testing.T, truth, c cell.Cell, seed uint64, extra float64) (Options, []obs, []obs, *cand) {
	t.Helper()
	o := Options{Wavelength: cuKa1}.withDefaults()
	all := prepare(modelLines(truth, cuKa1, 110, nil, 0.02, 0, seed), o)
	first := all[:min(len(all), o.Lines)]
	k := &cand{c: c, zero: 0.02, zeroFree: true}
	if !k.settle(first, cuKa1, extra, len(first)) {
		t.Fatalf("%v does not index the lines of %v", c, truth)
	}
	k.figures(first, cuKa1)
	return o, all, first, k
}

// TestDerivativesSubcell: a search that settled on a cell with its c axis
// doubled (an orthorhombic cell of invented edges, every line of the true
// cell indexed by the doubled one) is offered the true cell among the
// derivative lattices, and the ranking puts the true cell first: the
// doubled cell's extra lines are never seen.
func TestDerivativesSubcell(t *testing.T) {
	truth := cell.Must(cell.Orthorhombic, cell.P, 4.1, 5.3, 6.7)
	doubled := truth
	doubled.C *= 2
	o, all, first, k := settledOn(t, truth, doubled, 3, 0)
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
	o, all, first, k := settledOn(t, truth, cell.Must(cell.Monoclinic, cell.P, 4.1, 5.3, 6.7, 90.01), 5, 0)
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

// TestDemandingLines: a tetragonal P cell whose lines are those of its
// I lattice but for two weak ones of h + k + l odd (as the oxygen of a
// tetragonal zirconia-like structure gives; cell invented) is reported P
// with those lines named as the ones that demand it.
func TestDemandingLines(t *testing.T) {
	c := cell.Must(cell.Tetragonal, cell.P, 3.64, 5.27)
	keep := map[cell.HKL]bool{{1, 0, 2}: true, {1, 1, 1}: true}
	absent := func(h cell.HKL) bool {
		odd := (h[0]+h[1]+h[2])%2 != 0
		return odd && !keep[cell.HKL{abs(h[0]), abs(h[1]), abs(h[2])}] && !keep[cell.HKL{abs(h[1]), abs(h[0]), abs(h[2])}]
	}
	ls := modelLines(c, cuKa1, 110, absent, 0.01, 0, 9)
	var want []float64
	for i := range ls {
		q := qOf(ls[i].TwoTheta, 0.01, cuKa1)
		for _, h := range []cell.HKL{{1, 0, 2}, {1, 1, 1}} {
			if math.Abs(q-c.Q(h)) < 2e-3*q {
				ls[i].Intensity *= 0.05 // weak
				want = append(want, ls[i].TwoTheta)
			}
		}
	}
	res, err := Index(context.Background(), ls, Options{Wavelength: cuKa1}, nil)
	if err != nil {
		t.Fatal(err)
	}
	s := res.Solutions[0]
	if s.Cell.System != cell.Tetragonal || s.Cell.Centring != cell.P {
		t.Fatalf("first %v, want tetragonal P", s.Cell)
	}
	if len(s.Demanding) != len(want) || s.Index != 2 {
		t.Errorf("demanding lines %v (index %d), want %v (2)", s.Demanding, s.Index, want)
	}
}
