package peaks

import (
	"math"

	"reticle/internal/order"
)

// SNIP estimates a slowly varying background under peaks by the
// Statistics-sensitive Non-linear Iterative Peak-clipping method (Ryan et
// al., Nucl. Instrum. Methods B 34 (1988) 396), on the log-log-square-root
// scale that flattens the dynamic range of counts. halfWidth is the largest
// clipping half-window in points; features narrower than about twice that
// are removed. The result has the length of y.
func SNIP(y []float64, halfWidth int) []float64 {
	n := len(y)
	v := make([]float64, n)
	for i, c := range y {
		v[i] = lls(math.Max(c, 0))
	}
	w := make([]float64, n)
	for p := 1; p <= halfWidth && 2*p < n; p++ {
		// The ends are carried over; every interior point is written.
		copy(w[:p], v[:p])
		copy(w[n-p:], v[n-p:])
		lo, mid, hi, out := v[:n-2*p], v[p:n-p], v[2*p:], w[p:n-p]
		for i := range out {
			out[i] = min(0.5*(lo[i]+hi[i]), mid[i])
		}
		v, w = w, v
	}
	for i := range v {
		v[i] = llsInv(v[i])
	}
	return v
}

func lls(c float64) float64 { return math.Log(math.Log(math.Sqrt(c+1)+1) + 1) }

func llsInv(v float64) float64 {
	e := math.Exp(math.Exp(v)-1) - 1
	return e*e - 1
}

// background returns the background under every point of the scan: SNIP
// on a lightly smoothed copy (binned when the window would be long), then
// lifted by the mean residual of the peak-free points so that it follows
// the middle of the noise rather than its lower edge.
func background(x, y, sigma []float64, widthDeg, fwhm float64) []float64 {
	n := len(y)
	step := (x[n-1] - x[0]) / float64(n-1)
	half := int(math.Round(widthDeg / 2 / step))
	// Bins of at most a third of a FWHM keep peaks several bins wide,
	// which is all the clipping needs.
	k := max(1, min(int(fwhm/3/step), (half+19)/20))
	// Bin by k, then smooth over about one FWHM so that the clipping does
	// not follow the low excursions of the noise.
	xb, yb := binMean(x, y, k)
	sw := int(math.Round(fwhm / (step * float64(k)) / 2))
	yb = boxcar(yb, max(sw, 1))
	bb := SNIP(yb, max(half/k, 2))
	bg := interpolate(xb, bb, x)

	// Offset: mean of y-bg over points far from any peak, in a moving
	// window of the background width.
	mask := make([]bool, n)
	for i := range y {
		if y[i]-bg[i] > 2.5*sigma[i] {
			mask[i] = true
		}
	}
	grow := int(math.Ceil(2 * fwhm / step))
	dil := dilate(mask, grow)
	r := make([]float64, n)
	wt := make([]float64, n)
	for i := range y {
		if !dil[i] {
			r[i] = y[i] - bg[i]
			wt[i] = 1
		}
	}
	win := max(half, 3)
	rs := runningSum(r, win)
	ws := runningSum(wt, win)
	for i := range bg {
		if ws[i] >= 5 {
			bg[i] += rs[i] / ws[i]
		}
	}
	return bg
}

// binMean averages groups of k points.
func binMean(x, y []float64, k int) ([]float64, []float64) {
	if k <= 1 {
		return x, append([]float64(nil), y...)
	}
	m := (len(x) + k - 1) / k
	xb := make([]float64, m)
	yb := make([]float64, m)
	for j := 0; j < m; j++ {
		lo, hi := j*k, min((j+1)*k, len(x))
		var sx, sy float64
		for i := lo; i < hi; i++ {
			sx += x[i]
			sy += y[i]
		}
		xb[j], yb[j] = sx/float64(hi-lo), sy/float64(hi-lo)
	}
	return xb, yb
}

// boxcar returns the moving average over 2h+1 points (shorter at the ends).
func boxcar(y []float64, h int) []float64 {
	s := runningSum(y, h)
	n := len(y)
	for i := range s {
		s[i] /= float64(min(i+h, n-1) - max(i-h, 0) + 1)
	}
	return s
}

// runningSum returns Σ y[j] for |j-i| ≤ h, clipped at the ends.
func runningSum(y []float64, h int) []float64 {
	n := len(y)
	cum := make([]float64, n+1)
	for i, v := range y {
		cum[i+1] = cum[i] + v
	}
	out := make([]float64, n)
	for i := range out {
		lo, hi := max(i-h, 0), min(i+h+1, n)
		out[i] = cum[hi] - cum[lo]
	}
	return out
}

// dilate widens every true run of m by h points on each side.
func dilate(m []bool, h int) []bool {
	n := len(m)
	out := make([]bool, n)
	last := -1 << 30
	for i := 0; i < n; i++ {
		if m[i] {
			last = i
		}
		if i-last <= h {
			out[i] = true
		}
	}
	last = 1 << 30
	for i := n - 1; i >= 0; i-- {
		if m[i] {
			last = i
		}
		if last-i <= h {
			out[i] = true
		}
	}
	return out
}

// interpolate evaluates the piecewise-linear function (xs, ys) at every x;
// xs and x are increasing. Outside xs the end values hold.
func interpolate(xs, ys, x []float64) []float64 {
	out := make([]float64, len(x))
	j := 0
	for i, v := range x {
		for j+1 < len(xs) && xs[j+1] < v {
			j++
		}
		switch {
		case v <= xs[0]:
			out[i] = ys[0]
		case j+1 >= len(xs):
			out[i] = ys[len(ys)-1]
		default:
			t := (v - xs[j]) / (xs[j+1] - xs[j])
			out[i] = ys[j] + t*(ys[j+1]-ys[j])
		}
	}
	return out
}

// maxNoiseScale is the ratio of the measured scatter to the stated noise
// below which the stated noise is kept: the robust spread of a few
// thousand points is itself uncertain by a few per cent, and a scan whose
// counts were scaled or whose detector adds noise scatters far more.
const maxNoiseScale = 1.15

// noiseScale measures how much more the intensities y scatter than their
// esds sigma say: the robust spread (1.4826 × median absolute value) of
// the second differences y_i − (y_{i−1} + y_{i+1})/2 over σ_i √1.5, on
// the points where the net intensity net (y less a rough background) is
// within 3σ of zero, so that peaks' curvature does not count as noise.
func noiseScale(y, net, sigma []float64) float64 {
	n := len(y)
	t := make([]float64, 0, n)
	for i := 1; i < n-1; i++ {
		if sigma[i] <= 0 || math.Abs(net[i]) > 3*sigma[i] {
			continue
		}
		r := y[i] - (y[i-1]+y[i+1])/2
		t = append(t, math.Abs(r)/(sigma[i]*math.Sqrt(1.5)))
	}
	if len(t) < 20 {
		return 1
	}
	return 1.4826 * order.Nth(t, len(t)/2)
}
