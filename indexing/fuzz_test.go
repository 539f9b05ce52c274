package indexing

import (
	"reticle/cell"

	"context"
	"encoding/binary"
	"math"
	"testing"
)

// FuzzIndex feeds arbitrary line lists to the search: it must return
// solutions or an error, never panic, and every solution must index its
// lines consistently.
func FuzzIndex(f *testing.F) {
	enc := func(tts ...float64) []byte {
		var b []byte
		for _, t := range tts {
			b = binary.LittleEndian.AppendUint16(b, uint16(t*300))
		}
		return b
	}
	f.Add(enc(27.37, 31.70, 45.45, 53.87, 56.47, 66.23, 73.07, 75.29), 1.5406)
	f.Add(enc(20, 20.001, 20.002, 20.003, 20.004), 1.5406)
	f.Add(enc(179, 178, 177, 176, 175, 1, 2), 0.7093)
	f.Add(enc(10, 14.1, 17.3, 20, 22.4, 24.5), 2.2897)
	f.Fuzz(func(t *testing.T, data []byte, lambda float64) {
		var ls []cell.Line
		for i := 0; i+1 < len(data) && len(ls) < 30; i += 2 {
			ls = append(ls, cell.Line{TwoTheta: float64(binary.LittleEndian.Uint16(data[i:])) / 300, ESD: 0.003})
		}
		res, err := Index(context.Background(), ls, Options{Wavelength: lambda}, nil)
		if err != nil {
			return
		}
		for _, s := range res.Solutions {
			if s.Indexed+s.Unindexed != len(s.Lines) || math.IsNaN(s.M) || !(s.Volume > 0) {
				t.Fatalf("inconsistent solution %v", s)
			}
		}
	})
}
