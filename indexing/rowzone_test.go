package indexing

import (
	"context"
	"slices"
	"testing"

	"reticle/cell"
)

// hiddenBasis are invented cells of a long edge whose lines show the
// orders of the long edge's reflection but not the shortest reflections
// of a zone beside it (left out, as if extinct or too weak to see): the
// zone's reduced basis is then not among the lines, and Ito's pair step
// (findZones) does not see the zone.
var hiddenBasis = []struct {
	name   string
	cell   cell.Cell
	absent []cell.HKL
	zone   [2]cell.HKL // a basis of a zone that only rowZones finds
}{
	{"orthorhombic, without 100 and 010", cell.Must(cell.Orthorhombic, cell.P, 3.62, 2.71, 11.3),
		[]cell.HKL{{1, 0, 0}, {0, 1, 0}}, [2]cell.HKL{{0, 0, 1}, {1, 0, 0}}},
	{"monoclinic, without 100 and 010", cell.Must(cell.Monoclinic, cell.P, 4.35, 3.08, 13.6, 97.5),
		[]cell.HKL{{1, 0, 0}, {0, 1, 0}}, [2]cell.HKL{{0, 0, 1}, {0, 1, 0}}},
}

// without returns the absent function of hiddenBasis's reflections.
func without(hs []cell.HKL) func(cell.HKL) bool {
	return func(h cell.HKL) bool {
		for _, a := range hs {
			if h == a || h == (cell.HKL{-a[0], -a[1], -a[2]}) {
				return true
			}
		}
		return false
	}
}

// TestRowZones checks, on the first twenty lines of each hiddenBasis
// cell (Cu K-alpha1, windows of 0.01° 2θ), that findZones misses the
// zone and rowZones finds it.
func TestRowZones(t *testing.T) {
	for _, test := range hiddenBasis {
		absent := without(test.absent)
		var qs, ws []float64
		for _, r := range cell.Reflections(test.cell, qOf(120, 0, cuKa1)) {
			if len(qs) == 20 {
				break
			}
			if slices.IndexFunc(allHKL(test.cell, r.Q), func(h cell.HKL) bool { return !absent(h) }) < 0 {
				continue
			}
			qs = append(qs, r.Q)
			ws = append(ws, dQ(ttOf(r.Q, cuKa1), 0.01, cuKa1))
		}
		u, v := test.zone[0], test.zone[1]
		c := test.cell
		uv := cell.HKL{u[0] + v[0], u[1] + v[1], u[2] + v[2]}
		want := zone{qa: c.Q(u), qb: c.Q(v), r: (c.Q(uv) - c.Q(u) - c.Q(v)) / 2}.reduce().key()
		if zoneKeys(findZones(qs, ws, 4))[want] {
			t.Errorf("%s: findZones finds the zone; the case tests nothing", test.name)
		}
		if !zoneKeys(rowZones(qs, ws, 4, nil))[want] {
			t.Errorf("%s: rowZones misses the zone of %v and %v", test.name, u, v)
		}
	}
}

// TestHiddenBasisCells indexes model lines of each hiddenBasis cell and
// asks for its lattice first.
func TestHiddenBasisCells(t *testing.T) {
	for _, test := range hiddenBasis {
		ls := modelLines(test.cell, cuKa1, 90, without(test.absent), 0, 0, 5)
		res, err := Index(context.Background(), ls, Options{Wavelength: cuKa1}, nil)
		if err != nil || len(res.Solutions) == 0 {
			t.Fatalf("%s: %v, no solution", test.name, err)
		}
		got, err1 := cell.Reduce(res.Solutions[0].Cell)
		want, err2 := cell.Reduce(test.cell)
		if err1 != nil || err2 != nil || res.Solutions[0].Cell.System != test.cell.System || !sameReduced(got, want, 1e-3) {
			t.Errorf("%s (%d lines): first %v, want %v", test.name, len(ls), res.Solutions[0], test.cell)
		}
	}
}
