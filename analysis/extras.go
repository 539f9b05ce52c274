package analysis

import (
	"math"
	"sort"

	"reticle/cell"
	"reticle/refine"
)

// extraLines splits the reflections of one candidate's whole-pattern fit
// (a) by those of another's (b): common are a's reflections within
// commonWidths line widths of one of b's, extras those at least
// extraWidths widths from every one of b's. The reflections between
// are neither: the fit shares their counts with b's neighbouring lines
// by the profile's shape, not by the counts alone. width gives the FWHM
// in degrees at 2θ; both lists are sorted by 2θ.
func extraLines(a, b []refine.PatternReflection, width func(tt float64) float64) (common, extras []refine.PatternReflection) {
	j := 0
	for _, r := range a {
		w := width(r.TwoTheta)
		for j < len(b) && b[j].TwoTheta < r.TwoTheta-extraWidths*w {
			j++
		}
		near := math.Inf(1)
		for k := j; k < len(b) && b[k].TwoTheta <= r.TwoTheta+extraWidths*w; k++ {
			near = math.Min(near, math.Abs(b[k].TwoTheta-r.TwoTheta))
		}
		switch {
		case near <= commonWidths*w:
			common = append(common, r)
		case near >= extraWidths*w:
			extras = append(extras, r)
		}
	}
	return common, extras
}

// Two lines within half a width of each other make one peak on the
// scan (Rayleigh's criterion for two equal profiles: they are resolved
// when a width apart), so a line of one cell within commonWidths of the
// other's is the same observed line; one at least extraWidths from all
// of them is resolved from them, and the counts alone fix its
// intensity.
const (
	commonWidths = 0.5
	extraWidths  = 1.0
)

// picked reports whether a reflection lies within extraWidths line
// widths (width, degrees at 2θ) of a peak of the extraction (a
// companion included). A picked
// peak has been weighed by the line positions already: the cell that
// predicts a line there indexes it, the other counts it as foreign.
func (e *Extraction) picked(rs []refine.PatternReflection, width func(tt float64) float64) bool {
	ps := e.peaks()
	for _, r := range rs {
		w := extraWidths * width(r.TwoTheta)
		for _, p := range ps {
			if math.Abs(p.TwoTheta-r.TwoTheta) < w {
				return true
			}
		}
	}
	return false
}

// foreignRate returns the probability that a foreign line lies within a
// line width of 2θ: the scan's rate of foreign lines per degree times
// two widths (width, degrees at 2θ). The rate is that of the lines the first candidate leaves
// unindexed, (n + 1)/range by Laplace's rule of succession (a scan
// whose lines are all indexed may still hold one foreign line).
func (e *Extraction) foreignRate(unindexed int, width func(tt float64) float64) func(tt float64) float64 {
	x := e.Scan.TwoTheta
	span := x[len(x)-1] - x[0]
	return func(tt float64) float64 {
		if !(span > 0) {
			return 0.5
		}
		return float64(unindexed+1) / span * 2 * width(tt)
	}
}

// placer returns a function that places a cell's reflections on the
// scan as the whole-pattern fit of the first cell (fitted, with its
// reflections fl sorted by 2θ) places its own: the shift the fit's
// corrections (zero shift, specimen displacement) give at each of fl's
// lines, interpolated linearly in 2θ and held beyond the end lines,
// added to the Bragg angle of each reflection. Reflections outside the
// scan's range are left out.
func (e *Extraction) placer(fitted cell.Cell, fl []refine.PatternReflection) func(c cell.Cell) []refine.PatternReflection {
	lambda := e.Result.Radiation.Lambda1
	var at, shift []float64
	for _, r := range fl {
		if len(r.HKL) == 0 {
			continue
		}
		tt := cell.TwoTheta(fitted.D(r.HKL[0]), lambda)
		if math.IsNaN(tt) || (len(at) > 0 && tt <= at[len(at)-1]) {
			continue
		}
		at, shift = append(at, tt), append(shift, r.TwoTheta-tt)
	}
	delta := func(tt float64) float64 {
		switch k := sort.SearchFloat64s(at, tt); {
		case len(at) == 0:
			return 0
		case k == 0:
			return shift[0]
		case k == len(at):
			return shift[len(at)-1]
		default:
			u := (tt - at[k-1]) / (at[k] - at[k-1])
			return shift[k-1] + u*(shift[k]-shift[k-1])
		}
	}
	lo, hi := e.Scan.Range()
	return func(c cell.Cell) []refine.PatternReflection {
		var out []refine.PatternReflection
		for _, r := range cell.Reflections(c, cell.QOf(math.Min(hi+1, 179), lambda)) {
			tt := cell.TwoTheta(r.D, lambda)
			if math.IsNaN(tt) {
				continue
			}
			tt += delta(tt)
			if tt < lo || tt > hi {
				continue
			}
			out = append(out, refine.PatternReflection{HKL: r.HKL, Mult: r.Mult, TwoTheta: tt})
		}
		return out
	}
}
