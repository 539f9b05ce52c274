package indexing

import (
	"cmp"
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
// values and an index vector for each.
func calcLines(c cell.Cell, qmax float64, buf []calcQ) []calcQ {
	if out, ok := calcLinesUnique(c, qmax, buf); ok {
		return out
	}
	out := buf[:0]
	f := c.QForm()
	lim := func(e float64) int { return int(math.Sqrt(qmax)*e) + 1 }
	hm, km, lm := lim(c.A), lim(c.B), lim(c.C)
	for h := 0; h <= hm; h++ {
		x := float64(h)
		for k := -km; k <= km; k++ {
			if h == 0 && k < 0 {
				continue
			}
			y := float64(k)
			base := f[0]*x*x + f[1]*y*y + f[5]*x*y
			for l := -lm; l <= lm; l++ {
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
	slices.SortFunc(out, func(a, b calcQ) int { return cmp.Compare(a.q, b.q) })
	return out
}

// calcLinesUnique is calcLines for the cubic, tetragonal and hexagonal
// lattices (P, I or F): their Q depends on h, k and l only through
// h² + k² + l², h² + k² and l², or h² + hk + k² and l², and their
// centring conditions do not change when the indices are permuted or
// change sign, so one index vector of each set of equivalents (h ≥ k ≥ l
// ≥ 0; h ≥ k ≥ 0 and l ≥ 0) gives every Q, with up to 48 times fewer
// vectors to list and sort. It reports false for the other lattices.
func calcLinesUnique(c cell.Cell, qmax float64, buf []calcQ) ([]calcQ, bool) {
	switch c.Centring {
	case cell.P, cell.I, cell.F:
	default:
		return nil, false
	}
	cubic := c.System == cell.Cubic
	if !cubic && c.System != cell.Tetragonal && c.System != cell.Hexagonal {
		return nil, false
	}
	out := buf[:0]
	f := c.QForm()
	lim := func(e float64) int { return int(math.Sqrt(qmax)*e) + 1 }
	hm, lm := lim(c.A), lim(c.C)
	for h := 0; h <= hm; h++ {
		x := float64(h)
		for k := 0; k <= h; k++ {
			y := float64(k)
			base := f[0]*x*x + f[1]*y*y + f[5]*x*y
			top := lm
			if cubic {
				top = k
			}
			for l := 0; l <= top; l++ {
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
	slices.SortFunc(out, func(a, b calcQ) int { return cmp.Compare(a.q, b.q) })
	return out, true
}
