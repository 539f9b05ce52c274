package analysis

import (
	"math"

	"reticle/cell"
)

// crossTol bounds the departures from a higher metric that crossed
// considers. polish accepts a whole-pattern cell whose Niggli-reduced
// G6 terms moved by up to polishMove of their mean edge term
// (cell.SameLattice); reversing a departure δ (relative) of an edge
// moves its term a² by about 4δ·a², and reversing a departure of ε
// radians in an angle moves its term 2bc·cos α by about 4ε·bc, so polish
// can reverse edges within polishMove/4 and angles within about
// polishMove/4 radians (0.14°). The bounds, polishMove/2 and half a
// degree, are at least twice those: a larger departure cannot have been
// reversed by a cell that polish keeps.
var crossTol = cell.Tolerance{Length: polishMove / 2, Angle: 0.5}

// crossSigmas is how many esds a departure of the cell refined on the
// peak positions from a higher metric must reach before its sign counts
// as measured: three, the usual significance (common practice).
const crossSigmas = 3

// crossed reports whether the whole-pattern fit's cell pc lies nearer
// the mirror of the cell refined on the peak positions, c with esds e,
// through a higher metric than c itself, when the peaks measured the
// departure from that metric (crossSigmas). The mirror departs from the
// metric as far as c, the other way: G′ = 2·Gₕ − G, Gₕ the reduced
// metric G symmetrised to the higher system (its best setting within
// crossTol, cell.Settings). A mirror that is c's own lattice (an
// orthorhombic cell of a ≈ b, whose mirror only exchanges a and b) is
// no other answer and is passed over; nearness is the distance of the
// Niggli-reduced G6 vectors (cell.Reduce, G6.Distance).
//
// A Pawley fit gives every calculated line an intensity of its own
// (Pawley 1981), so the components of a line that a small departure
// splits can trade their intensities, and the fit can converge to the
// cell that departs as far the other way (a tetragonal cell with c < a
// and one with c > a share the centroids of their unresolved lines).
// Where the peaks resolved the split, its sign is measured by them and
// the fit's reversal is a false minimum.
func crossed(c cell.Cell, e cell.ESD, pc cell.Cell) bool {
	red, err := cell.Reduce(c)
	if err != nil {
		return false
	}
	g := red.G6.Metric()
	p, s := c.Params(), e.Values()
	rel := 0.0
	for i := range 3 {
		rel = math.Max(rel, s[i]/p[i])
	}
	for i := 3; i < 6; i++ {
		rel = math.Max(rel, s[i]*math.Pi/180)
	}
	rp, err := cell.Reduce(pc)
	if err != nil || !(rel > 0) {
		return false
	}
	ss := cell.NewSettingSearch(red)
	for _, sys := range []cell.System{cell.Cubic, cell.Tetragonal, cell.Hexagonal, cell.Rhombohedral, cell.Orthorhombic} {
		if sys.LaueOrder() <= c.System.LaueOrder() {
			continue
		}
		sts := ss.Settings(sys, crossTol)
		if len(sts) == 0 || sts[0].Misfit < crossSigmas*rel {
			continue
		}
		mi, ok := sts[0].Transform.Inverse()
		if !ok {
			continue
		}
		gh := sts[0].Cell.Metric().Transform(mi)
		var gm cell.Matrix
		for i := range 3 {
			for j := range 3 {
				gm[i][j] = 2*gh[i][j] - g[i][j]
			}
		}
		mirror := cell.FromMetric(cell.Triclinic, cell.P, gm)
		if mirror.Check() != nil || cell.SameLattice(c, mirror, crossSigmas*rel) {
			continue
		}
		if rm, err := cell.Reduce(mirror); err == nil && rp.G6.Distance(rm.G6) < rp.G6.Distance(red.G6) {
			return true
		}
	}
	return false
}
