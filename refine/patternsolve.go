package refine

import (
	"context"
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"

	"reticle/cell"
	"reticle/profile"
)

// A sparseRow is one point's weighted residual and the nonzero entries
// of its weighted Jacobian row.
type sparseRow struct {
	idx []int
	val []float64
}

// evaluate returns the weighted residuals (y − c)/σ, the calculated
// curve and the background at every point, and, when rows is not nil,
// the Jacobian's rows ∂c/∂p / σ.
func (pf *patternFit) evaluate(p []float64, rows []sparseRow) (res, calc, bg []float64) {
	ls := pf.lines(p)
	n := len(pf.x)
	res, calc, bg = make([]float64, n), make([]float64, n), make([]float64, n)
	eta := p[pf.iU+3]
	af := profile.AreaFactor(eta)
	daf := math.Pi/2 - math.Sqrt(math.Pi/(4*math.Ln2)) // dAF/dη
	// Lines sorted by position come from increasing Q; a window of
	// candidate lines slides along the points.
	first := 0
	for i, x := range pf.x {
		cb := pf.cheb[i]
		var c float64
		for j, b := range cb {
			c += p[pf.iBg+j] * b
		}
		bg[i] = c
		var row *sparseRow
		if rows != nil {
			row = &rows[i]
			row.idx, row.val = row.idx[:0], row.val[:0]
			// Globals first: cell, corrections, U, V, W, eta, background.
			for j := 0; j < pf.iI; j++ {
				row.idx = append(row.idx, j)
				row.val = append(row.val, 0)
			}
			for j, b := range cb {
				row.val[pf.iBg+j] = b
			}
		}
		for first < len(ls) && (!ls[first].ok || maxPos(ls[first])+ls[first].reach < x) {
			first++
		}
		for k := first; k < len(ls); k++ {
			l := ls[k]
			if !l.ok {
				continue
			}
			if l.tt1-l.reach > x {
				break
			}
			amp := p[pf.iI+k]
			var dI float64
			add := func(tt, w float64, g [3]float64, dR []float64, dc shifts, scale float64) {
				if math.IsNaN(tt) || math.Abs(x-tt) > l.reach {
					return
				}
				f, dx0, dw, deta, _ := profile.LineGrad(x, tt, w, eta, 0, 1)
				norm := scale / (w * af)
				a := f * norm // area-normalised line
				c += amp * a
				dI += a
				if row == nil {
					return
				}
				dpos := amp * dx0 * norm
				for j := 0; j < pf.nr; j++ {
					row.val[j] += dpos * dR[j]
				}
				for j, ci := range pf.corr {
					row.val[pf.nr+j] += dpos * dc[ci]
				}
				dwid := amp * (dw*norm - a/w)
				row.val[pf.iU] += dwid * g[0]
				row.val[pf.iU+1] += dwid * g[1]
				row.val[pf.iU+2] += dwid * g[2]
				row.val[pf.iU+3] += amp * (deta*norm - a*daf/af)
			}
			add(l.tt1, l.w1, l.g1, l.d1, l.c1, 1)
			if pf.m2 != nil {
				add(l.tt2, l.w2, l.g2, l.d2, l.c2, pf.ratio)
			}
			if row != nil && dI != 0 {
				row.idx = append(row.idx, pf.iI+k)
				row.val = append(row.val, dI)
			}
		}
		calc[i] = c
		res[i] = (pf.y[i] - c) / pf.sig[i]
		if row != nil {
			for j := range row.val {
				row.val[j] /= pf.sig[i]
			}
		}
	}
	return res, calc, bg
}

// maxPos is the highest position of a reflection's lines.
func maxPos(l line) float64 {
	if !math.IsNaN(l.tt2) {
		return math.Max(l.tt1, l.tt2)
	}
	return l.tt1
}

