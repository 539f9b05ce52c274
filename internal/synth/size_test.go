package synth

import (
	"math"
	"testing"
)

// TestSizeBroadening: a line convolved with a Lorentzian keeps its area
// (within the 1.6 % that the kernel's truncated tails redistribute, and
// the sum's error) and widens; without broadening it is the instrument's.
func TestSizeBroadening(t *testing.T) {
	in := Instrument{Lambda1: cuKa1}.withDefaults()
	const x0, fwhm, step = 40.0, 0.08, 0.002
	area := func(size float64) (a, half float64) {
		top := in.broadened(x0, x0, fwhm, size)
		for x := x0 - 20; x <= x0+20; x += step {
			v := in.broadened(x, x0, fwhm, size)
			a += v * step
			if v >= top/2 {
				half += step
			}
		}
		return
	}
	a0, w0 := area(0)
	if d := in.broadened(x0+0.03, x0, fwhm, 0) - in.line(x0+0.03, x0, fwhm); d != 0 {
		t.Errorf("no broadening: differs from the instrument's line by %g", d)
	}
	for _, size := range []float64{0.05, 0.15, 0.4} {
		a, w := area(size)
		if math.Abs(a/a0-1) > 0.02 {
			t.Errorf("size %g°: area %.5f, unbroadened %.5f", size, a, a0)
		}
		// Lorentzian widths add in a convolution; a pseudo-Voigt's
		// width grows by less than the Lorentzian's and more than half.
		if !(w > w0+0.5*size && w < w0+size*1.05) {
			t.Errorf("size %g°: FWHM %.4f°, unbroadened %.4f°", size, w, w0)
		}
	}
}
