package indexing

import (
	"fmt"
	"math"
)

// A System is a crystal system.
type System int

// The crystal systems, in decreasing order of symmetry.
const (
	Cubic System = iota
	Hexagonal
	Rhombohedral
	Tetragonal
	Orthorhombic
)

var systemNames = [...]string{"cubic", "hexagonal", "rhombohedral", "tetragonal", "orthorhombic"}

func (s System) String() string {
	if s >= 0 && int(s) < len(systemNames) {
		return systemNames[s]
	}
	return fmt.Sprintf("System(%d)", int(s))
}

// rank orders systems by symmetry (larger is higher): the order of the
// holohedries' point groups, m-3m 48, 6/mmm 24, -3m 12, 4/mmm 16, mmm 8.
func (s System) rank() int {
	return [...]int{48, 24, 12, 16, 8}[s]
}

// ParseSystem reads a system name.
func ParseSystem(name string) (System, error) {
	for i, n := range systemNames {
		if n == name {
			return System(i), nil
		}
	}
	if name == "trigonal" {
		return Rhombohedral, nil
	}
	return 0, fmt.Errorf("indexing: unknown crystal system %q (want cubic, tetragonal, hexagonal, rhombohedral)", name)
}

// A Centring is a lattice centring symbol: 'P', 'I', 'F', 'R' or 'C'.
type Centring byte

// The centrings.
const (
	P Centring = 'P'
	I Centring = 'I'
	F Centring = 'F'
	R Centring = 'R' // rhombohedral, obverse setting on hexagonal axes
	C Centring = 'C'
)

func (c Centring) String() string { return string(c) }

// Allowed reports whether reflection hkl survives the centring's lattice
// extinctions (International Tables Vol. A, Table 2.2.13.1; common
// practice).
func Allowed(c Centring, h, k, l int) bool {
	switch c {
	case I:
		return (h+k+l)%2 == 0
	case F:
		return (h+k)%2 == 0 && (k+l)%2 == 0
	case R:
		return mod(-h+k+l, 3) == 0
	case C:
		return (h+k)%2 == 0
	}
	return true
}

func mod(a, m int) int {
	r := a % m
	if r < 0 {
		r += m
	}
	return r
}

// A Cell is a unit cell: edges in Å, angles in degrees. Rhombohedral cells
// are given on hexagonal axes (a = b, γ = 120°).
type Cell struct {
	System             System
	Centring           Centring
	A, B, C            float64 // Å
	Alpha, Beta, Gamma float64 // degrees
}

// NewCell returns the conventional cell of a system from its free
// parameters (a for cubic; a and c otherwise).
func NewCell(s System, cen Centring, a, c float64) Cell {
	switch s {
	case Cubic:
		return Cell{s, cen, a, a, a, 90, 90, 90}
	case Hexagonal, Rhombohedral:
		return Cell{s, cen, a, a, c, 90, 90, 120}
	}
	return Cell{s, cen, a, a, c, 90, 90, 90}
}

// Volume returns the cell volume in Å³ (general triclinic formula).
func (c Cell) Volume() float64 {
	ca, cb, cg := cosd(c.Alpha), cosd(c.Beta), cosd(c.Gamma)
	return c.A * c.B * c.C * math.Sqrt(1-ca*ca-cb*cb-cg*cg+2*ca*cb*cg)
}

func cosd(x float64) float64 {
	switch x {
	case 90:
		return 0
	case 120:
		return -0.5
	}
	return math.Cos(x * math.Pi / 180)
}

// Reciprocal returns the reciprocal metric tensor G* (Å⁻²), the inverse of
// the direct metric G_ij = a_i·a_j.
func (c Cell) Reciprocal() [3][3]float64 {
	ca, cb, cg := cosd(c.Alpha), cosd(c.Beta), cosd(c.Gamma)
	g := [3][3]float64{
		{c.A * c.A, c.A * c.B * cg, c.A * c.C * cb},
		{c.A * c.B * cg, c.B * c.B, c.B * c.C * ca},
		{c.A * c.C * cb, c.B * c.C * ca, c.C * c.C},
	}
	det := g[0][0]*(g[1][1]*g[2][2]-g[1][2]*g[2][1]) - g[0][1]*(g[1][0]*g[2][2]-g[1][2]*g[2][0]) + g[0][2]*(g[1][0]*g[2][1]-g[1][1]*g[2][0])
	var inv [3][3]float64
	for i := 0; i < 3; i++ {
		for j := 0; j < 3; j++ {
			inv[j][i] = (g[(i+1)%3][(j+1)%3]*g[(i+2)%3][(j+2)%3] - g[(i+1)%3][(j+2)%3]*g[(i+2)%3][(j+1)%3]) / det
		}
	}
	return inv
}

// Q returns 1/d² in Å⁻² of reflection hkl.
func (c Cell) Q(h, k, l int) float64 {
	fh, fk, fl := float64(h), float64(k), float64(l)
	switch c.System {
	case Cubic:
		return (fh*fh + fk*fk + fl*fl) / (c.A * c.A)
	case Tetragonal:
		return (fh*fh+fk*fk)/(c.A*c.A) + fl*fl/(c.C*c.C)
	case Hexagonal, Rhombohedral:
		return 4*(fh*fh+fh*fk+fk*fk)/(3*c.A*c.A) + fl*fl/(c.C*c.C)
	}
	g := c.Reciprocal()
	v := [3]float64{fh, fk, fl}
	var q float64
	for i := 0; i < 3; i++ {
		for j := 0; j < 3; j++ {
			q += v[i] * g[i][j] * v[j]
		}
	}
	return q
}

// D returns the d-spacing of hkl in Å.
func (c Cell) D(h, k, l int) float64 { return 1 / math.Sqrt(c.Q(h, k, l)) }

// params returns the linear parameters of Q: (1/a²) for cubic,
// (1/a², 1/c²) for tetragonal, (4/(3a²), 1/c²) for hexagonal axes.
func (c Cell) params() (pa, pc float64) {
	switch c.System {
	case Cubic:
		return 1 / (c.A * c.A), 0
	case Hexagonal, Rhombohedral:
		return 4 / (3 * c.A * c.A), 1 / (c.C * c.C)
	}
	return 1 / (c.A * c.A), 1 / (c.C * c.C)
}

// cellFromParams inverts params.
func cellFromParams(s System, cen Centring, pa, pc float64) Cell {
	switch s {
	case Cubic:
		a := 1 / math.Sqrt(pa)
		return NewCell(s, cen, a, a)
	case Hexagonal, Rhombohedral:
		return NewCell(s, cen, math.Sqrt(4/(3*pa)), 1/math.Sqrt(pc))
	}
	return NewCell(s, cen, 1/math.Sqrt(pa), 1/math.Sqrt(pc))
}

// String prints the cell as "tetragonal P a=4.5937 c=2.9587".
func (c Cell) String() string {
	switch c.System {
	case Cubic:
		return fmt.Sprintf("%s %s a=%.5f", c.System, c.Centring, c.A)
	case Tetragonal, Hexagonal, Rhombohedral:
		return fmt.Sprintf("%s %s a=%.5f c=%.5f", c.System, c.Centring, c.A, c.C)
	case Orthorhombic:
		return fmt.Sprintf("%s %s a=%.5f b=%.5f c=%.5f", c.System, c.Centring, c.A, c.B, c.C)
	}
	return fmt.Sprintf("%s %s a=%.5f b=%.5f c=%.5f α=%.3f β=%.3f γ=%.3f", c.System, c.Centring, c.A, c.B, c.C, c.Alpha, c.Beta, c.Gamma)
}
