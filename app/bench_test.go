package main

import "testing"

// BenchmarkRender measures one redraw of the pattern at the window's size.
func BenchmarkRender(b *testing.B) {
	u := newTestUI(b, "")
	u.open(demoScan)
	u.wait()
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
	u := newTestUI(b, "")
	u.open(demoScan)
	u.wait()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		u.refreshAll()
	}
}
