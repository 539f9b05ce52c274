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
	// Plausible, when neither Z nor a measured density was given, lists
	// every allowed Z whose volume per atom is physically possible (see
	// PlausibleZ), with its X-ray density; Z is then the most plausible
	// one (ZGuessed set), which only a measured density can confirm.
	Plausible []PlausibleZ
	ZGuessed  bool

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
		c.Plausible = plausible(in.Formula, v, in.VolumeESD, m, um, c.LatticePoints)
		if len(c.Plausible) == 0 {
			return nil, fmt.Errorf("%w: no Z gives at least %g Å³ per atom in %.4g Å³ (the formula may be too large for the cell); give Z or a measured density", ErrInput, MinAtomVolume, v)
		}
		c.Z, c.ZGuessed = c.Plausible[0].Z, true
		for _, p := range c.Plausible {
			if p.Likeliest {
				c.Z = p.Z
			}
		}
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

// MinAtomVolume is the smallest volume per atom, Å³, that a Z may give:
// below the densest packing of atoms in a solid at ambient pressure
// (diamond, 5.67 Å³ per atom; beryllium oxide and boron carbide are near
// 6; values recalled from memory).
const MinAtomVolume = 5.0

// An atomVolumes is the typical volume per atom, Å³, of a kind of solid:
// a range and its most typical value.
type atomVolumes struct {
	kind           string
	lo, mid, hi    float64
	perNonHydrogen bool // counted per non-hydrogen atom
}

// The kinds of solid told apart by their formula, with volumes per atom
// that handbook cells give (values computed from cells recalled from
// memory; common practice): organic molecular crystals about 18 Å³ per
// non-hydrogen atom (the "18 Å³ rule", Kempster & Lipson, Acta Cryst.
// B28 (1972) 3674, from memory); oxides, fluorides and nitrides 7–16,
// most near 10 (corundum 8.5, periclase 9.3, spinel 9.4, rutile 10.4,
// quartz 12.6, fluorite 13.6); chlorides, bromides, iodides and
// chalcogenides 15–40, near 25 (sphalerite 19.7, rock salt 22.4, galena
// 26.6, sylvite 31); elements and alloys 10–45, near 17 (copper 11.8,
// tungsten 15.9, aluminium 16.6, silicon 20.0, magnesium 23.2, sodium
// 39).
var (
	organicVolumes    = atomVolumes{"organic", 14.4, 18, 21.6, true}
	lightAnionVolumes = atomVolumes{"oxide, fluoride or nitride", 7, 10, 16, false}
	heavyAnionVolumes = atomVolumes{"halide or chalcogenide", 15, 25, 40, false}
	metalVolumes      = atomVolumes{"element or alloy", 10, 17, 45, false}
)

// volumesOf returns the kind of solid a formula describes.
func volumesOf(f Formula) atomVolumes {
	has := func(els ...string) bool {
		for _, e := range els {
			if f.Counts[e] > 0 {
				return true
			}
		}
		return false
	}
	switch {
	case has("C") && has("H", "D"):
		return organicVolumes
	case has("Cl", "Br", "I", "S", "Se", "Te"):
		return heavyAnionVolumes
	case has("O", "F", "N"):
		return lightAnionVolumes
	}
	return metalVolumes
}

// A PlausibleZ is a number of formula units per cell that the cell can
// hold, with the X-ray density it implies.
type PlausibleZ struct {
	Z                   int
	AtomVolume          float64 // cell volume per atom, Å³ (per non-hydrogen atom for organic formulas)
	Density, DensityESD float64 // g/cm³
	// Kind is the kind of solid the formula was taken for; Typical is
	// set when AtomVolume lies in that kind's typical range, and
	// Likeliest marks the one nearest its most typical value.
	Kind               string
	Typical, Likeliest bool
}

// maxPlausible bounds the list of plausible Z: a huge cell with a small
// formula (a typing slip) would otherwise list hundreds; a list that long
// decides nothing.
const maxPlausible = 64

// plausible lists the multiples of the lattice points lp that give at
// least MinAtomVolume per atom, smallest Z first, marking the typical
// ones and the likeliest.
func plausible(f Formula, v, uv, m, um float64, lp int) []PlausibleZ {
	kind := volumesOf(f)
	atoms := f.Atoms()
	per := atoms // the atoms the volume is counted per
	if kind.perNonHydrogen {
		per = atoms - f.Counts["H"] - f.Counts["D"]
	}
	if !(atoms > 0) || !(per > 0) {
		return nil
	}
	var out []PlausibleZ
	best, bestDist := -1, math.Inf(1)
	for z := lp; ; z += lp {
		if v/(float64(z)*atoms) < MinAtomVolume || len(out) == maxPlausible {
			break
		}
		p := PlausibleZ{Z: z, AtomVolume: v / (float64(z) * per), Kind: kind.kind}
		p.Density, p.DensityESD = XRayDensity(float64(z), m, um, v, uv)
		p.Typical = p.AtomVolume >= kind.lo && p.AtomVolume <= kind.hi
		if d := math.Abs(math.Log(p.AtomVolume / kind.mid)); p.Typical && d < bestDist {
			best, bestDist = len(out), d
		}
		out = append(out, p)
	}
	if best >= 0 {
		out[best].Likeliest = true
	}
	return out
}
