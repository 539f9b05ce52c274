package refine

import (
	"math"
	"sort"

	"reticle/cell"
)

// blendShare is the share of the distance to an unresolved neighbouring
// calculated line taken as the esd of a line's position. The maximum of
// two lines closer than their width lies between them, nearer the
// stronger: at most half their separation from the line it is assigned
// to (the nearer, usually the stronger), and its σ is taken as a quarter.
const blendShare = 0.25

// blendESDs returns the observations with the esd of every line of the
// cell that another calculated line of the cell (another d-spacing)
// approaches closer than the line's width widened to blendShare of their
// separation: neither the peak fit nor the assignment can tell such a
// blend from a single line, and its maximum is not the assigned line's
// position. Positions are those of the cell c without corrections, which
// move neighbouring lines alike. obs is not modified.
func blendESDs(c cell.Cell, obs []Observation, lambda float64) []Observation {
	ttmax := 0.0
	for _, o := range obs {
		if !o.Standard && o.Width > 0 {
			ttmax = math.Max(ttmax, o.TwoTheta+o.Width)
		}
	}
	if ttmax == 0 {
		return obs
	}
	var tts []float64
	for _, r := range cell.Reflections(c, cell.QOf(math.Min(ttmax+1, 179.9), lambda)) {
		if tt := cell.TwoThetaOfQ(r.Q, lambda); !math.IsNaN(tt) {
			tts = append(tts, tt)
		}
	}
	sort.Float64s(tts)
	out := obs
	copied := false
	for i, o := range obs {
		if o.Standard || o.Width <= 0 || len(o.HKL) == 0 {
			continue
		}
		own := cell.TwoTheta(c.D(o.HKL[0]), lambda)
		if math.IsNaN(own) {
			continue
		}
		sep := math.Inf(1)
		k := sort.SearchFloat64s(tts, own-o.Width)
		for ; k < len(tts) && tts[k] <= own+o.Width; k++ {
			if d := math.Abs(tts[k] - own); d > 1e-9*own {
				sep = math.Min(sep, d)
			}
		}
		if sep >= o.Width {
			continue
		}
		if e := blendShare * sep; e > o.ESD {
			if !copied {
				out = append([]Observation(nil), obs...)
				copied = true
			}
			out[i].ESD = e
		}
	}
	return out
}
