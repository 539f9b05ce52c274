package indexing

import "reticle/cell"

// Tables of which index sums a lattice allows, for the fast line test.

const tableSize = 4096

var (
	sum2   [tableSize]bool // m = h²+k²
	loesch [tableSize]bool // m = h²+hk+k²
)

func init() {
	for h := 0; h*h < tableSize; h++ {
		for k := 0; h*h+k*k < tableSize; k++ {
			sum2[h*h+k*k] = true
		}
	}
	for h := 0; h*h < tableSize; h++ {
		for k := 0; h*h+h*k+k*k < tableSize; k++ {
			loesch[h*h+h*k+k*k] = true
		}
	}
}

// isSum3 reports whether n ≥ 0 is a sum of three squares (Legendre: n is
// not of the form 4^a(8b+7)).
func isSum3(n int) bool {
	if n == 0 {
		return true
	}
	for n%4 == 0 {
		n /= 4
	}
	return n%8 != 7
}

// cubicAllowed reports whether a cubic lattice of the centring has a
// reflection with h²+k²+l² = n.
func cubicAllowed(c cell.Centring, n int) bool {
	if n <= 0 {
		return false
	}
	switch c {
	case cell.I:
		// h+k+l ≡ h²+k²+l² (mod 2).
		return n%2 == 0 && isSum3(n)
	case cell.F:
		// All odd: n ≡ 3 (mod 8); all even: n = 4n′.
		return n%8 == 3 || n%4 == 0 && isSum3(n/4)
	}
	return isSum3(n)
}

// planeAllowed reports whether a tetragonal or hexagonal-axes lattice has a
// reflection with in-plane index m (h²+k² or h²+hk+k²) and index l.
func planeAllowed(s cell.System, c cell.Centring, m, l int) bool {
	if m < 0 || m == 0 && l == 0 {
		return false
	}
	if m >= tableSize {
		return false
	}
	switch s {
	case cell.Tetragonal:
		if !sum2[m] {
			return false
		}
		if c == cell.I {
			// h+k ≡ h²+k² (mod 2).
			return (m+l)%2 == 0
		}
		return true
	default:
		if !loesch[m] {
			return false
		}
		if c == cell.R {
			// h²+hk+k² ≡ (k−h)² (mod 3), and −h+k+l ≡ 0 (mod 3); both
			// signs of k−h occur (swap h and k).
			if m%3 == 0 {
				return mod(l, 3) == 0
			}
			return mod(l, 3) != 0
		}
		return true
	}
}

func mod(a, m int) int {
	r := a % m
	if r < 0 {
		r += m
	}
	return r
}
