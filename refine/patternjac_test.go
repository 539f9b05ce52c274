package refine

import (
	"context"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"reticle/cell"
	"reticle/internal/synth"
	"reticle/profile"
)

// twoPhaseScan simulates a laboratory scan (Cu doublet, Caglioti widths,
// Poisson counts) of two phases, the second at scale, over 2θ from..to.
func twoPhaseScan(c1, c2 cell.Cell, scale float64, from, to float64, seed uint64) (x, y, sig []float64) {
	in := synth.Instrument{Lambda1: cuKa1, Lambda2: cuKa2, Ratio2: 0.5, Zero: 0.02}
	ph := []synth.Phase{{Cell: c1}}
	if scale > 0 {
		ph = append(ph, synth.Phase{Cell: c2, Scale: scale})
	}
	s := synth.Simulate(synth.Spec{Phases: ph, Instrument: in, From: from, To: to, Step: 0.02, Peak: 5000}, rand.New(rand.NewPCG(seed, 3)))
	sig = make([]float64, len(s.Counts))
	for i, v := range s.Counts {
		sig[i] = math.Sqrt(math.Max(v, 1))
	}
	return s.TwoTheta, s.Counts, sig
}

// jacobianFixture lays out a two-phase fit with every kind of parameter
// (both corrections, three asymmetry terms, a tail ratio) at a point
// near the solution.
func jacobianFixture(t *testing.T) (*patternFit, []float64) {
	t.Helper()
	c1 := cell.Must(cell.Cubic, cell.F, 5.6402)
	c2 := cell.Must(cell.Tetragonal, cell.P, 4.5937, 2.9587)
	x, y, sig := twoPhaseScan(c1, c2, 0.4, 20, 80, 11)
	opt := PatternOptions{Lambda1: cuKa1, Lambda2: cuKa2, Ratio2: 0.5, Corrections: Zero | Displacement,
		Asymmetry: profile.Asymmetry{C: [3]float64{0.08, -0.05, 0.02}}, Tail: 1.4}.withDefaults()
	pf, p, err := newPatternFit([]cell.Cell{c1, c2}, x, y, sig, opt, []ownTerms{sharedProfile, ownSample})
	if err != nil {
		t.Fatal(err)
	}
	m, o := pf.phases[0].prof, pf.phases[1].prof
	p[m[profU]], p[m[profV]], p[m[profW]], p[m[profX]], p[m[profY]] = 0.003, -0.001, 0.003, 0.01, 0.03
	p[o[profU]], p[o[profX]], p[o[profY]] = 0.006, 0.02, 0.05 // the second phase's own size and strain terms
	p[0], p[1] = 0.02, -0.03
	pf.startLinear(p)
	return pf, p
}

// TestPatternJacobian compares every shared parameter's column of the
// whole-pattern Jacobian with central finite differences of the
// calculated curve, to 0.1 % of the column's largest entry (the split
// lines' second derivative jumps at their maximum, which limits the
// differences' accuracy there), and the gradient Jᵀr of those and of a
// sample of intensities (whose far lines enter the gradient alone) with
// finite differences of χ².
func TestPatternJacobian(t *testing.T) {
	pf, p := jacobianFixture(t)
	n := len(pf.x)
	jac := &jacobian{}
	res, _, _ := pf.evaluate(p, jac, -1)
	ne := normalEquations(jac, res, pf.iI, len(p)-pf.iI)
	rows := jac.rows
	var cols []int
	for j := 0; j < pf.iI; j++ {
		cols = append(cols, j)
	}
	for j := pf.iI; j < len(p); j += 7 {
		cols = append(cols, j)
	}
	for _, j := range cols {
		h := 1e-6 * math.Max(math.Abs(p[j]), 1e-3)
		if j >= pf.iBg && j < pf.iBg+pf.nb || j >= pf.iI {
			// The curve is linear in these: any step is exact, and
			// a step of 1 keeps χ²'s rounding out.
			h = 1
		}
		q := append([]float64(nil), p...)
		q[j] = p[j] + h
		rp, cp, _ := pf.evaluate(q, nil, -1)
		q[j] = p[j] - h
		rm, cm, _ := pf.evaluate(q, nil, -1)
		// The gradient: Jᵀr = −½ ∂χ²/∂p.
		fg := -(sumSq(rp) - sumSq(rm)) / (4 * h)
		if d := math.Abs(fg - ne.g[j]); d > 1e-3*math.Abs(fg)+1e-6 {
			t.Errorf("parameter %d: gradient %g, finite differences %g", j, ne.g[j], fg)
		}
		if j >= pf.iI {
			continue
		}
		var big float64
		for _, r := range rows {
			big = math.Max(big, math.Abs(r.g[j]))
		}
		bad := 0
		for i, r := range rows {
			fd := (cp[i] - cm[i]) / (2 * h) / pf.sig[i]
			if math.Abs(fd-r.g[j]) > 1e-3*big+1e-9 {
				bad++
			}
		}
		// A point may enter or leave a line's window of calcReach widths
		// as the parameter moves: a step that no derivative follows.
		if bad > 2 {
			t.Errorf("parameter %d: %d of %d points differ from finite differences", j, bad, n)
		}
	}
}

