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
	// Corrections are refined with the cells: Zero, Displacement or
	// both; None refines neither. Auto and Transparency are not taken
	// here.
	Corrections Corrections
	// Width and Eta start the profile: a Caglioti width law and a
	// Lorentzian fraction, e.g. those the peak extraction measured,
	// split into the Gaussian and Lorentzian widths of the fit's
	// profile (see nProfile). A zero Width means FWHM 0.1° everywhere;
	// Eta 0 means 0.5.
	Width profile.Caglioti
	Eta   float64
	// Asymmetry starts the instrument's asymmetry law (profile.Asymmetry,
	// split pseudo-Voigt lines), shared by all phases. Its terms up to
	// the highest nonzero one are refined; a zero law means symmetric
	// lines, with no asymmetry refined.
	Asymmetry profile.Asymmetry
	// Tail is the ratio of the lines' Lorentzian to Gaussian width
	// (profile.LineShape), held; zero means 1, plain pseudo-Voigt lines.
	Tail float64
	// Background is the number of Chebyshev terms of the background;
	// zero means DefaultBackgroundTerms.
	Background int
	// MaxIter bounds the Levenberg–Marquardt iterations; zero means 400.
	MaxIter int
	// Progress, when not nil, is told after each iteration how many of
	// the fit's three stages (two broadened, one final) are done, in
	// hundredths of a stage: done of total = 300.
	Progress func(done, total int)
}

// settledShare is the share of a broadened stage's width by which the
// lines still move in an iteration when the stage has done its work:
// the lines then sit well inside the next, narrower stage's reach, and
// the narrower stage finishes what the broad one only draws in.
const settledShare = 0.05

// broadIter bounds the iterations of each broadened stage, which only
// draw the cell in: the last stage refines everything to convergence
// (BENCHMARKS.md has the bound's effect on the public sets).
const broadIter = 30

// DefaultBackgroundTerms is the number of Chebyshev polynomial terms of
// the background: a smooth curve over a laboratory scan's range (common
// practice uses 4 to 12).
const DefaultBackgroundTerms = 8

// A PatternReflection is one position of a fitted phase: every
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

// A PatternPhase is one phase of a whole-pattern fit.
type PatternPhase struct {
	Cell       cell.Cell
	ESD        cell.ESD
	Covariance cell.Covariance
	Volume     float64 // Å³
	VolumeESD  float64
	// Params are the phase's refined cell and profile parameters with
	// their esds: the main phase's U, V, W (degrees²), X and Y
	// (degrees), a further phase's own terms (ownTerms): the size term
	// Y, or U, X and Y.
	Params      []Param
	Reflections []PatternReflection
	// Calc is the phase's lines at each point, background excluded.
	Calc []float64
}

// A Correlation is the correlation coefficient of two refined
// parameters.
type Correlation struct {
	A, B string
	R    float64
}

// A PatternResult is a whole-pattern fit of one or more phases.
type PatternResult struct {
	// Phases are the fitted phases in the order given, the first the
	// main phase.
	Phases      []PatternPhase
	Corrections Corrections
	// Params are the parameters all phases share: the corrections and
	// the asymmetry terms.
	Params []Param
	// Correlations are the strongest correlations among the refined
	// parameters other than intensities and background terms,
	// strongest first (at most MaxCorrelations, |r| ≥ minCorrelation).
	Correlations []Correlation
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
	// Converged reports that the last stage met its convergence test
	// within PatternOptions.MaxIter iterations (a fit stopped by the
	// bound is returned too, with Converged false).
	Converged bool
	// Scaled reports that the esds were multiplied by GoF (when it
	// exceeds 1: the points scatter more than their esds allow, as a
	// model short of the truth leaves them).
	Scaled   bool
	Warnings []string
}

// MaxCorrelations bounds PatternResult.Correlations: a list a reader
// takes in at a glance (the full matrix of a fit's shared parameters runs
// to hundreds of pairs). Correlations below minCorrelation, which share
// under a quarter of their variance, are not listed.
const (
	MaxCorrelations = 6
	minCorrelation  = 0.5
)

// ErrPattern: the pattern cannot be fitted with the cell.
var ErrPattern = errors.New("whole-pattern fit")

// phaseFit is one phase's models and place in the parameter vector.
type phaseFit struct {
	start  cell.Cell
	cen    cell.Centring
	m1, m2 *model
	nr     int // free reciprocal coefficients
	// iR is the first reciprocal coefficient; prof are the indices of
	// the phase's profile parameters U, V, W, X and Y (profU..profY),
	// the main phase's unless the phase has some of its own (see
	// ownTerms).
	iR   int
	prof [nProfile]int
}

