package peaks

import (
	"context"
	"math"
	"math/rand/v2"
	"testing"
	"time"

	"reticle/cell"
	"reticle/internal/synth"

	"reticle/scanfile"
)

// TestBroadLinesFineStep: lines 0.5° wide on a 0.001° step (500 points
// per FWHM, fitted in bins of a twelfth of the width) that stand clear of
// their neighbours (8 FWHM) and of the scan's ends are found at their
// true positions within 3 esd, and the extraction of the 100,000-point
// scan stays quick (under 2 s, a loose bound for a shared machine; it
// takes about 0.1 s).
func TestBroadLinesFineStep(t *testing.T) {
	ph := synth.Phase{Cell: cell.Must(cell.Cubic, cell.F, 5.6402)}
	in := synth.Instrument{Lambda1: cu.Lambda1, U: 1e-9, V: 1e-9, W: 0.25}
	s := synth.Simulate(synth.Spec{Phases: []synth.Phase{ph}, Instrument: in, From: 20, To: 120, Step: 0.001, Peak: 20000}, rand.New(rand.NewPCG(3, 9)))
	scan, err := scanfile.Parse("broad.xy", s.Text("broad lines on a fine step (internal/synth)"))
	if err != nil {
		t.Fatal(err)
	}
	start := time.Now()
	res, err := Extract(context.Background(), scan, Options{Radiation: scanfile.SingleLine(cu.Lambda1)}, nil)
	if err != nil {
		t.Fatal(err)
	}
	took := time.Since(start)
	found := 0
	for _, l := range s.Lines {
		clear := l.TwoTheta > 22 && l.TwoTheta < 118
		for _, o := range s.Lines {
			if o.TwoTheta != l.TwoTheta && math.Abs(o.TwoTheta-l.TwoTheta) < 4 {
				clear = false
			}
		}
		if l.Height < 0.05*20000 || !clear {
			continue
		}
		for _, p := range res.Peaks {
			if math.Abs(p.TwoTheta-l.TwoTheta) < 0.1 {
				found++
				if z := (p.TwoTheta - l.TwoTheta) / p.TwoThetaESD; math.Abs(z) > 3 {
					t.Errorf("line at %.4f° found at %.4f(%.4f)°: %.1f esd", l.TwoTheta, p.TwoTheta, p.TwoThetaESD, z)
				}
				break
			}
		}
	}
	t.Logf("%d points: %d lines found in %v", scan.Len(), found, took)
	if found < 3 || took > 2*time.Second {
		t.Errorf("%d lines found in %v", found, took)
	}
}
