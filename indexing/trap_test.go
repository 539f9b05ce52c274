package indexing

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"reticle/cell"
)

// Wavelengths of Hölzer et al., Phys. Rev. A 56 (1997) 4554 (from memory).
const (
	cuKa1 = 1.5405929
	coKa1 = 1.7889961
)

// modelLines returns the lines of a cell up to ttmax degrees 2θ for the
// wavelength, less those absent(h) removes, with a zero error, a sample
// displacement (mm, goniometer radius 240 mm: shift −2s·cos θ/R),
// uniform noise of ±0.005° and esds of 0.005°. Intensities are the
// multiplicity times the Lorentz–polarisation factor (1 + cos² 2θ)/
// (sin² θ cos θ): unit structure factors, a model pattern (common
// practice), enough to tell strong lines from weak.
func modelLines(c cell.Cell, lambda, ttmax float64, absent func(cell.HKL) bool, zero, disp float64, seed uint64) []cell.Line {
	rng := rand.New(rand.NewPCG(seed, 17))
	var ls []cell.Line
	for _, r := range cell.Reflections(c, qOf(ttmax, 0, lambda)) {
		mult := 0
		for _, h := range allHKL(c, r.Q) {
			if absent == nil || !absent(h) {
				mult++
			}
		}
		if mult == 0 {
			continue
		}
		tt := ttOf(r.Q, lambda)
		th := tt / 2 * deg
		lp := (1 + math.Pow(math.Cos(2*th), 2)) / (math.Pow(math.Sin(th), 2) * math.Cos(th))
		shift := zero - 2*disp*math.Cos(th)/240/deg
		ls = append(ls, cell.Line{TwoTheta: tt + shift + (2*rng.Float64()-1)*0.005, ESD: 0.005, Intensity: float64(mult) * lp})
	}
	return ls
}

// first indexes the lines and checks the first solution's lattice,
// centring and a (and c) to 0.05 %.
func first(t *testing.T, name string, ls []cell.Line, lambda float64, want cell.Cell) *Result {
	t.Helper()
	res, err := Index(context.Background(), ls, Options{Wavelength: lambda}, nil)
	if err != nil {
		t.Fatalf("%s: %v", name, err)
	}
	if len(res.Solutions) == 0 {
		t.Fatalf("%s: no solution", name)
	}
	s := res.Solutions[0]
	c := s.Cell
	if c.System != want.System || c.Centring != want.Centring || math.Abs(c.A-want.A) > 5e-4*want.A || math.Abs(c.C-want.C) > 5e-4*want.C {
		t.Errorf("%s (%d lines): first %v, want %v", name, len(ls), s, want)
		for i, o := range res.Solutions[1:min(len(res.Solutions), 4)] {
			t.Logf("  %d: %v", i+2, o)
		}
	} else {
		t.Logf("%s (%d lines): %v, probability %.3f", name, len(ls), s, s.Probability)
	}
	return res
}

// TestThreeLineCubic: copper (face-centred cubic, a = 3.6149 Å, handbook
// value from memory) with Co K-alpha1 below 100° 2θ has three lines,
// (111), (200), (220), in the ratio 3 : 4 : 8 of Q, which fix the cell;
// the answer carries a warning that it rests on few lines.
func TestThreeLineCubic(t *testing.T) {
	want := cell.Must(cell.Cubic, cell.F, 3.6149)
	ls := modelLines(want, coKa1, 100, nil, 0.02, 0, 1)
	if len(ls) != 3 {
		t.Fatalf("%d lines, want 3", len(ls))
	}
	res := first(t, "copper, Co radiation", ls, coKa1, want)
	warned := false
	for _, w := range res.Warnings {
		warned = warned || strings.Contains(w, "lines")
	}
	if !warned {
		t.Errorf("no warning about the few lines: %q", res.Warnings)
	}
}

