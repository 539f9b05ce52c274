package refine

import (
	"math"

	"reticle/indexing"
)

const deg = math.Pi / 180

// cellParams names the free parameters of a system's conventional cell.
func cellParams(s indexing.System) []string {
	switch s {
	case indexing.Cubic:
		return []string{"a"}
	case indexing.Orthorhombic:
		return []string{"a", "b", "c"}
	}
	return []string{"a", "c"}
}

// cellValues returns the free parameters of c.
func cellValues(c indexing.Cell) []float64 {
	switch c.System {
	case indexing.Cubic:
		return []float64{c.A}
	case indexing.Orthorhombic:
		return []float64{c.A, c.B, c.C}
	}
	return []float64{c.A, c.C}
}

// buildCell makes the conventional cell from its free parameters.
func buildCell(s indexing.System, cen indexing.Centring, p []float64) indexing.Cell {
	switch s {
	case indexing.Cubic:
		return indexing.NewCell(s, cen, p[0], p[0])
	case indexing.Orthorhombic:
		return indexing.Cell{System: s, Centring: cen, A: p[0], B: p[1], C: p[2], Alpha: 90, Beta: 90, Gamma: 90}
	}
	return indexing.NewCell(s, cen, p[0], p[1])
}

// qTerms returns the coefficients g of Q = Σ g_i / p_i², p being the free
// cell parameters.
func qTerms(s indexing.System, hkl indexing.HKL) []float64 {
	h, k, l := float64(hkl[0]), float64(hkl[1]), float64(hkl[2])
	switch s {
	case indexing.Cubic:
		return []float64{h*h + k*k + l*l}
	case indexing.Orthorhombic:
		return []float64{h * h, k * k, l * l}
	case indexing.Hexagonal, indexing.Rhombohedral:
		return []float64{4 * (h*h + h*k + k*k) / 3, l * l}
	}
	return []float64{h*h + k*k, l * l}
}

// volumeGradient returns V and ∂V/∂p over the free parameters.
func volumeGradient(c indexing.Cell) (float64, []float64) {
	v := c.Volume()
	p := cellValues(c)
	var powers []float64
	switch c.System {
	case indexing.Cubic:
		powers = []float64{3}
	case indexing.Orthorhombic:
		powers = []float64{1, 1, 1}
	default:
		powers = []float64{2, 1}
	}
	g := make([]float64, len(p))
	for i := range p {
		g[i] = v * powers[i] / p[i]
	}
	return v, g
}

// point is the model at one line: the calculated position and its
// derivatives with respect to the free cell parameters, the zero shift
// and the displacement.
type point struct {
	tt     float64   // degrees 2θ
	dCell  []float64 // degrees per Å
	dZero  float64   // 1
	dDisp  float64   // degrees per mm
	theta  float64   // Bragg angle, radians
	inside bool      // λ√Q/2 < 1
}

// eval computes the model of one line.
func eval(s indexing.System, p []float64, hkl indexing.HKL, lambda, zero, disp, radius float64) point {
	g := qTerms(s, hkl)
	var q float64
	for i := range g {
		q += g[i] / (p[i] * p[i])
	}
	sn := lambda * math.Sqrt(q) / 2
	if !(sn < 1) || !(q > 0) {
		return point{}
	}
	th := math.Asin(sn)
	cs := math.Cos(th)
	// dθ/dQ in radians per Å⁻²; 2θ in degrees.
	dth := lambda / (4 * math.Sqrt(q) * cs)
	dispTerm := -2 * disp * cs / radius / deg
	dtt := (2*dth + 2*disp*math.Sin(th)/radius*dth) / deg
	pt := point{
		tt:     2*th/deg + zero + dispTerm,
		dCell:  make([]float64, len(p)),
		dZero:  1,
		dDisp:  -2 * cs / radius / deg,
		theta:  th,
		inside: true,
	}
	for i := range g {
		pt.dCell[i] = dtt * (-2 * g[i] / (p[i] * p[i] * p[i]))
	}
	return pt
}
