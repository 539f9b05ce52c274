package peaks

import (
	"math"
	"sort"

	"gonum.org/v1/gonum/mat"
)

// Caglioti is the instrumental width curve FWHM² = U tan²θ + V tanθ + W
// (Caglioti, Paoletti & Ricci, Nucl. Instrum. 3 (1958) 223), FWHM in
// degrees 2θ.
type Caglioti struct{ U, V, W float64 }

// At returns the FWHM in degrees at twoTheta degrees.
func (c Caglioti) At(twoTheta float64) float64 {
	t := math.Tan(twoTheta * deg / 2)
	return math.Sqrt(math.Max(c.U*t*t+c.V*t+c.W, 1e-12))
}

// shapeCurve fits the width curve and the median mixing to the components
// whose shape was refined and is well determined; with fewer than four such
// peaks the width is the constant median.
func shapeCurve(md *model, cs []*component, o Options, fwhm0 float64) (Caglioti, float64) {
	var xs, ws, etas []float64
	for _, c := range cs {
		if c.fixedShape || c.sh <= 0 || c.h/c.sh < 2*o.FreeShapeSNR || c.flags&FlagShared != 0 {
			continue
		}
		if c.sw > 0.1*c.w {
			continue
		}
		xs = append(xs, c.x)
		ws = append(ws, c.w)
		etas = append(etas, c.eta)
	}
	eta := 0.5
	if len(etas) > 0 {
		eta = median(etas)
	}
	if len(ws) == 0 {
		return Caglioti{W: fwhm0 * fwhm0}, eta
	}
	flat := Caglioti{W: sq(median(ws))}
	if len(ws) < 4 {
		return flat, eta
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
		return flat, eta
	}
	c := Caglioti{sol.AtVec(0), sol.AtVec(1), sol.AtVec(2)}
	// The curve must stay positive and near the measured widths over the
	// scan; otherwise fall back to the constant.
	lo, hi := md.x[0], md.x[len(md.x)-1]
	for k := 0; k <= 20; k++ {
		x := lo + (hi-lo)*float64(k)/20
		t := math.Tan(x * deg / 2)
		if v := c.U*t*t + c.V*t + c.W; v <= 0 {
			return flat, eta
		}
	}
	for i, x := range xs {
		if r := c.At(x) / ws[i]; r < 0.7 || r > 1.4 {
			return flat, eta
		}
	}
	return c, eta
}

func median(v []float64) float64 {
	s := append([]float64(nil), v...)
	sort.Float64s(s)
	n := len(s)
	if n%2 == 1 {
		return s[n/2]
	}
	return 0.5 * (s[n/2-1] + s[n/2])
}

// residualCandidates looks for significant maxima that the fitted model
// leaves in the data and returns them as new weak components.
func residualCandidates(md *model, cs []*component, curve Caglioti, eta float64, o Options) []*component {
	prof := profileOf(md, cs)
	n := len(md.x)
	r := make([]float64, n)
	sig := make([]float64, n)
	for i := range r {
		r[i] = md.y[i] - prof[i] + md.bg[i]
		sig[i] = 1 / math.Sqrt(md.w[i])
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
		out = append(out, &component{x: f.x, anchor: f.x, h: f.h, w: w, eta: eta, z: f.z, fixedShape: true, flags: FlagAdded})
	}
	return out
}
