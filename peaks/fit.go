package peaks

import (
	"math"
	"sort"

	"reticle/cell"

	"reticle/scanfile"

	"reticle/profile"
)

// A component is one peak being fitted: its current parameters and esds.
type component struct {
	x, h, w, eta     float64 // K-alpha1 position, height, FWHM, mixing
	asym             float64 // asymmetry A (see lineShape)
	anchor           float64 // where detection put it; the fit keeps it within 0.75 FWHM
	sx, sh, sw, seta float64 // esds
	sasym            float64
	z                float64 // detection significance, σ
	fixedShape       bool    // hold w, eta and A
	symmetric        bool    // hold A (at 0 unless set from the law)
	flags            Flags
	b0, b1, xc       float64 // local background of its group at the last fit
	red              float64 // reduced χ² of its group's last fit
	dof              int     // degrees of freedom of that fit
}

// model is what a group's peaks are drawn with.
type model struct {
	x, y, w, bg []float64 // data, weights 1/σ², background
	rad         scanfile.Radiation
	tail        float64 // ratio of the Lorentzian to the Gaussian width (see tailedVoigt); 0 means 1
	// chiTol, when set, ends a fit once χ² falls by less (see
	// profile.Problem); the calibration's trial fits compare χ² to about 0.01.
	chiTol float64
}

// tailRatio returns the model's tail ratio τ (1 unless set).
func (md *model) tailRatio() float64 {
	if md.tail > 1 {
		return md.tail
	}
	return 1
}

// companion2 returns the K-alpha2 position of a K-alpha1 line at x and
// dx2/dx (zero for a single line).
func (md *model) companion2(x float64) (float64, float64) {
	if !md.rad.Doublet() {
		return x, 0
	}
	return cell.AtWavelength(x, md.rad.Lambda1, md.rad.Lambda2)
}

// addProfile adds a component's line (with its K-alpha2 line) to out over
// points [lo, hi).
func (md *model) addProfile(out []float64, lo, hi int, c *component) {
	x2, _ := md.companion2(c.x)
	dbl := md.rad.Doublet()
	r := md.rad.Ratio2
	tail := md.tailRatio()
	at := func(x float64) float64 {
		f := profile.LineShape(x, c.x, c.w, c.eta, c.asym, tail)
		if dbl {
			f += r * profile.LineShape(x, x2, c.w, c.eta, c.asym, tail)
		}
		return c.h * f
	}
	k := 1
	if hi-lo > 1 {
		k = binFactor([]*component{c}, (md.x[hi-1]-md.x[lo])/float64(hi-lo-1))
	}
	if k == 1 {
		for i := lo; i < hi; i++ {
			out[i-lo] += at(md.x[i])
		}
		return
	}
	// Many points under the line: evaluate every k-th point and
	// interpolate linearly between (the line is smooth on that scale, as
	// in the fit's bins).
	prev, fp := lo, at(md.x[lo])
	out[0] += fp
	for prev < hi-1 {
		next := min(prev+k, hi-1)
		fn := at(md.x[next])
		x0, dx := md.x[prev], md.x[next]-md.x[prev]
		for i := prev + 1; i <= next; i++ {
			out[i-lo] += fp + (fn-fp)*(md.x[i]-x0)/dx
		}
		prev, fp = next, fn
	}
}

// per is the number of fitted parameters of a component: position,
// height, FWHM, mixing and asymmetry.
const per = 5

