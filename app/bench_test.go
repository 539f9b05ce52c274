package main

import (
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"reticle/cell"
	"reticle/internal/synth"
)

// BenchmarkRender measures one redraw of the pattern at the window's size.
func BenchmarkRender(b *testing.B) {
	u := demoUI(b, "")
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		u.plot.render()
	}
}

// BenchmarkAnalyse measures the analysis alone (indexing, refinement).
func BenchmarkAnalyse(b *testing.B) {
	m := openDemo(b)
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		m.Analyse(b.Context(), nil)
	}
}

// BenchmarkRefreshTables measures the refresh of everything but the plot.
func BenchmarkRefreshAll(b *testing.B) {
	u := demoUI(b, "")
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		u.refreshAll()
	}
}

// BenchmarkRenderMillion redraws a simulated 1,000,000-point scan (five
// invented Gaussian lines), decimated for display only.
func BenchmarkRenderMillion(b *testing.B) {
	dir := b.TempDir()
	p := filepath.Join(dir, "big.xy")
	var sb strings.Builder
	for i := 0; i < 1000000; i++ {
		x := 10 + float64(i)*0.0001
		y := 100 + 5000*math.Exp(-math.Pow((x-30)/0.05, 2)) + 3000*math.Exp(-math.Pow((x-50)/0.06, 2)) + 2000*math.Exp(-math.Pow((x-70)/0.07, 2)) + 1000*math.Exp(-math.Pow((x-90)/0.08, 2)) + 800*math.Exp(-math.Pow((x-60)/0.06, 2))
		sb.WriteString(strconv.FormatFloat(x, 'f', 4, 64) + " " + strconv.FormatFloat(y, 'f', 1, 64) + "\n")
	}
	os.WriteFile(p, []byte(sb.String()), 0o644)
	u := newTestUI(b, "")
	u.open(p)
	u.wait()
	if u.m.A == nil {
		b.Fatal(u.status.Text)
	}
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		u.plot.render()
	}
}

// BenchmarkToggleShownSystems is BenchmarkToggleShown on simulated scans
// (internal/synth, Cu K-alpha doublet, fixed seeds) of a cell of each
// system from cubic to hexagonal: the time from a click on the fourth
// peak to the candidates weighed again in the window. The cells are
// those of common phases, from memory: tantalum (cubic I), rutile,
// zincite and calcite (hexagonal axes); only their size matters here.
func BenchmarkToggleShownSystems(b *testing.B) {
	for _, def := range []struct {
		s    cell.System
		cen  cell.Centring
		free []float64
	}{
		{cell.Cubic, cell.I, []float64{3.3058}},
		{cell.Tetragonal, cell.P, []float64{4.5937, 2.9587}},
		{cell.Hexagonal, cell.P, []float64{3.2494, 5.2038}},
		{cell.Rhombohedral, cell.R, []float64{4.9896, 17.0610}},
	} {
		c, err := cell.New(def.s, def.cen, def.free...)
		if err != nil {
			b.Fatal(err)
		}
		b.Run(c.System.String(), func(b *testing.B) {
			s := synth.Simulate(synth.Spec{Phases: []synth.Phase{{Cell: c}}, Instrument: synth.Instrument{Lambda1: 1.5405929, Lambda2: 1.5444274, Zero: 0.02},
				From: 15, To: 120, Step: 0.02, Peak: 20000}, rand.New(rand.NewPCG(7, 1)))
			p := filepath.Join(b.TempDir(), "sim.xy")
			if err := os.WriteFile(p, s.Text("simulated scan (internal/synth)\nAnode: Cu"), 0o644); err != nil {
				b.Fatal(err)
			}
			u := newTestUI(b, "")
			u.open(p)
			u.wait()
			if u.m.A == nil || len(u.m.A.Candidates) == 0 {
				b.Fatalf("no candidate: %s", u.status.Text)
			}
			timeShown(b, u)
		})
	}
}
