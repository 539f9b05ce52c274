package indexing

import "testing"

// TestTablesAgainstBruteForce checks the fast allowed-index tables against
// enumerating hkl with the extinction rule itself.
func TestTablesAgainstBruteForce(t *testing.T) {
	const lim = 9
	cubic := map[Centring]map[int]bool{P: {}, I: {}, F: {}}
	plane := map[[3]int]bool{} // system, centring, m*64+l
	for h := -lim; h <= lim; h++ {
		for k := -lim; k <= lim; k++ {
			for l := -lim; l <= lim; l++ {
				if h == 0 && k == 0 && l == 0 {
					continue
				}
				for c := range cubic {
					if Allowed(c, h, k, l) {
						cubic[c][h*h+k*k+l*l] = true
					}
				}
				al := l
				if al < 0 {
					al = -al
				}
				for _, c := range []Centring{P, I} {
					if Allowed(c, h, k, l) {
						plane[[3]int{int(Tetragonal), int(c), (h*h+k*k)*64 + al}] = true
					}
				}
				if Allowed(P, h, k, l) {
					plane[[3]int{int(Hexagonal), int(P), (h*h+h*k+k*k)*64 + al}] = true
				}
				if Allowed(R, h, k, l) {
					plane[[3]int{int(Rhombohedral), int(R), (h*h+h*k+k*k)*64 + al}] = true
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
	for _, sc := range [][2]int{{int(Tetragonal), 'P'}, {int(Tetragonal), 'I'}, {int(Hexagonal), 'P'}, {int(Rhombohedral), 'R'}} {
		for m := 0; m <= lim*lim; m++ {
			for l := 0; l <= lim; l++ {
				want := plane[[3]int{sc[0], sc[1], m*64 + l}]
				if got := planeAllowed(System(sc[0]), Centring(sc[1]), m, l); got != want {
					t.Errorf("%v %c m=%d l=%d: table %v, enumeration %v", System(sc[0]), sc[1], m, l, got, want)
				}
			}
		}
	}
}
