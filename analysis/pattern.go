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
	// Texts are the phases' cells as given, the main phase first.
	Texts []string
	Start *refine.Result // the main cell refined on the peak positions; nil when that failed
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
// they fix them, otherwise chosen as the body explains. A whole-pattern
// fit only
// converges from cells whose lines already fall within a width or two of
// their peaks.
func FitPattern(ctx context.Context, e *Extraction, cells []cell.Cell, s Settings, progress Progress) (*PatternFit, error) {
	return fitPattern(ctx, e, cells, s, progress, 0)
}

// fitPattern is FitPattern with a bound on the iterations of each of the
// fit's stages (refine.PatternOptions.MaxIter; zero: the fitter's).
func fitPattern(ctx context.Context, e *Extraction, cells []cell.Cell, s Settings, progress Progress, maxIter int) (*PatternFit, error) {
	if len(cells) == 0 {
		return nil, fmt.Errorf("%s: whole-pattern fit: no cell", e.Scan.Path)
	}
	// When the peaks cannot refine the main cell (too few lines match
	// it, e.g. under a large zero shift), the fit starts from the cell
	// as given: its broadened stages draw in a cell whose lines miss
	// their peaks by a few widths.
	start, startErr := RefineCell(ctx, e, cells[0], s)
	if ctx.Err() != nil {
		return nil, ctx.Err()
	}
	first := cells[0]
	res := s.Resolved(e.Scan)
	radius := res.Radius
	corr := refine.Zero | refine.Displacement
	if startErr == nil {
		first, radius = start.Cell, start.Radius
		// The corrections: as the settings fix them; when the
		// settings leave the choice to the data, the zero shift, which
		// every point of the pattern measures (common practice), and
		// the displacement too when the peaks could refine both. Up
		// to about 110° 2θ the zero shift and the displacement move
		// the lines almost alike, so a fit with one of them keeps the
		// cell that the other's share biases, with an esd far below
		// that bias (BENCHMARKS.md); with both, the esd holds the
		// uncertainty of the split. When the peaks found the pair
		// implausible (over a short range of angles the two and the
		// cell are one direction), the zero shift alone is refined.
		corr = start.Corrections
		if sel := start.Selection; sel != nil {
			corr = refine.Zero
			for _, m := range sel.Models {
				if m.Corrections == refine.Zero|refine.Displacement && m.Err == "" {
					corr = m.Corrections
				}
			}
		}
	} else if c := res.Corrections; c != nil && !c.Has(refine.Auto) {
		corr = *c
	}
	sc := e.Scan
	sig := make([]float64, sc.Len())
	for i := range sig {
		sig[i] = sc.Sigma(i)
	}
	rad := e.Result.Radiation
	opt := refine.PatternOptions{Lambda1: rad.Lambda1, Radius: radius, Corrections: corr,
		Width: e.Result.FWHMCurve, Eta: e.Result.Eta, Asymmetry: e.Result.Asymmetry, Tail: e.Result.TailRatio,
		Progress: progress.of(StagePattern), MaxIter: maxIter}
	if rad.Doublet() {
		opt.Lambda2, opt.Ratio2 = rad.Lambda2, rad.Ratio2
	}
	phases := append([]cell.Cell{first}, cells[1:]...)
	fit, err := refine.FitPhases(ctx, phases, sc.TwoTheta, sc.Intensity, sig, opt)
	if err != nil && ctx.Err() == nil && startErr == nil && start.Selection != nil && corr != start.Corrections {
		// Over a short range of angles the pattern may not hold the
		// shifts apart from the cell, which then leaves its start:
		// the model the peaks chose is taken instead.
		opt.Corrections = start.Corrections
		var again error
		if fit, again = refine.FitPhases(ctx, phases, sc.TwoTheta, sc.Intensity, sig, opt); again == nil {
			fit.Warnings = append(fit.Warnings, fmt.Sprintf("with corrections %s the fit failed (%v); the corrections the peaks chose, %s, were refined instead", corr, err, start.Corrections))
		}
		err = again
	}
	if err != nil {
		if startErr != nil {
			return nil, fmt.Errorf("%s: %w (the peaks could not refine the cell either: %w)", sc.Path, err, startErr)
		}
		return nil, fmt.Errorf("%s: %w", sc.Path, err)
	}
	if startErr != nil {
		fit.Warnings = append(fit.Warnings, fmt.Sprintf("the fit started from the cell as given: the peaks could not refine it (%v)", startErr))
		start = nil
	}
	texts := make([]string, len(cells))
	for i, c := range cells {
		texts[i] = c.String()
	}
	return &PatternFit{Texts: texts, Start: start, Fit: fit, Unexplained: unexplained(e, fit, s)}, nil
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
