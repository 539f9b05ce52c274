package peaks

import (
	"math"
	"testing"
)

func TestWidthLaw(t *testing.T) {
	law := func(u, w float64) func(x float64) float64 {
		return func(x float64) float64 { return math.Sqrt(u*sq(math.Tan(x*deg/2)) + w) }
	}
	cases := []struct {
		name  string
		xs    []float64
		width func(x float64) float64
		ok    bool
		u, w  float64
	}{
		{"two lines", []float64{40, 95}, law(0.007, 0.005), true, 0.007, 0.005},
		{"three lines", []float64{37, 62, 94}, law(0.004, 0.002), true, 0.004, 0.002},
		{"narrowing with angle", []float64{30, 90}, func(x float64) float64 { return 0.12 - 0.0005*x }, false, 0, 0},
		{"one angle", []float64{50, 50}, law(0.007, 0.005), false, 0, 0},
	}
	for _, c := range cases {
		ws := make([]float64, len(c.xs))
		for i, x := range c.xs {
			ws[i] = c.width(x)
		}
		got, ok := widthLaw(c.xs, ws)
		if ok != c.ok {
			t.Errorf("%s: ok = %v, want %v", c.name, ok, c.ok)
			continue
		}
		if ok && (math.Abs(got.U-c.u) > 1e-9 || math.Abs(got.W-c.w) > 1e-9 || got.V != 0) {
			t.Errorf("%s: U %g V %g W %g, want U %g V 0 W %g", c.name, got.U, got.V, got.W, c.u, c.w)
		}
	}
}
