package analysis

import (
	"context"
	"errors"
	"fmt"
	"math"

	"reticle/cell"
	"reticle/refine"
)

// MaxPolishLines and MaxPolishWork bound the scans whose first cell is
// refined on the whole pattern (polish). A Pawley fit refines one
// intensity per calculated line: solving its normal equations costs
// about the cube of the lines (a triclinic cell of 992 lines took 38 s
// on one core, one of 683 lines 2.5 s), and evaluating the profile
// about the points times the lines (5,200 points and 418 lines, 0.1 s an
// iteration). Beyond either bound the cell stays the one refined on the
// peak positions, and the output says why (BENCHMARKS.md, "The first
// cell from the whole pattern").
const (
	MaxPolishLines = 700
	MaxPolishWork  = 4e6 // points × calculated lines
)

// polishIter bounds the iterations of each stage of the whole-pattern
// fit in polish. The fit starts from the cell refined on the peak
// positions, whose lines sit within a width of their peaks; on the
// benchmark sets such fits converged within 40 iterations but for one
// whose cell was wrong (BENCHMARKS.md), and one that has not converged
// by then is wandering and would not be kept.
const polishIter = 40

// polishMove is the largest relative change of the reduced metric that
// polish accepts from the whole-pattern fit: 1 % in the metric, half a
// per cent in d, moves the lines by about their width (0.17° at 60°
// 2θ); a fit that moved them further has left the lines the candidate
// was ranked on.
const polishMove = 1e-2

// polish refines the first candidate's cell on every point of the scan
// (Pawley's method, FitPattern) and keeps the whole pattern's cell for
// the candidate when that fit converged, stayed on the candidate's
// lattice, did not cross a higher metric from which the peak positions
// measured the cell's departure (crossed), and gives the volume no less
// precisely than the peak positions.
//
// Both estimates come from the same counts. The peak positions lose
// information where lines overlap: a split that the peak search cannot
// resolve (two lines under one maximum, as in a cell of nearly higher
// metric) gives one position between the two, and the cell refined on
// it is biased by a fraction of the split, with positions that may still
// fit it within their esds once a zero shift takes up the rest. The
// whole pattern fits the overlapping lines apart, each count weighted by
// its counting error (Pawley 1981). Where the lines are resolved, the
// two estimates are about equally accurate (BENCHMARKS.md, "The first
// cell from the whole pattern"). The whole pattern's is not kept when
// its volume esd exceeds the positions': its zero shift and specimen
// displacement, which move the lines almost alike below about 110° 2θ,
// then drift together and the esd grows with their correlation; the
// estimate of smaller variance is the one kept (common practice).
func polish(ctx context.Context, a *Analysis, e *Extraction, s Settings) error {
	if len(a.Candidates) == 0 {
		return nil
	}
	c := &a.Candidates[0]
	if c.Refined == nil {
		return nil
	}
	r := c.Refined
	pf, note, err := a.firstFit(ctx, e, s, r)
	if err != nil {
		return err
	}
	if pf == nil {
		c.PolishNote = note
		return nil
	}
	ph := pf.Fit.Phases[0]
	ve, ve0 := ph.VolumeESD, r.VolumeESD
	switch {
	case !pf.Fit.Converged:
		c.PolishNote = fmt.Sprintf("the whole-pattern fit did not converge in %d iterations; the cell is the one refined on the peak positions", polishIter)
	case !(ve > 0) || math.IsInf(ve, 0):
		c.PolishNote = "the whole-pattern fit gave no esd of the volume; the cell is the one refined on the peak positions"
	case !cell.SameLattice(ph.Cell, r.Cell, polishMove):
		c.PolishNote = "the whole-pattern fit moved the cell off its lines; the cell is the one refined on the peak positions"
	case crossed(r.Cell, r.ESD, ph.Cell):
		c.PolishNote = "the whole-pattern fit moved the cell across the higher metric from which the peak positions measured its departure; the cell is the one refined on the peak positions"
	case !(ve <= ve0):
		c.PolishNote = fmt.Sprintf("the cell is the one refined on the peak positions: its volume esd, %.3g Å³, is below the whole pattern's, %.3g Å³", ve0, ve)
	default:
		c.Pattern = pf
		c.PolishNote = fmt.Sprintf("the cell is refined on the whole pattern (Rwp %.2f %%, GoF %.2f): its volume esd, %.3g Å³, is no larger than the peak positions', %.3g Å³", 100*pf.Fit.Rwp, pf.Fit.GoF, ve, ve0)
	}
	return nil
}

// A fitOf is the whole-pattern fit of one refined cell (firstFit).
type fitOf struct {
	of   *refine.Result
	pf   *PatternFit
	note string
}

// firstFit returns the whole-pattern fit polish makes of the cell
// refined as r, or nil and why not (the bounds, or the fit's failure);
// the error is the context's only. The fit is kept with the analysis,
// so that the evidence of the pattern (weighByPattern) and polish make
// it once.
func (a *Analysis) firstFit(ctx context.Context, e *Extraction, s Settings, r *refine.Result) (*PatternFit, string, error) {
	if a.fit != nil && a.fit.of == r {
		return a.fit.pf, a.fit.note, nil
	}
	pf, note, err := boundedFit(ctx, e, s, r)
	if err != nil {
		return nil, "", err
	}
	a.fit = &fitOf{of: r, pf: pf, note: note}
	return pf, note, nil
}

// boundedFit returns the whole-pattern fit of the cell refined as r
// within polish's bounds (MaxPolishLines, MaxPolishWork, polishIter), or
// nil and why not; the error is the context's only.
func boundedFit(ctx context.Context, e *Extraction, s Settings, r *refine.Result) (*PatternFit, string, error) {
	_, hi := e.Scan.Range()
	n, m := len(cell.Reflections(r.Cell, cell.QOf(hi, e.Result.Radiation.Lambda1))), e.Scan.Len()
	if n > MaxPolishLines || float64(n)*float64(m) > MaxPolishWork {
		return nil, fmt.Sprintf("not refined on the whole pattern: %d calculated lines over %d points (the bounds are %d lines and %.0e points × lines)", n, m, MaxPolishLines, MaxPolishWork), nil
	}
	// fitPattern refines the cell on the peaks again, every peak matched
	// to it (RefineCell), rather than starting from r, the refinement on
	// the lines the search indexed: that start let one public-low fit
	// converge that did not from r (BENCHMARKS.md).
	pf, err := fitPattern(ctx, e, []cell.Cell{r.Cell}, s, nil, polishIter)
	if err != nil {
		if errors.Is(err, context.Canceled) || errors.Is(err, context.DeadlineExceeded) {
			return nil, "", err
		}
		return nil, fmt.Sprintf("the whole-pattern fit failed: %v", err), nil
	}
	return pf, "", nil
}