// profileIndex returns the index in the parameters of the phase's j-th
// profile parameter (U, V, W, X, Y).
func (ph phaseFit) profileIndex(j int) int { return ph.prof[j] }

// The places of the profile parameters in a phase's profile.
const (
	profU = iota
	profV
	profW
	profX
	profY
)

// ownTerms says which profile terms a further phase (a standard, an
// impurity) has of its own. Such a phase is usually weak, and its few
// lines cannot determine a width law: given one, its lines widen until
// they fit the background's undulations. Its lines then take the main
// phase's profile, which the instrument dominates (sharedProfile). A
// phase whose lines are strong enough (see ownSizeLines) has its own
// Lorentzian size term Y/cos θ (ownSize) when it pays for itself (see
// pays), since crystallite size
// broadens one phase's lines and not another's (a coarse standard's
// lines are as sharp as the instrument allows beside a fine powder's;
// Scherrer's equation gives a width of λ/(L cos θ) radians for
// crystallites of size L); and its own strain terms as well, the
// Gaussian U tan²θ and the Lorentzian X tan θ (ownSample), when they
// pay for themselves too: microstrain
// too is the sample's (Stokes & Wilson 1944: a spread ε of d-spacings
// broadens a line by 4ε tan θ radians), and V and W, the instrument's,
// stay shared.
type ownTerms int

const (
	sharedProfile ownTerms = iota
	ownSize
	ownSample
)

// owns reports whether terms include profile parameter j.
func (o ownTerms) owns(j int) bool {
	switch o {
	case ownSize:
		return j == profY
	case ownSample:
		return j == profY || j == profU || j == profX
	}
	return false
}

// patternRefl is one fitted position of a phase.
type patternRefl struct {
	cell.Reflection
	phase int
}

// patternFit holds one fit's data and layout of parameters: the
// parameters that many points share (corrections, asymmetry terms,
// background terms, each phase's cell and profile) come first, the
// intensities after them in order of position, so that the intensities'
// block of the normal matrix is banded.
type patternFit struct {
	x, y, sig []float64
	ratio     float64
	tail      float64
	phases    []phaseFit
	refl      []patternRefl
	corr      []int // indices in shifts of the refined corrections
	iA, nA    int   // asymmetry terms
	iBg, nb   int   // background terms
	iI        int   // first intensity; the number of shared parameters
	lo, hi    float64
	cheb      [][]float64 // the background's Chebyshev terms at each point
	minFWHM   float64     // the scan's mean step, degrees: the narrowest line
	progress  func(done, total int)
	stage     int // the stage running, 0..2
	// jac holds the Jacobians of the current and the trial parameters,
	// reused by every stage so that their slices grow only once.
	jac [2]jacobian
}

// FitPattern fits every point of a scan (2θ x in degrees, counts y with
// esds sig) with the cell c: FitPhases with one phase.
func FitPattern(ctx context.Context, c cell.Cell, x, y, sig []float64, opt PatternOptions) (*PatternResult, error) {
	return FitPhases(ctx, []cell.Cell{c}, x, y, sig, opt)
}

