package refine

import (
	"context"
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"

	"reticle/indexing"
)

// Refine refines cell against the observations. The cell gives the
// system, the centring and the starting parameters; observations marked
// Standard belong to Options.Standard and the rest to the cell. The
// context cancels the work.
func Refine(ctx context.Context, cell indexing.Cell, obs []Observation, opt Options) (*Result, error) {
	opt = opt.withDefaults()
	if !(opt.Wavelength > 0) || math.IsInf(opt.Wavelength, 0) {
		return nil, fmt.Errorf("refine: %w: wavelength %g Å", ErrOptions, opt.Wavelength)
	}
	if !(opt.Radius > 0) || math.IsInf(opt.Radius, 0) {
		return nil, fmt.Errorf("refine: %w: goniometer radius %g mm", ErrOptions, opt.Radius)
	}
	p0 := cellValues(cell)
	for i, v := range p0 {
		if !(v > 0) || math.IsInf(v, 0) {
			return nil, fmt.Errorf("refine: %w: %s = %g Å", ErrCell, cellParams(cell.System)[i], v)
		}
	}
	var own, std []int
	for i, o := range obs {
		if !(o.ESD > 0) || math.IsInf(o.ESD, 0) || math.IsNaN(o.TwoTheta) {
			return nil, fmt.Errorf("refine: line %d at %.4f°: %w (got %g)", i+1, o.TwoTheta, ErrBadESD, o.ESD)
		}
		if len(o.HKL) == 0 || o.HKL[0] == (indexing.HKL{}) {
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
	res := &Result{Radius: opt.Radius, Wavelength: opt.Wavelength, FlagLimit: opt.FlagLimit, Scaling: opt.Scaling}
	zero, disp := 0.0, 0.0
	var corrCov *mat.SymDense
	var corrNames []string
	if opt.Standard != nil {
		if !opt.Zero && !opt.Displacement {
			return nil, fmt.Errorf("refine: %w: an internal standard fixes the zero shift and/or the displacement; choose at least one", ErrOptions)
		}
		sf, z, d, cc, names, err := fitStandard(ctx, opt, obs, std)
		if err != nil {
			return nil, err
		}
		res.StandardFit = sf
		zero, disp, corrCov, corrNames = z, d, cc, names
	}

	// The unknown phase: cell parameters, and the corrections unless a
	// standard fixed them.
	refZero := opt.Zero && opt.Standard == nil
	refDisp := opt.Displacement && opt.Standard == nil
	fitted := make([]int, 0, len(own))
	for _, i := range own {
		if !obs[i].Excluded {
			fitted = append(fitted, i)
		}
	}
	np := len(p0)
	names := cellParams(cell.System)
	x0 := append([]float64(nil), p0...)
	if refZero {
		names = append(names, "zero")
		x0 = append(x0, 0)
	}
	if refDisp {
		names = append(names, "displacement")
		x0 = append(x0, 0)
	}
	if len(fitted) < len(x0) {
		return nil, fmt.Errorf("refine: %d lines for %d parameters: %w", len(fitted), len(x0), ErrTooFew)
	}
	unpack := func(x []float64) (p []float64, z, d float64) {
		p, z, d = x[:np], zero, disp
		k := np
		if refZero {
			z = x[k]
			k++
		}
		if refDisp {
			d = x[k]
		}
		return
	}
	f := func(x, r []float64, j *mat.Dense) error {
		p, z, d := unpack(x)
		for _, v := range p {
			if !(v > 0) {
				return ErrCell
			}
		}
		for row, i := range fitted {
			o := obs[i]
			pt := eval(cell.System, p, o.HKL[0], opt.Wavelength, z, d, opt.Radius)
			if !pt.inside {
				return fmt.Errorf("refine: line at %.4f° (%v): %w", o.TwoTheta, o.HKL[0], ErrUnreachable)
			}
			r[row] = (o.TwoTheta - pt.tt) / o.ESD
			for c := 0; c < np; c++ {
				j.Set(row, c, pt.dCell[c]/o.ESD)
			}
			k := np
			if refZero {
				j.Set(row, k, pt.dZero/o.ESD)
				k++
			}
			if refDisp {
				j.Set(row, k, pt.dDisp/o.ESD)
			}
		}
		return nil
	}
	x, chi2, cov, err := leastSquares(ctx, len(fitted), x0, f, opt.MaxIterations)
	if err != nil {
		if errors.Is(err, context.Canceled) || errors.Is(err, context.DeadlineExceeded) {
			return nil, err
		}
		return nil, fmt.Errorf("refine: %s %s from %d lines: %w", cell.System, cell.Centring, len(fitted), err)
	}
	p, z, d := unpack(x)
	res.N, res.DOF, res.Chi2 = len(fitted), len(fitted)-len(x), chi2
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

	// Covariance of everything reported: the unknown's parameters, then
	// the corrections fixed by a standard with their effect on the cell.
	full := cov
	if corrCov != nil {
		full = propagateStandard(cell.System, p, z, d, obs, fitted, opt, unscaled, cov, corrCov)
		names = append(names, corrNames...)
	}
	res.Cell = buildCell(cell.System, cell.Centring, p)
	res.Zero, res.Displacement = z, d
	res.ZeroRefined, res.DisplacementRefined = opt.Zero, opt.Displacement
	fillParams(res, names, full, corrCov != nil, np)
	res.Volume, res.VolumeESD = volumeESD(res.Cell, full, np)

	for _, i := range own {
		rr := residual(cell.System, p, obs[i], opt, z, d)
		if rr.Flagged && !rr.Excluded {
			res.Flagged++
		}
		res.Residuals = append(res.Residuals, rr)
	}
	res.Warnings = append(res.Warnings, correlationWarnings(res)...)
	if res.Flagged > 0 {
		res.Warnings = append(res.Warnings, fmt.Sprintf("%d line(s) lie more than %g esd from the refined cell", res.Flagged, opt.FlagLimit))
	}
	return res, nil
}

// residual computes one line's residual under the refined model.
func residual(s indexing.System, p []float64, o Observation, opt Options, zero, disp float64) Residual {
	pt := eval(s, p, o.HKL[0], opt.Wavelength, zero, disp, opt.Radius)
	r := Residual{Observation: o, TwoThetaCalc: pt.tt, Delta: o.TwoTheta - pt.tt}
	r.Norm = r.Delta / o.ESD
	r.Flagged = math.Abs(r.Norm) > opt.FlagLimit
	return r
}

// fillParams sets the parameters, their esds and the correlation matrix.
func fillParams(res *Result, names []string, cov *mat.SymDense, fixedCorr bool, np int) {
	n := len(names)
	res.Covariance = make([][]float64, n)
	res.Correlation = make([][]float64, n)
	for i := 0; i < n; i++ {
		res.Covariance[i] = make([]float64, n)
		res.Correlation[i] = make([]float64, n)
		for j := 0; j < n; j++ {
			res.Covariance[i][j] = cov.At(i, j)
			res.Correlation[i][j] = cov.At(i, j) / math.Sqrt(cov.At(i, i)*cov.At(j, j))
		}
	}
	esd := func(i int) float64 { return math.Sqrt(cov.At(i, i)) }
	for i, name := range names {
		pr := Param{Name: name, ESD: esd(i), Fixed: fixedCorr && i >= np}
		switch name {
		case "a":
			pr.Value, pr.Unit = res.Cell.A, "Å"
		case "b":
			pr.Value, pr.Unit = res.Cell.B, "Å"
		case "c":
			pr.Value, pr.Unit = res.Cell.C, "Å"
		case "zero":
			pr.Value, pr.Unit = res.Zero, "° 2θ"
			res.ZeroESD = pr.ESD
		case "displacement":
			pr.Value, pr.Unit = res.Displacement, "mm"
			res.DisplacementESD = pr.ESD
		}
		res.Params = append(res.Params, pr)
	}
	e := CellESD{A: esd(0)}
	switch res.Cell.System {
	case indexing.Cubic:
		e.B, e.C = e.A, e.A
	case indexing.Orthorhombic:
		e.B, e.C = esd(1), esd(2)
	default:
		e.B, e.C = e.A, esd(1)
	}
	res.CellESD = e
}

// volumeESD propagates the covariance of the first np parameters to the
// volume.
func volumeESD(c indexing.Cell, cov *mat.SymDense, np int) (float64, float64) {
	v, g := volumeGradient(c)
	var s float64
	for i := 0; i < np; i++ {
		for j := 0; j < np; j++ {
			s += g[i] * cov.At(i, j) * g[j]
		}
	}
	return v, math.Sqrt(s)
}

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
				out = append(out, fmt.Sprintf("zero shift and displacement correlate strongly (ρ = %.3f): the lines span too little of cos θ to tell them apart; refine one of them, or add an internal standard", rho))
				continue
			}
			out = append(out, fmt.Sprintf("%s and %s correlate strongly (ρ = %.3f)", a, b, rho))
		}
	}
	return out
}
