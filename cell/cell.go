package cell

import (
	"errors"
	"fmt"
	"math"
)

const deg = math.Pi / 180

// A Cell is a unit cell: the lattice's system and centring, edges in Å and
// angles in degrees, in the setting its system implies (see the package
// doc). Rhombohedral cells are on hexagonal axes.
type Cell struct {
	System             System
	Centring           Centring
	A, B, C            float64 // Å
	Alpha, Beta, Gamma float64 // degrees
}

// ErrCell is wrapped by the errors of cells that cannot be used.
var ErrCell = errors.New("not a usable cell")

// New returns the cell of a system from its free parameters in the order
// System.FreeNames gives them (a; a, c; a, b, c; a, b, c, β; a, b, c, α,
// β, γ), the others set by the system.
func New(s System, cen Centring, free ...float64) (Cell, error) {
	names := s.FreeNames()
	if !s.Valid() || len(free) != len(names) {
		return Cell{}, fmt.Errorf("%w: a %s cell has %d free parameters (%v), got %d", ErrCell, s, len(names), names, len(free))
	}
	c := Cell{System: s, Centring: cen}
	c.setFree(free)
	return c, c.Check()
}

// Must is New for parameters known to be valid; it panics otherwise.
func Must(s System, cen Centring, free ...float64) Cell {
	c, err := New(s, cen, free...)
	if err != nil {
		panic(err)
	}
	return c
}

// setFree sets the parameters from the free ones.
func (c *Cell) setFree(p []float64) {
	switch c.System {
	case Cubic:
		*c = Cell{c.System, c.Centring, p[0], p[0], p[0], 90, 90, 90}
	case Tetragonal:
		*c = Cell{c.System, c.Centring, p[0], p[0], p[1], 90, 90, 90}
	case Hexagonal, Rhombohedral:
		*c = Cell{c.System, c.Centring, p[0], p[0], p[1], 90, 90, 120}
	case Orthorhombic:
		*c = Cell{c.System, c.Centring, p[0], p[1], p[2], 90, 90, 90}
	case Monoclinic:
		*c = Cell{c.System, c.Centring, p[0], p[1], p[2], 90, p[3], 90}
	default:
		*c = Cell{c.System, c.Centring, p[0], p[1], p[2], p[3], p[4], p[5]}
	}
}

// Free returns the free parameters of the cell's system, in the order of
// System.FreeNames.
func (c Cell) Free() []float64 {
	switch c.System {
	case Cubic:
		return []float64{c.A}
	case Tetragonal, Hexagonal, Rhombohedral:
		return []float64{c.A, c.C}
	case Orthorhombic:
		return []float64{c.A, c.B, c.C}
	case Monoclinic:
		return []float64{c.A, c.B, c.C, c.Beta}
	}
	return []float64{c.A, c.B, c.C, c.Alpha, c.Beta, c.Gamma}
}

// Params returns a, b, c, α, β, γ.
func (c Cell) Params() [6]float64 {
	return [6]float64{c.A, c.B, c.C, c.Alpha, c.Beta, c.Gamma}
}

// ParamNames names the six parameters in the order of Params.
var ParamNames = [6]string{"a", "b", "c", "alpha", "beta", "gamma"}

// Check reports whether the cell is usable: a known system, a centring
// its system allows, positive finite edges, angles that close a positive
// volume, and the relations of its system.
func (c Cell) Check() error {
	if !c.System.Valid() {
		return fmt.Errorf("%w: no crystal system", ErrCell)
	}
	ok := false
	for _, x := range c.System.settings() {
		ok = ok || x == c.Centring
	}
	if !ok {
		return fmt.Errorf("%w: a %s lattice is not %s-centred (want one of %s)", ErrCell, c.System, c.Centring, centringList(c.System.settings()))
	}
	for i, v := range c.Params() {
		if !(v > 0) || math.IsInf(v, 0) {
			return fmt.Errorf("%w: %s = %g", ErrCell, ParamNames[i], v)
		}
		if i >= 3 && !(v < 180) {
			return fmt.Errorf("%w: %s = %g°", ErrCell, ParamNames[i], v)
		}
	}
	if !(c.Volume() > 0) {
		return fmt.Errorf("%w: the angles α = %g°, β = %g°, γ = %g° close no volume", ErrCell, c.Alpha, c.Beta, c.Gamma)
	}
	var free Cell
	free.System, free.Centring = c.System, c.Centring
	free.setFree(c.Free())
	if free != c {
		return fmt.Errorf("%w: %v breaks the relations of the %s system", ErrCell, c.Params(), c.System)
	}
	return nil
}

func centringList(cs []Centring) string {
	s := ""
	for i, c := range cs {
		if i > 0 {
			s += ", "
		}
		s += c.String()
	}
	return s
}

// cosd and sind return exact values at the angles of the higher systems.
func cosd(x float64) float64 {
	switch x {
	case 90:
		return 0
	case 120:
		return -0.5
	case 60:
		return 0.5
	}
	return math.Cos(x * deg)
}

