package indexing

import (
	"testing"

	"reticle/cell"
)

// TestTablesAgainstBruteForce checks the fast allowed-index tables against
// enumerating hkl with the extinction rule itself.
func TestTablesAgainstBruteForce(t *testing.T) {
	const lim = 9
	cubic := map[cell.Centring]map[int]bool{cell.P: {}, cell.I: {}, cell.F: {}}
	plane := map[[3]int]bool{} // system, centring, m*64+l
	for h := -lim; h <= lim; h++ {
		for k := -lim; k <= lim; k++ {
			for l := -lim; l <= lim; l++ {
				if h == 0 && k == 0 && l == 0 {
					continue
				}
				for c := range cubic {
					if c.Allowed(cell.HKL{h, k, l}) {
						cubic[c][h*h+k*k+l*l] = true
					}
				}
				al := l
				if al < 0 {
					al = -al
				}
				for _, c := range []cell.Centring{cell.P, cell.I} {
					if c.Allowed(cell.HKL{h, k, l}) {
						plane[[3]int{int(cell.Tetragonal), int(c), (h*h+k*k)*64 + al}] = true
					}
				}
				if cell.P.Allowed(cell.HKL{h, k, l}) {
					plane[[3]int{int(cell.Hexagonal), int(cell.P), (h*h+h*k+k*k)*64 + al}] = true
				}
				if cell.R.Allowed(cell.HKL{h, k, l}) {
					plane[[3]int{int(cell.Rhombohedral), int(cell.R), (h*h+h*k+k*k)*64 + al}] = true
				}
			}
		}
	}
	for c, set := range cubic {
		for n := 1; n <= lim*lim; n++ {
			if cubicAllowed(c, n) != set[n] {
				t.Errorf("cubic %c n=%d: table %v, enumeration %v", c, n, cubicAllowed(c, n), set[n])
			}
		}
	}
	for _, sc := range [][2]int{{int(cell.Tetragonal), 'P'}, {int(cell.Tetragonal), 'I'}, {int(cell.Hexagonal), 'P'}, {int(cell.Rhombohedral), 'R'}} {
		for m := 0; m <= lim*lim; m++ {
			for l := 0; l <= lim; l++ {
				want := plane[[3]int{sc[0], sc[1], m*64 + l}]
				if got := planeAllowed(cell.System(sc[0]), cell.Centring(sc[1]), m, l); got != want {
					t.Errorf("%v %c m=%d l=%d: table %v, enumeration %v", cell.System(sc[0]), sc[1], m, l, got, want)
				}
			}
		}
	}
}
