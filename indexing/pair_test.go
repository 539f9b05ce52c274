package indexing

import (
	"math"
	"testing"
)

// TestPhaseMarks checks the ratio of a line's intensity density under a
// second phase to under the first against its closed form: both
// log-uniform from the weakest line's relative intensity lo, to 1 for
// the first phase and to top for the second, so the ratio is
// ln(1/lo)/ln(top/lo) up to top and zero above.
func TestPhaseMarks(t *testing.T) {
	ls := []obs{{rel: 1}, {rel: 0.01}, {rel: 0.05}, {rel: 0.2}, {rel: -1}}
	lo := 0.01
	for _, tc := range []struct {
		top  float64
		want []float64
	}{
		{0.05, []float64{0, math.Log(100) / math.Log(5), math.Log(100) / math.Log(5), 0, 1}},
		{1, []float64{1, 1, 1, 1, 1}},
		// A second phase of one intensity spans at least a factor 2.
		{lo, []float64{0, math.Log(100) / math.Log(2), 0, 0, 1}},
	} {
		got := phaseMarks(ls, tc.top)
		for i := range got {
			if math.Abs(got[i]-tc.want[i]) > 1e-12 {
				t.Errorf("top %g, line %d (rel %g): ratio %g, want %g", tc.top, i, ls[i].rel, got[i], tc.want[i])
			}
		}
	}
}

// TestSecondOf checks which cands may be a second phase beside another:
// one that adds at least minPairLines lines of less intensity than the
// first phase's, and shares with it fewer lines than it adds and fewer
// than the first phase explains alone.
func TestSecondOf(t *testing.T) {
	// Lines 0–3 strong, 4–9 weak.
	rel := []float64{1, 0.6, 0.5, 0.4, 0.02, 0.03, 0.01, 0.02, 0.04, 0.03}
	ls := make([]obs, len(rel))
	for i, r := range rel {
		ls[i].rel = r
	}
	own := func(lines ...int) *cand {
		k := &cand{}
		k.ev.own = make([]float64, len(ls))
		for _, i := range lines {
			k.ev.own[i] = 0.9
		}
		return k
	}
	strong := own(0, 1, 2, 3)
	weak := own(4, 5, 6, 7, 8, 9)
	for _, tc := range []struct {
		name string
		k, b *cand
		ok   bool
	}{
		{"weak lines beside the strong", strong, weak, true},
		{"strong lines beside the weak", weak, strong, false},
		{"a derivative: more shared than added", strong, own(0, 1, 2, 3, 4, 5, 6), false},
		{"too few lines added", strong, own(4, 5), false},
		{"one line shared by chance", strong, own(3, 4, 5, 6, 7), true},
		{"a part of the second's lattice: every line shared", own(0, 1, 2), own(0, 1, 2, 3, 4, 5, 6, 7, 8, 9), false},
		{"more shared than explained alone", own(0, 1, 2, 3, 4), own(1, 2, 3, 5, 6, 7, 8, 9), false},
	} {
		h := make([]float64, len(ls))
		if got := secondOf(tc.k, tc.b, ls, h, 10) != nil; got != tc.ok {
			t.Errorf("%s: second phase %v, want %v", tc.name, got, tc.ok)
		}
	}
}

// TestStrongApart checks when the strong lines are searched on their
// own: when some of the first n lines are weak, whether the strong lines
// of the whole scan are fewer than n or not.
func TestStrongApart(t *testing.T) {
	lines := func(rel ...float64) []obs {
		ls := make([]obs, len(rel))
		for i, r := range rel {
			ls[i] = obs{tt: float64(10 + i), rel: r}
		}
		return ls
	}
	for _, tc := range []struct {
		name string
		all  []obs
		n    int
		want int // lines returned, 0 for nil
	}{
		{"all strong", lines(1, 0.5, 0.4, 0.3, 0.2, 0.8), 4, 0},
		{"a weak line among the first, few strong lines", lines(1, 0.02, 0.4, 0.3, 0.05), 4, 3},
		{"a weak line among the first, strong lines beyond", lines(1, 0.02, 0.4, 0.3, 0.5, 0.6), 4, 4},
		{"the weak lines after the first", lines(1, 0.5, 0.4, 0.3, 0.01, 0.01), 4, 0},
		{"fewer strong lines than a cell needs", lines(1, 0.02, 0.03, 0.01, 0.3), 4, 0},
	} {
		got := strongApart(tc.all, tc.n, 3)
		if len(got) != tc.want {
			t.Errorf("%s: %d lines, want %d", tc.name, len(got), tc.want)
		}
	}
}
