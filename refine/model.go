package refine

import (
	"math"

	"reticle/cell"
)

const deg = math.Pi / 180

// model is the calculated position of a line as a function of the free
// reciprocal coefficients r of a system (cell.Basis) and the corrections:
//
//	2θ = 2·asin(λ√Q/2) + shift(θ),  Q = Σ r_j·(Basis_j · terms(hkl)).
type model struct {
	sys    cell.System
	basis  []cell.QForm
	lambda float64 // Å
	radius float64 // mm
}

func newModel(s cell.System, lambda, radius float64) *model {
	return &model{sys: s, basis: cell.Basis(s), lambda: lambda, radius: radius}
}

// point is the model at one line.
type point struct {
	tt     float64   // degrees 2θ, corrections included
	dR     []float64 // ∂2θ/∂r_j, degrees per Å⁻²
	dCorr  shifts    // ∂2θ/∂ each correction
	inside bool      // the reflection lies below 180°
}

// coefficients returns the factors t_j of the free coefficients in
// Q(hkl) = Σ r_j t_j.
func (m *model) coefficients(h cell.HKL) []float64 {
	t := cell.Terms(h)
	out := make([]float64, len(m.basis))
	for j, b := range m.basis {
		for i := range b {
			out[j] += b[i] * t[i]
		}
	}
	return out
}

// eval computes the model of reflection h.
func (m *model) eval(r []float64, h cell.HKL, corr shifts) point {
	t := m.coefficients(h)
	var q float64
	for j := range t {
		q += r[j] * t[j]
	}
	if !(q > 0) || !(m.lambda*math.Sqrt(q)/2 < 1) {
		return point{}
	}
	th := cell.TwoThetaOfQ(q, m.lambda) * deg / 2
	// dθ/dQ in radians per Å⁻².
	dthdq := cell.DTwoThetaDQ(q, m.lambda) * deg / 2
	sh, dsh := corr.shift(th, m.radius)
	dtt := 2/deg + dsh // d(2θ)/dθ, degrees per radian
	pt := point{tt: 2*th/deg + sh, dR: make([]float64, len(t)), dCorr: partials(th, m.radius), inside: true}
	for j := range t {
		pt.dR[j] = dtt * dthdq * t[j]
	}
	return pt
}

// start returns the free reciprocal coefficients of a cell.
func start(c cell.Cell) []float64 { return c.ReciprocalFree() }

// cellOf returns the cell of free coefficients r.
func (m *model) cellOf(r []float64, cen cell.Centring) (cell.Cell, error) {
	return cell.FormOf(m.sys, r).Cell(m.sys, cen)
}
