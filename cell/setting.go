package cell

import (
	"fmt"
	"math"
	"sort"
)

// A Tolerance bounds how far a lattice may depart from a system's metric
// and still be described in it: edges that the system makes equal may
// differ by Length (relative), angles that it fixes by Angle degrees.
type Tolerance struct {
	Length float64 // relative
	Angle  float64 // degrees
}

// exact is the tolerance of a cell that already has its system's metric:
// rounding only.
var exact = Tolerance{Length: 1e-7, Angle: 1e-5}

// A Setting is one description of a lattice in a system: the cell, the
// change of basis from the reduced cell, and how far the lattice departs
// from the system's metric.
type Setting struct {
	Cell Cell // symmetrised to the system
	// Transform gives the setting's basis vectors (rows) in the reduced
	// cell's basis.
	Transform Matrix
	// Misfit is the largest departure from the system's metric: the
	// relative difference of edges it makes equal, or the difference of
	// angles it fixes in radians, whichever is larger.
	Misfit float64
}

// vectors lists the lattice vectors with coefficients −2…2 in the basis
// of metric g, one of each ± pair, shortest first.
func vectors(g Matrix) [][3]float64 {
	var out [][3]float64
	for i := -2; i <= 2; i++ {
		for j := -2; j <= 2; j++ {
			for k := -2; k <= 2; k++ {
				v := [3]float64{float64(i), float64(j), float64(k)}
				first := i
				if first == 0 {
					first = j
				}
				if first == 0 {
					first = k
				}
				if first > 0 {
					out = append(out, v)
				}
			}
		}
	}
	sort.SliceStable(out, func(a, b int) bool { return dot(g, out[a], out[a]) < dot(g, out[b], out[b]) })
	return out
}

func dot(g Matrix, u, v [3]float64) float64 {
	var s float64
	for i := 0; i < 3; i++ {
		for j := 0; j < 3; j++ {
			s += u[i] * g[i][j] * v[j]
		}
	}
	return s
}

// centringOf identifies the centring of the cell with basis rows m (in a
// primitive basis): the lattice points inside it are the integer
// combinations of the rows of m⁻¹, modulo 1. It reports false for a
// centring that is not one of P, A, B, C, I, F, R (obverse).
func centringOf(m Matrix) (Centring, bool) {
	det := math.Round(math.Abs(m.Det()))
	inv, ok := m.Inverse()
	if !ok {
		return 0, false
	}
	n := int(det)
	if n < 1 || n > 4 {
		return 0, false // no centring has more than four lattice points
	}
	if n == 1 {
		return P, true // the origin is the one lattice point
	}
	// Lattice points modulo 1, in units of 1/6 (at most n³ = 64 tried).
	var buf [64][3]int
	seen := buf[:0]
	has1 := func(p [3]int) bool {
		for _, q := range seen {
			if q == p {
				return true
			}
		}
		return false
	}
	for a := 0; a < n; a++ {
		for b := 0; b < n; b++ {
			for c := 0; c < n; c++ {
				var p [3]int
				for k := 0; k < 3; k++ {
					x := float64(a)*inv[0][k] + float64(b)*inv[1][k] + float64(c)*inv[2][k]
					p[k] = mod(int(math.Round(x*6)), 6)
				}
				if !has1(p) {
					seen = append(seen, p)
				}
			}
		}
	}
	if len(seen) != n {
		return 0, false
	}
	has := func(p ...[3]int) bool {
		for _, q := range p {
			if !has1(q) {
				return false
			}
		}
		return len(p)+1 == len(seen)
	}
	switch n {
	case 1:
		return P, true
	case 2:
		switch {
		case has([3]int{0, 3, 3}):
			return A, true
		case has([3]int{3, 0, 3}):
			return B, true
		case has([3]int{3, 3, 0}):
			return C, true
		case has([3]int{3, 3, 3}):
			return I, true
		}
	case 3:
		if has([3]int{4, 2, 2}, [3]int{2, 4, 4}) {
			return R, true
		}
	case 4:
		if has([3]int{0, 3, 3}, [3]int{3, 0, 3}, [3]int{3, 3, 0}) {
			return F, true
		}
	}
	return 0, false
}

// Settings lists the descriptions of a reduced lattice in system s whose
// misfit is within tol, best (smallest misfit, then the conventional
// choice of the system) first. Candidate basis vectors are the lattice
// vectors with coefficients −2…2 in the reduced basis, which contain the
// conventional cell of every Bravais lattice of a Niggli reduced cell
// (common practice, as in searches for twofold axes).
func Settings(red Reduced, s System, tol Tolerance) []Setting {
	if s == Triclinic {
		return []Setting{{Cell: red.Cell, Transform: Identity}}
	}
	return NewSettingSearch(red).Settings(s, tol)
}

