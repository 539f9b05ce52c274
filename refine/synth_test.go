package refine

import (
	"math"
	"math/rand/v2"

	"reticle/cell"
)

// cuKa1 is the Cu K-alpha1 wavelength in Å (Hölzer et al. 1997, from
// memory).
const cuKa1 = 1.5405929

// truth is a simulated measurement: a cell and the instrument errors.
type truth struct {
	cell       cell.Cell
	zero, disp float64 // degrees 2θ, mm
	radius     float64 // mm
}

// position computes a line's 2θ independently of the refinement's model:
// d from the cell, Bragg's law, then the zero shift and the displacement
// shift −2s·cos θ/R converted to degrees.
func position(t truth, h cell.HKL) float64 {
	tt := cell.TwoTheta(t.cell.D(h), cuKa1)
	th := tt / 2 * math.Pi / 180
	return tt + t.zero - 2*t.disp*math.Cos(th)/t.radius*180/math.Pi
}

// synthLines computes every line of the truth between 15 and 140° 2θ (at
// most 60), with Gaussian errors of esds drawn between 0.002° and 0.01°;
// the esds are reported exactly.
func synthLines(t truth, rng *rand.Rand) []Observation {
	var out []Observation
	for _, r := range cell.Reflections(t.cell, cell.QOf(140, cuKa1)) {
		tt := position(t, r.HKL[0])
		if math.IsNaN(tt) || tt < 15 {
			continue
		}
		esd := 0.002 + 0.008*rng.Float64()
		out = append(out, Observation{Line: cell.Line{TwoTheta: tt + esd*rng.NormFloat64(), ESD: esd}, HKL: r.HKL})
		if len(out) == 60 {
			break
		}
	}
	return out
}

// testCells are one cell of each system: handbook values from memory
// (NaCl, rutile, magnesium, corundum on hexagonal axes, an orthorhombic
// cell of the size of α-sulfur's subcell), a monoclinic and a triclinic
// cell of copper sulfate pentahydrate's size; any cells would do.
var testCells = []cell.Cell{
	cell.Must(cell.Cubic, cell.F, 5.6402),
	cell.Must(cell.Tetragonal, cell.P, 4.5937, 2.9587),
	cell.Must(cell.Hexagonal, cell.P, 3.2094, 5.2108),
	cell.Must(cell.Rhombohedral, cell.R, 4.7589, 12.991),
	cell.Must(cell.Orthorhombic, cell.P, 4.76, 10.22, 5.99),
	cell.Must(cell.Monoclinic, cell.C, 9.41, 5.38, 6.12, 102.4),
	{System: cell.Triclinic, Centring: cell.P, A: 6.12, B: 10.69, C: 5.96, Alpha: 82.35, Beta: 107.33, Gamma: 102.6},
}

// truthParams maps parameter names to their true values.
func truthParams(tr truth) map[string]float64 {
	p := tr.cell.Params()
	m := map[string]float64{"zero": tr.zero, "displacement": tr.disp, "transparency": 0}
	for i, n := range cell.ParamNames {
		m[n] = p[i]
	}
	return m
}

func hkl(h, k, l int) []cell.HKL { return []cell.HKL{{h, k, l}} }

func obsAt(tt, esd float64, h []cell.HKL) Observation {
	return Observation{Line: cell.Line{TwoTheta: tt, ESD: esd}, HKL: h}
}
