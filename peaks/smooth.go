package peaks

import "math"

// SavitzkyGolay returns the coefficients of the quadratic (equivalently
// cubic) least-squares smoothing filter over 2h+1 points (Savitzky & Golay,
// Anal. Chem. 36 (1964) 1627):
// c_k = 3(3h² + 3h − 1 − 5k²) / ((2h − 1)(2h + 1)(2h + 3)), k = −h … h.
func SavitzkyGolay(h int) []float64 {
	if h < 1 {
		panic("peaks: Savitzky–Golay half-width must be at least 1")
	}
	c := make([]float64, 2*h+1)
	hf := float64(h)
	den := (2*hf - 1) * (2*hf + 1) * (2*hf + 3)
	for k := -h; k <= h; k++ {
		kf := float64(k)
		c[k+h] = 3 * (3*hf*hf + 3*hf - 1 - 5*kf*kf) / den
	}
	return c
}

// smooth applies the filter c to y and returns the smoothed values and
// their standard deviations from the point sigmas (Σ c_k² σ²_{i+k})^½. Near
// the ends the window is mirrored.
func smooth(y, sigma, c []float64) (s, ss []float64) {
	n := len(y)
	h := len(c) / 2
	s = make([]float64, n)
	ss = make([]float64, n)
	c2 := make([]float64, len(c))
	for k, x := range c {
		c2[k] = x * x
	}
	for i := h; i < n-h; i++ {
		// Away from the ends the window needs no mirroring.
		var a, v float64
		yw, sw := y[i-h:i+h+1], sigma[i-h:i+h+1]
		for k, ck := range c {
			a += ck * yw[k]
			v += c2[k] * sw[k] * sw[k]
		}
		s[i], ss[i] = a, math.Sqrt(v)
	}
	for i := 0; i < n; i++ {
		if i == h && h < n-h {
			i = n - h // the interior is done
		}
		var a, v float64
		for k := -h; k <= h; k++ {
			j := i + k
			if j < 0 {
				j = -j
			}
			if j >= n {
				j = 2*(n-1) - j
			}
			j = min(max(j, 0), n-1)
			a += c[k+h] * y[j]
			v += c[k+h] * c[k+h] * sigma[j] * sigma[j]
		}
		s[i], ss[i] = a, math.Sqrt(v)
	}
	return s, ss
}

// SavitzkyGolay2 returns the coefficients of the quadratic least-squares
// second-derivative filter over 2h+1 points (Savitzky & Golay 1964): the
// curvature 2a₂ of the parabola a₀ + a₁k + a₂k² fitted to the points,
// per squared step: c_k = 2(k² − m)/Σ_j(j² − m)², m = h(h+1)/3.
func SavitzkyGolay2(h int) []float64 {
	if h < 1 {
		panic("peaks: Savitzky–Golay half-width must be at least 1")
	}
	m := float64(h*(h+1)) / 3
	var den float64
	for k := -h; k <= h; k++ {
		d := float64(k*k) - m
		den += d * d
	}
	c := make([]float64, 2*h+1)
	for k := -h; k <= h; k++ {
		c[k+h] = 2 * (float64(k*k) - m) / den
	}
	return c
}
