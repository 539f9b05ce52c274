package indexing

import (
	"reticle/cell"
	"reticle/internal/synth"

	"context"
	"math"
	"math/rand/v2"
	"os"
	"sort"
	"strconv"
	"testing"
)

// randomCase builds the observed lines of a random cell: the calculated
// lines of the library (first 30, radiation chosen so that they fall below
// 130° 2θ, Cu K-alpha1 when that suffices), uniform noise of ±0.01°, one
// zero error up to ±0.1°, 10 % of the lines dropped and 2 foreign lines
// added at random angles away from true ones.
func randomCase(rng *rand.Rand, c cell.Cell) ([]cell.Line, float64, float64) {
	const cu = 1.5405929 // Cu K-alpha1, Hölzer et al. 1997 (from memory)
	refs := cell.Reflections(c, 40)
	if len(refs) > 30 {
		refs = refs[:30]
	}
	lambda := cu
	if dmin := refs[len(refs)-1].D; 2*dmin*math.Sin(65*deg) < cu {
		lambda = 2 * dmin * math.Sin(65*deg)
	}
	zero := (2*rng.Float64() - 1) * 0.1
	var ls []cell.Line
	var tts []float64
	for _, r := range refs {
		tt := ttOf(r.Q, lambda)
		tts = append(tts, tt)
		if rng.Float64() < 0.1 {
			continue
		}
		ls = append(ls, cell.Line{TwoTheta: tt + zero + (2*rng.Float64()-1)*0.01, ESD: 0.005})
	}
	lo, hi := tts[0]*0.8, tts[len(tts)-1]
	for added := 0; added < 2; {
		tt := lo + (hi-lo)*rng.Float64()
		far := true
		for _, t := range tts {
			far = far && math.Abs(t+zero-tt) > 0.15
		}
		if far {
			ls = append(ls, cell.Line{TwoTheta: tt, ESD: 0.005})
			added++
		}
	}
	sort.Slice(ls, func(i, j int) bool { return ls[i].TwoTheta < ls[j].TwoTheta })
	return ls, lambda, tts[min(19, len(tts)-1)]
}

// sameLattice tells whether a solution allows the truth's lines up to the
// 20th and no others, within 0.1 % in d (as the public benchmark's scorer
// judges it).
func sameLattice(truth, got cell.Cell, lambda, ttmax float64) bool {
	return synth.SameLines(truth, got, qOf(ttmax, 0, lambda)*1.001, 0)
}

// randomCell draws a cell of the system and centring with a volume
// between 50 and 1500 Å³ (log-uniform): axial ratios 0.3–3 (0.5–5 for
// rhombohedral c/a on hexagonal axes, 0.5–2 between orthorhombic and
// lower edges), monoclinic β 92–120°, triclinic angles 70–110° away from
// 90° by at least 2°; every edge at least 2 Å.
func randomCell(rng *rand.Rand, s cell.System, cen cell.Centring) cell.Cell {
	r := func(lo, hi float64) float64 { return lo * math.Pow(hi/lo, rng.Float64()) }
	ang := func() float64 {
		for {
			x := 70 + 40*rng.Float64()
			if math.Abs(x-90) >= 2 {
				return x
			}
		}
	}
	for {
		v := r(50, 1500)
		var c cell.Cell
		var err error
		switch s {
		case cell.Cubic:
			c, err = cell.New(s, cen, math.Cbrt(v))
		case cell.Tetragonal:
			q := r(0.3, 3)
			a := math.Cbrt(v / q)
			c, err = cell.New(s, cen, a, q*a)
		case cell.Hexagonal, cell.Rhombohedral:
			q := r(0.3, 3)
			if s == cell.Rhombohedral {
				q = r(0.5, 5)
			}
			a := math.Cbrt(v / (q * math.Sqrt(3) / 2))
			c, err = cell.New(s, cen, a, q*a)
		case cell.Orthorhombic:
			qb, qc := r(0.5, 2), r(0.5, 2)
			a := math.Cbrt(v / (qb * qc))
			c, err = cell.New(s, cen, a, qb*a, qc*a)
		case cell.Monoclinic:
			qb, qc, beta := r(0.5, 2), r(0.5, 2), 92+28*rng.Float64()
			a := math.Cbrt(v / (qb * qc * math.Sin(beta*deg)))
			c, err = cell.New(s, cen, a, qb*a, qc*a, beta)
		default:
			qb, qc := r(0.5, 2), r(0.5, 2)
			al, be, ga := ang(), ang(), ang()
			c = cell.Cell{System: s, Centring: cen, A: 1, B: qb, C: qc, Alpha: al, Beta: be, Gamma: ga}
			if c.Check() != nil {
				continue
			}
			f := math.Cbrt(v / c.Volume())
			c.A, c.B, c.C = f, f*qb, f*qc
			err = c.Check()
		}
		if err == nil && c.A >= 2 && c.B >= 2 && c.C >= 2 {
			return c
		}
	}
}

