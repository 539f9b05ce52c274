package analysis

import (
	"context"
	"fmt"

	"reticle/cell"
	"reticle/refine"
)

// A PatternFit is a whole-pattern fit of a cell with the peak refinement
// it started from.
type PatternFit struct {
	Start *refine.Result // the cell refined on the peak positions
	Fit   *refine.PatternResult
}

// FitPattern fits every point of the scan with the cell c (Pawley's
// method, refine.FitPattern). It starts from the cell refined on the
// extraction's lines (RefineCell) and from the width law and mixing the
// extraction measured; the corrections are the settings' when they fix
// them, otherwise both shifts. A
// whole-pattern fit only converges from a cell whose lines already fall
// within a width or two of their peaks.
func FitPattern(ctx context.Context, e *Extraction, c cell.Cell, s Settings) (*PatternFit, error) {
	start, err := RefineCell(ctx, e, c, s)
	if err != nil {
		return nil, err
	}
	sc := e.Scan
	sig := make([]float64, sc.Len())
	for i := range sig {
		sig[i] = sc.Sigma(i)
	}
	rad := e.Result.Radiation
	// The corrections: as the settings fix them; when the settings
	// leave the choice to the data, both shifts are refined. Up to
	// about 110° 2θ the zero shift and the displacement move the lines
	// almost alike, so a fit with one of them keeps the cell that the
	// other's share biases, with an esd far below that bias
	// (BENCHMARKS.md); with both, the esd holds the uncertainty of the
	// split.
	corr := start.Corrections
	if start.Selection != nil {
		corr = refine.Zero | refine.Displacement
	}
	opt := refine.PatternOptions{Lambda1: rad.Lambda1, Radius: start.Radius, Corrections: corr,
		Width: e.Result.FWHMCurve, Eta: e.Result.Eta}
	if rad.Doublet() {
		opt.Lambda2, opt.Ratio2 = rad.Lambda2, rad.Ratio2
	}
	fit, err := refine.FitPattern(ctx, start.Cell, sc.TwoTheta, sc.Intensity, sig, opt)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", sc.Path, err)
	}
	return &PatternFit{Start: start, Fit: fit}, nil
}
