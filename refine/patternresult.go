package refine

import (
	"fmt"
	"math"
	"sort"

	"reticle/cell"
)

// reported is one reported parameter: its value and its gradient with
// respect to the shared parameters (the rows of the transformation of
// their covariance).
type reported struct {
	Param
	phase int // −1: shared
	grad  map[int]float64
}

// maxMoveShare is the relative change of a phase's volume beyond which
// the fit is taken to have left the start's minimum: three times the 1 %
// in d within which a start must lie.
const maxMoveShare = 0.03

// result turns the solution into a PatternResult, with the covariance
// (JᵀJ)⁻¹ scaled by χ²_red when that exceeds 1.
func (pf *patternFit) result(s *patternSolution, iter int, opt PatternOptions) (*PatternResult, error) {
	k := len(s.p)
	n := len(pf.x)
	dof := n - k
	out := &PatternResult{Corrections: opt.Corrections & (Zero | Displacement), Calc: s.calc, Background: s.bg,
		Points: n, Parameters: k, Iterations: iter}
	// Agreement factors (pdCIF meanings).
	var sa, sy, swy2 float64
	for i := range pf.y {
		sa += math.Abs(pf.y[i] - s.calc[i])
		sy += math.Abs(pf.y[i])
		w := 1 / (pf.sig[i] * pf.sig[i])
		swy2 += w * pf.y[i] * pf.y[i]
	}
	out.Chi2 = s.chi2 / float64(dof)
	out.GoF = math.Sqrt(out.Chi2)
	out.Rp = sa / sy
	out.Rwp = math.Sqrt(s.chi2 / swy2)
	out.Rexp = math.Sqrt(float64(dof) / swy2)
	// The covariance; a matrix singular to rounding gets a ridge of
	// 10⁻⁹ of its (unit) diagonal, which leaves determined parameters'
	// esds as they are and makes undetermined ones' huge.
	f, err := s.ne.factorize(0, nil)
	if err != nil {
		if f, err = s.ne.factorize(1e-9, nil); err != nil {
			return nil, fmt.Errorf("%w: the parameters are not determined by the points (singular normal matrix)", ErrPattern)
		}
		out.Warnings = append(out.Warnings, "the normal matrix is singular to rounding: some parameters are not determined by the points (their esds are very large)")
	}
	cg, vi, err := f.covariance()
	if err != nil {
		return nil, fmt.Errorf("%w: the parameters are not determined by the points: %w", ErrPattern, err)
	}
	scale := 1.0
	if out.Chi2 > 1 {
		scale, out.Scaled = out.Chi2, true
	}
	cov := func(a, b int) float64 { return cg.At(a, b) * scale }
	var reps []reported
	ls := pf.lines(s.p) // every reflection's lines at the solution
	for i, ph := range pf.phases {
		pp, rs, err := pf.phaseResult(i, ph, s, ls, cov, vi, scale)
		if err != nil {
			return nil, err
		}
		out.Phases = append(out.Phases, pp)
		reps = append(reps, rs...)
	}
	for j, ci := range pf.corr {
		reps = append(reps, reported{Param: Param{Name: corrNames[ci].name, Unit: corrNames[ci].unit, Value: s.p[j]}, phase: -1, grad: map[int]float64{j: 1}})
	}
	for j := 0; j < pf.nA; j++ {
		reps = append(reps, reported{Param: Param{Name: fmt.Sprintf("asymmetry %d", j), Value: s.p[pf.iA+j]}, phase: -1, grad: map[int]float64{pf.iA + j: 1}})
	}
	// Every reported parameter's variance and the correlations.
	rc := func(x, y reported) float64 {
		var v float64
		for a, ga := range x.grad {
			for b, gb := range y.grad {
				v += ga * cov(a, b) * gb
			}
		}
		return v
	}
	for i := range reps {
		reps[i].ESD = math.Sqrt(math.Max(rc(reps[i], reps[i]), 0))
	}
	for _, r := range reps {
		if r.phase < 0 {
			out.Params = append(out.Params, r.Param)
		} else {
			out.Phases[r.phase].Params = append(out.Phases[r.phase].Params, r.Param)
		}
	}
	out.Correlations = correlations(reps, rc, len(pf.phases) > 1)
	// Warnings.
	for i, ph := range out.Phases {
		zero := 0
		for _, r := range ph.Reflections {
			if r.Intensity == 0 {
				zero++
			}
		}
		// What the phase's lines add to the fit: the rise of χ² were
		// they taken away with the rest held, Σ (c_φ² + 2c_φ(y − c))/σ².
		// Were the phase absent, that rise would be a χ² with as many
		// degrees of freedom as the phase has parameters (Wilks 1938);
		// a phase is seen when its rise exceeds that by three of its
		// standard deviations (χ² scaled by χ²_red when above 1).
		var rise float64
		for j, cp := range ph.Calc {
			rise += (cp*cp + 2*cp*(pf.y[j]-s.calc[j])) / (pf.sig[j] * pf.sig[j])
		}
		np := float64(len(ph.Reflections) + len(ph.Params))
		seen := rise > scale*(np+3*math.Sqrt(2*np))
		name := ""
		if len(out.Phases) > 1 {
			name = fmt.Sprintf("phase %d: ", i+1)
		}
		switch {
		case len(ph.Reflections) > 0 && zero == len(ph.Reflections):
			return nil, fmt.Errorf("%w: %severy intensity went to zero: the cell %s describes no line of the pattern", ErrPattern, name, ph.Cell)
		case !seen:
			out.Warnings = append(out.Warnings, fmt.Sprintf("%sits lines improve the fit no more than noise would (Δχ² %.0f for %.0f parameters): the pattern does not show that the cell %s is there", name, rise/scale, np, ph.Cell))
		case zero > 0:
			out.Warnings = append(out.Warnings, fmt.Sprintf("%s%d of %d reflections fitted to zero intensity (held at the bound; their esds are not meaningful)", name, zero, len(ph.Reflections)))
		}
	}
	if pf.gaussianBelowFloor(s.p, ls) {
		out.Warnings = append(out.Warnings, "the Gaussian width law U tan²θ + V tan θ + W is below zero at every line: the lines' Gaussian width sits at its floor (the scan's step) and U, V and W are not determined by the points")
	}
	if out.Rwp > 2*out.Rexp {
		// Common practice: a fit whose Rwp exceeds twice the counting
		// statistics' Rexp misses part of the pattern.
		out.Warnings = append(out.Warnings, fmt.Sprintf("Rwp is %.1f times Rexp: the cells or the profile model leave part of the pattern unexplained (see the difference curve)", out.Rwp/out.Rexp))
	}
	return out, nil
}

