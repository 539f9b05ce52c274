package indexing

import (
	"context"
	"errors"
	"fmt"
	"math"
	"slices"
	"sort"
	"strings"
	"sync"

	"gonum.org/v1/gonum/stat/distuv"

	"reticle/cell"
)

// ErrTooFewLines is returned when fewer lines are given than a cell needs.
var ErrTooFewLines = errors.New("indexing: too few lines")

// screenExtra widens the windows, in degrees 2θ, before a candidate's zero
// and parameters are refined: half the zero grid step plus the error a
// seed pair passes on.
const screenExtra = 0.035

// zeroStep is the spacing of the zero-offset grid, degrees 2θ.
const zeroStep = 0.05

// keep is how many refined candidates of each system go on to the
// centring variants and the ranking.
const keep = 40

// minZeroLines is the fewest lines from which the zero offset is refined
// with the cell in every system (see zeroLines).
const minZeroLines = 6

// zeroLines is the fewest lines from which the zero offset is refined
// with a cell of the system: three more than the cell's parameters and
// the zero, so that the lines test the fit and do not merely fix it —
// five for a cubic cell — and at most minZeroLines. A zero offset
// of 0.1° 2θ moves five lines of a cubic cell off any one edge by several
// windows, so a cubic cell held at zero 0 can fail to index them at all
// while a cell of two or more parameters takes the offset up in a wrong
// axis (common practice: the zero is refined whenever the lines
// over-determine it).
func zeroLines(s cell.System) int {
	return min(minZeroLines, len(cell.Basis(s))+4)
}

// minLines is the number of lines each system needs: one more than its
// free cell parameters and the zero offset, and three for cubic (three
// lines in a ratio such as 3 : 4 : 8 fix a cubic lattice).
func minLines(s cell.System) int {
	if s == cell.Cubic {
		return 3
	}
	return len(cell.Basis(s)) + 2
}

// fewestZeroLines is the fewest lines from which any of the systems
// wanted refines the zero offset.
func fewestZeroLines(want map[cell.System]bool) int {
	fewest := minZeroLines
	for s := range want {
		fewest = min(fewest, zeroLines(s))
	}
	return fewest
}

// fewestLines is the fewest lines that any of the systems wanted needs.
func fewestLines(want map[cell.System]bool) int {
	fewest := math.MaxInt
	for s := range want {
		fewest = min(fewest, minLines(s))
	}
	return fewest
}

