package peaks

import (
	"context"
	"fmt"
	"math"
	"runtime"
	"sort"
	"sync"

	"reticle/cell"

	"reticle/scanfile"

	"reticle/profile"
)

// Defaults of the extraction options.
const (
	// DefaultBackgroundWidth is the background window, degrees 2θ.
	DefaultBackgroundWidth = 1.5
	// DefaultThreshold is the significance a peak must reach, in esds
	// of its fitted height: on the simulated scans of the tests (80° of
	// 2θ, about 800 peak widths) about 1 false peak per 100 scans passes
	// 4.5; 4 lets about 6 through.
	DefaultThreshold = 4.5
)

// passOneChiTol is the decrease of χ² that ends a fit of the first pass
// (see profile.Problem.ChiTol).
const passOneChiTol = 0.001

// Options control peak extraction. The zero value of every field means
// its documented default.
type Options struct {
	// Radiation is the incident spectrum. Zero means the scan's stated
	// wavelength as a single line, else the K-alpha doublet of the anode
	// the scan names, else the Cu K-alpha doublet.
	Radiation scanfile.Radiation
	// KAlpha2Ratio is the intensity of K-alpha2 relative to K-alpha1 of
	// a doublet. Zero means DefaultKAlpha2Ratio.
	KAlpha2Ratio float64
	// BackgroundWidth is the SNIP clipping window in degrees 2θ. Zero
	// means DefaultBackgroundWidth.
	BackgroundWidth float64
	// Threshold is the significance, in standard deviations of the
	// fitted height, that a peak must reach to be reported. Zero means
	// DefaultThreshold.
	Threshold float64
	// DetectThreshold is the significance of a maximum of the smoothed
	// net counts that makes it a candidate for fitting. Zero means 3.
	DetectThreshold float64
	// FreeShapeSNR is the detection significance above which a peak's
	// FWHM and mixing are refined; weaker peaks take them from the width
	// curve of the strong ones. Zero means 15.
	FreeShapeSNR float64
}

// Resolved returns the options with their defaults filled in for scan
// s: the radiation the scan implies, the K-alpha2 ratio applied to a
// doublet, and every zero field at its default.
func (o Options) Resolved(s *scanfile.Scan) Options { return o.withDefaults(s) }

func (o Options) withDefaults(s *scanfile.Scan) Options {
	if o.Radiation.Lambda1 == 0 {
		o.Radiation = s.Radiation()
	}
	if o.KAlpha2Ratio == 0 {
		o.KAlpha2Ratio = scanfile.DefaultKAlpha2Ratio
	}
	if o.Radiation.Doublet() {
		o.Radiation.Ratio2 = o.KAlpha2Ratio
	}
	if o.BackgroundWidth == 0 {
		o.BackgroundWidth = DefaultBackgroundWidth
	}
	if o.Threshold == 0 {
		o.Threshold = DefaultThreshold
	}
	if o.DetectThreshold == 0 {
		o.DetectThreshold = 3
	}
	if o.FreeShapeSNR == 0 {
		o.FreeShapeSNR = 15
	}
	return o
}

// Result is the outcome of Extract.
type Result struct {
	Peaks      []Peak             // sorted by 2θ
	Radiation  scanfile.Radiation // the radiation the peaks were fitted with
	Background []float64          // background under every point of the scan, counts
	Profile    []float64          // background plus all fitted profiles at every point
	FWHMCurve  profile.Caglioti   // width curve of the well-determined peaks
	Eta        float64            // median mixing of the well-determined peaks
	Asymmetry  profile.Asymmetry  // asymmetry law of the well-determined peaks
	// TailRatio is the ratio of the Lorentzian to the Gaussian width of
	// the lines (the tailed pseudo-Voigt of package profile): 1 for plain pseudo-Voigt lines.
	TailRatio float64
	// KBetaRatio is the scan's K-beta to K-alpha1 area ratio, estimated
	// from the lines at the K-beta positions of stronger lines; zero when
	// no line was taken for a K-beta companion.
	KBetaRatio float64
	// NoiseScale is the factor by which the points' esds were multiplied
	// because the intensities scatter more than they state (1: not).
	NoiseScale float64
	Warnings   []string
}

