package indexing

import (
	"math"
	"math/rand/v2"
	"testing"

	"reticle/cell"
)

// TestCalcLinesUnique: for cubic, tetragonal and hexagonal lattices the
// calculated lines listed from one index vector per set of equivalents
// have the distinct Q values that cell.Reflections gives (which lists
// every vector and merges equal Q).
func TestCalcLinesUnique(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	for _, tc := range []struct {
		s    cell.System
		cens []cell.Centring
	}{
		{cell.Cubic, []cell.Centring{cell.P, cell.I, cell.F}},
		{cell.Tetragonal, []cell.Centring{cell.P, cell.I}},
		{cell.Hexagonal, []cell.Centring{cell.P}},
	} {
		for i := 0; i < 20; i++ {
			free := []float64{3 + 9*rng.Float64()}
			if tc.s != cell.Cubic {
				free = append(free, 3+9*rng.Float64())
			}
			c := cell.Must(tc.s, tc.cens[i%len(tc.cens)], free...)
			dmin := 0.9 + 0.6*rng.Float64() // Å
			qmax := 1 / (dmin * dmin)
			if !byEquivalents(c) {
				t.Fatalf("%v: not listed by equivalents", c)
			}
			got := calcLines(c, qmax, nil)
			var distinct []float64
			for _, r := range got {
				if n := len(distinct); n == 0 || r.q-distinct[n-1] > 1e-9*r.q {
					distinct = append(distinct, r.q)
				}
			}
			want := cell.Reflections(c, qmax)
			if len(distinct) != len(want) {
				t.Fatalf("%v to Q = %.3f: %d distinct Q, cell.Reflections %d", c, qmax, len(distinct), len(want))
			}
			for j, r := range want {
				if math.Abs(distinct[j]-r.Q) > 1e-9*r.Q {
					t.Fatalf("%v: line %d at Q %.6f, cell.Reflections %.6f", c, j, distinct[j], r.Q)
				}
			}
		}
	}
	if byEquivalents(cell.Must(cell.Rhombohedral, cell.R, 5, 13)) {
		t.Error("a rhombohedral lattice was listed by equivalents")
	}
}

// BenchmarkCalcLines lists the lines of a triclinic cell up to the Q of
// 2θ = 100° with Cu Kα1, about 600 of them.
func BenchmarkCalcLines(b *testing.B) {
	c := cell.Cell{System: cell.Triclinic, Centring: cell.P, A: 5.31, B: 6.02, C: 7.14, Alpha: 97.3, Beta: 104.8, Gamma: 91.6}
	qmax := cell.QOf(100, 1.5406)
	var buf []calcQ
	for i := 0; i < b.N; i++ {
		buf = calcLines(c, qmax, buf)
	}
	b.ReportMetric(float64(len(buf)), "lines")
}
