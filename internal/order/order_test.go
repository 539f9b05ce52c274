package order

import (
	"math/rand/v2"
	"slices"
	"testing"
)

func TestNth(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	cases := map[string]func(i int) float64{
		"random":     func(int) float64 { return rng.NormFloat64() },
		"increasing": func(i int) float64 { return float64(i) },
		"decreasing": func(i int) float64 { return -float64(i) },
		"few values": func(int) float64 { return float64(rng.IntN(3)) },
		"constant":   func(int) float64 { return 7 },
		"organ pipe": func(i int) float64 { return float64(min(i, 1000-i)) },
	}
	for name, gen := range cases {
		for _, n := range []int{1, 2, 3, 10, 101, 1000} {
			v := make([]float64, n)
			for i := range v {
				v[i] = gen(i)
			}
			sorted := slices.Sorted(slices.Values(v))
			for _, k := range []int{0, n / 4, n / 2, n - 1} {
				w := slices.Clone(v)
				if got := Nth(w, k); got != sorted[k] {
					t.Errorf("%s, n = %d: Nth(%d) = %g, sorting gives %g", name, n, k, got, sorted[k])
				}
			}
		}
	}
}

func BenchmarkNth(b *testing.B) {
	rng := rand.New(rand.NewPCG(1, 2))
	v := make([]float64, 10000)
	for i := range v {
		v[i] = rng.ExpFloat64()
	}
	w := make([]float64, len(v))
	for b.Loop() {
		copy(w, v)
		Nth(w, len(w)/2)
	}
}

// TestMedian: odd and even counts, and v left as it was.
func TestMedian(t *testing.T) {
	for _, c := range []struct {
		v    []float64
		want float64
	}{
		{[]float64{3}, 3},
		{[]float64{5, 1, 3}, 3},
		{[]float64{4, 1, 3, 2}, 2.5},
		{[]float64{7, 7, 1, 9, 7, 2}, 7},
	} {
		in := slices.Clone(c.v)
		if got := Median(c.v); got != c.want {
			t.Errorf("Median(%v) = %g, want %g", in, got, c.want)
		}
		if !slices.Equal(in, c.v) {
			t.Errorf("Median reordered %v to %v", in, c.v)
		}
	}
}
