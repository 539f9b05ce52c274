package refine

import (
	"context"
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"

	"reticle/cell"
)

// Refine refines cell against the observations. The cell gives the
// system, the centring and the starting parameters; observations marked
// Standard belong to Options.Standard and the rest to the cell. The
// context cancels the work.
func Refine(ctx context.Context, c cell.Cell, obs []Observation, opt Options) (*Result, error) {
	opt = opt.withDefaults()
	if opt.Corrections.Has(Auto) {
		return refineAuto(ctx, c, obs, opt)
	}
	if !(opt.Wavelength > 0) || math.IsInf(opt.Wavelength, 0) {
		return nil, fmt.Errorf("refine: %w: wavelength %g Å", ErrOptions, opt.Wavelength)
	}
	if !(opt.Radius > 0) || math.IsInf(opt.Radius, 0) {
		return nil, fmt.Errorf("refine: %w: goniometer radius %g mm", ErrOptions, opt.Radius)
	}
	if err := c.Check(); err != nil {
		return nil, fmt.Errorf("refine: %w: %w", ErrCell, err)
	}
	if !opt.blended {
		obs = blendESDs(c, obs, opt.Wavelength)
	}
	var own, std []int
	for i, o := range obs {
		if !(o.ESD > 0) || math.IsInf(o.ESD, 0) || math.IsNaN(o.TwoTheta) {
			return nil, fmt.Errorf("refine: line %d at %.4f°: %w (got %g)", i+1, o.TwoTheta, ErrBadESD, o.ESD)
		}
		if len(o.HKL) == 0 || o.HKL[0] == (cell.HKL{}) {
			return nil, fmt.Errorf("refine: line %d at %.4f°: %w: no hkl", i+1, o.TwoTheta, ErrCell)
		}
		if o.Standard {
			if opt.Standard == nil {
				return nil, fmt.Errorf("refine: line %d at %.4f° is marked as the standard's but no standard is given: %w", i+1, o.TwoTheta, ErrOptions)
			}
			std = append(std, i)
		} else {
			own = append(own, i)
		}
	}
	res := &Result{Radius: opt.Radius, Wavelength: opt.Wavelength, FlagLimit: opt.FlagLimit, Scaling: opt.Scaling, Corrections: opt.Corrections}
	var corr shifts
	var corrCov *mat.SymDense
	if opt.Standard != nil {
		if opt.Corrections == None {
			return nil, fmt.Errorf("refine: %w: an internal standard fixes the instrument corrections; choose at least one", ErrOptions)
		}
		sf, v, cc, err := fitStandard(ctx, opt, obs, std)
		if err != nil {
			return nil, err
		}
		res.StandardFit = sf
		corr, corrCov = v, cc
	}

	// The unknown phase: the free reciprocal coefficients, and the
	// corrections unless a standard fixed them.
	refined := opt.Corrections
	if opt.Standard != nil {
		refined = None
	}
	fitted := make([]int, 0, len(own))
	for _, i := range own {
		if !obs[i].Excluded {
			fitted = append(fitted, i)
		}
	}
	m := newModel(c.System, opt.Wavelength, opt.Radius)
	r0 := start(c)
	nr := len(r0)
	x0 := append(append([]float64(nil), r0...), make([]float64, refined.Count())...)
	if len(fitted) < len(x0) {
		return nil, fmt.Errorf("refine: %d lines for %d parameters (%s cell, corrections %s): %w", len(fitted), len(x0), c.System, refined, ErrTooFew)
	}
	row := make([]float64, 0, nCorr)
	f := func(x, r []float64, j *mat.Dense) error {
		v := refined.unpack(x[nr:], corr)
		for k, i := range fitted {
			o := obs[i]
			pt := m.eval(x[:nr], o.HKL[0], v)
			if !pt.inside {
				return fmt.Errorf("refine: line at %.4f° (%v): %w", o.TwoTheta, o.HKL[0], ErrUnreachable)
			}
			r[k] = (o.TwoTheta - pt.tt) / o.ESD
			for col, d := range pt.dR {
				j.Set(k, col, d/o.ESD)
			}
			for col, d := range refined.row(row[:0], pt.dCorr) {
				j.Set(k, nr+col, d/o.ESD)
			}
		}
		return nil
	}
	x, chi2, cov, err := leastSquares(ctx, len(fitted), x0, f, opt.MaxIterations)
	if err != nil {
		if errors.Is(err, context.Canceled) || errors.Is(err, context.DeadlineExceeded) {
			return nil, err
		}
		return nil, fmt.Errorf("refine: %s %s from %d lines: %w", c.System, c.Centring, len(fitted), err)
	}
	rc, v := x[:nr], refined.unpack(x[nr:], corr)
	rc = append([]float64(nil), rc...)
	refinedCell, err := m.cellOf(rc, c.Centring)
	if err != nil {
		return nil, fmt.Errorf("refine: %s %s: %w", c.System, c.Centring, err)
	}
	res.Fitted, res.DOF, res.Chi2 = len(fitted), len(fitted)-len(x), chi2
	if res.DOF > 0 {
		res.Chi2Reduced = chi2 / float64(res.DOF)
	} else {
		res.Warnings = append(res.Warnings, "as many parameters as lines: the fit is exact and the uncertainties rest on the peak esds alone")
	}
	unscaled := mat.NewSymDense(cov.SymmetricDim(), nil)
	unscaled.CopySym(cov)
	if opt.Scaling.scale(chi2, res.DOF) {
		cov.ScaleSym(res.Chi2Reduced, cov)
		res.Scaled = true
	}
	// Covariance of everything reported: the cell's coefficients, then
	// the corrections (refined, or fixed by a standard with their effect
	// on the cell).
	full := cov
	if corrCov != nil {
		full = propagateStandard(m, rc, v, obs, fitted, opt.Corrections, unscaled, cov, corrCov)
	}
	res.Cell = refinedCell
	res.shifts = v
	res.fill(full, nr, opt.Standard != nil)
	for _, i := range own {
		rr := residual(m, rc, obs[i], v, opt.FlagLimit)
		if rr.Flagged && !rr.Excluded {
			res.Flagged++
		}
		res.Residuals = append(res.Residuals, rr)
	}
	res.Warnings = append(res.Warnings, correlationWarnings(res)...)
	if res.Flagged > 0 {
		res.Warnings = append(res.Warnings, flaggedWarning(res.Flagged, opt.FlagLimit))
	}
	return res, nil
}

