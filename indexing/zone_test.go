package indexing

import (
	"math/rand/v2"
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
