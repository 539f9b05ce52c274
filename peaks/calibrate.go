package peaks

import (
	"cmp"
	"fmt"
	"math"
	"runtime"
	"slices"
	"sync"

	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/stat/distuv"

	"reticle/scanfile"
)

// The scan-wide profile parameters that no single line determines well
// are measured on the strong lines that stand alone, each refitted
// alone (with every line parameter free) for a few trial values of the
// parameter; a value is adopted only when it lowers the summed χ² of
// those lines by more than the (1 − calLevel) point of χ² with one degree
// of freedom, after dividing by the best trial's reduced χ² (a
// likelihood-ratio test made robust to a profile that fits the strong
// lines imperfectly).
const calLevel = 0.001

// tailTrials are the trial tail ratios τ (the tailed pseudo-Voigt of package profile).
var tailTrials = []float64{1, 1.2, 1.4, 1.6, 1.8, 2, 2.5, 3, 4}

// residueTrials are the trial K-alpha2 intensity ratios of a scan
// measured with a primary monochromator: a curved crystal passes some of
// the K-alpha2 line, a Johansson crystal none.
var residueTrials = []float64{0, 0.01, 0.02, 0.03, 0.04, 0.05, 0.06, 0.08, 0.1, 0.13, 0.16, 0.2, 0.3}

// maxReferenceLines is the most reference lines a calibration refits at
// each trial: beyond a score of strong lines the test gains little power
// and the trials cost time in proportion to the lines.
const maxReferenceLines = 20

// referenceLines returns the components whose shape is well determined:
// strong, clear of their neighbours, with a free shape and a width to
// better than 10 %; of more than maxReferenceLines, the most significant.
func referenceLines(md *model, cs []*component, o Options) []*component {
	var out []*component
	for _, c := range cs {
		if c.fixedShape || c.sh <= 0 || c.h/c.sh < 2*o.FreeShapeSNR || !md.isolated(c, cs) {
			continue
		}
		if c.sw > 0.1*c.w {
			continue
		}
		out = append(out, c)
	}
	if len(out) > maxReferenceLines {
		// The most significant lines, which carry most of the test's
		// power, in their order of 2θ.
		slices.SortStableFunc(out, func(a, b *component) int { return cmp.Compare(b.h/b.sh, a.h/a.sh) })
		out = out[:maxReferenceLines]
		slices.SortFunc(out, func(a, b *component) int { return cmp.Compare(a.x, b.x) })
	}
	return out
}

// A refLine is a reference line with its fitting window and the other
// components' tails there, as the first pass left them.
type refLine struct {
	c      *component // a copy, carried from trial to trial
	lo, hi int
	base   []float64
}

// refLines sets up the reference lines' windows: 8 widths around their
// lines.
func refLines(md *model, cs, refs []*component) []refLine {
	var out []refLine
	for _, r := range refs {
		x2, _ := md.companion2(r.x)
		if math.IsInf(x2, 1) {
			x2 = r.x
		}
		lo := searchX(md.x, r.x-8*r.w)
		hi := min(searchX(md.x, x2+8*r.w)+1, len(md.x))
		if hi-lo < 12 {
			continue
		}
		c := *r
		c.flags &^= FlagShared
		out = append(out, refLine{&c, lo, hi, md.baseFor(cs, []*component{r}, lo, hi)})
	}
	return out
}

// refChi2 refits each reference line alone, from its values at the
// previous trial (the trials move in small steps), and returns each
// line's χ² and degrees of freedom.
func refChi2(md *model, refs []refLine) ([]float64, []int) {
	// The trials' χ² are compared against a critical value of about 11
	// (calLevel): 0.01 is precision enough.
	md.chiTol = 0.01
	defer func() { md.chiTol = 0 }()
	chi := make([]float64, len(refs))
	dof := make([]int, len(refs))
	// Each line is refitted alone, on its own copy, reading the model
	// only: the lines are shared among the cores, and each result goes
	// to its own place, so the outcome does not depend on the schedule.
	workers := min(runtime.GOMAXPROCS(0), len(refs))
	var wg sync.WaitGroup
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for k := w; k < len(refs); k += workers {
				r := refs[k]
				red := md.fitGroup([]*component{r.c}, r.lo, r.hi, r.base)
				chi[k], dof[k] = red*float64(r.c.dof), r.c.dof
			}
		}()
	}
	wg.Wait()
	return chi, dof
}

