package indexing

import (
	"math"
	"sort"

	"gonum.org/v1/gonum/stat/distuv"

	"reticle/cell"
)

// parsimonyLevel is the significance level at which a cell with more
// free parameters must fit the lines better than a cell with fewer (an
// F-test of their χ²) to rank above it.
const parsimonyLevel = 0.001

// rankCands merges descriptions of one lattice and orders the cands:
// cells that leave a strong line unindexed last; then by score; then a
// cell with fewer free parameters (higher symmetry) moves above one with
// more when it indexes as many lines and the extra parameters do not
// improve the fit significantly (see moreParsimonious).
func rankCands(ks []*cand, ls, all []obs, o Options) []*cand {
	// Each cand indexed over all lines, made once and kept: for the
	// share of all lines indexed and for the supercell rule.
	whole := make(map[*cand]*cand, len(ks))
	onAll := func(k *cand) *cand {
		g, ok := whole[k]
		if !ok {
			g = &cand{c: k.c, zero: k.zero, zeroFree: k.zeroFree}
			g.assign(all, o.Wavelength, 0)
			g.figures(all, o.Wavelength)
			whole[k] = g
		}
		return g
	}
	// Lines beyond the first N count too: the share of all lines
	// indexed beyond chance, to the fourth power.
	if len(all) > len(ls) {
		for _, k := range ks {
			k.later = math.Pow(onAll(k).kappa(all, o.Wavelength), 4)
		}
	}
	ks = bestCands(ks, len(ks))
	qmax := qOf(ls[len(ls)-1].tt, 0, o.Wavelength) * 1.001
	calc := make([][]float64, len(ks))
	for i, k := range ks {
		if i < 80 {
			calc[i] = clustersOf(k, qmax)
		}
	}
	drop := make([]bool, len(ks))
	// One lattice, two descriptions: keep the higher symmetry, or the
	// smaller cell of equal symmetry, when it indexes as many lines (a
	// lattice that is only nearly of higher symmetry has lines the
	// higher description misses).
	for i := range ks {
		for j := range ks {
			if i == j || drop[i] || drop[j] || calc[i] == nil || calc[j] == nil || !sameSet(calc[i], calc[j]) {
				continue
			}
			a, b := ks[i], ks[j]
			if a.indexed < b.indexed {
				continue
			}
			// Of two refinements of one cell (volumes within 1 %),
			// the better scored.
			oa, ob := a.c.System.LaueOrder(), b.c.System.LaueOrder()
			va, vb := a.c.Volume(), b.c.Volume()
			same := oa == ob && math.Abs(va-vb) <= 0.01*math.Max(va, vb)
			if oa > ob || oa == ob && !same && va < vb || same && betterCand(a, b) {
				drop[j] = true
			}
		}
	}
	// A supercell (its calculated lines include all of another cell's,
	// its volume at least 1.5 times larger) that indexes no more of the
	// first lines is the same answer with more unobserved lines: it goes,
	// unless over all lines it indexes more lines, and those beyond
	// chance or with fewer calculated lines (see dominated).
	for i := range ks {
		for j := range ks {
			a, b := ks[i], ks[j]
			if i == j || drop[i] || drop[j] || calc[i] == nil || calc[j] == nil {
				continue
			}
			if b.c.Volume() < 1.5*a.c.Volume() || b.indexed > a.indexed {
				continue
			}
			if !covers(calc[j], calc[i]) {
				continue
			}
			if b.later > a.later*(1+1e-9) && a.later > 0 && !dominated(onAll(b), onAll(a), all, o.Wavelength) {
				continue
			}
			drop[j] = true
		}
	}
	// One cell, two centrings.
	for i := range ks {
		for j := range ks {
			a, b := ks[i], ks[j]
			if i == j || drop[i] || drop[j] || a.c.Centring == b.c.Centring || family(a.c.System) != family(b.c.System) {
				continue
			}
			if !sameAxes(a.c, b.c) {
				continue
			}
			if preferCentringCand(a, b, ls, o.Wavelength) {
				drop[j] = true
			}
		}
	}
	var out []*cand
	for i, k := range ks {
		if !drop[i] {
			out = append(out, k)
		}
	}
	sort.SliceStable(out, func(i, j int) bool {
		if out[i].strong != out[j].strong {
			return !out[i].strong
		}
		return betterCand(out[i], out[j])
	})
	// Parsimony: a cell with fewer parameters rises above the cells it
	// is not significantly worse than.
	for pass := 0; pass < len(out); pass++ {
		moved := false
		for i := 0; i < len(out) && !moved; i++ {
			for j := i + 1; j < len(out); j++ {
				if moreParsimonious(out[j], out[i], ls, o.Wavelength) {
					k := out[j]
					copy(out[i+1:j+1], out[i:j])
					out[i] = k
					moved = true
					break
				}
			}
		}
		if !moved {
			break
		}
	}
	return out
}