// Index searches the lattices named in opt for cells that explain the
// lines, and returns them ranked, best first. Systems are searched from
// the highest symmetry down: cubic, tetragonal, hexagonal and
// rhombohedral by their own seeds; then, unless one of those explains the
// lines acceptably (see acceptable), orthorhombic, monoclinic and
// triclinic by the zone method. When the first lines all lie in one zone
// of the best cell, which they fix in two axes only, the search is
// repeated once on twice the lines. It can be cancelled through ctx and
// reports progress (search steps done of total) through progress, which
// may be nil. The same input always gives the same result.
func Index(ctx context.Context, lines []cell.Line, opt Options, progress func(done, total int)) (*Result, error) {
	o := opt.withDefaults()
	if err := o.checkWavelength(); err != nil {
		return nil, err
	}
	all := prepare(lines, o)
	want := o.wanted()
	fewest := fewestLines(want)
	if len(all) < fewest {
		return nil, fmt.Errorf("%w: %d given, the systems searched need at least %d", ErrTooFewLines, len(all), fewest)
	}
	first := all[:min(len(all), o.Lines)]
	n := len(first)
	var notes []string
	// The zero is refined by system (every system: the rhombohedral
	// lattices are searched as hexagonal ones).
	zeroFree := map[cell.System]bool{}
	var free []string
	for _, s := range cell.Systems {
		zeroFree[s] = o.ZeroRange > 0 && n >= zeroLines(s)
		if zeroFree[s] && want[s] {
			free = append(free, s.String())
		}
	}
	switch {
	case o.ZeroRange > 0 && len(free) == 0:
		// So few lines cannot tell a zero offset from the cell.
		o.ZeroRange = 0
		notes = append(notes, fmt.Sprintf("with fewer than %d lines the zero shift is held at 0", fewestZeroLines(want)))
	case o.ZeroRange > 0 && n < minZeroLines:
		notes = append(notes, fmt.Sprintf("with %d lines the zero shift is refined with %s cells only and held at 0 for the others", n, strings.Join(free, " and ")))
	}
	zeros := []float64{0}
	for z := zeroStep; z <= o.ZeroRange+1e-9; z += zeroStep {
		zeros = append(zeros, z, -z)
	}
	if o.ZeroRange > 0 {
		for _, z := range harmonicZeros(all[:min(len(all), 2*o.Lines)], o) {
			zeros = append(zeros, z)
			o.zeroLimit = math.Max(o.zeroLimit, math.Abs(z))
			notes = append(notes, fmt.Sprintf("harmonic lines (orders of one reflection) put the zero shift near %+.3f°, beyond the %g° searched; it was searched too", z, o.ZeroRange))
		}
	}
	res := &Result{Wavelength: o.Wavelength, LinesUsed: n, Bounds: Bounds{MaxEdge: o.MaxEdge, MaxVolume: o.MaxVolume, ZeroRange: math.Max(o.ZeroRange, o.zeroLimit)}}
	if n < minZeroLines {
		res.Warnings = append(res.Warnings, fmt.Sprintf("only %d lines: a cell from so few lines is a hypothesis to check against more data", n))
	}
	res.Warnings = append(res.Warnings, notes...)
	sr := &searcher{ctx: ctx, o: o, want: want, all: all, zeros: zeros, zeroFree: zeroFree, progress: progress}
	pool, err := sr.run(first, res, true)
	if err != nil {
		return nil, err
	}
	ranked := rankCands(pool, first, all, o)
	// A foreign phase with more lines than the sample's own can fill the
	// first lines and crowd out the sample's cell, whose lines are the
	// strong ones: either its cell comes first and leaves the strong
	// lines unexplained, or a larger cell explains both phases' lines.
	// So whenever some of the first lines are weak, the strong lines are
	// searched again on their own, in the systems of the seeds (the zone
	// method over the few strong lines of a low symmetry finds what it
	// found over all of them, at its cost again), and every cell is then
	// weighed beside the others as a second phase (see pairUp).
	if len(ranked) > 0 {
		if strong := strongApart(all, n, fewest); strong != nil {
			// The best of them, by their figure on the strong lines,
			// are ranked whatever their figure on the first lines
			// (which a foreign phase fills). The lower systems are
			// searched on them too when they were searched on the
			// first lines (no higher cell explained those): the
			// foreign lines that keep a higher cell from explaining
			// the first lines keep a lower one from it as well.
			zones := slices.Contains(res.Searched, lowSystems[0])
			more, err := sr.apart(strong, strongKeep, first, zones)
			if err != nil {
				return nil, err
			}
			pool = append(pool, more...)
			o.pairing = true
			ranked = rankCands(pool, first, all, o)
			// The lines the first cell leaves may be a second phase
			// that no cell found so far describes (a larger cell can
			// take a few of them as its own): they are searched on
			// their own, and their cells join the ranking, to be
			// weighed as second phases.
			if left := leftOver(ranked[0], all, o.Lines); len(left) >= minPairLeft {
				more, err := sr.apart(left, leftKeep, first, false)
				if err != nil {
					return nil, err
				}
				pool = append(pool, more...)
				ranked = rankCands(pool, first, all, o)
			}
		}
	}
	if len(ranked) > 0 {
		more, err := derivatives(ctx, ranked, first, all, o, want, sr.need(first))
		if err != nil {
			return nil, err
		}
		pool = append(pool, more...)
		ranked = rankCands(pool, first, all, o)
	}
	// Lines that all lie in one zone of the best cell fix two of its
	// axes only: a lattice with one short edge beside long ones has its
	// first lines in the zone normal to that edge, and the lines that fix
	// the third axis come later. A cell that leaves the next lines
	// unexplained was likewise fitted to the first alone
	// (unexplainedLater). The search is then repeated on twice the lines
	// (once), whose result is the better informed.
	if !o.widened && n == o.Lines && len(all) > n && len(ranked) > 0 && wantsLower(want) {
		_, lone := loneZone(ranked[0], first, o.Wavelength)
		if lone || unexplainedLater(ranked[0], n) {
			wider := opt
			wider.Lines, wider.widened = min(len(all), 2*o.Lines), true
			r, err := Index(ctx, lines, wider, progress)
			if err != nil {
				return nil, err
			}
			if len(r.Solutions) > 0 {
				why := fmt.Sprintf("the first %d lines lie in one zone of the best cell found from them, which fixes two of its axes only", n)
				if !lone {
					why = fmt.Sprintf("the best cell found from the first %d lines left more of the next lines unindexed than chance allows", n)
				}
				r.Warnings = append(r.Warnings, fmt.Sprintf("%s; the search was repeated on the first %d lines", why, r.LinesUsed))
				return r, nil
			}
		}
	}
	res.list(ranked, first, all, o)
	if sr.stopBy != nil && len(ranked) > 0 && !sameCell(ranked[0].c, sr.stopBy.c, 2e-3) {
		// The cell that ended the search is not the one the full
		// ranking puts first (a derivative lattice, or a cell of the
		// strong lines): the sentence says both.
		k := sr.stopBy
		res.Stop = fmt.Sprintf("a cell of the higher systems, %s %s, explained the lines (M_N = %.1f with N = %d, every strong line indexed, positions within their esds), so lower systems were not searched; weighing every candidate then put %s %s first",
			k.c.System, k.c.Centring, k.m, n, ranked[0].c.System, ranked[0].c.Centring)
	}
	res.warn(ranked, all, o)
	return res, nil
}

