package cell

import (
	"fmt"
	"math"
)

// A QForm holds the six coefficients of Q(hkl) = A h² + B k² + C l² +
// D kl + E hl + F hk, in Å⁻²: A = G*₁₁, B = G*₂₂, C = G*₃₃, D = 2G*₂₃,
// E = 2G*₁₃, F = 2G*₁₂. Q is linear in them, which makes them the natural
// parameters of refinement and indexing.
type QForm [6]float64

// Terms returns the factors of the six coefficients in Q(hkl): h², k², l²,
// kl, hl, hk.
func Terms(h HKL) [6]float64 {
	x, y, z := float64(h[0]), float64(h[1]), float64(h[2])
	return [6]float64{x * x, y * y, z * z, y * z, x * z, x * y}
}

// Q returns Q(hkl).
func (f QForm) Q(h HKL) float64 {
	t := Terms(h)
	var q float64
	for i := range f {
		q += f[i] * t[i]
	}
	return q
}

// Reciprocal returns the reciprocal metric tensor of the form.
func (f QForm) Reciprocal() Matrix {
	return Matrix{
		{f[0], f[5] / 2, f[4] / 2},
		{f[5] / 2, f[1], f[3] / 2},
		{f[4] / 2, f[3] / 2, f[2]},
	}
}

// Cell returns the cell of a Q form with the system and centring given,
// symmetrised to the system; it fails when the form is not positive
// definite.
func (f QForm) Cell(s System, cen Centring) (Cell, error) {
	g, ok := f.Reciprocal().Inverse()
	if !ok || !(g[0][0] > 0 && g[1][1] > 0 && g[2][2] > 0) {
		return Cell{}, fmt.Errorf("%w: reciprocal form %v is not positive definite", ErrCell, f)
	}
	c := FromMetric(s, cen, g).Symmetrize()
	if !(c.Volume() > 0) || math.IsNaN(c.A) {
		return Cell{}, fmt.Errorf("%w: reciprocal form %v is not positive definite", ErrCell, f)
	}
	return c, nil
}

// Basis returns, for a system, the basis of its Q forms in terms of its
// free reciprocal coefficients: the form is Σ r_j·Basis[j]. Cubic: A = B
// = C; tetragonal: A = B, C; hexagonal and rhombohedral: A = B = F, C;
// orthorhombic: A, B, C; monoclinic (b unique): A, B, C, E; triclinic:
// all six.
func Basis(s System) []QForm {
	switch s {
	case Cubic:
		return []QForm{{1, 1, 1, 0, 0, 0}}
	case Tetragonal:
		return []QForm{{1, 1, 0, 0, 0, 0}, {0, 0, 1, 0, 0, 0}}
	case Hexagonal, Rhombohedral:
		return []QForm{{1, 1, 0, 0, 0, 1}, {0, 0, 1, 0, 0, 0}}
	case Orthorhombic:
		return []QForm{{1, 0, 0, 0, 0, 0}, {0, 1, 0, 0, 0, 0}, {0, 0, 1, 0, 0, 0}}
	case Monoclinic:
		return []QForm{{1, 0, 0, 0, 0, 0}, {0, 1, 0, 0, 0, 0}, {0, 0, 1, 0, 0, 0}, {0, 0, 0, 0, 1, 0}}
	}
	return []QForm{{1, 0, 0, 0, 0, 0}, {0, 1, 0, 0, 0, 0}, {0, 0, 1, 0, 0, 0}, {0, 0, 0, 1, 0, 0}, {0, 0, 0, 0, 1, 0}, {0, 0, 0, 0, 0, 1}}
}

// ReciprocalFree returns the cell's free reciprocal coefficients, the r_j
// of Basis.
func (c Cell) ReciprocalFree() []float64 {
	f := c.QForm()
	switch c.System {
	case Cubic:
		return []float64{f[0]}
	case Tetragonal, Hexagonal, Rhombohedral:
		return []float64{f[0], f[2]}
	case Orthorhombic:
		return []float64{f[0], f[1], f[2]}
	case Monoclinic:
		return []float64{f[0], f[1], f[2], f[4]}
	}
	return f[:]
}

// FormOf returns Σ r_j·Basis(s)[j].
func FormOf(s System, r []float64) QForm {
	var f QForm
	for j, b := range Basis(s) {
		for i := range f {
			f[i] += r[j] * b[i]
		}
	}
	return f
}

// DirectJacobian returns ∂(a, b, c, α, β, γ)/∂(A, B, C, D, E, F) at the
// cell (Å per Å⁻² and degrees per Å⁻²): with G = (G*)⁻¹, dG = −G dG* G;
// da = dG₁₁/(2a), and dα = −d cos α / sin α with d cos α = dG₂₃/(bc) −
// cos α (db/b + dc/c) (likewise for β and γ). Multiplied by the basis of
// the system it turns a covariance of the free reciprocal coefficients
// into one of the cell's parameters.
func (c Cell) DirectJacobian() [6][6]float64 {
	g := c.Metric()
	ca, cb, cg := cosd(c.Alpha), cosd(c.Beta), cosd(c.Gamma)
	sa, sb, sg := sind(c.Alpha), sind(c.Beta), sind(c.Gamma)
	var jac [6][6]float64
	for k := 0; k < 6; k++ {
		var e QForm
		e[k] = 1
		de := e.Reciprocal()
		dg := g.Mul(de).Mul(g)
		for i := range dg {
			for j := range dg[i] {
				dg[i][j] = -dg[i][j]
			}
		}
		da := dg[0][0] / (2 * c.A)
		db := dg[1][1] / (2 * c.B)
		dc := dg[2][2] / (2 * c.C)
		dca := dg[1][2]/(c.B*c.C) - ca*(db/c.B+dc/c.C)
		dcb := dg[0][2]/(c.A*c.C) - cb*(da/c.A+dc/c.C)
		dcg := dg[0][1]/(c.A*c.B) - cg*(da/c.A+db/c.B)
		jac[0][k], jac[1][k], jac[2][k] = da, db, dc
		jac[3][k] = -dca / sa / deg
		jac[4][k] = -dcb / sb / deg
		jac[5][k] = -dcg / sg / deg
	}
	return jac
}
