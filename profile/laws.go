package profile

import "math"

// Caglioti is the instrumental width curve FWHM² = U tan²θ + V tanθ + W
// (Caglioti, Paoletti & Ricci, Nucl. Instrum. 3 (1958) 223), FWHM in
// degrees 2θ.
type Caglioti struct{ U, V, W float64 }

// At returns the FWHM in degrees at twoTheta degrees.
func (c Caglioti) At(twoTheta float64) float64 {
	t := math.Tan(twoTheta * math.Pi / 360)
	return math.Sqrt(math.Max(c.U*t*t+c.V*t+c.W, 1e-12))
}

// Asymmetry is the angular law of the line asymmetry A of split
// pseudo-Voigt lines (see LineShape): a polynomial in 2θ,
//
//	A(2θ) = C[0] + C[1]·t + C[2]·t²,  t = (2θ − 90°)/90°,
//
// of the lowest degree the strong lines require, held to the bounds of a
// single line's fit. The published closed forms (1/tan 2θ for axial
// divergence, or 1/tan θ and 1/tan 2θ together) describe real
// laboratory scans less well than this over a full range: on measured
// patterns A falls roughly linearly with angle. The polynomial is not
// extrapolated: outside Lo..Hi degrees 2θ, the range of the lines it was
// fitted on, the law follows its tangent at the nearer end.
type Asymmetry struct {
	C      [3]float64
	Lo, Hi float64
}

// At returns A at twoTheta degrees.
func (s Asymmetry) At(twoTheta float64) float64 {
	a := s.Poly(twoTheta)
	if s.Hi > s.Lo {
		// Beyond the fitted range, the tangent at the nearer end.
		edge := math.Max(s.Lo, math.Min(s.Hi, twoTheta))
		te := (edge - 90) / 90
		a = s.Poly(edge) + (s.C[1]+2*s.C[2]*te)*(twoTheta-edge)/90
	}
	return math.Max(-MaxAsym, math.Min(MaxAsym, a))
}

// Zero reports whether the law is A = 0 (a symmetric scan).
func (s Asymmetry) Zero() bool { return s.C == [3]float64{} }

// Poly is the unclamped law.
func (s Asymmetry) Poly(twoTheta float64) float64 {
	t := (twoTheta - 90) / 90
	return s.C[0] + t*(s.C[1]+t*s.C[2])
}

// TCH combines a Gaussian width gG and a Lorentzian width gL (FWHM,
// degrees) into the FWHM and mixing of the pseudo-Voigt that best
// approximates their convolution (Thompson, Cox & Hastings, J. Appl.
// Cryst. 20 (1987) 79):
//
//	Γ⁵ = gG⁵ + 2.69269 gG⁴gL + 2.42843 gG³gL² + 4.47163 gG²gL³ + 0.07842 gG gL⁴ + gL⁵
//	η = 1.36603 q − 0.47719 q² + 0.11116 q³,  q = gL/Γ
//
// with the derivatives of Γ and η with respect to gG and gL (all zero
// when both widths are).
func TCH(gG, gL float64) (w, eta, dwG, dwL, deG, deL float64) {
	g, l := gG, gL
	s := g*g*g*g*g + 2.69269*g*g*g*g*l + 2.42843*g*g*g*l*l + 4.47163*g*g*l*l*l + 0.07842*g*l*l*l*l + l*l*l*l*l
	if !(s > 0) {
		return 0, 0, 0, 0, 0, 0 // no width at all
	}
	w = math.Pow(s, 0.2)
	dsG := 5*g*g*g*g + 4*2.69269*g*g*g*l + 3*2.42843*g*g*l*l + 2*4.47163*g*l*l*l + 0.07842*l*l*l*l
	dsL := 2.69269*g*g*g*g + 2*2.42843*g*g*g*l + 3*4.47163*g*g*l*l + 4*0.07842*g*l*l*l + 5*l*l*l*l
	dws := 0.2 * w / s
	dwG, dwL = dws*dsG, dws*dsL
	q := l / w
	eta = 1.36603*q - 0.47719*q*q + 0.11116*q*q*q
	deq := 1.36603 - 2*0.47719*q + 3*0.11116*q*q
	// q = l/w: ∂q/∂g = −l w_g/w², ∂q/∂l = 1/w − l w_l/w².
	deG = deq * (-l * dwG / (w * w))
	deL = deq * (1/w - l*dwL/(w*w))
	return
}

// TCHStart returns the Gaussian and Lorentzian widths whose TCH
// combination has about FWHM w and mixing eta (the inverse relations of
// Ida, Ando & Toraya, J. Appl. Cryst. 33 (2000) 1311, recalled from
// memory; a starting point only, which a fit refines).
func TCHStart(w, eta float64) (gG, gL float64) {
	eta = math.Max(0, math.Min(1, eta))
	gG = w * math.Sqrt(math.Max(1-0.74417*eta-0.24781*eta*eta-0.00810*eta*eta*eta, 0))
	gL = w * (0.72928*eta + 0.19289*eta*eta + 0.07783*eta*eta*eta)
	return
}
