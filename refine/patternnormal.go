package refine

import (
	"errors"
	"math"

	"gonum.org/v1/gonum/mat"
)

// normal is the normal matrix JᵀJ and gradient Jᵀr of a whole-pattern
// fit in blocks: D among the ng shared parameters, C between them and
// the ni intensities, and the intensities' block B, which is banded
// because a point sees only the lines near it (intensities are ordered
// by position). Solving through the band (Schur complement of B) costs
// O(ni·kb²) instead of the O(ni³) of a dense factorization.
type normal struct {
	ng, ni, kb int
	d          []float64 // ng×ng, row major
	c          []float64 // ng×ni, row major
	b          []float64 // ni×(kb+1): B[k][k+j] at b[k*(kb+1)+j]
	g          []float64 // ng+ni
}

// normalEquations accumulates the blocks over the Jacobian's rows (res
// the weighted residuals) and adds the far lines' share of the gradient
// (see jacReach).
func normalEquations(jac *jacobian, res []float64, ng, ni int) *normal {
	rows := jac.rows
	kb := 0
	for _, row := range rows {
		if n := len(row.near); n > 1 {
			kb = max(kb, int(row.near[n-1]-row.near[0]))
		}
	}
	n := &normal{ng: ng, ni: ni, kb: kb, d: make([]float64, ng*ng), c: make([]float64, ng*ni),
		b: make([]float64, ni*(kb+1)), g: make([]float64, ng+ni)}
	w := kb + 1
	for i, row := range rows {
		r := res[i]
		for a, va := range row.g {
			if va == 0 {
				continue
			}
			n.g[a] += va * r
			da := n.d[a*ng:]
			for b := a; b < ng; b++ {
				da[b] += va * row.g[b]
			}
			ca := n.c[a*ni:]
			for u, k := range row.near {
				ca[int(k)] += va * row.nearV[u]
			}
		}
		for u, k32 := range row.near {
			k := int(k32)
			vu := row.nearV[u]
			n.g[ng+k] += vu * r
			bk := n.b[k*w:]
			for v := u; v < len(row.near); v++ {
				bk[int(row.near[v])-k] += vu * row.nearV[v]
			}
		}
	}
	for k, v := range jac.far {
		n.g[ng+k] += v
	}
	for a := 0; a < ng; a++ {
		for b := 0; b < a; b++ {
			n.d[a*ng+b] = n.d[b*ng+a]
		}
	}
	return n
}

// diag returns the diagonal of the normal matrix.
func (n *normal) diag() []float64 {
	out := make([]float64, n.ng+n.ni)
	for a := 0; a < n.ng; a++ {
		out[a] = n.d[a*n.ng+a]
	}
	for k := 0; k < n.ni; k++ {
		out[n.ng+k] = n.b[k*(n.kb+1)]
	}
	return out
}

// factor is the normal matrix scaled to a unit diagonal, damped and
// factorized: the band's Cholesky factor, X = B⁻¹Cᵀ and the Cholesky
// factor of the Schur complement S = D − C B⁻¹ Cᵀ.
type factor struct {
	n   *normal
	sc  []float64  // the scale of each parameter (0 for held ones)
	cs  *mat.Dense // Cᵀ scaled, ni×ng
	bch mat.BandCholesky
	x   *mat.Dense // ni×ng
	sch mat.Cholesky
	ng  int
	ni  int
}

// errNotDefinite: the damped matrix is not positive definite.
var errNotDefinite = errors.New("normal matrix not positive definite")