// flaggedWarning says how many lines lie beyond the flag limit.
func flaggedWarning(n int, limit float64) string {
	return fmt.Sprintf("%d line(s) lie more than %g esd from the refined cell", n, limit)
}

// setValues replaces the cell (c, of reciprocal coefficients r) and the
// corrections v of res by other values of the same model, and recomputes
// what follows from them: the parameters' values, the volume, the
// residuals, χ² and the count of flagged lines. The covariance and the
// warnings are left alone.
func (res *Result) setValues(m *model, c cell.Cell, r []float64, v shifts) {
	res.Cell, res.shifts = c, v
	res.Volume = c.Volume()
	p := c.Params()
	for i := range res.Params {
		if k := corrIndex(res.Params[i].Name); k >= 0 {
			res.Params[i].Value = v[k]
		} else {
			res.Params[i].Value = p[paramIndex(res.Params[i].Name)]
		}
	}
	res.Flagged, res.Chi2 = 0, 0
	for i, rr := range res.Residuals {
		rr = residual(m, r, rr.Observation, v, res.FlagLimit)
		if !rr.Excluded {
			res.Chi2 += rr.Sigmas * rr.Sigmas
			if rr.Flagged {
				res.Flagged++
			}
		}
		res.Residuals[i] = rr
	}
	if res.DOF > 0 {
		res.Chi2Reduced = res.Chi2 / float64(res.DOF)
	}
}

// residual computes one line's residual under the refined model.
func residual(m *model, r []float64, o Observation, v shifts, limit float64) Residual {
	pt := m.eval(r, o.HKL[0], v)
	rr := Residual{Observation: o, TwoThetaCalc: pt.tt, Delta: o.TwoTheta - pt.tt}
	rr.Sigmas = rr.Delta / o.ESD
	rr.Flagged = math.Abs(rr.Sigmas) > limit
	return rr
}

