package refine

import (
	"context"
	"fmt"
	"sort"
	"strings"

	"gonum.org/v1/gonum/mat"

	"reticle/indexing"
)

// A Standard is a reference material of known cell mixed into a sample.
type Standard struct {
	Name   string
	Cell   indexing.Cell
	AESD   float64 // stated uncertainty of a, Å (not propagated: it is far below that of line positions)
	Source string
}

// Standards are the line-position standards whose certified lattice
// parameters are built in: NIST Standard Reference Materials, silicon
// (SRM 640 series) and lanthanum hexaboride (SRM 660 series), certified at
// 22.5 °C. Values are from memory of the certificates; check them against
// the certificate of the lot in use, or type the cell in.
var Standards = []Standard{
	{Name: "Si-640c", Cell: indexing.NewCell(indexing.Cubic, indexing.F, 5.4311946, 0), AESD: 0.0000092,
		Source: "NIST SRM 640c certificate, a = 0.54311946(92) nm at 22.5 °C (from memory)"},
	{Name: "Si-640d", Cell: indexing.NewCell(indexing.Cubic, indexing.F, 5.43123, 0), AESD: 0.00008,
		Source: "NIST SRM 640d certificate, a = 0.543123(8) nm at 22.5 °C (from memory)"},
	{Name: "LaB6-660a", Cell: indexing.NewCell(indexing.Cubic, indexing.P, 4.1569162, 0), AESD: 0.0000097,
		Source: "NIST SRM 660a certificate, a = 0.41569162(97) nm at 22.5 °C (from memory)"},
	{Name: "LaB6-660c", Cell: indexing.NewCell(indexing.Cubic, indexing.P, 4.156826, 0), AESD: 0.000008,
		Source: "NIST SRM 660c certificate, a = 0.4156826(8) nm at 22.5 °C (from memory)"},
}

// LookupStandard finds a built-in standard by name, ignoring case; "Si"
// and "LaB6" name the newest lots listed.
func LookupStandard(name string) (Standard, error) {
	switch strings.ToLower(name) {
	case "si":
		name = "Si-640d"
	case "lab6":
		name = "LaB6-660c"
	}
	for _, s := range Standards {
		if strings.EqualFold(s.Name, name) {
			return s, nil
		}
	}
	var names []string
	for _, s := range Standards {
		names = append(names, s.Name)
	}
	sort.Strings(names)
	return Standard{}, fmt.Errorf("refine: unknown standard %q (built in: Si, LaB6, %s; or give its cell)", name, strings.Join(names, ", "))
}

