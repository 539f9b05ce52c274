package refine

import (
	"context"
	"errors"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"gonum.org/v1/gonum/diff/fd"
	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/optimize"

	"reticle/indexing"
	"reticle/peaks"
)

func hkl(h, k, l int) []indexing.HKL { return []indexing.HKL{{h, k, l}} }

// TestWorkedCubic refines a cubic cell from five lines, without
// corrections, and compares it with the arithmetic below, done by hand
// (with a pocket calculator) from Bragg's law.
//
// Lines of a rock-salt-like F cell, Cu K-alpha1 λ = 1.5405929 Å, every
// esd σ = 0.01°; N = h²+k²+l²:
//
//	hkl  N  2θ obs    sin θ      a_i = λ√N/(2 sin θ)  tan θ     g = 2 tan θ/a·(180/π)  g²
//	111  3  27.366°   0.2365499  5.640217 Å           0.243459   4.9463 °/Å            24.466
//	200  4  31.705°   0.2731618  5.639855 Å           0.283961   5.7692 °/Å            33.284
//	220  8  45.445°   0.3862683  5.640451 Å           0.418771   8.5081 °/Å            72.388
//	311 11  53.870°   0.4529794  5.639957 Å           0.508097  10.3230 °/Å           106.564
//	222 12  56.474°   0.4731198  5.639978 Å           0.537027  10.9107 °/Å           119.044
//
// With one parameter and equal esds, the least-squares a is, to first
// order, the mean of the a_i weighted by g² = (∂2θ/∂a)²:
//
//	Σg² = 355.747;  Σg²·a_i = 2006.4560;  a = 2006.4560/355.747 = 5.640073 Å
//
// and its esd is σ/√Σg² = 0.01/18.861 = 0.00053 Å. The residuals at that
// a are −0.0007°, +0.0013°, −0.0032°, +0.0012°, +0.0010°, so
// χ² = Σ(Δ/σ)² = 0.149 and χ²_red = 0.149/4 = 0.037: below 1, no
// scaling. Result: a = 5.6401(5) Å (esd digits as FormatESD rounds them), V = a³ = 179.41(5) Å³ (σ_V = 3a²σ_a).
func TestWorkedCubic(t *testing.T) {
	obs := []Observation{
		{TwoTheta: 27.366, ESD: 0.01, HKL: hkl(1, 1, 1)},
		{TwoTheta: 31.705, ESD: 0.01, HKL: hkl(2, 0, 0)},
		{TwoTheta: 45.445, ESD: 0.01, HKL: hkl(2, 2, 0)},
		{TwoTheta: 53.870, ESD: 0.01, HKL: hkl(3, 1, 1)},
		{TwoTheta: 56.474, ESD: 0.01, HKL: hkl(2, 2, 2)},
	}
	res, err := Refine(context.Background(), indexing.NewCell(indexing.Cubic, indexing.F, 5.6, 0), obs, Options{Wavelength: cuKa1})
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(res.Cell.A-5.640073) > 2e-6 {
		t.Errorf("a = %.7f Å, hand-worked 5.640073", res.Cell.A)
	}
	if math.Abs(res.CellESD.A-0.000530) > 2e-6 {
		t.Errorf("esd(a) = %.7f Å, hand-worked 0.000530", res.CellESD.A)
	}
	if math.Abs(res.Chi2-0.149) > 0.001 || res.Scaled {
		t.Errorf("χ² = %.4f (scaled %v), hand-worked 0.149 unscaled", res.Chi2, res.Scaled)
	}
	if got := peaks.FormatESD(res.Cell.A, res.CellESD.A); got != "5.6401(5)" {
		t.Errorf("a prints %s, want 5.6401(5)", got)
	}
	if got := peaks.FormatESD(res.Volume, res.VolumeESD); got != "179.41(5)" {
		t.Errorf("V prints %s, want 179.41(5)", got)
	}
	if res.DOF != 4 || res.N != 5 {
		t.Errorf("N = %d, DOF = %d; want 5, 4", res.N, res.DOF)
	}
}

