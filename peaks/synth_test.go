package peaks

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strings"

	"reticle/scanfile"
)

// A synthLine is one reflection of a simulated scan.
type synthLine struct {
	x, h, w, eta float64 // K-alpha1 position (degrees 2θ), height, FWHM, mixing
}

// synthScan simulates counts at x: a sloping background plus pseudo-Voigt
// lines (with K-alpha2 at ratio2 for a doublet, and optional K-beta lines at
// kbeta of the height), with Poisson noise when rng is not nil. The
// simulation is invented test data; it shares only the textbook pseudo-Voigt
// formula with the fitter.
func synthScan(x []float64, lines []synthLine, rad scanfile.Radiation, bg0, kbeta float64, rng *rand.Rand) []float64 {
	y := make([]float64, len(x))
	for i, xi := range x {
		m := bg0 * (1 + 0.3*(xi-x[0])/(x[len(x)-1]-x[0]))
		for _, l := range lines {
			m += l.h * pv(xi, l.x, l.w, l.eta)
			if rad.Doublet() {
				m += rad.Ratio2 * l.h * pv(xi, Companion(l.x, rad.Lambda1, rad.Lambda2), l.w, l.eta)
			}
			if kbeta > 0 {
				m += kbeta * l.h * pv(xi, Companion(l.x, rad.Lambda1, rad.KBeta), l.w, l.eta)
			}
		}
		if rng != nil {
			m = float64(poissonDraw(rng, m))
		}
		y[i] = m
	}
	return y
}

// pv is the pseudo-Voigt written out again, independently of the package's
// PseudoVoigt, so that a mistake there cannot cancel in the tests.
func pv(x, x0, fwhm, eta float64) float64 {
	g := math.Exp(-4 * math.Ln2 * math.Pow((x-x0)/fwhm, 2))
	l := 1 / (1 + math.Pow(2*(x-x0)/fwhm, 2))
	return eta*l + (1-eta)*g
}

// poissonDraw returns a Poisson variate of the given mean: Knuth's
// multiplication method below 50, the normal approximation with continuity
// correction above (error in the tails negligible at these means).
func poissonDraw(rng *rand.Rand, mean float64) int {
	if mean <= 0 {
		return 0
	}
	if mean > 50 {
		return int(math.Max(0, math.Floor(mean+math.Sqrt(mean)*rng.NormFloat64()+0.5)))
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

// grid returns angles from lo to hi in steps of step.
func grid(lo, hi, step float64) []float64 {
	n := int(math.Round((hi-lo)/step)) + 1
	x := make([]float64, n)
	for i := range x {
		x[i] = lo + float64(i)*step
	}
	return x
}

// scanOf builds a Scan directly from points.
func scanOf(x, y []float64) *scanfile.Scan {
	return &scanfile.Scan{Path: "synthetic", TwoTheta: x, Intensity: y}
}

// xyText writes points as a whitespace two-column export.
func xyText(x, y []float64) []byte {
	var b strings.Builder
	b.WriteString("# synthetic scan\n")
	for i := range x {
		fmt.Fprintf(&b, "%.5f %.0f\n", x[i], y[i])
	}
	return []byte(b.String())
}

// nearest returns the index of the peak closest to x and its distance.
func nearest(ps []Peak, x float64) (int, float64) {
	best, d := -1, math.Inf(1)
	for i, p := range ps {
		if e := math.Abs(p.TwoTheta - x); e < d {
			best, d = i, e
		}
	}
	return best, d
}
