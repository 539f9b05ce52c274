package indexing

import (
	"context"
	"math"
	"math/rand/v2"
	"slices"
	"testing"
	"time"

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

// benchKinds are the lattices the benchmarks draw cells of, one per
// system.
var benchKinds = []struct {
	s   cell.System
	cen cell.Centring
}{
	{cell.Cubic, cell.F}, {cell.Tetragonal, cell.I}, {cell.Hexagonal, cell.P}, {cell.Rhombohedral, cell.R},
	{cell.Orthorhombic, cell.P}, {cell.Monoclinic, cell.P}, {cell.Triclinic, cell.P},
}

// BenchmarkIndex20 times the default search on about 20 lines of a cell
// of each system: the search stops after the higher systems when one of
// them explains the lines, and goes on to the lower ones otherwise.
// Compare with -cpu 1 for one core.
func BenchmarkIndex20(b *testing.B) {
	for _, c := range benchKinds {
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

// BenchmarkIndexSpread times the default search on 15 random cells of
// each lattice kind of BenchmarkIndex20 (the property test's generator,
// fixed seeds) and reports the median and the slowest scan, seconds; run
// it with -cpu 1 -benchtime 1x for one core.
func BenchmarkIndexSpread(b *testing.B) {
	for _, c := range benchKinds {
		const n = 15
		type scan struct {
			ls     []cell.Line
			lambda float64
		}
		var scans []scan
		for seed := range uint64(n) {
			rng := rand.New(rand.NewPCG(uint64(c.s)+100, seed))
			ls, lambda, _ := randomCase(rng, randomCell(rng, c.s, c.cen))
			scans = append(scans, scan{ls[:min(len(ls), 22)], lambda})
		}
		b.Run(c.s.String(), func(b *testing.B) {
			ts := make([]float64, n)
			for i := 0; i < b.N; i++ {
				for j, sc := range scans {
					t0 := time.Now()
					if _, err := Index(context.Background(), sc.ls, Options{Wavelength: sc.lambda}, nil); err != nil {
						b.Fatal(err)
					}
					ts[j] = time.Since(t0).Seconds()
				}
			}
			slices.Sort(ts)
			b.ReportMetric(ts[n/2], "median-s")
			b.ReportMetric(ts[n-1], "worst-s")
		})
	}
}

// BenchmarkCount times lineSet.count, the zone search's inner loop, on
// 300 random lattices against the 20 lines of a random triclinic cell
// (TestCutoffBound's construction, fixed seed), unlimited.
func BenchmarkCount(b *testing.B) {
	rng := rand.New(rand.NewPCG(2026, 12))
	ls, lambda, _ := randomCase(rng, randomCell(rng, cell.Triclinic, cell.P))
	o := Options{Wavelength: lambda}.withDefaults()
	qs, ws := zoneLines(ls[:min(len(ls), 20)], o)
	set := newLineSet(qs, ws, qs[len(qs)-1]+ws[len(ws)-1])
	fs := make([]cell.QForm, 300)
	for k := range fs {
		fs[k] = randomCell(rng, cell.Triclinic, cell.P).QForm()
		for i := range fs[k] {
			fs[k][i] /= 1 + 4*rng.Float64()
		}
	}
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		for _, f := range fs {
			set.count(f, math.MaxInt32)
		}
	}
}

// BenchmarkVoteOrder times the sort of the zone search's votes on 2,000
// votes of random x, the size of a pair of zones' votes.
func BenchmarkVoteOrder(b *testing.B) {
	rng := rand.New(rand.NewPCG(2026, 12))
	vs := make([]vote, 2000)
	for i := range vs {
		vs[i] = vote{x: rng.NormFloat64() * 0.01, w: 1e-5, line: i / 100}
	}
	work := make([]vote, len(vs))
	var o voteOrder
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		copy(work, vs)
		o.sort(work)
	}
}
