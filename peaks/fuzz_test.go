package peaks

import (
	"context"
	"math"
	"testing"

	"reticle/scanfile"
)

// FuzzExtract runs extraction on whatever the text reader accepts: any
// readable scan must give a result or an error, never a panic, and every
// reported peak must lie inside the scan with finite values.
func FuzzExtract(f *testing.F) {
	f.Add(xyText(grid(20, 28, 0.2), grid(100, 108, 0.2)))
	f.Add([]byte("10 0\n10.1 0\n10.2 0\n10.3 0\n10.4 0\n10.5 0\n10.6 0\n10.7 0\n10.8 0\n10.9 0\n11 0\n11.1 0\n11.2 0\n11.3 0\n11.4 0\n11.5 0\n11.6 0\n11.7 0\n11.8 0\n11.9 0\n"))
	f.Add(xyText(grid(20, 22, 0.01), synthScan(grid(20, 22, 0.01), []synthLine{{21, 500, 0.05, 0.5}}, cu, 20, 0, nil)))
	f.Add([]byte("10 -5 1\n10.5 1e9 2\n11 3 0\n12 4 1\n13 5 1\n14 6 1\n15 1 1\n16 2 1\n17 3 1\n18 4 1\n19 5 1\n20 6 1\n21 7 1\n22 1e6 1\n23 1 1\n24 1 1\n25 1 1\n26 1 1\n27 1 1\n28 1 1\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		s, err := scanfile.Parse("fuzz.xy", data)
		if err != nil || s.Len() > 5000 {
			return
		}
		res, err := Extract(context.Background(), s, Options{Radiation: cu}, nil)
		if err != nil {
			return
		}
		lo, hi := s.Range()
		for _, p := range res.Peaks {
			if !(p.TwoTheta >= lo && p.TwoTheta <= hi) || math.IsNaN(p.Height) || math.IsNaN(p.TwoThetaESD) {
				t.Fatalf("peak %+v outside %g..%g or not finite", p, lo, hi)
			}
		}
	})
}
