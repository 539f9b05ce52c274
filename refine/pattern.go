package refine

import (
	"context"
	"errors"
	"fmt"
	"math"
	"sort"

	"reticle/cell"
	"reticle/profile"
)

// PatternOptions configure FitPattern.
type PatternOptions struct {
	// Lambda1 is the (K-alpha1) wavelength, Å; Lambda2 and Ratio2 the
	// K-alpha2 wavelength and intensity ratio, zero for one line.
	Lambda1, Lambda2, Ratio2 float64
	// Radius is the goniometer radius, mm; zero means DefaultRadius.
	Radius float64
	// Corrections are refined with the cell: Zero, Displacement or
	// both; None refines neither. Auto and Transparency are not taken
	// here.
	Corrections Corrections
	// Width and Eta start the profile: the Caglioti width law and the
	// Lorentzian fraction, e.g. those the peak extraction measured.
	// A zero Width means FWHM 0.1° everywhere; Eta 0 means 0.5.
	Width profile.Caglioti
	Eta   float64
	// Background is the number of Chebyshev terms of the background;
	// zero means DefaultBackgroundTerms.
	Background int
	// MaxIter bounds the Levenberg–Marquardt iterations; zero means 80.
	MaxIter int
}

// broadIter bounds the iterations of each broadened stage, which only
// draw the cell in: the last stage refines everything to convergence
// (BENCHMARKS.md has the bound's effect on the public sets).
const broadIter = 30

// DefaultBackgroundTerms is the number of Chebyshev polynomial terms of
// the background: a smooth curve over a laboratory scan's range (common
// practice uses 4 to 12).
const DefaultBackgroundTerms = 8

// A PatternReflection is one position of the fitted pattern: every
// reflection of one d-spacing (exact overlaps, which no fit can share
// out, take one intensity), with its integrated intensity (counts ×
// degrees 2θ, K-alpha1 part).
type PatternReflection struct {
	HKL          []cell.HKL
	Mult         int
	TwoTheta     float64 // K-alpha1, corrections included, degrees
	Intensity    float64
	IntensityESD float64 // zero when no point determines the intensity
}

// A PatternResult is a whole-pattern fit of one cell.
type PatternResult struct {
	Cell       cell.Cell
	ESD        cell.ESD
	Covariance cell.Covariance
	Volume     float64 // Å³
	VolumeESD  float64

	Corrections Corrections
	// Params are the refined cell, corrections and profile parameters
	// (U, V, W in degrees², eta) with their esds.
	Params      []Param
	Reflections []PatternReflection
	// Calc and Background are the fitted curve and its background at
	// each point.
	Calc, Background []float64
	// The agreement factors with the meanings of the pdCIF dictionary
	// (_pd_proc_ls_prof_R_factor, _wR_factor, _wR_expected): Rp =
	// Σ|y − c| / Σy, Rwp = √(Σw(y − c)² / Σwy²), Rexp = √((N − P) /
	// Σwy²); Chi2 = Σw(y − c)²/(N − P) and GoF = √Chi2.
	Rp, Rwp, Rexp, Chi2, GoF float64
	Points, Parameters       int
	Iterations               int
	// Scaled reports that the esds were multiplied by GoF (when it
	// exceeds 1: the points scatter more than their esds allow, as a
	// model short of the truth leaves them).
	Scaled   bool
	Warnings []string
}

// ErrPattern: the pattern cannot be fitted with the cell.
var ErrPattern = errors.New("whole-pattern fit")

// patternFit holds one fit's data and layout of parameters.
type patternFit struct {
	x, y, sig []float64
	m1, m2    *model
	ratio     float64
	cen       cell.Centring
	refl      []cell.Reflection
	corr      []int // indices in shifts of the refined corrections
	nr, nc    int   // reciprocal coefficients, corrections
	iU        int   // U, V, W, eta follow
	iBg, nb   int   // background terms
	iI        int   // first intensity
	lo, hi    float64
	cheb      [][]float64 // the background's Chebyshev terms at each point
}

