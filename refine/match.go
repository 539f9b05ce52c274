package refine

import (
	"context"
	"fmt"
	"math"
	"sort"

	"reticle/indexing"
)

// Matching controls how RefineLines assigns observed lines to a cell.
type Matching struct {
	// Tolerance is the smallest 2θ window, degrees, within which a
	// calculated line claims an observed one; the window is otherwise
	// three esds of the line. Zero means 0.03°.
	Tolerance float64
	// Exclude lists 2θ positions, degrees, of lines to leave out of the
	// fit; each excludes the observed line within 0.02° of it.
	Exclude []float64
}

// startSlack is the extra window, degrees 2θ, of the first assignment
// passes: a typed starting cell must predict its lines within about this.
var startSlack = []float64{0.15, 0.08, 0.04}

// RefineLines assigns observed lines to the calculated lines of a known
// cell (and of the internal standard, when Options.Standard is set) and
// refines it, re-assigning until the assignment is stable. Lines that
// match no calculated line are returned in Result.Unmatched; lines that
// match both phases are excluded as overlapped.
func RefineLines(ctx context.Context, cell indexing.Cell, lines []indexing.Line, opt Options, m Matching) (*Result, error) {
	if m.Tolerance == 0 {
		m.Tolerance = 0.03
	}
	if len(lines) == 0 {
		return nil, fmt.Errorf("refine: no lines: %w", ErrTooFew)
	}
	sorted := append([]indexing.Line(nil), lines...)
	sort.Slice(sorted, func(i, j int) bool { return sorted[i].TwoTheta < sorted[j].TwoTheta })
	cur := cell
	var zero, disp float64
	o := opt.withDefaults()
	var prev []Observation
	var res *Result
	for pass := 0; pass < 12; pass++ {
		slack := 0.0
		if pass < len(startSlack) {
			slack = startSlack[pass]
		}
		obs, unmatched, overlapped := assign(cur, sorted, o, zero, disp, m, slack)
		if pass >= len(startSlack) && sameAssignment(obs, prev) {
			res.Unmatched, res.Overlapped = unmatched, overlapped
			return res, nil
		}
		r, err := Refine(ctx, cell, obs, opt)
		if err != nil {
			return nil, err
		}
		res, prev = r, obs
		res.Unmatched, res.Overlapped = unmatched, overlapped
		cur, zero, disp = withCentring(r.Cell, cell.Centring), r.Zero, r.Displacement
	}
	res.Warnings = append(res.Warnings, "line assignment did not settle in 12 passes")
	return res, nil
}

func withCentring(c indexing.Cell, cen indexing.Centring) indexing.Cell {
	c.Centring = cen
	return c
}

func sameAssignment(a, b []Observation) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i].TwoTheta != b[i].TwoTheta || a[i].Standard != b[i].Standard || a[i].Excluded != b[i].Excluded || a[i].HKL[0] != b[i].HKL[0] {
			return false
		}
	}
	return true
}

// A calcLine is a calculated line at its corrected position.
type calcLine struct {
	tt  float64
	hkl []indexing.HKL
}

// calcLines lists a cell's calculated lines below ttmax, by position.
func calcLines(c indexing.Cell, o Options, zero, disp, ttmax float64) []calcLine {
	s := math.Sin(math.Min(ttmax, 179.9) * deg / 2)
	qmax := 4 * s * s / (o.Wavelength * o.Wavelength)
	p := cellValues(c)
	var out []calcLine
	for _, r := range indexing.Reflections(c, qmax) {
		pt := eval(c.System, p, r.HKL[0], o.Wavelength, zero, disp, o.Radius)
		if pt.inside {
			out = append(out, calcLine{pt.tt, r.HKL})
		}
	}
	sort.Slice(out, func(i, j int) bool { return out[i].tt < out[j].tt })
	return out
}

// nearestCalc returns the calculated line nearest to tt and its distance.
func nearestCalc(cl []calcLine, tt float64) (calcLine, float64) {
	k := sort.Search(len(cl), func(i int) bool { return cl[i].tt >= tt })
	best, bd := calcLine{}, math.Inf(1)
	for _, j := range []int{k - 1, k} {
		if j >= 0 && j < len(cl) {
			if d := math.Abs(cl[j].tt - tt); d < bd {
				best, bd = cl[j], d
			}
		}
	}
	return best, bd
}

// assign matches the lines to the cell's (and the standard's) calculated
// lines with windows widened by slack degrees.
func assign(c indexing.Cell, lines []indexing.Line, o Options, zero, disp float64, m Matching, slack float64) (obs []Observation, unmatched, overlapped []indexing.Line) {
	ttmax := lines[len(lines)-1].TwoTheta + 2
	own := calcLines(c, o, zero, disp, ttmax)
	var std []calcLine
	if o.Standard != nil {
		std = calcLines(o.Standard.Cell, o, zero, disp, ttmax)
	}
	for _, l := range lines {
		w := math.Max(m.Tolerance, 3*l.ESD) + slack
		a, da := nearestCalc(own, l.TwoTheta)
		b, db := nearestCalc(std, l.TwoTheta)
		okA, okB := da <= w, db <= w
		switch {
		case okA && okB:
			overlapped = append(overlapped, l)
			continue
		case !okA && !okB:
			unmatched = append(unmatched, l)
			continue
		}
		ob := Observation{TwoTheta: l.TwoTheta, ESD: l.ESD, HKL: a.hkl}
		if okB {
			ob.HKL, ob.Standard = b.hkl, true
		}
		for _, x := range m.Exclude {
			if math.Abs(x-l.TwoTheta) <= 0.02 {
				ob.Excluded = true
			}
		}
		obs = append(obs, ob)
	}
	return obs, unmatched, overlapped
}