// TestSixLineFCCWithErrors: aluminium (face-centred cubic, a = 4.0495 Å,
// handbook value from memory), its six lines below 100° 2θ with Cu
// K-alpha1, a zero error of +0.05° and a sample displacement of 0.15 mm:
// a hexagonal cell's extra parameter fits such errors about as well, and
// the cubic cell must win by parsimony.
func TestSixLineFCCWithErrors(t *testing.T) {
	want := cell.Must(cell.Cubic, cell.F, 4.0495)
	ls := modelLines(want, cuKa1, 100, nil, 0.05, 0.15, 2)
	if len(ls) != 6 {
		t.Fatalf("%d lines, want 6", len(ls))
	}
	first(t, "aluminium with zero and displacement errors", ls, cuKa1, want)
}

// TestHematiteAllLines: hematite α-Fe2O3 (R-3c, a = 5.0356, c = 13.7489 Å
// on hexagonal axes, handbook values from memory), all its lines to 90°
// 2θ with Cu K-alpha1; the c-glide removes h −h 0 l with l odd and 000l
// with l ≠ 6n (International Tables Vol. A). A cell of half c indexes
// most lines better but leaves strong ones unindexed; the true cell must
// win.
func TestHematiteAllLines(t *testing.T) {
	want := cell.Must(cell.Rhombohedral, cell.R, 5.0356, 13.7489)
	absent := func(v cell.HKL) bool {
		return v[0] == -v[1] && v[2]%2 != 0 || v[0] == 0 && v[1] == 0 && mod(v[2], 6) != 0
	}
	ls := modelLines(want, cuKa1, 90, absent, -0.03, 0, 3)
	first(t, "hematite", ls, cuKa1, want)
}

// TestAntifluorite: lithium oxide Li2O (antifluorite, Fm-3m, a = 4.6114
// Å, handbook value from memory), all lines to 120° 2θ with Cu K-alpha1;
// a cell √2 larger (tetragonal, or cubic with more calculated lines)
// indexes them too and must lose to the true face-centred cell.
func TestAntifluorite(t *testing.T) {
	want := cell.Must(cell.Cubic, cell.F, 4.6114)
	ls := modelLines(want, cuKa1, 120, nil, 0.04, 0.05, 4)
	first(t, "lithium oxide", ls, cuKa1, want)
}

// TestWeakForeignLines: silicon (diamond structure, a = 5.4309 Å,
// handbook value from memory) with Cu K-alpha1 below 140°, and nine weak
// lines of a foreign phase (0.5 % of the strongest, at angles at least
// 0.2° from every line a cubic cell of silicon's edge could have, so that
// none speaks for another centring) among its first twenty: more unindexed lines than
// DefaultImpurityShare allows, all weaker than WeakLine. The silicon cell
// comes first by default; with no impurities allowed it cannot.
func TestWeakForeignLines(t *testing.T) {
	si := cell.Must(cell.Cubic, cell.F, 5.4309)
	absent := func(h cell.HKL) bool { // d-glide of Fd-3m: h+k+l = 4n+2 absent when all even
		return h[0]%2 == 0 && h[1]%2 == 0 && h[2]%2 == 0 && ((h[0]+h[1]+h[2])%4+4)%4 == 2
	}
	ls := modelLines(si, cuKa1, 140, absent, 0, 0, 5)
	top := 0.0
	for _, l := range ls {
		top = math.Max(top, l.Intensity)
	}
	for _, tt := range []float64{20.5, 24.3, 26.1, 31.9, 35.2, 41.0, 43.7, 50.6, 52.1} {
		ls = append(ls, cell.Line{TwoTheta: tt, ESD: 0.005, Intensity: 0.005 * top})
	}
	first(t, "silicon with nine weak foreign lines", ls, cuKa1, si)
	res, err := Index(context.Background(), ls, Options{Wavelength: cuKa1, MaxImpurities: -1}, nil)
	if err == nil && len(res.Solutions) > 0 && res.Solutions[0].Cell.System == cell.Cubic && math.Abs(res.Solutions[0].Cell.A-si.A) < 5e-4*si.A {
		t.Errorf("with no impurities allowed the silicon cell still came first: %v", res.Solutions[0])
	}
}

