package indexing

import (
	"math"
	"slices"

	"reticle/cell"
)

// A calcQ is one calculated reflection: its Q and one index vector.
type calcQ struct {
	q float64
	h cell.HKL
}

// calcLines lists the allowed reflections of a cell with 0 < Q ≤ qmax,
// one of each Friedel pair, by increasing Q. Unlike cell.Reflections it
// does not merge equivalent reflections: the search only needs the Q
// values and an index vector for each. Lattices whose equivalents are
// simple (see byEquivalents) list one vector of each set of equivalents.
func calcLines(c cell.Cell, qmax float64, buf []calcQ) []calcQ {
	out := buf[:0]
	f := c.QForm()
	lim := func(e float64) int { return int(math.Sqrt(qmax)*e) + 1 }
	hm, km, lm := lim(c.A), lim(c.B), lim(c.C)
	eq := byEquivalents(c)
	for h := 0; h <= hm; h++ {
		x := float64(h)
		k0, k1 := -km, km
		if eq {
			k0, k1 = 0, h
		}
		for k := k0; k <= k1; k++ {
			if h == 0 && k < 0 {
				continue
			}
			y := float64(k)
			base := f[0]*x*x + f[1]*y*y + f[5]*x*y
			l0, l1 := -lm, lm
			if eq {
				l0 = 0
				if c.System == cell.Cubic {
					l1 = k
				}
			}
			for l := l0; l <= l1; l++ {
				if h == 0 && k == 0 && l <= 0 {
					continue
				}
				z := float64(l)
				q := base + f[2]*z*z + f[3]*y*z + f[4]*x*z
				if q > qmax || q <= 0 {
					continue
				}
				v := cell.HKL{h, k, l}
				if !c.Centring.Allowed(v) {
					continue
				}
				out = append(out, calcQ{q, v})
			}
		}
	}
	slices.SortFunc(out, func(a, b calcQ) int {
		// Q is finite and positive here, so the comparison needs no
		// care for NaN (cmp.Compare's, which costs a tenth more).
		switch {
		case a.q < b.q:
			return -1
		case a.q > b.q:
			return 1
		}
		return 0
	})
	return out
}

// byEquivalents reports whether calcLines lists one index vector of each
// set of equivalents for the cell: cubic, tetragonal and hexagonal
// lattices (P, I or F), whose Q depends on h, k and l only through h² +
// k² + l², h² + k² and l², or h² + hk + k² and l², and whose centring
// conditions do not change when the indices are permuted or change sign,
// so that h ≥ k ≥ l ≥ 0 (cubic) or h ≥ k ≥ 0 and l ≥ 0 give every Q with
// up to 48 times fewer vectors to list and sort.
func byEquivalents(c cell.Cell) bool {
	switch c.Centring {
	case cell.P, cell.I, cell.F:
	default:
		return false
	}
	return c.System == cell.Cubic || c.System == cell.Tetragonal || c.System == cell.Hexagonal
}
