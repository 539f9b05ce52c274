package indexing

import (
	"math"
	"sort"

	"gonum.org/v1/gonum/mat"

	"reticle/cell"
)

// A cand is a cell under test in any system: its conventional cell (with
// centring), the zero offset and, once assigned, the lines it indexes.
// Every search produces cands, and refinement, figures of merit and the
// ranking work on them alone.
type cand struct {
	c        cell.Cell
	zero     float64 // degrees 2θ, added to calculated angles
	zeroFree bool
	// disp is the coefficient of a shift disp·cos θ, degrees 2θ, added
	// to calculated angles: a specimen displacement s on a goniometer of
	// radius R gives −2s/R radians. Only the evidence refines it.
	disp     float64
	dispFree bool

	calc    []calcQ   // calculated reflections up to the assignment's qmax
	ref     []int     // per observed line: index into calc, −1 unindexed
	qc      []float64 // per observed line: calculated Q
	indexed int

	m       float64 // de Wolff M_N
	fn      float64 // Smith–Snyder F_N
	fnDelta float64 // mean |Δ2θ| of F_N, degrees
	nCalc   int     // distinct calculated lines up to the N-th line
	meanDQ  float64
	lastQ   float64
	chi2    float64 // Σ(Δ2θ/σ)² of the indexed first lines at the refined cell
	dof     int     // indexed first lines less the refined parameters
	miss    float64 // penalty factor of the unindexed first lines (1: none)
	strong  bool    // an unindexed first line is strong (see strongLine)

	ev    lineFit // evidence over all lines (see weigh)
	whole *cand   // the cand refined over all lines, for the evidence
	qTop  float64 // the least Q the calculated lines reach, Å⁻² (0: the lines')
	// weighAlways: the ranking takes the cand's evidence whatever its
	// figure on the first lines (a cell of the strong lines).
	weighAlways bool
	// once: weigh takes the evidence at the cand's own cell and offsets,
	// without refitting them to all lines (a provisional result).
	once bool
	// pairs holds the cand's evidence beside each cand weighed as its
	// second phase (see pairUp), so that a later ranking of the same
	// search does not take it again.
	pairs map[*cand]pairFit
}

// nparams returns the number of refined parameters: the system's free
// reciprocal coefficients, and the zero offset and the displacement
// shift when they are free.
func (k *cand) nparams() int {
	n := len(cell.Basis(k.c.System))
	if k.zeroFree {
		n++
	}
	if k.dispFree {
		n++
	}
	return n
}

// shift returns the shift of a line at tt degrees 2θ from its Bragg
// angle, degrees 2θ: the zero offset and the displacement shift.
func (k *cand) shift(tt float64) float64 {
	return k.zero + k.disp*math.Cos(tt*deg/2)
}

// setCalc lists the calculated lines of the cell up to qmax.
func (k *cand) setCalc(qmax float64) {
	k.calc = calcLines(k.c, math.Max(qmax, k.qTop), k.calc)
}

// nearest returns the index of the calculated line nearest to q within
// window w, or −1.
func (k *cand) nearest(q, w float64) int {
	cl := k.calc
	i := sort.Search(len(cl), func(i int) bool { return cl[i].q >= q })
	best, bd := -1, w
	for _, j := range []int{i - 1, i} {
		if j >= 0 && j < len(cl) {
			if d := math.Abs(cl[j].q - q); d <= bd {
				best, bd = j, d
			}
		}
	}
	return best
}

// assign indexes the lines with windows widened by extra degrees.
func (k *cand) assign(ls []obs, lambda, extra float64) {
	n := len(ls)
	if len(k.ref) != n {
		k.ref, k.qc = make([]int, n), make([]float64, n)
	}
	// The cell may have changed since the last assignment.
	k.setCalc(qOf(math.Min(ls[n-1].tt+ls[n-1].tol+extra+1, 179), k.zero-0.5, lambda))
	k.indexed = 0
	for i, o := range ls {
		q := qOf(o.tt, k.shift(o.tt), lambda)
		j := k.nearest(q, dQ(o.tt, o.tol+extra, lambda))
		k.ref[i] = j
		if j < 0 {
			continue
		}
		k.qc[i] = k.calc[j].q
		k.indexed++
	}
}

// weightFloor is the repeatability of a peak position on a laboratory
// diffractometer, degrees 2θ (common practice): a position is not
// reproducible to better than this whatever its fit says. It is added in
// quadrature to every line's esd in the refinements of the search, which
// keeps a few very sharp lines from steering it, and it is the smallest
// discrepancy the figures of merit credit (sub-millidegree fits of
// simulated or synchrotron data would otherwise reward extra parameters).
const weightFloor = 0.002

// refine fits the free reciprocal coefficients (and the zero offset and
// displacement shift when free) to the indexed lines by Gauss–Newton in
// 2θ, weights 1/(esd² + weightFloor²), each step solved by QR
// (gonum/mat). It reports false when the lines do not fix the
// parameters or the cell is not positive definite.
func (k *cand) refine(ls []obs, lambda float64) bool { return k.refineW(ls, lambda, nil, 0) }

