package cell

import "math"

// This file is the program's one statement of Bragg's law, λ = 2d sin θ.

// DSpacing returns the d-spacing in Å of a reflection at twoTheta degrees
// for wavelength lambda Å. It returns NaN outside 0 < 2θ < 180.
func DSpacing(twoTheta, lambda float64) float64 {
	if !(twoTheta > 0 && twoTheta < 180) {
		return math.NaN()
	}
	return lambda / (2 * math.Sin(twoTheta*deg/2))
}

// TwoTheta returns the angle in degrees 2θ of a d-spacing d Å for
// wavelength lambda Å, NaN when λ > 2d (no reflection).
func TwoTheta(d, lambda float64) float64 {
	s := lambda / (2 * d)
	if !(s > 0 && s <= 1) {
		return math.NaN()
	}
	return 2 * math.Asin(s) / deg
}

// DSpacingESD returns d and its standard uncertainty from 2θ ± s2θ
// (degrees) and λ ± sλ (Å), propagated to first order:
// σd² = (d/λ · sλ)² + (d cot θ · s2θ/2 in radians)².
func DSpacingESD(twoTheta, s2θ, lambda, sλ float64) (d, sd float64) {
	d = DSpacing(twoTheta, lambda)
	th := twoTheta * deg / 2
	return d, math.Hypot(d/lambda*sλ, d/math.Tan(th)*s2θ*deg/2)
}

// TwoThetaESD returns 2θ and its standard uncertainty in degrees from
// d ± sd and λ ± sλ: σ2θ = 2 tan θ · √((sd/d)² + (sλ/λ)²) in radians.
func TwoThetaESD(d, sd, lambda, sλ float64) (tt, stt float64) {
	tt = TwoTheta(d, lambda)
	return tt, 2 * math.Tan(tt*deg/2) * math.Hypot(sd/d, sλ/lambda) / deg
}

// QOf returns Q = 1/d² in Å⁻² of a line at twoTheta degrees.
func QOf(twoTheta, lambda float64) float64 {
	s := 2 * math.Sin(twoTheta*deg/2) / lambda
	return s * s
}

// TwoThetaOfQ returns the angle in degrees 2θ of Q = 1/d² Å⁻², NaN beyond
// 180°.
func TwoThetaOfQ(q, lambda float64) float64 {
	return TwoTheta(1/math.Sqrt(q), lambda)
}

// DTwoThetaDQ returns d(2θ)/dQ in degrees per Å⁻² at Q: 2θ = 2 asin(λ√Q/2)
// gives λ/(2√Q·cos θ) radians.
func DTwoThetaDQ(q, lambda float64) float64 {
	s := lambda * math.Sqrt(q) / 2
	return lambda / (2 * math.Sqrt(q) * math.Sqrt(1-s*s)) / deg
}

// AtWavelength returns the angle in degrees 2θ at which the d-spacing
// seen at twoTheta with wavelength lambda is seen with wavelength lambda2
// (a K-alpha2 line beside its K-alpha1 line), and its derivative with
// respect to twoTheta; +Inf and 0 when λ₂ reaches no reflection.
func AtWavelength(twoTheta, lambda, lambda2 float64) (float64, float64) {
	r := lambda2 / lambda
	th := twoTheta * deg / 2
	s := r * math.Sin(th)
	if s >= 1 {
		return math.Inf(1), 0
	}
	th2 := math.Asin(s)
	return 2 * th2 / deg, r * math.Cos(th) / math.Cos(th2)
}

// A Line is one observed powder line: its position (the K-alpha1 or single
// wavelength position of a peak) and the esd of that position, both in
// degrees 2θ. Indexing and refinement work from Lines.
type Line struct {
	TwoTheta float64 // degrees 2θ
	ESD      float64 // degrees 2θ; zero means unknown
	// Intensity is the line's integrated intensity on any scale; zero
	// means unknown. Indexing weighs an unexplained line by it.
	Intensity float64
	// FWHM is the line's full width at half maximum, degrees 2θ; zero
	// means unknown. Indexing takes calculated lines closer than half
	// of it for one (they show as one peak).
	FWHM float64
}

// MatchTolerance is the smallest window, degrees 2θ, within which a
// calculated line claims an observed one when no window is given (the
// window is otherwise three esds of the line): about the positional
// repeatability of a laboratory diffractometer (common practice).
// Indexing and refinement both match lines with it.
const MatchTolerance = 0.03

// MatchWindow returns the half window, degrees 2θ, within which a
// calculated line claims an observed line of esd esd (degrees 2θ): the
// tolerance (MatchTolerance when zero) or three esds, whichever is
// wider. Indexing, refinement and the whole-pattern fit all use it.
func MatchWindow(tolerance, esd float64) float64 {
	if tolerance == 0 {
		tolerance = MatchTolerance
	}
	return math.Max(tolerance, 3*esd)
}