// TestRandomCells: over random cells of every system (see randomCell;
// the centrings of the system drawn in turn), the true lattice must rank
// first in at least 97 % of cases. RETICLE_LONG=1 (make test-long) runs
// 300 cells per system; the default (24 for the systems of one or two
// parameters, 8 for the others) keeps go test quick; RETICLE_PROPERTY_N
// sets the number for a run while developing. The long run does not
// pass yet for the systems of three or more parameters (measured:
// orthorhombic 96.3 %, monoclinic 94.7 %, triclinic 91.7 %; cubic,
// tetragonal, hexagonal and rhombohedral 98.7–100 %): the zone method
// misses the third direction of some lattices whose zones it finds, and
// some supercells and cells of higher symmetry that index most lines
// rank above the true cell.
func TestRandomCells(t *testing.T) {
	long := os.Getenv("RETICLE_LONG") != ""
	fixed, err := strconv.Atoi(os.Getenv("RETICLE_PROPERTY_N"))
	if err != nil {
		fixed = 0
	}
	for _, sys := range []struct {
		s    cell.System
		cens []cell.Centring
	}{
		{cell.Cubic, []cell.Centring{cell.P, cell.I, cell.F}},
		{cell.Tetragonal, []cell.Centring{cell.P, cell.I}},
		{cell.Hexagonal, []cell.Centring{cell.P}},
		{cell.Rhombohedral, []cell.Centring{cell.R}},
		{cell.Orthorhombic, []cell.Centring{cell.P, cell.C, cell.I, cell.F}},
		{cell.Monoclinic, []cell.Centring{cell.P, cell.C}},
		{cell.Triclinic, []cell.Centring{cell.P}},
	} {
		n := 24
		if sys.s.LaueOrder() <= cell.Orthorhombic.LaueOrder() {
			n = 8
		}
		switch {
		case fixed > 0:
			n = fixed // for quicker runs while developing
		case long:
			n = 300
		case testing.Short():
			n = max(4, n/2)
		}
		t.Run(sys.s.String(), func(t *testing.T) {
			t.Parallel()
			rng := rand.New(rand.NewPCG(uint64(sys.s)+1, 99))
			ok := 0
			var fails []string
			for i := 0; i < n; i++ {
				tc := randomCell(rng, sys.s, sys.cens[i%len(sys.cens)])
				ls, lambda, ttmax := randomCase(rng, tc)
				res, err := Index(context.Background(), ls, Options{Wavelength: lambda}, nil)
				if err != nil {
					t.Fatal(err)
				}
				// A random cell that is metrically of higher symmetry
				// within the data (its lines are those of the higher
				// lattice to 0.1 % in d, e.g. rhombohedral with c/a = √6)
				// is correctly reported in that symmetry.
				if len(res.Solutions) > 0 && (res.Solutions[0].Cell.System == tc.System ||
					res.Solutions[0].Cell.System.LaueOrder() > tc.System.LaueOrder()) &&
					sameLattice(tc, res.Solutions[0].Cell, lambda, ttmax) {
					ok++
				} else if len(fails) < 8 {
					got := "none"
					if len(res.Solutions) > 0 {
						got = res.Solutions[0].String()
					}
					fails = append(fails, tc.String()+" → "+got)
				}
			}
			frac := float64(ok) / float64(n)
			t.Logf("%s: true cell first in %d/%d (%.1f %%)", sys.s, ok, n, 100*frac)
			for _, f := range fails {
				t.Log("  ", f)
			}
			// The 97 % requirement is stated for 300 cells; a short run
			// only guards against gross regressions (one miss allowed).
			limit := 0.97
			if n < 300 {
				limit = math.Min(0.95, float64(n-1)/float64(n))
			}
			if frac < limit {
				t.Errorf("%s: %.1f %% < %.0f %%", sys.s, 100*frac, 100*limit)
			}
		})
	}
}
