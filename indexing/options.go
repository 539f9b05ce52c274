package indexing

import (
	"fmt"
	"math"

	"reticle/cell"
)

// Options control the search. The zero value of every field means its
// documented default.
type Options struct {
	// Wavelength in Å of the lines' radiation. Required.
	Wavelength float64
	// Systems to search; nil means all seven. The lower systems
	// (orthorhombic, monoclinic, triclinic) are searched only when no
	// higher one explains the lines acceptably, unless ExploreLower.
	Systems []cell.System
	// ExploreLower searches the lower systems even when a higher one
	// explains the lines.
	ExploreLower bool
	// Lines is how many of the first lines are used to search and to
	// compute the figures of merit. Zero means 20.
	Lines int
	// MaxImpurities is the number of those lines that may stay
	// unindexed (an unindexed line also lowers a cell's score by its
	// strength). Zero means DefaultImpurityShare of the lines, rounded
	// down, and besides them every line weaker than WeakLine of the
	// strongest; negative means none.
	MaxImpurities int
	// Tolerance is the smallest 2θ window, in degrees, within which a
	// calculated line indexes an observed one; the window is otherwise
	// three esds of the line. Zero means cell.MatchTolerance.
	Tolerance float64
	// ZeroRange is the largest zero-point error searched, degrees 2θ.
	// Zero means 0.1°; negative means the zero is fixed at 0.
	ZeroRange float64
	// MaxEdge is the longest cell edge considered, Å. Zero means 60 Å.
	MaxEdge float64
	// MaxVolume is the largest cell volume considered, Å³. Zero means
	// 20,000 Å³.
	MaxVolume float64
	// SeedLines is how many of the first lines, and of the first lines
	// stronger than a tenth of the strongest, seed candidate cells of the
	// higher systems. Zero means 5.
	SeedLines int
	// MaxM and MaxL bound the index vectors assigned to seed lines of
	// two-parameter systems: h²+k² (or h²+hk+k²) ≤ MaxM and |l| ≤ MaxL;
	// for cubic cells h²+k²+l² ≤ 2·MaxM+MaxL². Zero means 16 and 8.
	MaxM, MaxL int
	// MaxSolutions is how many ranked solutions are returned. Zero means
	// 10.
	MaxSolutions int
	// MinTwoTheta and MaxTwoTheta are the measured range, degrees 2θ:
	// where lines could have been seen. Zero means the range of the
	// lines.
	MinTwoTheta, MaxTwoTheta float64

	// zeroLimit is the largest zero offset the search reached beyond
	// ZeroRange (see harmonicZeros), degrees 2θ; zero for none.
	zeroLimit float64
	// widened marks the repeated search of Index on more lines.
	widened bool
	// pairing makes the ranking weigh second phases (see pairUp).
	pairing bool
}

// zeroBound returns the largest zero offset, degrees 2θ, a cell may
// refine to: the range searched and a grid step either side of it.
func (o Options) zeroBound() float64 {
	return math.Max(o.ZeroRange, o.zeroLimit) + 2*zeroStep
}

// Resolved returns the options with every zero field at its default.
func (o Options) Resolved() Options { return o.withDefaults() }

func (o Options) withDefaults() Options {
	if o.Systems == nil {
		o.Systems = []cell.System{cell.Cubic, cell.Tetragonal, cell.Hexagonal, cell.Rhombohedral, cell.Orthorhombic, cell.Monoclinic, cell.Triclinic}
	}
	setDefault(&o.Lines, 20)
	setDefault(&o.SeedLines, 5)
	setDefault(&o.MaxM, 16)
	setDefault(&o.MaxL, 8)
	setDefault(&o.MaxSolutions, 10)
	setDefault(&o.Tolerance, cell.MatchTolerance)
	setDefault(&o.MaxEdge, 60)
	setDefault(&o.MaxVolume, 20000)
	setDefaultOrNone(&o.ZeroRange, 0.1)
	return o
}

// setDefault replaces a zero value by its default.
func setDefault[T int | float64](v *T, d T) {
	if *v == 0 {
		*v = d
	}
}

// setDefaultOrNone replaces a zero value by its default and a negative
// one, which means "none", by zero.
func setDefaultOrNone[T int | float64](v *T, d T) {
	if *v < 0 {
		*v = 0
		return
	}
	setDefault(v, d)
}

// DefaultImpurityShare is the share of the searched lines that may stay
// unindexed when Options.MaxImpurities is zero. Measured patterns of
// real samples often carry a second phase, a stray K-beta line or a
// spurious peak among their first twenty lines; 35 % (7 of 20) lets
// such a cell be found, while the figures of merit and the ranking
// still charge each unindexed line by its strength. Common practice
// allows a quarter to a third.
const DefaultImpurityShare = 0.35

// WeakLine is the intensity, as a share of the strongest line's, below
// which a line may stay unindexed by default on top of the impurities
// that DefaultImpurityShare allows: a foreign phase of a few per cent,
// or an artefact of the instrument, shows as such weak lines, and they
// say little about the cell (common practice).
const WeakLine = 0.02

// checkWavelength reports a wavelength outside 0.1–5 Å, the range of
// laboratory anodes, synchrotron and neutron instruments.
func (o Options) checkWavelength() error {
	if !(o.Wavelength > 0.1 && o.Wavelength < 5) {
		return fmt.Errorf("indexing: wavelength %g Å outside 0.1–5 Å", o.Wavelength)
	}
	return nil
}

// wanted returns the systems to search as a set.
func (o Options) wanted() map[cell.System]bool {
	want := map[cell.System]bool{}
	for _, s := range o.Systems {
		want[s] = true
	}
	return want
}
