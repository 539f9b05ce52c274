package refine

import (
	"math"
	"sort"

	"reticle/profile"
)

// Reach of a line, in FWHM. The calculated curve follows each line to
// calcReach widths, beyond which a Lorentzian keeps under 0.04 % of its
// height. The curvature matrix JᵀJ of the least squares takes the
// products of intensities' derivatives to jacReach widths only (there a
// Lorentzian is under 0.4 % of its height, so an omitted product is
// under 2·10⁻⁵ of a diagonal term); the gradient Jᵀr takes every term,
// so the minimum found is the full model's and only the step direction
// and the esds' negligible share differ.
const (
	calcReach = 25
	jacReach  = 8
)

// width returns the FWHM at 2θ tt for the width law at p[iU:] and its
// derivatives with respect to U, V, W. The width is held at least
// minFWHM degrees (where it has no derivative): a line narrower than the
// scan's step has no shape the points can define.
func width(p []float64, iU int, tt, minFWHM float64) (w float64, g [3]float64) {
	t := math.Tan(tt * deg / 2)
	w2 := p[iU]*t*t + p[iU+1]*t + p[iU+2]
	if w2 <= minFWHM*minFWHM {
		return minFWHM, [3]float64{}
	}
	w = math.Sqrt(w2)
	return w, [3]float64{t * t / (2 * w), t / (2 * w), 1 / (2 * w)}
}

// component is one line (K-alpha1 or K-alpha2) of a reflection at the
// current parameters.
type component struct {
	tt    float64    // position, degrees 2θ
	dR    []float64  // ∂2θ/∂ the phase's reciprocal coefficients
	dC    shifts     // ∂2θ/∂ each correction
	w     float64    // FWHM, degrees
	gw    [3]float64 // ∂w/∂U, V, W
	asym  float64    // the asymmetry A at tt
	tA    float64    // (2θ − 90°)/90°, the variable of the asymmetry law
	free  bool       // A lies inside its bounds (its terms act on it)
	scale float64    // 1, or the K-alpha2 ratio
}

// line is one reflection's components at the current parameters.
type line struct {
	comp   [2]component
	n      int     // components in range
	reach  float64 // half window, degrees
	lo, hi float64 // the window, degrees 2θ
	ok     bool
}

// asymmetryAt returns A at tt for the terms p[iA:iA+nA] and whether it
// lies inside the bounds ±profile.MaxAsym.
func (pf *patternFit) asymmetryAt(p []float64, tt float64) (a, t float64, free bool) {
	if pf.nA == 0 {
		return 0, 0, false
	}
	t = (tt - 90) / 90
	f := 1.0
	for j := 0; j < pf.nA; j++ {
		a += p[pf.iA+j] * f
		f *= t
	}
	if math.Abs(a) > profile.MaxAsym {
		return math.Copysign(profile.MaxAsym, a), t, false
	}
	return a, t, true
}

// lines computes every reflection's lines at p.
func (pf *patternFit) lines(p []float64) []line {
	var corr shifts
	for j, i := range pf.corr {
		corr[i] = p[j]
	}
	out := make([]line, len(pf.refl))
	for k, rf := range pf.refl {
		ph := &pf.phases[rf.phase]
		r := p[ph.iR : ph.iR+ph.nr]
		l := &out[k]
		for c, m := range []*model{ph.m1, ph.m2} {
			if m == nil {
				continue
			}
			pt := m.eval(r, rf.HKL[0], corr)
			if !pt.inside {
				continue
			}
			cp := component{tt: pt.tt, dR: pt.dR, dC: pt.dCorr, scale: 1}
			if c == 1 {
				cp.scale = pf.ratio
			}
			cp.w, cp.gw = width(p, ph.iU, cp.tt, pf.minFWHM)
			cp.asym, cp.tA, cp.free = pf.asymmetryAt(p, cp.tt)
			l.comp[l.n] = cp
			l.n++
		}
		if l.n == 0 || l.comp[0].scale != 1 {
			// No K-alpha1 line: the reflection lies beyond 180°.
			*l = line{}
			continue
		}
		l.ok = true
		wmax := l.comp[0].w
		if l.n == 2 {
			wmax = math.Max(wmax, l.comp[1].w)
		}
		l.reach = calcReach * wmax * (1 + math.Abs(l.comp[0].asym))
		l.lo, l.hi = l.comp[0].tt-l.reach, l.comp[l.n-1].tt+l.reach
	}
	return out
}

// startLinear sets the background to the lowest counts and each
// intensity to the counts above it at the line.
func (pf *patternFit) startLinear(p []float64) {
	lo := math.Inf(1)
	for _, v := range pf.y {
		lo = math.Min(lo, v)
	}
	p[pf.iBg] = math.Max(lo, 0)
	ls := pf.lines(p)
	for k, l := range ls {
		if !l.ok {
			continue
		}
		c := l.comp[0]
		eta := p[pf.phases[pf.refl[k].phase].iU+3]
		i := nearest(pf.x, c.tt)
		h := math.Max(pf.y[i]-p[pf.iBg], 0)
		p[pf.iI+k] = h * c.w * profile.AreaFactor(eta) / float64(1+countNear(ls, c.tt, c.w))
	}
}

// nearest returns the index of the point nearest tt (x increasing).
func nearest(x []float64, tt float64) int {
	i := sort.SearchFloat64s(x, tt)
	switch {
	case i == len(x):
		return i - 1
	case i > 0 && tt-x[i-1] < x[i]-tt:
		return i - 1
	}
	return i
}

// countNear counts the other lines within a width of tt.
func countNear(ls []line, tt, w float64) int {
	n := 0
	for _, l := range ls {
		if l.ok && l.comp[0].tt != tt && math.Abs(l.comp[0].tt-tt) < w {
			n++
		}
	}
	return n
}