// phaseResult returns phase i's cell and reflections, and its reported
// parameters (their esds and place in the result the caller's).
func (pf *patternFit) phaseResult(i int, ph phaseFit, s *patternSolution, ls []line, cov func(a, b int) float64, vi []float64, scale float64) (PatternPhase, []reported, error) {
	var out PatternPhase
	c, err := ph.m1.cellOf(s.p[ph.iR:ph.iR+ph.nr], ph.cen)
	if err != nil {
		return out, nil, fmt.Errorf("%w: phase %d: the refined cell is not a lattice: %w", ErrPattern, i+1, err)
	}
	// The cell's covariance through the reciprocal coefficients.
	j6 := c.ReciprocalToDirect()
	var c6 cell.Covariance
	for a := 0; a < 6; a++ {
		for b := 0; b < 6; b++ {
			var v float64
			for x := 0; x < ph.nr; x++ {
				for y := 0; y < ph.nr; y++ {
					v += j6[a][x] * cov(ph.iR+x, ph.iR+y) * j6[b][y]
				}
			}
			c6[a][b] = v
		}
	}
	// A fit starts from a cell whose lines lie within a width or two of
	// their peaks (a few tenths of a per cent in d); a cell that moved
	// by more than maxMoveShare in volume has left for another minimum
	// and describes nothing.
	if v0 := ph.start.Volume(); math.Abs(c.Volume()-v0) > maxMoveShare*v0 {
		return out, nil, fmt.Errorf("%w: phase %d moved from %s to %s (volume %.1f to %.1f Å³): the cell does not describe the pattern; a whole-pattern fit needs a cell within about 1 %% of the lines", ErrPattern, i+1, ph.start, c, v0, c.Volume())
	}
	out.Cell, out.Covariance = c, c6
	out.ESD = c6.ESD()
	out.Volume, out.VolumeESD = c.Volume(), c.VolumeESD(c6)
	var reps []reported
	params := c.Params()
	for _, name := range c.System.FreeNames() {
		pi := paramIndex(name)
		unit := "Å"
		if pi >= 3 {
			unit = "°"
		}
		g := map[int]float64{}
		for x := 0; x < ph.nr; x++ {
			g[ph.iR+x] = j6[pi][x]
		}
		reps = append(reps, reported{Param: Param{Name: name, Unit: unit, Value: params[pi]}, phase: i, grad: g})
	}
	for j, name := range []string{"U", "V", "W", "X", "Y"} {
		if i > 0 && ph.prof[j] == pf.phases[0].prof[j] {
			continue // the main phase's
		}
		unit := "°²"
		if j >= 3 {
			unit = "°"
		}
		k := ph.profileIndex(j)
		reps = append(reps, reported{Param: Param{Name: name, Unit: unit, Value: s.p[k]}, phase: i, grad: map[int]float64{k: 1}})
	}
	for k, r := range pf.refl {
		l := ls[k]
		if r.phase != i || !l.ok || l.comp[0].tt < pf.lo || l.comp[0].tt > pf.hi {
			continue
		}
		v := s.p[pf.iI+k]
		out.Reflections = append(out.Reflections, PatternReflection{HKL: r.HKL, Mult: r.Mult, TwoTheta: l.comp[0].tt,
			Intensity: v, IntensityESD: math.Sqrt(math.Max(vi[k]*scale, 0))})
	}
	_, out.Calc, _ = pf.evaluate(s.p, nil, i)
	return out, reps, nil
}