// FitPattern fits every point of a scan (2θ x in degrees, counts y with
// esds sig) with the cell c, as Pawley (J. Appl. Cryst. 14 (1981) 357)
// described: the cell constrained by its system, a free integrated
// intensity for each distinct d-spacing (bounded below by zero), the
// K-alpha doublet with its ratio, the instrument corrections chosen, a
// Caglioti width law (Caglioti, Paoletti & Ricci 1958) with one
// pseudo-Voigt mixing η for all lines (symmetric lines: no asymmetry
// model yet), and a Chebyshev background. The least squares are solved by
// Levenberg–Marquardt over the sparse Jacobian (each point depends on the
// few lines near it). The context cancels the work between iterations.
func FitPattern(ctx context.Context, c cell.Cell, x, y, sig []float64, opt PatternOptions) (*PatternResult, error) {
	if err := c.Check(); err != nil {
		return nil, fmt.Errorf("%w: %w", ErrPattern, err)
	}
	if len(x) != len(y) || len(sig) != len(y) {
		return nil, fmt.Errorf("%w: %d angles, %d counts, %d esds", ErrPattern, len(x), len(y), len(sig))
	}
	if len(x) < 50 {
		return nil, fmt.Errorf("%w: %d points, too few for a whole-pattern fit (at least 50)", ErrPattern, len(x))
	}
	if !(opt.Lambda1 > 0) {
		return nil, fmt.Errorf("%w: wavelength %g Å", ErrPattern, opt.Lambda1)
	}
	if opt.Radius == 0 {
		opt.Radius = DefaultRadius
	}
	if opt.Background <= 0 {
		opt.Background = DefaultBackgroundTerms
	}
	if opt.MaxIter <= 0 {
		opt.MaxIter = 400
	}
	if opt.Eta <= 0 || opt.Eta > 1 {
		opt.Eta = 0.5
	}
	if opt.Width == (profile.Caglioti{}) {
		opt.Width = profile.Caglioti{W: 0.01}
	}
	pf := &patternFit{x: x, y: y, sig: sig, cen: c.Centring, lo: x[0], hi: x[len(x)-1]}
	pf.m1 = newModel(c.System, opt.Lambda1, opt.Radius)
	if opt.Lambda2 > 0 && opt.Ratio2 > 0 {
		pf.m2, pf.ratio = newModel(c.System, opt.Lambda2, opt.Radius), opt.Ratio2
	}
	for i, n := range corrNames {
		if opt.Corrections.Has(n.c) && n.c != Transparency {
			pf.corr = append(pf.corr, i)
		}
	}
	r0 := start(c)
	pf.nr, pf.nc = len(r0), len(pf.corr)
	pf.refl = cell.Reflections(c, cell.QOf(math.Min(pf.hi+1, 179), opt.Lambda1))
	// Reflections whose lines lie wholly below the scan add nothing.
	var kept []cell.Reflection
	for _, r := range pf.refl {
		if tt := cell.TwoThetaOfQ(r.Q, opt.Lambda1); tt > pf.lo-1 {
			kept = append(kept, r)
		}
	}
	pf.refl = mergeClose(kept, opt)
	if len(pf.refl) == 0 {
		return nil, fmt.Errorf("%w: the cell has no reflection within %.2f–%.2f° 2θ", ErrPattern, pf.lo, pf.hi)
	}
	pf.iU = pf.nr + pf.nc
	pf.iBg, pf.nb = pf.iU+4, opt.Background
	pf.iI = pf.iBg + pf.nb
	pf.cheb = make([][]float64, len(x))
	for i, xi := range x {
		pf.cheb[i] = make([]float64, pf.nb)
		chebyshev(2*(xi-pf.lo)/(pf.hi-pf.lo)-1, pf.cheb[i])
	}
	k := pf.iI + len(pf.refl)
	if k >= len(x)/2 {
		return nil, fmt.Errorf("%w: %d parameters (%d reflections) for %d points: too many reflections for the range; a shorter range or a smaller cell", ErrPattern, k, len(pf.refl), len(x))
	}
	p := make([]float64, k)
	copy(p, r0)
	p[pf.iU], p[pf.iU+1], p[pf.iU+2], p[pf.iU+3] = opt.Width.U, opt.Width.V, opt.Width.W, opt.Eta
	// Continuation: the lines are first broadened to FWHM 0.4° and then
	// 0.15° with the profile held, so that a cell a few tenths of a per
	// cent off, whose lines miss their peaks by more than a width at
	// high angle, is drawn in before the widths are fitted (each stage
	// starts where the broader one ended).
	fixed := make([]bool, k)
	for j := pf.iU; j < pf.iU+4; j++ {
		fixed[j] = true
	}
	iter := 0
	for _, fw := range []float64{0.4, 0.15} {
		if math.Sqrt(opt.Width.W) >= fw {
			continue
		}
		p[pf.iU], p[pf.iU+1], p[pf.iU+2] = 0, 0, fw*fw
		pf.startLinear(p)
		sol, it, err := pf.solve(ctx, p, min(opt.MaxIter, broadIter), fixed)
		if err != nil {
			return nil, err
		}
		copy(p, sol.p)
		iter += it
	}
	p[pf.iU], p[pf.iU+1], p[pf.iU+2], p[pf.iU+3] = opt.Width.U, opt.Width.V, opt.Width.W, opt.Eta
	pf.startLinear(p)
	sol, it, err := pf.solve(ctx, p, opt.MaxIter, nil)
	if err != nil {
		return nil, err
	}
	return pf.result(sol, iter+it, opt)
}