// normalEquations returns JᵀJ and Jᵀr over the sparse rows.
func normalEquations(rows []sparseRow, res []float64, k int) (*mat.SymDense, []float64) {
	a := make([]float64, k*k)
	g := make([]float64, k)
	for i, row := range rows {
		for u, iu := range row.idx {
			vu := row.val[u]
			if vu == 0 {
				continue
			}
			g[iu] += vu * res[i]
			// The indices increase along a row: the upper triangle is
			// the rest of the row.
			ar := a[iu*k:]
			for v := u; v < len(row.idx); v++ {
				ar[row.idx[v]] += vu * row.val[v]
			}
		}
	}
	for i := 0; i < k; i++ {
		for j := 0; j < i; j++ {
			a[i*k+j] = a[j*k+i]
		}
	}
	return mat.NewSymDense(k, a), g
}

// patternSolution is the state at the end of the iterations.
type patternSolution struct {
	p        []float64
	calc, bg []float64
	a        *mat.SymDense // JᵀJ at p
	chi2     float64
}

// convergedShare is the relative decrease of χ² below which the fit has
// converged: with χ² ≈ N points it moves no parameter by more than a few
// per cent of its esd.
const convergedShare = 1e-6

// solve runs Levenberg–Marquardt (Marquardt 1963) with the diagonal
// damping, projecting each step onto the bounds (intensities and U, W
// not below zero, η within 0..1).
func (pf *patternFit) solve(ctx context.Context, p []float64, maxIter int, fixed []bool) (*patternSolution, int, error) {
	k := len(p)
	rows := make([]sparseRow, len(pf.x))
	res, calc, bg := pf.evaluate(p, rows)
	chi := sumSq(res)
	lambda := 1e-3
	iter := 0
	for ; iter < maxIter; iter++ {
		if err := ctx.Err(); err != nil {
			return nil, iter, err
		}
		a, g := normalEquations(rows, res, k)
		// Fixed parameters: their rows and columns out, a unit diagonal.
		for j, f := range fixed {
			if !f {
				continue
			}
			for i := 0; i < k; i++ {
				a.SetSym(i, j, 0)
			}
			a.SetSym(j, j, 1)
			g[j] = 0
		}
		// Intensities at their bound that the gradient pushes further
		// out are held for this step (an active set): a projected step
		// would otherwise be cut short on every iteration.
		for j := pf.iI; j < k; j++ {
			if p[j] <= 0 && g[j] <= 0 {
				for i := 0; i < k; i++ {
					a.SetSym(i, j, 0)
				}
				a.SetSym(j, j, 1)
				g[j] = 0
			}
		}
		// The equations scaled to a unit diagonal (the parameters'
		// units differ by many orders: reciprocal coefficients near
		// 0.01 Å⁻², intensities in the thousands), so that Marquardt's
		// damping of the diagonal is λ·I and the solve stays well
		// conditioned.
		sc := make([]float64, k)
		for j := range sc {
			if d := a.At(j, j); d > 0 {
				sc[j] = 1 / math.Sqrt(d)
			} else {
				sc[j] = 1
			}
		}
		scaled := mat.NewSymDense(k, nil)
		for i := 0; i < k; i++ {
			for j := i; j < k; j++ {
				scaled.SetSym(i, j, a.At(i, j)*sc[i]*sc[j])
			}
		}
		gs := make([]float64, k)
		for j := range gs {
			gs[j] = g[j] * sc[j]
		}
		improved := false
		for try := 0; try < 12; try++ {
			damped := mat.NewSymDense(k, nil)
			damped.CopySym(scaled)
			for j := 0; j < k; j++ {
				damped.SetSym(j, j, scaled.At(j, j)+lambda)
			}
			var ch mat.Cholesky
			if !ch.Factorize(damped) {
				lambda *= 10
				continue
			}
			var step mat.VecDense
			if err := ch.SolveVecTo(&step, mat.NewVecDense(k, gs)); err != nil {
				var cond mat.Condition
				if !errors.As(err, &cond) {
					lambda *= 10
					continue
				}
				// Ill conditioned: the step is still the
				// solution, and the χ² test below judges it.
			}
			q := make([]float64, k)
			for j := range q {
				q[j] = p[j] + step.AtVec(j)*sc[j]
			}
			pf.project(q)
			r2, c2, b2 := pf.evaluate(q, nil)
			if c := sumSq(r2); c < chi {
				rel := (chi - c) / chi
				p, res, calc, bg, chi = q, r2, c2, b2, c
				res, calc, bg = pf.evaluate(p, rows)
				// A small decrease counts as convergence only
				// with a step near Gauss–Newton's: a heavily
				// damped step is small whatever the distance
				// to the minimum.
				improved = rel >= convergedShare || lambda > 1e-2
				lambda = math.Max(lambda/10, 1e-9)
				break
			}
			lambda *= 10
		}
		if !improved {
			iter++
			break
		}
	}
	if math.IsNaN(chi) || math.IsInf(chi, 0) {
		return nil, iter, fmt.Errorf("%w: the fit diverged (χ² not finite); the cell is far from the data", ErrPattern)
	}
	a, _ := normalEquations(rows, res, k)
	return &patternSolution{p: p, calc: calc, bg: bg, a: a, chi2: chi}, iter, nil
}

