package profile

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestLineGrad checks every derivative of LineGrad against central
// finite differences of LineShape, on random lines and points on both
// sides of the maximum.
func TestLineGrad(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for trial := 0; trial < 500; trial++ {
		x0 := 20 + 100*rng.Float64()
		w := 0.03 + 0.3*rng.Float64()
		eta := rng.Float64()
		asym := (2*rng.Float64() - 1) * 0.5
		tail := 1 + 2*rng.Float64()
		x := x0 + (2*rng.Float64()-1)*3*w
		if math.Abs(x-x0) < 1e-3*w {
			continue // the split's kink
		}
		f, dx0, dw, deta, dasym := LineGrad(x, x0, w, eta, asym, tail)
		if want := LineShape(x, x0, w, eta, asym, tail); math.Abs(f-want) > 1e-14 {
			t.Fatalf("LineGrad's value %g differs from LineShape's %g", f, want)
		}
		num := func(g func(h float64) float64, h float64) float64 { return (g(h) - g(-h)) / (2 * h) }
		for _, c := range []struct {
			name string
			got  float64
			want float64
		}{
			{"x0", dx0, num(func(h float64) float64 { return LineShape(x, x0+h, w, eta, asym, tail) }, 1e-6*w)},
			{"w", dw, num(func(h float64) float64 { return LineShape(x, x0, w+h, eta, asym, tail) }, 1e-6*w)},
			{"eta", deta, num(func(h float64) float64 { return LineShape(x, x0, w, eta+h, asym, tail) }, 1e-6)},
			{"asym", dasym, num(func(h float64) float64 { return LineShape(x, x0, w, eta, asym+h, tail) }, 1e-6)},
		} {
			if math.Abs(c.got-c.want) > 1e-5*(1+math.Abs(c.want)) {
				t.Errorf("trial %d: ∂/∂%s = %g, finite differences %g (x−x0 = %g, w %g, η %g, A %g, τ %g)", trial, c.name, c.got, c.want, x-x0, w, eta, asym, tail)
			}
		}
	}
}

// TestTailedAreaFactor integrates lines of LineShape numerically,
// plain and with wide wings: their area is height × FWHM ×
// TailedAreaFactor, η π/2 τ + (1 − η) √(π / (4 ln 2)) for the
// pseudo-Voigt (Wertheim et al., J. Electron Spectrosc. 3 (1974) 377).
func TestTailedAreaFactor(t *testing.T) {
	for _, tail := range []float64{1, 1.5} {
		for _, eta := range []float64{0, 0.3, 0.7, 1} {
			const w, h = 0.1, 7.0
			// The Lorentzian's wings: integrate to ±2000 FWHM numerically
			// and add the two tails beyond analytically,
			// h·η·w·τ·(π/2 − atan(2U/τ)) (∫ over |u| > U of
			// 1/(1 + 4u²/τ²) du is τ(π/2 − atan(2U/τ))).
			const span = 2000.0
			n := 2_000_000
			step := 2 * span * w / float64(n)
			var sum float64
			for i := 0; i < n; i++ {
				x := -span*w + (float64(i)+0.5)*step
				sum += h * LineShape(x, 0, w, eta, 0, tail) * step
			}
			sum += h * eta * w * tail * (math.Pi/2 - math.Atan(2*span/tail))
			a, _ := TailedAreaFactor(eta, tail)
			if want := h * w * a; math.Abs(sum-want) > 1e-6*want {
				t.Errorf("τ %g, η %g: numeric area %.9g, TailedAreaFactor gives %.9g", tail, eta, sum, want)
			}
		}
	}
}

// TestCaglioti: the width law's value at 2θ against the formula written
// out, FWHM² = U tan²θ + V tanθ + W.
func TestCaglioti(t *testing.T) {
	c := Caglioti{U: 0.01, V: -0.004, W: 0.003}
	for _, tt := range []float64{20, 60, 100, 140} {
		th := tt / 2 * math.Pi / 180
		want := math.Sqrt(0.01*math.Tan(th)*math.Tan(th) - 0.004*math.Tan(th) + 0.003)
		if got := c.At(tt); math.Abs(got-want) > 1e-12 {
			t.Errorf("2θ %g: %g, want %g", tt, got, want)
		}
	}
}

