package synth

import (
	"math"

	"reticle/cell"
)

// ZoneOnly reports whether every reflection of a cell up to qmax (Å⁻²)
// lies in one plane of the reciprocal lattice (a zone), its centring's
// absences left out. The lines of such a scan are those of a
// two-dimensional lattice: no line measures the third reciprocal vector,
// so a cell with any third edge short enough to put its first line off
// the scan's end gives the same d-spacings, and the lines cannot tell the
// true cell from these. The test is exact: the index vectors are
// integers, and all lie in the plane of the first two independent ones
// when each has a zero product with their cross product.
func ZoneOnly(c cell.Cell, qmax float64) bool {
	f := c.QForm()
	lim := func(e float64) int { return int(math.Sqrt(qmax)*e) + 1 }
	hm, km, lm := lim(c.A), lim(c.B), lim(c.C)
	var basis []cell.HKL
	var normal cell.HKL
	for h := 0; h <= hm; h++ {
		for k := -km; k <= km; k++ {
			for l := -lm; l <= lm; l++ {
				v := cell.HKL{h, k, l}
				if v == (cell.HKL{}) || !c.Centring.Allowed(v) || f.Q(v) > qmax {
					continue
				}
				switch len(basis) {
				case 0:
					basis = append(basis, v)
				case 1:
					if n := basis[0].Cross(v); n != (cell.HKL{}) {
						basis, normal = append(basis, v), n
					}
				default:
					if v.Dot(normal) != 0 {
						return false
					}
				}
			}
		}
	}
	return true
}
