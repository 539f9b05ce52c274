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
	cs, scan, settings, err := blindScan(synth.Lattice{System: cell.Orthorhombic, Centring: cell.P}, 1796600000000000148)
	if err != nil {
		t.Fatal(err)
	}
	a, err := Run(context.Background(), scan, settings, nil)
	if err != nil {
		t.Fatal(err)
	}
	if len(a.Candidates) == 0 {
		t.Fatal("no candidate")
	}
	_, hi := scan.Range()
	got := a.Candidates[0].Cell()
	if got.System != cs.Truth.System || !synth.SameLines(cs.Truth, got, cell.QOf(hi, cs.Lambda), 20) {
		t.Errorf("first %v, want %v", got, cs.Truth)
	}
	if !slices.ContainsFunc(a.Search.Warnings, func(w string) bool { return strings.Contains(w, "search was repeated on the first 40 lines") }) {
		t.Errorf("no note of the repeated search: %q", a.Search.Warnings)
	}
}
