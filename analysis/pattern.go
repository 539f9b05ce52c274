package analysis

import (
	"context"
	"fmt"
	"math"

	"reticle/cell"
	"reticle/refine"
)

// A PatternFit is a whole-pattern fit of one or more phases with the
// peak refinement of the main phase it started from.
type PatternFit struct {
	Start *refine.Result // the main cell refined on the peak positions
	Fit   *refine.PatternResult
	// Unexplained are the fitted lines of the scan (companions and
	// rejected lines left out) that no phase explains: no reflection
	// with an intensity above twice its esd lies within the matching
	// window of the line (refine.Matching.Window). A further phase may
	// index them.
	Unexplained []UnexplainedLine
}

// An UnexplainedLine is a line of the scan that no fitted phase explains.
type UnexplainedLine struct {
	TwoTheta float64 // degrees
	Height   float64 // counts above the background
}

// FitPattern fits every point of the scan with the cells, the first the
// main phase (Pawley's method, refine.FitPhases). The main cell starts
// as refined on the extraction's lines (RefineCell); further cells (an
// internal standard, a known impurity, another candidate) start as
// given. The profile starts from the width law, mixing, asymmetry and
// tail the extraction measured; the corrections are the settings' when
// they fix them, otherwise both shifts. A whole-pattern fit only
// converges from cells whose lines already fall within a width or two of
// their peaks.
func FitPattern(ctx context.Context, e *Extraction, cells []cell.Cell, s Settings) (*PatternFit, error) {
	if len(cells) == 0 {
		return nil, fmt.Errorf("%s: whole-pattern fit: no cell", e.Scan.Path)
	}
	start, err := RefineCell(ctx, e, cells[0], s)
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
		Width: e.Result.FWHMCurve, Eta: e.Result.Eta, Asymmetry: e.Result.Asymmetry, Tail: e.Result.TailRatio}
	if rad.Doublet() {
		opt.Lambda2, opt.Ratio2 = rad.Lambda2, rad.Ratio2
	}
	phases := append([]cell.Cell{start.Cell}, cells[1:]...)
	fit, err := refine.FitPhases(ctx, phases, sc.TwoTheta, sc.Intensity, sig, opt)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", sc.Path, err)
	}
	return &PatternFit{Start: start, Fit: fit, Unexplained: unexplained(e, fit, s)}, nil
}

// unexplained returns the extraction's lines that no phase of the fit
// explains.
func unexplained(e *Extraction, fit *refine.PatternResult, s Settings) []UnexplainedLine {
	m := refine.Matching{Tolerance: s.Tolerance}
	var out []UnexplainedLine
	for _, p := range e.peaks() {
		if p.Companion() || within(p.TwoTheta, s.Rejected) {
			continue
		}
		w := m.Window(e.Result.LineESD(p))
		explained := false
		for _, ph := range fit.Phases {
			for _, r := range ph.Reflections {
				if math.Abs(r.TwoTheta-p.TwoTheta) <= w && r.Intensity > 2*r.IntensityESD {
					explained = true
					break
				}
			}
		}
		if !explained {
			out = append(out, UnexplainedLine{TwoTheta: p.TwoTheta, Height: p.Height})
		}
	}
	return out
}