// Extract finds and fits the peaks of a scan. It can be cancelled through
// ctx and reports progress (groups fitted) through progress, which may be
// nil.
func Extract(ctx context.Context, s *scanfile.Scan, opt Options, progress func(done, total int)) (*Result, error) {
	if s.Len() < scanfile.MinPoints {
		return nil, fmt.Errorf("peaks: scan %s: %w", s.Path, scanfile.ErrTooFew)
	}
	o := opt.withDefaults(s)
	if o.Radiation.Lambda1 < 0.1 || o.Radiation.Lambda1 > 5 {
		return nil, fmt.Errorf("peaks: wavelength %g Å: %w", o.Radiation.Lambda1, scanfile.ErrUnknownLine)
	}
	x, y := s.TwoTheta, s.Intensity
	n := len(x)
	// Counting noise: the esd column when the file has one, otherwise
	// √counts taken from a five-point average so that a low reading does
	// not get an undue weight (the bias of weighting by the observed
	// counts); the last pass weights by the fitted model instead.
	sigma := make([]float64, n)
	w := make([]float64, n)
	avg := boxcar(y, 2)
	for i := range sigma {
		if s.ESD != nil {
			sigma[i] = s.ESD[i]
		} else {
			sigma[i] = math.Sqrt(math.Max(avg[i], 1))
		}
		w[i] = 1 / (sigma[i] * sigma[i])
	}
	step := s.Step()

	// Background: a first, coarse SNIP for a rough width, then the final one.
	half := max(2, int(math.Round(o.BackgroundWidth/2/step)))
	k := max(1, (half+19)/20)
	xb, yb := binMean(x, y, k)
	rough := interpolate(xb, SNIP(yb, max(half/k, 2)), x)
	net := make([]float64, n)
	for i := range net {
		net[i] = y[i] - rough[i]
	}
	fwhm0 := estimateFWHM(x, net, step)
	kappa := noiseScale(y, net, sigma)
	if kappa > maxNoiseScale {
		for i := range sigma {
			sigma[i] *= kappa
			w[i] = 1 / (sigma[i] * sigma[i])
		}
	} else {
		kappa = 1
	}
	bg := background(x, y, sigma, o.BackgroundWidth, fwhm0)
	if err := ctx.Err(); err != nil {
		return nil, err
	}

	// Detection on a grid of about eight points per FWHM.
	kw := max(1, int(fwhm0/step/8))
	xd, nd, sd := detectionGrid(x, y, bg, sigma, kw)
	cands := detect(xd, nd, sd, o.Radiation, fwhm0, o.DetectThreshold)
	md := &model{x: x, y: y, w: w, bg: bg, rad: o.Radiation}
	// The first pass only finds starting values and the width curve; on a
	// very fine scan it runs on the detection grid (means of kw points) and
	// the later passes, whose results are reported, use every point.
	md1 := md
	if kw > 1 {
		md1 = binnedModel(md, kw)
	}
	cs := seed(md1, cands, fwhm0, o)

	res := &Result{Radiation: o.Radiation, Background: bg, NoiseScale: kappa}
	if kappa > 1 {
		res.Warnings = append(res.Warnings, fmt.Sprintf("the intensities scatter %.2f times more than their esds (or counting noise) allow; every esd was multiplied by %.2f", kappa, kappa))
	}
	// Pass 1: every candidate on its own group's terms.
	if err := fitAll(ctx, md1, cs, nil, progress, 0); err != nil {
		return nil, err
	}
	// Scan-wide profile parameters from the strong lines; the first pass
	// is repeated with them.
	mds := []*model{md}
	if md1 != md {
		mds = append(mds, md1)
	}
	var notes []string
	if cs, notes = calibrate(mds, cs, o); len(notes) > 0 {
		res.Warnings = append(res.Warnings, notes...)
		res.Radiation = md.rad
		if err := fitAll(ctx, md1, cs, nil, nil, 0); err != nil {
			return nil, err
		}
	}
	// Width curve from the well-determined peaks; the weak peaks' shapes
	// are held to it from now on.
	var asymmetric bool
	res.FWHMCurve, res.Eta, res.Asymmetry, asymmetric = shapeCurve(md1, cs, o, fwhm0)
	for _, c := range cs {
		c.symmetric = !asymmetric
		if !asymmetric || c.fixedShape || c.flags&FlagShared != 0 {
			c.asym = res.Asymmetry.At(c.x)
		}
		if c.fixedShape {
			c.w, c.eta = res.FWHMCurve.At(c.x), res.Eta
		}
	}
	cs = prune(cs, o.Threshold/2)
	// Shoulders: maxima of the residual that the first fit left
	// unexplained.
	if added := residualCandidates(md1, cs, res, o); len(added) > 0 {
		cs = append(cs, added...)
		sort.Slice(cs, func(a, b int) bool { return cs[a].x < cs[b].x })
	}
	// Pass 2: with the neighbours' tails in each group's base.
	if err := fitAll(ctx, md, cs, cs, progress, 1); err != nil {
		return nil, err
	}
	cs = prune(cs, o.Threshold)
	cs = confirmShoulders(md, cs)
	cs = splitBlends(md, cs, res.FWHMCurve, o)
	// Pass 3: weights from the fitted model instead of the data.
	if s.ESD == nil {
		for i, m := range profileOf(md, cs) {
			w[i] = 1 / (kappa * kappa * math.Max(m, 1))
		}
	}
	if err := fitAll(ctx, md, cs, cs, progress, 2); err != nil {
		return nil, err
	}
	cs = prune(cs, o.Threshold)
	res.Peaks = peaksOf(md, cs)
	res.KBetaRatio = flagKBeta(res.Peaks, md.rad, x[0], x[n-1])
	flagFilterEdge(res.Peaks, md.rad)
	res.TailRatio = md.tailRatio()
	res.Profile = profileOf(md, cs)
	return res, nil
}

