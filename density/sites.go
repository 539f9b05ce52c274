package density

import "math"

// A Site is an atom at fractional coordinates of the conventional cell,
// listed once for every position it occupies in the closed unit cube
// [0, 1]³ (a corner atom appears at all eight corners).
type Site struct {
	Element string
	X, Y, Z float64
}

// Share returns the fraction of an atom at a site that belongs to one
// cell: 1/8 at a corner, 1/4 on an edge, 1/2 on a face, 1 inside (common
// practice: the neighbouring cells sharing the site split it equally).
func (s Site) Share() float64 {
	onFace := 0
	for _, x := range []float64{s.X, s.Y, s.Z} {
		if math.Abs(x) < 1e-9 || math.Abs(x-1) < 1e-9 {
			onFace++
		}
	}
	return 1 / math.Pow(2, float64(onFace))
}

// CountAtoms sums the shares of the sites by element: the atoms each
// element contributes to one cell.
func CountAtoms(sites []Site) map[string]float64 {
	out := map[string]float64{}
	for _, s := range sites {
		out[s.Element] += s.Share()
	}
	return out
}