// A SettingSearch holds what Settings works out of a reduced lattice
// once, whatever the system: the candidate basis vectors, their lengths
// and the cosines of every pair. A lattice tried in several systems
// builds it once.
type SettingSearch struct {
	red     Reduced
	g       Matrix
	vs      [][3]float64
	len2    []float64
	cosines []float64 // of vectors i and j at i·len(vs) + j
}

// NewSettingSearch prepares the setting search of a reduced lattice.
func NewSettingSearch(red Reduced) *SettingSearch {
	g := red.G6.Metric()
	vs := vectors(g)
	len2 := make([]float64, len(vs))
	for i, v := range vs {
		len2[i] = dot(g, v, v)
	}
	// The cosines of every pair, worked out once: the searches test
	// each pair many times.
	n := len(vs)
	cosines := make([]float64, n*n)
	for i := range vs {
		for j := i; j < n; j++ {
			c := dot(g, vs[i], vs[j]) / math.Sqrt(len2[i]*len2[j])
			cosines[i*n+j], cosines[j*n+i] = c, c
		}
	}
	return &SettingSearch{red: red, g: g, vs: vs, len2: len2, cosines: cosines}
}

// Settings is the package's Settings of the search's lattice.
func (ss *SettingSearch) Settings(s System, tol Tolerance) []Setting {
	red, g, vs, len2, cosines := ss.red, ss.g, ss.vs, ss.len2, ss.cosines
	if s == Triclinic {
		return []Setting{{Cell: red.Cell, Transform: Identity}}
	}
	n := len(vs)
	cosTol := math.Sin(tol.Angle * deg) // |cos| of an angle within tol of 90°
	perp := func(i, j int) bool { return math.Abs(cosines[i*n+j]) <= cosTol }
	equal := func(i, j int) bool {
		return math.Abs(math.Sqrt(len2[i])-math.Sqrt(len2[j])) <= tol.Length*math.Sqrt(len2[i])
	}
	var out []Setting
	try := func(u, v, w [3]float64) {
		m := Matrix{u, v, w}
		det := m.Det()
		if det < 0.5 {
			return
		}
		cen, ok := centringOf(m)
		if !ok {
			return
		}
		st, ok := describe(s, cen, g.Transform(m), m, tol)
		if ok {
			out = append(out, st)
		}
	}
	neg := func(v [3]float64) [3]float64 { return [3]float64{-v[0], -v[1], -v[2]} }
	switch s {
	case Cubic, Tetragonal, Orthorhombic:
		for i := 0; i < n; i++ {
			for j := 0; j < n; j++ {
				if j == i || !perp(i, j) || s == Cubic && !equal(i, j) || s == Tetragonal && !equal(i, j) {
					continue
				}
				for k := 0; k < n; k++ {
					if k == i || k == j || !perp(i, k) || !perp(j, k) || s == Cubic && !equal(i, k) {
						continue
					}
					try(vs[i], vs[j], vs[k])
					try(vs[i], vs[j], neg(vs[k]))
				}
			}
		}
	case Hexagonal, Rhombohedral:
		cos120 := func(i, j int) bool { return math.Abs(cosines[i*n+j]+0.5) <= cosTol }
		for i := 0; i < n; i++ {
			for j := 0; j < n; j++ {
				if j == i || !equal(i, j) {
					continue
				}
				v := vs[j]
				if !cos120(i, j) {
					// The other sign of v makes 120° when this one
					// makes 60°.
					if math.Abs(cosines[i*n+j]-0.5) > cosTol {
						continue
					}
					v = neg(v)
				}
				for k := 0; k < n; k++ {
					if k == i || k == j || !perp(i, k) || !perp(j, k) {
						continue
					}
					try(vs[i], v, vs[k])
					try(vs[i], v, neg(vs[k]))
				}
			}
		}
	case Monoclinic:
		for j := 0; j < n; j++ { // the unique axis b
			for i := 0; i < n; i++ {
				if i == j || !perp(i, j) {
					continue
				}
				for k := i + 1; k < n; k++ {
					if k == j || !perp(j, k) {
						continue
					}
					for _, u := range [][3]float64{vs[i], neg(vs[i])} {
						for _, b := range [][3]float64{vs[j], neg(vs[j])} {
							try(u, b, vs[k])
							try(vs[k], b, u)
						}
					}
				}
			}
		}
	}
	sort.SliceStable(out, func(a, b int) bool { return preferSetting(out[a], out[b]) })
	return out
}

