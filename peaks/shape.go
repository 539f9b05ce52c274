package peaks

import (
	"math"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat/distuv"

	"reticle/internal/order"

	"reticle/profile"
)

// asymLevel is the significance level of the asymmetry tests: a term of
// the law is kept when it lowers Σ((A − law)/σ_A)² by more than the
// (1 − asymLevel) point of χ² with one degree of freedom (a likelihood-
// ratio test; 10.83 at 0.1 %).
const asymLevel = 0.001

// asymOutlier is the normalised residual, in σ_A, beyond which a line is
// left out of the law: an unresolved blend looks like one asymmetric line.
const asymOutlier = 4

// asymmetryLaw fits the law to the asymmetry of well-determined lines by
// weighted least squares. The degree grows from none (A = 0) while the
// next term passes the likelihood-ratio test (asymLevel), a law of k
// terms needing 2k lines; lines further than
// asymOutlier σ from the law are left out one at a time while more than
// three remain, and the degree is chosen again. The scan is symmetric unless
// the constant term passes: a free asymmetry costs precision in the
// position, so it is used only where the data require it.
func asymmetryLaw(xs, as, sas []float64) (profile.Asymmetry, bool) {
	idx := make([]int, 0, len(xs))
	for i := range xs {
		if sas[i] > 0 {
			idx = append(idx, i)
		}
	}
	crit := (distuv.ChiSquared{K: 1}).Quantile(1 - asymLevel)
	var law profile.Asymmetry
	for range xs {
		law = profile.Asymmetry{}
		chi := fitAsym(xs, as, sas, idx, 0, &law)
		for terms := 1; terms <= 3 && len(idx) >= 2*terms; terms++ {
			var next profile.Asymmetry
			c := fitAsym(xs, as, sas, idx, terms, &next)
			if chi-c <= crit {
				break
			}
			law, chi = next, c
		}
		worst, wr := -1, 0.0
		for k, i := range idx {
			if r := math.Abs(as[i]-law.Poly(xs[i])) / sas[i]; r > wr {
				worst, wr = k, r
			}
		}
		if wr <= asymOutlier || len(idx) <= 3 {
			break
		}
		idx = append(idx[:worst:worst], idx[worst+1:]...)
	}
	if law.Zero() {
		return profile.Asymmetry{}, false
	}
	law.Lo, law.Hi = math.Inf(1), math.Inf(-1)
	for _, i := range idx {
		law.Lo, law.Hi = math.Min(law.Lo, xs[i]), math.Max(law.Hi, xs[i])
	}
	return law, true
}

// fitAsym fits the first terms of the law to the lines idx, stores it in
// law and returns its Σ((A − law)/σ_A)².
func fitAsym(xs, as, sas []float64, idx []int, terms int, law *profile.Asymmetry) float64 {
	*law = profile.Asymmetry{}
	if terms > 0 {
		a := mat.NewDense(len(idx), terms, nil)
		b := mat.NewVecDense(len(idx), nil)
		for r, i := range idx {
			t, w := (xs[i]-90)/90, 1/sas[i]
			for k := 0; k < terms; k++ {
				a.Set(r, k, w*math.Pow(t, float64(k)))
			}
			b.SetVec(r, w*as[i])
		}
		var sol mat.VecDense
		if err := sol.SolveVec(a, b); err != nil {
			return math.Inf(1)
		}
		for k := 0; k < terms; k++ {
			law.C[k] = sol.AtVec(k)
		}
	}
	var chi float64
	for _, i := range idx {
		chi += sq((as[i] - law.Poly(xs[i])) / sas[i])
	}
	return chi
}