// project holds parameters to their bounds.
func (pf *patternFit) project(q []float64) {
	q[pf.iU] = math.Max(q[pf.iU], 0)
	q[pf.iU+2] = math.Max(q[pf.iU+2], 1e-6)
	q[pf.iU+3] = math.Min(math.Max(q[pf.iU+3], 0), 1)
	for j := pf.iI; j < len(q); j++ {
		q[j] = math.Max(q[j], 0)
	}
}

// result turns the solution into a PatternResult, with the covariance
// (JᵀJ)⁻¹ scaled by χ²_red when that exceeds 1.
func (pf *patternFit) result(s *patternSolution, iter int, opt PatternOptions) (*PatternResult, error) {
	k := len(s.p)
	n := len(pf.x)
	dof := n - k
	out := &PatternResult{Corrections: opt.Corrections & (Zero | Displacement), Calc: s.calc, Background: s.bg,
		Points: n, Parameters: k, Iterations: iter}
	// Agreement factors (pdCIF meanings).
	var sa, sy, swy2 float64
	for i := range pf.y {
		sa += math.Abs(pf.y[i] - s.calc[i])
		sy += math.Abs(pf.y[i])
		w := 1 / (pf.sig[i] * pf.sig[i])
		swy2 += w * pf.y[i] * pf.y[i]
	}
	out.Chi2 = s.chi2 / float64(dof)
	out.GoF = math.Sqrt(out.Chi2)
	out.Rp = sa / sy
	out.Rwp = math.Sqrt(s.chi2 / swy2)
	out.Rexp = math.Sqrt(float64(dof) / swy2)
	// Covariance: parameters no point depends on (a reflection outside
	// the range) are held out of the inverse.
	var live []int
	for j := 0; j < k; j++ {
		if s.a.At(j, j) > 0 {
			live = append(live, j)
		}
	}
	// Scaled to unit diagonal (the parameters' units differ by many
	// orders), inverted, and scaled back.
	d := make([]float64, len(live))
	for a, i := range live {
		d[a] = 1 / math.Sqrt(s.a.At(i, i))
	}
	sub := mat.NewSymDense(len(live), nil)
	for a, i := range live {
		for b, j := range live[a:] {
			sub.SetSym(a, a+b, s.a.At(i, j)*d[a]*d[a+b])
		}
	}
	var ch mat.Cholesky
	if !ch.Factorize(sub) {
		return nil, fmt.Errorf("%w: the parameters are not determined by the points (singular normal matrix)", ErrPattern)
	}
	var inv mat.SymDense
	if err := ch.InverseTo(&inv); err != nil {
		return nil, fmt.Errorf("%w: the parameters are not determined by the points: %w", ErrPattern, err)
	}
	for a := range live {
		for b := a; b < len(live); b++ {
			inv.SetSym(a, b, inv.At(a, b)*d[a]*d[b])
		}
	}
	scale := 1.0
	if out.Chi2 > 1 {
		scale, out.Scaled = out.Chi2, true
	}
	// pos[j] is parameter j's place among the live ones, −1 for none.
	pos := make([]int, k)
	for j := range pos {
		pos[j] = -1
	}
	for x, l := range live {
		pos[l] = x
	}
	// cov is the covariance of two parameters; an esd is zero for a
	// parameter no point depends on.
	cov := func(i, j int) float64 {
		if pos[i] < 0 || pos[j] < 0 {
			return 0
		}
		return inv.At(pos[i], pos[j]) * scale
	}
	// The cell and its covariance through the reciprocal coefficients.
	m := pf.m1
	c, err := m.cellOf(s.p[:pf.nr], pf.cen)
	if err != nil {
		return nil, fmt.Errorf("%w: the refined cell is not a lattice: %w", ErrPattern, err)
	}
	j6 := c.ReciprocalToDirect()
	var c6 cell.Covariance
	for a := 0; a < 6; a++ {
		for b := 0; b < 6; b++ {
			var v float64
			for x := 0; x < pf.nr; x++ {
				for y := 0; y < pf.nr; y++ {
					v += j6[a][x] * cov(x, y) * j6[b][y]
				}
			}
			c6[a][b] = v
		}
	}
	out.Cell, out.Covariance = c, c6
	out.ESD = c6.ESD()
	out.Volume, out.VolumeESD = c.Volume(), c.VolumeESD(c6)
	params := c.Params()
	esds := [6]float64{out.ESD.A, out.ESD.B, out.ESD.C, out.ESD.Alpha, out.ESD.Beta, out.ESD.Gamma}
	for _, name := range c.System.FreeNames() {
		i := paramIndex(name)
		unit := "Å"
		if i >= 3 {
			unit = "°"
		}
		out.Params = append(out.Params, Param{Name: name, Unit: unit, Value: params[i], ESD: esds[i]})
	}
	for j, ci := range pf.corr {
		i := pf.nr + j
		out.Params = append(out.Params, Param{Name: corrNames[ci].name, Unit: corrNames[ci].unit, Value: s.p[i], ESD: math.Sqrt(cov(i, i))})
	}
	for j, name := range []string{"U", "V", "W", "eta"} {
		i := pf.iU + j
		unit := "°²"
		if name == "eta" {
			unit = ""
		}
		out.Params = append(out.Params, Param{Name: name, Unit: unit, Value: s.p[i], ESD: math.Sqrt(cov(i, i))})
	}
	ls := pf.lines(s.p)
	zero := 0
	for kk, r := range pf.refl {
		i := pf.iI + kk
		pr := PatternReflection{HKL: r.HKL, Mult: r.Mult, TwoTheta: ls[kk].tt1, Intensity: s.p[i], IntensityESD: math.Sqrt(cov(i, i))}
		if !ls[kk].ok || ls[kk].tt1 < pf.lo || ls[kk].tt1 > pf.hi {
			continue
		}
		if pr.Intensity == 0 {
			zero++
		}
		out.Reflections = append(out.Reflections, pr)
	}
	if zero > 0 {
		out.Warnings = append(out.Warnings, fmt.Sprintf("%d of %d reflections fitted to zero intensity (held at the bound; their esds are not meaningful)", zero, len(out.Reflections)))
	}
	if out.Rwp > 2*out.Rexp {
		// Common practice: a fit whose Rwp exceeds twice the counting
		// statistics' Rexp misses part of the pattern.
		out.Warnings = append(out.Warnings, fmt.Sprintf("Rwp is %.1f times Rexp: the cell or the profile model leaves part of the pattern unexplained (see the difference curve)", out.Rwp/out.Rexp))
	}
	if len(out.Reflections) > 0 && zero == len(out.Reflections) {
		return nil, fmt.Errorf("%w: every intensity went to zero: the cell does not describe the pattern", ErrPattern)
	}
	return out, nil
}