// describe symmetrises the metric gc (basis rows m) to system s with
// centring cen, and reports whether it is a conventional description of
// s within tol.
func describe(s System, cen Centring, gc, m Matrix, tol Tolerance) (Setting, bool) {
	c := FromMetric(s, cen, gc)
	switch s {
	case Orthorhombic:
		if cen == A || cen == B {
			return Setting{}, false // found again with the axes relabelled to C
		}
	case Monoclinic:
		if cen != P && cen != C {
			return Setting{}, false
		}
		if c.Beta < 90-1e-9 {
			return Setting{}, false // the other sign of a gives β ≥ 90°
		}
	}
	ok := false
	for _, x := range s.Centrings() {
		ok = ok || x == cen
	}
	if !ok {
		return Setting{}, false
	}
	misfit := 0.0
	rel := func(x, y float64) {
		misfit = math.Max(misfit, math.Abs(x-y)/math.Max(x, y))
	}
	ang := func(x, want float64) {
		misfit = math.Max(misfit, math.Abs(x-want)*deg)
	}
	switch s {
	case Cubic:
		rel(c.A, c.B)
		rel(c.A, c.C)
	case Tetragonal, Hexagonal, Rhombohedral:
		rel(c.A, c.B)
	}
	switch s {
	case Hexagonal, Rhombohedral:
		ang(c.Gamma, 120)
	default:
		ang(c.Gamma, 90)
	}
	ang(c.Alpha, 90)
	if s != Monoclinic {
		ang(c.Beta, 90)
	}
	if misfit > math.Max(tol.Length, tol.Angle*deg)+1e-12 {
		return Setting{}, false
	}
	return Setting{Cell: c.Symmetrize(), Transform: m, Misfit: misfit}, true
}

// preferSetting orders the settings of one system: smaller misfit (in
// steps of 1e-6), smaller volume (a centred description of a lattice that
// also has a primitive one is not conventional), then the system's
// conventional choice (orthorhombic a ≤ b ≤ c, or a ≤ b for C; monoclinic
// the shortest a + c, then β nearest 90°, then a ≤ c), then the basis
// matrix, so that the choice does not depend on the order of the search.
func preferSetting(x, y Setting) bool {
	if mx, my := math.Round(x.Misfit*1e6), math.Round(y.Misfit*1e6); mx != my {
		return mx < my
	}
	if vx, vy := x.Cell.Volume(), y.Cell.Volume(); math.Abs(vx-vy) > 1e-6*vx {
		return vx < vy
	}
	cx, cy := x.Cell, y.Cell
	key := func(c Cell) []float64 {
		switch c.System {
		case Orthorhombic:
			if c.Centring == C {
				return []float64{b2f(c.A > c.B*(1+1e-9)), c.C, c.A}
			}
			return []float64{b2f(c.A > c.B*(1+1e-9) || c.B > c.C*(1+1e-9)), c.A, c.B}
		case Monoclinic:
			return []float64{math.Round((c.A + c.C) * 1e6), math.Round(math.Abs(c.Beta-90) * 1e6), b2f(c.A > c.C*(1+1e-9))}
		}
		return nil
	}
	kx, ky := key(cx), key(cy)
	for i := range kx {
		if kx[i] != ky[i] {
			return kx[i] < ky[i]
		}
	}
	for i := 0; i < 3; i++ {
		for j := 0; j < 3; j++ {
			if x.Transform[i][j] != y.Transform[i][j] {
				return x.Transform[i][j] > y.Transform[i][j]
			}
		}
	}
	return false
}

func b2f(b bool) float64 {
	if b {
		return 1
	}
	return 0
}

// Conventional returns the cell in the conventional setting of its system
// (IUCr conventions, International Tables Vol. A chapter 9; where they
// leave a choice, this package's rule in preferSetting): cubic,
// tetragonal, hexagonal and rhombohedral cells as they are (rhombohedral
// on hexagonal axes, obverse); orthorhombic with a ≤ b ≤ c, or C-centred
// with a ≤ b; monoclinic with b unique, β ≥ 90°, P or C centred, the
// shortest a and c; triclinic the Niggli reduced cell. The matrix gives
// the new basis vectors (rows) in the basis of c.
func Conventional(c Cell) (Cell, Matrix, error) {
	if err := c.Check(); err != nil {
		return c, Identity, err
	}
	switch c.System {
	case Cubic, Tetragonal, Hexagonal, Rhombohedral:
		return c, Identity, nil
	}
	red, err := Reduce(c)
	if err != nil {
		return c, Identity, err
	}
	st := Settings(red, c.System, exact)
	if len(st) == 0 {
		return c, Identity, fmt.Errorf("%w: no %s setting of %v found", ErrCell, c.System, c)
	}
	best := st[0]
	out := best.Cell
	out.System = c.System
	return out, best.Transform.Mul(red.Transform), nil
}
