package peaks

import (
	"math"
	"sort"

	"gonum.org/v1/gonum/stat/distuv"

	"reticle/profile"
)

// shoulderLevel is the significance level of the test that keeps a
// shoulder found in the residual of the first fit.
const shoulderLevel = 0.001

// confirmShoulders keeps a component found in the residual (FlagAdded)
// only when its group's fit requires it: with χ²₁ and ν₁ the fit of the
// group with it, and χ²₀ the fit without it, the F statistic
// ((χ²₀ − χ²₁)/2)/(χ²₁/ν₁) must exceed the (1 − shoulderLevel) point of
// the F distribution with 2 and ν₁ degrees of freedom (its position and
// height are the two parameters it adds). Dividing by the fit's own
// reduced χ² makes the test ask whether the shoulder explains more than
// the misfit of the profile model does elsewhere in the group: a strong
// line that the model describes to 1 % of its height leaves residuals of
// that size, and a shoulder of that size is not evidence of a line.
//
// A group whose window an end of the scan cuts keeps none: the
// background under the end of the data cannot be clipped (see
// Result.LineESD), and a line cut by the end (the K-alpha2 of the last
// line, say) leaves a residual there that no line beside it explains.
func confirmShoulders(md *model, cs []*component) []*component {
	drop := map[*component]bool{}
	for _, g := range md.groups(cs) {
		var added []int
		for k, c := range g {
			if c.flags&FlagAdded != 0 && c.flags&FlagUser == 0 && besideStrong(c, g) {
				added = append(added, k)
			}
		}
		if len(added) == 0 {
			continue
		}
		lo, hi := md.span(g)
		if md.cutByEnd(lo, hi) {
			for _, k := range added {
				drop[g[k]] = true
			}
			continue
		}
		base := md.baseFor(cs, g, lo, hi)
		chi1, nu1 := groupChi2(md, g, -1, lo, hi, base)
		if nu1 <= 0 {
			continue
		}
		crit := (distuv.F{D1: 2, D2: float64(nu1)}).Quantile(1 - shoulderLevel)
		for _, k := range added {
			chi0, _ := groupChi2(md, g, k, lo, hi, base)
			f := (chi0 - chi1) / 2 / (chi1 / float64(nu1))
			if !(f > crit) {
				drop[g[k]] = true
			}
		}
	}
	if len(drop) == 0 {
		return cs
	}
	out := cs[:0:0]
	for _, c := range cs {
		if !drop[c] {
			out = append(out, c)
		}
	}
	return out
}

// groupChi2 refits copies of the group's components, leaving out the
// one at index skip (none when −1), and returns the χ² and degrees of
// freedom of the fit.
func groupChi2(md *model, g []*component, skip, lo, hi int, base []float64) (float64, int) {
	var cp []*component
	for k, c := range g {
		if k != skip {
			d := *c
			cp = append(cp, &d)
		}
	}
	if len(cp) == 0 {
		var chi float64
		for i := lo; i < hi; i++ {
			chi += sq(md.y[i]-base[i]) * md.w[i]
		}
		return chi, hi - lo
	}
	red := md.fitGroup(cp, lo, hi, base)
	dof := cp[0].dof
	return red * float64(dof), dof
}

// besideStrong reports whether c lies within 2.5 widths of a line of its
// group at least five times as high: where a misfit of that line's shape
// could pass for c.
func besideStrong(c *component, g []*component) bool {
	for _, o := range g {
		if o != c && o.h >= 5*c.h && math.Abs(o.x-c.x) < 2.5*math.Max(o.w, c.w) {
			return true
		}
	}
	return false
}

// blendWidth is the width, in units of the scan's width curve, above
// which a strong line is tried as two.
const blendWidth = 1.2

// splitBlends tries every strong free-shape line wider than blendWidth
// times the width curve as two lines (an unresolved pair: a small
// tetragonal splitting, two reflections of nearly equal d). The pair
// replaces the line when its group's fit requires it: the F statistic
// ((χ²₁ − χ²₂)/5)/(χ²₂/ν₂) (the pair adds five parameters) must exceed the
// (1 − shoulderLevel) point of F(5, ν₂), the two must not slide onto one
// another, and each must be significant at the threshold.
func splitBlends(md *model, cs []*component, curve profile.Caglioti, o Options) []*component {
	for _, g := range md.groups(cs) {
		for _, c := range g {
			if c.fixedShape || c.sh <= 0 || c.h/c.sh < 2*o.FreeShapeSNR || c.w < blendWidth*curve.At(c.x) {
				continue
			}
			lo, hi := md.span(g)
			base := md.baseFor(cs, g, lo, hi)
			chi1, _ := groupChi2(md, g, -1, lo, hi, base)
			var trial []*component
			var pair [2]*component
			for _, o := range g {
				if o != c {
					d := *o
					trial = append(trial, &d)
					continue
				}
				w := math.Max(curve.At(c.x), 0.6*c.w)
				for k, dx := range []float64{-0.3 * c.w, 0.3 * c.w} {
					p := *c
					p.x, p.anchor, p.h, p.w, p.asym = c.x+dx, c.x+dx, 0.6*c.h, w, 0
					p.flags &^= FlagAdded
					pair[k] = &p
					trial = append(trial, &p)
				}
			}
			red := md.fitGroup(trial, lo, hi, base)
			nu2 := trial[0].dof
			if nu2 <= 0 {
				continue
			}
			chi2 := red * float64(nu2)
			crit := (distuv.F{D1: 5, D2: float64(nu2)}).Quantile(1 - shoulderLevel)
			f := (chi1 - chi2) / 5 / (chi2 / float64(nu2))
			if !(f > crit) || collapsed(trial) {
				continue
			}
			if pair[0].h/pair[0].sh < o.Threshold || pair[1].h/pair[1].sh < o.Threshold {
				continue
			}
			// Adopt the pair in place of c.
			out := make([]*component, 0, len(cs)+1)
			for _, o := range cs {
				if o == c {
					out = append(out, pair[0], pair[1])
				} else {
					out = append(out, o)
				}
			}
			cs = out
			break
		}
	}
	sort.Slice(cs, func(a, b int) bool { return cs[a].x < cs[b].x })
	return cs
}
