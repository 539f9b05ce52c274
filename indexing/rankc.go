package indexing

import (
	"math"
	"slices"
	"sort"
)

// rankCands orders the cands by their evidence over all lines (see
// evidence), most probable first, leaves out those with more calculated
// lines than maxCalcLines, and lists each lattice once: of
// descriptions with the same calculated lines up to the last of the
// first lines (within sameLinesTol), the most probable.
func rankCands(ks []*cand, ls, all []obs, o Options) []*cand {
	sp := spanOf(o, all)
	var kept []*cand
	for _, k := range ks {
		if k.nCalc <= maxCalcLines(len(ls)) {
			k.weigh(all, sp, o)
			kept = append(kept, k)
		}
	}
	ks = kept
	sort.SliceStable(ks, func(i, j int) bool { return moreLikely(ks[i], ks[j]) })
	qmax := qOf(ls[len(ls)-1].tt, 0, o.Wavelength) * 1.001
	var out []*cand
	var lines [][]float64
	for _, k := range ks {
		q := linesOf(k.whole, qmax)
		if q == nil || slices.ContainsFunc(lines, func(p []float64) bool { return sameLines(p, q) }) {
			continue
		}
		out = append(out, k)
		lines = append(lines, q)
		if len(out) == rankKeep {
			break
		}
	}
	return out
}

// rankKeep is how many distinct lattices the ranking keeps.
const rankKeep = 40

// moreLikely orders cands by evidence, then fewer parameters, then
// smaller volume, then deterministically by their cells.
func moreLikely(a, b *cand) bool {
	if ea, eb := a.ev.logE(), b.ev.logE(); ea != eb {
		return ea > eb
	}
	if pa, pb := a.nparams(), b.nparams(); pa != pb {
		return pa < pb
	}
	return betterCand(a, b)
}

// sameLinesTol is the relative difference in Q within which two
// calculated lines are one when descriptions of a lattice are compared:
// the rounding of cells refined independently from the same lines (a
// lattice that is only nearly of a higher symmetry splits its lines by
// more and stays a lattice of its own).
const sameLinesTol = 2e-4

// linesOf returns the distinct calculated Q of a cand up to qmax; nil
// when there are too many to compare.
func linesOf(k *cand, qmax float64) []float64 {
	var out []float64
	for _, r := range k.calc {
		if r.q > qmax {
			break
		}
		if n := len(out); n > 0 && r.q-out[n-1] <= sameLinesTol*r.q {
			continue
		}
		out = append(out, r.q)
		if len(out) > 20000 {
			return nil
		}
	}
	return out
}

// sameLines reports whether two sorted lists of Q match value for value
// within sameLinesTol.
func sameLines(a, b []float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if math.Abs(a[i]-b[i]) > sameLinesTol*a[i] {
			return false
		}
	}
	return true
}

// significantExtra reports whether the lines that more indexes and less
// does not are more than chance would give (Poisson tail below 1 %): the
// expected number is that of lines falling within 2.5 rms residuals of
// one of the extra calculated lines of more, spread evenly in Q^(3/2).
func significantExtra(more, less *cand, ls []obs, lambda float64) bool {
	extraCalc := float64(more.nCalc - less.nCalc)
	if extraCalc <= 0 {
		return false
	}
	var ss float64
	nb := 0
	for i, l := range ls {
		if less.ref[i] >= 0 && more.ref[i] >= 0 {
			d := l.tt - more.zero - ttOf(more.qc[i], lambda)
			ss += d * d
			nb++
		}
	}
	rms := precision
	if nb > 0 {
		rms = math.Max(rms, math.Sqrt(ss/float64(nb)))
	}
	var expect float64
	k := 0
	for i, l := range ls {
		if less.ref[i] >= 0 {
			continue
		}
		q := qOf(l.tt, more.zero, lambda)
		rho := 1.5 * extraCalc * math.Sqrt(q) / math.Pow(more.lastQ, 1.5)
		expect += math.Min(1, 2*dQ(l.tt, 2.5*rms, lambda)*rho)
		if more.ref[i] >= 0 && math.Abs(l.tt-more.zero-ttOf(more.qc[i], lambda)) <= 2.5*rms {
			k++
		}
	}
	return k > 0 && poissonTail(k, expect) < 0.01
}
