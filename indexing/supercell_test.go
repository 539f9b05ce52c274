package indexing

import (
	"context"
	"math"
	"math/rand/v2"
	"testing"

	"reticle/cell"
)

// TestDoubled checks the cells the supercell probe tries: one axis
// doubled, the system kept, the centring kept only where its translation
// survives (C when c doubles).
func TestDoubled(t *testing.T) {
	cases := []struct {
		in   cell.Cell
		want []string
	}{
		{cell.Must(cell.Orthorhombic, cell.C, 4, 12, 5), []string{
			"orthorhombic P a=8 b=12 c=5", "orthorhombic P a=4 b=24 c=5",
			"orthorhombic P a=4 b=12 c=10", "orthorhombic C a=4 b=12 c=10"}},
		{cell.Must(cell.Tetragonal, cell.I, 3, 7), []string{"tetragonal P a=3 c=14"}},
		{cell.Must(cell.Monoclinic, cell.P, 5, 6, 7, 100), []string{
			"monoclinic P a=10 b=6 c=7 beta=100", "monoclinic P a=5 b=12 c=7 beta=100",
			"monoclinic P a=5 b=6 c=14 beta=100"}},
		{cell.Must(cell.Cubic, cell.F, 5), nil},
	}
	for _, k := range cases {
		got := doubled(k.in)
		if len(got) != len(k.want) {
			t.Errorf("%v: %d cells %v, want %v", k.in, len(got), got, k.want)
			continue
		}
		for i, c := range got {
			w, _, err := cell.Parse(k.want[i])
			if err != nil {
				t.Fatal(err)
			}
			if c.System != w.System || c.Centring != w.Centring || math.Abs(c.Volume()-w.Volume()) > 1e-9*w.Volume() || math.Abs(c.A-w.A) > 1e-12 || math.Abs(c.C-w.C) > 1e-12 {
				t.Errorf("%v: cell %d %v, want %v", k.in, i+1, c, w)
			}
		}
	}
}

// TestHalvedCell: cases of the property test (TestRandomCells,
// triclinic) whose search settles on a cell of twice the volume that
// indexes the same lines: the cell of half the volume, found by halving
// the best cells, must come first. The cases are drawn as that test draws
// them.
func TestHalvedCell(t *testing.T) {
	rng := rand.New(rand.NewPCG(uint64(cell.Triclinic)+1, 99))
	for i := 0; i < 40; i++ {
		tc := randomCell(rng, cell.Triclinic, cell.P)
		ls, lambda, ttmax := randomCase(rng, tc)
		// a = 3.977 Å, b = 2.427 Å (b doubled), and a = 9.615 Å (a
		// cell of a and b both different, twice the volume).
		if math.Abs(tc.A-3.97662) > 1e-4 && math.Abs(tc.A-9.61475) > 1e-4 {
			continue
		}
		res, err := Index(context.Background(), ls, Options{Wavelength: lambda}, nil)
		if err != nil || len(res.Solutions) == 0 {
			t.Fatalf("%v: no solution: %v", tc, err)
		}
		if got := res.Solutions[0].Cell; !sameLattice(tc, got, lambda, ttmax) {
			t.Errorf("%v: first %v (V = %.1f Å³), want V = %.1f Å³", tc, got, got.Volume(), tc.Volume())
		}
	}
}
