package peaks

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"reticle/scanfile"
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
		s, err := scanfile.Parse("bench.xy", data)
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
	for _, n := range []int{5_000, 100_000, 1_000_000} {
		b.Run(fmt.Sprintf("n=%d", n), func(b *testing.B) { benchReadExtract(b, n) })
	}
}

// BenchmarkExtract times the extraction alone, on scans already read,
// with allocations: the normal scan and one whose features are broad
// compared with the step (100 + 50·sin(i/3000) counts, humps about 1°
// wide on a 0.0001° step), whose cost must not grow with the points under
// a feature.
func BenchmarkExtract(b *testing.B) {
	for _, n := range []int{5_000, 100_000, 1_000_000} {
		s, err := scanfile.Parse("bench.xy", benchScan(n))
		if err != nil {
			b.Fatal(err)
		}
		b.Run(fmt.Sprintf("n=%d", n), func(b *testing.B) {
			b.ReportAllocs()
			for i := 0; i < b.N; i++ {
				if _, err := Extract(context.Background(), s, Options{Radiation: cu}, nil); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
	s, err := scanfile.Parse("humps.xy", humpScan(1_000_000))
	if err != nil {
		b.Fatal(err)
	}
	b.Run("humps n=1000000", func(b *testing.B) {
		b.ReportAllocs()
		for i := 0; i < b.N; i++ {
			if _, err := Extract(context.Background(), s, Options{Radiation: cu}, nil); err != nil {
				b.Fatal(err)
			}
		}
	})
}

// humpScan is n points from 10° in steps of 0.0001° with counts
// 100 + ⌊50·sin(i/3000)⌋.
func humpScan(n int) []byte {
	var buf []byte
	for i := 0; i < n; i++ {
		buf = fmt.Appendf(buf, "%.5f %d\n", 10+float64(i)*1e-4, 100+int(50*math.Sin(float64(i)/3000)))
	}
	return buf
}

// BenchmarkRead times the text reader alone.
func BenchmarkRead(b *testing.B) {
	for _, n := range []int{5_000, 100_000, 1_000_000} {
		data := benchScan(n)
		b.Run(fmt.Sprintf("n=%d", n), func(b *testing.B) {
			b.ReportAllocs()
			b.SetBytes(int64(len(data)))
			for i := 0; i < b.N; i++ {
				if _, err := scanfile.Parse("bench.xy", data); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkSNIP clips the background of 10,000 points with a window of
// 75 points each side, the size of a fine laboratory scan.
func BenchmarkSNIP(b *testing.B) {
	y := make([]float64, 10000)
	for i := range y {
		y[i] = 200 + 50*math.Sin(float64(i)/700) + float64(i%37)
	}
	for b.Loop() {
		SNIP(y, 75)
	}
}
