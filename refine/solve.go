package refine

import (
	"context"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// residualFunc fills the weighted residuals r_i = (obs − calc)/σ and the
// weighted Jacobian J_ij = ∂calc_i/∂x_j / σ at x.
type residualFunc func(x, r []float64, j *mat.Dense) error

// leastSquares minimises Σ r_i² by Gauss–Newton with step halving, each
// step solved by QR. It returns the minimum, χ², and (JᵀJ)⁻¹ there.
func leastSquares(ctx context.Context, n int, x0 []float64, f residualFunc, maxIter int) (x []float64, chi2 float64, cov *mat.SymDense, err error) {
	p := len(x0)
	x = append([]float64(nil), x0...)
	r := make([]float64, n)
	j := mat.NewDense(n, p, nil)
	if err := f(x, r, j); err != nil {
		return nil, 0, nil, err
	}
	chi2 = sumSq(r)
	trial := make([]float64, p)
	rt := make([]float64, n)
	jt := mat.NewDense(n, p, nil)
	for iter := 0; iter < maxIter; iter++ {
		if err := ctx.Err(); err != nil {
			return nil, 0, nil, err
		}
		var qr mat.QR
		qr.Factorize(j)
		var dx mat.VecDense
		if err := qr.SolveVecTo(&dx, false, mat.NewVecDense(n, r)); err != nil {
			return nil, 0, nil, fmt.Errorf("%w: %w", ErrSingular, err)
		}
		// ‖J·dx‖ is the step measured in standard deviations: below
		// 1e-10 the minimum is found to far better than its uncertainty.
		var jdx mat.VecDense
		jdx.MulVec(j, &dx)
		size := mat.Norm(&jdx, 2)
		if size < 1e-10 {
			break
		}
		// Close to the minimum the decrease a step brings, ‖J·dx‖², is
		// below the rounding of χ² itself; Gauss–Newton converges there
		// and its full step is taken without the test.
		near := size < 1e-3
		step := 1.0
		accepted := false
		for half := 0; half < 30; half++ {
			for k := range trial {
				trial[k] = x[k] + step*dx.AtVec(k)
			}
			if e := f(trial, rt, jt); e == nil {
				if c := sumSq(rt); near || c <= chi2 || !(chi2 > 0) {
					accepted = true
					break
				}
			}
			step /= 2
		}
		if !accepted {
			// No step lowers χ²: the minimum, to rounding.
			break
		}
		copy(x, trial)
		copy(r, rt)
		j.Copy(jt)
		chi2 = sumSq(r)
	}
	// Columns scaled to unit length, so that the condition number
	// measures how far the parameters are from being undetermined, not
	// the ratio of their units.
	scale := make([]float64, p)
	for c := 0; c < p; c++ {
		scale[c] = mat.Norm(j.ColView(c), 2)
		if !(scale[c] > 0) {
			return nil, 0, nil, fmt.Errorf("%w (parameter %d has no effect on the lines)", ErrSingular, c+1)
		}
	}
	js := mat.NewDense(n, p, nil)
	for c := 0; c < p; c++ {
		for i := 0; i < n; i++ {
			js.Set(i, c, j.At(i, c)/scale[c])
		}
	}
	var jtj mat.SymDense
	jtj.SymOuterK(1, js.T())
	var ch mat.Cholesky
	if ok := ch.Factorize(&jtj); !ok {
		return nil, 0, nil, ErrSingular
	}
	// The factorisation's own estimate of the condition number.
	if c := ch.Cond(); c > 1e12 || math.IsNaN(c) {
		return nil, 0, nil, fmt.Errorf("%w (condition number %.2g)", ErrSingular, c)
	}
	inv := mat.NewSymDense(p, nil)
	if err := ch.InverseTo(inv); err != nil {
		return nil, 0, nil, fmt.Errorf("%w: %w", ErrSingular, err)
	}
	cov = mat.NewSymDense(p, nil)
	for a := 0; a < p; a++ {
		for b := a; b < p; b++ {
			cov.SetSym(a, b, inv.At(a, b)/(scale[a]*scale[b]))
		}
	}
	return x, chi2, cov, nil
}

func sumSq(v []float64) float64 {
	var s float64
	for _, x := range v {
		s += x * x
	}
	return s
}