// independentChi2 is χ² of the same model written a second way: d from
// indexing.Cell.D, Bragg's law from peaks.TwoTheta, the displacement
// shift −2s·cos θ/R converted to degrees.
func independentChi2(sys indexing.System, x []float64, obs []Observation, zeroOn, dispOn bool, radius float64) float64 {
	np := len(cellParams(sys))
	cell := buildCell(sys, indexing.P, x[:np])
	zero, disp := 0.0, 0.0
	k := np
	if zeroOn {
		zero = x[k]
		k++
	}
	if dispOn {
		disp = x[k]
	}
	var s float64
	for _, o := range obs {
		h := o.HKL[0]
		tt := peaks.TwoTheta(cell.D(h[0], h[1], h[2]), cuKa1)
		theta := tt / 2 * math.Pi / 180
		calc := tt + zero - 2*disp*math.Cos(theta)/radius*180/math.Pi
		s += math.Pow((o.TwoTheta-calc)/o.ESD, 2)
	}
	return s
}

// central4 is the fourth-order central difference of a first derivative,
// (f(−2h) − 8f(−h) + 8f(h) − f(2h))/12h: the two-point formula's h² error
// is larger than the agreement asked for where the model bends over one
// esd.
var central4 = fd.Formula{
	Stencil:    []fd.Point{{Loc: -2, Coeff: 1.0 / 12}, {Loc: -1, Coeff: -8.0 / 12}, {Loc: 1, Coeff: 8.0 / 12}, {Loc: 2, Coeff: -1.0 / 12}},
	Derivative: 1,
	Step:       1e-2,
}

// TestIndependentMinimiser compares the Gauss–Newton result with
// gonum/optimize's BFGS on the χ² written independently: the minima
// agree to 1e-9 relative (cell edges relative to themselves, corrections
// relative to the larger of their value and 0.1° or 0.1 mm).
func TestIndependentMinimiser(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 5))
	for _, test := range []struct {
		cell           indexing.Cell
		zero, disp     float64
		zeroOn, dispOn bool
	}{
		{indexing.NewCell(indexing.Cubic, indexing.F, 5.6402, 0), 0, 0, false, false},
		{indexing.NewCell(indexing.Tetragonal, indexing.P, 4.5937, 2.9587), 0.04, 0, true, false},
		{indexing.NewCell(indexing.Hexagonal, indexing.P, 3.2094, 5.2108), 0.03, 0.05, true, true},
		{indexing.NewCell(indexing.Rhombohedral, indexing.R, 4.7589, 12.991), -0.02, -0.04, true, true},
		{indexing.Cell{System: indexing.Orthorhombic, Centring: indexing.P, A: 4.76, B: 10.22, C: 5.99, Alpha: 90, Beta: 90, Gamma: 90}, 0.01, 0, true, false},
	} {
		obs := synthLines(truth{cell: test.cell, zero: test.zero, disp: test.disp, radius: 240}, rng)
		opt := Options{Wavelength: cuKa1, Zero: test.zeroOn, Displacement: test.dispOn}
		res, err := Refine(context.Background(), test.cell, obs, opt)
		if err != nil {
			t.Fatal(err)
		}
		x := make([]float64, len(res.Params))
		for i, p := range res.Params {
			x[i] = p.Value
		}
		// Minimise over u with x = x̂ + L·(u + 3), L the Cholesky factor
		// of the reported covariance, starting 3 units away in every
		// direction: the whitening keeps the problem well conditioned
		// for a general method; where the minimum lies is the
		// independent method's own finding.
		n := len(x)
		cov := mat.NewSymDense(n, nil)
		for i := 0; i < n; i++ {
			for j := i; j < n; j++ {
				cov.SetSym(i, j, res.Covariance[i][j])
			}
		}
		var ch mat.Cholesky
		if !ch.Factorize(cov) {
			t.Fatal("covariance not positive definite")
		}
		var l mat.TriDense
		ch.LTo(&l)
		toX := func(u []float64) []float64 {
			v := make([]float64, n)
			for i := 0; i < n; i++ {
				v[i] = x[i]
				for j := 0; j <= i; j++ {
					v[i] += l.At(i, j) * (u[j] + 3)
				}
			}
			return v
		}
		f := func(u []float64) float64 {
			return independentChi2(test.cell.System, toX(u), obs, test.zeroOn, test.dispOn, 240)
		}
		prob := optimize.Problem{
			Func: f,
			Grad: func(g, u []float64) { fd.Gradient(g, f, u, &fd.Settings{Formula: central4, Step: 1e-2}) },
		}
		m, err := optimize.Minimize(prob, make([]float64, len(x)), &optimize.Settings{GradientThreshold: 1e-10}, &optimize.BFGS{})
		if err != nil {
			// A line search that stalls at the minimum is fine; one
			// that stalls away from it shows in the comparison below.
			t.Logf("%s: BFGS: %v after %d evaluations, |∇| = %.1e", test.cell.System, err, m.Stats.FuncEvaluations, floats.Norm(m.Gradient, 2))
		}
		got := toX(m.X)
		worst := 0.0
		for i, p := range res.Params {
			worst = math.Max(worst, math.Abs(got[i]-p.Value)/math.Max(math.Abs(p.Value), 0.1))
		}
		t.Logf("%s: largest relative difference %.1e", test.cell.System, worst)
		for i, p := range res.Params {
			// Corrections near zero are compared relative to 0.1° or
			// 0.1 mm, a tenth of their usual range.
			ref := math.Max(math.Abs(p.Value), 0.1)
			if d := math.Abs(got[i]-p.Value) / ref; d > 1e-9 {
				t.Errorf("%s %s: Gauss–Newton %.12g, BFGS %.12g (relative %.1e)", test.cell.System, p.Name, p.Value, got[i], d)
			}
		}
	}
}

