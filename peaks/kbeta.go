package peaks

import (
	"math"
	"sort"

	"reticle/scanfile"
)

// kbetaSlack is the factor by which a line's K-beta ratio may differ from
// the scan's and still be taken for a companion: absorption, the
// polarisation of a monochromator and overlaps change the ratio from line
// to line by tens of per cent (common practice).
const kbetaSlack = 2.0

// kbetaMaxRatio is the largest K-beta to K-alpha1 ratio of an X-ray tube
// without a filter (about 1/5 for Cu, Mo and the other common anodes,
// from memory); a larger one is no K-beta line.
const kbetaMaxRatio = 0.3

// kbetaClear is the S/N above which a predicted K-beta companion could
// not be missed: twice the usual detection threshold.
const kbetaClear = 10

// flagKBeta marks the peaks that are K-beta companions and returns the
// scan's K-beta ratio. A peak is a candidate when it sits at the K-beta
// position of a stronger peak (its parent) within half its width or three
// esds, with an area ratio below kbetaMaxRatio. One ratio is estimated
// for the whole scan: the median of the candidates' ratios, each
// candidate weighted by its parent's area (the strongest parents show
// their companions best). A candidate is a companion only when its ratio
// is consistent with the scan's: within a factor kbetaSlack, widened by
// three esds of the ratio. Leakage must show at the strongest lines: of
// the five strongest peaks whose K-beta position lies inside the scan
// (lo to hi degrees 2θ), two (one, when there is a single candidate) must
// have a consistent companion, and more of them than lack a companion
// that the ratio predicts clearly; else the candidates are real lines
// that happen to sit there and none is flagged. A radiation without a K-beta line (a monochromated scan) has
// no companions.
func flagKBeta(ps []Peak, rad scanfile.Radiation, lo, hi float64) float64 {
	if rad.KBeta == 0 {
		return 0
	}
	type cand struct {
		i, parent  int
		ratio, rel float64 // ratio and its relative esd
		weight     float64
	}
	var cs []cand
	for i := range ps {
		p := &ps[i]
		best := -1
		for j := range ps {
			q := &ps[j]
			if j == i || q.Area <= p.Area {
				continue
			}
			xb := Companion(q.TwoTheta, rad.Lambda1, rad.KBeta)
			if math.Abs(xb-p.TwoTheta) <= math.Max(0.5*p.FWHM, 3*p.TwoThetaESD) && (best < 0 || q.Area > ps[best].Area) {
				best = j
			}
		}
		if best < 0 || !(p.Area > 0) {
			continue
		}
		q := &ps[best]
		r := p.Area / q.Area
		if r > kbetaMaxRatio {
			continue
		}
		rel := math.Hypot(p.AreaESD/p.Area, q.AreaESD/q.Area)
		cs = append(cs, cand{i, best, r, rel, q.Area})
	}
	if len(cs) == 0 {
		return 0
	}
	// Weighted median of the ratios.
	sort.Slice(cs, func(a, b int) bool { return cs[a].ratio < cs[b].ratio })
	var total, acc float64
	for _, c := range cs {
		total += c.weight
	}
	scan := cs[len(cs)-1].ratio
	for _, c := range cs {
		acc += c.weight
		if acc >= total/2 {
			scan = c.ratio
			break
		}
	}
	var ok []cand
	parents := map[int]bool{}
	for _, c := range cs {
		tol := math.Log(kbetaSlack) + 3*c.rel
		if math.Abs(math.Log(c.ratio/scan)) <= tol {
			ok = append(ok, c)
			parents[c.parent] = true
		}
	}
	// Leakage shows at the strongest lines. Of the five strongest peaks
	// with their K-beta position in the scan, those with a consistent
	// companion support it; those without one where the scan's ratio
	// predicts a clear companion (ratio × their S/N above
	// kbetaClear) speak against it.
	order := make([]int, len(ps))
	for i := range order {
		order[i] = i
	}
	sort.Slice(order, func(a, b int) bool { return ps[order[a]].Area > ps[order[b]].Area })
	top, support, against := 0, 0, 0
	for _, i := range order {
		if top == 5 {
			break
		}
		if xb := Companion(ps[i].TwoTheta, rad.Lambda1, rad.KBeta); xb < lo || xb > hi {
			continue
		}
		top++
		switch {
		case parents[i]:
			support++
		case scan*ps[i].SNR > kbetaClear:
			against++
		}
	}
	if support < min(2, len(ok)) || support <= against {
		return 0
	}
	for _, c := range ok {
		ps[c.i].Flags |= FlagKBeta
		ps[c.i].Parent = c.parent
	}
	return scan
}

// edgeMaxRatio is the largest area of a filter-edge hump relative to its
// line: the step is a fraction of the white radiation, well below a per
// cent of the line (common practice).
const edgeMaxRatio = 0.02

// flagFilterEdge marks the weak peaks that lie within 0.15° below and
// 0.3° above a strong line's filter-edge position (and three widths or
// more below the line itself), where the white radiation the line
// scatters steps up at the K-beta filter's K absorption edge; such a hump
// is not a line. Only the
// lines of at least a fifth of the strongest height scatter enough white
// radiation for a visible step.
func flagFilterEdge(ps []Peak, rad scanfile.Radiation) {
	if rad.Edge == 0 {
		return
	}
	top := 0.0
	for _, p := range ps {
		top = math.Max(top, p.Height)
	}
	for i := range ps {
		p := &ps[i]
		if p.Companion() || p.Flags&FlagUser != 0 {
			continue
		}
		for j := range ps {
			q := &ps[j]
			if j == i || q.Height < 0.2*top || !(p.Area < edgeMaxRatio*q.Area) {
				continue
			}
			xe := Companion(q.TwoTheta, rad.Lambda1, rad.Edge)
			if p.TwoTheta >= xe-0.15 && p.TwoTheta <= math.Min(xe+0.3, q.TwoTheta-3*q.FWHM) {
				p.Flags |= FlagFilterEdge
				p.Parent = j
				break
			}
		}
	}
}
