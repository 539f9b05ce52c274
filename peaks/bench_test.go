package peaks

import (
	"context"
	"fmt"
	"math/rand/v2"
	"testing"
)

// benchScan returns the text of an n-point Cu doublet scan from 10° to 110°
// with 25 lines.
func benchScan(n int) []byte {
	step := 100.0 / float64(n-1)
	x := grid(10, 110, step)[:n]
	rng := rand.New(rand.NewPCG(11, 12))
	var lines []synthLine
	for k := 0; k < 25; k++ {
		pos := 14 + 3.8*float64(k) + rng.Float64()
		lines = append(lines, synthLine{pos, 300 + 8000*rng.Float64(), 0.06 + 0.0006*pos, 0.45})
	}
	return xyText(x, synthScan(x, lines, cu, 120, 0, rng))
}

func benchReadExtract(b *testing.B, n int) {
	data := benchScan(n)
	b.SetBytes(int64(len(data)))
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		s, err := Parse("bench.xy", data)
		if err != nil {
			b.Fatal(err)
		}
		res, err := Extract(context.Background(), s, Options{Radiation: cu}, nil)
		if err != nil {
			b.Fatal(err)
		}
		if len(res.Peaks) < 20 {
			b.Fatalf("%d peaks", len(res.Peaks))
		}
	}
}

// BenchmarkReadExtract times reading and extracting a whole scan.
func BenchmarkReadExtract(b *testing.B) {
	for _, n := range []int{10_000, 1_000_000} {
		b.Run(fmt.Sprintf("n=%d", n), func(b *testing.B) { benchReadExtract(b, n) })
	}
}

// BenchmarkRead times the text reader alone.
func BenchmarkRead(b *testing.B) {
	for _, n := range []int{10_000, 1_000_000} {
		data := benchScan(n)
		b.Run(fmt.Sprintf("n=%d", n), func(b *testing.B) {
			b.SetBytes(int64(len(data)))
			for i := 0; i < b.N; i++ {
				if _, err := Parse("bench.xy", data); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
