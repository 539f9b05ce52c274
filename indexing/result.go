package indexing

import (
	"fmt"

	"reticle/cell"
)

// Result is the outcome of Index.
type Result struct {
	Wavelength float64    // Å
	LinesUsed  int        // lines that searched and scored (the first N)
	Solutions  []Solution // best first
	// Searched lists the systems searched, highest first, and Stop says
	// why the search stopped where it did.
	Searched []cell.System
	Stop     string
	// Bounds are the limits of the search.
	Bounds   Bounds
	Warnings []string
	// Provisional marks a result of Reweigh: the earlier candidates
	// weighed again, to be replaced by a full search's.
	Provisional bool
}

// Bounds are the limits within which the search is exhaustive.
type Bounds struct {
	MaxEdge   float64 // Å
	MaxVolume float64 // Å³
	ZeroRange float64 // degrees 2θ
}

// An IndexedLine is one observed line under a solution.
type IndexedLine struct {
	TwoTheta     float64 // observed, degrees 2θ
	ESD          float64 // degrees 2θ
	Indexed      bool
	HKL          []cell.HKL // indices of the calculated line it matches (several when they coincide)
	TwoThetaCalc float64    // calculated, including the zero offset, degrees 2θ
	Delta        float64    // observed − calculated, degrees 2θ
}

// A Solution is one ranked cell.
type Solution struct {
	Cell   cell.Cell
	Volume float64 // Å³
	Zero   float64 // zero offset added to calculated angles, degrees 2θ
	// Displacement is the coefficient of a shift Displacement·cos θ,
	// degrees 2θ, added to calculated angles when the lines ask for one
	// (see cand.weigh); zero otherwise.
	Displacement float64

	// Probability is the chance that this is the lattice of the lines,
	// given that it is one of the candidates found or none (see
	// probabilities); LogEvidence is the natural log of the lines'
	// probability density under the cell (see evidence).
	Probability, LogEvidence float64
	// Demanding are the observed lines, degrees 2θ, that this lattice
	// explains and one with Index times its lattice points (a
	// derivative lattice: a supercell's subcell, or the lattice of a
	// centring of this cell) would not: the lines that demand this
	// lattice, when its extra lines are a weak class (see split.go).
	// Empty when none do.
	Demanding []float64
	Index     int
	// SecondPhase is the cell of a second phase that the evidence
	// weighed beside this one (see pairUp), when the lines it takes
	// made the cell likelier; SecondPhaseLines is about how many of
	// the observed lines it takes. Nil and zero otherwise.
	SecondPhase      *cell.Cell
	SecondPhaseLines int

	// M is de Wolff's figure of merit M_N over the first N lines (M20
	// when N = 20); FigureLines is that N.
	M           float64
	FigureLines int
	// FN is Smith & Snyder's F_N over the same lines, with the mean
	// |Δ2θ| in degrees and the number of possible lines it uses.
	FN         float64
	FNMeanDiff float64
	FNPossible int

	Indexed, Unindexed int // over all observed lines
	Lines              []IndexedLine
	// Calculated holds the calculated lines up to the last observed one
	// (for tick marks), at most 2,000.
	Calculated []cell.Reflection
	// Conditions lists reflection conditions that the indexed lines show
	// beyond those of the centring, e.g. "00l: l = 2n"; Extinction is
	// the extinction symbol they give (see extinctionSymbol), or "".
	Conditions []string
	Extinction string
	// Parameters is the number of refined parameters (free cell
	// parameters and the zero offset); ChiSquare the Σ(Δ2θ/σ)² of the
	// first lines it indexes, with DOF degrees of freedom.
	Parameters int
	ChiSquare  float64
	DOF        int
	// Reduced is the Niggli reduced cell of the lattice, and FromReduced
	// gives the reduced basis vectors (rows) in the basis of Cell.
	Reduced     cell.Cell
	FromReduced cell.Matrix
}

// String prints the solution's cell and figures on one line.
func (s Solution) String() string {
	return fmt.Sprintf("%s V=%.2f Å³ M%d=%.1f F%d=%.1f(%.4f, %d) indexed %d/%d zero %+.4f°",
		s.Cell, s.Volume, s.FigureLines, s.M, s.FigureLines, s.FN, s.FNMeanDiff, s.FNPossible, s.Indexed, s.Indexed+s.Unindexed, s.Zero)
}
