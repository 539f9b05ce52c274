package indexing

import (
	"context"
	"fmt"
	"math/rand/v2"
	"strings"
	"testing"

	"reticle/cell"
)

// TestStopAgreesWithRanking: the sentence that says why the search
// stopped after the higher systems names the first candidate, or says
// that weighing every candidate put another first; checked on random
// cells of the higher systems.
func TestStopAgreesWithRanking(t *testing.T) {
	rng := rand.New(rand.NewPCG(20261204, 7))
	kinds := []struct {
		s   cell.System
		cen cell.Centring
	}{{cell.Cubic, cell.P}, {cell.Cubic, cell.I}, {cell.Cubic, cell.F}, {cell.Tetragonal, cell.P}, {cell.Tetragonal, cell.I}, {cell.Hexagonal, cell.P}, {cell.Rhombohedral, cell.R}}
	stopped := 0
	for i := 0; i < 14; i++ {
		k := kinds[i%len(kinds)]
		ls, lambda, _ := randomCase(rng, randomCell(rng, k.s, k.cen))
		res, err := Index(context.Background(), ls[:min(len(ls), 22)], Options{Wavelength: lambda}, nil)
		if err != nil || len(res.Solutions) == 0 {
			continue
		}
		if !strings.HasSuffix(res.Stop, "lower systems were not searched") {
			continue
		}
		stopped++
		first := res.Solutions[0].Cell
		if name := fmt.Sprintf("%s %s explains", first.System, first.Centring); !strings.HasPrefix(res.Stop, name) {
			t.Errorf("case %d: the first candidate is %s %s, the stop sentence says %q", i, first.System, first.Centring, res.Stop)
		}
	}
	if stopped == 0 {
		t.Fatal("no search stopped after the higher systems: the test checks nothing")
	}
}
