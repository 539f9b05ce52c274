package refine

import (
	"context"
	"fmt"
	"math"
	"sort"

	"reticle/cell"
)

// Matching controls how RefineLines assigns observed lines to a cell.
type Matching struct {
	// Tolerance is the smallest 2θ window, degrees, within which a
	// calculated line claims an observed one; the window is otherwise
	// three esds of the line. Zero means cell.MatchTolerance.
	Tolerance float64
}

// Window returns the half window, degrees 2θ, within which a calculated
// line claims an observed line of esd esd (cell.MatchWindow).
func (m Matching) Window(esd float64) float64 { return cell.MatchWindow(m.Tolerance, esd) }

// startSlack is the extra window, degrees 2θ, of the first assignment
// passes when an internal standard of known cell is sought: the
// instrument's offsets must be within about this.
var startSlack = []float64{0.15, 0.08, 0.04}

// startSpread is the relative d-spacing error, per first assignment pass,
// that a typed starting cell may have (a cell from the literature for a
// solid solution or another temperature is commonly within 1 %). It widens
// each line's window by 2·tan θ·ε radians of 2θ, so that high-angle lines
// are not assigned on a position the starting cell cannot predict.
var startSpread = []float64{0.01, 0.005, 0.0025, 0.001}

// A window is the extra width of an assignment pass: abs degrees 2θ plus
// a relative d-spacing error rel.
type window struct{ abs, rel float64 }

// at returns the extra width, degrees 2θ, at 2θ = tt degrees.
func (w window) at(tt float64) float64 {
	return w.abs + 2*math.Tan(tt*math.Pi/360)*w.rel*180/math.Pi
}

// loose reports whether the window widens the assignment at all.
func (w window) loose() bool { return w.abs > 0 || w.rel > 0 }

// RefineLines assigns observed lines to the calculated lines of a known
// cell (and of the internal standard, when Options.Standard is set) and
// refines it, re-assigning until the assignment is stable. The lines'
// HKL and Standard fields are set by the assignment; Excluded lines are
// assigned but left out of the fit. Lines that match no calculated line
// are returned in Result.Unmatched; lines that match both phases are left
// out as overlapped.
func RefineLines(ctx context.Context, c cell.Cell, lines []Observation, opt Options, m Matching) (*Result, error) {
	if m.Tolerance == 0 {
		m.Tolerance = cell.MatchTolerance
	}
	if len(lines) == 0 {
		return nil, fmt.Errorf("refine: no lines: %w", ErrTooFew)
	}
	if err := c.Check(); err != nil {
		return nil, fmt.Errorf("refine: %w: %w", ErrCell, err)
	}
	sorted := append([]Observation(nil), lines...)
	sort.SliceStable(sorted, func(i, j int) bool { return sorted[i].TwoTheta < sorted[j].TwoTheta })
	cur := c
	var v shifts
	o := opt.withDefaults()
	var prev []Observation
	var res *Result
	// The first passes assign only the lines whose widened window holds
	// one calculated line and refine the cell alone: corrections fitted to
	// a wrong early assignment can carry the cell to a false minimum.
	first := opt
	if first.Standard == nil {
		first.Corrections = None
	}
	need := len(c.System.FreeNames()) + 1
	for pass := 0; pass < 12+len(startSpread); pass++ {
		var win window
		if pass < len(startSpread) {
			win.rel = startSpread[pass]
		}
		obs, unmatched, overlapped := assign(cur, sorted, o, v, m, win)
		if win.loose() {
			if clear := unambiguous(obs); len(clear) >= need {
				obs = clear
			}
			r, err := Refine(ctx, c, obs, first)
			if err != nil {
				// A start too poor for the strict pass: go on from the
				// typed cell with the ordinary windows.
				continue
			}
			cur, v = r.Cell, r.shifts
			continue
		}
		if res != nil && sameAssignment(obs, prev) {
			res.Unmatched, res.Overlapped = unmatched, overlapped
			return res, nil
		}
		r, err := Refine(ctx, c, obs, opt)
		if err != nil {
			return nil, err
		}
		res, prev = r, obs
		res.Unmatched, res.Overlapped = unmatched, overlapped
		cur, v = r.Cell, r.shifts
	}
	res.Warnings = append(res.Warnings, "line assignment did not settle in 12 passes")
	return res, nil
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
	hkl []cell.HKL
}

// calcLines lists a cell's calculated lines below ttmax, by position.
func calcLines(c cell.Cell, o Options, v shifts, ttmax float64) []calcLine {
	qmax := cell.QOf(math.Min(ttmax, 179.9), o.Wavelength)
	m := newModel(c.System, o.Wavelength, o.Radius)
	r := start(c)
	var out []calcLine
	for _, ref := range cell.Reflections(c, qmax) {
		if pt := m.eval(r, ref.HKL[0], v); pt.inside {
			out = append(out, calcLine{pt.tt, ref.HKL})
		}
	}
	sort.Slice(out, func(i, j int) bool { return out[i].tt < out[j].tt })
	return out
}

