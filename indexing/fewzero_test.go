package indexing

import (
	"context"
	"math"
	"testing"

	"reticle/cell"
)

// TestFewCubicLinesZero indexes the first five lines of cubic metals
// shifted by a zero error of ±0.1° 2θ (a common size of a misaligned
// goniometer's zero), with alternating errors of ±0.004°: five lines
// over-determine a cubic edge and the zero, which must be refined for
// the cubic cell to index them (zeroLines). Cells are handbook values,
// from memory.
func TestFewCubicLinesZero(t *testing.T) {
	const cu = 1.5405929 // Hölzer et al. 1997 (from memory)
	for _, test := range []struct {
		name string
		cell cell.Cell
		zero float64
	}{
		{"tungsten", cell.Must(cell.Cubic, cell.I, 3.1652), 0.1},
		{"tungsten", cell.Must(cell.Cubic, cell.I, 3.1652), -0.1},
		{"aluminium", cell.Must(cell.Cubic, cell.F, 4.0495), 0.1},
		{"aluminium", cell.Must(cell.Cubic, cell.F, 4.0495), -0.1},
		{"copper", cell.Must(cell.Cubic, cell.F, 3.6149), 0.08},
	} {
		var ls []cell.Line
		for i, r := range cell.Reflections(test.cell, qOf(150, 0, cu)) {
			if i == 5 {
				break
			}
			e := 0.004
			if i%2 == 1 {
				e = -e
			}
			ls = append(ls, cell.Line{TwoTheta: ttOf(r.Q, cu) + test.zero + e, ESD: 0.004})
		}
		res, err := Index(context.Background(), ls, Options{Wavelength: cu}, nil)
		if err != nil {
			t.Fatalf("%s, zero %+g°: %v", test.name, test.zero, err)
		}
		if len(res.Solutions) == 0 {
			t.Fatalf("%s, zero %+g°: no solution", test.name, test.zero)
		}
		got := res.Solutions[0]
		if got.Cell.System != cell.Cubic || got.Cell.Centring != test.cell.Centring || math.Abs(got.Cell.A/test.cell.A-1) > 1e-3 {
			t.Errorf("%s, zero %+g°: first %v %v a=%.4f, want %v", test.name, test.zero, got.Cell.System, got.Cell.Centring, got.Cell.A, test.cell)
		}
		if math.Abs(got.Zero-test.zero) > 0.03 {
			t.Errorf("%s: zero %.3f°, want %.3f°", test.name, got.Zero, test.zero)
		}
	}
}

// TestZeroRhombohedralOnly: a search of the rhombohedral lattices alone
// (searched as hexagonal ones) refines the zero offset as a search of
// every system does: the first eight lines of corundum (a = 4.759, c =
// 12.991 Å on hexagonal axes, handbook values from memory) shifted by
// +0.1° 2θ.
func TestZeroRhombohedralOnly(t *testing.T) {
	const cu = 1.5405929 // Hölzer et al. 1997 (from memory)
	c := cell.Must(cell.Rhombohedral, cell.R, 4.759, 12.991)
	var ls []cell.Line
	for _, r := range cell.Reflections(c, qOf(150, 0, cu)) {
		if len(ls) == 8 {
			break
		}
		ls = append(ls, cell.Line{TwoTheta: ttOf(r.Q, cu) + 0.1, ESD: 0.004})
	}
	for _, systems := range [][]cell.System{nil, {cell.Rhombohedral}} {
		res, err := Index(context.Background(), ls, Options{Wavelength: cu, Systems: systems}, nil)
		if err != nil {
			t.Fatal(err)
		}
		if len(res.Solutions) == 0 || math.Abs(res.Solutions[0].Zero-0.1) > 0.01 {
			t.Errorf("systems %v: no solution, or the zero not refined to 0.1°", systems)
			continue
		}
		if got := res.Solutions[0].Cell; got.System != cell.Rhombohedral || math.Abs(got.A/c.A-1) > 1e-3 || math.Abs(got.C/c.C-1) > 1e-3 {
			t.Errorf("systems %v: first %v, want %v", systems, got, c)
		}
	}
}
