package density

import (
	"errors"
	"fmt"
	"math"

	"reticle/cell"
	"reticle/esd"
)

// Avogadro is the Avogadro constant in mol⁻¹, exact by the definition of
// the mole in the SI (2019).
const Avogadro = 6.02214076e23

// cm3PerA3 converts Å³ to cm³.
const cm3PerA3 = 1e-24

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
	Cell      cell.Cell
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
	// Sigmas is (ρ_measured − ρ_X-ray)/σ, σ combining both
	// uncertainties; zero without a measured density.
	Sigmas float64

	AtomsPerCell           float64
	CellMass, CellMassESD  float64 // Z·M, g/mol per cell
	FormulaUnitsPerLattice float64 // Z / lattice points
}

// A ZCandidate is an allowed Z with its discrepancy from the estimate.
type ZCandidate struct {
	Z      int
	Sigmas float64 // (ZEst − Z)/σ(ZEst)
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
		LatticePoints: in.Cell.Centring.LatticePoints(), Whole: true}
	if in.Measured != nil {
		if !(in.Measured.Density > 0) || in.Measured.ESD < 0 || math.IsInf(in.Measured.Density, 0) {
			return nil, fmt.Errorf("%w: measured density %g(%g) g/cm³", ErrInput, in.Measured.Density, in.Measured.ESD)
		}
		c.ZEst, c.ZEstESD = ZFromDensity(in.Measured.Density, in.Measured.ESD, m, um, v, in.VolumeESD)
		c.Candidates = candidates(c.ZEst, c.ZEstESD, c.LatticePoints)
		best := c.Candidates[0]
		c.Whole = c.ZEstESD > 0 && math.Abs(best.Sigmas) <= in.Limit
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
			c.Sigmas = (in.Measured.Density - c.Density) / s
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
		for j := i; j > 0 && math.Abs(out[j].Sigmas) < math.Abs(out[j-1].Sigmas); j-- {
			out[j], out[j-1] = out[j-1], out[j]
		}
	}
	return out
}

// ParseMeasured reads a measured density in g/cm³ with its esd in
// crystallographic notation, e.g. 2.16(1); without an esd, 1 % of the
// value is assumed (common practice for a pycnometer).
func ParseMeasured(s string) (Measured, error) {
	v, u, err := esd.Parse(s)
	if err != nil || !(v > 0) {
		return Measured{}, fmt.Errorf("%w: want a density in g/cm³ such as 2.16(1), got %q", ErrInput, s)
	}
	if u == 0 {
		u = 0.01 * v
	}
	return Measured{Density: v, ESD: u}, nil
}

// String prints the density with its esd.
func (m Measured) String() string { return esd.Format(m.Density, m.ESD) }

// MarshalText writes String.
func (m Measured) MarshalText() ([]byte, error) { return []byte(m.String()), nil }

// UnmarshalText reads a density as ParseMeasured does.
func (m *Measured) UnmarshalText(b []byte) error {
	v, err := ParseMeasured(string(b))
	if err != nil {
		return err
	}
	*m = v
	return nil
}
