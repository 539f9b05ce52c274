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

	"reticle/cell"
	"reticle/esd"
)

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
// scaling. Result: a = 5.6401(5) Å (esd digits as esd.Format rounds
// them), V = a³ = 179.41(5) Å³ (σ_V = 3a²σ_a).
func TestWorkedCubic(t *testing.T) {
	obs := []Observation{
		obsAt(27.366, 0.01, hkl(1, 1, 1)),
		obsAt(31.705, 0.01, hkl(2, 0, 0)),
		obsAt(45.445, 0.01, hkl(2, 2, 0)),
		obsAt(53.870, 0.01, hkl(3, 1, 1)),
		obsAt(56.474, 0.01, hkl(2, 2, 2)),
	}
	res, err := Refine(context.Background(), cell.Must(cell.Cubic, cell.F, 5.6), obs, Options{Wavelength: cuKa1})
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(res.Cell.A-5.640073) > 2e-6 {
		t.Errorf("a = %.7f Å, hand-worked 5.640073", res.Cell.A)
	}
	if math.Abs(res.ESD.A-0.000530) > 2e-6 {
		t.Errorf("esd(a) = %.7f Å, hand-worked 0.000530", res.ESD.A)
	}
	if math.Abs(res.Chi2-0.149) > 0.001 || res.Scaled {
		t.Errorf("χ² = %.4f (scaled %v), hand-worked 0.149 unscaled", res.Chi2, res.Scaled)
	}
	if got := esd.Format(res.Cell.A, res.ESD.A); got != "5.6401(5)" {
		t.Errorf("a prints %s, want 5.6401(5)", got)
	}
	if got := esd.Format(res.Volume, res.VolumeESD); got != "179.41(5)" {
		t.Errorf("V prints %s, want 179.41(5)", got)
	}
	if res.DOF != 4 || res.Fitted != 5 {
		t.Errorf("fitted %d, DOF = %d; want 5, 4", res.Fitted, res.DOF)
	}
}

// independentChi2 is χ² of the same model written a second way: the
// free direct parameters x (a, c, β ...) make a cell whose d-spacings
// and Bragg's law give the positions (synth_test.go's position), with
// the corrections after them in x.
func independentChi2(sys cell.System, x []float64, obs []Observation, set Corrections, radius float64) float64 {
	nf := len(sys.FreeNames())
	c, _ := cell.New(sys, cell.P, x[:nf]...)
	tr := truth{cell: c, radius: radius}
	k := nf
	if set.Has(Zero) {
		tr.zero = x[k]
		k++
	}
	if set.Has(Displacement) {
		tr.disp = x[k]
	}
	var s float64
	for _, o := range obs {
		s += math.Pow((o.TwoTheta-position(tr, o.HKL[0]))/o.ESD, 2)
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
// gonum/optimize's BFGS on the χ² written independently, for a cell of
// every system: the minima agree to 1e-5 of each parameter's esd (far
// below anything printed; BFGS's line search stalls within about 1e-7
// esd of the minimum on these problems).
func TestIndependentMinimiser(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 5))
	for _, test := range []struct {
		cell       cell.Cell
		zero, disp float64
		set        Corrections
	}{
		{testCells[0], 0, 0, None},
		{testCells[1], 0.04, 0, Zero},
		{testCells[2], 0.03, 0.05, Zero | Displacement},
		{testCells[3], -0.02, -0.04, Zero | Displacement},
		{testCells[4], 0.01, 0, Zero},
		{testCells[5], 0.02, 0.03, Zero | Displacement},
		{testCells[6], -0.01, 0, Zero},
	} {
		obs := synthLines(truth{cell: test.cell, zero: test.zero, disp: test.disp, radius: 240}, rng)
		opt := Options{Wavelength: cuKa1, Corrections: test.set}
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
				cov.SetSym(i, j, res.ParamCovariance[i][j])
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
			return independentChi2(test.cell.System, toX(u), obs, test.set, 240)
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
			d := math.Abs(got[i]-p.Value) / p.ESD
			worst = math.Max(worst, d)
			if d > 1e-5 {
				t.Errorf("%s %s: Gauss–Newton %.12g, BFGS %.12g (%.1e esd apart)", test.cell.System, p.Name, p.Value, got[i], d)
			}
		}
		t.Logf("%s: largest difference %.1e esd", test.cell.System, worst)
	}
}

