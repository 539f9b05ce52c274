package analysis

import (
	"context"
	"fmt"
	"math"
	"sort"

	"reticle/refine"
)

// PatternEvidence is what the whole pattern said of a candidate when the
// first candidates were close (see weighByPattern).
type PatternEvidence struct {
	// Rwp, Rexp, Chi2 and Parameters are those of the candidate's
	// whole-pattern fit (as refine.PatternResult); zero when it has
	// none (Err says why).
	Rwp, Rexp, Chi2 float64
	Parameters      int
	// Reference marks the first candidate by the line positions, the
	// one the others were weighed against on its fit.
	Reference bool
	// Compared reports that the candidate was weighed against the first
	// by the lines that tell them apart; LogBayes is then the natural
	// log of the Bayes factor of the candidate over the first (zero for
	// the first).
	Compared bool
	LogBayes float64
	// Split reports that the two cells' lines coincide within the
	// widths, one's lines splittings of the other's: LogBayes is then
	// from the two fits' χ² (profileEvidence), not from extra lines.
	Split bool
	// Extra are the candidate's lines resolved from every line of the
	// first, and Missing the first's lines resolved from every line of
	// the candidate: the lines that tell the two apart, measured.
	Extra, Missing int
	// Prior is the candidate's probability from the line positions
	// alone, before the pattern entered it.
	Prior float64
	Err   string // why the candidate has no fit (the first's: the priors then stand)
}

// The close candidates: those whose probability from the line positions
// is at least evidenceShare of the first's, at most evidenceCount of
// them, when there are two or more. One a thousand times less likely
// than the first needs a Bayes factor of e^6.9 to overtake it, more than
// a handful of weak lines give; and the ranking's first four hold the
// alternatives the lines leave open (a centred cell, its primitive one,
// a supercell and a subcell).
const (
	evidenceShare = 0.001
	evidenceCount = 4
)

// weighByPattern lets the whole pattern enter the probabilities of the
// close first candidates. The line positions alone cannot tell apart
// cells that index the same picked lines (a centred cell and its
// primitive one, a cell and a supercell whose further lines are too weak
// to be picked as peaks); the whole pattern holds the counts at every
// line a cell predicts, picked or not.
//
// The first candidate is fitted to every point of the scan (Pawley's
// method, the fit polish keeps; firstFit). Each other close candidate's
// lines are placed on the scan as the fit places the first's (placer),
// and the two cells' extra lines, those each predicts where the other
// has none (extraLines), are measured on the fit's residual: the
// candidate's as they stand, the first's with their fitted intensity
// added back (lineMeter). Only the extra lines tell the cells apart: a
// free intensity per line fits the shared ones equally for both, so
// the fits' χ² say little, and a criterion charging each intensity
// (Schwarz's) penalises the weak lines that tell a primitive cell from a
// centred one. The Bayes factor of the candidate over the first is
// exp(presence(its extras) − presence(the first's extras)), from the
// measured intensities, their esds scaled by the scatter of the
// negative ones (noiseScale).
//
// A candidate is not weighed when an extra line of either lies at a
// picked peak (the line positions weighed that peak already), or when
// the two do not describe the same pattern (the first's shared lines
// hold less than half of its intensity, or the candidate's extra lines
// more than the shared ones). A weighed candidate's probability becomes
// its prior (from the line positions) times its Bayes factor,
// normalised so that the weighed candidates keep the share of
// probability they had together; candidates are reordered by the new
// probabilities, and the output says so when the first changes.
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
	first := &a.Candidates[idx[0]]
	if first.Refined == nil {
		return nil
	}
	pf, note, err := a.firstFit(ctx, e, s, first.Refined)
	if err != nil {
		return err
	}
	fev := &PatternEvidence{Prior: first.Probability, Err: note, Reference: true}
	first.Evidence = fev
	if pf == nil {
		return nil // no fit to weigh by: the priors stand
	}
	if len(pf.Fit.Phases) == 0 {
		fev.Err = "the fit returned no phase"
		return nil
	}
	f := pf.Fit
	fev.Rwp, fev.Rexp, fev.Chi2, fev.Parameters = f.Rwp, f.Rexp, f.Chi2, f.Parameters
	fl := append([]refine.PatternReflection(nil), f.Phases[0].Reflections...)
	sort.Slice(fl, func(x, y int) bool { return fl[x].TwoTheta < fl[y].TwoTheta })
	width := e.widths()
	meter := newLineMeter(e, f.Calc, width)
	place := e.placer(f.Phases[0].Cell, fl)
	foreign := e.foreignRate(first.Unindexed, width)
	fev.Compared = true
	group := []int{idx[0]}
	mass := first.Probability
	for _, i := range idx[1:] {
		c := &a.Candidates[i]
		ev := &PatternEvidence{Prior: c.Probability}
		c.Evidence = ev
		cl := place(c.Cell())
		_, xc := extraLines(cl, fl, width)
		cf, xf := extraLines(fl, cl, width)
		if e.picked(xc, width) || e.picked(xf, width) {
			continue // the line positions decide between them
		}
		// Neither has a line the other lacks: one cell's lines are
		// splittings, within the widths, of the other's.
		split := len(xc) == 0 && len(xf) == 0
		xc = meter.measure(xc, false)
		xf = meter.measure(xf, true)
		// The two must describe the same pattern: the first's shared
		// lines hold most of its intensity, and the candidate's extra
		// lines less than the shared ones.
		if !mostlyShared(cf, fl) || sumPositive(xc) > sumIntensity(cf) {
			continue
		}
		k := noiseScale(append(append([]refine.PatternReflection(nil), xc...), xf...))
		xc, xf = scaled(xc, k), scaled(xf, k)
		ev.Extra, ev.Missing = len(xc), len(xf)
		mean := meanIntensity(cf)
		ev.LogBayes = presence(xc, mean, foreign) - presence(xf, mean, foreign)
		ev.Compared = true
		group = append(group, i)
		mass += ev.Prior
		// The candidate's own fit, for the user to compare with the
		// first's (its extra lines were measured on the first's).
		if c.Refined != nil {
			own, note, err := boundedFit(ctx, e, s, c.Refined)
			if err != nil {
				return err
			}
			if own != nil {
				ev.Rwp, ev.Rexp, ev.Chi2, ev.Parameters = own.Fit.Rwp, own.Fit.Rexp, own.Fit.Chi2, own.Fit.Parameters
				if split {
					ev.LogBayes, ev.Split = profileEvidence(*f, *own.Fit), true
				}
			} else {
				ev.Err = note
			}
		}
	}
	if len(group) < 2 {
		return nil
	}
	var sum float64
	top := math.Inf(-1)
	for _, i := range group {
		ev := a.Candidates[i].Evidence
		top = math.Max(top, ev.LogBayes+math.Log(ev.Prior))
	}
	for _, i := range group {
		ev := a.Candidates[i].Evidence
		a.Candidates[i].Probability = math.Exp(ev.LogBayes + math.Log(ev.Prior) - top)
		sum += a.Candidates[i].Probability
	}
	for _, i := range group {
		a.Candidates[i].Probability *= mass / sum
	}
	was := a.Candidates[0].Cell()
	sort.SliceStable(a.Candidates, func(x, y int) bool { return a.Candidates[x].Probability > a.Candidates[y].Probability })
	for i := range a.Candidates {
		a.Candidates[i].Rank = i + 1
	}
	if now := a.Candidates[0].Cell(); now != was {
		why := "the weak lines that tell it from %s (the first by the line positions alone) favour it"
		if ev := a.Candidates[0].Evidence; ev != nil && ev.Split {
			why = "its lines, splittings within their widths of those of %s (the first by the line positions alone), fit the profile better by more than their extra parameters explain"
		}
		a.Warnings = append(a.Warnings, fmt.Sprintf("the whole pattern puts %s first: "+why, now, was))
	}
	return nil
}

