package analysis

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"reticle/peaks"
	"reticle/profile"
	"reticle/refine"
	"reticle/scanfile"
)

// TestLogMills checks M(u) = exp(u²/2)·Φ(−u) against values of the normal
// distribution (Abramowitz & Stegun 1964, Table 26.1, from memory:
// Φ(−1) = 0.158655, Φ(−2) = 0.0227501, Φ(−3) = 0.00134990) and the
// asymptotic branch against the direct one where both hold.
func TestLogMills(t *testing.T) {
	for _, c := range []struct{ u, phi float64 }{
		{0, 0.5}, {1, 0.158655}, {2, 0.0227501}, {3, 0.00134990},
	} {
		want := math.Exp(c.u*c.u/2) * c.phi
		if got := math.Exp(logMills(c.u)); math.Abs(got-want) > 2e-6*want {
			t.Errorf("M(%g) = %.7g, want %.7g", c.u, got, want)
		}
	}
	for _, u := range []float64{25, 26, 30, 35} {
		direct := u*u/2 + math.Log(0.5*math.Erfc(u/math.Sqrt2))
		if d := logMills(u) - direct; math.Abs(d) > 1e-8 {
			t.Errorf("ln M(%g): asymptotic − direct = %g", u, d)
		}
	}
}

// TestClassRatio checks the closed form of one reflection's likelihood
// ratio, s·√(2π)·M(s − t), against the integral ∫₀^∞ N(Î; x, σ)
// e^(−x/μ)/μ dx / N(Î; 0, σ) summed by the trapezium rule.
func TestClassRatio(t *testing.T) {
	for _, c := range []struct{ i, sig, mu float64 }{
		{0, 1, 1}, {3, 1, 2}, {-2, 1, 0.5}, {5, 2, 20}, {0.5, 1, 0.05},
	} {
		s, tt := c.sig/c.mu, c.i/c.sig
		closed := s * math.Sqrt(2*math.Pi) * math.Exp(logMills(s-tt))
		norm := func(x float64) float64 {
			z := (c.i - x) / c.sig
			return math.Exp(-z*z/2) / (c.sig * math.Sqrt(2*math.Pi))
		}
		hi := c.i + 12*c.sig + 40*c.mu
		const n = 400000
		h := hi / n
		var sum float64
		for k := 0; k <= n; k++ {
			x := float64(k) * h
			f := norm(x) * math.Exp(-x/c.mu) / c.mu
			if k == 0 || k == n {
				f /= 2
			}
			sum += f * h
		}
		numeric := sum / norm(0)
		if math.Abs(closed-numeric) > 1e-4*numeric {
			t.Errorf("Î %g σ %g μ %g: closed %.6g, integral %.6g", c.i, c.sig, c.mu, closed, numeric)
		}
	}
}

// TestClassEvidence: a class measured at zero within its esds is
// weakly absent (ln K below zero, but above the Occam bound of a
// class too weak to see), one measured well above its esds is present,
// and one strong reflection among absent ones decides nothing when a
// foreign line may sit there as likely as the scan's unindexed lines
// make it.
func TestClassEvidence(t *testing.T) {
	refl := func(ts ...float64) []refine.PatternReflection {
		var out []refine.PatternReflection
		for _, x := range ts {
			out = append(out, refine.PatternReflection{Intensity: x, IntensityESD: 1})
		}
		return out
	}
	none := func(float64) float64 { return 1e-9 }
	some := func(float64) float64 { return 0.02 }
	absent := refl(0.3, -0.8, 1.1, -0.2, 0.5, -1.4, 0.1, 0.9, -0.6, -0.1)
	present := refl(4, 7, 2.5, 9, 5.5, 3, 6)
	lone := refl(0.3, -0.8, 1.1, -0.2, 0.5, -1.4, 0.1, 12, -0.6, -0.1)
	for _, c := range []struct {
		name    string
		rs      []refine.PatternReflection
		foreign func(float64) float64
		lo, hi  float64
	}{
		{"absent", absent, none, -4, -0.3},
		{"present", present, none, 20, math.Inf(1)},
		{"present, foreign lines possible", present, some, 10, math.Inf(1)},
		{"one strong line, no foreign lines", lone, none, 3, math.Inf(1)},
		{"one strong line, foreign lines possible", lone, some, -4, 1},
	} {
		got := classEvidence(c.rs, 100, c.foreign)
		if !(got > c.lo && got < c.hi) {
			t.Errorf("%s: ln K = %.3f, want in (%g, %g)", c.name, got, c.lo, c.hi)
		}
	}
	if got := classEvidence(nil, 100, none); got != 0 {
		t.Errorf("no extras: ln K = %g, want 0", got)
	}
}

