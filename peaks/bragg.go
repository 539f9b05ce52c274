package peaks

import "math"

const deg = math.Pi / 180

// DSpacing returns the d-spacing in Å of a reflection at twoTheta degrees
// for wavelength lambda Å by Bragg's law, λ = 2 d sin θ. It returns NaN
// outside 0 < 2θ < 180.
func DSpacing(twoTheta, lambda float64) float64 {
	if !(twoTheta > 0 && twoTheta < 180) {
		return math.NaN()
	}
	return lambda / (2 * math.Sin(twoTheta*deg/2))
}

// DSpacingESD returns d and its standard uncertainty from 2θ ± s2θ
// (degrees) and λ ± sλ (Å), propagated to first order:
// σd² = (d/λ · sλ)² + (d cot θ · s2θ/2 in radians)².
func DSpacingESD(twoTheta, s2θ, lambda, sλ float64) (d, sd float64) {
	d = DSpacing(twoTheta, lambda)
	th := twoTheta * deg / 2
	a := d / lambda * sλ
	b := d / math.Tan(th) * s2θ * deg / 2
	return d, math.Hypot(a, b)
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

// TwoThetaESD returns 2θ and its standard uncertainty in degrees from
// d ± sd and λ ± sλ: σ2θ = 2 tan θ · √((sd/d)² + (sλ/λ)²) in radians.
func TwoThetaESD(d, sd, lambda, sλ float64) (tt, stt float64) {
	tt = TwoTheta(d, lambda)
	th := tt * deg / 2
	return tt, 2 * math.Tan(th) * math.Hypot(sd/d, sλ/lambda) / deg
}

// Companion returns the angle in degrees 2θ at which a line of wavelength
// lambdaB appears for the reflection seen at twoTheta with lambdaA, NaN when
// it falls beyond 180°.
func Companion(twoTheta, lambdaA, lambdaB float64) float64 {
	s := math.Sin(twoTheta*deg/2) * lambdaB / lambdaA
	if !(s > 0 && s < 1) {
		return math.NaN()
	}
	return 2 * math.Asin(s) / deg
}
