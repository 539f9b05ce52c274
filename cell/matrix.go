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