// meterScan returns a scan of a flat background of 400 counts with a
// slope, one doublet line of K-alpha1 area area at 2θ x0 and counting
// noise from seed, and its extraction's profile (FWHM 0.1°, mixing
// 0.5).
func meterScan(x0, area, offset float64, seed uint64) (*Extraction, []float64) {
	rad, _ := scanfile.ParseRadiation("Cu")
	res := &peaks.Result{Radiation: rad, FWHMCurve: profile.Caglioti{W: 0.01}, Eta: 0.5, TailRatio: 1, NoiseScale: 1}
	rng := rand.New(rand.NewPCG(seed, 7))
	var x, y, calc []float64
	x2 := peaks.Companion(x0, rad.Lambda1, rad.Lambda2)
	a, _ := profile.TailedAreaFactor(0.5, 1)
	for tt := x0 - 3; tt <= x0+3; tt += 0.02 {
		bg := 400 + 5*(tt-x0)
		line := area / (a * 0.1) * (profile.LineShape(tt, x0, 0.1, 0.5, 0, 1) + rad.Ratio2*profile.LineShape(tt, x2, 0.1, 0.5, 0, 1))
		mean := bg + offset + line
		x = append(x, tt)
		y = append(y, mean+math.Sqrt(mean)*rng.NormFloat64())
		calc = append(calc, bg)
	}
	sc := &scanfile.Scan{Path: "meter", TwoTheta: x, Intensity: y}
	return &Extraction{Scan: sc, Result: res}, calc
}

// countingESD returns 1/√Σ(gᵢ²/400) over the points of e's scan for the
// profile of a doublet line at x0 of K-alpha1 area 1 and FWHM 0.1°
// (meterScan's), made here from the profile package's line shape.
func countingESD(e *Extraction, x0 float64) float64 {
	rad := e.Result.Radiation
	x2 := peaks.Companion(x0, rad.Lambda1, rad.Lambda2)
	a, _ := profile.TailedAreaFactor(0.5, 1)
	var s float64
	for _, x := range e.Scan.TwoTheta {
		g := (profile.LineShape(x, x0, 0.1, 0.5, 0, 1) + rad.Ratio2*profile.LineShape(x, x2, 0.1, 0.5, 0, 1)) / (a * 0.1)
		s += g * g / 400
	}
	return 1 / math.Sqrt(s)
}

// TestLineMeter: the measured area of a line recovers the area the scan
// was made with within 3 esds, over a local offset the calculated curve
// misses; with no line it is zero within 3 esds; and its esd is that of
// counting statistics: at least 1/√Σ(gᵢ²/σᵢ²), the esd of the area alone
// for the area-normalised profile g at the points over a background of
// 400 counts (σᵢ² = 400), and at most half as large again (the straight
// background fitted with it shares the points).
func TestLineMeter(t *testing.T) {
	for _, c := range []struct {
		name         string
		area, offset float64
	}{
		{"line", 20, 0},
		{"line over an offset", 20, 30},
		{"no line", 0, 0},
		{"offset alone", 0, 30},
	} {
		for seed := uint64(1); seed <= 5; seed++ {
			e, calc := meterScan(40, c.area, c.offset, seed)
			m := newLineMeter(e, calc, e.widths())
			a, sa, ok := m.amplitude(40, 0)
			if !ok || !(sa > 0) {
				t.Fatalf("%s, seed %d: no measure", c.name, seed)
			}
			if math.Abs(a-c.area) > 3*sa {
				t.Errorf("%s, seed %d: area %.3f(%.3f), made with %g", c.name, seed, a, sa, c.area)
			}
			if lo := countingESD(e, 40); !(sa >= lo && sa <= 1.5*lo) {
				t.Errorf("%s, seed %d: esd %.3f, counting statistics give %.3f", c.name, seed, sa, lo)
			}
		}
	}
}

// TestExtraLines: a line of one cell within half a width of the other's
// is shared, one a width or more from all of them is extra, and one in
// between is neither.
func TestExtraLines(t *testing.T) {
	at := func(tts ...float64) []refine.PatternReflection {
		var out []refine.PatternReflection
		for _, x := range tts {
			out = append(out, refine.PatternReflection{TwoTheta: x})
		}
		return out
	}
	width := func(float64) float64 { return 0.1 }
	a := at(20, 30.04, 40.07, 50.2, 60)
	b := at(20.01, 30, 40, 60)
	common, extras := extraLines(a, b, width)
	var c, x []float64
	for _, r := range common {
		c = append(c, r.TwoTheta)
	}
	for _, r := range extras {
		x = append(x, r.TwoTheta)
	}
	if want := []float64{20, 30.04, 60}; !slices.Equal(c, want) {
		t.Errorf("common %v, want %v", c, want)
	}
	if want := []float64{50.2}; !slices.Equal(x, want) {
		t.Errorf("extras %v, want %v", x, want)
	}
}
