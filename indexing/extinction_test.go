package indexing

import (
	"bufio"
	"fmt"
	"os"
	"strings"
	"testing"

	"reticle/cell"
)

// TestExtinctionSymbol derives the conditions and the extinction symbol
// of orthorhombic and monoclinic space groups from their systematic
// absences as gemmi computes them, every reflection with |h|, |k|, |l| ≤
// 5 that the centring allows on a line of its own and observed unless
// absent, and compares the symbol with the one International Tables
// gives (testdata/reference/gemmi_absences.py).
func TestExtinctionSymbol(t *testing.T) {
	f, err := os.Open("../testdata/reference/gemmi_absences.tsv")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	sc := bufio.NewScanner(f)
	sc.Buffer(nil, 1<<20)
	n := 0
	for sc.Scan() {
		fs := strings.Split(sc.Text(), "\t")
		if len(fs) != 4 {
			t.Fatalf("golden line %q: want 4 fields", sc.Text())
		}
		name, want := fs[0], fs[2]
		cen, err := cell.ParseCentring(fs[1])
		if err != nil {
			t.Fatal(err)
		}
		absent := map[cell.HKL]bool{}
		for _, w := range strings.Fields(fs[3]) {
			var v cell.HKL
			if _, err := fmt.Sscanf(w, "%d,%d,%d", &v[0], &v[1], &v[2]); err != nil {
				t.Fatalf("%s: hkl %q: %v", name, w, err)
			}
			absent[v] = true
		}
		sys := cell.Orthorhombic
		if strings.HasPrefix(name[2:], "1 ") {
			sys = cell.Monoclinic
		}
		var s Solution
		for h := -5; h <= 5; h++ {
			for k := -5; k <= 5; k++ {
				for l := -5; l <= 5; l++ {
					v := cell.HKL{h, k, l}
					if v == (cell.HKL{}) || !cen.Allowed(v) {
						continue
					}
					s.Calculated = append(s.Calculated, cell.Reflection{HKL: []cell.HKL{v}})
					if !absent[v] {
						s.Lines = append(s.Lines, IndexedLine{HKL: []cell.HKL{v}})
					}
				}
			}
		}
		cs := conditions(s)
		if got := extinctionSymbol(sys, cen, cs); got != want {
			t.Errorf("%s: extinction symbol %q, want %q (conditions %v)", name, got, want, conditionNames(cs))
		}
		n++
	}
	if n < 29 {
		t.Errorf("%d space groups read, want 29", n)
	}
}

// TestExtinctionChanceZone: in a monoclinic cell only the h0l zone is a
// symmetry zone; a 0kl condition that the lines show by chance must not
// be read as implying the 0k0 row's, so the 2₁ stays in the symbol.
func TestExtinctionChanceZone(t *testing.T) {
	pick := func(name string) condition {
		for _, c := range conditionRules {
			if c.name == name {
				return c
			}
		}
		t.Fatalf("no rule %q", name)
		return condition{}
	}
	cs := []condition{pick("0k0: k = 2n"), pick("0kl: k = 2n")}
	if got := extinctionSymbol(cell.Monoclinic, cell.P, cs); got != "P 1 21 1" {
		t.Errorf("monoclinic: %q, want \"P 1 21 1\"", got)
	}
	// In an orthorhombic cell the 0kl zone is the b glide's, which
	// implies the row's condition: no 2₁ along b.
	if got := extinctionSymbol(cell.Orthorhombic, cell.P, cs); got != "P b - -" {
		t.Errorf("orthorhombic: %q, want \"P b - -\"", got)
	}
}