// TestSuperstructure: an orthorhombic cell (a = 5.2, b = 6.1, c = 7.8 Å,
// invented) whose lines with l odd are weak (4 % of the model
// intensity), as a superstructure doubling c makes them. The subcell of
// half c indexes every strong line; the whole cell, which indexes the
// weak ones too, must come first.
func TestSuperstructure(t *testing.T) {
	want := cell.Must(cell.Orthorhombic, cell.P, 5.2, 6.1, 7.8)
	ls := modelLines(want, cuKa1, 90, nil, 0, 0, 9)
	for i := range ls {
		q := qOf(ls[i].TwoTheta, 0, cuKa1)
		odd := true
		for _, h := range allHKL(want, q) {
			if h[2]%2 == 0 {
				odd = false
			}
		}
		if odd {
			ls[i].Intensity *= 0.04
		}
	}
	res, err := Index(context.Background(), ls, Options{Wavelength: cuKa1}, nil)
	if err != nil || len(res.Solutions) == 0 {
		t.Fatalf("no solution: %v", err)
	}
	got := res.Solutions[0].Cell
	if got.System != cell.Orthorhombic || math.Abs(got.Volume()-want.Volume()) > 1e-3*want.Volume() {
		t.Errorf("first %v (V = %.1f Å³), want %v (V = %.1f Å³)", got, got.Volume(), want, want.Volume())
		for i, s := range res.Solutions[1:min(len(res.Solutions), 4)] {
			t.Logf("  %d: %v", i+2, s)
		}
	}
}

// TestForeignLinesByChance: silicon to 100° 2θ (seven lines) with the two
// strongest lines of a zinc impurity (hexagonal, a = 2.665 Å, c = 4.947 Å,
// from memory), weak and strong, with and without a zero shift. Cells of
// more parameters (an orthorhombic description of silicon's lattice, a
// triclinic cell of nine lines) find room for one or both of them; the
// lines they index beyond silicon's are no more than their extra
// calculated lines catch by chance, and the cubic cell must come first.
func TestForeignLinesByChance(t *testing.T) {
	si := cell.Must(cell.Cubic, cell.F, 5.4309)
	absent := func(h cell.HKL) bool { // d-glide of Fd-3m
		return h[0]%2 == 0 && h[1]%2 == 0 && h[2]%2 == 0 && ((h[0]+h[1]+h[2])%4+4)%4 == 2
	}
	zn := cell.Must(cell.Hexagonal, cell.P, 2.665, 4.947)
	for _, share := range []float64{0.1, 0.4} {
		for _, zero := range []float64{0, 0.04} {
			for seed := uint64(1); seed <= 3; seed++ {
				ls := modelLines(si, cuKa1, 100, absent, zero, 0, seed)
				top := 0.0
				for _, l := range ls {
					top = math.Max(top, l.Intensity)
				}
				for _, h := range []cell.HKL{{0, 0, 2}, {1, 0, 1}} {
					tt := cell.TwoTheta(zn.D(h), cuKa1) + zero
					ls = append(ls, cell.Line{TwoTheta: tt, ESD: 0.005, Intensity: share * top})
				}
				first(t, fmt.Sprintf("silicon with two zinc lines of %g of its strongest, zero %g°, noise %d", share, zero, seed), ls, cuKa1, si)
			}
		}
	}
}

// TestZoneOffsets: the zone method runs at no zero offset first and at
// the offsets beside it only when nothing it found explains the lines;
// an orthorhombic lattice (cementite, Fe3C, a = 5.0896, b = 6.7443,
// c = 4.5248 Å, handbook values from memory) must come first whatever
// the zero error within the searched range (±0.1°), whichever pass finds
// it. (Which pass does is not observable here; the property test's
// harder cases need the offsets beside zero.)
func TestZoneOffsets(t *testing.T) {
	want := cell.Must(cell.Orthorhombic, cell.P, 5.0896, 6.7443, 4.5248)
	for _, zero := range []float64{0, 0.1, -0.1} {
		ls := modelLines(want, cuKa1, 70, nil, zero, 0, 5)
		if len(ls) > 22 {
			ls = ls[:22]
		}
		res, err := Index(context.Background(), ls, Options{Wavelength: cuKa1}, nil)
		if err != nil {
			t.Fatalf("zero %+.2f°: %v", zero, err)
		}
		if len(res.Solutions) == 0 || !sameLattice(want, res.Solutions[0].Cell, cuKa1, ls[len(ls)-1].TwoTheta) {
			t.Errorf("zero %+.2f° (%d lines): first %v, want %v", zero, len(ls), res.Solutions[:min(1, len(res.Solutions))], want)
		}
	}
}