// fitGroup fits the components cs together over points [lo, hi), with base
// (background plus the tails of peaks outside the group) held fixed. It
// updates cs in place and returns the reduced χ² (1 when not fitted).
func (md *model) fitGroup(cs []*component, lo, hi int, base []float64) float64 {
	n := hi - lo
	np := 2 + per*len(cs)
	xc := 0.5 * (md.x[lo] + md.x[hi-1])
	p0 := make([]float64, np)
	lob := make([]float64, np)
	hib := make([]float64, np)
	free := make([]bool, np)
	lob[0], hib[0], free[0] = math.Inf(-1), math.Inf(1), true
	lob[1], hib[1], free[1] = math.Inf(-1), math.Inf(1), true
	step := (md.x[hi-1] - md.x[lo]) / float64(max(n-1, 1))
	for k, c := range cs {
		j := 2 + per*k
		p0[j], p0[j+1], p0[j+2], p0[j+3], p0[j+4] = c.x, math.Max(c.h, 0), c.w, c.eta, c.asym
		reach := 0.75 * c.w
		if c.flags&FlagAdded != 0 {
			// A shoulder stays where the residual showed it.
			reach = 0.35 * c.w
		}
		lob[j], hib[j] = c.anchor-reach, c.anchor+reach
		p0[j] = math.Min(math.Max(p0[j], lob[j]), hib[j])
		lob[j+1], hib[j+1] = 0, math.Inf(1)
		lob[j+2], hib[j+2] = math.Max(0.3*c.w, 0.8*step), 3*c.w
		lob[j+3], hib[j+3] = 0, 1
		lob[j+4], hib[j+4] = -profile.MaxAsym, profile.MaxAsym
		p0[j+4] = math.Min(math.Max(p0[j+4], lob[j+4]), hib[j+4])
		free[j], free[j+1] = true, true
		free[j+2], free[j+3] = !c.fixedShape, !c.fixedShape
		// Asymmetry is refined only where the line is strong and stands
		// clear of its neighbours: a weak or crowded line takes it from
		// the scan's law.
		free[j+4] = !c.fixedShape && !c.symmetric && md.isolated(c, cs)
	}
	y, xs, wts := md.y[lo:hi], md.x[lo:hi], md.w[lo:hi]
	if k := binFactor(cs, step); k > 1 {
		// Many points under each line: fit bins of k points, so that the
		// cost does not grow with the points under a broad feature.
		xs, y, wts, base = binned(xs, y, wts, base, k)
	}
	tail := md.tailRatio()
	eval := func(p, m, jac []float64) {
		for i, xi := range xs {
			m[i] = base[i] + p[0] + p[1]*(xi-xc)
			if jac != nil {
				jac[i*np] = 1
				jac[i*np+1] = xi - xc
			}
		}
		for k := range cs {
			j := 2 + per*k
			x0, h, w, eta, as := p[j], p[j+1], p[j+2], p[j+3], p[j+4]
			x2, dx2 := md.companion2(x0)
			r := md.rad.Ratio2
			dbl := md.rad.Doublet()
			// A component reaches 15 FWHM around its lines; beyond, even
			// a pure Lorentzian is below 0.1 % of its height.
			a := sort.SearchFloat64s(xs, x0-15*tail*w)
			b := sort.SearchFloat64s(xs, math.Min(x2, x0+3)+15*tail*w)
			if jac == nil {
				for i := a; i < b; i++ {
					f := profile.LineShape(xs[i], x0, w, eta, as, tail)
					if dbl {
						f += r * profile.LineShape(xs[i], x2, w, eta, as, tail)
					}
					m[i] += h * f
				}
				continue
			}
			for i := range xs {
				row := jac[i*np+j : i*np+j+per]
				for q := range row {
					row[q] = 0
				}
			}
			for i := a; i < b; i++ {
				xi := xs[i]
				f, dx, dw, de, da := profile.LineGrad(xi, x0, w, eta, as, tail)
				if dbl {
					f2, dx2i, dw2, de2, da2 := profile.LineGrad(xi, x2, w, eta, as, tail)
					f += r * f2
					dx += r * dx2i * dx2
					dw += r * dw2
					de += r * de2
					da += r * da2
				}
				m[i] += h * f
				row := jac[i*np+j : i*np+j+per]
				row[0], row[1], row[2], row[3], row[4] = h*dx, f, h*dw, h*de, h*da
			}
		}
	}
	prob := &profile.Problem{Y: y, W: wts, Eval: eval, Lo: lob, Hi: hib, Free: free, ChiTol: md.chiTol}
	res, err := profile.LevenbergMarquardt(prob, p0, 40)
	if err != nil {
		for _, c := range cs {
			c.sx, c.sh = math.Inf(1), math.Inf(1)
		}
		return 1
	}
	red := 1.0
	if res.DOF > 0 {
		red = res.Chi2 / float64(res.DOF)
	}
	// Scale the covariance by the reduced χ² when the fit is worse than the
	// counting statistics allow (never shrink it below them).
	scale := math.Max(red, 1)
	sd := func(j int) float64 { return math.Sqrt(math.Max(res.Cov.At(j, j), 0) * scale) }
	for k, c := range cs {
		j := 2 + per*k
		c.x, c.h, c.w, c.eta, c.asym = res.P[j], res.P[j+1], res.P[j+2], res.P[j+3], res.P[j+4]
		c.sx, c.sh = sd(j), sd(j+1)
		c.sw, c.seta = sd(j+2), sd(j+3)
		c.sasym = sd(j + 4)
		c.b0, c.b1, c.xc = res.P[0], res.P[1], xc
		c.red, c.dof = red, res.DOF
		if len(cs) > 1 {
			c.flags |= FlagShared
		} else {
			c.flags &^= FlagShared
		}
		if md.cutByEnd(lo, hi) {
			c.flags |= FlagEdge
		}
	}
	return red
}

// cutByEnd reports whether an end of the scan cuts the point range
// [lo, hi) of a fit.
func (md *model) cutByEnd(lo, hi int) bool { return lo == 0 || hi == len(md.x) }

// window returns the point range a component needs: from 3 FWHM below its
// K-alpha1 line to 3 FWHM above its K-alpha2 line.
func (md *model) window(c *component) (int, int) {
	x2, _ := md.companion2(c.x)
	if math.IsInf(x2, 1) {
		x2 = c.x
	}
	a := c.x - 3*c.w
	b := x2 + 3*c.w
	lo := sort.SearchFloat64s(md.x, a)
	hi := sort.SearchFloat64s(md.x, b)
	return lo, min(hi+1, len(md.x))
}