// factorize scales the matrix to a unit diagonal (the parameters' units
// differ by many orders: reciprocal coefficients near 0.01 Å⁻²,
// intensities in the thousands), so that Marquardt's damping of the
// diagonal is λ·I, and factorizes it. Held parameters (hold, or no
// point depends on them) get a unit row and column of their own.
func (n *normal) factorize(lambda float64, hold []bool) (*factor, error) {
	ng, ni, w := n.ng, n.ni, n.kb+1
	dg := n.diag()
	sc := make([]float64, ng+ni)
	for j, d := range dg {
		if d > 0 && (hold == nil || !hold[j]) {
			sc[j] = 1 / math.Sqrt(d)
		}
	}
	f := &factor{n: n, sc: sc, ng: ng, ni: ni}
	diagOf := func(j int) float64 {
		if sc[j] == 0 {
			return 1
		}
		return 1 + lambda
	}
	// The band.
	bd := make([]float64, ni*w)
	for k := 0; k < ni; k++ {
		sk := sc[ng+k]
		for j := 0; j < w && k+j < ni; j++ {
			bd[k*w+j] = n.b[k*w+j] * sk * sc[ng+k+j]
		}
		bd[k*w] = diagOf(ng + k)
	}
	if !f.bch.Factorize(mat.NewSymBandDense(ni, n.kb, bd)) {
		return nil, errNotDefinite
	}
	// X = B⁻¹ Cᵀ.
	ct := mat.NewDense(ni, ng, nil)
	for a := 0; a < ng; a++ {
		for k := 0; k < ni; k++ {
			ct.Set(k, a, n.c[a*ni+k]*sc[a]*sc[ng+k])
		}
	}
	f.cs = ct
	f.x = mat.NewDense(ni, ng, nil)
	if err := f.bch.SolveTo(f.x, ct); err != nil && !isCondition(err) {
		return nil, err
	}
	// S = D − C X.
	s := mat.NewSymDense(ng, nil)
	for a := 0; a < ng; a++ {
		for b := a; b < ng; b++ {
			v := n.d[a*ng+b] * sc[a] * sc[b]
			if a == b {
				v = diagOf(a)
			}
			for k := 0; k < ni; k++ {
				v -= ct.At(k, a) * f.x.At(k, b)
			}
			s.SetSym(a, b, v)
		}
	}
	if !f.sch.Factorize(s) {
		return nil, errNotDefinite
	}
	return f, nil
}

// isCondition reports an ill-conditioned but completed solve (the
// solution is still the solution; the caller's χ² test judges it).
func isCondition(err error) bool {
	var c mat.Condition
	return errors.As(err, &c)
}

// step solves the factorized equations for the gradient: the parameter
// step, unscaled.
func (f *factor) step() ([]float64, error) {
	ng, ni := f.ng, f.ni
	gs := make([]float64, ng+ni)
	for j, v := range f.n.g {
		gs[j] = v * f.sc[j]
	}
	// u = B⁻¹ g_I; S xg = g_G − C u; xi = u − X xg.
	var u mat.VecDense
	if err := f.bch.SolveVecTo(&u, mat.NewVecDense(ni, gs[ng:])); err != nil && !isCondition(err) {
		return nil, err
	}
	rhs := make([]float64, ng)
	for a := 0; a < ng; a++ {
		v := gs[a]
		for k := 0; k < ni; k++ {
			v -= f.cs.At(k, a) * u.AtVec(k)
		}
		rhs[a] = v
	}
	var xg mat.VecDense
	if err := f.sch.SolveVecTo(&xg, mat.NewVecDense(ng, rhs)); err != nil && !isCondition(err) {
		return nil, err
	}
	out := make([]float64, ng+ni)
	for a := 0; a < ng; a++ {
		out[a] = xg.AtVec(a) * f.sc[a]
	}
	for k := 0; k < ni; k++ {
		v := u.AtVec(k)
		for a := 0; a < ng; a++ {
			v -= f.x.At(k, a) * xg.AtVec(a)
		}
		out[ng+k] = v * f.sc[ng+k]
	}
	return out, nil
}

// covariance returns the inverse of the (undamped) normal matrix: the
// shared parameters' block, ng×ng, and the intensities' variances.
// Held parameters have zero rows.
func (f *factor) covariance() (*mat.SymDense, []float64, error) {
	ng, ni := f.ng, f.ni
	var sinv mat.SymDense
	if err := f.sch.InverseTo(&sinv); err != nil && !isCondition(err) {
		return nil, nil, err
	}
	cg := mat.NewSymDense(ng, nil)
	for a := 0; a < ng; a++ {
		for b := a; b < ng; b++ {
			cg.SetSym(a, b, sinv.At(a, b)*f.sc[a]*f.sc[b])
		}
	}
	// The intensities' variances: diag(B⁻¹) + diag(X S⁻¹ Xᵀ), the band's
	// inverse taken a block of unit columns at a time.
	vi := make([]float64, ni)
	const block = 64
	for k0 := 0; k0 < ni; k0 += block {
		m := min(block, ni-k0)
		e := mat.NewDense(ni, m, nil)
		for j := 0; j < m; j++ {
			e.Set(k0+j, j, 1)
		}
		var z mat.Dense
		if err := f.bch.SolveTo(&z, e); err != nil && !isCondition(err) {
			return nil, nil, err
		}
		for j := 0; j < m; j++ {
			vi[k0+j] = z.At(k0+j, j)
		}
	}
	xr := make([]float64, ng)
	for k := 0; k < ni; k++ {
		mat.Row(xr, k, f.x)
		var v float64
		for a := 0; a < ng; a++ {
			for b := 0; b < ng; b++ {
				v += xr[a] * sinv.At(a, b) * xr[b]
			}
		}
		s := f.sc[ng+k]
		vi[k] = (vi[k] + v) * s * s
	}
	return cg, vi, nil
}
