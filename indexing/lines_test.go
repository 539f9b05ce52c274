package indexing

import "reticle/cell"

// rutileLines returns the first n calculated lines of rutile above 20° 2θ
// for Cu K-alpha1 (tetragonal P, a = 4.5937, c = 2.9587 Å, handbook values
// from memory), shifted by a zero error of +0.03°, with esds of 0.002°.
func rutileLines(n int) []cell.Line {
	c := newCell(cell.Tetragonal, cell.P, 4.5937, 2.9587)
	var ls []cell.Line
	for _, r := range cell.Reflections(c, 1) {
		tt := ttOf(r.Q, 1.5405929)
		if tt > 20 && len(ls) < n {
			ls = append(ls, cell.Line{TwoTheta: tt + 0.03, ESD: 0.002})
		}
	}
	return ls
}

// newCell returns a cell of the systems searched here from a and c.
func newCell(s cell.System, cen cell.Centring, a, c float64) cell.Cell {
	if s == cell.Cubic {
		return cell.Must(s, cen, a)
	}
	return cell.Must(s, cen, a, c)
}