// shapeCurve fits the width curve, the median mixing and the asymmetry
// law to the components whose shape was refined and is well determined;
// with fewer than four such peaks the width is the constant median. It
// reports whether the lines are asymmetric (see asymmetryLaw).
func shapeCurve(md *model, cs []*component, o Options, fwhm0 float64) (profile.Caglioti, float64, profile.Asymmetry, bool) {
	var xs, ws, etas, as, sas []float64
	for _, c := range cs {
		if c.fixedShape || c.sh <= 0 || c.h/c.sh < 2*o.FreeShapeSNR || !md.isolated(c, cs) {
			continue
		}
		if c.sw > 0.1*c.w {
			continue
		}
		xs = append(xs, c.x)
		ws = append(ws, c.w)
		etas = append(etas, c.eta)
		as, sas = append(as, c.asym), append(sas, c.sasym)
	}
	eta := 0.5
	if len(etas) > 0 {
		eta = order.Median(etas)
	}
	law, asym := asymmetryLaw(xs, as, sas)
	if len(ws) == 0 {
		return profile.Caglioti{W: fwhm0 * fwhm0}, eta, law, asym
	}
	flat := profile.Caglioti{W: sq(order.Median(ws))}
	if len(ws) < 2 {
		return flat, eta, law, asym
	}
	if len(ws) < 4 {
		// Two or three widths: the constant and the tan²θ term, which
		// carry most of the broadening of a laboratory instrument (the
		// divergence and the sample), so that lines far from those
		// measured are not taken for blends because they are wider.
		if c, ok := widthLaw(xs, ws); ok {
			return c, eta, law, asym
		}
		return flat, eta, law, asym
	}
	a := mat.NewDense(len(xs), 3, nil)
	b := mat.NewVecDense(len(xs), nil)
	for i, x := range xs {
		t := math.Tan(x * deg / 2)
		a.Set(i, 0, t*t)
		a.Set(i, 1, t)
		a.Set(i, 2, 1)
		b.SetVec(i, ws[i]*ws[i])
	}
	var sol mat.VecDense
	if err := sol.SolveVec(a, b); err != nil {
		return flat, eta, law, asym
	}
	c := profile.Caglioti{U: sol.AtVec(0), V: sol.AtVec(1), W: sol.AtVec(2)}
	// The curve must stay positive and near the measured widths over the
	// scan; otherwise fall back to the constant.
	lo, hi := md.x[0], md.x[len(md.x)-1]
	for k := 0; k <= 20; k++ {
		x := lo + (hi-lo)*float64(k)/20
		t := math.Tan(x * deg / 2)
		if v := c.U*t*t + c.V*t + c.W; v <= 0 {
			return flat, eta, law, asym
		}
	}
	for i, x := range xs {
		if r := c.At(x) / ws[i]; r < 0.7 || r > 1.4 {
			return flat, eta, law, asym
		}
	}
	return c, eta, law, asym
}

// widthLaw fits FWHM² = U tan²θ + W to the widths ws at 2θ = xs
// (degrees) by least squares; it fails unless both terms come out
// positive and the law is within 30 % of every width.
func widthLaw(xs, ws []float64) (profile.Caglioti, bool) {
	var stt, st, sy, sty float64
	for i, x := range xs {
		t := sq(math.Tan(x * deg / 2))
		stt += t * t
		st += t
		sy += ws[i] * ws[i]
		sty += t * ws[i] * ws[i]
	}
	n := float64(len(xs))
	det := n*stt - st*st
	if !(det > 1e-12*n*stt) {
		return profile.Caglioti{}, false
	}
	c := profile.Caglioti{U: (n*sty - st*sy) / det, W: (stt*sy - st*sty) / det}
	if !(c.U > 0 && c.W > 0) {
		return profile.Caglioti{}, false
	}
	for i, x := range xs {
		if r := c.At(x) / ws[i]; r < 0.7 || r > 1.4 {
			return profile.Caglioti{}, false
		}
	}
	return c, true
}

