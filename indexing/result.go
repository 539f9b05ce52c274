package indexing

import (
	"fmt"
	"strings"

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
	// beyond those of the centring, e.g. "00l: l = 2n".
	Conditions []string
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

// A condition is a reflection condition of International Tables for
// Crystallography Vol. A (Table 2.2.13.2 of the 2005 edition, from
// memory): the reflections of a class (a zone or a row of the
// reciprocal lattice) that a glide plane or a screw axis leaves, written
// as ITA writes them ("h0l: l = 2n").
type condition struct {
	name  string
	class func(cell.HKL) bool
	ok    func(cell.HKL) bool
}

// conditionRules are the zone and row conditions beyond the lattice's
// centring, on the cell's own axes: the glide planes of each zone
// (axial glides, the diagonal n and the d glide) and the screw axes of
// each row (2₁, 4₁ or 4₂, 3₁ or 6₂, 6₁).
var conditionRules = func() []condition {
	div := func(x, n int) bool { return mod(x, n) == 0 }
	type cls struct {
		name string
		in   func(cell.HKL) bool
	}
	zones := []struct {
		cls
		a, b int    // the free indices
		an   string // their letters
		bn   string
	}{
		{cls{"0kl", func(v cell.HKL) bool { return v[0] == 0 && v[1] != 0 && v[2] != 0 }}, 1, 2, "k", "l"},
		{cls{"h0l", func(v cell.HKL) bool { return v[1] == 0 && v[0] != 0 && v[2] != 0 }}, 0, 2, "h", "l"},
		{cls{"hk0", func(v cell.HKL) bool { return v[2] == 0 && v[0] != 0 && v[1] != 0 }}, 0, 1, "h", "k"},
	}
	var out []condition
	for _, z := range zones {
		a, b := z.a, z.b
		out = append(out,
			condition{z.name + ": " + z.an + " = 2n", z.in, func(v cell.HKL) bool { return div(v[a], 2) }},
			condition{z.name + ": " + z.bn + " = 2n", z.in, func(v cell.HKL) bool { return div(v[b], 2) }},
			condition{z.name + ": " + z.an + " + " + z.bn + " = 2n", z.in, func(v cell.HKL) bool { return div(v[a]+v[b], 2) }},
			condition{z.name + ": " + z.an + " + " + z.bn + " = 4n", z.in, func(v cell.HKL) bool { return div(v[a]+v[b], 4) }},
		)
	}
	rows := []struct {
		name, letter string
		axis         int
	}{{"h00", "h", 0}, {"0k0", "k", 1}, {"00l", "l", 2}}
	for _, r := range rows {
		ax := r.axis
		in := func(v cell.HKL) bool {
			for i := range v {
				if (i == ax) != (v[i] != 0) {
					return false
				}
			}
			return true
		}
		for _, n := range []int{2, 3, 4, 6} {
			out = append(out, condition{fmt.Sprintf("%s: %s = %dn", r.name, r.letter, n), in, func(v cell.HKL) bool { return div(v[ax], n) }})
		}
	}
	out = append(out, condition{"hhl: l = 2n", func(v cell.HKL) bool { return v[0] == v[1] && v[0] != 0 && v[2] != 0 }, func(v cell.HKL) bool { return div(v[2], 2) }})
	return out
}()

// conditions lists the reflection conditions (conditionRules) that the
// lines indexed show: at least two indexed lines of the class, all of
// them satisfying it, and a calculated line of the class in the range
// that would violate it, alone at its place, not observed. They are
// information on the space group, after the lattice; they never change
// it. A condition implied by a stronger one shown (l = 2n by l = 4n) is
// left out.
func conditions(s Solution) []string {
	observed := map[cell.HKL]bool{}
	for _, l := range s.Lines {
		for _, v := range l.HKL {
			observed[v] = true
		}
	}
	var out []string
	for _, r := range conditionRules {
		members, violating, unobservedViolating := 0, 0, 0
		for _, ref := range s.Calculated {
			for _, v := range ref.HKL {
				if !r.class(v) {
					continue
				}
				if observed[v] {
					members++
					if !r.ok(v) {
						violating++
					}
				} else if !r.ok(v) && len(ref.HKL) == 1 {
					unobservedViolating++
				}
			}
		}
		if members >= 2 && violating == 0 && unobservedViolating > 0 {
			out = append(out, r.name)
		}
	}
	// Leave out a condition of a row or zone that a stronger one of the
	// same class implies (2n by 4n or 6n; 3n by 6n).
	var kept []string
	for _, c := range out {
		implied := false
		for _, d := range out {
			if d != c && strings.HasPrefix(d, c[:strings.Index(c, "=")]) && impliedBy(c, d) {
				implied = true
			}
		}
		if !implied {
			kept = append(kept, c)
		}
	}
	return kept
}

// impliedBy reports whether the condition "… = an" is implied by "… =
// bn" of the same class and index combination (b a multiple of a).
func impliedBy(c, d string) bool {
	var a, b int
	if _, err := fmt.Sscanf(c[strings.LastIndex(c, "=")+1:], " %dn", &a); err != nil {
		return false
	}
	if _, err := fmt.Sscanf(d[strings.LastIndex(d, "=")+1:], " %dn", &b); err != nil {
		return false
	}
	return b > a && b%a == 0
}

// String prints the solution's cell and figures on one line.
func (s Solution) String() string {
	return fmt.Sprintf("%s V=%.2f Å³ M%d=%.1f F%d=%.1f(%.4f, %d) indexed %d/%d zero %+.4f°",
		s.Cell, s.Volume, s.FigureLines, s.M, s.FigureLines, s.FN, s.FNMeanDiff, s.FNPossible, s.Indexed, s.Indexed+s.Unindexed, s.Zero)
}