// TestBandSolve: the step and the covariance taken through the band and
// the Schur complement equal those of a dense solve of the same normal
// matrix.
func TestBandSolve(t *testing.T) {
	pf, p := jacobianFixture(t)
	jac := &jacobian{}
	res, _, _ := pf.evaluate(p, jac, -1)
	ne := normalEquations(jac, res, pf.iI, len(p)-pf.iI)
	k, ng := len(p), ne.ng
	dense := mat.NewSymDense(k, nil)
	for a := 0; a < ng; a++ {
		for b := a; b < ng; b++ {
			dense.SetSym(a, b, ne.d[a*ng+b])
		}
		for i := 0; i < ne.ni; i++ {
			dense.SetSym(a, ng+i, ne.c[a*ne.ni+i])
		}
	}
	for i := 0; i < ne.ni; i++ {
		for j := 0; j <= ne.kb && i+j < ne.ni; j++ {
			dense.SetSym(ng+i, ng+i+j, ne.b[i*(ne.kb+1)+j])
		}
	}
	const lambda = 0.1
	f, err := ne.factorize(lambda, nil)
	if err != nil {
		t.Fatal(err)
	}
	st, err := f.step()
	if err != nil {
		t.Fatal(err)
	}
	// The dense equations: (A + λ diag A) x = g.
	damped := mat.NewSymDense(k, nil)
	damped.CopySym(dense)
	for j := 0; j < k; j++ {
		damped.SetSym(j, j, dense.At(j, j)*(1+lambda))
	}
	var ch mat.Cholesky
	if !ch.Factorize(damped) {
		t.Fatal("dense matrix not positive definite")
	}
	var want mat.VecDense
	if err := ch.SolveVecTo(&want, mat.NewVecDense(k, ne.g)); err != nil && !isCondition(err) {
		t.Fatal(err)
	}
	for j := range st {
		if d := math.Abs(st[j] - want.AtVec(j)); d > 1e-6*math.Abs(want.AtVec(j))+1e-12 {
			t.Errorf("step %d: %g, dense %g", j, st[j], want.AtVec(j))
		}
	}
	f0, err := ne.factorize(0, nil)
	if err != nil {
		t.Fatal(err)
	}
	cg, vi, err := f0.covariance()
	if err != nil {
		t.Fatal(err)
	}
	if !ch.Factorize(dense) {
		t.Fatal("dense matrix not positive definite")
	}
	var inv mat.SymDense
	if err := ch.InverseTo(&inv); err != nil && !isCondition(err) {
		t.Fatal(err)
	}
	close := func(a, b float64) bool { return math.Abs(a-b) <= 1e-6*math.Abs(b)+1e-300 }
	for a := 0; a < ng; a++ {
		for b := 0; b < ng; b++ {
			if !close(cg.At(a, b), inv.At(a, b)) {
				t.Errorf("covariance (%d, %d): %g, dense %g", a, b, cg.At(a, b), inv.At(a, b))
			}
		}
	}
	for i, v := range vi {
		if !close(v, inv.At(ng+i, ng+i)) {
			t.Errorf("intensity %d variance: %g, dense %g", i, v, inv.At(ng+i, ng+i))
		}
	}
}

// edgesWithin3 reports every edge of the fitted phase i that lies more
// than 3 esd from the truth's (or has no esd).
func edgesWithin3(t *testing.T, i int, ph PatternPhase, truth cell.Cell) {
	t.Helper()
	got, want := ph.Cell.Params(), truth.Params()
	esd := [3]float64{ph.ESD.A, ph.ESD.B, ph.ESD.C}
	for k := 0; k < 3; k++ {
		if d := math.Abs(got[k] - want[k]); d > 3*esd[k] || !(esd[k] > 0) {
			t.Errorf("phase %d edge %d: %.6f(%.6f), truth %.6f", i+1, k, got[k], esd[k], want[k])
		}
	}
}

