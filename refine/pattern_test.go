package refine

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"reticle/cell"
	"reticle/internal/synth"
	"reticle/profile"
)

// cuKa2 is the Cu K-alpha2 wavelength in Å (Hölzer et al. 1997, from
// memory).
const cuKa2 = 1.5444274

// simulatedPattern simulates a laboratory scan of c (internal/synth:
// Cu doublet, Caglioti widths, Poisson counts) with a zero shift.
func simulatedPattern(t *testing.T, c cell.Cell, zero float64, seed uint64) (x, y, sig []float64) {
	t.Helper()
	in := synth.Instrument{Lambda1: cuKa1, Lambda2: cuKa2, Ratio2: 0.5, Zero: zero}
	s := synth.Simulate(synth.Spec{Phases: []synth.Phase{{Cell: c}}, Instrument: in, From: 15, To: 110, Step: 0.02, Peak: 5000}, rand.New(rand.NewPCG(seed, 1)))
	sig = make([]float64, len(s.Counts))
	for i, v := range s.Counts {
		sig[i] = math.Sqrt(math.Max(v, 1))
	}
	return s.TwoTheta, s.Counts, sig
}

// TestFitPatternRecoversCell fits simulated scans started 0.3 % off the
// true cell: the refined cell lies within 3 esd of the truth, the
// zero shift is found, and Rwp/Rexp is near 1 (the model is the one the
// scans were made with).
func TestFitPatternRecoversCell(t *testing.T) {
	for i, c := range []struct {
		truth cell.Cell
		zero  float64
	}{
		{cell.Must(cell.Cubic, cell.F, 5.6402), 0.03},
		{cell.Must(cell.Tetragonal, cell.P, 4.5937, 2.9587), -0.02},
		{cell.Must(cell.Hexagonal, cell.P, 3.2094, 5.2108), 0.01},
	} {
		x, y, sig := simulatedPattern(t, c.truth, c.zero, uint64(7+i))
		p := c.truth.Params()
		start, err := cell.New(c.truth.System, c.truth.Centring, p[0]*1.003, p[2]*0.997)
		if c.truth.System == cell.Cubic {
			start, err = cell.New(c.truth.System, c.truth.Centring, p[0]*1.003)
		}
		if err != nil {
			t.Fatal(err)
		}
		r, err := FitPattern(context.Background(), start, x, y, sig, PatternOptions{Lambda1: cuKa1, Lambda2: cuKa2, Ratio2: 0.5, Corrections: Zero,
			Width: profile.Caglioti{U: 0.004, V: -0.001, W: 0.0045}, Eta: 0.5})
		if err != nil {
			t.Fatalf("%s: %v", c.truth, err)
		}
		got := r.Phases[0].Cell.Params()
		esd := [6]float64{r.Phases[0].ESD.A, r.Phases[0].ESD.B, r.Phases[0].ESD.C}
		for k := 0; k < 3; k++ {
			if d := math.Abs(got[k] - p[k]); d > 3*esd[k] || !(esd[k] > 0) {
				t.Errorf("%s: edge %d refined to %.6f(%.6f), truth %.6f", c.truth, k, got[k], esd[k], p[k])
			}
		}
		var zero Param
		for _, q := range r.Params {
			if q.Name == "zero" {
				zero = q
			}
		}
		if math.Abs(zero.Value-c.zero) > 3*zero.ESD {
			t.Errorf("%s: zero %.4f(%.4f), truth %.4f", c.truth, zero.Value, zero.ESD, c.zero)
		}
		if q := r.Rwp / r.Rexp; q > 1.3 || q < 0.8 {
			t.Errorf("%s: Rwp %.4f, Rexp %.4f", c.truth, r.Rwp, r.Rexp)
		}
		t.Logf("%s: a %.6f(%.6f) Rwp %.4f Rexp %.4f GoF %.3f, %d reflections, %d iterations", c.truth, got[0], esd[0], r.Rwp, r.Rexp, r.GoF, len(r.Phases[0].Reflections), r.Iterations)
	}
}

// TestFitPatternBadInput: clear errors, no NaN, for a scan with too few
// points, a cell with more reflections than the points can hold, and no
// wavelength.
func TestFitPatternBadInput(t *testing.T) {
	c := cell.Must(cell.Cubic, cell.F, 5.6402)
	x, y, sig := simulatedPattern(t, c, 0, 3)
	opt := PatternOptions{Lambda1: cuKa1}
	for _, b := range []struct {
		name    string
		c       cell.Cell
		x, y, s []float64
		opt     PatternOptions
		want    string
	}{
		{"few points", c, x[:30], y[:30], sig[:30], opt, "too few"},
		{"huge cell", cell.Must(cell.Cubic, cell.P, 60), x, y, sig, opt, "too many reflections"},
		{"no wavelength", c, x, y, sig, PatternOptions{}, "wavelength"},
		{"lengths", c, x, y[:100], sig, opt, "counts"},
	} {
		_, err := FitPattern(context.Background(), b.c, b.x, b.y, b.s, b.opt)
		if err == nil || !errors.Is(err, ErrPattern) || !strings.Contains(err.Error(), b.want) {
			t.Errorf("%s: %v", b.name, err)
		}
	}
}

// BenchmarkFitPattern times fits of about 300 reflections (a primitive
// tetragonal cell, a 11 Å, c 8 Å, over 15–115° 2θ) sampled at 5,000 and
// at 50,000 points.
func BenchmarkFitPattern(b *testing.B) {
	for _, step := range []float64{0.02, 0.002} {
		n := int(math.Round(100/step)) + 1
		b.Run(fmt.Sprintf("points=%d", n), func(b *testing.B) {
			c := cell.Must(cell.Tetragonal, cell.P, 11, 8)
			in := synth.Instrument{Lambda1: cuKa1, Lambda2: cuKa2, Ratio2: 0.5}
			s := synth.Simulate(synth.Spec{Phases: []synth.Phase{{Cell: c}}, Instrument: in, From: 15, To: 115, Step: step, Peak: 5000}, rand.New(rand.NewPCG(5, 5)))
			sig := make([]float64, len(s.Counts))
			for i, v := range s.Counts {
				sig[i] = math.Sqrt(math.Max(v, 1))
			}
			opt := PatternOptions{Lambda1: cuKa1, Lambda2: cuKa2, Ratio2: 0.5, Corrections: Zero, Width: profile.Caglioti{U: 0.004, V: -0.001, W: 0.0045}, Eta: 0.5}
			b.ReportAllocs()
			b.ResetTimer()
			for i := 0; i < b.N; i++ {
				r, err := FitPattern(context.Background(), c, s.TwoTheta, s.Counts, sig, opt)
				if err != nil {
					b.Fatal(err)
				}
				b.ReportMetric(float64(len(r.Phases[0].Reflections)), "reflections")
				b.ReportMetric(float64(r.Points), "points")
				b.ReportMetric(float64(r.Iterations), "iterations")
			}
		})
	}
}
