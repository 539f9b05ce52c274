package peaks

import (
	"context"
	"errors"
	"math"
	"math/rand/v2"
	"reflect"
	"sort"
	"testing"

	"reticle/scanfile"
)

var cu = func() scanfile.Radiation { a, _ := scanfile.LookupAnode("Cu"); return scanfile.AnodeRadiation(a) }()

// TestExtractAccuracyAndHonestESD: isolated peaks of 1,000 to 20,000 counts,
// single line and Cu doublet, over 1,000 noise draws. The median position
// error must be at most 0.002° and |error|/esd ≤ 3 must hold for at least
// 99 % of the peaks (for a normal error, 99.73 %).
func TestExtractAccuracyAndHonestESD(t *testing.T) {
	draws := 1000
	if testing.Short() {
		draws = 100
	}
	x := grid(20, 100, 0.02)
	rng := rand.New(rand.NewPCG(1, 2))
	var errs, ratios []float64
	missed, spurious := 0, 0
	for d := 0; d < draws; d++ {
		rad := scanfile.SingleLine(cu.Lambda1)
		if d%2 == 1 {
			rad = cu
		}
		var lines []synthLine
		for k := 0; k < 4; k++ {
			pos := 25 + 18*float64(k) + 4*rng.Float64()
			lines = append(lines, synthLine{
				x: pos, h: 1000 * math.Pow(20, rng.Float64()),
				w: 0.06 + 0.0008*pos, eta: 0.3 + 0.4*rng.Float64(),
			})
		}
		y := synthScan(x, lines, rad, 80+100*rng.Float64(), 0, rng)
		res, err := Extract(context.Background(), scanOf(x, y), Options{Radiation: rad}, nil)
		if err != nil {
			t.Fatal(err)
		}
		for _, p := range res.Peaks {
			real := false
			for _, l := range lines {
				real = real || math.Abs(p.TwoTheta-l.x) < 0.5*l.w
			}
			if !real {
				spurious++
			}
		}
		for _, l := range lines {
			i, dist := nearest(res.Peaks, l.x)
			if i < 0 || dist > 0.5*l.w {
				t.Logf("draw %d: missed %+v (nearest %d at %.4f)", d, l, i, dist)
				missed++
				continue
			}
			e := res.Peaks[i].TwoTheta - l.x
			errs = append(errs, math.Abs(e))
			ratios = append(ratios, math.Abs(e)/res.Peaks[i].TwoThetaESD)
		}
	}
	sort.Float64s(errs)
	med := errs[len(errs)/2]
	within1, within3 := 0, 0
	for _, r := range ratios {
		if r <= 1 {
			within1++
		}
		if r <= 3 {
			within3++
		}
	}
	f1 := float64(within1) / float64(len(ratios))
	f3 := float64(within3) / float64(len(ratios))
	t.Logf("%d draws: %d spurious peaks", draws, spurious)
	if float64(spurious) > 0.02*float64(draws) {
		t.Errorf("%d spurious peaks in %d scans", spurious, draws)
	}
	t.Logf("%d peaks, %d missed, median |error| %.5f°, |err|/esd ≤ 1: %.3f, ≤ 3: %.4f", len(errs), missed, med, f1, f3)
	if missed > 0 {
		t.Errorf("%d isolated peaks of ≥1000 counts missed", missed)
	}
	if med > 0.002 {
		t.Errorf("median position error %.5f° > 0.002°", med)
	}
	if f3 < 0.99 {
		t.Errorf("|error|/esd ≤ 3 for %.4f of peaks, want ≥ 0.99", f3)
	}
	if f1 < 0.6 || f1 > 0.76 {
		t.Errorf("|error|/esd ≤ 1 for %.3f of peaks, want near 0.68", f1)
	}
}

