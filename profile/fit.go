package profile

import (
	"errors"
	"math"
	"sync"

	"gonum.org/v1/gonum/mat"
)

// A Problem is a weighted least-squares problem for the Levenberg–Marquardt
// solver: Eval fills the model m_i and, when jac is not nil, the
// derivatives ∂m_i/∂p_j at jac[i*len(p)+j] for all parameters.
type Problem struct {
	Y, W   []float64 // data and weights 1/σ²
	Eval   func(p, m, jac []float64)
	Lo, Hi []float64 // bounds of each parameter (±Inf when free)
	Free   []bool    // parameters to vary
	// ChiTol is the decrease of χ² below which the search ends; zero
	// means 1e-4, which moves no parameter by more than 1 % of its esd.
	ChiTol float64
}

// A Solution holds the fitted parameters and their covariance.
type Solution struct {
	P    []float64
	Cov  *mat.SymDense // unscaled (JᵀWJ)⁻¹ over all parameters; fixed ones have zero rows, uninfluential ones +Inf variance
	Chi2 float64
	DOF  int
	Iter int
}

// ErrSingular: the normal matrix of the fit cannot be solved.
var ErrSingular = errors.New("normal matrix is singular")

// lmScratch is the working memory of one fit, reused through lmPool: a
// scan's thousands of fits would otherwise each take fresh memory, which
// a short-lived process pays for in page faults.
type lmScratch struct {
	f []float64
	i []int
}

var lmPool = sync.Pool{New: func() any { return new(lmScratch) }}

// take returns nf zeroed numbers and ni indices of the scratch.
func (s *lmScratch) take(nf, ni int) ([]float64, []int) {
	if cap(s.f) < nf {
		s.f = make([]float64, nf)
	}
	if cap(s.i) < ni {
		s.i = make([]int, ni)
	}
	f := s.f[:nf]
	clear(f)
	return f, s.i[:ni]
}

// normal fills the normal matrix a (k×k, free parameters idx) and the
// gradient g = JᵀW(y − m), working in the scratch ws (k·k + 2k numbers)
// and col (k indices).
func normal(prob *Problem, idx []int, np int, m, jac []float64, a *mat.SymDense, g *mat.VecDense, ws []float64, col []int) {
	k := len(idx)
	acc, gv, val := ws[:k*k], ws[k*k:k*k+k], ws[k*k+k:k*k+2*k]
	clear(acc)
	clear(gv)
	// A line's derivatives vanish beyond its reach, so each point's row
	// is gathered as its non-zero entries (column, value) only.
	for i := range m {
		wi := prob.W[i]
		ri := wi * (prob.Y[i] - m[i])
		base := jac[i*np : (i+1)*np]
		nz := 0
		for r, j := range idx {
			if v := base[j]; v != 0 {
				col[nz], val[nz] = r, v
				nz++
			}
		}
		for e := 0; e < nz; e++ {
			r, vr := col[e], val[e]
			gv[r] += vr * ri
			v := wi * vr
			ar := acc[r*k : (r+1)*k]
			for f := e; f < nz; f++ {
				ar[col[f]] += v * val[f]
			}
		}
	}
	for r := 0; r < k; r++ {
		for c := r; c < k; c++ {
			a.SetSym(r, c, acc[r*k+c])
		}
		if g != nil {
			g.SetVec(r, gv[r])
		}
	}
}