// binnedModel averages groups of k points of a model's data; the weight of
// a mean of k points is the sum of their weights.
func binnedModel(md *model, k int) *model {
	n := len(md.x)
	m := (n + k - 1) / k
	b := &model{x: make([]float64, m), y: make([]float64, m), w: make([]float64, m), bg: make([]float64, m), rad: md.rad}
	for j := 0; j < m; j++ {
		lo, hi := j*k, min((j+1)*k, n)
		c := float64(hi - lo)
		for i := lo; i < hi; i++ {
			b.x[j] += md.x[i] / c
			b.y[j] += md.y[i] / c
			b.bg[j] += md.bg[i] / c
			b.w[j] += md.w[i]
		}
	}
	return b
}

// detectionGrid sums groups of k points of counts, background and
// variance, and returns the angles, net counts and sigmas.
func detectionGrid(x, y, bg, sigma []float64, k int) (xd, net, sd []float64) {
	n := len(x)
	m := (n + k - 1) / k
	xd = make([]float64, m)
	net = make([]float64, m)
	sd = make([]float64, m)
	for j := 0; j < m; j++ {
		lo, hi := j*k, min((j+1)*k, n)
		var sx, sn, sv float64
		for i := lo; i < hi; i++ {
			sx += x[i]
			sn += y[i] - bg[i]
			sv += sigma[i] * sigma[i]
		}
		c := float64(hi - lo)
		xd[j] = sx / c
		// Keep the per-point scale so that heights stay in counts.
		net[j] = sn / c
		sd[j] = math.Sqrt(sv) / c
	}
	return
}

