package density

import (
	"errors"
	"fmt"
	"math"

	"reticle/indexing"
)

// Avogadro is the Avogadro constant in mol⁻¹, exact by the definition of
// the mole in the SI (2019).
const Avogadro = 6.02214076e23

// cm3PerA3 converts Å³ to cm³.
const cm3PerA3 = 1e-24

// LatticePoints returns the lattice points per conventional cell of a
// centring: P 1, I 2, C 2, F 4, R (hexagonal axes) 3 (common practice).
func LatticePoints(c indexing.Centring) int {
	switch c {
	case indexing.I, indexing.C:
		return 2
	case indexing.F:
		return 4
	case indexing.R:
		return 3
	}
	return 1
}

// VolumeESD returns the volume in Å³ of a cell and its uncertainty from
// the esds of its parameters taken as independent (use the refinement's
// volume esd, which includes correlations, when there is one). The
// general triclinic formula V = abc·√D, D = 1 − cos²α − cos²β − cos²γ +
// 2 cos α cos β cos γ, gives ∂V/∂a = V/a (edges equal by symmetry move
// together: 3V/a for cubic, 2V/a for a = b) and ∂V/∂α = abc·sin α·(cos α −
// cos β cos γ)/√D per radian.
func VolumeESD(c indexing.Cell, e indexing.CellESD) (float64, float64) {
	v := c.Volume()
	sq := func(x float64) float64 { return x * x }
	var s2 float64
	switch c.System {
	case indexing.Cubic:
		s2 = sq(3 * v / c.A * e.A)
	case indexing.Tetragonal, indexing.Hexagonal, indexing.Rhombohedral:
		s2 = sq(2*v/c.A*e.A) + sq(v/c.C*e.C)
	default:
		s2 = sq(v/c.A*e.A) + sq(v/c.B*e.B) + sq(v/c.C*e.C)
		r := math.Pi / 180
		ca, cb, cg := math.Cos(c.Alpha*r), math.Cos(c.Beta*r), math.Cos(c.Gamma*r)
		abc := c.A * c.B * c.C
		root := v / abc
		angle := func(deg, own, o1, o2, u float64) float64 {
			return sq(abc * math.Sin(deg*r) * (own - o1*o2) / root * r * u)
		}
		s2 += angle(c.Alpha, ca, cb, cg, e.Alpha) + angle(c.Beta, cb, ca, cg, e.Beta) + angle(c.Gamma, cg, ca, cb, e.Gamma)
	}
	return v, math.Sqrt(s2)
}

// XRayDensity returns ρ = Z·M/(N_A·V) in g/cm³ with its uncertainty, for
// Z formula units of molar mass m ± um g/mol in a cell of v ± uv Å³.
func XRayDensity(z, m, um, v, uv float64) (float64, float64) {
	rho := z * m / (Avogadro * v * cm3PerA3)
	return rho, rho * math.Hypot(um/m, uv/v)
}

// ZFromDensity returns Z_est = ρ·N_A·V/M and its uncertainty, for a
// measured density ρ ± uρ g/cm³.
func ZFromDensity(rho, urho, m, um, v, uv float64) (float64, float64) {
	z := rho * Avogadro * v * cm3PerA3 / m
	return z, z * math.Sqrt(math.Pow(urho/rho, 2)+math.Pow(um/m, 2)+math.Pow(uv/v, 2))
}

// Measured is a measured density (pycnometer, Archimedes) in g/cm³.
type Measured struct {
	Density, ESD float64
}

// Input describes a cell's contents problem: the cell with its volume
// uncertainty, the formula, and either a chosen Z or a measured density.
type Input struct {
	Cell      indexing.Cell
	VolumeESD float64 // Å³; zero when unknown
	Formula   Formula
	// Z, when positive, is the number of formula units per cell chosen by
	// the user.
	Z int
	// Measured, when set, is the measured density.
	Measured *Measured
	// Limit is the discrepancy in esds beyond which an estimated Z is
	// called not whole. Zero means 3.
	Limit float64
}