// apart searches the higher systems (and the lower ones too when zones)
// on the lines ls alone and returns the best keep cells by their figure
// on them, marked to be weighed whatever their figure on the first
// lines; their assignments and figures are taken on the first lines, as
// every other cand's.
func (sr *searcher) apart(ls []obs, keep int, first []obs, zones bool) ([]*cand, error) {
	more, err := sr.run(ls, nil, zones)
	if err != nil {
		return nil, err
	}
	more = bestCands(more, keep)
	for _, k := range more {
		k.assign(first, sr.o.Wavelength, 0)
		k.figures(first, sr.o.Wavelength)
		k.weighAlways = true
	}
	return more, nil
}

// A searcher runs the searches of one Index call.
type searcher struct {
	// stopBy is the cand whose figure ended the search after the higher
	// systems, if one did.
	stopBy *cand
	ctx    context.Context
	o      Options
	want   map[cell.System]bool
	all    []obs
	zeros  []float64
	// zeroFree tells, by system, whether the zero offset is refined
	// (zeroLines of the first lines).
	zeroFree map[cell.System]bool
	progress func(done, total int)

	mu          sync.Mutex
	done, total int
}

// zerosOf returns the zero offsets searched, and the options, for the
// system s: the offsets when s refines the zero, else 0 alone.
func (sr *searcher) zerosOf(s cell.System, o Options) ([]float64, Options) {
	if sr.zeroFree[s] {
		return sr.zeros, o
	}
	o.ZeroRange = 0
	return sr.zeros[:1], o
}

// tick counts one step of the search done.
func (sr *searcher) tick() {
	sr.mu.Lock()
	defer sr.mu.Unlock()
	sr.done++
	if sr.progress != nil {
		sr.progress(sr.done, sr.total)
	}
}

// need returns how many of the lines a cell must index: all but
// MaxImpurities, or by default all but DefaultImpurityShare of them
// (rounded down) and every line weaker than WeakLine; at least a cubic
// cell's lines.
func (sr *searcher) need(ls []obs) int { return needed(ls, sr.o) }

// needed is searcher.need for the options o.
func needed(ls []obs, o Options) int {
	n := len(ls)
	allow := o.MaxImpurities
	switch {
	case allow == 0:
		allow = int(DefaultImpurityShare * float64(n))
		for _, l := range ls {
			if l.rel >= 0 && l.rel < WeakLine {
				allow++
			}
		}
		allow = max(0, min(allow, n-minLines(cell.Cubic)))
	case allow < 0:
		allow = 0
	}
	return n - allow
}