// refineW is refine with the weights w (per line, in 1/degree²; nil: the
// default) and, when dispSD > 0, a restraint of the displacement shift
// to zero with that standard deviation (degrees 2θ; its prior).
func (k *cand) refineW(ls []obs, lambda float64, wt []float64, dispSD float64) bool {
	basis := cell.Basis(k.c.System)
	nr := len(basis)
	np := k.nparams()
	rows := 0
	for i := range ls {
		if k.ref[i] >= 0 {
			rows++
		}
	}
	if rows < np {
		return false
	}
	restrain := k.dispFree && dispSD > 0
	if restrain {
		rows++
	}
	r := k.c.ReciprocalFree()
	zero, disp := k.zero, k.disp
	a := mat.NewDense(rows, np, nil)
	b := mat.NewVecDense(rows, nil)
	grad := make([]float64, np)
	var x mat.VecDense
	for iter := 0; iter < 4; iter++ {
		f := cell.FormOf(k.c.System, r)
		row := 0
		for i, o := range ls {
			j := k.ref[i]
			if j < 0 {
				continue
			}
			tt, ok := k.gradient(k.calc[j].h, f, basis, lambda, grad)
			if !ok {
				return false
			}
			w := 1 / math.Sqrt(o.esd*o.esd+weightFloor*weightFloor)
			if wt != nil {
				w = math.Sqrt(wt[i])
			}
			for p, g := range grad {
				a.Set(row, p, g*w)
			}
			cos := math.Cos(tt * deg / 2)
			b.SetVec(row, (o.tt-zero-disp*cos-tt)*w)
			row++
		}
		if restrain {
			a.Set(row, np-1, 1/dispSD)
			b.SetVec(row, -disp/dispSD)
		}
		if err := x.SolveVec(a, b); err != nil {
			return false
		}
		for p := 0; p < nr; p++ {
			r[p] += x.AtVec(p)
		}
		c := nr
		if k.zeroFree {
			zero += x.AtVec(c)
			c++
		}
		if k.dispFree {
			disp += x.AtVec(c)
		}
	}
	c, err := cell.FormOf(k.c.System, r).Cell(k.c.System, k.c.Centring)
	if err != nil || math.IsNaN(zero) || math.IsNaN(disp) {
		return false
	}
	k.c, k.zero, k.disp = c, zero, disp
	return true
}

// gradient sets grad to the derivatives of the calculated angle of h
// with respect to the cand's parameters (the free reciprocal
// coefficients of basis under the form f, then the zero offset and the
// displacement shift when free), degrees 2θ per unit, and returns the
// angle's Bragg value; false when h has no reflection.
func (k *cand) gradient(h cell.HKL, f cell.QForm, basis []cell.QForm, lambda float64, grad []float64) (float64, bool) {
	q := f.Q(h)
	tt := ttOf(q, lambda)
	if !(q > 0) || math.IsNaN(tt) {
		return tt, false
	}
	dd := cell.DTwoThetaDQ(q, lambda)
	t := cell.Terms(h)
	for p, bv := range basis {
		var v float64
		for e := range t {
			v += bv[e] * t[e]
		}
		grad[p] = v * dd
	}
	c := len(basis)
	if k.zeroFree {
		grad[c] = 1
		c++
	}
	if k.dispFree {
		grad[c] = math.Cos(tt * deg / 2)
	}
	return tt, true
}

// settle indexes and refines until the assignment is stable: first with
// windows widened by extra, then with the lines' own. It reports false
// when fewer than need lines are indexed or the refinement fails.
func (k *cand) settle(ls []obs, lambda, extra float64, need int) bool {
	k.assign(ls, lambda, extra)
	if k.indexed < need || !k.refine(ls, lambda) {
		return false
	}
	var prev []int
	for pass := 0; pass < 6; pass++ {
		k.assign(ls, lambda, 0)
		if k.indexed < need || !k.refine(ls, lambda) {
			return false
		}
		if sameRefs(k, prev) {
			break
		}
		prev = append(prev[:0], k.hklKeys()...)
	}
	k.assign(ls, lambda, 0)
	return k.indexed >= need
}

// hklKeys returns a comparable list of the assignment (the first index
// vector of each line's calculated line, or a sentinel).
func (k *cand) hklKeys() []int {
	out := make([]int, 0, 3*len(k.ref))
	for _, j := range k.ref {
		if j < 0 {
			out = append(out, 1<<20, 0, 0)
			continue
		}
		h := k.calc[j].h
		out = append(out, h[0], h[1], h[2])
	}
	return out
}

func sameRefs(k *cand, prev []int) bool {
	cur := k.hklKeys()
	if len(cur) != len(prev) {
		return false
	}
	for i := range cur {
		if cur[i] != prev[i] {
			return false
		}
	}
	return true
}