// FitPhases fits every point of a scan (2θ x in degrees, counts y with
// esds sig) with one or more phases, as Pawley (J. Appl. Cryst. 14
// (1981) 357) described: each cell constrained by its system, a free
// integrated intensity for each distinct d-spacing of each phase
// (bounded below by zero), pseudo-Voigt lines whose Gaussian and
// Lorentzian widths follow their laws with angle (nProfile), the instrument's
// split pseudo-Voigt asymmetry (Toraya, J. Appl. Cryst. 23 (1990) 485;
// the angular law of profile.Asymmetry), the K-alpha doublet with its
// ratio, the instrument corrections chosen, and a Chebyshev background.
// The least squares are solved by Levenberg–Marquardt over the sparse
// Jacobian (each point depends on the few lines near it). The context
// cancels the work between iterations.
func FitPhases(ctx context.Context, cells []cell.Cell, x, y, sig []float64, opt PatternOptions) (*PatternResult, error) {
	if len(cells) == 0 {
		return nil, fmt.Errorf("%w: no cell", ErrPattern)
	}
	for i, c := range cells {
		if err := c.Check(); err != nil {
			return nil, fmt.Errorf("%w: phase %d: %w", ErrPattern, i+1, err)
		}
	}
	if len(x) != len(y) || len(sig) != len(y) {
		return nil, fmt.Errorf("%w: %d angles, %d counts, %d esds", ErrPattern, len(x), len(y), len(sig))
	}
	if len(x) < 50 {
		return nil, fmt.Errorf("%w: %d points, too few for a whole-pattern fit (at least 50)", ErrPattern, len(x))
	}
	for i, s := range sig {
		if !(s > 0) || math.IsInf(s, 0) || math.IsNaN(y[i]) || math.IsNaN(x[i]) {
			return nil, fmt.Errorf("%w: point %d (%g° 2θ, %g counts, esd %g): an esd must be positive and every value a number", ErrPattern, i+1, x[i], y[i], s)
		}
		if i > 0 && !(x[i] > x[i-1]) {
			return nil, fmt.Errorf("%w: point %d: 2θ %g° does not increase from %g°", ErrPattern, i+1, x[i], x[i-1])
		}
	}
	if !(opt.Lambda1 > 0) {
		return nil, fmt.Errorf("%w: wavelength %g Å", ErrPattern, opt.Lambda1)
	}
	opt = opt.withDefaults()
	pf, p, err := newPatternFit(cells, x, y, sig, opt, nil)
	if err != nil {
		return nil, err
	}
	pf.progress = opt.Progress
	k := len(p)
	// setProfile starts the profile from a Gaussian width law scaled by
	// kG² and a Lorentzian width Y/cos θ.
	setProfile := func(w profile.Caglioti, kG, y float64) {
		m := pf.phases[0].prof
		p[m[profU]], p[m[profV]], p[m[profW]], p[m[profX]] = w.U*kG*kG, w.V*kG*kG, w.W*kG*kG, 0
		for _, ph := range pf.phases {
			p[ph.prof[profY]] = y
		}
	}
	// Continuation: the lines are first broadened to FWHM 0.4° and then
	// 0.15° with the profile held, so that a cell a few tenths of a per
	// cent off, whose lines miss their peaks by more than a width at
	// high angle, is drawn in before the widths are fitted (each stage
	// starts where the broader one ended).
	fixed := make([]bool, k)
	for _, ph := range pf.phases {
		for j := range nProfile {
			fixed[ph.profileIndex(j)] = true
		}
	}
	for j := pf.iA; j < pf.iA+pf.nA; j++ {
		fixed[j] = true
	}
	// With the zero shift refined too, the displacement is held at
	// zero while the lines are broadened: the two move the lines almost
	// alike below about 110° 2θ, and with wide lines their split is not
	// determined, so the pair drifts along its valley (to 1.4 mm on a
	// scan of 0.01 mm) and the last stage, where the valley is narrow,
	// stalls short of its minimum. The zero shift and the cell draw the
	// lines in; the last stage splits the shift.
	for j, i := range pf.corr {
		if corrNames[i].c == Displacement && len(pf.corr) > 1 {
			fixed[j] = true
		}
	}
	// Further phases (a declared standard, a known impurity) keep their
	// cells while the lines are broadened: a weak phase's few lines,
	// widened, would be drawn to the main phase's strong ones; their
	// cells are refined in the last stage.
	for _, ph := range pf.phases[1:] {
		for j := ph.iR; j < ph.iR+ph.nr; j++ {
			fixed[j] = true
		}
	}
	iter := 0
	for stage, fw := range []float64{0.4, 0.15} {
		pf.stage = stage
		if math.Sqrt(opt.Width.W) >= fw {
			continue
		}
		setProfile(profile.Caglioti{W: fw * fw}, 1, 0)
		pf.startLinear(p)
		sol, it, err := pf.solve(ctx, p, min(opt.MaxIter, broadIter), fixed, settledShare*fw)
		if err != nil {
			return nil, err
		}
		copy(p, sol.p)
		iter += it
	}
	// The measured width law and mixing, split into the Gaussian and
	// Lorentzian widths whose combination they are at 2θ = 90°.
	w90 := opt.Width.At(90)
	gG, gL := profile.TCHStart(w90, opt.Eta)
	setProfile(opt.Width, gG/w90, gL*math.Cos(math.Pi/4))
	pf.startLinear(p)
	pf.stage = 2
	sol, it, err := pf.solve(ctx, p, opt.MaxIter, nil, 0)
	if err != nil {
		return nil, err
	}
	r, err := pf.result(sol, iter+it, opt)
	if err != nil {
		return nil, err
	}
	r.Converged = it < opt.MaxIter
	return ownSizes(ctx, pf, sol, r, cells, x, y, sig, opt)
}

