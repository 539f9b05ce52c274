package indexing

import (
	"math"
	"slices"
	"sort"
)

// A second phase beside a cell is the likelier cause of lines that the
// cell leaves when those lines are themselves the lines of a lattice. A
// sample meant to be one phase often holds a second (a reagent left
// over, a product of decomposition), and with good counting statistics a
// second phase a few per cent as strong as the sample can show more
// lines than the sample does, all of them weak. Weighed against foreign
// lines spread evenly over the range, a cell of the second phase then
// explains more lines than the sample's cell and wins, although it
// leaves the strongest lines of the scan unexplained. A practitioner
// indexes the lines that the sample's cell leaves as a second phase,
// and calls the phase of the strong lines the sample. The evidence does
// the same: a cand's foreign lines may be, beside the even rate, the
// lines of another cand of the ranking (evidenceWith, a mixture of the
// two phases' Poisson processes), and its evidence is averaged over the
// two hypotheses, without and with the second phase, each with prior ½
// (model averaging: MacKay, Information Theory, Inference and Learning
// Algorithms (2003) ch. 28). The second phase's cell pays its Occam
// factor. Its lines' intensities are log-uniform up to its own
// strongest line (phaseMarks), and it may only take lines that carry
// less of the scan's intensity than the cand's own (secondOf): the
// sample is, by definition, the phase that diffracts most.

// A partner is a second phase weighed beside a cand.
type partner struct {
	h        []float64 // its density of calculated lines at each observed line, per degree
	mk       []float64 // the ratio of each line's intensity density under it to under the cand (see phaseMarks)
	groups   int       // its calculated lines in the range (merged)
	logOccam float64   // its cell's Occam factor, and that of the scale of its intensities
}

// pairKeep is how many cands, best by their evidence alone, are weighed
// with second phases and may serve as one: a second phase worth its
// cost explains many lines, so its cell ranks high on its own.
const pairKeep = 8

// minPairLines is the fewest lines a second phase must explain that the
// cand does not: fewer do not fix a lattice (minLines of cubic).
const minPairLines = 3

// lineDensity returns the density of the cand's calculated lines at
// each of the lines ls, per degree, under its own fit's shared error σ.
func lineDensity(b *cand, ls []obs, lambda float64, sp span) ([]float64, int) {
	calc, groups := b.whole.calcIn(ls, lambda, sp)
	h := make([]float64, len(ls))
	for i, l := range ls {
		s := math.Sqrt(l.variance(b.ev.sys))
		for _, c := range calc {
			if d := l.tt - c.tt; math.Abs(d) <= reach*s {
				h[i] += c.w * studentT(d, s)
			}
		}
	}
	return h, groups
}

// secondOf returns b as a second phase beside k, or nil when it cannot
// be one. b must explain (chance above ½ in its own fit) at least
// minPairLines lines that k does not, and at most as many lines that k
// explains too as others: a second phase shares lines with the first by
// coincidence only, and a cell whose lines fall mostly on k's is
// another description of k's lattice or one derived from it, which the
// ranking weighs as such. Likewise k must explain at least as many
// lines that b does not as lines they share: a cell whose lines fall
// mostly on b's (a zone or a sublattice of b's lattice) is a partial
// description of the lattice b describes whole, and the pair would
// credit k with b's lines. The lines b adds must also carry less of the
// scan's intensity (the sum of their relative intensities) than those k
// explains: the sample is the phase that diffracts most, and the second
// phase is the other. The scale of the second phase's intensities, its
// strongest line's, is uniform in its logarithm a priori over the range
// of the lines' intensities.
func secondOf(k, b *cand, ls []obs, h []float64, groups int) *partner {
	own, other := k.ev.own, b.ev.own
	if len(own) != len(other) {
		return nil
	}
	extra, shared, alone := 0, 0, 0
	var sk, sb, top float64
	for i, l := range ls {
		r := math.Max(l.rel, 0)
		if own[i] > 0.5 {
			sk += r
			if other[i] <= 0.5 {
				alone++
			}
		}
		if other[i] > 0.5 {
			if own[i] > 0.5 {
				shared++
			} else {
				extra++
				sb += r
				top = math.Max(top, r)
			}
		}
	}
	if extra < minPairLines || shared > extra || shared > alone || sb >= sk {
		return nil
	}
	lo := weakestRel(ls)
	occam := b.ev.logOccam
	if top == 0 || lo >= 1 {
		top = 1
	} else {
		occam -= math.Log(math.Log(1 / lo))
	}
	return &partner{h: h, mk: phaseMarks(ls, top), groups: groups, logOccam: occam}
}

// A pairFit is a cand's evidence beside one second phase.
type pairFit struct {
	ok    bool    // the other cand can be its second phase (see secondOf)
	logE  float64 // the log evidence of the pair
	lines float64 // the lines the second phase takes
}

// pairUp weighs the first pairKeep cands of ks by their evidence alone,
// and those marked weighAlways, each beside every other of them that
// can be its second phase (see secondOf), and marks every cand of ks as
// weighed with second phases, keeping each one's best. A pair weighed
// in an earlier ranking of the same search is not weighed again.
func pairUp(ks []*cand, all []obs, sp span, o Options) {
	byOwn := slices.Clone(ks)
	sort.SliceStable(byOwn, func(i, j int) bool { return byOwn[i].ev.soloE() > byOwn[j].ev.soloE() })
	var set []*cand
	for i, k := range byOwn {
		if i < pairKeep || k.weighAlways {
			set = append(set, k)
		}
	}
	type dens struct {
		h      []float64
		groups int
	}
	hs := make(map[*cand]dens)
	for _, k := range ks {
		k.ev.paired, k.ev.partner, k.ev.pairE = true, nil, math.Inf(-1)
	}
	for _, k := range set {
		if k.pairs == nil {
			k.pairs = make(map[*cand]pairFit)
		}
		for _, b := range set {
			if b == k {
				continue
			}
			pf, done := k.pairs[b]
			if !done {
				d, ok := hs[b]
				if !ok {
					d.h, d.groups = lineDensity(b, all, o.Wavelength, sp)
					hs[b] = d
				}
				if pt := secondOf(k, b, all, d.h, d.groups); pt != nil && d.groups > 0 {
					f := k.whole.evidenceWith(all, o.Wavelength, sp, o, pt)
					pf = pairFit{ok: true, logE: f.logL + f.logOccam, lines: f.second}
				}
				k.pairs[b] = pf
			}
			if pf.ok && pf.logE > k.ev.pairE {
				k.ev.partner, k.ev.pairE, k.ev.pairLines = b, pf.logE, pf.lines
			}
		}
	}
}