// misfit estimates how far the line shape departs from the profile model,
// as a fraction of the model's height: for each strong line fitted alone,
// m² = Σ(r² − σ²) / Σp² over its window (r the residual, σ the counting
// esd, p the line's profile above the background), pooled over the lines
// (Σ over lines of the numerators over Σ of the denominators, so that the
// strong lines, whose misfit stands out of their noise, decide); zero
// when the model fits within the counting noise (common practice for
// treating a model's error as part of the noise).
func misfit(md *model, cs []*component, prof []float64, o Options) float64 {
	var exs, pps float64
	for _, c := range cs {
		if c.fixedShape || c.flags&FlagShared != 0 || c.sh <= 0 || c.h/c.sh < 2*o.FreeShapeSNR {
			continue
		}
		lo, hi := md.window(c)
		p := make([]float64, hi-lo)
		md.addProfile(p, lo, hi, c)
		var ex, pp float64
		for i := lo; i < hi; i++ {
			r := md.y[i] - prof[i]
			ex += r*r - 1/md.w[i]
			pp += p[i-lo] * p[i-lo]
		}
		exs += ex
		pps += pp
	}
	if pps <= 0 {
		return 0
	}
	return math.Sqrt(math.Max(exs, 0) / pps)
}

// residualCandidates looks for significant maxima that the fitted model
// leaves in the data and returns them as new weak components. The noise
// of the residual is the counting noise and the model's misfit (see
// misfit) at the local height of the fitted lines: at high counts every
// line shape departs from any model by many counting esds, and such a
// misfit is not a line.
func residualCandidates(md *model, cs []*component, res *Result, o Options) []*component {
	curve, eta := res.FWHMCurve, res.Eta
	prof := profileOf(md, cs)
	m := misfit(md, cs, prof, o)
	n := len(md.x)
	r := make([]float64, n)
	sig := make([]float64, n)
	for i := range r {
		r[i] = md.y[i] - prof[i] + md.bg[i]
		sig[i] = math.Sqrt(1/md.w[i] + sq(m*(prof[i]-md.bg[i])))
	}
	step := (md.x[n-1] - md.x[0]) / float64(n-1)
	kw := max(1, int(curve.At(md.x[n/2])/step/8))
	xd, nd, sd := detectionGrid(md.x, r, md.bg, sig, kw)
	found := detect(xd, nd, sd, md.rad, curve.At(md.x[n/2]), o.Threshold+1)
	var out []*component
	for _, f := range found {
		w := curve.At(f.x)
		// Closer than a width to a fitted peak, a residual maximum is more
		// likely a misfit of that peak's shape than a line of its own.
		near := false
		for _, c := range cs {
			if math.Abs(c.x-f.x) < math.Max(w, c.w) {
				near = true
				break
			}
		}
		if near {
			continue
		}
		c := &component{x: f.x, anchor: f.x, h: f.h, w: w, eta: eta, z: f.z, fixedShape: true, symmetric: true, flags: FlagAdded}
		c.asym = res.Asymmetry.At(f.x)
		out = append(out, c)
	}
	return out
}

// blendExcess is the width, relative to the scan's width curve, above
// which a line is taken for an unresolved blend of lines.
const blendExcess = 1.2

// LineESD returns the uncertainty of a peak's position as a line's
// position, degrees 2θ: the fit's esd, or, for a peak wider than
// blendExcess times the width curve (an unresolved blend, whose maximum
// lies somewhere between its components), at least half its excess
// width; for a peak whose fitting window an end of the scan cuts, at
// least half its FWHM, since the background under a line at the end of
// the data cannot be clipped and pulls the fitted position (on simulated
// scans a line 0.1° from the end came out 5 esds low on average).
func (r *Result) LineESD(p Peak) float64 {
	if p.Flags&FlagEdge != 0 {
		return math.Max(p.TwoThetaESD, p.FWHM/2)
	}
	w := r.FWHMCurve.At(p.TwoTheta)
	if p.Flags&FlagFixedShape == 0 && w > 0 && p.FWHM > blendExcess*w {
		return math.Max(p.TwoThetaESD, (p.FWHM-w)/2)
	}
	return p.TwoThetaESD
}
