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

// nProfile is the number of the main phase's profile parameters: U, V,
// W of the Gaussian width law (Caglioti, Paoletti & Ricci 1958), degrees²,
// and X, Y of the Lorentzian width X tan θ + Y / cos θ, degrees
// (strain and size broadening), combined into each line's FWHM and
// mixing by Thompson, Cox & Hastings (1987), profile.TCH.
const nProfile = 5

// lineWidth returns the FWHM and mixing of a line at 2θ tt for the
// profile whose parameters U, V, W, X and Y are p[idx[0]]..p[idx[4]] (its
// phase's, phaseFit.prof), and their derivatives with respect to those
// parameters. The Gaussian
// width is kept near minFWHM degrees or above (a line narrower than the
// scan's step has no shape the points can define); the Lorentzian width
// at least 0.
func lineWidth(p []float64, idx [nProfile]int, tt, minFWHM float64) (w, eta float64, gw, ge [nProfile]float64) {
	th := tt * deg / 2
	t, c := math.Tan(th), math.Cos(th)
	// The Gaussian width: √(m² + g²) for the law's g² ≥ 0 and
	// m·exp(g²/2m²) below, one smooth curve whose slope never
	// vanishes, so that a law driven negative can climb back.
	g2 := p[idx[profU]]*t*t + p[idx[profV]]*t + p[idx[profW]]
	m2 := minFWHM * minFWHM
	var gG, d float64 // width and ∂width/∂g²
	if g2 >= 0 {
		gG = math.Sqrt(m2 + g2)
		d = 1 / (2 * gG)
	} else {
		gG = minFWHM * math.Exp(g2/(2*m2))
		d = gG / (2 * m2)
	}
	dG := [3]float64{t * t * d, t * d, d}
	gL := p[idx[profX]]*t + p[idx[profY]]/c
	dL := [2]float64{t, 1 / c}
	if gL <= 0 {
		gL, dL = 0, [2]float64{}
	}
	w, eta, dwG, dwL, deG, deL := profile.TCH(gG, gL)
	for j := 0; j < 3; j++ {
		gw[j], ge[j] = dwG*dG[j], deG*dG[j]
	}
	for j := 0; j < 2; j++ {
		gw[3+j], ge[3+j] = dwL*dL[j], deL*dL[j]
	}
	return
}

// component is one line (K-alpha1 or K-alpha2) of a reflection at the
// current parameters.
type component struct {
	tt    float64           // position, degrees 2θ
	dR    []float64         // ∂2θ/∂ the phase's reciprocal coefficients
	dC    shifts            // ∂2θ/∂ each correction
	w     float64           // FWHM, degrees
	eta   float64           // Lorentzian fraction
	gw    [nProfile]float64 // ∂w/∂ each profile parameter
	ge    [nProfile]float64 // ∂η/∂ each profile parameter
	asym  float64           // the asymmetry A at tt
	tA    float64           // (2θ − 90°)/90°, the variable of the asymmetry law
	free  bool              // A lies inside its bounds (its terms act on it)
	scale float64           // 1, or the K-alpha2 ratio
}

// line is one reflection's components at the current parameters.
type line struct {
	comp   [2]component
	n      int     // components in range
	reach  float64 // half window, degrees
	lo, hi float64 // the window, degrees 2θ
	ok     bool
}

// asymmetryAt returns A at tt for the terms p[iA:iA+nA] of the law of
// profile.Asymmetry (unclamped, Poly), the law's variable t there, and
// whether A lies inside the bounds ±profile.MaxAsym (where its terms act
// on it).
func (pf *patternFit) asymmetryAt(p []float64, tt float64) (a, t float64, free bool) {
	if pf.nA == 0 {
		return 0, 0, false
	}
	var law profile.Asymmetry
	copy(law.C[:], p[pf.iA:pf.iA+pf.nA])
	a, t = law.Poly(tt), (tt-90)/90
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
			cp.w, cp.eta, cp.gw, cp.ge = lineWidth(p, ph.prof, cp.tt, pf.minFWHM)
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
		i := nearest(pf.x, c.tt)
		h := math.Max(pf.y[i]-p[pf.iBg], 0)
		af, _ := profile.TailedAreaFactor(c.eta, pf.tail)
		p[pf.iI+k] = h * c.w * af / float64(1+countNear(ls, c.tt, c.w))
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
