package indexing

import (
	"context"
	"strings"
	"testing"

	"reticle/cell"
)

// TestLoneZone indexes the lines of cells (invented) with one short edge: scanned
// only to below the first line off the zone normal to it, every line
// lies in that zone and the search must warn that the cell off it is a
// guess; scanned further, the lines off the zone fix the cell and it
// must not.
func TestLoneZone(t *testing.T) {
	const cu = 1.5405929 // Cu K-alpha1, Hölzer et al. 1997 (from memory)
	for _, tc := range []struct {
		name string
		c    cell.Cell
		to   float64 // degrees 2θ
		want bool
	}{
		// b = 2.53 Å: 010 at d = 2.53 Å, 35.5°.
		{"orthorhombic, short b, to 34°", cell.Must(cell.Orthorhombic, cell.P, 24.6, 2.53, 18.4), 34, true},
		{"orthorhombic, short b, to 60°", cell.Must(cell.Orthorhombic, cell.P, 24.6, 2.53, 18.4), 60, false},
		// a = 3.64 Å: 100 at 24.4°.
		{"orthorhombic, short a, to 23°", cell.Must(cell.Orthorhombic, cell.P, 3.64, 11.4, 15.1), 23, true},
		{"orthorhombic, short a, to 50°", cell.Must(cell.Orthorhombic, cell.P, 3.64, 11.4, 15.1), 50, false},
		{"cubic F to 90°", cell.Must(cell.Cubic, cell.F, 5.64), 90, false},
	} {
		ls := modelLines(tc.c, cu, tc.to, nil, 0, 0, 7)
		res, err := Index(context.Background(), ls, Options{Wavelength: cu}, nil)
		if err != nil || len(res.Solutions) == 0 {
			t.Fatalf("%s: %v", tc.name, err)
		}
		got := false
		for _, w := range res.Warnings {
			got = got || strings.Contains(w, "lies in its zone")
		}
		if got != tc.want {
			t.Errorf("%s (%d lines): warned %v, want %v; first %v; warnings %q", tc.name, len(ls), got, tc.want, res.Solutions[0].Cell, res.Warnings)
		}
	}
}

// TestZoneLaw checks the zone axis of two reflections and its law.
func TestZoneLaw(t *testing.T) {
	for _, tc := range []struct {
		a, b cell.HKL
		u    cell.HKL
		law  string
	}{
		{cell.HKL{1, 0, 0}, cell.HKL{0, 0, 1}, cell.HKL{0, 1, 0}, "k"},
		{cell.HKL{2, 0, 0}, cell.HKL{0, 0, 2}, cell.HKL{0, 1, 0}, "k"},
		{cell.HKL{1, 1, 0}, cell.HKL{0, 0, 1}, cell.HKL{1, -1, 0}, "h − k"},
		{cell.HKL{1, 2, 3}, cell.HKL{2, 4, 6}, cell.HKL{}, ""},
	} {
		u, ok := zoneAxis(tc.a, tc.b)
		if tc.law == "" {
			if ok {
				t.Errorf("%v × %v: parallel, got axis %v", tc.a, tc.b, u)
			}
			continue
		}
		if !ok || u != tc.u || zoneLaw(u) != tc.law {
			t.Errorf("%v × %v: got [%v] %q, want [%v] %q", tc.a, tc.b, u, zoneLaw(u), tc.u, tc.law)
		}
		for _, h := range []cell.HKL{tc.a, tc.b} {
			if h[0]*u[0]+h[1]*u[1]+h[2]*u[2] != 0 {
				t.Errorf("%v is not in the zone [%v]", h, u)
			}
		}
	}
}
