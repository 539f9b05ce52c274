package refine

import (
	"context"
	"math"

	"reticle/cell"
)

// ownSizes refits from the solution sol (result r, pf's layout) with a
// size term of its own for every further phase whose lines determine
// one (see ownSizeLines), then with strain terms of their own as well,
// each step kept when it pays for its parameters (see pays), and
// returns the last fit kept; r when there is none. A refit that fails
// (its cell leaves the lines) leaves the fit before it standing.
func ownSizes(ctx context.Context, pf *patternFit, sol *patternSolution, r *PatternResult, cells []cell.Cell, x, y, sig []float64, opt PatternOptions) (*PatternResult, error) {
	own := make([]ownTerms, len(cells))
	found := false
	for i := 1; i < len(r.Phases); i++ {
		if strongLines(r.Phases[i]) >= ownSizeLines {
			own[i], found = ownSize, true
		}
	}
	for _, next := range []ownTerms{ownSize, ownSample} {
		if !found {
			break
		}
		terms := make([]ownTerms, len(own))
		for i, o := range own {
			if o != sharedProfile {
				terms[i] = next
			}
		}
		pf2, sol2, r2, err := refitOwn(ctx, pf, sol, r, cells, x, y, sig, opt, terms)
		if ctx.Err() != nil {
			return nil, ctx.Err()
		}
		if err != nil || !pays(r, r2) {
			break
		}
		pf, sol, r = pf2, sol2, r2
	}
	return r, nil
}

// refitOwn refits from the solution sol (result r, pf's layout) with the
// further phases' own profile terms own.
func refitOwn(ctx context.Context, pf *patternFit, sol *patternSolution, r *PatternResult, cells []cell.Cell, x, y, sig []float64, opt PatternOptions, own []ownTerms) (*patternFit, *patternSolution, *PatternResult, error) {
	pf2, _, err := newPatternFit(cells, x, y, sig, opt, own)
	if err != nil {
		return nil, nil, nil, err
	}
	pf2.progress = opt.Progress
	pf2.stage = 2
	sol2, it, err := pf2.solve(ctx, pf.carry(sol.p, pf2), opt.MaxIter, nil, 0)
	if err != nil {
		return nil, nil, nil, err
	}
	r2, err := pf2.result(sol2, r.Iterations+it, opt)
	if err != nil {
		return nil, nil, nil, err
	}
	r2.Converged = it < opt.MaxIter
	return pf2, sol2, r2, nil
}

// pays reports whether the fit with more of the further phases' profile
// terms their own (with) lowers χ² from the fit without them (without)
// by more than Schwarz's (1978) cost of the added parameters, ln N each
// for N points, with χ² in units of the larger model's χ²_red so that a
// profile short of the truth (GoF above 1) does not pass every test on
// its systematic residue alone (the F-test's scaling, Hamilton 1965).
func pays(without, with *PatternResult) bool {
	k := with.Parameters - without.Parameters
	if k <= 0 || !(with.Chi2 > 0) {
		return false
	}
	c0 := without.Chi2 * float64(without.Points-without.Parameters)
	c1 := with.Chi2 * float64(with.Points-with.Parameters)
	return (c0-c1)/with.Chi2 > float64(k)*math.Log(float64(with.Points))
}

// A further phase has a size term of its own (ownSize) when at least
// ownSizeLines of its reflections have an intensity of ownSizeSNR esds or
// more in the fit with the main phase's: the significance from which the
// peak search frees a line's shape (peaks.Options.FreeShapeSNR), on
// three lines so that no one blend or misfit sets the width. A weak
// phase, given a width of its own, widens into the background's
// undulations and its cell follows (BENCHMARKS.md, "A further phase's
// own size term").
const (
	ownSizeLines = 3
	ownSizeSNR   = 15
)

// strongLines returns how many of the phase's reflections have an
// intensity of ownSizeSNR esds or more.
func strongLines(ph PatternPhase) int {
	n := 0
	for _, r := range ph.Reflections {
		if r.IntensityESD > 0 && r.Intensity >= ownSizeSNR*r.IntensityESD {
			n++
		}
	}
	return n
}

// carry returns the parameters p of the fit pf laid out for the fit to,
// of the same cells with more of the further phases' profile terms their
// own: the shared blocks and the intensities as they are, a phase's own
// term starting at the value its lines took in pf.
func (pf *patternFit) carry(p []float64, to *patternFit) []float64 {
	q := make([]float64, to.iI+len(to.refl))
	copy(q[:pf.iBg+pf.nb], p[:pf.iBg+pf.nb])
	for i, ph := range pf.phases {
		t := to.phases[i]
		copy(q[t.iR:t.iR+t.nr], p[ph.iR:ph.iR+ph.nr])
		for j := range nProfile {
			q[t.prof[j]] = p[ph.prof[j]]
		}
	}
	copy(q[to.iI:], p[pf.iI:])
	return q
}
