package peaks

import (
	"cmp"
	"math"
	"slices"
	"sort"

	"reticle/scanfile"
)

// estimateFWHM returns a rough FWHM in degrees 2θ: the lower quartile of
// the half-height widths of the strongest maxima of net (counts above
// background). Strong maxima are often unresolved doublets (a tetragonal
// splitting, K-alpha2 at high angle) wider than one line; the narrow
// ones give the line width.
func estimateFWHM(x, net []float64, step float64) float64 {
	n := len(net)
	s := boxcar(net, 1)
	type mx struct {
		i int
		v float64
	}
	var ms []mx
	for i := 1; i < n-1; i++ {
		if s[i] > 0 && s[i] >= s[i-1] && s[i] > s[i+1] {
			ms = append(ms, mx{i, s[i]})
		}
	}
	slices.SortFunc(ms, func(a, b mx) int { return cmp.Or(cmp.Compare(b.v, a.v), cmp.Compare(a.i, b.i)) })
	var ws []float64
	var taken []int
	for _, m := range ms {
		if len(ws) == 7 {
			break
		}
		near := false
		for _, t := range taken {
			if abs(t-m.i) < 10 {
				near = true
			}
		}
		if near {
			continue
		}
		taken = append(taken, m.i)
		half := m.v / 2
		l := m.i
		for l > 0 && s[l] > half {
			l--
		}
		r := m.i
		for r < n-1 && s[r] > half {
			r++
		}
		if l == 0 || r == n-1 {
			continue
		}
		xl := x[l] + (half-s[l])/(s[l+1]-s[l])*(x[l+1]-x[l])
		xr := x[r-1] + (s[r-1]-half)/(s[r-1]-s[r])*(x[r]-x[r-1])
		ws = append(ws, xr-xl)
	}
	if len(ws) == 0 {
		return 5 * step
	}
	sort.Float64s(ws)
	return math.Max(ws[len(ws)/4], 2*step)
}

func abs(i int) int {
	if i < 0 {
		return -i
	}
	return i
}

// candidate is a detected maximum on the detection grid.
type candidate struct {
	x, h, z float64 // position (degrees 2θ), stripped net height, significance
	w       float64 // half-height width estimate, degrees 2θ
}

// detect finds maxima of the Savitzky–Golay smoothed net counts whose
// significance exceeds minZ. For a doublet the K-alpha2 part is first
// stripped (Rachinger, J. Sci. Instrum. 25 (1948) 254) so that companions
// do not show as maxima of their own.
func detect(x, net, sigma []float64, rad scanfile.Radiation, fwhm float64, minZ float64) []candidate {
	n := len(x)
	step := (x[n-1] - x[0]) / float64(n-1)
	h := max(2, int(0.6*fwhm/step+0.5))
	c := SavitzkyGolay(h)
	s, ss := smooth(net, sigma, c)
	if rad.Doublet() {
		s, ss = strip(x, s, ss, rad)
	}
	var out []candidate
	for i := 1; i < n-1; i++ {
		if !(s[i] >= s[i-1] && s[i] > s[i+1]) || ss[i] <= 0 {
			continue
		}
		z := s[i] / ss[i]
		if z < minZ {
			continue
		}
		// Prominence: height above the higher of the two lowest points
		// between this maximum and the nearest higher point on each side
		// (within reach). Noise riding on the tail of a strong peak has
		// little of it.
		reach := max(4, int(8*fwhm/step))
		if pz := prominence(s, i, reach) / ss[i]; pz < minZ {
			continue
		}
		// Parabolic interpolation of the maximum.
		d := s[i-1] - 2*s[i] + s[i+1]
		xi := x[i]
		if d < 0 {
			xi += 0.5 * (s[i-1] - s[i+1]) / d * (x[i+1] - x[i-1]) / 2
		}
		out = append(out, candidate{x: xi, h: s[i], z: z, w: halfWidth(x, s, i)})
	}
	return append(out, curvatureCandidates(x, s, ss, fwhm, minZ, out)...)
}

// curvatureCandidates finds lines that make no maximum of their own, a
// shoulder or one line of an unresolved pair: significant minima of the
// smoothed second derivative (Savitzky–Golay, over about 0.8 FWHM) where
// the smoothed counts are significant too, further than half a width from
// every maximum already found. The fit decides whether they stay.
func curvatureCandidates(x, s, ss []float64, fwhm, minZ float64, maxima []candidate) []candidate {
	n := len(x)
	step := (x[n-1] - x[0]) / float64(n-1)
	h := max(2, int(0.4*fwhm/step+0.5))
	if 2*h+1 > n {
		return nil
	}
	d2, sd2 := smooth(s, ss, SavitzkyGolay2(h))
	var out []candidate
	for i := 1; i < n-1; i++ {
		if !(d2[i] <= d2[i-1] && d2[i] < d2[i+1]) || d2[i] >= 0 || sd2[i] <= 0 || ss[i] <= 0 {
			continue
		}
		if -d2[i]/sd2[i] < minZ+1 || s[i]/ss[i] < minZ+1 {
			continue
		}
		near := false
		for _, m := range maxima {
			if math.Abs(m.x-x[i]) < 0.5*math.Max(fwhm, m.w) {
				near = true
				break
			}
		}
		if near {
			continue
		}
		out = append(out, candidate{x: x[i], h: s[i], z: s[i] / ss[i], w: fwhm})
	}
	return out
}

// prominence returns s[i] minus the higher of the minima on the left and
// right up to the first point higher than s[i] or reach points away.
func prominence(s []float64, i, reach int) float64 {
	left := s[i]
	for j := i - 1; j >= 0 && j >= i-reach && s[j] <= s[i]; j-- {
		left = math.Min(left, s[j])
	}
	right := s[i]
	for j := i + 1; j < len(s) && j <= i+reach && s[j] <= s[i]; j++ {
		right = math.Min(right, s[j])
	}
	return s[i] - math.Max(left, right)
}

// halfWidth measures the width at half height of the maximum at i, bounded
// by the neighbouring minima.
func halfWidth(x, s []float64, i int) float64 {
	half := s[i] / 2
	l := i
	for l > 0 && s[l] > half && s[l-1] <= s[l] {
		l--
	}
	r := i
	for r < len(s)-1 && s[r] > half && s[r+1] <= s[r] {
		r++
	}
	return x[r] - x[l]
}

// strip removes the K-alpha2 part from smoothed net counts: working up in
// angle, s1(x) = s(x) − R·s1(x′) where x′ is the K-alpha1 angle whose
// K-alpha2 line falls at x. The variance grows accordingly.
func strip(x, s, ss []float64, rad scanfile.Radiation) ([]float64, []float64) {
	n := len(x)
	s1 := make([]float64, n)
	v1 := make([]float64, n)
	r := rad.Ratio2
	j := 0
	for i := 0; i < n; i++ {
		xp := Companion(x[i], rad.Lambda2, rad.Lambda1)
		s1[i], v1[i] = s[i], ss[i]*ss[i]
		if math.IsNaN(xp) || xp < x[0] {
			continue
		}
		for j+1 < i && x[j+1] < xp {
			j++
		}
		if j+1 >= n || x[j] > xp {
			continue
		}
		t := (xp - x[j]) / (x[j+1] - x[j])
		prev := s1[j] + t*(s1[j+1]-s1[j])
		pv := v1[j] + t*(v1[j+1]-v1[j])
		s1[i] -= r * prev
		v1[i] += r * r * pv
	}
	for i := range v1 {
		v1[i] = math.Sqrt(v1[i])
	}
	return s1, v1
}
