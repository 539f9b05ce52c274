package cell

import (
	"errors"
	"fmt"
	"math"
)

// A G6 is the Gruber vector of a primitive cell (Acta Cryst. A29 (1973)
// 433), in the notation of Křivý & Gruber: A = a·a, B = b·b, C = c·c,
// Xi = 2b·c, Eta = 2a·c, Zeta = 2a·b, in Å².
type G6 struct {
	A, B, C, Xi, Eta, Zeta float64
}

// G6Of returns the Gruber vector of a metric tensor.
func G6Of(g Matrix) G6 {
	return G6{g[0][0], g[1][1], g[2][2], 2 * g[1][2], 2 * g[0][2], 2 * g[0][1]}
}

// Vector returns the six components in the order A, B, C, Xi, Eta, Zeta.
func (v G6) Vector() [6]float64 { return [6]float64{v.A, v.B, v.C, v.Xi, v.Eta, v.Zeta} }

// Distance returns the Euclidean distance of two vectors, Å².
func (v G6) Distance(w G6) float64 {
	x, y := v.Vector(), w.Vector()
	d := 0.0
	for i := range x {
		d += (x[i] - y[i]) * (x[i] - y[i])
	}
	return math.Sqrt(d)
}

// Metric returns the metric tensor of the vector.
func (v G6) Metric() Matrix {
	return Matrix{
		{v.A, v.Zeta / 2, v.Eta / 2},
		{v.Zeta / 2, v.B, v.Xi / 2},
		{v.Eta / 2, v.Xi / 2, v.C},
	}
}

// primitive returns the rows of the primitive basis of a centred lattice
// in the conventional basis (common practice; R for the obverse setting
// on hexagonal axes).
func primitive(cen Centring) Matrix {
	const h, t = 0.5, 1.0 / 3
	switch cen {
	case A:
		return Matrix{{1, 0, 0}, {0, h, h}, {0, -h, h}}
	case B:
		return Matrix{{h, 0, h}, {0, 1, 0}, {-h, 0, h}}
	case C:
		return Matrix{{h, h, 0}, {-h, h, 0}, {0, 0, 1}}
	case I:
		return Matrix{{-h, h, h}, {h, -h, h}, {h, h, -h}}
	case F:
		return Matrix{{0, h, h}, {h, 0, h}, {h, h, 0}}
	case R:
		return Matrix{{2 * t, t, t}, {-t, t, t}, {-t, -2 * t, t}}
	}
	return Identity
}

// A Reduced is the Niggli reduced cell of a lattice with the change of
// basis that gives it.
type Reduced struct {
	G6 G6
	// Cell is the reduced cell as a primitive triclinic cell.
	Cell Cell
	// Transform gives the reduced basis vectors (rows) in the basis of
	// the cell that was reduced (its conventional, possibly centred,
	// axes): (a', b', c') = Transform·(a, b, c).
	Transform Matrix
}

// ErrReduction is returned when the reduction does not finish.
var ErrReduction = errors.New("cell: Niggli reduction did not converge")

// DefaultEpsilon is the relative tolerance of the reduction's
// comparisons, in units of the mean of A, B and C (Grosse-Kunstleve et
// al. 2004 recommend 1e-5 of the cell's squared size).
const DefaultEpsilon = 1e-5

// Reduce returns the Niggli reduced cell of the lattice of c (its
// primitive cell reduced by the algorithm of Křivý & Gruber, Acta Cryst.
// A32 (1976) 297, steps N1–N8, with every comparison made within
// ε = DefaultEpsilon·(A+B+C)/3 as Grosse-Kunstleve, Sauter & Adams, Acta
// Cryst. A60 (2004) 1 propose, so that nearly equal cells do not flip
// between settings).
func Reduce(c Cell) (Reduced, error) {
	return ReduceEpsilon(c, DefaultEpsilon)
}

