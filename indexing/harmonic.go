package indexing

import (
	"math"
	"sort"
)

// harmonicLimit is the largest zero offset, degrees 2θ, that the
// harmonic lines may propose: a diffractometer whose zero is off by more
// than half a degree is out of alignment, not in need of a correction
// (common practice).
const harmonicLimit = 0.5

// harmonicZeros returns zero offsets, degrees 2θ, beyond the searched
// range (|z| > o.ZeroRange) that pairs of harmonic lines agree on. The
// orders of one reflection, hkl and 2h 2k 2l (or 3h 3k 3l), have sin θ in
// the ratio 1 : 2 (1 : 3) whatever the cell, so each pair of lines
// fixes the zero offset z that makes sin((2θ_j − z)/2) = m·sin((2θ_i −
// z)/2); the offsets that two or more pairs of distinct lines propose
// within their esds are the data's own estimates of the zero (the
// harmonic-line method of zero determination, common practice). At most
// two are returned, those most pairs agree on first.
func harmonicZeros(ls []obs, o Options) []float64 {
	type prop struct {
		z, w float64
		i, j int
	}
	var ps []prop
	for i := range ls {
		for j := i + 1; j < len(ls); j++ {
			for _, m := range []float64{2, 3} {
				z, ok := harmonicZero(ls[i].tt, ls[j].tt, m)
				if !ok || math.Abs(z) > harmonicLimit || math.Abs(z) <= o.ZeroRange {
					continue
				}
				// The window: the lines' windows carried to z (the
				// larger-angle line moves z about as much as itself).
				ps = append(ps, prop{z, ls[i].tol + ls[j].tol, i, j})
			}
		}
	}
	sort.Slice(ps, func(a, b int) bool { return ps[a].z < ps[b].z })
	type group struct {
		z     float64
		pairs int
	}
	var gs []group
	for a := 0; a < len(ps); {
		used := map[int]bool{}
		var sum float64
		pairs := 0
		b := a
		for ; b < len(ps) && ps[b].z-ps[a].z <= math.Min(ps[a].w, ps[b].w); b++ {
			if used[ps[b].i] || used[ps[b].j] {
				continue
			}
			used[ps[b].i], used[ps[b].j] = true, true
			sum += ps[b].z
			pairs++
		}
		if pairs >= 2 {
			gs = append(gs, group{sum / float64(pairs), pairs})
			a = b
			continue
		}
		a++
	}
	sort.SliceStable(gs, func(a, b int) bool { return gs[a].pairs > gs[b].pairs })
	var out []float64
	for _, g := range gs {
		if len(out) == 2 {
			break
		}
		out = append(out, g.z)
	}
	return out
}

// harmonicZero solves sin((b − z)/2) = m·sin((a − z)/2) for the zero
// offset z (degrees 2θ) of lines at a < b degrees 2θ, by Newton's method
// from z = 0.
func harmonicZero(a, b, m float64) (float64, bool) {
	z := 0.0
	for it := 0; it < 20; it++ {
		f := math.Sin((b-z)*deg/2) - m*math.Sin((a-z)*deg/2)
		df := (-math.Cos((b-z)*deg/2) + m*math.Cos((a-z)*deg/2)) * deg / 2
		if df == 0 {
			return 0, false
		}
		step := f / df
		z -= step
		if math.Abs(step) < 1e-9 {
			return z, !math.IsNaN(z)
		}
		if math.Abs(z) > 10 {
			return 0, false
		}
	}
	return 0, false
}
