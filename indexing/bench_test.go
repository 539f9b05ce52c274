package indexing

import (
	"context"
	"math/rand/v2"
	"testing"

	"reticle/cell"
)

// benchLines returns 20 lines of a random cell of the system (the
// property test's generator and seeds), with its wavelength.
func benchLines(b *testing.B, s cell.System, cen cell.Centring) ([]cell.Line, float64) {
	b.Helper()
	rng := rand.New(rand.NewPCG(uint64(s)+7, 3))
	tc := randomCell(rng, s, cen)
	ls, lambda, _ := randomCase(rng, tc)
	if len(ls) > 22 {
		ls = ls[:22]
	}
	return ls, lambda
}

// BenchmarkIndex20 times the default search on about 20 lines of a cell
// of each system: the search stops after the higher systems when one of
// them explains the lines, and goes on to the lower ones otherwise.
// Compare with -cpu 1 for one core.
func BenchmarkIndex20(b *testing.B) {
	for _, c := range []struct {
		s   cell.System
		cen cell.Centring
	}{
		{cell.Cubic, cell.F}, {cell.Tetragonal, cell.I}, {cell.Hexagonal, cell.P}, {cell.Rhombohedral, cell.R},
		{cell.Orthorhombic, cell.P}, {cell.Monoclinic, cell.P}, {cell.Triclinic, cell.P},
	} {
		ls, lambda := benchLines(b, c.s, c.cen)
		b.Run(c.s.String(), func(b *testing.B) {
			for i := 0; i < b.N; i++ {
				if _, err := Index(context.Background(), ls, Options{Wavelength: lambda}, nil); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