// seed turns candidates into components, dropping those that sit where a
// stronger candidate's K-alpha2 line falls.
func seed(md *model, cands []candidate, fwhm0 float64, o Options) []*component {
	sort.Slice(cands, func(a, b int) bool { return cands[a].x < cands[b].x })
	var cs []*component
	for i, c := range cands {
		if md.rad.Doublet() {
			ghost := false
			for j := range cands {
				if j == i || cands[j].h < c.h {
					continue
				}
				x2, _ := md.companion2(cands[j].x)
				if math.Abs(x2-c.x) < 0.5*fwhm0 && c.h < 0.75*cands[j].h {
					ghost = true
					break
				}
			}
			if ghost {
				continue
			}
		}
		wi := math.Min(math.Max(c.w, 0.7*fwhm0), 2*fwhm0)
		cs = append(cs, &component{
			x: c.x, anchor: c.x, h: c.h, w: wi, eta: 0.5, z: c.z,
			fixedShape: c.z < o.FreeShapeSNR,
		})
	}
	// Merge maxima closer than half a width: noise on one peak.
	var out []*component
	for _, c := range cs {
		if len(out) > 0 {
			p := out[len(out)-1]
			if c.x-p.x < 0.5*math.Min(p.w, c.w) {
				if c.h > p.h {
					out[len(out)-1] = c
				}
				continue
			}
		}
		out = append(out, c)
	}
	return out
}

// fitAll fits every group of cs. With tails set, the profiles of the other
// components (from their last fit) are part of each group's base.

func fitAll(ctx context.Context, md *model, cs, tails []*component, progress func(done, total int), pass int) error {
	if pass == 0 {
		// The first pass's fits give starting values and the scan's
		// line shape, and stop once χ² falls by less than 0.001 (no
		// parameter then moves by more than about 3 % of its esd); the
		// later passes converge to 1e-4.
		md.chiTol = passOneChiTol
		defer func() { md.chiTol = 0 }()
	}
	gs := md.groups(cs)
	if tails == nil {
		// On the background alone the groups do not depend on one
		// another: they are fitted on every core, each group by one
		// worker, so the outcome does not depend on the schedule.
		return fitIndependent(ctx, md, gs, progress, pass)
	}
	for gi, g := range gs {
		if err := ctx.Err(); err != nil {
			return err
		}
		md.fitOne(g, tails)
		if progress != nil {
			progress(pass*100+100*(gi+1)/len(gs), 300)
		}
	}
	return nil
}

// fitOne fits one group over its span, on the background plus the tails
// of the components tails holds outside it (the background alone when
// tails is nil). A group with too few points for its parameters is
// marked unfitted.
func (md *model) fitOne(g, tails []*component) {
	lo, hi := md.span(g)
	if hi-lo < 4*len(g)+4 {
		for _, c := range g {
			c.sh = math.Inf(1)
		}
		return
	}
	base := md.bg[lo:hi]
	if tails != nil {
		base = md.baseFor(tails, g, lo, hi)
	}
	md.fitGroup(g, lo, hi, base)
	// Two components that slid onto one another describe one peak:
	// keep the stronger and fit again.
	for collapsed(g) {
		g = dropWeakerPair(g)
		md.fitGroup(g, lo, hi, base)
	}
}

// fitIndependent fits groups whose base is the background alone, on
// every core.
func fitIndependent(ctx context.Context, md *model, gs [][]*component, progress func(done, total int), pass int) error {
	workers := min(runtime.GOMAXPROCS(0), len(gs))
	var wg sync.WaitGroup
	var mu sync.Mutex
	done := 0
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for gi := w; gi < len(gs); gi += workers {
				if ctx.Err() != nil {
					return
				}
				md.fitOne(gs[gi], nil)
				if progress != nil {
					mu.Lock()
					done++
					progress(pass*100+100*done/len(gs), 300)
					mu.Unlock()
				}
			}
		}()
	}
	wg.Wait()
	return ctx.Err()
}

// collapsed reports whether two components of a group (sorted by their
// starting positions) are closer than half the narrower width.
func collapsed(g []*component) bool {
	_, _, ok := closestPair(g)
	return ok
}

