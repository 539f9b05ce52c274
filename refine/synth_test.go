package refine

import (
	"math"
	"math/rand/v2"

	"reticle/indexing"
)

// cuKa1 is the Cu K-alpha1 wavelength in Å (Hölzer et al. 1997, from
// memory).
const cuKa1 = 1.5405929

// truth is a simulated measurement: a cell and the instrument errors.
type truth struct {
	cell       indexing.Cell
	zero, disp float64 // degrees 2θ, mm
	radius     float64 // mm
}

// synthLines computes every line of the truth between 15 and 140° 2θ,
// with Gaussian errors of esds drawn between 0.002° and 0.01°; the esds
// are reported exactly.
func synthLines(t truth, rng *rand.Rand) []Observation {
	s := math.Sin(140 * deg / 2)
	qmax := 4 * s * s / (cuKa1 * cuKa1)
	p := cellValues(t.cell)
	var out []Observation
	for _, r := range indexing.Reflections(t.cell, qmax) {
		pt := eval(t.cell.System, p, r.HKL[0], cuKa1, t.zero, t.disp, t.radius)
		if !pt.inside || pt.tt < 15 {
			continue
		}
		esd := 0.002 + 0.008*rng.Float64()
		out = append(out, Observation{TwoTheta: pt.tt + esd*rng.NormFloat64(), ESD: esd, HKL: r.HKL})
	}
	return out
}