func TestErrors(t *testing.T) {
	good := []Observation{
		obsAt(27.366, 0.01, hkl(1, 1, 1)),
		obsAt(31.705, 0.01, hkl(2, 0, 0)),
		obsAt(45.445, 0.01, hkl(2, 2, 0)),
	}
	nacl := cell.Must(cell.Cubic, cell.F, 5.64)
	for _, test := range []struct {
		name string
		cell cell.Cell
		obs  []Observation
		opt  Options
		want error
	}{
		{"no wavelength", nacl, good, Options{}, ErrOptions},
		{"negative radius", nacl, good, Options{Wavelength: cuKa1, Radius: -1}, ErrOptions},
		{"zero esd", nacl, []Observation{obsAt(27.4, 0, hkl(1, 1, 1))}, Options{Wavelength: cuKa1}, ErrBadESD},
		{"no hkl", nacl, []Observation{obsAt(27.4, 0.01, nil)}, Options{Wavelength: cuKa1}, ErrCell},
		{"bad cell", cell.Cell{System: cell.Cubic, Centring: cell.F, A: -1, B: -1, C: -1, Alpha: 90, Beta: 90, Gamma: 90}, good, Options{Wavelength: cuKa1}, ErrCell},
		{"too few", nacl, good[:2], Options{Wavelength: cuKa1, Corrections: Zero | Displacement}, ErrTooFew},
		{"beyond 180°", cell.Must(cell.Cubic, cell.F, 1.0), good, Options{Wavelength: cuKa1}, ErrUnreachable},
		{"standard without corrections", nacl, good, Options{Wavelength: cuKa1, Standard: &Standards[0]}, ErrOptions},
		{"standard line without standard", nacl, append([]Observation{{Line: cell.Line{TwoTheta: 28.4, ESD: 0.01}, HKL: hkl(1, 1, 1), Standard: true}}, good...), Options{Wavelength: cuKa1}, ErrOptions},
		{"one angle", nacl, []Observation{good[0], good[0], good[0], good[0]}, Options{Wavelength: cuKa1, Corrections: Zero}, ErrSingular},
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
	c := testCells[1]
	obs := synthLines(truth{cell: c, radius: 240}, rng)
	bad := 4
	obs[bad].TwoTheta += 0.05
	opt := Options{Wavelength: cuKa1, Scaling: ScaleNever}
	res, err := Refine(context.Background(), c, obs, opt)
	if err != nil {
		t.Fatal(err)
	}
	if !res.Residuals[bad].Flagged || res.Flagged < 1 {
		t.Fatalf("planted outlier not flagged: Δ/σ = %.1f", res.Residuals[bad].Sigmas)
	}
	obs[bad].Excluded = true
	res2, err := Refine(context.Background(), c, obs, opt)
	if err != nil {
		t.Fatal(err)
	}
	if res2.Fitted != len(obs)-1 || !res2.Residuals[bad].Excluded || len(res2.Residuals) != len(obs) {
		t.Errorf("fitted %d, excluded %v, %d residuals", res2.Fitted, res2.Residuals[bad].Excluded, len(res2.Residuals))
	}
	if d := math.Abs(res2.Cell.A-c.A) / res2.ESD.A; d > 4 {
		t.Errorf("a after exclusion %.6f, %.1f esd from the truth", res2.Cell.A, d)
	}
	if !strings.Contains(strings.Join(res.Warnings, " "), "more than 3 esd") {
		t.Errorf("no warning of the flagged line: %q", res.Warnings)
	}
}

// TestCorrelationWarning refines a zero shift and a displacement from
// lines in a narrow range, where cos θ hardly changes.
func TestCorrelationWarning(t *testing.T) {
	c := testCells[0]
	var obs []Observation
	for _, h := range []cell.HKL{{1, 1, 1}, {2, 0, 0}, {2, 2, 0}, {3, 1, 1}, {2, 2, 2}} {
		obs = append(obs, obsAt(cell.TwoTheta(c.D(h), cuKa1)+0.001, 0.002, []cell.HKL{h}))
	}
	res, err := Refine(context.Background(), c, obs, Options{Wavelength: cuKa1, Corrections: Zero | Displacement})
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
	c := testCells[1]
	obs := synthLines(truth{cell: c, zero: 0.03, disp: 0.05, radius: 240}, rng)
	opt := Options{Wavelength: cuKa1, Corrections: Zero | Displacement}
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := Refine(context.Background(), c, obs, opt); err != nil {
			b.Fatal(err)
		}
	}
}

// TestImplausibleCorrections: a model chosen from the data may not refine
// corrections beyond what an aligned instrument shows (the bounds of
// select.go); within them it may.
func TestImplausibleCorrections(t *testing.T) {
	for _, test := range []struct {
		v  shifts
		ok bool
	}{
		{shifts{0.05, 0.2, 0}, true},
		{shifts{-0.19, -0.9, 0.5}, true},
		{shifts{2.05, 0, 0}, false},
		{shifts{0, 4.3, 0}, false},
		{shifts{0, 0, 1.5}, false},
	} {
		r := &Result{shifts: test.v}
		if err := implausible(r); (err == nil) != test.ok {
			t.Errorf("%v: %v", test.v, err)
		}
	}
}

// BenchmarkRefineAuto refines with the corrections chosen from the data:
// four models and the bootstrap of the choice.
func BenchmarkRefineAuto(b *testing.B) {
	rng := rand.New(rand.NewPCG(1, 1))
	c := testCells[1]
	obs := synthLines(truth{cell: c, zero: 0.03, disp: 0.05, radius: 240}, rng)
	opt := Options{Wavelength: cuKa1, Corrections: Auto}
	for b.Loop() {
		if _, err := Refine(context.Background(), c, obs, opt); err != nil {
			b.Fatal(err)
		}
	}
}
