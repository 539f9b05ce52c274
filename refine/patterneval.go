package refine

import (
	"math"

	"reticle/profile"
)

// A sparseRow is one point's weighted Jacobian row: the derivatives
// ∂c/∂p / σ of the shared parameters, and those of the intensities of
// the lines near the point (within jacReach widths).
type sparseRow struct {
	g     []float64
	near  []int32
	nearV []float64
}

// A jacobian is the Jacobian at one set of parameters: its rows, and the
// far lines' share of the intensities' gradient, which evaluate sums
// directly so that no row holds those derivatives.
type jacobian struct {
	rows []sparseRow
	far  []float64
}

// evaluate returns the weighted residuals (y − c)/σ, the calculated
// curve and the background at every point, and fills jac, when not nil,
// with the Jacobian (its slices are reused from call to call). When only
// is a phase's index, the curve holds that phase's lines alone (no
// background); −1 means all.
func (pf *patternFit) evaluate(p []float64, jac *jacobian, only int) (res, calc, bg []float64) {
	ls := pf.lines(p)
	n := len(pf.x)
	res, calc, bg = make([]float64, n), make([]float64, n), make([]float64, n)
	var rows []sparseRow
	if jac != nil {
		if len(jac.rows) != n {
			jac.rows = make([]sparseRow, n)
		}
		if len(jac.far) != len(pf.refl) {
			jac.far = make([]float64, len(pf.refl))
		}
		clear(jac.far)
		rows = jac.rows
	}
	var farK []int
	var farV []float64
	// Lines in order of position: a window of lines slides along the
	// points.
	first := 0
	for i, x := range pf.x {
		var c float64
		if only < 0 {
			for j, b := range pf.cheb[i] {
				c += p[pf.iBg+j] * b
			}
		}
		bg[i] = c
		var row *sparseRow
		if rows != nil {
			row = &rows[i]
			if row.g == nil {
				row.g = make([]float64, pf.iI)
			}
			clear(row.g)
			copy(row.g[pf.iBg:], pf.cheb[i])
			row.near, row.nearV = row.near[:0], row.nearV[:0]
			farK, farV = farK[:0], farV[:0]
		}
		for first < len(ls) && (!ls[first].ok || ls[first].hi < x) {
			first++
		}
		for k := first; k < len(ls); k++ {
			l := &ls[k]
			if !l.ok {
				continue
			}
			if l.lo > x {
				// Lines start in order of position (to within the
				// slow change of the reach with angle).
				break
			}
			ph := &pf.phases[pf.refl[k].phase]
			if only >= 0 && pf.refl[k].phase != only {
				continue
			}
			amp := p[pf.iI+k]
			var dI float64
			near := false
			for _, cp := range l.comp[:l.n] {
				if math.Abs(x-cp.tt) > l.reach {
					continue
				}
				fa, daf := profile.TailedAreaFactor(cp.eta, pf.tail)
				norm := cp.scale / (cp.w * fa)
				if row == nil {
					a := profile.LineShape(x, cp.tt, cp.w, cp.eta, cp.asym, pf.tail) * norm
					c += amp * a
					continue
				}
				f, dx0, dw, deta, dasym := profile.LineGrad(x, cp.tt, cp.w, cp.eta, cp.asym, pf.tail)
				a := f * norm // area-normalised line
				c += amp * a
				dI += a
				near = near || math.Abs(x-cp.tt) <= jacReach*cp.w*(1+math.Abs(cp.asym))
				dpos := amp * dx0 * norm
				for j, d := range cp.dR {
					row.g[ph.iR+j] += dpos * d
				}
				for j, ci := range pf.corr {
					row.g[j] += dpos * cp.dC[ci]
				}
				dwid := amp * (dw*norm - a/cp.w)
				dmix := amp * (deta*norm - a*daf/fa)
				for j := 0; j < nProfile; j++ {
					row.g[ph.profileIndex(j)] += dwid*cp.gw[j] + dmix*cp.ge[j]
				}
				if cp.free {
					da, f := amp*dasym*norm, 1.0
					for j := 0; j < pf.nA; j++ {
						row.g[pf.iA+j] += da * f
						f *= cp.tA
					}
				}
			}
			if row != nil && dI != 0 {
				if near {
					row.near, row.nearV = append(row.near, int32(k)), append(row.nearV, dI)
				} else {
					farK, farV = append(farK, k), append(farV, dI)
				}
			}
		}
		calc[i] = c
		res[i] = (pf.y[i] - c) / pf.sig[i]
		if row != nil {
			s := 1 / pf.sig[i]
			for j := range row.g {
				row.g[j] *= s
			}
			for j := range row.nearV {
				row.nearV[j] *= s
			}
			for j, k := range farK {
				jac.far[k] += farV[j] * s * res[i]
			}
		}
	}
	return res, calc, bg
}
