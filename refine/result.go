package refine

import (
	"fmt"
	"math"
	"slices"
	"strings"

	"reticle/cell"
	"reticle/esd"
)

// A Param is one refined parameter.
type Param struct {
	Name  string  // a, b, c, alpha, beta, gamma, zero, displacement or transparency
	Unit  string  // "Å", "°", "° 2θ" or "mm"
	Value float64 // refined value
	ESD   float64 // standard uncertainty
	// Fixed is set for corrections taken from an internal standard
	// rather than refined against the unknown phase's lines.
	Fixed bool
}

// String prints the parameter in crystallographic notation.
func (p Param) String() string {
	return fmt.Sprintf("%s = %s %s", p.Name, esd.Format(p.Value, p.ESD), p.Unit)
}

// A Residual is one line after the refinement.
type Residual struct {
	Observation
	TwoThetaCalc float64 // calculated, corrections included, degrees 2θ
	Delta        float64 // observed − calculated, degrees 2θ
	Sigmas       float64 // Δ/σ with the line's own esd
	Flagged      bool    // |Δ/σ| above the flag limit
}

// A Result is a refined cell with its uncertainties.
type Result struct {
	Cell       cell.Cell
	ESD        cell.ESD
	Covariance cell.Covariance // of the six cell parameters, scaled as the package doc says
	Volume     float64         // Å³
	VolumeESD  float64         // Å³, from the full covariance

	// Corrections are those refined (or, with a standard, fixed by it);
	// their values are read with Zero, Displacement and Transparency.
	Corrections        Corrections
	shifts, shiftESDs  shifts
	Radius, Wavelength float64 // goniometer radius used (mm), Å

	// Params lists the free cell parameters and the corrections, in the
	// order of ParamCovariance and Correlation.
	Params          []Param
	ParamCovariance [][]float64
	Correlation     [][]float64

	Fitted      int     // lines in the fit (unknown phase)
	DOF         int     // Fitted − refined parameters
	Chi2        float64 // Σ (Δ/σ)² over the fitted lines
	Chi2Reduced float64 // Chi2/DOF; zero when DOF = 0
	Scaled      bool    // covariance multiplied by Chi2Reduced
	Scaling     Scaling // the convention applied
	FlagLimit   float64

	Residuals []Residual // every line of the unknown phase, excluded ones too
	Flagged   int        // fitted lines with |Δ/σ| above the limit

	// Selection says how the corrections were chosen, when Options asked
	// for them to be chosen from the data (Auto); nil otherwise.
	Selection *Selection

	// StandardFit describes the internal standard's fit, when one was
	// used.
	StandardFit *StandardFit

	// Unmatched and Overlapped are set by RefineLines: observed lines
	// that match no calculated line, and lines that match both the cell
	// and the internal standard (left out).
	Unmatched, Overlapped []cell.Line

	Warnings []string
}

// Zero, Displacement and Transparency return a correction's value and
// esd (zero when not refined): degrees 2θ, mm and mm.
func (r *Result) Zero() (float64, float64) { return r.shifts[0], r.shiftESDs[0] }

// Displacement returns the sample displacement and its esd in mm.
func (r *Result) Displacement() (float64, float64) { return r.shifts[1], r.shiftESDs[1] }

// Transparency returns the transparency depth and its esd in mm.
func (r *Result) Transparency() (float64, float64) { return r.shifts[2], r.shiftESDs[2] }

// A StandardFit is the correction curve fixed by an internal standard.
type StandardFit struct {
	Standard    Standard
	Residuals   []Residual
	Fitted, DOF int
	Chi2Reduced float64
	Scaled      bool
}

// Param returns the named parameter and whether it is present.
func (r *Result) Param(name string) (Param, bool) {
	for _, p := range r.Params {
		if p.Name == name {
			return p, true
		}
	}
	return Param{}, false
}

// String prints the refined parameters on one line.
func (r *Result) String() string {
	var parts []string
	for _, p := range r.Params {
		parts = append(parts, p.String())
	}
	parts = append(parts, fmt.Sprintf("V = %s Å³", esd.Format(r.Volume, r.VolumeESD)))
	return fmt.Sprintf("%s %s: %s; χ²_red = %.3g over %d lines", r.Cell.System, r.Cell.Centring, strings.Join(parts, ", "), r.Chi2Reduced, r.Fitted)
}

// Position returns the calculated 2θ, degrees, of reflection hkl under the
// refined cell and corrections; NaN beyond 180°.
func (r *Result) Position(h cell.HKL) float64 {
	m := newModel(r.Cell.System, r.Wavelength, r.Radius)
	pt := m.eval(start(r.Cell), h, r.shifts)
	if !pt.inside {
		return math.NaN()
	}
	return pt.tt
}

// clone returns a copy of r that shares no slice with it.
func (r *Result) clone() *Result {
	c := *r
	c.Params = slices.Clone(r.Params)
	c.ParamCovariance = cloneRows(r.ParamCovariance)
	c.Correlation = cloneRows(r.Correlation)
	c.Residuals = slices.Clone(r.Residuals)
	c.Unmatched = slices.Clone(r.Unmatched)
	c.Overlapped = slices.Clone(r.Overlapped)
	c.Warnings = slices.Clone(r.Warnings)
	return &c
}

// cloneRows copies a matrix held as rows.
func cloneRows(m [][]float64) [][]float64 {
	out := make([][]float64, len(m))
	for i, row := range m {
		out[i] = slices.Clone(row)
	}
	return out
}

// ChosenCorrections returns the correction model chosen from the data
// when the corrections were chosen (Auto; the values reported then hold
// every correction compared, averaged over the choice), and the
// corrections refined otherwise.
func (r *Result) ChosenCorrections() Corrections {
	if r.Selection != nil {
		return r.Selection.Chosen
	}
	return r.Corrections
}