// run searches the lattices for cells that index the lines ls: cubic,
// tetragonal, hexagonal and rhombohedral by their own seeds, then,
// unless one of those explains the lines acceptably, orthorhombic,
// monoclinic and triclinic by the zone method. It returns the cells
// found, settled on ls. res, when not nil, records what was searched
// and why the search stopped. Without zones the lower systems are
// not searched.
func (sr *searcher) run(ls []obs, res *Result, zones bool) ([]*cand, error) {
	o, want := sr.o, sr.want
	n := len(ls)
	need := sr.need(ls)
	var high []cell.System
	for _, s := range []cell.System{cell.Cubic, cell.Tetragonal, cell.Hexagonal} {
		if (want[s] || s == cell.Hexagonal && want[cell.Rhombohedral]) && n >= minLines(s) {
			high = append(high, s)
		}
	}
	var low []cell.System
	for _, s := range lowSystems {
		if zones && want[s] && n >= minLines(s) {
			low = append(low, s)
		}
	}
	sr.mu.Lock()
	sr.total += (len(high) + 1) * len(sr.zeros)
	sr.mu.Unlock()
	// The higher systems are searched at once, one goroutine each; their
	// results are pooled in a fixed order, so the outcome does not depend
	// on the schedule.
	pools := make([][]*cand, len(high))
	errs := make([]error, len(high))
	var wg sync.WaitGroup
	oh := o
	oh.MaxImpurities = n - need
	for gi, s := range high {
		wg.Add(1)
		go func() {
			defer wg.Done()
			zeros, os := sr.zerosOf(s, oh)
			pools[gi], errs[gi] = searchSystem(sr.ctx, s, want, ls, zeros, os, need, sr.tick)
			for range len(sr.zeros) - len(zeros) {
				sr.tick()
			}
		}()
	}
	wg.Wait()
	var pool []*cand
	for gi := range high {
		if errs[gi] != nil {
			return nil, errs[gi]
		}
		for _, k := range pools[gi] {
			if want[k.c.System] {
				pool = append(pool, k)
			}
		}
	}
	if res != nil {
		res.Searched = append(res.Searched, searchedOf(high, want)...)
		res.Stop = "every system asked for was searched"
	}
	if len(low) == 0 {
		return pool, nil
	}
	ranked := rankCands(pool, ls, sr.all, o)
	if len(ranked) > 0 && acceptable(ranked[0], o.ExploreLower) {
		if res != nil {
			res.Stop = fmt.Sprintf("%s %s explains the lines (M_N = %.1f with N = %d, every strong line indexed, positions within their esds); lower systems were not searched", ranked[0].c.System, ranked[0].c.Centring, ranked[0].m, n)
			sr.stopBy = ranked[0]
		}
		for range sr.zeros {
			sr.tick()
		}
		return pool, nil
	}
	lw := map[cell.System]bool{}
	for _, s := range low {
		lw[s] = true
	}
	// The zone method also finds the higher descriptions of the
	// lattices it finds; they join the pool.
	for s := range want {
		if s.LaueOrder() > cell.Orthorhombic.LaueOrder() {
			lw[s] = true
		}
	}
	// The lower systems refine the zero from as many lines as each
	// other (zeroLines), the orthorhombic cells' standing for all.
	zeros, oz := sr.zerosOf(lowSystems[0], o)
	ks, _, err := zoneSearch(sr.ctx, ls, sr.all, pool, oz, lw, need, zeros, sr.tick)
	for range len(sr.zeros) - len(zeros) {
		sr.tick()
	}
	if err != nil {
		return nil, err
	}
	if res != nil {
		res.Searched = append(res.Searched, low...)
		if len(high) > 0 {
			res.Stop = "no cell of a higher system explained the lines acceptably; every system asked for was searched"
		}
	}
	return append(pool, ks...), nil
}

// strongKeep is how many cells of the search on the strong lines are
// always ranked.
const strongKeep = 10

// strongCut is the intensity, relative to the strongest line, above
// which a line can hardly be foreign (see foreignScale: a foreign line
// that strong is e^-0.5 as likely as a weak one, and its chance falls
// fast above).
const strongCut = 0.1

// minPairLeft is the fewest lines left by the first cell that are
// searched for a second phase: with fewer, the higher systems' search
// finds cells by chance (minZeroLines).
const minPairLeft = minZeroLines

