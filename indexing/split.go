package indexing

import "reticle/cell"

// A split divides a cell's calculated lines in two by congruences of
// their indices: class A holds the hkl with v·hkl ≡ 0 (mod m) for every v
// of the split, class B the others. Class A is the reciprocal lattice of
// a cell of 1/m (one v) or 1/m² (two v) the volume, a sublattice of
// index 2, 3 or 4 of the reciprocal lattice (Kroll, Stöckelmann &
// Heinemann, J. Appl. Cryst. 44 (2011) 812, list such relations), so
// class B holds exactly the lines that demand the larger cell: the lines
// a centring removes (v = 111, m = 2: I; v = 110: C; 110 and 011: F; the
// obverse rhombohedral condition −h+k+l ≡ 0 mod 3), and those of a
// superstructure (v = 001: c doubled; m = 3: tripled; two v: doubled
// along two directions, or a centred cell doubled).
type split struct {
	v [][3]int
	m int
	// classA tells, by the residues of hkl (see residues), whether the
	// hkl are in class A: the congruences depend on hkl only modulo m,
	// and a lookup spares the evidence the products for every
	// calculated line and split.
	classA []bool
}

// residues returns the codes of hkl's residues modulo 4 and modulo 3,
// which index split.classA (modulo 2 follows from modulo 4).
func residues(h cell.HKL) (int, int) {
	return mod(h[0], 4)*16 + mod(h[1], 4)*4 + mod(h[2], 4), mod(h[0], 3)*9 + mod(h[1], 3)*3 + mod(h[2], 3)
}

// inClassA is in for the hkl of residue codes r4 and r3 (residues).
func (s split) inClassA(r4, r3 int) bool {
	if s.m == 3 {
		return s.classA[r3]
	}
	return s.classA[r4]
}

// withTable returns the split with its table classA filled.
func (s split) withTable() split {
	n, base := 64, 4
	if s.m == 3 {
		n, base = 27, 3
	}
	s.classA = make([]bool, n)
	for r := range n {
		s.classA[r] = s.in(cell.HKL{r / (base * base), r / base % base, r % base})
	}
	return s
}

// index returns the split's index: class A's cell has 1/index the
// volume.
func (s split) index() int {
	n := 1
	for range s.v {
		n *= s.m
	}
	return n
}

// in reports whether h is in class A.
func (s split) in(h cell.HKL) bool {
	for _, v := range s.v {
		if mod(h.Dot(v), s.m) != 0 {
			return false
		}
	}
	return true
}

// laueGenerators are integer matrices (acting on hkl as columns) that
// generate each system's Laue group on its conventional axes (hexagonal
// and rhombohedral on hexagonal axes, rhombohedral obverse).
var laueGenerators = map[cell.System][][3][3]int{
	cell.Cubic:        {{{0, 1, 0}, {0, 0, 1}, {1, 0, 0}}, {{0, 1, 0}, {1, 0, 0}, {0, 0, 1}}, {{-1, 0, 0}, {0, 1, 0}, {0, 0, 1}}},
	cell.Tetragonal:   {{{0, -1, 0}, {1, 0, 0}, {0, 0, 1}}, {{0, 1, 0}, {1, 0, 0}, {0, 0, 1}}, {{1, 0, 0}, {0, 1, 0}, {0, 0, -1}}},
	cell.Hexagonal:    {{{0, -1, 0}, {1, 1, 0}, {0, 0, 1}}, {{0, 1, 0}, {1, 0, 0}, {0, 0, 1}}, {{1, 0, 0}, {0, 1, 0}, {0, 0, -1}}},
	cell.Rhombohedral: {{{0, 1, 0}, {-1, -1, 0}, {0, 0, 1}}, {{0, 1, 0}, {1, 0, 0}, {0, 0, -1}}},
	cell.Orthorhombic: {{{-1, 0, 0}, {0, 1, 0}, {0, 0, 1}}, {{1, 0, 0}, {0, -1, 0}, {0, 0, 1}}, {{1, 0, 0}, {0, 1, 0}, {0, 0, -1}}},
	cell.Monoclinic:   {{{-1, 0, 0}, {0, 1, 0}, {0, 0, -1}}, {{1, 0, 0}, {0, -1, 0}, {0, 0, 1}}},
	cell.Triclinic:    nil,
}

// splitsOf lists, per system, the splits whose class A the system's Laue
// group maps onto itself: a split that symmetry-equivalent lines would
// fall on both sides of describes a lattice of lower symmetry, not a
// derivative of this one. The splits tried are every sublattice of
// index 2 (7), of index 3 (13) and of index 4 with two congruences
// mod 2 (7): one per subspace of (Z/m)³.
var splitsOf = func() map[cell.System][]split {
	var all []split
	seen := map[string]bool{}
	add := func(s split) {
		key := ""
		for h := 0; h < 2*s.m; h++ {
			for k := 0; k < 2*s.m; k++ {
				for l := 0; l < 2*s.m; l++ {
					if s.in(cell.HKL{h, k, l}) {
						key += "1"
					} else {
						key += "0"
					}
				}
			}
		}
		key += string(rune('0' + s.m))
		if !seen[key] {
			seen[key] = true
			all = append(all, s.withTable())
		}
	}
	vecs := func(m int) [][3]int {
		var out [][3]int
		for a := 0; a < m; a++ {
			for b := 0; b < m; b++ {
				for c := 0; c < m; c++ {
					if a != 0 || b != 0 || c != 0 {
						out = append(out, [3]int{a, b, c})
					}
				}
			}
		}
		return out
	}
	for _, m := range []int{2, 3} {
		for _, v := range vecs(m) {
			add(split{v: [][3]int{v}, m: m})
		}
	}
	for _, v := range vecs(4) {
		if v[0]%2 == 1 || v[1]%2 == 1 || v[2]%2 == 1 {
			add(split{v: [][3]int{v}, m: 4})
		}
	}
	v2 := vecs(2)
	for i, u := range v2 {
		for _, w := range v2[i+1:] {
			add(split{v: [][3]int{u, w}, m: 2})
		}
	}
	out := map[cell.System][]split{}
	for s, gens := range laueGenerators {
		for _, sp := range all {
			if invariant(sp, gens) {
				out[s] = append(out[s], sp)
			}
		}
	}
	return out
}()

// invariant reports whether each generator maps the split's class A
// onto itself, tested on one period of the congruences.
func invariant(sp split, gens [][3][3]int) bool {
	for _, r := range gens {
		for h := 0; h < sp.m; h++ {
			for k := 0; k < sp.m; k++ {
				for l := 0; l < sp.m; l++ {
					x := cell.HKL{h, k, l}
					var y cell.HKL
					for i := 0; i < 3; i++ {
						y[i] = r[i][0]*x[0] + r[i][1]*x[1] + r[i][2]*x[2]
					}
					if sp.in(x) != sp.in(y) {
						return false
					}
				}
			}
		}
	}
	return true
}