// TestFitTwoPhases fits a simulated scan of two phases (the second at
// 40 % of the first's strongest line) with both cells started 0.2 % off:
// every edge lies within 3 esd of the truth, Rwp/Rexp is near 1, and the
// main phase alone leaves a clearly worse fit.
func TestFitTwoPhases(t *testing.T) {
	c1 := cell.Must(cell.Cubic, cell.F, 5.6402)
	c2 := cell.Must(cell.Tetragonal, cell.P, 4.5937, 2.9587)
	x, y, sig := twoPhaseScan(c1, c2, 0.4, 15, 110, 21)
	s1 := cell.Must(cell.Cubic, cell.F, 5.6402*1.002)
	s2 := cell.Must(cell.Tetragonal, cell.P, 4.5937*0.998, 2.9587*1.002)
	opt := PatternOptions{Lambda1: cuKa1, Lambda2: cuKa2, Ratio2: 0.5, Corrections: Zero,
		Width: profile.Caglioti{U: 0.004, V: -0.001, W: 0.0045}, Eta: 0.5}
	r, err := FitPhases(context.Background(), []cell.Cell{s1, s2}, x, y, sig, opt)
	if err != nil {
		t.Fatal(err)
	}
	if len(r.Phases) != 2 {
		t.Fatalf("%d phases", len(r.Phases))
	}
	for i, truth := range []cell.Cell{c1, c2} {
		ph := r.Phases[i]
		edgesWithin3(t, i, ph, truth)
		if len(ph.Calc) != len(x) {
			t.Errorf("phase %d: %d calculated points", i+1, len(ph.Calc))
		}
	}
	if q := r.Rwp / r.Rexp; q > 1.1 {
		t.Errorf("two phases: Rwp/Rexp %.3f", q)
	}
	one, err := FitPattern(context.Background(), s1, x, y, sig, opt)
	if err != nil {
		t.Fatal(err)
	}
	if !(one.Rwp > 1.5*r.Rwp) {
		t.Errorf("main phase alone: Rwp %.4f, both %.4f", one.Rwp, r.Rwp)
	}
	t.Logf("Rwp both %.4f (Rexp %.4f), main alone %.4f; %d parameters, %d iterations", r.Rwp, r.Rexp, one.Rwp, r.Parameters, r.Iterations)
	// A phase that is not there: its lines catch only noise, and the
	// fit says so.
	x1, y1, sig1 := twoPhaseScan(c1, c2, 0, 15, 110, 22)
	r, err = FitPhases(context.Background(), []cell.Cell{s1, cell.Must(cell.Cubic, cell.P, 3.1)}, x1, y1, sig1, opt)
	if err == nil {
		found := false
		for _, w := range r.Warnings {
			found = found || strings.Contains(w, "no more than noise")
		}
		if !found {
			t.Errorf("a phase absent from the scan: warnings %q", r.Warnings)
		}
	} else if !strings.Contains(err.Error(), "describes no line") {
		t.Errorf("a phase absent from the scan: %v", err)
	}
}

// TestFitPhaseOwnSize: the second phase of a simulated two-phase scan
// (40 % of the first's strongest line) has lines broadened by crystallite
// size (internal/synth: the instrument's line convolved with a
// Lorentzian of FWHM 0.15°/cos θ, the first phase's lines as the
// instrument makes them, 0.07–0.12° wide). With the main phase's
// Lorentzian size term alone for both, the second phase's lines cannot
// be fitted; with its own, Rwp/Rexp is near 1, the second phase's size
// term exceeds the first's (which holds the instrument's Lorentzian part:
// Lorentzian widths add in a convolution) by the truth's 0.15° within
// 20 % (the pseudo-Voigt of Thompson, Cox & Hastings standing for the
// convolution), and both cells lie within 3 esd.
func TestFitPhaseOwnSize(t *testing.T) {
	c1, c2, r := fitBroadenedPair(t, synth.Phase{Scale: 0.4, Size: 0.15}, 31)
	q := r.Rwp / r.Rexp
	sizes := [2]float64{math.NaN(), math.NaN()}
	for i, truth := range []cell.Cell{c1, c2} {
		ph := r.Phases[i]
		edgesWithin3(t, i, ph, truth)
		for _, p := range ph.Params {
			if p.Name == "Y" {
				sizes[i] = p.Value
			}
		}
	}
	t.Logf("Rwp %.4f, Rexp %.4f; size terms Y %.4f° and %.4f°", r.Rwp, r.Rexp, sizes[0], sizes[1])
	if q > 1.1 {
		t.Errorf("Rwp/Rexp %.3f", q)
	}
	if d := sizes[1] - sizes[0]; !(math.Abs(d/0.15-1) < 0.2) {
		t.Errorf("size terms %.4f° and %.4f°: the second's exceeds by %.4f°, truth 0.15°", sizes[0], sizes[1], d)
	}
}