// leftKeep is how many cells of the lines the first cell leaves are
// weighed as second phases.
const leftKeep = 3

// leftOver returns the first n lines that the cand's evidence gives
// less than an even chance of belonging to it.
func leftOver(k *cand, all []obs, n int) []obs {
	var out []obs
	for i, l := range all {
		if len(out) == n {
			break
		}
		if i < len(k.ev.own) && k.ev.own[i] < 0.5 {
			out = append(out, l)
		}
	}
	return out
}

// strongApart returns the first n lines stronger than strongCut when
// some of the first n lines are weak (the strong lines are fewer than n,
// or the nth of them lies beyond the nth line) and they are at least
// fewest; nil otherwise.
func strongApart(all []obs, n, fewest int) []obs {
	strong := strongFirst(all, n)
	if len(strong) >= fewest && (len(strong) < n || strong[n-1].tt > all[n-1].tt) {
		return strong
	}
	return nil
}

// strongFirst returns the first n lines stronger than strongCut.
func strongFirst(all []obs, n int) []obs {
	var out []obs
	for _, i := range strongLines(all, n) {
		out = append(out, all[i])
	}
	return out
}

// strongLines returns the indices of the first n lines stronger than
// strongCut.
func strongLines(ls []obs, n int) []int {
	var out []int
	for i, l := range ls {
		if len(out) == n {
			break
		}
		if l.rel >= strongCut {
			out = append(out, i)
		}
	}
	return out
}

// clearLevel is the probability below which the first solution carries
// a warning: one answer in ten or more would be another cell.
const clearLevel = 0.9

// acceptLevel is the significance level at which positions are judged
// inconsistent with a cell (a χ² test of the refined positions).
const acceptLevel = 0.001

// acceptable reports whether a cell of a higher system explains the lines
// so well that lower systems need not be searched: M ≥ 10, no strong
// line and at most one line in ten unindexed, no more than twice as many
// calculated lines as observed ones (a large cell indexes lines by
// chance), and the positions within
// their esds (χ² below its 1 − acceptLevel point, at least 4 per degree of
// freedom to allow for the esds of lines measured on a laboratory
// instrument). A pseudo-symmetric lattice whose small splittings a higher
// cell cannot follow fails the last test. Always false with explore.
func acceptable(k *cand, explore bool) bool {
	if explore || k.strong || k.m < 10 || k.dof <= 0 {
		return false
	}
	n := len(k.ref)
	if leavesLines(k) || k.nCalc > 2*n {
		return false
	}
	lim := math.Max(4*float64(k.dof), (distuv.ChiSquared{K: float64(k.dof)}).Quantile(1-acceptLevel))
	return k.chi2 <= lim
}

// leavesLines reports whether the cell k leaves more of the lines it was
// found from unindexed than one in ten (at least one is allowed): more
// than a foreign phase's or a spurious line's share on a scan the cell
// explains.
func leavesLines(k *cand) bool {
	n := len(k.ref)
	return n-k.indexed > max(1, n/10)
}

// searchedOf lists the systems a two-parameter search covered.
func searchedOf(high []cell.System, want map[cell.System]bool) []cell.System {
	var out []cell.System
	for _, s := range high {
		if want[s] {
			out = append(out, s)
		}
		if s == cell.Hexagonal && want[cell.Rhombohedral] {
			out = append(out, cell.Rhombohedral)
		}
	}
	return out
}

