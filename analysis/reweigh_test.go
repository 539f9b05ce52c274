package analysis

import (
	"context"
	"errors"
	"math"
	"testing"
	"time"

	"reticle/cell"
	"reticle/indexing"
	"reticle/internal/synth"
	"reticle/scanfile"
)

// TestReweigh checks Reweigh against Analyse after an edit: on scans of
// the lattices from cubic to hexagonal drawn by synth.Draw, the weakest
// line is rejected and the earlier candidates weighed again must put
// first the cell a full analysis of the edited lines puts first, in less
// time, and say they are provisional. RETICLE_LONG=1 draws 10 scans per
// lattice from a fresh seed (printed; -blind.seed repeats it) and
// prints the share that agree and the times.
func TestReweigh(t *testing.T) {
	per, seed := sizeOf(1, 10, 20261204, *blindSeed)
	t.Logf("%d scans per lattice, seed %d", per, seed)
	ctx := context.Background()
	var n, agree int
	var quick, full time.Duration
	for i := 0; i < per; i++ {
		for li, lat := range synth.Lattices {
			if lat.System.LaueOrder() < cell.Tetragonal.LaueOrder() {
				continue
			}
			s := seed + uint64(i*len(synth.Lattices)+li)
			_, scan, settings, err := blindScan(lat, s)
			if err != nil {
				t.Fatal(err)
			}
			a, err := Run(ctx, scan, settings, nil)
			if err != nil || len(a.Candidates) == 0 || len(a.Lines) < 8 {
				continue
			}
			edited := settings.Clone()
			edited.Reject(weakest(a))
			t0 := time.Now()
			q, err := Reweigh(ctx, a.Extraction, edited, a, nil)
			tq := time.Since(t0)
			if err != nil {
				t.Fatalf("%v seed %d: %v", lat, s, err)
			}
			t0 = time.Now()
			f, err := Analyse(ctx, a.Extraction, edited, nil)
			tf := time.Since(t0)
			if err != nil {
				t.Fatalf("%v seed %d: %v", lat, s, err)
			}
			if !q.Search.Provisional || f.Search.Provisional || len(q.Lines) != len(a.Lines)-1 {
				t.Errorf("%v seed %d: provisional %v and %v, %d lines of %d", lat, s, q.Search.Provisional, f.Search.Provisional, len(q.Lines), len(a.Lines))
			}
			n++
			quick += tq
			full += tf
			same := len(q.Candidates) > 0 && len(f.Candidates) > 0 && sameCellAs(q.Candidates[0].Cell(), f.Candidates[0].Cell())
			if same {
				agree++
			} else if len(q.Candidates) > 0 && len(f.Candidates) > 0 {
				t.Logf("%v seed %d: weighed again %v, searched %v", lat, s, q.Candidates[0].Cell(), f.Candidates[0].Cell())
			}
		}
	}
	if n == 0 {
		t.Fatal("no scan to edit")
	}
	t.Logf("%d of %d edited scans put the same cell first; weighing again took %v per scan, the full analysis %v", agree, n, quick/time.Duration(n), full/time.Duration(n))
	if agree < n && per == 1 {
		t.Errorf("only %d of %d agree", agree, n)
	}
	if quick*3 > full {
		t.Errorf("weighing again took %v, the full analysis %v", quick, full)
	}
}

// sameCellAs reports whether two cells are one: the same system and
// centring, edges within 0.1 % and angles within 0.1°.
func sameCellAs(a, b cell.Cell) bool {
	return a.System == b.System && a.Centring == b.Centring &&
		math.Abs(a.A/b.A-1) < 1e-3 && math.Abs(a.B/b.B-1) < 1e-3 && math.Abs(a.C/b.C-1) < 1e-3 &&
		math.Abs(a.Alpha-b.Alpha) < 0.1 && math.Abs(a.Beta-b.Beta) < 0.1 && math.Abs(a.Gamma-b.Gamma) < 0.1
}

// TestReweighRefuses: Reweigh starts only from an earlier search of the
// same scan under the same settings but for the lines, which found a
// cell.
func TestReweighRefuses(t *testing.T) {
	a := demo(t, Settings{})
	other, _ := scanfile.ParseRadiation("Co")
	none := *a
	none.Search = &indexing.Result{}
	for _, c := range []struct {
		name    string
		earlier *Analysis
		s       Settings
	}{
		{"no earlier analysis", nil, Settings{}},
		{"another radiation", a, Settings{Radiation: &other}},
		{"another threshold", a, Settings{Threshold: 6}},
		{"no cell found before", &none, Settings{}},
	} {
		if _, err := Reweigh(context.Background(), a.Extraction, c.s, c.earlier, nil); !errors.Is(err, ErrNoEarlierSearch) {
			t.Errorf("%s: %v, want ErrNoEarlierSearch", c.name, err)
		}
	}
	s := Settings{}
	s.Reject(a.Peaks[0].TwoTheta)
	if _, err := Reweigh(context.Background(), a.Extraction, s, a, nil); err != nil {
		t.Errorf("a line rejected: %v", err)
	}
}

// BenchmarkReweigh times Reweigh after the weakest line of a scan of
// each lattice from cubic to hexagonal (TestReweigh's first seed) is
// rejected.
func BenchmarkReweigh(b *testing.B) {
	ctx := context.Background()
	type edit struct {
		a *Analysis
		s Settings
	}
	var edits []edit
	for li, lat := range synth.Lattices {
		if lat.System.LaueOrder() < cell.Tetragonal.LaueOrder() {
			continue
		}
		_, scan, settings, err := blindScan(lat, 20261204+uint64(li))
		if err != nil {
			b.Fatal(err)
		}
		a, err := Run(ctx, scan, settings, nil)
		if err != nil || len(a.Candidates) == 0 {
			continue
		}
		s := settings.Clone()
		s.Reject(weakest(a))
		edits = append(edits, edit{a, s})
	}
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		e := edits[i%len(edits)]
		if _, err := Reweigh(ctx, e.a.Extraction, e.s, e.a, nil); err != nil {
			b.Fatal(err)
		}
	}
}

// weakest returns the position, degrees 2θ, of the analysis's weakest
// peak that is not a companion.
func weakest(a *Analysis) float64 {
	w := -1
	for j, p := range a.Peaks {
		if !p.Companion() && (w < 0 || p.Area < a.Peaks[w].Area) {
			w = j
		}
	}
	return a.Peaks[w].TwoTheta
}
