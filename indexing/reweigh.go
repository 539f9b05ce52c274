package indexing

import (
	"context"
	"math"
	"slices"

	"reticle/cell"
)

// Reweigh weighs the cells of an earlier result again on edited lines,
// without a new search: each cell is refined on the first lines from its
// earlier zero offset and displacement, and the cells are ranked by the
// evidence of Index, taken once at that cell (Index refits each cell to
// all lines first), and given probabilities among themselves. It
// answers in a small part of Index's time, since the search is most of
// it, and it is what Index would answer whenever the edit leaves the
// lattice among the earlier candidates (a line rejected as foreign,
// or a line added that one of them indexes); a lattice that only the
// edit makes findable needs Index, so the result says it is
// provisional (Result.Provisional). It can be cancelled through ctx.
func Reweigh(ctx context.Context, lines []cell.Line, opt Options, earlier []Solution) (*Result, error) {
	o := opt.withDefaults()
	if err := o.checkWavelength(); err != nil {
		return nil, err
	}
	all := prepare(lines, o)
	want := o.wanted()
	first := all[:min(len(all), o.Lines)]
	res := &Result{Wavelength: o.Wavelength, LinesUsed: len(first), Provisional: true,
		Bounds: Bounds{MaxEdge: o.MaxEdge, MaxVolume: o.MaxVolume, ZeroRange: o.ZeroRange},
		Stop:   "the candidates of the last search weighed again on the edited lines; no new search"}
	if len(first) == 0 {
		return res, nil
	}
	need := needed(first, o)
	// Index weighs second phases, and cells of the strong lines alone,
	// when some of the first lines are weak.
	strong := strongApart(all, len(first), fewestLines(want))
	o.pairing = strong != nil
	// The earlier cells' second phases, listed or not, are weighed
	// again, at the zero offset of the cell they stood beside.
	var seconds []cell.Cell
	cands := slices.Clone(earlier)
	for _, sol := range earlier {
		if sp := sol.SecondPhase; sp != nil && !slices.ContainsFunc(seconds, func(c cell.Cell) bool { return sameCell(c, *sp, 2e-3) }) {
			seconds = append(seconds, *sp)
			if !slices.ContainsFunc(earlier, func(s Solution) bool { return sameCell(s.Cell, *sp, 2e-3) }) {
				cands = append(cands, Solution{Cell: *sp, Zero: sol.Zero, Displacement: sol.Displacement, Parameters: sol.Parameters})
			}
		}
	}
	var pool []*cand
	for _, sol := range cands {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		if !want[sol.Cell.System] || len(first) < minLines(sol.Cell.System) {
			continue
		}
		k := &cand{c: sol.Cell, zero: sol.Zero, disp: sol.Displacement, once: true,
			zeroFree: sol.Parameters > len(cell.Basis(sol.Cell.System)) && len(first) >= zeroLines(sol.Cell.System)}
		switch {
		case slices.ContainsFunc(seconds, func(c cell.Cell) bool { return sameCell(c, sol.Cell, 2e-3) }):
			// An earlier cell's second phase is weighed as one again,
			// as it stood (it may index few of the first lines).
			k.assign(first, o.Wavelength, 0)
			k.weighAlways = true
		case k.settle(first, o.Wavelength, 0, need):
		case strong != nil && len(strong) >= minLines(sol.Cell.System) && k.settle(strong, o.Wavelength, 0, needed(strong, o)):
			// A cell of the strong lines, as Index's search on them
			// finds it, is weighed whatever its figure on the first.
			k.assign(first, o.Wavelength, 0)
			k.weighAlways = true
		default:
			continue
		}
		if math.Abs(k.zero) > o.zeroBound() {
			continue
		}
		k.figures(first, o.Wavelength)
		pool = append(pool, k)
	}
	ranked := rankCands(pool, first, all, o)
	res.list(ranked, first, all, o)
	res.warn(ranked, all, o)
	return res, nil
}
