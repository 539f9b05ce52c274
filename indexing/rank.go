package indexing

import (
	"math"
	"slices"
	"sort"

	"reticle/cell"
)

// rankCands orders the cands by their evidence over all lines (see
// evidence), most probable first, leaves out those with more calculated
// lines than maxCalcLines and all but the weighKeep best by the
// search's figure (and those marked weighAlways), and lists each lattice once: of
// descriptions with the same calculated lines over the measured range
// (within lineTolerance), the one with fewest parameters, then the
// larger cell. The range is the one the evidence judges: two cells whose
// lines agree up to the last of the first lines but part beyond it (a
// pseudo-hexagonal cell and its twice larger C-centred one, whose extra
// lines fall on the smaller one's at low angles) are told apart by the
// lines beyond, and both stay for the evidence to weigh.
func rankCands(ks []*cand, ls, all []obs, o Options) []*cand {
	sp := spanOf(o, all)
	var kept []*cand
	for _, k := range ks {
		if k.nCalc <= maxCalcLines(len(ls)) {
			kept = append(kept, k)
		}
	}
	ks = bestCands(slices.Clone(kept), weighKeep)
	for _, k := range kept {
		if k.weighAlways && !slices.Contains(ks, k) {
			ks = append(ks, k)
		}
	}
	for _, k := range ks {
		k.weigh(all, sp, o)
	}
	sort.SliceStable(ks, func(i, j int) bool { return moreLikely(ks[i], ks[j]) })
	if o.pairing {
		pairUp(ks, all, sp, o)
		sort.SliceStable(ks, func(i, j int) bool { return moreLikely(ks[i], ks[j]) })
	}
	qmax := qOf(sp.hi, 0, o.Wavelength)
	tol := lineTolerance(resolution(all), o.Wavelength)
	var out []*cand
	var lines [][]float64
	for _, k := range ks {
		// A cell with too many lines to compare (nil) is kept as a
		// lattice of its own.
		q := linesOf(k.whole, qmax, tol)
		if i := slices.IndexFunc(lines, func(p []float64) bool { return p != nil && q != nil && sameLines(p, q, tol) }); i >= 0 {
			// The same lines: the description of fewer cell
			// parameters stands for them (its extra freedom fits
			// noise); of as many, and as many corrections, the larger
			// cell, whose lines beyond the range the smaller one's
			// would not all be (cubic I and cubic P of a/√2 agree up
			// to h² + k² + l² = 14); of as many cell parameters but
			// other corrections, the more likely (the one kept). Lines
			// the same within the tolerance may still fit the positions
			// unequally: a description the kept one beats by strong
			// evidence (strongEvidence) does not replace it.
			pk, po := len(cell.Basis(k.c.System)), len(cell.Basis(out[i].c.System))
			weaker := out[i].ev.logE()-k.ev.logE() >= strongEvidence
			if !weaker && (pk < po || pk == po && k.nparams() == out[i].nparams() && k.c.Volume() > out[i].c.Volume()*(1+1e-6)) {
				out[i], lines[i] = k, q
			}
			continue
		}
		out = append(out, k)
		lines = append(lines, q)
		if len(out) == rankKeep {
			break
		}
	}
	sort.SliceStable(out, func(i, j int) bool { return moreLikely(out[i], out[j]) })
	return out
}

// strongEvidence is the log Bayes factor from which one cell's evidence
// beats another's strongly: 3 nats, a factor of 20 (Kass & Raftery,
// J. Am. Stat. Assoc. 90 (1995) 773, whose "strong" begins at
// 2 ln B = 6). Two descriptions whose calculated lines agree within the
// matching tolerance but whose evidence differs by that much do not fit
// the positions alike.
const strongEvidence = 3.0

// weighKeep is how many cells, best by the search's figure (cand.score)
// and one per cell, have their evidence taken: twice the lattices the
// ranking keeps.
const weighKeep = 2 * rankKeep

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
// calculated lines are one when descriptions of a lattice are compared,
// at least: the rounding of cells refined independently from the same
// lines.
const sameLinesTol = 2e-4

// lineTolerance returns the difference in Q, Å⁻², within which two
// calculated lines near Q are one: the resolution res (degrees 2θ at an
// angle; see resolution), and not less than sameLinesTol. Descriptions
// whose lines part by less than the lines' width would show the same
// peaks, so the data cannot tell them apart (a lattice only nearly of a
// higher symmetry whose splittings the scan resolves stays a lattice of
// its own).
func lineTolerance(res func(float64) float64, lambda float64) func(q float64) float64 {
	return func(q float64) float64 {
		tol := sameLinesTol * q
		if tt := ttOf(q, lambda); !math.IsNaN(tt) {
			tol = math.Max(tol, dQ(tt, res(tt), lambda))
		}
		return tol
	}
}

// linesOf returns the distinct calculated Q of a cand up to qmax, lines
// within tol of the first of a run merged; nil when there are too many
// to compare.
func linesOf(k *cand, qmax float64, tol func(float64) float64) []float64 {
	var out []float64
	start := math.Inf(-1)
	for _, r := range k.calc {
		if r.q > qmax {
			break
		}
		if r.q-start <= tol(r.q) {
			continue
		}
		start = r.q
		out = append(out, r.q)
		if len(out) > 20000 {
			return nil
		}
	}
	return out
}

// sameLines reports whether two sorted lists of Q match value for value
// within tol.
func sameLines(a, b []float64, tol func(float64) float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if math.Abs(a[i]-b[i]) > tol(a[i]) {
			return false
		}
	}
	return true
}