// ReduceEpsilon is Reduce with the relative tolerance given.
func ReduceEpsilon(c Cell, epsilon float64) (Reduced, error) {
	p := primitive(c.Centring)
	g := c.Metric().Transform(p)
	v := G6Of(g)
	t := Identity
	e := epsilon * (v.A + v.B + v.C) / 3
	apply := func(m Matrix) { t = m.Mul(t) }
	sign := func(x float64) float64 {
		if x < 0 {
			return -1
		}
		return 1
	}
	for iter := 0; ; iter++ {
		if iter > 1000 || math.IsNaN(v.A+v.B+v.C+v.Xi+v.Eta+v.Zeta) {
			return Reduced{}, fmt.Errorf("%w for %v", ErrReduction, c)
		}
		// N1
		if v.A > v.B+e || math.Abs(v.A-v.B) <= e && math.Abs(v.Xi) > math.Abs(v.Eta)+e {
			v.A, v.B, v.Xi, v.Eta = v.B, v.A, v.Eta, v.Xi
			apply(Matrix{{0, -1, 0}, {-1, 0, 0}, {0, 0, -1}})
		}
		// N2
		if v.B > v.C+e || math.Abs(v.B-v.C) <= e && math.Abs(v.Eta) > math.Abs(v.Zeta)+e {
			v.B, v.C, v.Eta, v.Zeta = v.C, v.B, v.Zeta, v.Eta
			apply(Matrix{{-1, 0, 0}, {0, 0, -1}, {0, -1, 0}})
			continue
		}
		// N3, N4: signs of ξ, η, ζ made all positive or all non-positive.
		sg := func(x float64) int {
			switch {
			case x < -e:
				return -1
			case x > e:
				return 1
			}
			return 0
		}
		l, m, n := sg(v.Xi), sg(v.Eta), sg(v.Zeta)
		if l*m*n == 1 {
			f := func(s int) float64 {
				if s == -1 {
					return -1
				}
				return 1
			}
			apply(Matrix{{f(l), 0, 0}, {0, f(m), 0}, {0, 0, f(n)}})
			v.Xi, v.Eta, v.Zeta = math.Abs(v.Xi), math.Abs(v.Eta), math.Abs(v.Zeta)
		} else {
			f := [3]float64{1, 1, 1}
			z := -1
			for k, s := range [3]int{l, m, n} {
				if s == 1 {
					f[k] = -1
				} else if s == 0 {
					z = k
				}
			}
			if f[0]*f[1]*f[2] < 0 {
				if z < 0 {
					return Reduced{}, fmt.Errorf("%w: sign step N4 has no zero term for %v", ErrReduction, c)
				}
				f[z] = -1
			}
			apply(Matrix{{f[0], 0, 0}, {0, f[1], 0}, {0, 0, f[2]}})
			v.Xi, v.Eta, v.Zeta = -math.Abs(v.Xi), -math.Abs(v.Eta), -math.Abs(v.Zeta)
		}
		// N5
		if math.Abs(v.Xi) > v.B+e || math.Abs(v.B-v.Xi) <= e && 2*v.Eta < v.Zeta-e || math.Abs(v.B+v.Xi) <= e && v.Zeta < -e {
			s := sign(v.Xi)
			v.C = v.B + v.C - v.Xi*s
			v.Eta = v.Eta - v.Zeta*s
			v.Xi = v.Xi - 2*v.B*s
			apply(Matrix{{1, 0, 0}, {0, 1, 0}, {0, -s, 1}})
			continue
		}
		// N6
		if math.Abs(v.Eta) > v.A+e || math.Abs(v.A-v.Eta) <= e && 2*v.Xi < v.Zeta-e || math.Abs(v.A+v.Eta) <= e && v.Zeta < -e {
			s := sign(v.Eta)
			v.C = v.A + v.C - v.Eta*s
			v.Xi = v.Xi - v.Zeta*s
			v.Eta = v.Eta - 2*v.A*s
			apply(Matrix{{1, 0, 0}, {0, 1, 0}, {-s, 0, 1}})
			continue
		}
		// N7
		if math.Abs(v.Zeta) > v.A+e || math.Abs(v.A-v.Zeta) <= e && 2*v.Xi < v.Eta-e || math.Abs(v.A+v.Zeta) <= e && v.Eta < -e {
			s := sign(v.Zeta)
			v.B = v.A + v.B - v.Zeta*s
			v.Xi = v.Xi - v.Eta*s
			v.Zeta = v.Zeta - 2*v.A*s
			apply(Matrix{{1, 0, 0}, {-s, 1, 0}, {0, 0, 1}})
			continue
		}
		// N8
		if sum := v.Xi + v.Eta + v.Zeta + v.A + v.B; sum < -e || math.Abs(sum) <= e && 2*(v.A+v.Eta)+v.Zeta > e {
			v.C = v.A + v.B + v.C + v.Xi + v.Eta + v.Zeta
			v.Xi = 2*v.B + v.Xi + v.Zeta
			v.Eta = 2*v.A + v.Eta + v.Zeta
			apply(Matrix{{1, 0, 0}, {0, 1, 0}, {1, 1, 1}})
			continue
		}
		break
	}
	full := t.Mul(p)
	return Reduced{G6: v, Cell: FromMetric(Triclinic, P, v.Metric()), Transform: full}, nil
}

// SameLattice reports whether two cells describe one lattice: their Niggli
// reduced cells agree within tol, relative, in every component of the
// Gruber vector (scaled by the mean of A, B and C).
func SameLattice(a, b Cell, tol float64) bool {
	ra, err1 := Reduce(a)
	rb, err2 := Reduce(b)
	if err1 != nil || err2 != nil {
		return false
	}
	s := (ra.G6.A + ra.G6.B + ra.G6.C) / 3
	x, y := ra.G6.Vector(), rb.G6.Vector()
	for i := range x {
		if math.Abs(x[i]-y[i]) > tol*s {
			return false
		}
	}
	return true
}
