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

// outside reports whether v lies outside parameter j's bounds.
func (pf *patternFit) outside(j int, v float64) bool {
	if j >= pf.iI {
		return v < 0
	}
	for _, ph := range pf.phases {
		switch j {
		case ph.iU:
			return v < 0
		case ph.iU + 2:
			return v < minW
		case ph.iU + 3, ph.iU + 4:
			return v < 0
		}
	}
	return false
}

// solve runs Levenberg–Marquardt (Marquardt 1963) with the diagonal
// damping, projecting each step onto the bounds (intensities, U, W, X
// and Y not below zero). Parameters marked in fixed are held.
// With settle above zero, the iterations also end when an accepted step
// moved no line by settle degrees or more.
func (pf *patternFit) solve(ctx context.Context, p []float64, maxIter int, fixed []bool, settle float64) (*patternSolution, int, error) {
	k := len(p)
	ni := k - pf.iI
	// The rows are kept from one stage to the next: their slices then
	// grow only once.
	if pf.rows == nil {
		pf.rows = make([]sparseRow, len(pf.x))
	}
	rows := pf.rows
	res, calc, bg := pf.evaluate(p, rows, -1)
	chi := sumSq(res)
	lambda := 1e-3
	iter, small := 0, 0
	for ; iter < maxIter; iter++ {
		if err := ctx.Err(); err != nil {
			return nil, iter, err
		}
		ne := normalEquations(rows, res, pf.iI, ni, pf.farGrad)
		hold := make([]bool, k)
		copy(hold, fixed)
		// Intensities at their bound that the gradient pushes further
		// out are held for this step (an active set): a projected step
		// would otherwise be cut short on every iteration.
		for j := pf.iI; j < k; j++ {
			if p[j] <= 0 && ne.g[j] <= 0 {
				hold[j] = true
			}
		}
		// So are the profile's bounded parameters.
		for _, ph := range pf.phases {
			u, w, x, y := ph.iU, ph.iU+2, ph.iU+3, ph.iU+4
			hold[u] = hold[u] || p[u] <= 0 && ne.g[u] <= 0
			hold[w] = hold[w] || p[w] <= minW && ne.g[w] <= 0
			hold[x] = hold[x] || p[x] <= 0 && ne.g[x] <= 0
			hold[y] = hold[y] || p[y] <= 0 && ne.g[y] <= 0
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
			r2, _, _ := pf.evaluate(q, nil, -1)
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
				p, chi = q, c
				res, calc, bg = pf.evaluate(p, rows, -1)
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
	return &patternSolution{p: p, calc: calc, bg: bg, ne: normalEquations(rows, res, pf.iI, ni, pf.farGrad), chi2: chi}, iter, nil
}

// minW is the lower bound of the width law's W, degrees²: a width of
// 0.001° at 2θ = 0, far below any instrument's.
const minW = 1e-6

// project holds parameters to their bounds.
func (pf *patternFit) project(q []float64) {
	for _, ph := range pf.phases {
		q[ph.iU] = math.Max(q[ph.iU], 0)
		q[ph.iU+2] = math.Max(q[ph.iU+2], minW)
		q[ph.iU+3] = math.Max(q[ph.iU+3], 0)
		q[ph.iU+4] = math.Max(q[ph.iU+4], 0)
	}
	for j := pf.iI; j < len(q); j++ {
		q[j] = math.Max(q[j], 0)
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
