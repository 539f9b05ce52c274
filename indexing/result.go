package indexing

import (
	"reticle/cell"

	"fmt"
	"math"
	"sort"
)

// Result is the outcome of Index.
type Result struct {
	Wavelength float64    // Å
	LinesUsed  int        // lines that searched and scored (the first N)
	Solutions  []Solution // best first
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
}

// solution builds the report of a fit over all lines.
func solution(f0 *fit, all, first []obs, o Options) Solution {
	// Refine once more with every line, not only the first N.
	f := &fit{trial: f0.trial}
	f.assignAll(all, o.Wavelength, 0)
	if !f.refine(all, o.Wavelength, f0.zeroFree) {
		f.trial = f0.trial
	} else {
		f.assignAll(all, o.Wavelength, 0)
		if !f.refine(all, o.Wavelength, f0.zeroFree) {
			f.trial = f0.trial
		}
	}
	c := f.cell()
	lambda := o.Wavelength
	ttmax := all[len(all)-1].tt + 1
	qmax := qOf(math.Min(ttmax, 179), f.zero, lambda)
	refs := cell.Reflections(c, qmax)
	if len(refs) > 2000 {
		refs = refs[:2000]
	}
	s := Solution{
		Cell: c, Volume: c.Volume(), Zero: f.zero,
		M: f0.m20, FigureLines: len(first), FN: f0.fn, FNMeanDiff: f0.fnDelta, FNPossible: f0.fnPoss,
		Calculated: refs,
	}
	for _, l := range all {
		q := qOf(l.tt, f.zero, lambda)
		w := dQ(l.tt, l.tol, lambda)
		il := IndexedLine{TwoTheta: l.tt, ESD: l.esd}
		if _, _, qc, ok := f.assign(q, w); ok {
			k := sort.Search(len(refs), func(i int) bool { return refs[i].Q >= qc*(1-1e-9) })
			if k < len(refs) {
				il.Indexed = true
				il.HKL = refs[k].HKL
				il.TwoThetaCalc = ttOf(refs[k].Q, lambda) + f.zero
				il.Delta = l.tt - il.TwoThetaCalc
			}
		}
		if il.Indexed {
			s.Indexed++
		} else {
			s.Unindexed++
		}
		s.Lines = append(s.Lines, il)
	}
	s.Conditions = conditions(s)
	return s
}

// conditions finds zone and row absences among the calculated lines that
// no observed line uses: a condition is reported when at least two lines
// of the class are indexed, all satisfy it, and a violating calculated line
// in the range is not observed.
func conditions(s Solution) []string {
	type rule struct {
		name  string
		class func(cell.HKL) bool
		ok    func(cell.HKL) bool
	}
	div := func(x, n int) bool { return mod(x, n) == 0 }
	rules := []rule{
		{"00l: l = 2n", func(v cell.HKL) bool { return v[0] == 0 && v[1] == 0 }, func(v cell.HKL) bool { return div(v[2], 2) }},
		{"00l: l = 4n", func(v cell.HKL) bool { return v[0] == 0 && v[1] == 0 }, func(v cell.HKL) bool { return div(v[2], 4) }},
		{"h00: h = 2n", func(v cell.HKL) bool { return v[1] == 0 && v[2] == 0 }, func(v cell.HKL) bool { return div(v[0], 2) }},
		{"hk0: h + k = 2n", func(v cell.HKL) bool { return v[2] == 0 }, func(v cell.HKL) bool { return div(v[0]+v[1], 2) }},
		{"h0l: l = 2n", func(v cell.HKL) bool { return v[1] == 0 && v[0] != 0 }, func(v cell.HKL) bool { return div(v[2], 2) }},
		{"hhl: l = 2n", func(v cell.HKL) bool { return v[0] == v[1] && v[0] != 0 }, func(v cell.HKL) bool { return div(v[2], 2) }},
	}
	observed := map[cell.HKL]bool{}
	for _, l := range s.Lines {
		for _, v := range l.HKL {
			observed[v] = true
		}
	}
	var out []string
	for _, r := range rules {
		members, violating, unobservedViolating := 0, 0, 0
		for _, ref := range s.Calculated {
			for _, v := range ref.HKL {
				if !r.class(v) {
					continue
				}
				seen := observed[v]
				if seen {
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
	return out
}

// String prints the solution's cell and figures on one line.
func (s Solution) String() string {
	return fmt.Sprintf("%s V=%.2f Å³ M%d=%.1f F%d=%.1f(%.4f, %d) indexed %d/%d zero %+.4f°",
		s.Cell, s.Volume, s.FigureLines, s.M, s.FigureLines, s.FN, s.FNMeanDiff, s.FNPossible, s.Indexed, s.Indexed+s.Unindexed, s.Zero)
}