// chooseTrial evaluates every trial value with set, and returns the one
// that fits the reference lines best when it passes the likelihood-ratio
// test against the first (the plain model), else the first. Each line's
// χ² is divided by its own least reduced χ² over the trials (at least 1),
// so that the lines a model describes within their noise decide, and a
// line that no trial fits (a blend, a flaw of the sample) cannot.
func chooseTrial(md *model, refs []refLine, trials []float64, set func(float64)) float64 {
	chis := make([][]float64, 0, len(trials))
	var dof []int
	// The trials go in order, and the summed χ² is smooth in the trial
	// value: once it has risen twice in a row above the least so far,
	// the trials beyond cannot win, and are not fitted.
	least, rises := math.Inf(1), 0
	for _, t := range trials {
		set(t)
		var c []float64
		c, dof = refChi2(md, refs)
		chis = append(chis, c)
		sum := floats.Sum(c)
		switch {
		case sum < least:
			least, rises = sum, 0
		case len(chis) > 1 && sum > floats.Sum(chis[len(chis)-2]):
			rises++
		}
		if rises == 2 {
			break
		}
	}
	trials = trials[:len(chis)]
	scale := make([]float64, len(refs))
	for i := range refs {
		scale[i] = math.Inf(1)
		for k := range trials {
			if dof[i] > 0 {
				scale[i] = math.Min(scale[i], chis[k][i]/float64(dof[i]))
			}
		}
		scale[i] = math.Max(scale[i], 1)
	}
	score := make([]float64, len(trials))
	best := 0
	for k := range trials {
		for i := range refs {
			if dof[i] > 0 {
				score[k] += chis[k][i] / scale[i]
			}
		}
		if score[k] < score[best] {
			best = k
		}
	}
	crit := (distuv.ChiSquared{K: 1}).Quantile(1 - calLevel)
	if score[0]-score[best] <= crit {
		best = 0
	}
	set(trials[best])
	return trials[best]
}

// calibrate measures the scan-wide K-alpha2 residue of a monochromated
// scan whose wavelength is an anode's K-alpha1 line, and the tail ratio of
// the line profile, on the reference lines; it sets both on the models
// (mds share the radiation and tail), and returns the components (less
// those that the residue now explains) and a note for each value adopted.
func calibrate(mds []*model, cs []*component, o Options) ([]*component, []string) {
	md := mds[0]
	var notes []string
	if a, ok := anodeOfLine(md.rad); ok {
		// Components at the K-alpha2 position of a line five times as
		// high are what a residue would be; they are left out while it
		// is measured, and dropped if it is adopted.
		ghost := map[*component]bool{}
		for _, c := range cs {
			for _, p := range cs {
				x2 := Companion(p.x, a.KAlpha1, a.KAlpha2)
				if p != c && p.h >= 5*c.h && math.Abs(c.x-x2) < 0.5*p.w {
					ghost[c] = true
				}
			}
		}
		rest := cs
		if len(ghost) > 0 {
			rest = nil
			for _, c := range cs {
				if !ghost[c] {
					rest = append(rest, c)
				}
			}
		}
		set := func(r float64) {
			for _, m := range mds {
				m.rad.Lambda2, m.rad.Ratio2 = a.KAlpha2, r
				if r == 0 {
					m.rad.Lambda2 = 0
				}
			}
		}
		// The lines are held symmetric while the residue is measured: a
		// free asymmetry would take up part of it (a weak K-alpha2 line
		// widens the high-angle side), and below 90° 2θ the instrument's
		// own asymmetry widens the other side.
		refs := refLines(md, rest, referenceLines(md, rest, o))
		for _, r := range refs {
			r.c.symmetric, r.c.asym = true, 0
		}
		if len(refs) >= 2 {
			if r := chooseTrial(md, refs, residueTrials, set); r > 0 {
				cs = rest
				notes = append(notes, fmt.Sprintf("the strong lines carry a %s K-alpha2 line of about %.0f %% of K-alpha1 that the monochromator passed; it is fitted with every line", a.Symbol, 100*r))
			}
		}
	}
	refs := refLines(md, cs, referenceLines(md, cs, o))
	if len(refs) < 2 {
		return cs, notes
	}
	set := func(t float64) {
		for _, m := range mds {
			m.tail = t
		}
	}
	if t := chooseTrial(md, refs, tailTrials, set); t > 1 {
		notes = append(notes, fmt.Sprintf("the lines have wings wider than a pseudo-Voigt curve: their Lorentzian part is %.3g times as wide as their Gaussian part", t))
	}
	return cs, notes
}

// anodeOfLine returns the anode whose K-alpha1 line a single-line
// radiation is (within 2·10⁻⁴ Å, the precision files state it to).
func anodeOfLine(r scanfile.Radiation) (scanfile.Anode, bool) {
	if r.Doublet() {
		return scanfile.Anode{}, false
	}
	for _, a := range scanfile.Anodes {
		if math.Abs(r.Lambda1-a.KAlpha1) <= 2e-4 {
			return a, true
		}
	}
	return scanfile.Anode{}, false
}

// searchX returns the first index with x[i] ≥ v.
func searchX(x []float64, v float64) int {
	lo, hi := 0, len(x)
	for lo < hi {
		m := (lo + hi) / 2
		if x[m] < v {
			lo = m + 1
		} else {
			hi = m
		}
	}
	return lo
}
