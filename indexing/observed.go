package indexing

import (
	"reticle/cell"

	"math"
	"sort"
)

const deg = math.Pi / 180

// obs is an observed line prepared for the search.
type obs struct {
	tt, esd float64 // degrees 2θ
	tol     float64 // matching window, degrees 2θ
	rel     float64 // intensity relative to the strongest line; −1 unknown
	fwhm    float64 // degrees 2θ; 0 unknown
}

// qOf returns Q = (2 sin θ / λ)² of a line at tt degrees 2θ after
// removing the zero offset z.
func qOf(tt, z, lambda float64) float64 { return cell.QOf(tt-z, lambda) }

// ttOf returns the angle in degrees 2θ of Q, NaN beyond 180°.
func ttOf(q, lambda float64) float64 { return cell.TwoThetaOfQ(q, lambda) }

// dQ returns the Q window that a 2θ window of tol degrees spans at tt:
// dQ = Q cot θ · Δ2θ (radians).
func dQ(tt, tol, lambda float64) float64 {
	q := qOf(tt, 0, lambda)
	return q / math.Tan(tt*deg/2) * tol * deg
}

// prepare sorts lines, drops impossible ones and sets their windows.
func prepare(lines []cell.Line, o Options) []obs {
	out := make([]obs, 0, len(lines))
	top := 0.0
	for _, l := range lines {
		top = math.Max(top, l.Intensity)
	}
	for _, l := range lines {
		if !(l.TwoTheta > 0 && l.TwoTheta < 180) {
			continue
		}
		rel := -1.0
		if top > 0 && l.Intensity > 0 {
			rel = l.Intensity / top
		}
		out = append(out, obs{tt: l.TwoTheta, esd: l.ESD, tol: cell.MatchWindow(o.Tolerance, l.ESD), rel: rel, fwhm: l.FWHM})
	}
	sort.Slice(out, func(i, j int) bool { return out[i].tt < out[j].tt })
	// Lines closer than their window are one line for indexing.
	merged := out[:0]
	for _, l := range out {
		if n := len(merged); n > 0 && l.tt-merged[n-1].tt < 1e-4 {
			continue
		}
		merged = append(merged, l)
	}
	return merged
}
