package main

import (
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
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