// solutionOf builds the report of a cand over all lines.
func solutionOf(k0 *cand, all, first []obs, o Options) Solution {
	// The cell as the evidence refined it on every line.
	k := k0.whole
	c := k.c
	lambda := o.Wavelength
	ttmax := all[len(all)-1].tt + 1
	qmax := qOf(math.Min(ttmax, 179), k.zero, lambda)
	refs := cell.Reflections(c, qmax)
	if len(refs) > 2000 {
		refs = refs[:2000]
	}
	s := Solution{
		Cell: c, Volume: c.Volume(), Zero: k.zero, Displacement: k.disp,
		M: k0.m, FigureLines: len(first), FN: k0.fn, FNMeanDiff: k0.fnDelta, FNPossible: k0.nCalc,
		Calculated: refs, Parameters: k0.nparams(),
	}
	if k0.dof > 0 {
		s.ChiSquare, s.DOF = k0.chi2, k0.dof
	}
	for i, l := range all {
		il := IndexedLine{TwoTheta: l.tt, ESD: l.esd}
		if j := k.ref[i]; j >= 0 {
			qc := k.calc[j].q
			r := sort.Search(len(refs), func(i int) bool { return refs[i].Q >= qc*(1-1e-9) })
			if r < len(refs) {
				il.Indexed = true
				il.HKL = refs[r].HKL
				tt := ttOf(refs[r].Q, lambda)
				il.TwoThetaCalc = tt + k.shift(tt)
				il.Delta = l.tt - il.TwoThetaCalc
			}
		}
		if il.Indexed {
			s.Indexed++
		} else {
			s.Unindexed++
		}
		s.Lines = append(s.Lines, il)
	}
	cs := conditions(s)
	s.Conditions, s.Extinction = conditionNames(cs), extinctionSymbol(s.Cell.System, s.Cell.Centring, cs)
	if red, err := cell.Reduce(c); err == nil {
		s.Reduced = red.Cell
		s.FromReduced = red.Transform
	}
	return s
}

// list fills res.Solutions from the ranked cands, with their
// probabilities, at most o.MaxSolutions and each cell once.
func (res *Result) list(ranked []*cand, first, all []obs, o Options) {
	probs := probabilities(ranked, all, spanOf(o, all))
	for i, k := range ranked {
		// Two cands of one lattice can refine to one cell: it is
		// listed once, at the better rank (cells within 2e-3, the
		// relative spread within which the ranking takes calculated
		// lines for one, see clustersOf), with the probability of
		// both (each is a description of the one lattice), also when
		// the other is ranked after the list is full.
		if j := slices.IndexFunc(res.Solutions, func(s Solution) bool { return sameCell(s.Cell, k.whole.c, 2e-3) }); j >= 0 {
			res.Solutions[j].Probability += probs[i]
			continue
		}
		if len(res.Solutions) == o.MaxSolutions {
			continue
		}
		sol := solutionOf(k, all, first, o)
		sol.Probability, sol.LogEvidence = probs[i], k.ev.logE()
		if sp := k.ev.splitUsed; sp != nil && len(k.ev.demanding) > 0 {
			sol.Index = sp.index()
			for _, j := range k.ev.demanding {
				sol.Demanding = append(sol.Demanding, all[j].tt)
			}
		}
		if f := k.ev; f.paired && f.partner != nil && f.pairE > f.soloE() {
			c := f.partner.whole.c
			sol.SecondPhase, sol.SecondPhaseLines = &c, int(math.Round(f.pairLines))
		}
		res.Solutions = append(res.Solutions, sol)
	}
}

// warn adds the warnings about the first of the ranked cands: a low
// probability, a strong line unindexed, lines in one zone.
func (res *Result) warn(ranked []*cand, all []obs, o Options) {
	if len(res.Solutions) > 0 {
		if p := res.Solutions[0].Probability; p < clearLevel {
			res.Warnings = append(res.Warnings, fmt.Sprintf("the first cell's probability is only %.0f %%: check the next candidates", 100*p))
		}
		if s := res.Solutions[0]; s.SecondPhase != nil {
			res.Warnings = append(res.Warnings, fmt.Sprintf("the first cell was weighed beside a second phase, %v, which takes about %d of the lines it leaves: a further phase to check", *s.SecondPhase, s.SecondPhaseLines))
		}
		if ranked[0].strong {
			res.Warnings = append(res.Warnings, "the first cell leaves a strong line unindexed: a second phase, or not the right cell")
		}
		if u, ok := loneZone(ranked[0].whole, all, o.Wavelength); ok {
			res.Warnings = append(res.Warnings, loneZoneWarning(u))
		}
	}
}

// wantsLower reports whether a system below the hexagonal is wanted: a
// lattice with one short edge is found by the zone method.
func wantsLower(want map[cell.System]bool) bool {
	return want[cell.Orthorhombic] || want[cell.Monoclinic] || want[cell.Triclinic]
}