// profileEvidence is the log Bayes factor of a candidate's whole-pattern
// fit c over the first's, f, when the two cells predict the same lines
// within the widths (one a metric distortion of the other, its lines
// splittings of the other's): there are no extra lines to measure, and
// what tells the cells apart is how the profile fits, each split
// component's intensity a parameter of its own. By Schwarz's criterion
// (Ann. Stat. 6 (1978) 461), ln B ≈ −Δχ²/2 − ΔP·ln N/2, N the points and
// P the parameters; χ² is scaled by the smaller of the two fits'
// reduced χ² when above 1, as an F-test scales it by the better fit's
// (Hamilton, Acta Cryst. 18 (1965) 502), so that a profile model short
// of the truth, whose misfit grows with the signal, does not pass for a
// splitting. Zero when either fit stopped before converging, or the
// fits are over different points.
func profileEvidence(f, c refine.PatternResult) float64 {
	if !f.Converged || !c.Converged || f.Points != c.Points || f.Points <= max(f.Parameters, c.Parameters) {
		return 0
	}
	s2 := math.Max(1, math.Min(f.Chi2, c.Chi2))
	xf := f.Chi2 * float64(f.Points-f.Parameters)
	xc := c.Chi2 * float64(c.Points-c.Parameters)
	return -(xc-xf)/(2*s2) - float64(c.Parameters-f.Parameters)/2*math.Log(float64(f.Points))
}

// mostlyShared reports whether the lines in common hold more than half
// of the fit's intensity in all: the two cells then describe the same
// pattern and differ in its weaker lines.
func mostlyShared(common, all []refine.PatternReflection) bool {
	return sumIntensity(common) > 0.5*sumIntensity(all)
}

func sumIntensity(rs []refine.PatternReflection) float64 {
	var s float64
	for _, r := range rs {
		s += r.Intensity
	}
	return s
}

// meanIntensity is the mean intensity of the reflections.
func meanIntensity(rs []refine.PatternReflection) float64 {
	if len(rs) == 0 {
		return 0
	}
	return sumIntensity(rs) / float64(len(rs))
}

// sumPositive is the sum of the reflections' intensities above zero.
func sumPositive(rs []refine.PatternReflection) float64 {
	var s float64
	for _, r := range rs {
		s += math.Max(r.Intensity, 0)
	}
	return s
}

// presence is the evidence of the whole pattern that the extra lines of
// a cell are present: classEvidence's ln K when positive, else zero.
// The ranking by line positions has already charged each cell for the
// lines it predicts where the peak search found none (indexing's
// likelihood, after de Wolff 1968); what the pattern adds is that such
// lines, too weak to be picked, are there after all. Its evidence of
// their absence would count the same missing lines twice.
func presence(extras []refine.PatternReflection, mean float64, foreign func(float64) float64) float64 {
	return math.Max(0, classEvidence(extras, mean, foreign))
}
