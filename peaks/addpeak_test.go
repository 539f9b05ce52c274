package peaks

import (
	"context"
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"reticle/scanfile"
)

// TestFitAt adds a weak line to a simulated scan after its extraction and
// asks for it by pointing 0.03° beside it: the fitted position and height
// match the simulation, and the profile grows by the line.
func TestFitAt(t *testing.T) {
	rad := scanfile.SingleLine(1.5405929)
	x := grid(20, 80, 0.01)
	rng := rand.New(rand.NewPCG(5, 9))
	lines := []synthLine{{30, 5000, 0.1, 0.4}, {45, 3000, 0.11, 0.4}, {62, 4000, 0.12, 0.4}}
	y := synthScan(x, lines, rad, 100, 0, rng)
	s := scanOf(x, y)
	res, err := Extract(context.Background(), s, Options{Radiation: rad}, nil)
	if err != nil {
		t.Fatal(err)
	}
	// The same counts plus a line of height 150 at 52.3° (about 15 esd
	// of the background's counting noise over its width).
	y2 := append([]float64(nil), y...)
	for i := range x {
		y2[i] += 150 * pv(x[i], 52.3, res.FWHMCurve.At(52.3), res.Eta)
	}
	s2 := scanOf(x, y2)
	p, prof, err := FitAt(s2, res, 52.33)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(p.TwoTheta-52.3) > 3*p.TwoThetaESD+0.002 || math.Abs(p.Height-150) > 3*p.HeightESD+5 || p.Flags&FlagUser == 0 {
		t.Errorf("added peak %+v", p)
	}
	i := 0
	for x[i] < 52.3 {
		i++
	}
	if prof[i]-res.Profile[i] < 100 {
		t.Errorf("profile grew by %.0f at the added line", prof[i]-res.Profile[i])
	}
	if _, _, err := FitAt(s, res, 70); !errors.Is(err, ErrNoPeak) {
		t.Errorf("empty spot: %v", err)
	}
	if _, _, err := FitAt(s, res, 95); !errors.Is(err, scanfile.ErrOutOfRange) {
		t.Errorf("outside the scan: %v", err)
	}
}

// TestNoShoulderAtScanEnd: scans (Cu doublet, invented lines) that end
// on the rising K-alpha2 edge of their last line, the K-alpha2 maximum
// just beyond the end. The background cannot be clipped there, and the
// residual it leaves must not be taken for a shoulder of the last line.
func TestNoShoulderAtScanEnd(t *testing.T) {
	rad, _ := scanfile.ParseRadiation("Cu")
	x := grid(100, 120, 0.02)
	for seed := uint64(1); seed <= 6; seed++ {
		rng := rand.New(rand.NewPCG(seed, 41))
		lines := []synthLine{{104.1, 4000, 0.10, 0.5}, {111.6, 6000, 0.11, 0.5}, {119.54, 4500, 0.12, 0.5}}
		s := scanOf(x, synthScan(x, lines, rad, 150, 0, rng))
		res, err := Extract(context.Background(), s, Options{Radiation: rad}, nil)
		if err != nil {
			t.Fatal(err)
		}
		for _, p := range res.Peaks {
			if p.TwoTheta > 119 && p.Flags&FlagAdded != 0 {
				t.Errorf("seed %d: a shoulder at %.3f° beside the last line (flags %v)", seed, p.TwoTheta, p.Flags)
			}
		}
	}
}
