package indexing

import (
	"container/heap"
	"math"
	"slices"
)

// A cutoff follows the n best scores of the zone search's lattices so far
// and bounds the calculated lines a lattice may have and still enter
// them. The figure of countForm is Q_N·k / (2·Σd·N_calc) over the k
// lines indexed, every discrepancy d at least a tenth of its line's
// window, so k/Σd is at most the inverse of the mean tenth-window of the
// k narrowest windows, largest for the fewest lines a lattice must index
// (need). The score (the figure times 0.84 per line left out) is no
// larger. A lattice with more calculated lines than makes that bound
// reach the n-th best score cannot be kept, and its count stops there;
// the lattices kept are the same as with every count finished, since
// the n-th best score only rises.
type cutoff struct {
	n     int
	floor float64   // the least score kept at all
	best  minScores // the n best scores so far (a min-heap)
	bound float64   // Q_N·k/(2·Σ w/10) at its largest, the k narrowest
}

// newCutoff returns the cutoff of the n best scores, none below floor,
// of lattices indexing at least need of the lines (Q qs, windows ws).
func newCutoff(n int, floor float64, qs, ws []float64, need int) *cutoff {
	s := slices.Clone(ws)
	slices.Sort(s)
	k := max(1, min(need, len(s)))
	var sum float64
	for _, w := range s[:k] {
		sum += w / 10
	}
	return &cutoff{n: n, floor: floor, bound: qs[len(qs)-1] * float64(k) / (2 * sum)}
}

// admits reports whether a score enters the n best so far: a later
// lattice of a score equal to the n-th best ranks after it.
func (c *cutoff) admits(s float64) bool {
	return len(c.best) < c.n || s > c.best[0]
}

// add records a score.
func (c *cutoff) add(s float64) {
	if len(c.best) < c.n {
		heap.Push(&c.best, s)
		return
	}
	if s > c.best[0] {
		c.best[0] = s
		heap.Fix(&c.best, 0)
	}
}

// limit returns the most calculated lines up to the last line that a
// lattice may have and still be kept.
func (c *cutoff) limit() int {
	t := c.floor
	if len(c.best) == c.n {
		t = math.Max(t, c.best[0])
	}
	// A margin of a millionth for rounding in the figure.
	m := c.bound / t * (1 + 1e-6)
	if m >= math.MaxInt32 {
		return math.MaxInt32
	}
	return int(m)
}

// minScores is a min-heap of scores.
type minScores []float64

func (h minScores) Len() int           { return len(h) }
func (h minScores) Less(i, j int) bool { return h[i] < h[j] }
func (h minScores) Swap(i, j int)      { h[i], h[j] = h[j], h[i] }
func (h *minScores) Push(x any)        { *h = append(*h, x.(float64)) }
func (h *minScores) Pop() any {
	old := *h
	x := old[len(old)-1]
	*h = old[:len(old)-1]
	return x
}
