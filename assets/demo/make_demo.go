//go:build ignore

// make_demo writes the bundled demo scan, kiln-trial-07.xy: a simulated
// laboratory powder pattern of a spinel (MgAl2O4) body from trial 07 of the
// Larkspur Kiln Cooperative, a ceramics workshop invented for this demo.
//
//	go run assets/demo/make_demo.go > assets/demo/kiln-trial-07.xy
//
// Everything here is invented for the demo only: the relative intensities
// are made up to look like a spinel pattern, the cell edge is a round
// handbook-like value, the instrument errors are arbitrary. Nothing in the
// tests takes a reference value from this file.
package main

import (
	"fmt"
	"math"
	"math/rand/v2"
)

const (
	a      = 8.083     // cubic cell edge, Å (invented round value)
	lam1   = 1.5405929 // Cu K-alpha1, Å (Hölzer et al. 1997, from memory)
	lam2   = 1.5444274 // Cu K-alpha2, Å (same source)
	ratio2 = 0.5       // K-alpha2/K-alpha1 (common practice)
	zero   = 0.018     // zero-point error, degrees 2θ
	dispMM = 0.025     // sample displacement, mm
	radius = 240.0     // goniometer radius, mm
	start  = 15.0
	stop   = 100.0
	step   = 0.02
)

// Reflections allowed for a face-centred spinel with their invented
// relative heights.
var lines = []struct {
	h, k, l int
	rel     float64
}{
	{1, 1, 1, 30}, {2, 2, 0, 38}, {3, 1, 1, 100}, {2, 2, 2, 4}, {4, 0, 0, 62},
	{3, 3, 1, 2}, {4, 2, 2, 11}, {5, 1, 1, 34}, {4, 4, 0, 72}, {5, 3, 1, 2},
	{6, 2, 0, 4}, {5, 3, 3, 9}, {6, 2, 2, 2}, {4, 4, 4, 7}, {7, 1, 1, 3},
	{6, 4, 2, 5}, {7, 3, 1, 14}, {8, 0, 0, 9},
}

func main() {
	rng := rand.New(rand.NewPCG(7, 2026))
	fmt.Println("# Larkspur Kiln Cooperative (fictional) - kiln trial 07, spinel body fired at 1250 C")
	fmt.Println("# simulated demo scan made by assets/demo/make_demo.go; invented data, demo only")
	fmt.Println("# Anode: Cu, K-alpha1/K-alpha2, no monochromator")
	fmt.Println("# 2theta(deg)  counts")
	deg := math.Pi / 180
	for x := start; x <= stop+1e-9; x += step {
		// Background: air scatter falling with angle plus a glassy hump.
		bg := 60 + 900/(x) + 45*math.Exp(-sq((x-24)/7))
		y := bg
		for _, ln := range lines {
			d := a / math.Sqrt(float64(ln.h*ln.h+ln.k*ln.k+ln.l*ln.l))
			for c, lam := range []float64{lam1, lam2} {
				s := lam / (2 * d)
				if s >= 1 {
					continue
				}
				t := math.Asin(s)
				pos := 2*t/deg + zero - 2*dispMM*math.Cos(t)/radius/deg
				tan := math.Tan(t)
				fw := math.Sqrt(0.004*tan*tan - 0.001*tan + 0.0045)
				eta := 0.4 + 0.002*pos
				u := (x - pos) / fw
				pv := eta/(1+4*u*u) + (1-eta)*math.Exp(-4*math.Ln2*u*u)
				amp := 5200 * ln.rel / 100
				if c == 1 {
					amp *= ratio2
				}
				y += amp * pv
			}
		}
		fmt.Printf("%8.3f %7d\n", x, poisson(rng, y))
	}
}

func sq(v float64) float64 { return v * v }

// poisson draws a Poisson variate: Knuth's product method for small means,
// the normal approximation above 500 counts.
func poisson(rng *rand.Rand, mean float64) int {
	if mean > 500 {
		return int(math.Max(0, math.Round(mean+math.Sqrt(mean)*rng.NormFloat64())))
	}
	l := math.Exp(-mean)
	k, p := 0, 1.0
	for {
		p *= rng.Float64()
		if p <= l {
			return k
		}
		k++
	}
}