// TestFitPhaseOwnStrain: the second phase of a simulated two-phase scan
// (40 % of the first's strongest line) has lines broadened by
// microstrain (internal/synth: the instrument's line convolved with a
// Gaussian of FWHM 0.25° tan θ, the first phase's lines as the
// instrument makes them). With a size term of its own alone, the
// second phase's lines, whose broadening grows with tan θ rather than
// 1/cos θ and is Gaussian, are fitted short of the noise; with its own
// strain terms too, Rwp/Rexp is near 1, both cells lie within 3 esd, and
// its Gaussian term U exceeds the first phase's by the truth's 0.25²
// within 25 % (Gaussian widths add in quadrature in a convolution; the
// pseudo-Voigt of Thompson, Cox & Hastings stands for the convolution).
func TestFitPhaseOwnStrain(t *testing.T) {
	c1, c2, r := fitBroadenedPair(t, synth.Phase{Scale: 0.4, Strain: 0.25}, 37)
	q := r.Rwp / r.Rexp
	var us [2]map[string]float64
	for i, truth := range []cell.Cell{c1, c2} {
		ph := r.Phases[i]
		edgesWithin3(t, i, ph, truth)
		us[i] = map[string]float64{}
		for _, p := range ph.Params {
			us[i][p.Name] = p.Value
		}
	}
	t.Logf("Rwp %.4f, Rexp %.4f; profiles %v and %v", r.Rwp, r.Rexp, us[0], us[1])
	if q > 1.1 {
		t.Errorf("Rwp/Rexp %.3f", q)
	}
	u2, ok := us[1]["U"]
	if !ok {
		t.Fatalf("the second phase has no Gaussian term of its own: %v", us[1])
	}
	if d := u2 - us[0]["U"]; !(math.Abs(d/(0.25*0.25)-1) < 0.25) {
		t.Errorf("U %.4f and %.4f °²: the second's exceeds by %.4f, truth %.4f", us[0]["U"], u2, d, 0.25*0.25)
	}
}

// TestFitPhaseSharedProfile: a second phase whose lines are as the
// instrument makes them, strong enough to be offered terms of its own
// (three or more reflections of 15 esds), takes none: they would lower
// χ² by no more than noise does, short of their cost.
func TestFitPhaseSharedProfile(t *testing.T) {
	c1 := cell.Must(cell.Cubic, cell.F, 5.6402)
	c2 := cell.Must(cell.Tetragonal, cell.P, 4.5937, 2.9587)
	x, y, sig := twoPhaseScan(c1, c2, 0.4, 15, 110, 41)
	opt := PatternOptions{Lambda1: cuKa1, Lambda2: cuKa2, Ratio2: 0.5, Corrections: Zero,
		Width: profile.Caglioti{U: 0.004, V: -0.001, W: 0.0045}, Eta: 0.5}
	r, err := FitPhases(context.Background(), []cell.Cell{c1, c2}, x, y, sig, opt)
	if err != nil {
		t.Fatal(err)
	}
	if n := strongLines(r.Phases[1]); n < ownSizeLines {
		t.Fatalf("the second phase has %d reflections of %d esds: the test needs %d", n, ownSizeSNR, ownSizeLines)
	}
	if ps := r.Phases[1].Params; len(ps) != len(c2.System.FreeNames()) {
		t.Errorf("the second phase has profile terms of its own: %v", ps)
	}
}

// fitBroadenedPair simulates a laboratory scan (Cu doublet, zero shift
// 0.02°, Poisson counts, seed seed) of a cubic F phase as the instrument
// makes its lines and a tetragonal P phase with second's scale and
// broadening, fits both from cells 0.2 % off and returns the true cells
// and the fit.
func fitBroadenedPair(t *testing.T, second synth.Phase, seed uint64) (c1, c2 cell.Cell, r *PatternResult) {
	t.Helper()
	c1 = cell.Must(cell.Cubic, cell.F, 5.6402)
	c2 = cell.Must(cell.Tetragonal, cell.P, 4.5937, 2.9587)
	second.Cell = c2
	in := synth.Instrument{Lambda1: cuKa1, Lambda2: cuKa2, Ratio2: 0.5, Zero: 0.02}
	ph := []synth.Phase{{Cell: c1}, second}
	s := synth.Simulate(synth.Spec{Phases: ph, Instrument: in, From: 15, To: 110, Step: 0.02, Peak: 5000}, rand.New(rand.NewPCG(seed, 3)))
	sig := make([]float64, len(s.Counts))
	for i, v := range s.Counts {
		sig[i] = math.Sqrt(math.Max(v, 1))
	}
	s1 := cell.Must(cell.Cubic, cell.F, 5.6402*1.002)
	s2 := cell.Must(cell.Tetragonal, cell.P, 4.5937*0.998, 2.9587*1.002)
	opt := PatternOptions{Lambda1: cuKa1, Lambda2: cuKa2, Ratio2: 0.5, Corrections: Zero,
		Width: profile.Caglioti{U: 0.004, V: -0.001, W: 0.0045}, Eta: 0.5}
	r, err := FitPhases(context.Background(), []cell.Cell{s1, s2}, s.TwoTheta, s.Counts, sig, opt)
	if err != nil {
		t.Fatal(err)
	}
	return c1, c2, r
}
