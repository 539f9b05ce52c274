package indexing

import (
	"testing"

	"reticle/cell"
)

// TestSplitTable checks the lookup of class A by residues against the
// congruences themselves, for every split of every system and every hkl
// with indices from −9 to 9.
func TestSplitTable(t *testing.T) {
	for s, sps := range splitsOf {
		for _, sp := range sps {
			for h := -9; h <= 9; h++ {
				for k := -9; k <= 9; k++ {
					for l := -9; l <= 9; l++ {
						x := cell.HKL{h, k, l}
						if r4, r3 := residues(x); sp.inClassA(r4, r3) != sp.in(x) {
							t.Fatalf("%v split %v mod %d: %v in class A %v by the table, %v by the congruences", s, sp.v, sp.m, x, sp.inClassA(r4, r3), sp.in(x))
						}
					}
				}
			}
		}
	}
}