// nearestCalc returns the calculated line nearest to tt, its distance,
// and how many calculated lines lie within w of tt.
func nearestCalc(cl []calcLine, tt, w float64) (calcLine, float64, int) {
	k := sort.Search(len(cl), func(i int) bool { return cl[i].tt >= tt })
	best, bd := calcLine{}, math.Inf(1)
	for _, j := range []int{k - 1, k} {
		if j >= 0 && j < len(cl) {
			if d := math.Abs(cl[j].tt - tt); d < bd {
				best, bd = cl[j], d
			}
		}
	}
	n := 0
	for j := sort.Search(len(cl), func(i int) bool { return cl[i].tt >= tt-w }); j < len(cl) && cl[j].tt <= tt+w; j++ {
		n++
	}
	return best, bd, n
}

// unambiguous returns the assigned lines whose window held a single
// calculated line.
func unambiguous(obs []Observation) []Observation {
	var out []Observation
	for _, o := range obs {
		if !o.ambiguous {
			out = append(out, o)
		}
	}
	return out
}

// assign matches the lines to the cell's (and the standard's) calculated
// lines with windows widened by win. A line that two calculated lines
// claim (of one phase, or one of each) is an unresolved blend whose
// position is neither's: it is left out as overlapped. In a widened pass
// such a line goes to the nearest calculated line and is marked
// ambiguous.
func assign(c cell.Cell, lines []Observation, o Options, v shifts, m Matching, win window) (obs []Observation, unmatched, overlapped []cell.Line) {
	ttmax := lines[len(lines)-1].TwoTheta + 2
	own := calcLines(c, o, v, ttmax)
	var std []calcLine
	if o.Standard != nil {
		std = calcLines(o.Standard.Cell, o, v, ttmax)
	}
	for _, l := range lines {
		w := m.Window(l.ESD) + win.at(l.TwoTheta)
		a, da, na := nearestCalc(own, l.TwoTheta, w)
		b, db, nb := nearestCalc(std, l.TwoTheta, w)
		okA, okB := da <= w, db <= w
		switch {
		case okA && okB && win.loose():
			if da <= db {
				okB = false
			} else {
				okA = false
			}
		case okA && okB, !win.loose() && na+nb > 1:
			overlapped = append(overlapped, l.Line)
			continue
		case !okA && !okB:
			unmatched = append(unmatched, l.Line)
			continue
		}
		ob := Observation{Line: l.Line, HKL: a.hkl, Excluded: l.Excluded, Width: l.Width, ambiguous: na+nb > 1}
		if okB {
			ob.HKL, ob.Standard = b.hkl, true
		}
		obs = append(obs, ob)
	}
	return obs, unmatched, overlapped
}

// MatchStandard finds an internal standard's lines among observed lines:
// the lines are assigned to the standard's calculated lines with the
// standard's cell held and the corrections of opt (a zero shift when
// none) fitted, with shrinking extra windows, until the assignment is
// stable. It returns the standard's lines, marked Standard and indexed,
// and the others. Fewer matched lines than corrections is an error.
func MatchStandard(ctx context.Context, lines []cell.Line, std Standard, opt Options) (matched []Observation, rest []cell.Line, err error) {
	o := opt.withDefaults()
	o.Standard = &std
	if o.Corrections == None {
		o.Corrections = Zero
	}
	obs := make([]Observation, len(lines))
	for i, l := range lines {
		obs[i] = Observation{Line: l}
	}
	sort.SliceStable(obs, func(i, j int) bool { return obs[i].TwoTheta < obs[j].TwoTheta })
	if len(obs) == 0 {
		return nil, nil, fmt.Errorf("refine: no lines to find the standard %s in: %w", std.Name, ErrTooFew)
	}
	plain := o
	plain.Standard = nil
	var v shifts
	var prev []Observation
	for pass := 0; pass < 12; pass++ {
		slack := 0.0
		if pass < len(startSlack) {
			slack = startSlack[pass]
		}
		found, unmatched, _ := assign(std.Cell, obs, plain, v, Matching{Tolerance: cell.MatchTolerance}, window{abs: slack})
		for i := range found {
			found[i].Standard = true
		}
		if pass >= len(startSlack) && sameAssignment(found, prev) {
			return found, unmatched, nil
		}
		idx := make([]int, len(found))
		for i := range idx {
			idx[i] = i
		}
		_, nv, _, err := fitStandard(ctx, o, found, idx)
		if err != nil {
			return nil, nil, fmt.Errorf("refine: the standard %s's lines were not found among the observed ones: %w", std.Name, err)
		}
		v, prev = nv, found
		rest = unmatched
	}
	return prev, rest, nil
}
