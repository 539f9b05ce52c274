package refine

import (
	"context"

	"reticle/cell"
)

// ownSizes refits from the solution sol (result r, pf's layout) with a
// size term of its own for every further phase whose lines determine
// one (see ownSizeLines) and returns that fit; r when there is none.
func ownSizes(ctx context.Context, pf *patternFit, sol *patternSolution, r *PatternResult, cells []cell.Cell, x, y, sig []float64, opt PatternOptions) (*PatternResult, error) {
	own := make([]bool, len(cells))
	found := false
	for i := 1; i < len(r.Phases); i++ {
		own[i] = strongLines(r.Phases[i]) >= ownSizeLines
		found = found || own[i]
	}
	if !found {
		return r, nil
	}
	pf2, _, err := newPatternFit(cells, x, y, sig, opt, own)
	if err != nil {
		return nil, err
	}
	pf2.progress = opt.Progress
	pf2.stage = 2
	sol2, it, err := pf2.solve(ctx, pf.carry(sol.p, pf2), opt.MaxIter, nil, 0)
	if err != nil {
		return nil, err
	}
	r2, err := pf2.result(sol2, r.Iterations+it, opt)
	if err != nil {
		return nil, err
	}
	r2.Converged = it < opt.MaxIter
	return r2, nil
}

// A further phase has a size term of its own (phaseFit.iY) when at least
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
// of the same cells with more phases' own size terms: the shared blocks
// and the intensities as they are, a phase's own size term starting at
// the term it used in pf.
func (pf *patternFit) carry(p []float64, to *patternFit) []float64 {
	q := make([]float64, to.iI+len(to.refl))
	copy(q[:pf.iBg+pf.nb], p[:pf.iBg+pf.nb])
	for i, ph := range pf.phases {
		t := to.phases[i]
		copy(q[t.iR:t.iR+t.nr], p[ph.iR:ph.iR+ph.nr])
		if i == 0 {
			copy(q[t.iU:t.iU+nProfile], p[ph.iU:ph.iU+nProfile])
		}
		q[t.iY] = p[ph.iY]
	}
	copy(q[to.iI:], p[pf.iI:])
	return q
}