// fitStandard fits the corrections to the standard's lines with its cell
// fixed, returning the fit, the corrections, their covariance and names.
func fitStandard(ctx context.Context, opt Options, obs []Observation, idx []int) (*StandardFit, float64, float64, *mat.SymDense, []string, error) {
	st := opt.Standard
	p := cellValues(st.Cell)
	for _, v := range p {
		if !(v > 0) {
			return nil, 0, 0, nil, nil, fmt.Errorf("refine: standard %s: %w", st.Name, ErrCell)
		}
	}
	var fitted []int
	for _, i := range idx {
		if !obs[i].Excluded {
			fitted = append(fitted, i)
		}
	}
	var names []string
	if opt.Zero {
		names = append(names, "zero")
	}
	if opt.Displacement {
		names = append(names, "displacement")
	}
	if len(fitted) < len(names) {
		return nil, 0, 0, nil, nil, fmt.Errorf("refine: standard %s: %d lines for %d corrections: %w", st.Name, len(fitted), len(names), ErrTooFew)
	}
	unpack := func(x []float64) (z, d float64) {
		k := 0
		if opt.Zero {
			z = x[k]
			k++
		}
		if opt.Displacement {
			d = x[k]
		}
		return
	}
	f := func(x, r []float64, j *mat.Dense) error {
		z, d := unpack(x)
		for row, i := range fitted {
			o := obs[i]
			pt := eval(st.Cell.System, p, o.HKL[0], opt.Wavelength, z, d, opt.Radius)
			if !pt.inside {
				return fmt.Errorf("refine: standard line at %.4f° (%v): %w", o.TwoTheta, o.HKL[0], ErrUnreachable)
			}
			r[row] = (o.TwoTheta - pt.tt) / o.ESD
			k := 0
			if opt.Zero {
				j.Set(row, k, 1/o.ESD)
				k++
			}
			if opt.Displacement {
				j.Set(row, k, pt.dDisp/o.ESD)
			}
		}
		return nil
	}
	x, chi2, cov, err := leastSquares(ctx, len(fitted), make([]float64, len(names)), f, opt.MaxIterations)
	if err != nil {
		return nil, 0, 0, nil, nil, fmt.Errorf("refine: standard %s from %d lines: %w", st.Name, len(fitted), err)
	}
	z, d := unpack(x)
	sf := &StandardFit{Standard: *st, N: len(fitted), DOF: len(fitted) - len(names)}
	if sf.DOF > 0 {
		sf.Chi2Reduced = chi2 / float64(sf.DOF)
	}
	if opt.Scaling.scale(chi2, sf.DOF) {
		cov.ScaleSym(sf.Chi2Reduced, cov)
		sf.Scaled = true
	}
	for _, i := range idx {
		sf.Residuals = append(sf.Residuals, residual(st.Cell.System, p, obs[i], opt, z, d))
	}
	return sf, z, d, cov, names, nil
}

// propagateStandard builds the joint covariance of the unknown's cell
// parameters and the corrections fixed by the standard; inv is the
// unknown's unscaled (JₓᵀJₓ)⁻¹ and cx its covariance as reported. With x̂ the cell
// minimising the unknown's χ² at corrections c, dx̂/dc = −(JₓᵀJₓ)⁻¹JₓᵀJ_c
// (weighted Jacobians), so
//
//	cov = [[Cₓ + K C_c Kᵀ, K C_c], [C_c Kᵀ, C_c]],  K = dx̂/dc.
func propagateStandard(s indexing.System, p []float64, zero, disp float64, obs []Observation, fitted []int, opt Options, inv, cx, cc *mat.SymDense) *mat.SymDense {
	np, nc := len(p), cc.SymmetricDim()
	jx := mat.NewDense(len(fitted), np, nil)
	jc := mat.NewDense(len(fitted), nc, nil)
	for row, i := range fitted {
		o := obs[i]
		pt := eval(s, p, o.HKL[0], opt.Wavelength, zero, disp, opt.Radius)
		for c := 0; c < np; c++ {
			jx.Set(row, c, pt.dCell[c]/o.ESD)
		}
		k := 0
		if opt.Zero {
			jc.Set(row, k, 1/o.ESD)
			k++
		}
		if opt.Displacement {
			jc.Set(row, k, pt.dDisp/o.ESD)
		}
	}
	// The unscaled inverse for K: the χ² scaling of Cₓ does not enter
	// the sensitivity.
	var jtjc, k mat.Dense
	jtjc.Mul(jx.T(), jc)
	k.Mul(inv, &jtjc)
	k.Scale(-1, &k)
	var kc, kck mat.Dense
	kc.Mul(&k, cc)
	kck.Mul(&kc, k.T())
	n := np + nc
	out := mat.NewSymDense(n, nil)
	for i := 0; i < np; i++ {
		for j := i; j < np; j++ {
			out.SetSym(i, j, cx.At(i, j)+kck.At(i, j))
		}
		for j := 0; j < nc; j++ {
			out.SetSym(i, np+j, kc.At(i, j))
		}
	}
	for i := 0; i < nc; i++ {
		for j := i; j < nc; j++ {
			out.SetSym(np+i, np+j, cc.At(i, j))
		}
	}
	return out
}
