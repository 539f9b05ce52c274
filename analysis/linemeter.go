package analysis

import (
	"math"
	"sort"

	"gonum.org/v1/gonum/mat"

	"reticle/internal/order"
	"reticle/peaks"
	"reticle/profile"
	"reticle/refine"
)

// widths returns the FWHM of the scan's lines at 2θ, degrees: the width
// curve of its well-determined peaks, or, when the extraction found too
// few to draw one, the median width of its peaks (taken once).
func (e *Extraction) widths() func(tt float64) float64 {
	var ws []float64
	for _, p := range e.peaks() {
		if p.FWHM > 0 {
			ws = append(ws, p.FWHM)
		}
	}
	flat := 0.0
	if len(ws) > 0 {
		flat = order.Median(ws)
	}
	curve := e.Result.FWHMCurve
	return func(tt float64) float64 {
		if w := curve.At(tt); w > 1e-4 {
			return w
		}
		return flat
	}
}

// A lineMeter measures the intensity of a line at a given position on
// the residual of a whole-pattern fit, with a straight background of
// its own under the line (see amplitude).
type lineMeter struct {
	e     *Extraction
	width func(tt float64) float64 // the lines' FWHM, degrees (Extraction.widths)
	x     []float64                // degrees 2θ
	r     []float64                // observed − calculated, counts
	sig   []float64                // the points' esds, counts
	ratio float64                  // K-alpha2 to K-alpha1, 0 for one line
}

func newLineMeter(e *Extraction, calc []float64, width func(tt float64) float64) *lineMeter {
	sc := e.Scan
	m := &lineMeter{e: e, width: width, x: sc.TwoTheta, r: make([]float64, sc.Len()), sig: make([]float64, sc.Len())}
	ns := math.Max(e.Result.NoiseScale, 1)
	for i := range m.r {
		m.r[i] = sc.Intensity[i] - calc[i]
		m.sig[i] = ns * sc.Sigma(i)
	}
	if rad := e.Result.Radiation; rad.Doublet() {
		m.ratio = rad.Ratio2
	}
	return m
}

// shape returns the profile of a line at x0 whose K-alpha1 part has
// area 1 (with its K-alpha2 companion of the radiation's ratio): the
// extraction's width curve, mixing, asymmetry and tails.
func (m *lineMeter) shape(x0 float64) func(x float64) float64 {
	res := m.e.Result
	w := m.width(x0)
	eta, tail := res.Eta, math.Max(res.TailRatio, 1)
	area, _ := profile.TailedAreaFactor(eta, tail)
	area *= w
	x2 := math.NaN()
	if m.ratio > 0 {
		x2 = peaks.Companion(x0, res.Radiation.Lambda1, res.Radiation.Lambda2)
	}
	asym := res.Asymmetry.At(x0)
	return func(x float64) float64 {
		f := profile.LineShape(x, x0, w, eta, asym, tail)
		if !math.IsNaN(x2) {
			f += m.ratio * profile.LineShape(x, x2, w, eta, asym, tail)
		}
		return f / area
	}
}

// amplitude returns the integrated intensity (counts × degrees 2θ,
// K-alpha1 part) of a line at x0 and its esd, fitted by weighted least
// squares to the residual plus own·(the line's profile) — own is the
// line's intensity in the fit when the fit has the line, zero when it
// has not — together with a straight line a + b(x − x0) over the window
// from meterWidths widths below x0 to as far above its K-alpha2
// companion. The straight line takes up a background the fit's smooth
// curve misses locally (a hump, a tail of the profile model), which
// would otherwise be counted as the line's intensity. The esd is
// multiplied by the window's √χ²_red when that exceeds 1. ok is false
// when the window holds too few points to fit the three terms.
func (m *lineMeter) amplitude(x0, own float64) (a, sa float64, ok bool) {
	g := m.shape(x0)
	w := m.width(x0)
	hi := x0
	if m.ratio > 0 {
		res := m.e.Result
		hi = peaks.Companion(x0, res.Radiation.Lambda1, res.Radiation.Lambda2)
	}
	i0 := sort.SearchFloat64s(m.x, x0-meterWidths*w)
	i1 := sort.SearchFloat64s(m.x, hi+meterWidths*w)
	n := i1 - i0
	if n < meterPoints {
		return 0, 0, false
	}
	design := mat.NewDense(n, 3, nil)
	rhs := mat.NewVecDense(n, nil)
	for k := 0; k < n; k++ {
		i := i0 + k
		s := m.sig[i]
		if !(s > 0) {
			s = 1
		}
		gi := g(m.x[i])
		design.Set(k, 0, 1/s)
		design.Set(k, 1, (m.x[i]-x0)/(w*s))
		design.Set(k, 2, gi/s)
		rhs.SetVec(k, (m.r[i]+own*gi)/s)
	}
	var qr mat.QR
	qr.Factorize(design)
	var sol mat.VecDense
	if err := qr.SolveVecTo(&sol, false, rhs); err != nil {
		return 0, 0, false
	}
	var fit mat.VecDense
	fit.MulVec(design, &sol)
	var chi2 float64
	for k := 0; k < n; k++ {
		d := rhs.AtVec(k) - fit.AtVec(k)
		chi2 += d * d
	}
	var rd mat.Dense
	qr.RTo(&rd)
	rr := mat.NewTriDense(3, mat.Upper, nil)
	for i := 0; i < 3; i++ {
		for j := i; j < 3; j++ {
			rr.SetTri(i, j, rd.At(i, j))
		}
	}
	var inv mat.TriDense
	if err := inv.InverseTri(rr); err != nil {
		return 0, 0, false
	}
	// (RᵀR)⁻¹ = R⁻¹R⁻ᵀ; the amplitude's variance is row 2 of R⁻¹ squared.
	var v float64
	for j := 0; j < 3; j++ {
		v += inv.At(2, j) * inv.At(2, j)
	}
	v *= math.Max(chi2/float64(n-3), 1)
	return sol.AtVec(2), math.Sqrt(v), true
}

// The window of a measured line: meterWidths FWHM on either side, where
// a pseudo-Voigt line has fallen to a few per cent of its height, so the
// straight line under it is set by the points beside it; and at least
// meterPoints points, twice the three terms and more.
const (
	meterWidths = 4.0
	meterPoints = 8
)

// measure returns the reflections with their intensities and esds
// measured on the fit's residual (lineMeter.amplitude): those the fit
// has (own) with their fitted intensity added back, the others on the
// residual as it is. Reflections whose window is too short are left out.
func (m *lineMeter) measure(rs []refine.PatternReflection, own bool) []refine.PatternReflection {
	var out []refine.PatternReflection
	for _, r := range rs {
		add := 0.0
		if own {
			add = r.Intensity
		}
		a, sa, ok := m.amplitude(r.TwoTheta, add)
		if !ok {
			continue
		}
		r.Intensity, r.IntensityESD = a, sa
		out = append(out, r)
	}
	return out
}
