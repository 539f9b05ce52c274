package cell

import (
	"fmt"
	"strings"
)

// A System is a crystal system. The zero value is no system.
type System int

// The crystal systems, in decreasing order of lattice symmetry.
const (
	Cubic System = iota + 1
	Hexagonal
	Tetragonal
	Rhombohedral
	Orthorhombic
	Monoclinic
	Triclinic
)

// Systems lists every system, highest symmetry first.
var Systems = []System{Cubic, Hexagonal, Tetragonal, Rhombohedral, Orthorhombic, Monoclinic, Triclinic}

var systemNames = map[System]string{
	Cubic: "cubic", Hexagonal: "hexagonal", Tetragonal: "tetragonal", Rhombohedral: "rhombohedral",
	Orthorhombic: "orthorhombic", Monoclinic: "monoclinic", Triclinic: "triclinic",
}

func (s System) String() string {
	if n, ok := systemNames[s]; ok {
		return n
	}
	return fmt.Sprintf("System(%d)", int(s))
}

// Valid reports whether s is one of the seven systems.
func (s System) Valid() bool { _, ok := systemNames[s]; return ok }

// ParseSystem reads a system name as String prints it, ignoring case;
// "trigonal" names the rhombohedral lattice (hexagonal axes).
func ParseSystem(name string) (System, error) {
	n := strings.ToLower(strings.TrimSpace(name))
	for s, sn := range systemNames {
		if sn == n {
			return s, nil
		}
	}
	if n == "trigonal" {
		return Rhombohedral, nil
	}
	return 0, fmt.Errorf("unknown crystal system %q (want %s)", name, SystemNames())
}

// SystemNames lists the system names for messages.
func SystemNames() string {
	var w []string
	for _, s := range Systems {
		w = append(w, s.String())
	}
	return strings.Join(w, ", ")
}

// MarshalText writes the system's name.
func (s System) MarshalText() ([]byte, error) {
	if !s.Valid() {
		return nil, fmt.Errorf("cell: no crystal system %d", int(s))
	}
	return []byte(s.String()), nil
}

// UnmarshalText reads a system's name.
func (s *System) UnmarshalText(b []byte) error {
	v, err := ParseSystem(string(b))
	if err != nil {
		return err
	}
	*s = v
	return nil
}

// LaueOrder is the order of the system's holohedry (the Laue group of the
// lattice): cubic m-3m 48, hexagonal 6/mmm 24, tetragonal 4/mmm 16,
// rhombohedral -3m 12, orthorhombic mmm 8, monoclinic 2/m 4, triclinic
// -1 2. It orders lattices by symmetry.
func (s System) LaueOrder() int {
	return map[System]int{Cubic: 48, Hexagonal: 24, Tetragonal: 16, Rhombohedral: 12, Orthorhombic: 8, Monoclinic: 4, Triclinic: 2}[s]
}

// FreeNames names the free parameters of the system's conventional cell,
// in the order Free returns them.
func (s System) FreeNames() []string {
	switch s {
	case Cubic:
		return []string{"a"}
	case Tetragonal, Hexagonal, Rhombohedral:
		return []string{"a", "c"}
	case Orthorhombic:
		return []string{"a", "b", "c"}
	case Monoclinic:
		return []string{"a", "b", "c", "beta"}
	}
	return []string{"a", "b", "c", "alpha", "beta", "gamma"}
}

// Centrings lists the centrings of the system's Bravais lattices in their
// conventional setting.
func (s System) Centrings() []Centring {
	switch s {
	case Cubic:
		return []Centring{P, I, F}
	case Tetragonal:
		return []Centring{P, I}
	case Hexagonal, Triclinic:
		return []Centring{P}
	case Rhombohedral:
		return []Centring{R}
	case Orthorhombic:
		return []Centring{P, C, I, F}
	case Monoclinic:
		return []Centring{P, C}
	}
	return nil
}

// settings lists the centrings a system's cell may be given in: the
// conventional ones, and the other settings of a side-centred lattice.
func (s System) settings() []Centring {
	switch s {
	case Orthorhombic:
		return []Centring{P, A, B, C, I, F}
	case Monoclinic:
		return []Centring{P, A, C, I}
	}
	return s.Centrings()
}

// A Centring is a lattice centring symbol: P, A, B, C, I, F or R.
type Centring byte

// The centrings.
const (
	P Centring = 'P'
	A Centring = 'A'
	B Centring = 'B'
	C Centring = 'C'
	I Centring = 'I'
	F Centring = 'F'
	R Centring = 'R' // rhombohedral, obverse setting on hexagonal axes
)

func (c Centring) String() string { return string(c) }

// ParseCentring reads a centring letter, ignoring case.
func ParseCentring(s string) (Centring, error) {
	u := strings.ToUpper(strings.TrimSpace(s))
	if len(u) == 1 && strings.Contains("PABCIFR", u) {
		return Centring(u[0]), nil
	}
	return 0, fmt.Errorf("unknown centring %q (want P, A, B, C, I, F or R)", s)
}

// MarshalText writes the centring letter.
func (c Centring) MarshalText() ([]byte, error) {
	if _, err := ParseCentring(string(c)); err != nil {
		return nil, err
	}
	return []byte{byte(c)}, nil
}

// UnmarshalText reads a centring letter.
func (c *Centring) UnmarshalText(b []byte) error {
	v, err := ParseCentring(string(b))
	if err != nil {
		return err
	}
	*c = v
	return nil
}

// LatticePoints returns the lattice points per cell of a centring: P 1,
// A, B, C and I 2, R (hexagonal axes) 3, F 4 (common practice).
func (c Centring) LatticePoints() int {
	switch c {
	case A, B, C, I:
		return 2
	case R:
		return 3
	case F:
		return 4
	}
	return 1
}

// Allowed reports whether reflection hkl survives the centring's lattice
// extinctions (International Tables Vol. A, Table 2.2.13.1; common
// practice): A k+l = 2n, B h+l = 2n, C h+k = 2n, I h+k+l = 2n, F h, k, l
// all odd or all even, R (obverse) −h+k+l = 3n.
func (c Centring) Allowed(h HKL) bool {
	switch c {
	case A:
		return even(h[1] + h[2])
	case B:
		return even(h[0] + h[2])
	case C:
		return even(h[0] + h[1])
	case I:
		return even(h[0] + h[1] + h[2])
	case F:
		return even(h[0]+h[1]) && even(h[1]+h[2])
	case R:
		return mod(-h[0]+h[1]+h[2], 3) == 0
	}
	return true
}

func even(n int) bool { return n%2 == 0 }

func mod(a, m int) int {
	r := a % m
	if r < 0 {
		r += m
	}
	return r
}

// HKL is a triple of Miller indices.
type HKL [3]int

func (h HKL) String() string { return fmt.Sprintf("%d %d %d", h[0], h[1], h[2]) }

// Dot returns h·u. With u a direct-lattice vector [uvw], h lies in the
// zone of axis u when it is zero (Weiss's zone law, hu + kv + lw = 0).
func (h HKL) Dot(u HKL) int { return h[0]*u[0] + h[1]*u[1] + h[2]*u[2] }

// Cross returns h × k: the axis [uvw] (up to a common factor) of the
// zone that holds both, zero when they are parallel.
func (h HKL) Cross(k HKL) HKL {
	return HKL{h[1]*k[2] - h[2]*k[1], h[2]*k[0] - h[0]*k[2], h[0]*k[1] - h[1]*k[0]}
}
