package indexing

import (
	"math"
	"slices"
	"testing"

	"reticle/cell"
)

// TestLayerLattices checks that the layers over a lattice's densest zone
// give the lattice back from its first forty calculated lines (Cu
// K-alpha1, windows of 0.01° 2θ), for invented cells of one short edge
// beside long ones, whose first lines are mostly one zone, one of them
// without the shortest reflection of the first layer, three with few
// lines off the zone in wide windows.
func TestLayerLattices(t *testing.T) {
	const cu = 1.5405929 // Hölzer et al. 1997 (from memory)
	for _, test := range []struct {
		name   string
		cell   cell.Cell
		absent cell.HKL // a reflection left out, if not zero
		window float64  // degrees 2θ; 0.01 if zero
	}{
		{"orthorhombic", cell.Must(cell.Orthorhombic, cell.P, 3.49, 12.25, 25.18), cell.HKL{}, 0},
		{"monoclinic, short unique axis", cell.Must(cell.Monoclinic, cell.P, 8.1, 3.3, 14.3, 104.5), cell.HKL{}, 0},
		{"monoclinic, short axis in the zone", cell.Must(cell.Monoclinic, cell.P, 3.07, 23.9, 11.94, 102.1), cell.HKL{}, 0},
		{"triclinic", cell.Must(cell.Triclinic, cell.P, 3.3, 10.2, 15.1, 95.5, 103.2, 88.4), cell.HKL{}, 0},
		// The first layer's shortest reflection too weak to be seen.
		{"orthorhombic, without 010", cell.Must(cell.Orthorhombic, cell.P, 8.1, 2.9, 15.5), cell.HKL{0, 1, 0}, 0},
		// Few lines off the zone, in windows wide beside the mesh (its
		// spacing 0.03° 2θ and less here): their proposals cross over
		// much of the grid, and the lattice lies at a special place.
		{"orthorhombic, without 001, windows 0.03°", cell.Must(cell.Orthorhombic, cell.P, 8.3, 25.6, 2.55), cell.HKL{0, 0, 1}, 0.03},
		{"orthorhombic, without 001, windows 0.04°", cell.Must(cell.Orthorhombic, cell.P, 5.8, 27.4, 4.5), cell.HKL{0, 0, 1}, 0.04},
		{"orthorhombic, windows 0.065°", cell.Must(cell.Orthorhombic, cell.P, 9.1, 19.7, 2.58), cell.HKL{}, 0.065},
	} {
		// The first forty distinct lines.
		var qs, ws []float64
		for _, r := range cell.Reflections(test.cell, qOf(90, 0, cu)) {
			if len(qs) > 0 && r.Q-qs[len(qs)-1] < 1e-9 || test.absent != (cell.HKL{}) && slices.Contains(r.HKL, test.absent) {
				continue
			}
			if len(qs) == 40 {
				break
			}
			tt := ttOf(r.Q, cu)
			qs = append(qs, r.Q)
			w := test.window
			if w == 0 {
				w = 0.01
			}
			ws = append(ws, dQ(tt, w, cu))
		}
		zs := findZones(qs, ws, 4)
		if len(zs) == 0 || float64(zs[0].n) < layerShare*float64(len(qs)) {
			t.Fatalf("%s: the first lines are not mostly one zone", test.name)
		}
		want, err := cell.Reduce(test.cell)
		if err != nil {
			t.Fatal(err)
		}
		found := false
		for _, f := range layerLattices(zs, qs, ws, len(qs)) {
			c, err := f.Cell(cell.Triclinic, cell.P)
			if err != nil {
				continue
			}
			red, err := cell.Reduce(c)
			if err == nil && sameReduced(red, want, 1e-3) {
				found = true
			}
		}
		if !found {
			t.Errorf("%s: %v not among the layers' lattices", test.name, test.cell)
		}
	}
}

// sameReduced reports whether two reduced cells agree in every G6
// component to a relative tol of their mean edge squared.
func sameReduced(a, b cell.Reduced, tol float64) bool {
	ga, gb := a.G6, b.G6
	va := [6]float64{ga.A, ga.B, ga.C, ga.Xi, ga.Eta, ga.Zeta}
	vb := [6]float64{gb.A, gb.B, gb.C, gb.Xi, gb.Eta, gb.Zeta}
	m := (va[0] + va[1] + va[2]) / 3
	for i := range va {
		if math.Abs(va[i]-vb[i]) > tol*m {
			return false
		}
	}
	return true
}