func TestErrors(t *testing.T) {
	good := []Observation{
		{TwoTheta: 27.366, ESD: 0.01, HKL: hkl(1, 1, 1)},
		{TwoTheta: 31.705, ESD: 0.01, HKL: hkl(2, 0, 0)},
		{TwoTheta: 45.445, ESD: 0.01, HKL: hkl(2, 2, 0)},
	}
	nacl := indexing.NewCell(indexing.Cubic, indexing.F, 5.64, 0)
	for _, test := range []struct {
		name string
		cell indexing.Cell
		obs  []Observation
		opt  Options
		want error
	}{
		{"no wavelength", nacl, good, Options{}, ErrOptions},
		{"negative radius", nacl, good, Options{Wavelength: cuKa1, Radius: -1}, ErrOptions},
		{"zero esd", nacl, []Observation{{TwoTheta: 27.4, HKL: hkl(1, 1, 1)}}, Options{Wavelength: cuKa1}, ErrBadESD},
		{"no hkl", nacl, []Observation{{TwoTheta: 27.4, ESD: 0.01}}, Options{Wavelength: cuKa1}, ErrCell},
		{"bad cell", indexing.NewCell(indexing.Cubic, indexing.F, -1, 0), good, Options{Wavelength: cuKa1}, ErrCell},
		{"too few", nacl, good[:2], Options{Wavelength: cuKa1, Zero: true, Displacement: true}, ErrTooFew},
		{"beyond 180°", indexing.NewCell(indexing.Cubic, indexing.F, 1.0, 0), good, Options{Wavelength: cuKa1}, ErrUnreachable},
		{"standard without corrections", nacl, good, Options{Wavelength: cuKa1, Standard: &Standards[0]}, ErrOptions},
		{"standard line without standard", nacl, append([]Observation{{TwoTheta: 28.4, ESD: 0.01, HKL: hkl(1, 1, 1), Standard: true}}, good...), Options{Wavelength: cuKa1}, ErrOptions},
		{"one angle", nacl, []Observation{good[0], good[0], good[0], good[0]}, Options{Wavelength: cuKa1, Zero: true}, ErrSingular},
	} {
		_, err := Refine(context.Background(), test.cell, test.obs, test.opt)
		if !errors.Is(err, test.want) {
			t.Errorf("%s: error %v, want %v", test.name, err, test.want)
		}
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := Refine(ctx, nacl, good, Options{Wavelength: cuKa1}); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled: %v", err)
	}
}