// Contents is the answer.
type Contents struct {
	Volume, VolumeESD       float64 // Å³
	MolarMass, MolarMassESD float64 // g/mol per formula unit
	NoStandardWeight        bool    // an element without a standard atomic weight
	LatticePoints           int

	// Z is the chosen or inferred number of formula units per cell.
	Z          int
	ZInferred  bool    // Z chosen as the allowed value nearest to ZEst
	ZEst       float64 // from the measured density, when given
	ZEstESD    float64
	Candidates []ZCandidate // allowed Z nearest to ZEst, best first
	// Whole is false when ZEst lies more than Limit esds from every
	// allowed Z: evidence against the cell (or the formula, or the
	// measurement).
	Whole bool

	Density, DensityESD float64 // X-ray density at Z, g/cm³
	// Discrepancy is (ρ_measured − ρ_X-ray)/σ, σ combining both
	// uncertainties; zero without a measured density.
	Discrepancy float64

	AtomsPerCell           float64
	CellMass, CellMassESD  float64 // Z·M, g/mol per cell
	FormulaUnitsPerLattice float64 // Z / lattice points
}

// A ZCandidate is an allowed Z with its discrepancy from the estimate.
type ZCandidate struct {
	Z     int
	Sigma float64 // (ZEst − Z)/σ(ZEst)
}

// ErrInput: an input that cannot give contents.
var ErrInput = errors.New("cell contents")

// Compute works out the contents of a cell.
func Compute(in Input) (*Contents, error) {
	if in.Limit == 0 {
		in.Limit = 3
	}
	if len(in.Formula.Counts) == 0 {
		return nil, fmt.Errorf("%w: no formula", ErrInput)
	}
	v := in.Cell.Volume()
	if !(v > 0) || math.IsInf(v, 0) {
		return nil, fmt.Errorf("%w: cell volume %g Å³", ErrInput, v)
	}
	m, um, nostd := in.Formula.MolarMass()
	c := &Contents{Volume: v, VolumeESD: in.VolumeESD, MolarMass: m, MolarMassESD: um, NoStandardWeight: nostd,
		LatticePoints: LatticePoints(in.Cell.Centring), Whole: true}
	if in.Measured != nil {
		if !(in.Measured.Density > 0) || in.Measured.ESD < 0 || math.IsInf(in.Measured.Density, 0) {
			return nil, fmt.Errorf("%w: measured density %g(%g) g/cm³", ErrInput, in.Measured.Density, in.Measured.ESD)
		}
		c.ZEst, c.ZEstESD = ZFromDensity(in.Measured.Density, in.Measured.ESD, m, um, v, in.VolumeESD)
		c.Candidates = candidates(c.ZEst, c.ZEstESD, c.LatticePoints)
		best := c.Candidates[0]
		c.Whole = c.ZEstESD > 0 && math.Abs(best.Sigma) <= in.Limit
		if in.Z <= 0 {
			c.Z, c.ZInferred = best.Z, true
		}
	}
	if in.Z > 0 {
		c.Z = in.Z
	}
	if c.Z <= 0 {
		return nil, fmt.Errorf("%w: give Z or a measured density", ErrInput)
	}
	z := float64(c.Z)
	c.Density, c.DensityESD = XRayDensity(z, m, um, v, in.VolumeESD)
	if in.Measured != nil {
		s := math.Hypot(in.Measured.ESD, c.DensityESD)
		if s > 0 {
			c.Discrepancy = (in.Measured.Density - c.Density) / s
		}
	}
	c.AtomsPerCell = z * in.Formula.Atoms()
	c.CellMass, c.CellMassESD = z*m, z*um
	c.FormulaUnitsPerLattice = z / float64(c.LatticePoints)
	return c, nil
}

// candidates lists the allowed Z (multiples of the lattice points) nearest
// to zest, best first: the two multiples around it, and the next ones out.
func candidates(zest, uz float64, lp int) []ZCandidate {
	k := int(math.Floor(zest / float64(lp)))
	var out []ZCandidate
	for _, kk := range []int{k, k + 1, k - 1, k + 2} {
		if kk < 1 {
			continue
		}
		z := kk * lp
		s := math.Inf(1)
		if uz > 0 {
			s = (zest - float64(z)) / uz
		} else if zest == float64(z) {
			s = 0
		}
		out = append(out, ZCandidate{z, s})
	}
	if len(out) == 0 {
		out = append(out, ZCandidate{lp, (zest - float64(lp)) / uz})
	}
	// Best first.
	for i := 1; i < len(out); i++ {
		for j := i; j > 0 && math.Abs(out[j].Sigma) < math.Abs(out[j-1].Sigma); j-- {
			out[j], out[j-1] = out[j-1], out[j]
		}
	}
	return out
}