// TestZoneOffsetNearest: a case of the property test's generator (a
// random monoclinic P cell, a = 6.19902, b = 5.30608, c = 6.95798 Å,
// β = 106.97°; a zero error of −0.09°, 10 % of its lines missing, two
// foreign lines, noise ±0.01°). At no zero offset the zone method finds
// a supercell four times as large that passes the test that stops the
// search, at a refined offset of −0.09°; the offset of the grid nearest
// it (−0.1°) then finds the true cell, which must come first.
func TestZoneOffsetNearest(t *testing.T) {
	want := cell.Must(cell.Monoclinic, cell.P, 6.19902, 5.30608, 6.95798, 106.97)
	var ls []cell.Line
	for _, tt := range []float64{12.54697, 13.19824, 14.83602, 16.60229, 16.77494, 21.31609, 22.36746, 22.70464, 23.72482, 26.49627,
		28.04170, 28.29190, 29.06076, 30.02467, 31.47672, 33.66493, 33.68822, 34.00852, 34.43329, 34.54764,
		36.33907, 36.49029, 36.99382, 37.87671, 38.10253, 38.47658, 38.85260, 40.35762, 40.54882, 41.02433} {
		ls = append(ls, cell.Line{TwoTheta: tt, ESD: 0.005})
	}
	res, err := Index(context.Background(), ls, Options{Wavelength: cuKa1}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if len(res.Solutions) == 0 || !sameLattice(want, res.Solutions[0].Cell, cuKa1, 34.6318) {
		t.Errorf("first %v, want %v", res.Solutions[:min(1, len(res.Solutions))], want)
	}
}

// TestPseudoHexagonal: an orthorhombic P cell whose edges a and b stand
// at √3 within 0.1 % (an invented cell) has the same calculated lines as
// its twice larger C-centred cell (2a, 2b, c) up to the first lines,
// since the extra lines of the larger cell fall on its own; beyond them
// the larger cell adds lines that the scan lacks. The small cell must
// come first, and the larger must not stand for it.
func TestPseudoHexagonal(t *testing.T) {
	want := cell.Must(cell.Orthorhombic, cell.P, 3.3574, 5.8218, 8.0709)
	first(t, "pseudo-hexagonal orthorhombic P", modelLines(want, cuKa1, 100, nil, 0.01, -0.02, 3), cuKa1, want)
}

// TestForeignLinesFirst: a body-centred cubic cell (a = 3.45 Å,
// invented) to 120° whose first five lines, all below its own first
// (110), are weak lines of a foreign phase (1–4 % of the strongest,
// positions invented). Seeded from the first lines alone, no cubic cell
// is proposed, and cells of more parameters that the foreign lines do
// not need either come first; the strong lines must seed the cubic cell.
func TestForeignLinesFirst(t *testing.T) {
	want := cell.Must(cell.Cubic, cell.I, 3.45)
	ls := modelLines(want, cuKa1, 120, nil, 0, 0, 4)
	top := 0.0
	for _, l := range ls {
		top = math.Max(top, l.Intensity)
	}
	for i, tt := range []float64{21.15, 26.74, 33.19, 34.19, 34.55, 55.53} {
		ls = append(ls, cell.Line{TwoTheta: tt, ESD: 0.005, Intensity: (0.01 + 0.006*float64(i%4)) * top})
	}
	first(t, "body-centred cubic after five weak foreign lines", ls, cuKa1, want)
}
