package cell

import "math"

// Identity is the unit matrix.
var Identity = Matrix{{1, 0, 0}, {0, 1, 0}, {0, 0, 1}}

// Mul returns m·n.
func (m Matrix) Mul(n Matrix) Matrix {
	var r Matrix
	for i := 0; i < 3; i++ {
		for j := 0; j < 3; j++ {
			for k := 0; k < 3; k++ {
				r[i][j] += m[i][k] * n[k][j]
			}
		}
	}
	return r
}

// T returns the transpose.
func (m Matrix) T() Matrix {
	var r Matrix
	for i := 0; i < 3; i++ {
		for j := 0; j < 3; j++ {
			r[i][j] = m[j][i]
		}
	}
	return r
}

// Det returns the determinant.
func (m Matrix) Det() float64 {
	return m[0][0]*(m[1][1]*m[2][2]-m[1][2]*m[2][1]) -
		m[0][1]*(m[1][0]*m[2][2]-m[1][2]*m[2][0]) +
		m[0][2]*(m[1][0]*m[2][1]-m[1][1]*m[2][0])
}

// Inverse returns m⁻¹ and whether m is invertible.
func (m Matrix) Inverse() (Matrix, bool) {
	d := m.Det()
	if d == 0 || math.IsNaN(d) {
		return Matrix{}, false
	}
	var r Matrix
	for i := 0; i < 3; i++ {
		for j := 0; j < 3; j++ {
			r[j][i] = (m[(i+1)%3][(j+1)%3]*m[(i+2)%3][(j+2)%3] - m[(i+1)%3][(j+2)%3]*m[(i+2)%3][(j+1)%3]) / d
		}
	}
	return r, true
}

// Transform returns the metric of the basis m·(a, b, c): M G Mᵀ, where the
// rows of m give the new basis vectors in the old basis.
func (g Matrix) Transform(m Matrix) Matrix {
	return m.Mul(g).Mul(m.T())
}

// Apply returns m·v.
func (m Matrix) Apply(v [3]float64) [3]float64 {
	var r [3]float64
	for i := 0; i < 3; i++ {
		for j := 0; j < 3; j++ {
			r[i] += m[i][j] * v[j]
		}
	}
	return r
}

// Sublattices returns the bases of every sublattice of index m of a
// lattice, as matrices whose rows give the new basis vectors in the old
// basis: the Hermite normal forms of determinant m (upper triangular,
// diagonal d₁d₂d₃ = m, each entry above the diagonal from 0 to the
// diagonal entry of its column less one), one per sublattice (there are
// 7 of index 2, 13 of index 3 and 35 of index 4 in three dimensions).
func Sublattices(m int) []Matrix {
	var out []Matrix
	for d1 := 1; d1 <= m; d1++ {
		if m%d1 != 0 {
			continue
		}
		for d2 := 1; d2 <= m/d1; d2++ {
			if (m/d1)%d2 != 0 {
				continue
			}
			d3 := m / d1 / d2
			for a := 0; a < d2; a++ {
				for b := 0; b < d3; b++ {
					for c := 0; c < d3; c++ {
						out = append(out, Matrix{
							{float64(d1), float64(a), float64(b)},
							{0, float64(d2), float64(c)},
							{0, 0, float64(d3)},
						})
					}
				}
			}
		}
	}
	return out
}
