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