// TestCompanionsNotPeaks: K-alpha2 lines (resolved at high angle) and K-beta
// lines at 1/15 of the height are never reported as reflections of their own.
func TestCompanionsNotPeaks(t *testing.T) {
	x := grid(20, 140, 0.02)
	lines := []synthLine{
		{30, 8000, 0.08, 0.4}, {48, 5000, 0.09, 0.4}, {75, 6000, 0.1, 0.4},
		{105, 4000, 0.12, 0.4}, {128, 3000, 0.15, 0.4},
	}
	rng := rand.New(rand.NewPCG(3, 4))
	y := synthScan(x, lines, cu, 100, 1.0/15, rng)
	res, err := Extract(context.Background(), scanOf(x, y), Options{Radiation: cu}, nil)
	if err != nil {
		t.Fatal(err)
	}
	reflections := 0
	for i, p := range res.Peaks {
		if p.Companion() {
			q := res.Peaks[p.Parent]
			if want := Companion(q.TwoTheta, cu.Lambda1, cu.KBeta); math.Abs(want-p.TwoTheta) > 0.05 {
				t.Errorf("peak %d at %.3f flagged as K-beta of %.3f (expected at %.3f)", i, p.TwoTheta, q.TwoTheta, want)
			}
			continue
		}
		reflections++
		k, dist := -1, math.Inf(1)
		for j, l := range lines {
			if e := math.Abs(l.x - p.TwoTheta); e < dist {
				k, dist = j, e
			}
		}
		if dist > 0.02 {
			t.Errorf("reported %.3f°, nearest true line %.3f°", p.TwoTheta, lines[k].x)
		}
	}
	if reflections != len(lines) {
		t.Errorf("%d reflections reported, want %d: %+v", reflections, len(lines), res.Peaks)
	}
}

func TestExtractDeterministic(t *testing.T) {
	x := grid(20, 80, 0.02)
	y := synthScan(x, []synthLine{{30, 3000, 0.08, 0.5}, {30.3, 1500, 0.08, 0.5}, {60, 900, 0.09, 0.5}}, cu, 150, 0, rand.New(rand.NewPCG(5, 6)))
	a, err := Extract(context.Background(), scanOf(x, y), Options{Radiation: cu}, nil)
	if err != nil {
		t.Fatal(err)
	}
	b, _ := Extract(context.Background(), scanOf(x, y), Options{Radiation: cu}, nil)
	if !reflect.DeepEqual(a, b) {
		t.Error("two runs on the same scan differ")
	}
	if len(a.Profile) != len(x) || len(a.Background) != len(x) {
		t.Error("profile or background has the wrong length")
	}
}

func TestExtractCancelAndProgress(t *testing.T) {
	x := grid(20, 80, 0.02)
	y := synthScan(x, []synthLine{{30, 3000, 0.08, 0.5}, {50, 900, 0.09, 0.5}}, cu, 150, 0, rand.New(rand.NewPCG(7, 8)))
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := Extract(ctx, scanOf(x, y), Options{}, nil); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled extract: %v", err)
	}
	calls, last := 0, 0
	_, err := Extract(context.Background(), scanOf(x, y), Options{}, func(done, total int) {
		calls++
		if done > total || done < last {
			t.Errorf("progress %d/%d after %d", done, total, last)
		}
		last = done
	})
	if err != nil || calls == 0 {
		t.Errorf("progress calls %d, err %v", calls, err)
	}
}

// TestNoiseOnly: a flat scan of pure counting noise yields no peaks.
func TestNoiseOnly(t *testing.T) {
	x := grid(10, 110, 0.02)
	rng := rand.New(rand.NewPCG(9, 10))
	spurious := 0
	for d := 0; d < 20; d++ {
		y := synthScan(x, nil, cu, 50+50*float64(d%4), 0, rng)
		res, err := Extract(context.Background(), scanOf(x, y), Options{Radiation: cu}, nil)
		if err != nil {
			t.Fatal(err)
		}
		spurious += len(res.Peaks)
	}
	if spurious > 2 {
		t.Errorf("%d peaks found in 20 noise-only scans", spurious)
	}
}
