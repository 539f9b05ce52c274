package profile

import "math"

const ln2 = math.Ln2

// TailedAreaFactor is the area of a line of height 1 and FWHM 1 with
// Lorentzian fraction eta and tail ratio tail (LineShape: the Lorentzian
// part's area grows by the tail ratio), and its derivative with respect
// to eta.
func TailedAreaFactor(eta, tail float64) (area, dEta float64) {
	l, g := math.Pi/2*tail, math.Sqrt(math.Pi/(4*ln2))
	return eta*l + (1-eta)*g, l - g
}

// gauss returns the Gaussian part exp(−4 ln2 u²) for u² = ((x − x0)/FWHM)²,
// and 0 beyond 3.8 FWHM, where it is below 10⁻¹⁷ of the height (most of
// a line's window lies there, and the exponential is the costliest step
// of a fit).
func gauss(u2 float64) float64 {
	if u2 > 14.4 {
		return 0
	}
	return math.Exp(-4 * ln2 * u2)
}

// pvGrad returns the unit-height profile and its derivatives with respect
// to x0, fwhm and eta.
func pvGrad(x, x0, fwhm, eta float64) (f, dx0, dw, deta float64) {
	u := (x - x0) / fwhm
	u2 := u * u
	l := 1 / (1 + 4*u2)
	g := gauss(u2)
	f = eta*l + (1-eta)*g
	// d/du of the profile.
	du := eta*(-8*u*l*l) + (1-eta)*(-8*ln2*u*g)
	dx0 = -du / fwhm
	dw = -du * u / fwhm
	deta = l - g
	return
}

// Lines with wide wings are pseudo-Voigt curves whose Lorentzian part is
// wider than the Gaussian part by the scan's tail ratio τ ≥ 1:
// η L(u/τ) + (1 − η) G(u). Real lines whose crystallites have a spread of
// sizes, or whose instrument spreads the beam, carry wings wider than one
// Lorentzian of the core's width can follow; τ = 1 is the plain curve.
func tailedVoigt(x, x0, fwhm, eta, tail float64) float64 {
	u := (x - x0) / fwhm
	v := u / tail
	return eta/(1+4*v*v) + (1-eta)*gauss(u*u)
}

// tailedGrad returns tailedVoigt and its derivatives with respect to x0,
// fwhm and eta.
func tailedGrad(x, x0, fwhm, eta, tail float64) (f, dx0, dw, deta float64) {
	if tail == 1 {
		return pvGrad(x, x0, fwhm, eta)
	}
	u := (x - x0) / fwhm
	v := u / tail
	l := 1 / (1 + 4*v*v)
	g := gauss(u * u)
	f = eta*l + (1-eta)*g
	du := eta*(-8*v*l*l)/tail + (1-eta)*(-8*ln2*u*g)
	dx0 = -du / fwhm
	dw = -du * u / fwhm
	deta = l - g
	return
}

// TailedFWHM returns the full width at half maximum of a tailed curve of
// width parameter fwhm (equal to it when τ = 1).
func TailedFWHM(fwhm, eta, tail float64) float64 {
	if tail == 1 || eta == 0 {
		return fwhm
	}
	lo, hi := 0.0, 0.5*tail
	for k := 0; k < 50; k++ {
		m := 0.5 * (lo + hi)
		if tailedVoigt(m, 0, 1, eta, tail) > 0.5 {
			lo = m
		} else {
			hi = m
		}
	}
	return 2 * lo * fwhm
}

// Asymmetric lines are split pseudo-Voigt curves (Toraya, J. Appl. Cryst.
// 23 (1990) 485): below the maximum x0 the curve is a pseudo-Voigt of FWHM
// w(1 + A), above it one of FWHM w(1 − A), both of height 1 at x0. The
// position is the maximum, the mean of the two half-widths is w/2 and the
// area is that of the symmetric curve; A > 0 widens the low-angle side, as
// the axial divergence of a Bragg–Brentano instrument does below 90° 2θ.
const MaxAsym = 0.6 // bound on |A|

// LineShape returns the profile of height 1 at x for a line at x0 with
// the scan's tail ratio.
func LineShape(x, x0, w, eta, asym, tail float64) float64 {
	if x < x0 {
		return tailedVoigt(x, x0, w*(1+asym), eta, tail)
	}
	return tailedVoigt(x, x0, w*(1-asym), eta, tail)
}

// LineGrad returns LineShape and its derivatives with respect to x0, w,
// eta and A.
func LineGrad(x, x0, w, eta, asym, tail float64) (f, dx0, dw, deta, dasym float64) {
	k := 1 - asym
	if x < x0 {
		k = 1 + asym
	}
	f, dx0, dfw, deta := tailedGrad(x, x0, w*k, eta, tail)
	dw = dfw * k
	dasym = dfw * w
	if x >= x0 {
		dasym = -dasym
	}
	return
}
