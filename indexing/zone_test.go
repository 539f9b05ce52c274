package indexing

import (
	"cmp"
	"math"
	"math/rand/v2"
	"slices"
	"sort"
	"testing"

	"reticle/cell"
)

// TestBestForms: the n best forms are those a stable sort by score gives
// first, ties included.
func TestBestForms(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	for _, tc := range []struct{ size, n, levels int }{
		{0, 5, 3}, {4, 5, 3}, {5, 5, 3}, {50, 10, 4}, {500, 150, 20}, {1000, 150, 1000000},
	} {
		in := make([]scored, tc.size)
		for i := range in {
			// The form records its position, to check the order of ties.
			in[i] = scored{f: cell.QForm{float64(i)}, score: float64(rng.IntN(tc.levels))}
		}
		want := append([]scored(nil), in...)
		sort.SliceStable(want, func(a, b int) bool { return want[a].score > want[b].score })
		if len(want) > tc.n {
			want = want[:tc.n]
		}
		got := bestForms(append([]scored(nil), in...), tc.n)
		if len(got) != len(want) {
			t.Fatalf("%d forms, best %d: got %d", tc.size, tc.n, len(got))
		}
		for i := range want {
			if got[i] != want[i] {
				t.Fatalf("%d forms, best %d: %d-th is form %g (score %g), want form %g (score %g)", tc.size, tc.n, i, got[i].f[0], got[i].score, want[i].f[0], want[i].score)
			}
		}
	}
}

// TestVoteOrder checks the integer-key sort of votes against a sort by
// a comparison of x (ties kept in their order), on random votes of both
// signs, with repeated values and zeros.
func TestVoteOrder(t *testing.T) {
	seed := rand.Uint64()
	t.Logf("seed %d", seed)
	rng := rand.New(rand.NewPCG(seed, 1))
	var o voteOrder
	for trial := 0; trial < 200; trial++ {
		n := rng.IntN(3000)
		vs := make([]vote, n)
		for i := range vs {
			x := rng.NormFloat64() * math.Pow(10, float64(rng.IntN(9)-6))
			switch rng.IntN(10) {
			case 0:
				x = 0
			case 1:
				if i > 0 {
					x = vs[rng.IntN(i)].x
				}
			}
			vs[i] = vote{x: x, w: rng.Float64(), line: i}
		}
		want := slices.Clone(vs)
		slices.SortStableFunc(want, func(a, b vote) int { return cmp.Compare(a.x, b.x) })
		o.sort(vs)
		if !slices.Equal(vs, want) {
			t.Fatalf("trial %d (%d votes): the order differs from a stable sort by x", trial, n)
		}
	}
}