// maxGroup is the most components fitted together; longer chains of
// overlapping peaks are cut where neighbours are farthest apart (in
// widths), and each part sees the others as fixed tails.
const maxGroup = 6

// groups partitions sorted components into runs whose windows overlap.
func (md *model) groups(cs []*component) [][]*component {
	var out [][]*component
	var cur []*component
	curHi := -1
	for _, c := range cs {
		lo, hi := md.window(c)
		if cur != nil && lo < curHi {
			cur = append(cur, c)
			curHi = max(curHi, hi)
			continue
		}
		if cur != nil {
			out = append(out, splitGroup(cur)...)
		}
		cur, curHi = []*component{c}, hi
	}
	if cur != nil {
		out = append(out, splitGroup(cur)...)
	}
	return out
}

// splitGroup cuts a run longer than maxGroup at its widest gap.
func splitGroup(g []*component) [][]*component {
	if len(g) <= maxGroup {
		return [][]*component{g}
	}
	best, gap := 1, -1.0
	for i := 1; i < len(g); i++ {
		if d := (g[i].x - g[i-1].x) / (g[i].w + g[i-1].w); d > gap {
			best, gap = i, d
		}
	}
	return append(splitGroup(g[:best]), splitGroup(g[best:])...)
}

// span returns the union of the windows of a group.
func (md *model) span(g []*component) (int, int) {
	lo, hi := len(md.x), 0
	for _, c := range g {
		a, b := md.window(c)
		lo, hi = min(lo, a), max(hi, b)
	}
	return lo, hi
}

// baseFor returns the background plus the profiles of the components not in
// g over points [lo, hi).
func (md *model) baseFor(all []*component, g []*component, lo, hi int) []float64 {
	in := map[*component]bool{}
	for _, c := range g {
		in[c] = true
	}
	base := append([]float64(nil), md.bg[lo:hi]...)
	for _, c := range all {
		if in[c] || c.h <= 0 {
			continue
		}
		// Tails matter within about 30 FWHM for a Lorentzian part.
		x2, _ := md.companion2(c.x)
		if t := 30 * md.tailRatio() * c.w; c.x-t > md.x[hi-1] || x2+t < md.x[lo] {
			continue
		}
		md.addProfile(base, lo, hi, c)
	}
	return base
}

// isolated reports whether c's lines (K-alpha1 and K-alpha2) stand
// clear of every other component of cs by 2.5 widths: then its shape,
// asymmetry included, is its own.
func (md *model) isolated(c *component, cs []*component) bool {
	x2, _ := md.companion2(c.x)
	for _, o := range cs {
		if o == c {
			continue
		}
		w := 2.5 * math.Max(c.w, o.w)
		o2, _ := md.companion2(o.x)
		if math.Abs(o.x-c.x) < w || math.Abs(o.x-x2) < w || math.Abs(o2-c.x) < w {
			return false
		}
	}
	return true
}

// pointsPerBin is the fewest bins per FWHM of the narrowest line that a
// fit keeps: a line is smooth on that scale, so averaging the points
// within a bin changes the fitted parameters by a negligible amount
// (the profile is nearly linear over a twelfth of its width), while the
// weights, summed, keep the information of every point.
const pointsPerBin = 12

// binFactor returns how many adjacent points a fit of the components may
// merge into one: 1 unless the narrowest line spans more than
// 2·pointsPerBin points of the given step.
func binFactor(cs []*component, step float64) int {
	if !(step > 0) {
		return 1
	}
	w := math.Inf(1)
	for _, c := range cs {
		w = math.Min(w, c.w)
	}
	per := w / step
	if per < 2*pointsPerBin {
		return 1
	}
	return int(per / pointsPerBin)
}

// binned merges runs of k points: positions and values averaged with the
// weights (1/σ²), weights summed; base is averaged alike.
func binned(x, y, w, base []float64, k int) (bx, by, bw, bb []float64) {
	n := (len(x) + k - 1) / k
	bx, by, bw, bb = make([]float64, 0, n), make([]float64, 0, n), make([]float64, 0, n), make([]float64, 0, n)
	for i := 0; i < len(x); i += k {
		j := min(i+k, len(x))
		var sw, sx, sy, sb float64
		for q := i; q < j; q++ {
			wq := w[q]
			if !(wq > 0) {
				continue
			}
			sw += wq
			sx += wq * x[q]
			sy += wq * y[q]
			sb += wq * base[q]
		}
		if sw == 0 {
			continue
		}
		bx = append(bx, sx/sw)
		by = append(by, sy/sw)
		bw = append(bw, sw)
		bb = append(bb, sb/sw)
	}
	return bx, by, bw, bb
}