// TestFlagAndExclude plants a line 0.05° off (25 esds) and checks that it
// is flagged, then that excluding it restores the cell.
func TestFlagAndExclude(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 2))
	cell := indexing.NewCell(indexing.Tetragonal, indexing.P, 4.5937, 2.9587)
	obs := synthLines(truth{cell: cell, radius: 240}, rng)
	bad := 4
	obs[bad].TwoTheta += 0.05
	opt := Options{Wavelength: cuKa1, Scaling: ScaleNever}
	res, err := Refine(context.Background(), cell, obs, opt)
	if err != nil {
		t.Fatal(err)
	}
	if !res.Residuals[bad].Flagged || res.Flagged < 1 {
		t.Fatalf("planted outlier not flagged: Δ/σ = %.1f", res.Residuals[bad].Norm)
	}
	obs[bad].Excluded = true
	res2, err := Refine(context.Background(), cell, obs, opt)
	if err != nil {
		t.Fatal(err)
	}
	if res2.N != len(obs)-1 || !res2.Residuals[bad].Excluded || len(res2.Residuals) != len(obs) {
		t.Errorf("N = %d, excluded %v, %d residuals", res2.N, res2.Residuals[bad].Excluded, len(res2.Residuals))
	}
	if d := math.Abs(res2.Cell.A-cell.A) / res2.CellESD.A; d > 4 {
		t.Errorf("a after exclusion %.6f, %.1f esd from the truth", res2.Cell.A, d)
	}
	if !strings.Contains(strings.Join(res.Warnings, " "), "more than 3 esd") {
		t.Errorf("no warning of the flagged line: %q", res.Warnings)
	}
}

// TestCorrelationWarning refines a zero shift and a displacement from
// lines in a narrow range, where cos θ hardly changes.
func TestCorrelationWarning(t *testing.T) {
	cell := indexing.NewCell(indexing.Cubic, indexing.F, 5.6402, 0)
	var obs []Observation
	for _, h := range [][3]int{{1, 1, 1}, {2, 0, 0}, {2, 2, 0}, {3, 1, 1}, {2, 2, 2}} {
		d := cell.D(h[0], h[1], h[2])
		obs = append(obs, Observation{TwoTheta: peaks.TwoTheta(d, cuKa1) + 0.001, ESD: 0.002, HKL: hkl(h[0], h[1], h[2])})
	}
	res, err := Refine(context.Background(), cell, obs, Options{Wavelength: cuKa1, Zero: true, Displacement: true})
	if err != nil {
		t.Fatal(err)
	}
	w := strings.Join(res.Warnings, "\n")
	if !strings.Contains(w, "zero shift and displacement correlate strongly") {
		t.Errorf("warnings %q; correlation matrix %v", w, res.Correlation)
	}
}

func BenchmarkRefine(b *testing.B) {
	rng := rand.New(rand.NewPCG(1, 1))
	cell := indexing.NewCell(indexing.Tetragonal, indexing.P, 4.5937, 2.9587)
	obs := synthLines(truth{cell: cell, zero: 0.03, disp: 0.05, radius: 240}, rng)
	opt := Options{Wavelength: cuKa1, Zero: true, Displacement: true}
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := Refine(context.Background(), cell, obs, opt); err != nil {
			b.Fatal(err)
		}
	}
}