// figures computes M_N, F_N, the χ² of the positions and the penalty of
// the unindexed lines over the first lines ls.
func (k *cand) figures(ls []obs, lambda float64) {
	n := len(ls)
	k.m, k.fn = 0, 0
	if n == 0 {
		return
	}
	k.lastQ = qOf(ls[n-1].tt, k.zero, lambda)
	var sq, stt, chi float64
	cnt := 0
	k.miss, k.strong = math.Pow(k.kappa(ls, lambda), 4), false
	for i, o := range ls {
		if k.ref[i] < 0 {
			k.miss *= missFactor(o.rel)
			if strongLine(o.rel) {
				k.strong = true
			}
			continue
		}
		q := qOf(o.tt, k.zero, lambda)
		sq += math.Max(math.Abs(q-k.qc[i]), dQ(o.tt, weightFloor, lambda))
		d := o.tt - k.zero - ttOf(k.qc[i], lambda)
		stt += math.Max(math.Abs(d), weightFloor)
		chi += d * d / (o.esd*o.esd + weightFloor*weightFloor)
		cnt++
	}
	if cnt == 0 {
		return
	}
	k.chi2, k.dof = chi, cnt-k.nparams()
	k.meanDQ = math.Max(sq/float64(cnt), 1e-12)
	k.fnDelta = math.Max(stt/float64(cnt), 1e-9)
	qn := k.lastQ
	if k.ref[n-1] >= 0 {
		qn = math.Max(qn, k.qc[n-1])
	}
	k.nCalc = countUpTo(k.calc, qn*(1+1e-9))
	if k.nCalc == 0 {
		return
	}
	// de Wolff: M = Q_N / (2 ε̄ N_calc); Smith & Snyder: F_N = N / (|Δ2θ| N_poss).
	k.m = k.lastQ / (2 * k.meanDQ * float64(k.nCalc))
	k.fn = float64(cnt) / (k.fnDelta * float64(k.nCalc))
}

// countUpTo returns the number of distinct calculated lines with Q ≤ q
// (lines closer than 1e-9 relative are one).
func countUpTo(cl []calcQ, q float64) int {
	n := 0
	prev := -1.0
	for _, r := range cl {
		if r.q > q {
			break
		}
		if prev < 0 || r.q-prev > 1e-9*r.q {
			n++
		}
		prev = r.q
	}
	return n
}

// minDOF is the fewest degrees of freedom (indexed lines less refined
// parameters) of a cell worth reporting.
const minDOF = 1

// score is M_N times (ν/n)², n the indexed first lines and ν = n − p the
// degrees of freedom left after fitting p parameters (the mean
// discrepancy of n lines fitted with p parameters understates their
// error by about ν/n, and the p lines spent fixing the parameters are no
// evidence for the cell: with few lines, many parameters fit anything),
// times the fourth power of the chance-corrected share of the first
// lines indexed (see kappa) and the strength penalty of those left
// unindexed (see missFactor). It orders the cells within a search, to
// keep the best for refinement; the ranking goes by the evidence.
func (k *cand) score() float64 {
	if k.dof < minDOF || k.indexed == 0 {
		return 0
	}
	f := float64(k.dof) / float64(k.indexed)
	s := k.m * f * f * k.miss
	return s
}

// kappa returns the share of the lines the cell indexes beyond what its
// calculated lines would catch by chance (in the manner of Cohen's κ): a
// line at Q is matched by chance with probability p = 2w·ρ(Q), ρ the
// density of calculated lines within ±5 % of Q and w the line's window in
// Q; with n lines, i indexed and Σp expected by chance, the share is
// (i − Σp)/(n − Σp), at least 1e-3. A cell with many calculated lines
// gains little from lines it would index anyway, and loses more by a line
// it cannot index.
func (k *cand) kappa(ls []obs, lambda float64) float64 {
	var chance float64
	// Distinct calculated Q (equivalent reflections are one line).
	cl := make([]float64, 0, len(k.calc))
	for _, r := range k.calc {
		if n := len(cl); n == 0 || r.q-cl[n-1] > 1e-9*r.q {
			cl = append(cl, r.q)
		}
	}
	for _, l := range ls {
		q := qOf(l.tt, k.zero, lambda)
		d := 0.05 * q
		lo := sort.SearchFloat64s(cl, q-d)
		hi := sort.SearchFloat64s(cl, q+d)
		rho := float64(hi-lo) / (2 * d)
		chance += math.Min(1, 2*dQ(l.tt, l.tol, lambda)*rho)
	}
	n := float64(len(ls))
	if chance >= n-1e-9 {
		return 1e-3
	}
	return math.Max(1e-3, (float64(k.indexed)-chance)/(n-chance))
}

// strongShare is the intensity, relative to the strongest line, from
// which an unindexed line is strong: more than a plausible impurity of a
// sample that is meant to be one phase gives (common practice).
const strongShare = 0.25

// strongLine reports whether a line of relative intensity rel (negative:
// unknown) is strong.
func strongLine(rel float64) bool { return rel >= strongShare }

// missFactor is the factor by which an unindexed line of relative
// intensity rel lowers a cell's score beyond its count (see kappa):
// exp(−4·rel), 1 for a line of unknown or negligible intensity, 0.67 at a
// tenth of the strongest line, 0.14 at a half.
func missFactor(rel float64) float64 {
	return math.Exp(-4 * math.Max(rel, 0))
}