// moreParsimonious reports whether b, with fewer free parameters than a,
// explains the lines as well: it indexes as many lines, strong ones
// included, or the lines a alone indexes are no more than a's extra
// calculated lines would catch by chance (see significantExtra); it
// predicts not many more lines (at most a quarter more), scores at least
// a tenth of a, and a's χ² is not lower by more than the F-test at
// parsimonyLevel allows for a's extra parameters.
func moreParsimonious(b, a *cand, ls []obs, lambda float64) bool {
	pb, pa := b.nparams(), a.nparams()
	if pb >= pa || a.dof <= 0 || b.dof <= 0 {
		return false
	}
	if (b.indexed < a.indexed || b.strong && !a.strong) && significantExtra(a, b, ls, lambda) {
		return false
	}
	// A cell that predicts many more lines than the other (a supercell,
	// or a lattice that indexes by chance) is not the simpler one.
	if float64(b.nCalc) > 1.25*float64(a.nCalc)+1 {
		return false
	}
	if b.score() < 0.1*a.score() {
		return false
	}
	d1, d2 := float64(pa-pb), float64(a.dof)
	red := math.Max(a.chi2/d2, 1e-12)
	f := (b.chi2 - a.chi2) / d1 / red
	return f <= (distuv.F{D1: d1, D2: d2}).Quantile(1-parsimonyLevel)
}

// sameAxes reports whether two cells have the same edges and angles
// within 2e-4.
func sameAxes(a, b cell.Cell) bool {
	close := func(x, y float64) bool { return math.Abs(x-y) <= 2e-4*math.Max(x, y) }
	return close(a.A, b.A) && close(a.B, b.B) && close(a.C, b.C) && close(a.Alpha, b.Alpha) && close(a.Beta, b.Beta) && close(a.Gamma, b.Gamma)
}

// clustersOf returns the cand's calculated Q values up to qmax, values
// closer than 2e-3 relative merged (so that a pseudo-symmetric
// description whose lines split by less than the windows counts as the
// same lattice); nil when there are too many.
func clustersOf(k *cand, qmax float64) []float64 {
	var qs []float64
	if byEquivalents(k.c) {
		// The same Q values, from one index vector per set of
		// equivalents (see TestCalcLinesUnique).
		cl := calcLines(k.c, qmax, nil)
		qs = make([]float64, len(cl))
		for i, r := range cl {
			qs[i] = r.q
		}
	} else {
		refs := cell.Reflections(k.c, qmax)
		if len(refs) > 20000 {
			return nil
		}
		qs = make([]float64, len(refs))
		for i, r := range refs {
			qs[i] = r.Q
		}
	}
	var out []float64
	for _, q := range qs {
		if n := len(out); n > 0 && q-out[n-1] <= 2e-3*q {
			continue
		}
		out = append(out, q)
	}
	return out
}

// preferCentringCand decides between two centrings of one cell (see
// preferCentring): the one with more calculated lines wins only if the
// lines that it alone indexes are more than chance would give; otherwise
// the better score wins.
func preferCentringCand(a, b *cand, ls []obs, lambda float64) bool {
	more, less := a, b
	if a.nCalc < b.nCalc {
		more, less = b, a
	}
	if significantExtra(more, less, ls, lambda) {
		return a == more
	}
	return betterCand(a, b)
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

// confidence returns how clearly the first cand beats the next one that
// describes another lattice: the ratio of their scores (+Inf when there
// is none).
func confidence(ks []*cand) float64 {
	if len(ks) == 0 {
		return 0
	}
	first := ks[0]
	for _, k := range ks[1:] {
		if cell.SameLattice(first.c, k.c, 2e-3) {
			continue
		}
		if s := k.score(); s > 0 {
			return first.score() / s
		}
	}
	return math.Inf(1)
}

// dominated reports whether, over all lines (more and less indexed on
// them), the supercell more predicts more calculated lines than less and
// indexes no more lines than those extra calculated lines would by chance
// (see significantExtra): the same answer with more unobserved lines.
func dominated(more, less *cand, all []obs, lambda float64) bool {
	return more.nCalc > less.nCalc && !significantExtra(more, less, all, lambda)
}
