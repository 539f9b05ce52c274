package peaks

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestSmoothEnds checks smooth against the filter applied point by point
// with the window mirrored at the ends, for short and long series.
func TestSmoothEnds(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	for _, n := range []int{3, 5, 8, 40} {
		for _, h := range []int{1, 2, 3} {
			if 2*h+1 > 2*n-1 {
				continue
			}
			y, sg := make([]float64, n), make([]float64, n)
			for i := range y {
				y[i], sg[i] = 100*rng.Float64(), 1+rng.Float64()
			}
			c := SavitzkyGolay(h)
			s, ss := smooth(y, sg, c)
			for i := 0; i < n; i++ {
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
					v += c[k+h] * c[k+h] * sg[j] * sg[j]
				}
				if math.Abs(s[i]-a) > 1e-12*math.Abs(a)+1e-12 || math.Abs(ss[i]-math.Sqrt(v)) > 1e-12 {
					t.Errorf("n %d, h %d, point %d: %g ± %g, want %g ± %g", n, h, i, s[i], ss[i], a, math.Sqrt(v))
				}
			}
		}
	}
}
