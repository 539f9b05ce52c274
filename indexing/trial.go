package indexing

import (
	"reticle/cell"

	"math"
)

// A trial is a lattice to test: its system, centring, linear Q parameters
// (pa, pc) and zero offset.
type trial struct {
	sys    cell.System
	cen    cell.Centring
	pa, pc float64
	zero   float64
}

// assign finds the calculated line nearest Q for the trial's lattice within
// window w (Å⁻²). It returns the index sum n (cubic) or m and l, the
// calculated Q and whether one was found.
func (t *trial) assign(q, w float64) (m, l int, qc float64, ok bool) {
	best := math.Inf(1)
	if t.sys == cell.Cubic {
		lo := int(math.Ceil((q - w) / t.pa))
		hi := int(math.Floor((q + w) / t.pa))
		for n := max(lo, 1); n <= hi; n++ {
			if !cubicAllowed(t.cen, n) {
				continue
			}
			c := t.pa * float64(n)
			if d := math.Abs(c - q); d < best {
				best, m, qc, ok = d, n, c, true
			}
		}
		return m, 0, qc, ok
	}
	lmax := int(math.Sqrt((q+w)/t.pc)) + 1
	for ll := 0; ll <= lmax; ll++ {
		r := q - t.pc*float64(ll*ll)
		if r < -w {
			break
		}
		lo := int(math.Ceil((r - w) / t.pa))
		hi := int(math.Floor((r + w) / t.pa))
		for mm := max(lo, 0); mm <= hi; mm++ {
			if !planeAllowed(t.sys, t.cen, mm, ll) {
				continue
			}
			c := t.pa*float64(mm) + t.pc*float64(ll*ll)
			if d := math.Abs(c - q); d < best {
				best, m, l, qc, ok = d, mm, ll, c, true
			}
		}
	}
	return m, l, qc, ok
}

// cell returns the trial's conventional cell.
func (t *trial) cell() cell.Cell {
	s := t.sys
	return cellFromParams(s, t.cen, t.pa, t.pc)
}

// cellFromParams returns the conventional cell of the linear Q parameters
// (1/a²), (1/a², 1/c²) or (4/(3a²), 1/c²).
func cellFromParams(s cell.System, cen cell.Centring, pa, pc float64) cell.Cell {
	// New sets the parameters even when they are unusable; the search
	// screens such cells out by their figures.
	var c cell.Cell
	switch s {
	case cell.Cubic:
		c, _ = cell.New(s, cen, 1/math.Sqrt(pa))
	case cell.Hexagonal, cell.Rhombohedral:
		c, _ = cell.New(s, cen, math.Sqrt(4/(3*pa)), 1/math.Sqrt(pc))
	default:
		c, _ = cell.New(s, cen, 1/math.Sqrt(pa), 1/math.Sqrt(pc))
	}
	return c
}