func closestPair(g []*component) (int, int, bool) {
	for i := 0; i < len(g); i++ {
		for j := i + 1; j < len(g); j++ {
			if g[i].h > 0 && g[j].h > 0 && math.Abs(g[i].x-g[j].x) < 0.5*math.Min(g[i].w, g[j].w) {
				return i, j, true
			}
		}
	}
	return 0, 0, false
}

// dropWeakerPair removes the weaker of the closest collapsed pair from g,
// marking it as not significant so that prune drops it from the scan's list.
func dropWeakerPair(g []*component) []*component {
	i, j, _ := closestPair(g)
	weak := j
	if g[i].h < g[j].h {
		weak = i
	}
	g[weak].h, g[weak].sh = 0, math.Inf(1)
	out := make([]*component, 0, len(g)-1)
	for k, c := range g {
		if k != weak {
			out = append(out, c)
		}
	}
	return out
}

// prune drops components whose fitted height is less than minZ esds.
func prune(cs []*component, minZ float64) []*component {
	out := cs[:0:0]
	for _, c := range cs {
		if c.h > 0 && c.sh > 0 && !math.IsInf(c.sh, 0) && c.h/c.sh >= minZ {
			out = append(out, c)
		}
	}
	return out
}

// peaksOf converts fitted components to reported peaks.
func peaksOf(md *model, cs []*component) []Peak {
	out := make([]Peak, 0, len(cs))
	for _, c := range cs {
		d, sd := cell.DSpacingESD(c.x, c.sx, md.rad.Lambda1, 0)
		// With wide wings (tail ratio τ) the Lorentzian part's area grows
		// by τ and the width at half maximum is that of the sum.
		tail := md.tailRatio()
		f, fe := profile.TailedAreaFactor(c.eta, tail)
		area := c.h * c.w * f
		// Area esd to first order from the height, width and mixing esds
		// (their correlations neglected).
		sa := math.Sqrt(sq(c.sh*c.w*f) + sq(c.h*c.sw*f) + sq(c.h*c.w*fe*c.seta))
		fw, sfw := c.w, c.sw
		if tail != 1 {
			fw = profile.TailedFWHM(c.w, c.eta, tail)
			sfw = c.sw * fw / c.w
		}
		i := sort.SearchFloat64s(md.x, c.x)
		i = min(i, len(md.x)-1)
		flags := c.flags
		if c.fixedShape {
			flags |= FlagFixedShape
		}
		out = append(out, Peak{
			TwoTheta: c.x, TwoThetaESD: c.sx, D: d, DESD: sd,
			Height: c.h, HeightESD: c.sh, Area: area, AreaESD: sa,
			FWHM: fw, FWHMESD: sfw, Eta: c.eta, EtaESD: c.seta, Asymmetry: c.asym,
			Background: md.bg[i] + c.b0 + c.b1*(c.x-c.xc), SNR: c.h / c.sh,
			Flags: flags, Parent: -1,
		})
	}
	sort.SliceStable(out, func(a, b int) bool { return out[a].TwoTheta < out[b].TwoTheta })
	return out
}

func sq(v float64) float64 { return v * v }

// profileOf returns background plus every fitted component at every point.
func profileOf(md *model, cs []*component) []float64 {
	out := append([]float64(nil), md.bg...)
	for _, c := range cs {
		lo, hi := md.window(c)
		// Extend to where the profile falls below 1e-3 of the height.
		x2, _ := md.companion2(c.x)
		a := sort.SearchFloat64s(md.x, c.x-20*md.tailRatio()*c.w)
		b := min(sort.SearchFloat64s(md.x, x2+20*md.tailRatio()*c.w), len(md.x))
		lo, hi = min(lo, a), max(hi, b)
		md.addProfile(out[lo:hi], lo, hi, c)
	}
	// Local backgrounds of the groups, over each group's span.
	for _, g := range md.groups(cs) {
		lo, hi := md.span(g)
		c := g[0]
		for i := lo; i < hi; i++ {
			out[i] += c.b0 + c.b1*(md.x[i]-c.xc)
		}
	}
	return out
}
