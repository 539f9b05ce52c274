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