// width returns the FWHM and its derivatives with respect to U, V, W at
// 2θ tt.
func width(p []float64, iU int, tt float64) (w, dU, dV, dW float64) {
	t := math.Tan(tt * deg / 2)
	w2 := p[iU]*t*t + p[iU+1]*t + p[iU+2]
	w = math.Sqrt(math.Max(w2, 1e-8))
	return w, t * t / (2 * w), t / (2 * w), 1 / (2 * w)
}

// chebyshev fills b with T_0..T_{n−1} at u in [−1, 1].
func chebyshev(u float64, b []float64) {
	for j := range b {
		switch j {
		case 0:
			b[j] = 1
		case 1:
			b[j] = u
		default:
			b[j] = 2*u*b[j-1] - b[j-2]
		}
	}
}

// line is one reflection's lines at the current parameters.
type line struct {
	tt1, tt2 float64 // K-alpha1, K-alpha2 positions (tt2 NaN when none)
	d1, d2   []float64
	c1, c2   shifts
	w1, w2   float64 // FWHM at each
	g1, g2   [3]float64
	reach    float64 // half window, degrees
	ok       bool
}

func (pf *patternFit) lines(p []float64) []line {
	var corr shifts
	for j, i := range pf.corr {
		corr[i] = p[pf.nr+j]
	}
	r := p[:pf.nr]
	out := make([]line, len(pf.refl))
	for k, rf := range pf.refl {
		pt := pf.m1.eval(r, rf.HKL[0], corr)
		if !pt.inside {
			continue
		}
		l := line{tt1: pt.tt, d1: pt.dR, c1: pt.dCorr, tt2: math.NaN(), ok: true}
		var dU, dV, dW float64
		l.w1, dU, dV, dW = width(p, pf.iU, l.tt1)
		l.g1 = [3]float64{dU, dV, dW}
		if pf.m2 != nil {
			if q := pf.m2.eval(r, rf.HKL[0], corr); q.inside {
				l.tt2, l.d2, l.c2 = q.tt, q.dR, q.dCorr
				l.w2, dU, dV, dW = width(p, pf.iU, l.tt2)
				l.g2 = [3]float64{dU, dV, dW}
			}
		}
		// Beyond 25 FWHM a Lorentzian keeps under 0.04 % of its height.
		l.reach = 25 * math.Max(l.w1, l.w2)
		out[k] = l
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
	eta := p[pf.iU+3]
	for k, l := range ls {
		if !l.ok {
			continue
		}
		i := nearest(pf.x, l.tt1)
		h := math.Max(pf.y[i]-p[pf.iBg], 0)
		p[pf.iI+k] = h * l.w1 * profile.AreaFactor(eta) / float64(1+countNear(ls, l.tt1, l.w1))
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
		if l.ok && l.tt1 != tt && math.Abs(l.tt1-tt) < w {
			n++
		}
	}
	return n
}

// closeShare is the separation, as a share of the FWHM, below which two
// reflections take one intensity: their profiles then differ by under a
// per cent of a line's height, far below any scan's noise, and their
// intensities are not separately determined (Pawley's fit of exact and
// near overlaps is singular).
const closeShare = 0.02

// mergeClose joins reflections (in increasing Q) whose K-alpha1 lines lie
// closer than closeShare of the starting width; the first one's indices
// give the position.
func mergeClose(refl []cell.Reflection, opt PatternOptions) []cell.Reflection {
	var out []cell.Reflection
	prev := math.Inf(-1)
	for _, r := range refl {
		tt := cell.TwoThetaOfQ(r.Q, opt.Lambda1)
		if n := len(out); n > 0 && tt-prev < closeShare*opt.Width.At(tt) {
			last := &out[n-1]
			last.HKL = append(append([]cell.HKL(nil), last.HKL...), r.HKL...)
			last.Mult += r.Mult
			continue
		}
		out = append(out, r)
		prev = tt
	}
	return out
}
