package refine

import (
	"fmt"
	"math"
	"strings"

	"reticle/indexing"
	"reticle/peaks"
)

// A Param is one refined parameter.
type Param struct {
	Name  string  // "a", "b", "c", "zero" or "displacement"
	Unit  string  // "Å", "° 2θ" or "mm"
	Value float64 // refined value
	ESD   float64 // standard uncertainty
	// Fixed is set for corrections taken from an internal standard
	// rather than refined against the unknown phase's lines.
	Fixed bool
}

// String prints the parameter in crystallographic notation.
func (p Param) String() string {
	return fmt.Sprintf("%s = %s %s", p.Name, peaks.FormatESD(p.Value, p.ESD), p.Unit)
}

// A Residual is one line after the refinement.
type Residual struct {
	Observation
	TwoThetaCalc float64 // calculated, corrections included, degrees 2θ
	Delta        float64 // observed − calculated, degrees 2θ
	Norm         float64 // Δ/σ with the line's own esd
	Flagged      bool    // |Δ/σ| above the flag limit
}

// CellESD holds the standard uncertainties of a cell's edges (Å) and
// angles (degrees); fixed angles have zero uncertainty.
type CellESD = indexing.CellESD

// A Result is a refined cell with its uncertainties.
type Result struct {
	Cell      indexing.Cell
	CellESD   CellESD
	Volume    float64 // Å³
	VolumeESD float64 // Å³

	Zero, ZeroESD                    float64 // degrees 2θ; zero when not refined
	Displacement, DisplacementESD    float64 // mm; zero when not refined
	ZeroRefined, DisplacementRefined bool
	Radius                           float64 // goniometer radius used, mm
	Wavelength                       float64 // Å

	// Params lists the parameters in the order of Covariance and
	// Correlation.
	Params      []Param
	Covariance  [][]float64 // scaled as the package doc says
	Correlation [][]float64

	N           int     // lines in the fit (unknown phase)
	DOF         int     // N − refined parameters
	Chi2        float64 // Σ (Δ/σ)² over the fitted lines
	Chi2Reduced float64 // Chi2/DOF; zero when DOF = 0
	Scaled      bool    // covariance multiplied by Chi2Reduced
	Scaling     Scaling // the convention applied
	FlagLimit   float64

	Residuals []Residual // every line of the unknown phase, excluded ones too
	Flagged   int        // fitted lines with |Δ/σ| above the limit

	// StandardFit describes the internal standard's fit, when one was
	// used.
	StandardFit *StandardFit

	// Unmatched and Overlapped are set by RefineLines: observed lines
	// that match no calculated line, and lines that match both the cell
	// and the internal standard (left out).
	Unmatched, Overlapped []indexing.Line

	Warnings []string
}

// A StandardFit is the correction curve fixed by an internal standard.
type StandardFit struct {
	Standard    Standard
	Residuals   []Residual
	N, DOF      int
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
	parts = append(parts, fmt.Sprintf("V = %s Å³", peaks.FormatESD(r.Volume, r.VolumeESD)))
	return fmt.Sprintf("%s %s: %s; χ²_red = %.3g over %d lines", r.Cell.System, r.Cell.Centring, strings.Join(parts, ", "), r.Chi2Reduced, r.N)
}

// Position returns the calculated 2θ, degrees, of reflection hkl under the
// refined cell and corrections; NaN beyond 180°.
func (r *Result) Position(hkl indexing.HKL) float64 {
	pt := eval(r.Cell.System, cellValues(r.Cell), hkl, r.Wavelength, r.Zero, r.Displacement, r.Radius)
	if !pt.inside {
		return math.NaN()
	}
	return pt.tt
}
