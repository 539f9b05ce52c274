package refine

import (
	"context"
	"fmt"
	"math"
)

// patternSolution is the state at the end of the iterations.
type patternSolution struct {
	p        []float64
	calc, bg []float64
	ne       *normal // JᵀJ and Jᵀr at p
	chi2     float64
}

// closeEnough is the decrease of χ² that the undamped Gauss–Newton step
// would still bring, in units of χ²_red when that exceeds 1, below which
// the fit has converged: the minimum then lies within 0.1 esd along any
// direction of the parameters.
const closeEnough = 0.01

// converged reports whether the Gauss–Newton step at p would decrease χ²
// by less than closeEnough, the bounds allowing (boundedStep): its
// decrement gᵀA⁻¹g over the free parameters.
func (pf *patternFit) converged(ne *normal, p []float64, hold []bool, chi float64) bool {
	st, _, settled, err := pf.boundedStep(ne, p, hold, 0, 8, 0)
	if err != nil || !settled {
		return false
	}
	var dec float64
	for j, v := range st {
		dec += v * ne.g[j]
	}
	return dec < closeEnough*math.Max(chi/float64(len(pf.x)-len(p)), 1)
}

// boundedStep solves the equations at p, damped by lambda, for the step,
// and holds the parameters from index from on that it would take across
// a bound, solving again, at most rounds times: a step merely cut at the
// bounds is cut short on every iteration when many weak reflections sit
// at zero. It returns the step, the parameters held for crossing, and
// whether the last step crossed no bound.
func (pf *patternFit) boundedStep(ne *normal, p []float64, hold []bool, lambda float64, rounds, from int) (st []float64, crossed []bool, settled bool, err error) {
	h := append([]bool(nil), hold...)
	crossed = make([]bool, len(p))
	for round := 0; round < rounds; round++ {
		var f *factor
		if f, err = ne.factorize(lambda, h); err != nil {
			return nil, nil, false, err
		}
		if st, err = f.step(); err != nil {
			return nil, nil, false, err
		}
		settled = true
		for j := from; j < len(st); j++ {
			if !h[j] && pf.outside(j, p[j]+st[j]) {
				h[j], crossed[j], settled = true, true, false
			}
		}
		if settled {
			break
		}
	}
	return st, crossed, settled, nil
}

// lower returns parameter j's lower bound, and false for a parameter
// without one: intensities, U, X and Y not below zero, W not below minW.
func (pf *patternFit) lower(j int) (float64, bool) {
	if j >= pf.iI {
		return 0, true
	}
	for _, ph := range pf.phases {
		switch j {
		case ph.prof[profU], ph.prof[profX], ph.prof[profY]:
			return 0, true
		case ph.prof[profW]:
			return minW, true
		}
	}
	return 0, false
}

// outside reports whether v lies below parameter j's bound.
func (pf *patternFit) outside(j int, v float64) bool {
	lo, ok := pf.lower(j)
	return ok && v < lo
}

// solve runs Levenberg–Marquardt (Marquardt 1963) with the diagonal
// damping, projecting each step onto the bounds (intensities, U, W, X
// and Y not below zero). Parameters marked in fixed are held.
// With settle above zero, the iterations also end when an accepted step
// moved no line by settle degrees or more.
func (pf *patternFit) solve(ctx context.Context, p []float64, maxIter int, fixed []bool, settle float64) (*patternSolution, int, error) {
	k := len(p)
	ni := k - pf.iI
	// The Jacobian at p, and one for the trial step: a step taken
	// brings its Jacobian with it.
	cur, trial := &pf.jac[0], &pf.jac[1]
	res, calc, bg := pf.evaluate(p, cur, -1)
	chi := sumSq(res)
	lambda := 1e-3
	iter, small := 0, 0
	var ne *normal // the normal equations at p; nil when p has moved since
	for ; iter < maxIter; iter++ {
		if err := ctx.Err(); err != nil {
			return nil, iter, err
		}
		ne = normalEquations(cur, res, pf.iI, ni)
		hold := make([]bool, k)
		copy(hold, fixed)
		// Parameters at their bound that the gradient pushes further
		// out are held for this step (an active set): a projected step
		// would otherwise be cut short on every iteration.
		for j := range hold {
			if lo, ok := pf.lower(j); ok && p[j] <= lo && ne.g[j] <= 0 {
				hold[j] = true
			}
		}
		if pf.converged(ne, p, hold, chi) {
			break
		}
		improved, settled := false, false
		for try := 0; try < 12; try++ {
			// Intensities the step would take below zero are held
			// and the step taken again; they then go to zero, their
			// bound. (The profile's few bounded parameters are cut
			// at their bounds by project: held, they stall the fit.)
			st, crossed, _, err := pf.boundedStep(ne, p, hold, lambda, 3, pf.iI)
			if err != nil {
				lambda *= 10
				continue
			}
			q := make([]float64, k)
			for j := range q {
				q[j] = p[j] + st[j]
				if crossed[j] {
					q[j] = 0
				}
			}
			pf.project(q)
			r2, c2, b2 := pf.evaluate(q, trial, -1)
			if c := sumSq(r2); c < chi {
				if settle > 0 {
					settled = maxMove(pf.lines(p), pf.lines(q)) < settle
				}
				// Steps that each lower χ² by less than the
				// convergence test's amount, three in a row, have
				// stalled (bounds and rounding refuse the rest).
				if chi-c < closeEnough*math.Max(chi/float64(len(pf.x)-k), 1) {
					small++
				} else {
					small = 0
				}
				p, chi, res, calc, bg = q, c, r2, c2, b2
				cur, trial = trial, cur
				ne = nil
				improved = small < 3
				lambda = math.Max(lambda/10, 1e-9)
				break
			}
			lambda *= 10
		}
		if pf.progress != nil {
			// Within a stage, the share done is taken as that of a
			// typical fit's 30 iterations, never reaching the next.
			pf.progress(100*pf.stage+min(99, 100*(iter+1)/30), 300)
		}
		if !improved || settled {
			iter++
			break
		}
	}
	if math.IsNaN(chi) || math.IsInf(chi, 0) {
		return nil, iter, fmt.Errorf("%w: the fit diverged (χ² not finite); the cell is far from the data", ErrPattern)
	}
	if ne == nil {
		ne = normalEquations(cur, res, pf.iI, ni)
	}
	return &patternSolution{p: p, calc: calc, bg: bg, ne: ne, chi2: chi}, iter, nil
}

// minW is the lower bound of the width law's W, degrees²: a width of
// 0.001° at 2θ = 0, far below any instrument's.
const minW = 1e-6

// project holds parameters to their bounds.
func (pf *patternFit) project(q []float64) {
	for j := range q {
		if lo, ok := pf.lower(j); ok {
			q[j] = math.Max(q[j], lo)
		}
	}
}

// maxMove returns the largest change of a K-alpha1 line's position
// between a and b, degrees 2θ.
func maxMove(a, b []line) float64 {
	var m float64
	for k := range a {
		if a[k].ok && b[k].ok {
			m = math.Max(m, math.Abs(a[k].comp[0].tt-b[k].comp[0].tt))
		}
	}
	return m
}