// correlations returns the strongest correlations among the reported
// parameters, at most MaxCorrelations with |r| ≥ minCorrelation,
// strongest first.
func correlations(reps []reported, cov func(x, y reported) float64, phases bool) []Correlation {
	name := func(r reported) string {
		if phases && r.phase >= 0 {
			return fmt.Sprintf("%s (phase %d)", r.Name, r.phase+1)
		}
		return r.Name
	}
	var out []Correlation
	for i := range reps {
		for j := i + 1; j < len(reps); j++ {
			if !(reps[i].ESD > 0) || !(reps[j].ESD > 0) {
				continue
			}
			r := cov(reps[i], reps[j]) / (reps[i].ESD * reps[j].ESD)
			if math.Abs(r) >= minCorrelation {
				out = append(out, Correlation{A: name(reps[i]), B: name(reps[j]), R: r})
			}
		}
	}
	sort.SliceStable(out, func(a, b int) bool { return math.Abs(out[a].R) > math.Abs(out[b].R) })
	if len(out) > MaxCorrelations {
		out = out[:MaxCorrelations]
	}
	return out
}

// gaussianBelowFloor reports whether the Gaussian width law of p is
// below zero at every reflection in the range (ls, the lines at p), where
// lineWidth holds the Gaussian width at or below the scan's step and the
// law's terms no longer act on the curve.
func (pf *patternFit) gaussianBelowFloor(p []float64, ls []line) bool {
	m := pf.phases[0].prof
	for _, l := range ls {
		if !l.ok || l.comp[0].tt < pf.lo || l.comp[0].tt > pf.hi {
			continue
		}
		tt := l.comp[0].tt
		t := math.Tan(tt * deg / 2)
		if p[m[profU]]*t*t+p[m[profV]]*t+p[m[profW]] >= 0 {
			return false
		}
	}
	return true
}
