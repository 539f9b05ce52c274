package refine

import (
	"context"
	"fmt"
	"sort"
	"strings"

	"gonum.org/v1/gonum/mat"

	"reticle/cell"
)

// A Standard is a reference material of known cell mixed into a sample.
type Standard struct {
	Name   string
	Cell   cell.Cell
	AESD   float64 // stated uncertainty of a, Å (not propagated: it is far below that of line positions)
	Source string
}

// Standards are the line-position standards whose certified lattice
// parameters are built in: NIST Standard Reference Materials, silicon
// (SRM 640 series) and lanthanum hexaboride (SRM 660 series), certified at
// 22.5 °C. Values are from memory of the certificates; check them against
// the certificate of the lot in use, or type the cell in.
var Standards = []Standard{
	{Name: "Si-640c", Cell: cell.Must(cell.Cubic, cell.F, 5.4311946), AESD: 0.0000092,
		Source: "NIST SRM 640c certificate, a = 0.54311946(92) nm at 22.5 °C (from memory)"},
	{Name: "Si-640d", Cell: cell.Must(cell.Cubic, cell.F, 5.43123), AESD: 0.00008,
		Source: "NIST SRM 640d certificate, a = 0.543123(8) nm at 22.5 °C (from memory)"},
	{Name: "LaB6-660a", Cell: cell.Must(cell.Cubic, cell.P, 4.1569162), AESD: 0.0000097,
		Source: "NIST SRM 660a certificate, a = 0.41569162(97) nm at 22.5 °C (from memory)"},
	{Name: "LaB6-660c", Cell: cell.Must(cell.Cubic, cell.P, 4.156826), AESD: 0.000008,
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
	return Standard{}, fmt.Errorf("unknown standard %q (built in: Si, LaB6, %s; or give its cell, e.g. 'cubic F a=5.43119')", name, strings.Join(names, ", "))
}

// fitStandard fits the corrections of opt to the standard's lines with
// its cell fixed, returning the fit, the corrections and their
// covariance.
func fitStandard(ctx context.Context, opt Options, obs []Observation, idx []int) (*StandardFit, shifts, *mat.SymDense, error) {
	st := opt.Standard
	if err := st.Cell.Check(); err != nil {
		return nil, shifts{}, nil, fmt.Errorf("refine: standard %s: %w: %w", st.Name, ErrCell, err)
	}
	var fitted []int
	for _, i := range idx {
		if !obs[i].Excluded {
			fitted = append(fitted, i)
		}
	}
	set := opt.Corrections.forStandard()
	if len(fitted) < set.Count() {
		return nil, shifts{}, nil, fmt.Errorf("refine: internal standard %s: %d of its lines found among the peaks, and fixing the corrections %s needs at least %d: check that the standard is in the sample, its name, and the wavelength: %w", st.Name, len(fitted), set, set.Count(), ErrTooFew)
	}
	m := newModel(st.Cell.System, opt.Wavelength, opt.Radius)
	r := start(st.Cell)
	row := make([]float64, 0, nCorr)
	f := func(x, res []float64, j *mat.Dense) error {
		v := set.unpack(x, shifts{})
		for k, i := range fitted {
			o := obs[i]
			pt := m.eval(r, o.HKL[0], v)
			if !pt.inside {
				return fmt.Errorf("refine: standard line at %.4f° (%v): %w", o.TwoTheta, o.HKL[0], ErrUnreachable)
			}
			res[k] = (o.TwoTheta - pt.tt) / o.ESD
			for col, d := range set.row(row[:0], pt.dCorr) {
				j.Set(k, col, d/o.ESD)
			}
		}
		return nil
	}
	x, chi2, cov, err := leastSquares(ctx, len(fitted), make([]float64, set.Count()), f, opt.MaxIterations)
	if err != nil {
		return nil, shifts{}, nil, fmt.Errorf("refine: standard %s from %d lines: %w", st.Name, len(fitted), err)
	}
	v := set.unpack(x, shifts{})
	sf := &StandardFit{Standard: *st, Fitted: len(fitted), DOF: len(fitted) - set.Count()}
	if sf.DOF > 0 {
		sf.Chi2Reduced = chi2 / float64(sf.DOF)
	}
	if opt.Scaling.scale(chi2, sf.DOF) {
		cov.ScaleSym(sf.Chi2Reduced, cov)
		sf.Scaled = true
	}
	for _, i := range idx {
		sf.Residuals = append(sf.Residuals, residual(m, r, obs[i], v, opt.FlagLimit))
	}
	return sf, v, cov, nil
}

// propagateStandard builds the joint covariance of the unknown's cell
// coefficients r and the corrections fixed by the standard; inv is the
// unknown's unscaled (JᵣᵀJᵣ)⁻¹ and cr its covariance as reported. With r̂
// the coefficients minimising the unknown's χ² at corrections c,
// dr̂/dc = −(JᵣᵀJᵣ)⁻¹JᵣᵀJ_c (weighted Jacobians), so
//
//	cov = [[Cᵣ + K C_c Kᵀ, K C_c], [C_c Kᵀ, C_c]],  K = dr̂/dc.
func propagateStandard(m *model, r []float64, v shifts, obs []Observation, fitted []int, set Corrections, inv, cr, cc *mat.SymDense) *mat.SymDense {
	nr, nc := len(r), cc.SymmetricDim()
	jr := mat.NewDense(len(fitted), nr, nil)
	jc := mat.NewDense(len(fitted), nc, nil)
	row := make([]float64, 0, nCorr)
	for k, i := range fitted {
		o := obs[i]
		pt := m.eval(r, o.HKL[0], v)
		for c, d := range pt.dR {
			jr.Set(k, c, d/o.ESD)
		}
		for c, d := range set.row(row[:0], pt.dCorr) {
			jc.Set(k, c, d/o.ESD)
		}
	}
	// The unscaled inverse for K: the χ² scaling of Cᵣ does not enter
	// the sensitivity.
	var jtjc, k mat.Dense
	jtjc.Mul(jr.T(), jc)
	k.Mul(inv, &jtjc)
	k.Scale(-1, &k)
	var kc, kck mat.Dense
	kc.Mul(&k, cc)
	kck.Mul(&kc, k.T())
	n := nr + nc
	out := mat.NewSymDense(n, nil)
	for i := 0; i < nr; i++ {
		for j := i; j < nr; j++ {
			out.SetSym(i, j, cr.At(i, j)+kck.At(i, j))
		}
		for j := 0; j < nc; j++ {
			out.SetSym(i, nr+j, kc.At(i, j))
		}
	}
	for i := 0; i < nc; i++ {
		for j := i; j < nc; j++ {
			out.SetSym(nr+i, nr+j, cc.At(i, j))
		}
	}
	return out
}

// ParseStandard reads an internal standard: a built-in name (see
// LookupStandard) or a typed cell such as "cubic F a=5.43119(1)".
func ParseStandard(s string) (Standard, error) {
	if !strings.ContainsRune(s, '=') {
		return LookupStandard(strings.TrimSpace(s))
	}
	c, e, err := cell.Parse(s)
	if err != nil {
		return Standard{}, err
	}
	return Standard{Name: cell.Format(c, e), Cell: c, AESD: e.A, Source: "typed cell"}, nil
}

// MarshalText writes the standard as ParseStandard reads it: its name,
// or its cell for a typed one.
func (s Standard) MarshalText() ([]byte, error) {
	if _, err := LookupStandard(s.Name); err == nil {
		return []byte(s.Name), nil
	}
	return []byte(cell.Format(s.Cell, cell.ESD{A: s.AESD})), nil
}

// UnmarshalText reads a standard as ParseStandard does.
func (s *Standard) UnmarshalText(b []byte) error {
	v, err := ParseStandard(string(b))
	if err != nil {
		return err
	}
	*s = v
	return nil
}
