package cell

import (
	"cmp"
	"math"
	"slices"
	"sort"
)

// A Reflection is one powder line of a cell: all allowed reflections of
// equal Q merged, with their number (the powder multiplicity) and one
// representative hkl per set of reflections related by the lattice's
// symmetry (the holohedry of the system).
type Reflection struct {
	Q    float64 // 1/d², Å⁻²
	D    float64 // Å
	Mult int     // number of allowed hkl with this Q
	HKL  []HKL   // representatives, the first being the conventional name
}

// Reflections returns the allowed reflections of the cell with 0 < Q ≤
// qmax (Å⁻²), merged by equal Q (relative 1e-9), in increasing Q.
func Reflections(c Cell, qmax float64) []Reflection {
	type ref struct {
		q float64
		v HKL
	}
	var all []ref
	// |h| = |r·a| ≤ |r||a| = √Q·a for any cell. Every Laue group holds
	// −1, so one of each Friedel pair (v, −v) is enumerated and counted
	// twice.
	lim := func(e float64) int { return int(math.Sqrt(qmax)*e) + 1 }
	hm, km, lm := lim(c.A), lim(c.B), lim(c.C)
	form := c.QForm()
	fast := c.System != Monoclinic && c.System != Triclinic
	for h := 0; h <= hm; h++ {
		for k := -km; k <= km; k++ {
			if h == 0 && k < 0 {
				continue
			}
			for l := -lm; l <= lm; l++ {
				if h == 0 && k == 0 && l <= 0 {
					continue
				}
				v := HKL{h, k, l}
				if !c.Centring.Allowed(v) {
					continue
				}
				var q float64
				if fast {
					q = c.Q(v)
				} else {
					q = form.Q(v)
				}
				if q <= qmax*(1+1e-12) {
					all = append(all, ref{q, v})
				}
			}
		}
	}
	slices.SortFunc(all, func(a, b ref) int { return cmp.Compare(a.q, b.q) })
	var out []Reflection
	type rep struct{ key, best HKL }
	var reps []rep
	for i := 0; i < len(all); {
		j := i
		for j < len(all) && all[j].q-all[i].q <= 1e-9*all[i].q {
			j++
		}
		reps = reps[:0]
		for _, r := range all[i:j] {
			// Both of the Friedel pair: the class holds either.
			for _, v := range [2]HKL{r.v, {-r.v[0], -r.v[1], -r.v[2]}} {
				key := classOf(c.System, v)
				found := false
				for x := range reps {
					if reps[x].key == key {
						found = true
						if preferred(v, reps[x].best) {
							reps[x].best = v
						}
						break
					}
				}
				if !found {
					reps = append(reps, rep{key, v})
				}
			}
		}
		hs := make([]HKL, len(reps))
		for x := range reps {
			hs[x] = reps[x].best
		}
		sort.Slice(hs, func(a, b int) bool { return preferred(hs[a], hs[b]) })
		out = append(out, Reflection{Q: all[i].q, D: 1 / math.Sqrt(all[i].q), Mult: 2 * (j - i), HKL: hs})
		i = j
	}
	return out
}

// classOf returns a key shared by the hkl that the holohedry of the system
// relates (cubic m-3m, hexagonal 6/mmm for hexagonal and rhombohedral
// axes, tetragonal 4/mmm, orthorhombic mmm, monoclinic 2/m with b unique,
// triclinic -1), ignoring the centring.
func classOf(s System, v HKL) HKL {
	a := func(x int) int {
		if x < 0 {
			return -x
		}
		return x
	}
	switch s {
	case Cubic:
		w := []int{a(v[0]), a(v[1]), a(v[2])}
		sort.Sort(sort.Reverse(sort.IntSlice(w)))
		return HKL{w[0], w[1], w[2]}
	case Tetragonal:
		h, k := a(v[0]), a(v[1])
		if k > h {
			h, k = k, h
		}
		return HKL{h, k, a(v[2])}
	case Hexagonal, Rhombohedral:
		h, k := v[0], v[1]
		for r := 0; r < 6; r++ {
			for _, m := range [2][2]int{{h, k}, {k, h}} {
				if m[0] >= m[1] && m[1] >= 0 {
					return HKL{m[0], m[1], a(v[2])}
				}
			}
			h, k = h+k, -h // rotation by 60° about c
		}
	case Orthorhombic:
		return HKL{a(v[0]), a(v[1]), a(v[2])}
	case Monoclinic:
		// (h, k, l) ~ (−h, k, −l) ~ (h, −k, l) ~ (−h, −k, −l).
		h, l := v[0], v[2]
		if h < 0 || h == 0 && l < 0 {
			h, l = -h, -l
		}
		return HKL{h, a(v[1]), l}
	case Triclinic:
		for _, x := range v {
			if x != 0 {
				if x < 0 {
					return HKL{-v[0], -v[1], -v[2]}
				}
				return v
			}
		}
	}
	return v
}

// preferred orders representatives: fewer negative indices first (the
// last index's sign weighing most), then larger indices from h to l.
func preferred(u, v HKL) bool {
	nu, nv := negatives(u), negatives(v)
	if nu != nv {
		return nu < nv
	}
	for i := 0; i < 3; i++ {
		if u[i] != v[i] {
			return u[i] > v[i]
		}
	}
	return false
}

func negatives(v HKL) int {
	n := 0
	for i := 2; i >= 0; i-- {
		n *= 2
		if v[i] < 0 {
			n++
		}
	}
	return n
}
