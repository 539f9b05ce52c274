package indexing

import (
	"reticle/cell"

	"context"
	"errors"
	"math"
	"math/rand/v2"
	"reflect"
	"testing"
)

// knownLines returns the lines of a cell between 10° and 150° 2θ for Cu
// K-alpha1, keeping only those that absent(h) does not remove, with uniform
// noise of ±0.01° and a zero error of +0.04°.
func knownLines(rng *rand.Rand, c cell.Cell, absent func(cell.HKL) bool) []cell.Line {
	const cu = 1.5405929 // Hölzer et al. 1997 (from memory)
	var ls []cell.Line
	for _, r := range cell.Reflections(c, qOf(150, 0, cu)) {
		tt := ttOf(r.Q, cu)
		keep := false
		for _, h := range allHKL(c, r.Q) {
			if absent == nil || !absent(h) {
				keep = true
			}
		}
		if tt >= 10 && keep {
			ls = append(ls, cell.Line{TwoTheta: tt + 0.04 + (2*rng.Float64()-1)*0.01, ESD: 0.005})
		}
	}
	return ls
}

// allHKL lists every allowed hkl of the cell with the given Q.
func allHKL(c cell.Cell, q float64) []cell.HKL {
	var out []cell.HKL
	lim := int(math.Sqrt(q)*math.Max(c.A, c.C)) + 1
	for h := -lim; h <= lim; h++ {
		for k := -lim; k <= lim; k++ {
			for l := -lim; l <= lim; l++ {
				if (h != 0 || k != 0 || l != 0) && c.Centring.Allowed(cell.HKL{h, k, l}) && math.Abs(c.Q(cell.HKL{h, k, l})-q) <= 1e-9*q {
					out = append(out, cell.HKL{h, k, l})
				}
			}
		}
	}
	return out
}

// TestKnownCells indexes the calculated line lists of well-known solids
// (cells are handbook values, from memory) with noise and a zero error.
// Space-group absences beyond the lattice are removed where the structure
// has them (rules from International Tables Vol. A, common practice).
func TestKnownCells(t *testing.T) {
	even := func(x int) bool { return x%2 == 0 }
	for _, test := range []struct {
		name   string
		cell   cell.Cell
		absent func(cell.HKL) bool
	}{
		{"rock salt NaCl", newCell(cell.Cubic, cell.F, 5.6402, 0), nil},
		// Diamond glide (Fd-3m): all-even hkl need h+k+l = 4n.
		{"silicon", newCell(cell.Cubic, cell.F, 5.4310, 0), func(v cell.HKL) bool {
			return even(v[0]) && even(v[1]) && even(v[2]) && mod(v[0]+v[1]+v[2], 4) != 0
		}},
		{"tungsten (body-centred)", newCell(cell.Cubic, cell.I, 3.1652, 0), nil},
		// hcp (P6₃/mmc): hh(-2h)l, 00l among them, with l odd absent.
		{"magnesium (hcp)", newCell(cell.Hexagonal, cell.P, 3.2094, 5.2108), func(v cell.HKL) bool {
			return v[0] == v[1] && !even(v[2])
		}},
		// Rutile (P4₂/mnm): 0kl with k+l odd absent, 00l with l odd.
		{"rutile TiO2", newCell(cell.Tetragonal, cell.P, 4.5937, 2.9587), func(v cell.HKL) bool {
			return v[0] == 0 && !even(v[1]+v[2]) || v[1] == 0 && !even(v[0]+v[2])
		}},
		// Corundum (R-3c, hexagonal axes): h -h 0 l with l odd, 000l with
		// l ≠ 6n.
		{"corundum Al2O3", newCell(cell.Rhombohedral, cell.R, 4.7589, 12.991), func(v cell.HKL) bool {
			return v[0] == -v[1] && !even(v[2]) || v[0] == 0 && v[1] == 0 && mod(v[2], 6) != 0
		}},
	} {
		rng := rand.New(rand.NewPCG(3, uint64(len(test.name))))
		ls := knownLines(rng, test.cell, test.absent)
		res, err := Index(context.Background(), ls, Options{Wavelength: 1.5405929}, nil)
		if err != nil {
			t.Fatalf("%s: %v", test.name, err)
		}
		if len(res.Solutions) == 0 {
			t.Errorf("%s: no solution", test.name)
			continue
		}
		s := res.Solutions[0]
		c := s.Cell
		if c.System != test.cell.System || c.Centring != test.cell.Centring ||
			math.Abs(c.A-test.cell.A) > 2e-4*test.cell.A || math.Abs(c.C-test.cell.C) > 2e-4*test.cell.C ||
			math.Abs(s.Zero-0.04) > 0.01 {
			t.Errorf("%s (%d lines): got %v", test.name, len(ls), s)
			continue
		}
		t.Logf("%s: %d lines, %v", test.name, len(ls), s)
	}
}

func TestIndexDeterministicCancelProgress(t *testing.T) {
	ls := rutileLines(20)
	a, err := Index(context.Background(), ls, Options{Wavelength: 1.5405929}, nil)
	if err != nil {
		t.Fatal(err)
	}
	calls, last := 0, 0
	b, _ := Index(context.Background(), ls, Options{Wavelength: 1.5405929}, func(done, total int) {
		calls++
		if done < last || done > total {
			t.Errorf("progress %d/%d after %d", done, total, last)
		}
		last = done
	})
	if !reflect.DeepEqual(a, b) {
		t.Error("two runs on the same lines differ")
	}
	if calls == 0 {
		t.Error("no progress reported")
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := Index(ctx, ls, Options{Wavelength: 1.5405929}, nil); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled: %v", err)
	}
}

func TestIndexBadInput(t *testing.T) {
	ls := rutileLines(20)
	if _, err := Index(context.Background(), ls[:2], Options{Wavelength: 1.54}, nil); !errors.Is(err, ErrTooFewLines) {
		t.Errorf("2 lines: %v", err)
	}
	// Three lines are enough for cubic, not for tetragonal alone.
	if _, err := Index(context.Background(), ls[:3], Options{Wavelength: 1.54, Systems: []cell.System{cell.Tetragonal}}, nil); !errors.Is(err, ErrTooFewLines) {
		t.Errorf("3 lines, tetragonal: %v", err)
	}
	if _, err := Index(context.Background(), ls, Options{}, nil); err == nil {
		t.Error("no wavelength: no error")
	}
	junk := append([]cell.Line{{TwoTheta: -5}, {TwoTheta: 200}, {TwoTheta: 30}, {TwoTheta: 30}}, ls[:1]...)
	if _, err := Index(context.Background(), junk, Options{Wavelength: 1.54}, nil); !errors.Is(err, ErrTooFewLines) {
		t.Errorf("junk lines: %v", err)
	}
}

// TestObservedConditions: the hcp line list (00l only with l even) shows
// the condition 00l: l = 2n.
func TestObservedConditions(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	ls := knownLines(rng, newCell(cell.Hexagonal, cell.P, 3.2094, 5.2108), func(v cell.HKL) bool { return v[0] == 0 && v[1] == 0 && v[2]%2 != 0 })
	res, err := Index(context.Background(), ls, Options{Wavelength: 1.5405929}, nil)
	if err != nil || len(res.Solutions) == 0 {
		t.Fatal(err)
	}
	found := false
	for _, c := range res.Solutions[0].Conditions {
		found = found || c == "00l: l = 2n"
	}
	if !found {
		t.Errorf("conditions %v, want 00l: l = 2n", res.Solutions[0].Conditions)
	}
}
