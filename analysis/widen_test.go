package analysis

import (
	"context"
	"slices"
	"strings"
	"testing"

	"reticle/cell"
	"reticle/internal/synth"
)

// TestShortEdgeWidened: a scan drawn by synth.Draw (the blind test's
// seed 1796600000000000148: orthorhombic P, a = 28.2, b = 4.01, c = 13.3
// Å) whose first 20 lines all lie in the zone normal to its short edge,
// the first line off it being the 22nd. The search on 20 lines put first
// a cell with a = 11.5 Å that fits them; repeated on 40 lines, it finds
// the true cell, and says so.
func TestShortEdgeWidened(t *testing.T) {
	a, _, _, _ := blindFirst(t, synth.Lattice{System: cell.Orthorhombic, Centring: cell.P}, 1796600000000000148)
	if !slices.ContainsFunc(a.Search.Warnings, func(w string) bool { return strings.Contains(w, "search was repeated on the first 40 lines") }) {
		t.Errorf("no note of the repeated search: %q", a.Search.Warnings)
	}
}

// blindFirst analyses the blind test's scan of the lattice and seed,
// checks that its first candidate has the true lattice's lines (as
// TestBlind scores it), and returns the analysis, the drawn case, the
// settings and the largest Q of the scan, Å⁻².
func blindFirst(t *testing.T, lat synth.Lattice, seed uint64) (*Analysis, synth.Case, Settings, float64) {
	t.Helper()
	cs, scan, settings, err := blindScan(lat, seed)
	if err != nil {
		t.Fatal(err)
	}
	a, err := Run(context.Background(), scan, settings, nil)
	if err != nil {
		t.Fatal(err)
	}
	if len(a.Candidates) == 0 {
		t.Fatalf("seed %d: no candidate", seed)
	}
	_, hi := scan.Range()
	qmax := cell.QOf(hi, cs.Lambda)
	if got := a.Candidates[0].Cell(); got.System != cs.Truth.System || !synth.SameLines(cs.Truth, got, qmax, 20) {
		t.Errorf("seed %d: first %v, want %v", seed, got, cs.Truth)
	}
	return a, cs, settings, qmax
}