// newPatternFit lays out the parameters of a fit of the cells and
// returns their starting values; a further phase i has the profile terms
// own[i] of its own (own may be nil: none).
func newPatternFit(cells []cell.Cell, x, y, sig []float64, opt PatternOptions, own []ownTerms) (*patternFit, []float64, error) {
	pf := &patternFit{x: x, y: y, sig: sig, tail: opt.Tail, lo: x[0], hi: x[len(x)-1]}
	pf.minFWHM = (pf.hi - pf.lo) / float64(len(x)-1)
	if opt.Lambda2 > 0 && opt.Ratio2 > 0 {
		pf.ratio = opt.Ratio2
	}
	for i, n := range corrNames {
		if opt.Corrections.Has(n.c) && n.c != Transparency {
			pf.corr = append(pf.corr, i)
		}
	}
	pf.iA = len(pf.corr)
	for j := range opt.Asymmetry.C {
		if opt.Asymmetry.C[j] != 0 {
			pf.nA = j + 1
		}
	}
	pf.iBg, pf.nb = pf.iA+pf.nA, opt.Background
	next := pf.iBg + pf.nb
	for i, c := range cells {
		ph := phaseFit{start: c, cen: c.Centring, m1: newModel(c.System, opt.Lambda1, opt.Radius)}
		if pf.ratio > 0 {
			ph.m2 = newModel(c.System, opt.Lambda2, opt.Radius)
		}
		ph.nr = len(start(c))
		ph.iR = next
		next += ph.nr
		for j := range nProfile {
			if i > 0 && (i >= len(own) || !own[i].owns(j)) {
				ph.prof[j] = pf.phases[0].prof[j]
				continue
			}
			ph.prof[j] = next
			next++
		}
		pf.phases = append(pf.phases, ph)
		n := len(pf.refl)
		pf.refl = append(pf.refl, phaseReflections(c, i, pf.lo, pf.hi, opt)...)
		if len(pf.refl) == n {
			return nil, nil, fmt.Errorf("%w: phase %d (%s) has no reflection within %.2f–%.2f° 2θ", ErrPattern, i+1, c, pf.lo, pf.hi)
		}
	}
	pf.iI = next
	// Intensities in order of position, all phases together.
	sort.SliceStable(pf.refl, func(a, b int) bool { return pf.refl[a].Q < pf.refl[b].Q })
	pf.cheb = make([][]float64, len(x))
	for i, xi := range x {
		pf.cheb[i] = make([]float64, pf.nb)
		chebyshev(2*(xi-pf.lo)/(pf.hi-pf.lo)-1, pf.cheb[i])
	}
	k := pf.iI + len(pf.refl)
	if k >= len(x)/2 {
		return nil, nil, fmt.Errorf("%w: %d parameters (%d reflections) for %d points: too many reflections for the range; a shorter range or a smaller cell", ErrPattern, k, len(pf.refl), len(x))
	}
	p := make([]float64, k)
	for i, c := range cells {
		copy(p[pf.phases[i].iR:], start(c))
	}
	copy(p[pf.iA:], opt.Asymmetry.C[:pf.nA])
	return pf, p, nil
}

func (o PatternOptions) withDefaults() PatternOptions {
	if o.Radius == 0 {
		o.Radius = DefaultRadius
	}
	if o.Background <= 0 {
		o.Background = DefaultBackgroundTerms
	}
	if o.MaxIter <= 0 {
		o.MaxIter = 400
	}
	if o.Eta <= 0 || o.Eta > 1 {
		o.Eta = 0.5
	}
	if o.Width == (profile.Caglioti{}) {
		o.Width = profile.Caglioti{W: 0.01}
	}
	if !(o.Tail >= 1) {
		o.Tail = 1
	}
	return o
}

// phaseReflections returns the reflections of c whose K-alpha1 lines lie
// within the range lo..hi degrees 2θ or half a width beyond its ends,
// those closer than closeShare of a width joined. A line further out
// shows the scan only its tail, which determines no intensity (the
// background takes it up).
func phaseReflections(c cell.Cell, phase int, lo, hi float64, opt PatternOptions) []patternRefl {
	var kept []cell.Reflection
	for _, r := range cell.Reflections(c, cell.QOf(math.Min(hi+1, 179), opt.Lambda1)) {
		tt := cell.TwoThetaOfQ(r.Q, opt.Lambda1)
		if w := opt.Width.At(tt) / 2; tt >= lo-w && tt <= hi+w {
			kept = append(kept, r)
		}
	}
	var out []patternRefl
	for _, r := range mergeClose(kept, opt) {
		out = append(out, patternRefl{Reflection: r, phase: phase})
	}
	return out
}

// closeShare is the separation, as a share of the FWHM, below which two
// reflections of a phase take one intensity: their profiles then differ
// by under a per cent of a line's height, far below any scan's noise,
// and their intensities are not separately determined (Pawley's fit of
// exact and near overlaps is singular).
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