// fill sets the cell's covariance and esds, the parameters and their
// correlations from the covariance of (coefficients, corrections); the
// first nr rows are the cell's free reciprocal coefficients.
func (res *Result) fill(cov *mat.SymDense, nr int, fromStandard bool) {
	n := cov.SymmetricDim()
	j6 := res.Cell.ReciprocalToDirect() // 6 × nr
	free := res.Cell.System.FreeNames()
	idx := make([]int, len(free)) // rows of j6 that are free parameters
	for k, name := range free {
		idx[k] = paramIndex(name)
	}
	// K maps (coefficients, corrections) to (free cell parameters,
	// corrections).
	nc := n - nr
	np := len(free) + nc
	k := mat.NewDense(np, n, nil)
	for a, i := range idx {
		for b := 0; b < nr; b++ {
			k.Set(a, b, j6[i][b])
		}
	}
	for c := 0; c < nc; c++ {
		k.Set(len(free)+c, nr+c, 1)
	}
	var kc, out mat.Dense
	kc.Mul(k, cov)
	out.Mul(&kc, k.T())
	// Six-parameter covariance of the cell.
	for i := 0; i < 6; i++ {
		for j := 0; j < 6; j++ {
			var s float64
			for a := 0; a < nr; a++ {
				for b := 0; b < nr; b++ {
					s += j6[i][a] * cov.At(a, b) * j6[j][b]
				}
			}
			res.Covariance[i][j] = s
		}
	}
	res.ESD = res.Covariance.ESD()
	res.Volume = res.Cell.Volume()
	res.VolumeESD = res.Cell.VolumeESD(res.Covariance)
	res.ParamCovariance = make([][]float64, np)
	res.Correlation = make([][]float64, np)
	for i := 0; i < np; i++ {
		res.ParamCovariance[i] = make([]float64, np)
		res.Correlation[i] = make([]float64, np)
		for j := 0; j < np; j++ {
			res.ParamCovariance[i][j] = out.At(i, j)
			res.Correlation[i][j] = out.At(i, j) / math.Sqrt(out.At(i, i)*out.At(j, j))
		}
	}
	p := res.Cell.Params()
	for a, i := range idx {
		unit := "Å"
		if i >= 3 {
			unit = "°"
		}
		res.Params = append(res.Params, Param{Name: free[a], Unit: unit, Value: p[i], ESD: math.Sqrt(out.At(a, a))})
	}
	names, units := res.Corrections.names()
	for c := range names {
		e := math.Sqrt(out.At(len(free)+c, len(free)+c))
		res.Params = append(res.Params, Param{Name: names[c], Unit: units[c], Value: res.shifts[corrIndex(names[c])], ESD: e, Fixed: fromStandard})
		res.shiftESDs[corrIndex(names[c])] = e
	}
}

// corrIndex returns the position of a correction in shifts.
func corrIndex(name string) int {
	for i, x := range corrNames {
		if x.name == name {
			return i
		}
	}
	return -1
}

// inseparable is the |ρ| between a cell parameter and a correction above
// which the data are said not to separate them (common practice).
const inseparable = 0.99

// zeroDisplacementNote starts the warning that the zero shift and the
// displacement cannot be told apart.
const zeroDisplacementNote = "zero shift and displacement correlate strongly"

// correlationWarnings names pairs of parameters that correlate strongly.
func correlationWarnings(res *Result) []string {
	var out []string
	for i := range res.Params {
		for j := i + 1; j < len(res.Params); j++ {
			rho := res.Correlation[i][j]
			if math.Abs(rho) <= 0.95 {
				continue
			}
			a, b := res.Params[i].Name, res.Params[j].Name
			if a == "zero" && b == "displacement" {
				out = append(out, fmt.Sprintf(zeroDisplacementNote+" (ρ = %.3f): the lines span too little of cos θ to tell them apart; refine one of them, or add an internal standard", rho))
				continue
			}
			if math.Abs(rho) > inseparable && corrIndex(a) < 0 && corrIndex(b) >= 0 {
				out = append(out, fmt.Sprintf("the data cannot separate the cell from the %s correction (ρ(%s, %s) = %.3f): the esds are large for that reason; an internal standard (for example silicon) mixed into the sample fixes the corrections independently", b, a, b, rho))
				continue
			}
			out = append(out, fmt.Sprintf("%s and %s correlate strongly (ρ = %.3f)", a, b, rho))
		}
	}
	return out
}
