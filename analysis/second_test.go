package analysis

import (
	"context"
	"testing"

	"reticle/cell"
	"reticle/internal/synth"
)

// TestSecondPhase: scans drawn by synth.Draw whose foreign phase, a few
// per cent as strong as the sample, shows many lines; in the first two
// far more than the sample (a small cubic cell) does. Weighed against
// foreign lines spread evenly, the foreign phase's cell came first,
// leaving the scan's strongest lines unexplained; weighed as a second
// phase beside the sample's cell, it leaves the sample's cell first and
// is named as the second phase. The provisional answer to an edit
// (Reweigh) agrees.
func TestSecondPhase(t *testing.T) {
	for _, tc := range []struct {
		lat  synth.Lattice
		seed uint64
	}{
		// cubic P, a = 3.335 Å; foreign hexagonal P a = 4.912, c = 8.607 Å at 6 %
		{synth.Lattice{System: cell.Cubic, Centring: cell.P}, 1796800000000000113},
		// cubic I (drawn as tetragonal I with c = a), a = 3.174 Å;
		// foreign hexagonal P a = 5.364, c = 9.098 Å at 9 %
		{synth.Lattice{System: cell.Tetragonal, Centring: cell.I}, 1796800000000000145},
		// tetragonal P, a = 3.080, c = 10.165 Å; foreign hexagonal P
		// a = 4.048, c = 6.309 Å at 4 %, whose lines a tetragonal I
		// cell of 2a, 2c took in part: the lines it leaves are searched
		// for the second phase.
		{synth.Lattice{System: cell.Tetragonal, Centring: cell.P}, 1796800000000000102},
	} {
		a, cs, settings, qmax := blindFirst(t, tc.lat, tc.seed)
		first := a.Candidates[0]
		foreign := cs.Spec.Phases[1].Cell
		if sp := first.Solution.SecondPhase; sp == nil || !synth.SameLines(foreign, *sp, qmax, 20) {
			t.Errorf("seed %d: second phase %v, want %v", tc.seed, sp, foreign)
		}
		// Weighed again with the weakest line rejected, the cell and
		// its second phase stay first.
		edited := settings.Clone()
		edited.Reject(weakest(a))
		q, err := Reweigh(context.Background(), a.Extraction, edited, a, nil)
		if err != nil {
			t.Fatal(err)
		}
		if len(q.Candidates) == 0 || !sameCellAs(q.Candidates[0].Cell(), first.Cell()) || q.Candidates[0].Solution.SecondPhase == nil {
			t.Errorf("seed %d: weighed again, the first candidate is not %v beside a second phase", tc.seed, first.Cell())
		}
	}
}