// TestLevenbergMarquardt fits a Gaussian line with a constant background
// to noiseless points and to noisy ones: the noiseless fit returns the
// parameters, and over many noisy sets the scatter of the fitted position
// matches the esd the covariance gives (within 10 %).
func TestLevenbergMarquardt(t *testing.T) {
	const n = 200
	x := make([]float64, n)
	for i := range x {
		x[i] = 10 + 0.01*float64(i)
	}
	truth := []float64{5, 100, 11, 0.2} // background, height, position, FWHM
	model := func(p, m, jac []float64) {
		for i, xi := range x {
			f, dx0, dw, _ := pvGrad(xi, p[2], p[3], 0)
			m[i] = p[0] + p[1]*f
			if jac != nil {
				jac[i*4+0], jac[i*4+1], jac[i*4+2], jac[i*4+3] = 1, f, p[1]*dx0, p[1]*dw
			}
		}
	}
	y := make([]float64, n)
	model(truth, y, nil)
	wts := make([]float64, n)
	for i := range wts {
		wts[i] = 1
	}
	inf := math.Inf(1)
	prob := &Problem{Y: y, W: wts, Eval: model, Lo: []float64{-inf, 0, 10, 0.01}, Hi: []float64{inf, inf, 12, 1}, Free: []bool{true, true, true, true}}
	sol, err := LevenbergMarquardt(prob, []float64{4, 80, 11.03, 0.25}, 100)
	if err != nil {
		t.Fatal(err)
	}
	for j := range truth {
		if math.Abs(sol.P[j]-truth[j]) > 1e-6*math.Abs(truth[j]) {
			t.Errorf("noiseless fit: parameter %d is %g, want %g", j, sol.P[j], truth[j])
		}
	}
	// Noisy sets, σ = 1 on every point.
	rng := rand.New(rand.NewPCG(3, 4))
	var sum2, esd float64
	const sets = 300
	for s := 0; s < sets; s++ {
		yn := make([]float64, n)
		for i := range yn {
			yn[i] = y[i] + rng.NormFloat64()
		}
		p := &Problem{Y: yn, W: wts, Eval: model, Lo: prob.Lo, Hi: prob.Hi, Free: prob.Free}
		sol, err := LevenbergMarquardt(p, []float64{4, 80, 11.03, 0.25}, 100)
		if err != nil {
			t.Fatal(err)
		}
		d := sol.P[2] - truth[2]
		sum2 += d * d
		esd = math.Sqrt(sol.Cov.At(2, 2))
	}
	if rms := math.Sqrt(sum2 / sets); math.Abs(rms/esd-1) > 0.1 {
		t.Errorf("scatter of the position %.3g, esd %.3g", rms, esd)
	}
}

// TestTCH: the limits (a pure Gaussian gives η 0 and its own width, a
// pure Lorentzian η ≈ 1 and its own width), the derivatives against
// central differences, and TCHStart inverting TCH to within a few per
// cent.
func TestTCH(t *testing.T) {
	if w, eta, _, _, _, _ := TCH(0.1, 0); math.Abs(w-0.1) > 1e-12 || eta != 0 {
		t.Errorf("Gaussian: w %g, eta %g", w, eta)
	}
	if w, eta, _, _, _, _ := TCH(0, 0.1); math.Abs(w-0.1) > 1e-12 || math.Abs(eta-1) > 1e-4 {
		t.Errorf("Lorentzian: w %g, eta %g", w, eta)
	}
	if w, eta, a, b, c, d := TCH(0, 0); w != 0 || eta != 0 || a != 0 || b != 0 || c != 0 || d != 0 {
		t.Errorf("no width: %g %g %g %g %g %g", w, eta, a, b, c, d)
	}
	for _, c := range [][2]float64{{0.1, 0.05}, {0.05, 0.2}, {0.3, 0.01}} {
		w, eta, dwG, dwL, deG, deL := TCH(c[0], c[1])
		const h = 1e-7
		wp, ep, _, _, _, _ := TCH(c[0]+h, c[1])
		wm, em, _, _, _, _ := TCH(c[0]-h, c[1])
		if math.Abs((wp-wm)/(2*h)-dwG) > 1e-6 || math.Abs((ep-em)/(2*h)-deG) > 1e-5 {
			t.Errorf("%v: ∂/∂gG %g %g, differences %g %g", c, dwG, deG, (wp-wm)/(2*h), (ep-em)/(2*h))
		}
		wp, ep, _, _, _, _ = TCH(c[0], c[1]+h)
		wm, em, _, _, _, _ = TCH(c[0], c[1]-h)
		if math.Abs((wp-wm)/(2*h)-dwL) > 1e-6 || math.Abs((ep-em)/(2*h)-deL) > 1e-5 {
			t.Errorf("%v: ∂/∂gL %g %g, differences %g %g", c, dwL, deL, (wp-wm)/(2*h), (ep-em)/(2*h))
		}
		g, l := TCHStart(w, eta)
		w2, eta2, _, _, _, _ := TCH(g, l)
		if math.Abs(w2-w) > 0.03*w || math.Abs(eta2-eta) > 0.03 {
			t.Errorf("%v: TCHStart gives w %g eta %g for %g %g", c, w2, eta2, w, eta)
		}
	}
}
