package peaks

import "math"

const ln2 = math.Ln2

// PseudoVoigt returns the pseudo-Voigt profile of height 1 at x for a peak
// at x0 of full width at half maximum fwhm and Lorentzian fraction eta:
// η L + (1 − η) G with L = 1/(1 + 4u²), G = exp(−4 ln2 u²), u = (x − x0)/fwhm
// (Wertheim et al., J. Electron Spectrosc. 3 (1974) 377).
func PseudoVoigt(x, x0, fwhm, eta float64) float64 {
	u := (x - x0) / fwhm
	u2 := u * u
	return eta/(1+4*u2) + (1-eta)*math.Exp(-4*ln2*u2)
}

// PseudoVoigtArea returns the integral over x of a pseudo-Voigt of the
// given height: H Γ (η π/2 + (1 − η) √(π / (4 ln 2))).
func PseudoVoigtArea(height, fwhm, eta float64) float64 {
	return height * fwhm * areaFactor(eta)
}

func areaFactor(eta float64) float64 {
	return eta*math.Pi/2 + (1-eta)*math.Sqrt(math.Pi/(4*ln2))
}

// pvGrad returns the unit-height profile and its derivatives with respect
// to x0, fwhm and eta.
func pvGrad(x, x0, fwhm, eta float64) (f, dx0, dw, deta float64) {
	u := (x - x0) / fwhm
	u2 := u * u
	l := 1 / (1 + 4*u2)
	g := math.Exp(-4 * ln2 * u2)
	f = eta*l + (1-eta)*g
	// d/du of the profile.
	du := eta*(-8*u*l*l) + (1-eta)*(-8*ln2*u*g)
	dx0 = -du / fwhm
	dw = -du * u / fwhm
	deta = l - g
	return
}
