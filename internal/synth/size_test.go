package synth

import (
	"math"
	"testing"
)

// lineArea returns the area and FWHM (by counting steps at or above
// half the top) of the instrument's line of FWHM fwhm at 40° 2θ
// broadened by a Lorentzian of FWHM size and a Gaussian of FWHM strain.
func lineArea(in Instrument, fwhm, size, strain float64) (area, width float64) {
	const x0, step = 40.0, 0.002
	k := newKernel(size, strain, fwhm)
	top := in.broadened(x0, x0, fwhm, k)
	for x := x0 - 20; x <= x0+20; x += step {
		v := in.broadened(x, x0, fwhm, k)
		area += v * step
		if v >= top/2 {
			width += step
		}
	}
	return area, width
}

// TestSizeBroadening: a line convolved with a Lorentzian keeps its area
// (within the 1.6 % that the kernel's truncated tails redistribute, and
// the sum's error) and widens; without broadening it is the instrument's.
func TestSizeBroadening(t *testing.T) {
	in := Instrument{Lambda1: cuKa1}.withDefaults()
	const fwhm = 0.08
	a0, w0 := lineArea(in, fwhm, 0, 0)
	if d := in.broadened(40.03, 40, fwhm, newKernel(0, 0, fwhm)) - in.line(40.03, 40, fwhm); d != 0 {
		t.Errorf("no broadening: differs from the instrument's line by %g", d)
	}
	for _, size := range []float64{0.05, 0.15, 0.4} {
		a, w := lineArea(in, fwhm, size, 0)
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

// TestStrainBroadening: a line convolved with a Gaussian keeps its area
// (the Gaussian has no tails to truncate: within the sum's error) and
// widens by at least the quadrature sum's share (Gaussian widths add in
// quadrature in a convolution; a pseudo-Voigt's Lorentzian part adds
// more) and by less than the sum of the widths; with a Lorentzian as
// well, it is wider than with either alone.
func TestStrainBroadening(t *testing.T) {
	in := Instrument{Lambda1: cuKa1}.withDefaults()
	const fwhm = 0.08
	a0, w0 := lineArea(in, fwhm, 0, 0)
	for _, strain := range []float64{0.05, 0.15, 0.4} {
		a, w := lineArea(in, fwhm, 0, strain)
		if math.Abs(a/a0-1) > 0.002 {
			t.Errorf("strain %g°: area %.5f, unbroadened %.5f", strain, a, a0)
		}
		if q := math.Hypot(w0, strain); !(w > 0.97*q && w < w0+strain) {
			t.Errorf("strain %g°: FWHM %.4f°, unbroadened %.4f°, in quadrature %.4f°", strain, w, w0, q)
		}
		_, ws := lineArea(in, fwhm, 0.1, 0)
		if _, wb := lineArea(in, fwhm, 0.1, strain); !(wb > w && wb > ws) {
			t.Errorf("strain %g° with size 0.1°: FWHM %.4f°, alone %.4f° and %.4f°", strain, wb, w, ws)
		}
	}
}
