package indexing

import (
	"math"

	"reticle/cell"
)

// fit is a trial with its line assignments and figures of merit over the
// first lines.
type fit struct {
	trial
	m, l     []int     // index sums per line (m = n for cubic); -1 unindexed
	qc       []float64 // calculated Q per line
	indexed  int       // among the first lines
	m20      float64   // de Wolff M_N
	fn       float64   // Smith–Snyder F_N
	fnDelta  float64   // mean |Δ2θ| of F_N, degrees
	fnPoss   int       // possible lines up to the last line, for F_N
	nCalc    int       // distinct calculated lines up to the N-th line (M_N)
	meanDQ   float64   // mean |ΔQ| of the indexed lines
	lastQ    float64   // Q of the N-th line
	zeroFree bool
}

// assignAll indexes lines with windows widened by extra degrees.
func (f *fit) assignAll(ls []obs, lambda, extra float64) {
	n := len(ls)
	f.m, f.l, f.qc = make([]int, n), make([]int, n), make([]float64, n)
	f.indexed = 0
	for i, o := range ls {
		q := qOf(o.tt, f.zero, lambda)
		w := dQ(o.tt, o.tol+extra, lambda)
		m, l, qc, ok := f.assign(q, w)
		if !ok {
			f.m[i], f.l[i] = -1, -1
			continue
		}
		f.m[i], f.l[i], f.qc[i] = m, l, qc
		f.indexed++
	}
}

// refine fits (pa[, pc], zero) to the indexed lines by Gauss–Newton in 2θ,
// weighting each line by 1/(esd² + (0.005°)²). It reports false when the
// system is singular or the result unphysical.
func (f *fit) refine(ls []obs, lambda float64, zeroFree bool) bool {
	np := 2
	if f.sys == cell.Cubic {
		np = 1
	}
	if zeroFree {
		np++
	}
	var rows int
	for i := range ls {
		if f.m[i] >= 0 {
			rows++
		}
	}
	if rows <= np {
		return false
	}
	for iter := 0; iter < 4; iter++ {
		var a [3][3]float64
		var b, jrow [3]float64
		for i, o := range ls {
			if f.m[i] < 0 {
				continue
			}
			mq, lq := float64(f.m[i]), float64(f.l[i]*f.l[i])
			q := f.pa*mq + f.pc*lq
			th := lambda * math.Sqrt(q) / 2
			if th >= 1 {
				return false
			}
			tt := 2 * math.Asin(th) / deg
			// d(2θ)/dQ in degrees per Å⁻².
			dd := lambda / (2 * math.Sqrt(q) * math.Sqrt(1-th*th)) / deg
			r := o.tt - f.zero - tt
			jrow[0] = mq * dd
			k := 1
			if f.sys != cell.Cubic {
				jrow[1] = lq * dd
				k = 2
			}
			if zeroFree {
				jrow[k] = 1
			}
			w := 1 / (o.esd*o.esd + 0.005*0.005)
			for p := 0; p < np; p++ {
				b[p] += w * jrow[p] * r
				for s := p; s < np; s++ {
					a[p][s] += w * jrow[p] * jrow[s]
				}
			}
		}
		x, ok := solveSym(a, b, np)
		if !ok {
			return false
		}
		f.pa += x[0]
		k := 1
		if f.sys != cell.Cubic {
			f.pc += x[1]
			k = 2
		}
		if zeroFree {
			f.zero += x[k]
		}
		if !(f.pa > 0) || f.sys != cell.Cubic && !(f.pc > 0) {
			return false
		}
	}
	f.zeroFree = zeroFree
	return true
}

// precision is the smallest discrepancy, degrees 2θ, that the figures of
// merit credit: about the repeatability of a peak position on a laboratory
// diffractometer (common practice; sub-millidegree fits of simulated or
// synchrotron data would otherwise reward extra parameters).
const precision = 0.002

// figures computes M_N and F_N over the first n lines.
func (f *fit) figures(ls []obs, lambda float64) {
	n := len(ls)
	if n == 0 {
		return
	}
	f.lastQ = qOf(ls[n-1].tt, f.zero, lambda)
	var sq, stt float64
	cnt := 0
	for i, o := range ls {
		if f.m[i] < 0 {
			continue
		}
		// Discrepancies below the precision of a measured position
		// tell cells apart by noise only: they count as that precision.
		q := qOf(o.tt, f.zero, lambda)
		sq += math.Max(math.Abs(q-f.qc[i]), dQ(o.tt, precision, lambda))
		stt += math.Max(math.Abs(o.tt-f.zero-ttOf(f.qc[i], lambda)), precision)
		cnt++
	}
	if cnt == 0 {
		return
	}
	f.meanDQ = math.Max(sq/float64(cnt), 1e-12)
	f.fnDelta = math.Max(stt/float64(cnt), 1e-9)
	// Lines are counted up to the last observed one, or to its calculated
	// match when that lies a little beyond.
	qn := f.lastQ
	if f.m[n-1] >= 0 {
		qn = math.Max(qn, f.qc[n-1])
	}
	f.nCalc = f.countCalc(qn * (1 + 1e-9))
	f.fnPoss = f.nCalc
	if f.nCalc == 0 {
		return
	}
	// de Wolff: M = Q_N / (2 ε̄ N_calc); Smith & Snyder: F_N = N / (|Δ2θ| N_poss).
	f.m20 = f.lastQ / (2 * f.meanDQ * float64(f.nCalc))
	f.fn = float64(cnt) / (f.fnDelta * float64(f.fnPoss))
}

// solveSym solves the n×n (n ≤ 3) symmetric system whose upper triangle is
// in a by Gaussian elimination with partial pivoting; it reports false when
// the system is singular to working precision.
func solveSym(a [3][3]float64, b [3]float64, n int) ([3]float64, bool) {
	for i := 0; i < n; i++ {
		for j := 0; j < i; j++ {
			a[i][j] = a[j][i]
		}
	}
	scale := 0.0
	for i := 0; i < n; i++ {
		scale = math.Max(scale, math.Abs(a[i][i]))
	}
	for c := 0; c < n; c++ {
		p := c
		for r := c + 1; r < n; r++ {
			if math.Abs(a[r][c]) > math.Abs(a[p][c]) {
				p = r
			}
		}
		if math.Abs(a[p][c]) <= 1e-14*scale {
			return b, false
		}
		a[c], a[p] = a[p], a[c]
		b[c], b[p] = b[p], b[c]
		for r := c + 1; r < n; r++ {
			f := a[r][c] / a[c][c]
			for k := c; k < n; k++ {
				a[r][k] -= f * a[c][k]
			}
			b[r] -= f * b[c]
		}
	}
	var x [3]float64
	for r := n - 1; r >= 0; r-- {
		s := b[r]
		for k := r + 1; k < n; k++ {
			s -= a[r][k] * x[k]
		}
		x[r] = s / a[r][r]
	}
	return x, true
}