// LevenbergMarquardt minimises Σ w_i (y_i − m_i(p))² from p0 (Marquardt,
// J. Soc. Ind. Appl. Math. 11 (1963) 431), projecting each step onto the
// bounds. It stops when a step lowers χ² by less than 1e-4 or
// the predicted decrease is below 1e-6: such changes move no parameter by
// more than about 1 % of its esd.
func LevenbergMarquardt(prob *Problem, p0 []float64, maxIter int) (*Solution, error) {
	n := len(prob.Y)
	np := len(p0)
	var idx []int
	for j := 0; j < np; j++ {
		if prob.Free[j] {
			idx = append(idx, j)
		}
	}
	k := len(idx)
	if k == 0 || n <= k {
		return nil, ErrSingular
	}
	p := append([]float64(nil), p0...)
	sc := lmPool.Get().(*lmScratch)
	defer lmPool.Put(sc)
	f, col := sc.take(3*n+n*np+np+4*k*k+5*k, k)
	cut := func(l int) []float64 {
		s := f[:l:l]
		f = f[l:]
		return s
	}
	m := cut(n)
	jac := cut(n * np)
	chi2 := func(p []float64, m []float64) float64 {
		prob.Eval(p, m, nil)
		var s float64
		for i := range m {
			d := prob.Y[i] - m[i]
			s += prob.W[i] * d * d
		}
		return s
	}
	cur := chi2(p, m)
	lambda := 1e-3
	a := mat.NewSymDense(k, cut(k*k))
	damped := cut(k * k)
	chol := cut(k * k)
	g := mat.NewVecDense(k, cut(k))
	trial := cut(np)
	mt := cut(n)
	delta := mat.NewVecDense(k, cut(k))
	ws := cut(k*k + 2*k)
	tol := prob.ChiTol
	if tol == 0 {
		tol = 1e-4
	}
	iter := 0
	// fresh: the normal matrix a was formed at the current p.
	fresh := false
	for done := false; iter < maxIter && !done; iter++ {
		prob.Eval(p, m, jac)
		normal(prob, idx, np, m, jac, a, g, ws, col)
		fresh = true
		improved := false
		for tries := 0; tries < 10; tries++ {
			for r := 0; r < k; r++ {
				for c := 0; c < k; c++ {
					damped[r*k+c] = a.At(r, c)
				}
				d := a.At(r, r)
				if d == 0 {
					d = 1
				}
				damped[r*k+r] = d * (1 + lambda)
			}
			if !cholSolve(damped, k, g.RawVector().Data, delta.RawVector().Data, chol) {
				lambda *= 10
				continue
			}
			// Predicted decrease of χ² for this step (δ·g to first order);
			// at the minimum it is negligible and the search ends.
			if pred := mat.Dot(delta, g); pred < tol*1e-2 {
				done = true
				improved = true
				break
			}
			copy(trial, p)
			for r, j := range idx {
				trial[j] = math.Min(math.Max(p[j]+delta.AtVec(r), prob.Lo[j]), prob.Hi[j])
			}
			c := chi2(trial, mt)
			if c <= cur {
				dec := cur - c
				rel := dec / math.Max(cur, 1e-300)
				copy(p, trial)
				fresh = false
				cur = c
				lambda = math.Max(lambda/10, 1e-9)
				improved = true
				// Δχ² of 1e-4 moves no parameter by more than 1 % of
				// its esd.
				done = rel < 1e-12 || dec < tol || smallStep(delta, a)
				break
			}
			lambda *= 10
		}
		if !improved {
			break
		}
	}
	// Covariance at the solution. A parameter with no influence (the
	// position of a peak whose height went to zero) is left out and gets
	// an infinite variance.
	if !fresh {
		prob.Eval(p, m, jac)
		normal(prob, idx, np, m, jac, a, nil, ws, col)
	}
	var keep []int
	var dmax float64
	for r := 0; r < k; r++ {
		dmax = math.Max(dmax, a.At(r, r))
	}
	// Parameters differ in scale by many orders (a position in degrees,
	// a height in counts), so influence is judged on the matrix scaled to
	// unit diagonal: only an exactly (to rounding) vanishing column is
	// left out.
	for r := 0; r < k; r++ {
		if a.At(r, r) > 1e-300 && a.At(r, r) > 1e-30*dmax {
			keep = append(keep, r)
		}
	}
	kk := len(keep)
	if kk == 0 {
		return nil, ErrSingular
	}
	scale := make([]float64, kk)
	for r := range scale {
		scale[r] = 1 / math.Sqrt(a.At(keep[r], keep[r]))
	}
	ak := mat.NewSymDense(kk, nil)
	for r := 0; r < kk; r++ {
		for c := r; c < kk; c++ {
			ak.SetSym(r, c, a.At(keep[r], keep[c])*scale[r]*scale[c])
		}
	}
	var fac mat.Cholesky
	if !fac.Factorize(ak) {
		return nil, ErrSingular
	}
	var inv mat.SymDense
	if err := fac.InverseTo(&inv); err != nil {
		return nil, ErrSingular
	}
	cov := mat.NewSymDense(np, nil)
	for r := 0; r < k; r++ {
		cov.SetSym(idx[r], idx[r], math.Inf(1))
	}
	for r := 0; r < kk; r++ {
		for c := r; c < kk; c++ {
			cov.SetSym(idx[keep[r]], idx[keep[c]], inv.At(r, c)*scale[r]*scale[c])
		}
	}
	return &Solution{P: p, Cov: cov, Chi2: cur, DOF: n - k, Iter: iter}, nil
}

// smallStep reports whether every component of the step is below 1e-3 of
// the parameter's precision, estimated as 1/√A_jj.
func smallStep(delta *mat.VecDense, a *mat.SymDense) bool {
	for r := 0; r < delta.Len(); r++ {
		if math.Abs(delta.AtVec(r))*math.Sqrt(a.At(r, r)) > 1e-3 {
			return false
		}
	}
	return true
}

// cholSolve solves A·x = b for the symmetric positive-definite k×k matrix
// A (row-major in a) by its Cholesky factor, made in l (k·k scratch). It
// reports false when A is not numerically positive definite. The damped
// normal matrices of the line fits are small and well scaled; this
// avoids the condition estimate that a general factorisation makes.
func cholSolve(a []float64, k int, b, x, l []float64) bool {
	for i := 0; i < k; i++ {
		for j := 0; j <= i; j++ {
			s := a[i*k+j]
			for q := 0; q < j; q++ {
				s -= l[i*k+q] * l[j*k+q]
			}
			if i == j {
				if !(s > 1e-300*math.Abs(a[i*k+i])) || !(s > 0) {
					return false
				}
				l[i*k+i] = math.Sqrt(s)
			} else {
				l[i*k+j] = s / l[j*k+j]
			}
		}
	}
	// L·y = b, then Lᵀ·x = y.
	for i := 0; i < k; i++ {
		s := b[i]
		for q := 0; q < i; q++ {
			s -= l[i*k+q] * x[q]
		}
		x[i] = s / l[i*k+i]
	}
	for i := k - 1; i >= 0; i-- {
		s := x[i]
		for q := i + 1; q < k; q++ {
			s -= l[q*k+i] * x[q]
		}
		x[i] = s / l[i*k+i]
	}
	for _, v := range x[:k] {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return false
		}
	}
	return true
}