func sind(x float64) float64 {
	if x == 90 {
		return 1
	}
	return math.Sin(x * deg)
}

// A Matrix is a 3×3 matrix; metric tensors and changes of basis are
// Matrices.
type Matrix [3][3]float64

// Metric returns the direct metric tensor G_ij = a_i·a_j in Å².
func (c Cell) Metric() Matrix {
	ca, cb, cg := cosd(c.Alpha), cosd(c.Beta), cosd(c.Gamma)
	return Matrix{
		{c.A * c.A, c.A * c.B * cg, c.A * c.C * cb},
		{c.A * c.B * cg, c.B * c.B, c.B * c.C * ca},
		{c.A * c.C * cb, c.B * c.C * ca, c.C * c.C},
	}
}

// Reciprocal returns the reciprocal metric tensor G* = G⁻¹ in Å⁻².
func (c Cell) Reciprocal() Matrix {
	g, _ := c.Metric().Inverse()
	return g
}

// QForm returns the coefficients of Q(hkl) (see the package doc).
func (c Cell) QForm() QForm {
	g := c.Reciprocal()
	return QForm{g[0][0], g[1][1], g[2][2], 2 * g[1][2], 2 * g[0][2], 2 * g[0][1]}
}

// Q returns 1/d² in Å⁻² of reflection hkl.
func (c Cell) Q(h HKL) float64 {
	fh, fk, fl := float64(h[0]), float64(h[1]), float64(h[2])
	switch c.System {
	case Cubic:
		return (fh*fh + fk*fk + fl*fl) / (c.A * c.A)
	case Tetragonal:
		return (fh*fh+fk*fk)/(c.A*c.A) + fl*fl/(c.C*c.C)
	case Hexagonal, Rhombohedral:
		return 4*(fh*fh+fh*fk+fk*fk)/(3*c.A*c.A) + fl*fl/(c.C*c.C)
	case Orthorhombic:
		return fh*fh/(c.A*c.A) + fk*fk/(c.B*c.B) + fl*fl/(c.C*c.C)
	}
	return c.QForm().Q(h)
}

// D returns the d-spacing of hkl in Å.
func (c Cell) D(h HKL) float64 { return 1 / math.Sqrt(c.Q(h)) }

// Volume returns the cell volume in Å³:
// V = abc·√(1 − cos²α − cos²β − cos²γ + 2 cos α cos β cos γ).
func (c Cell) Volume() float64 {
	ca, cb, cg := cosd(c.Alpha), cosd(c.Beta), cosd(c.Gamma)
	d := 1 - ca*ca - cb*cb - cg*cg + 2*ca*cb*cg
	if !(d > 0) {
		return 0
	}
	return c.A * c.B * c.C * math.Sqrt(d)
}

// VolumeGradient returns ∂V/∂(a, b, c, α, β, γ), in Å² and Å³ per degree:
// ∂V/∂a = V/a, and ∂V/∂α = abc·sin α·(cos α − cos β cos γ)/√D per radian
// with D the radicand of Volume (likewise for β and γ).
func (c Cell) VolumeGradient() [6]float64 {
	v := c.Volume()
	ca, cb, cg := cosd(c.Alpha), cosd(c.Beta), cosd(c.Gamma)
	abc := c.A * c.B * c.C
	root := v / abc
	ang := func(x, own, o1, o2 float64) float64 {
		return abc * sind(x) * (own - o1*o2) / root * deg
	}
	return [6]float64{v / c.A, v / c.B, v / c.C, ang(c.Alpha, ca, cb, cg), ang(c.Beta, cb, ca, cg), ang(c.Gamma, cg, ca, cb)}
}

// Lattice returns the cell's parameters as a triclinic description of the
// same lattice (system Triclinic, centring kept).
func (c Cell) Lattice() Cell {
	c.System = Triclinic
	return c
}

// FromMetric returns the cell of a direct metric tensor, with the system
// and centring given; the parameters are not symmetrised.
func FromMetric(s System, cen Centring, g Matrix) Cell {
	a, b, cc := math.Sqrt(g[0][0]), math.Sqrt(g[1][1]), math.Sqrt(g[2][2])
	angle := func(x, p, q float64) float64 {
		return math.Acos(math.Max(-1, math.Min(1, x/(p*q)))) / deg
	}
	return Cell{System: s, Centring: cen, A: a, B: b, C: cc,
		Alpha: angle(g[1][2], b, cc), Beta: angle(g[0][2], a, cc), Gamma: angle(g[0][1], a, b)}
}

// Symmetrize sets the parameters that the cell's system ties (b = a for a
// tetragonal cell, right angles for an orthorhombic one ...) from the free
// ones, averaging tied edges.
func (c Cell) Symmetrize() Cell {
	switch c.System {
	case Cubic:
		c.A = (c.A + c.B + c.C) / 3
	case Tetragonal, Hexagonal, Rhombohedral:
		c.A = (c.A + c.B) / 2
	}
	c.setFree(c.Free())
	return c
}
