package analysis

import (
	"context"
	"errors"
	"fmt"
	"math"
	"sort"

	"reticle/cell"
)

// PatternEvidence is a candidate's whole-pattern fit, made when the
// first candidates are close (see weighByPattern).
type PatternEvidence struct {
	Rwp, Rexp, Chi2 float64 // as refine.PatternResult
	Parameters      int
	// LogLikelihood is −½(χ² + P ln N) of the fit, χ² scaled as the
	// ranking scales it: Schwarz's criterion (BIC) as a log evidence.
	LogLikelihood float64
	// Prior is the candidate's probability from the line positions
	// alone, before the fit entered it.
	Prior float64
	Err   string  // why the fit failed; the candidate then keeps its prior
	chi2  float64 // Σ w(y − c)²
}

// Evidence of the whole pattern: the candidates whose probability from
// the line positions is at least evidenceShare of the first's, at most
// evidenceCount of them, are fitted when there are two or more. A
// candidate a hundred times less likely than the first needs a fit
// e^4.6 times more likely to overtake it, which a Pawley fit of the same
// lines seldom gives; and each fit costs as much as the rest of the
// analysis, so four bound the time to a few fits (the ranking's first
// four hold the alternatives the lines leave open: a centred cell, its
// primitive one, a supercell and a higher metric).
const (
	evidenceShare = 0.01
	evidenceCount = 4
)

// weighByPattern fits each of the close first candidates to every point
// of the scan (Pawley's method, FitPattern) and lets the fits enter
// their probabilities. The line positions alone cannot tell apart cells
// that index the same lines equally well (a centred cell and its
// primitive one, a cell and a supercell that only adds weak or absent
// lines, a metric near a higher one); the whole pattern can, since it
// holds every count, the lines the cells predict where the scan shows
// nothing, and the split of overlapping lines.
//
// Each fit gives a log evidence by Schwarz's criterion (1978),
// −½(χ² + P ln N) for P parameters and N points, which charges a cell
// for every intensity it adds. The χ² are divided by the best fit's
// χ²_red when that exceeds 1: a profile model short of the truth
// inflates every χ² alike, and the differences with it. A candidate's
// probability becomes its prior (from the line positions) times the
// likelihood of its fit, normalised so that the fitted candidates keep
// the share of probability they had together. Candidates are reordered
// by the new probabilities; a failed fit leaves a candidate its prior.
func weighByPattern(ctx context.Context, a *Analysis, e *Extraction, s Settings) error {
	if len(a.Candidates) < 2 {
		return nil
	}
	best := a.Candidates[0].Probability
	var idx []int
	for i, c := range a.Candidates {
		if i < evidenceCount && c.Probability >= evidenceShare*best && c.Probability > 0 {
			idx = append(idx, i)
		}
	}
	if len(idx) < 2 {
		return nil
	}
	n := float64(e.Scan.Len())
	minRed := math.Inf(1)
	for _, i := range idx {
		c := &a.Candidates[i]
		ev := &PatternEvidence{Prior: c.Probability}
		c.Evidence = ev
		pf, err := FitPattern(ctx, e, []cell.Cell{c.Cell()}, s, nil)
		if err != nil {
			if errors.Is(err, context.Canceled) || errors.Is(err, context.DeadlineExceeded) {
				return err
			}
			ev.Err = err.Error()
			continue
		}
		f := pf.Fit
		ev.Rwp, ev.Rexp, ev.Chi2, ev.Parameters = f.Rwp, f.Rexp, f.Chi2, f.Parameters
		ev.chi2 = f.Chi2 * float64(f.Points-f.Parameters)
		minRed = math.Min(minRed, f.Chi2)
	}
	if math.IsInf(minRed, 1) {
		return nil // no fit succeeded: the priors stand
	}
	// The fitted candidates' posteriors share the probability they had
	// together; the failed keep their priors.
	scale := math.Max(minRed, 1)
	top := math.Inf(-1)
	var mass float64
	for _, i := range idx {
		ev := a.Candidates[i].Evidence
		if ev.Err != "" {
			continue
		}
		mass += ev.Prior
		ev.LogLikelihood = -0.5 * (ev.chi2/scale + float64(ev.Parameters)*math.Log(n))
		top = math.Max(top, ev.LogLikelihood+math.Log(ev.Prior))
	}
	var sum float64
	for _, i := range idx {
		if ev := a.Candidates[i].Evidence; ev.Err == "" {
			a.Candidates[i].Probability = math.Exp(ev.LogLikelihood + math.Log(ev.Prior) - top)
			sum += a.Candidates[i].Probability
		}
	}
	for _, i := range idx {
		if a.Candidates[i].Evidence.Err == "" {
			a.Candidates[i].Probability *= mass / sum
		}
	}
	first := a.Candidates[0].Cell()
	sort.SliceStable(a.Candidates, func(x, y int) bool { return a.Candidates[x].Probability > a.Candidates[y].Probability })
	for i := range a.Candidates {
		a.Candidates[i].Rank = i + 1
	}
	if now := a.Candidates[0].Cell(); now != first {
		a.Warnings = append(a.Warnings, fmt.Sprintf("the whole-pattern fits of the %d closest candidates put %s first (the line positions alone put %s first)", len(idx), now, first))
	}
	return nil
}
