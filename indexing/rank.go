package indexing

import (
	"reticle/cell"

	"math"
	"sort"
)

// closeFigure is the ratio of M within which the higher symmetry, then the
// smaller cell, ranks first (figures closer than this do not tell the
// cells apart).
const closeFigure = 0.7

// rank merges equivalent descriptions and orders the fits.
func rank(fs []*fit, ls, all []obs, o Options) []*fit {
	fs = best(fs, len(fs))
	// Lines beyond the first N count too: a cell that explains the first
	// lines but few of the later ones is penalised like one that leaves
	// early lines unindexed.
	if len(all) > len(ls) {
		for _, f := range fs {
			g := &fit{trial: f.trial}
			g.assignAll(all, o.Wavelength, 0)
			r := float64(g.indexed) / float64(len(all))
			f.later = r * r * r * r
		}
		sort.SliceStable(fs, func(i, j int) bool { return better(fs[i], fs[j]) })
	}
	// One lattice, two descriptions: keep the higher symmetry, or the
	// smaller cell of equal symmetry.
	qmax := qOf(ls[len(ls)-1].tt, 0, o.Wavelength) * 1.001
	calc := make([][]float64, len(fs))
	for i, f := range fs {
		if i < 60 {
			calc[i] = clusters(f, qmax)
		}
	}
	drop := make([]bool, len(fs))
	for i := range fs {
		for j := range fs {
			if i == j || drop[i] || drop[j] || calc[i] == nil || calc[j] == nil {
				continue
			}
			if !sameSet(calc[i], calc[j]) {
				continue
			}
			a, b := fs[i], fs[j]
			if a.sys.LaueOrder() > b.sys.LaueOrder() || a.sys.LaueOrder() == b.sys.LaueOrder() && a.cell().Volume() < b.cell().Volume()*(1-1e-6) {
				drop[j] = true
			}
		}
	}
	// The same cell with two centrings: the one that indexes more lines,
	// then the better score. Lines that only the less restrictive
	// centring indexes are evidence against the other.
	for i := range fs {
		for j := range fs {
			a, b := fs[i], fs[j]
			if i == j || drop[i] || drop[j] || a.cen == b.cen || family(a.sys) != family(b.sys) {
				continue
			}
			ca, cb := a.cell(), b.cell()
			if math.Abs(ca.A-cb.A) > 2e-4*ca.A || math.Abs(ca.C-cb.C) > 2e-4*ca.C {
				continue
			}
			if preferCentring(a, b, ls, o.Wavelength) {
				drop[j] = true
			}
		}
	}
	var out []*fit
	for i, f := range fs {
		if !drop[i] {
			out = append(out, f)
		}
	}
	// Close figures: higher symmetry first, then the smaller cell.
	for pass := 0; pass < len(out); pass++ {
		moved := false
		for i := 0; i+1 < len(out); i++ {
			a, b := out[i], out[i+1]
			if b.score() < closeFigure*a.score() {
				continue
			}
			if b.indexed < a.indexed {
				continue
			}
			if b.sys.LaueOrder() > a.sys.LaueOrder() ||
				b.sys.LaueOrder() == a.sys.LaueOrder() && b.cell().Volume() < a.cell().Volume()*(1-1e-6) && b.score() >= 0.9*a.score() {
				out[i], out[i+1] = b, a
				moved = true
			}
		}
		if !moved {
			break
		}
	}
	return out
}

// preferCentring decides between two centrings of one cell. The one with
// more calculated lines wins only if the lines that it alone indexes are
// more than chance would give. Each line that the restrictive centring
// leaves unindexed is matched by chance within ±2.5 times the fit's rms
// residual with probability p = 2·(2.5 rms in Q)·ρ, ρ the density in Q of
// the extra calculated lines (growing as √Q, since their number grows as
// Q^(3/2)); the matches count as evidence when a Poisson count of mean Σp
// reaches their number with probability below 1 %. Otherwise the better
// score wins.
func preferCentring(a, b *fit, ls []obs, lambda float64) bool {
	more, less := a, b
	if a.nCalc < b.nCalc {
		more, less = b, a
	}
	extraCalc := float64(more.nCalc - less.nCalc)
	// A line matched better than the fit's typical residual is no better
	// evidence than one matched at it: the typical residual (rms Δ2θ of
	// the lines both index) floors each discrepancy. Lines matched worse
	// than 2.5 times that are not evidence at all.
	var ss float64
	nb := 0
	for i, l := range ls {
		if less.m[i] >= 0 && more.m[i] >= 0 {
			d := l.tt - more.zero - ttOf(more.qc[i], lambda)
			ss += d * d
			nb++
		}
	}
	rms := precision
	if nb > 0 {
		rms = math.Max(rms, math.Sqrt(ss/float64(nb)))
	}
	var expect float64
	k := 0
	for i, l := range ls {
		if less.m[i] >= 0 {
			continue
		}
		// Every line the restrictive centring leaves out could be
		// matched by chance within ±2.5 rms.
		q := qOf(l.tt, more.zero, lambda)
		rho := 1.5 * extraCalc * math.Sqrt(q) / math.Pow(more.lastQ, 1.5)
		expect += math.Min(1, 2*dQ(l.tt, 2.5*rms, lambda)*rho)
		if more.m[i] >= 0 && math.Abs(l.tt-more.zero-ttOf(more.qc[i], lambda)) <= 2.5*rms {
			k++
		}
	}
	if k > 0 && poissonTail(k, expect) < 0.01 {
		return a == more
	}
	return better(a, b)
}

// poissonTail returns P(X ≥ k) for a Poisson variable of mean lambda.
func poissonTail(k int, lambda float64) float64 {
	term, sum := math.Exp(-lambda), 0.0
	for j := 0; j < k; j++ {
		sum += term
		term *= lambda / float64(j+1)
	}
	return math.Max(0, 1-sum)
}

// family groups systems whose cells share axes: hexagonal and
// rhombohedral (hexagonal axes) are one.
func family(s cell.System) cell.System {
	if s == cell.Rhombohedral {
		return cell.Hexagonal
	}
	return s
}

// clusters returns the fit's calculated Q values up to qmax, values closer
// than 2e-3 relative merged (so that a pseudo-symmetric description whose
// lines split by less than the windows counts as the same lattice).
func clusters(f *fit, qmax float64) []float64 {
	var qs []float64
	t := f.trial
	if t.sys == cell.Cubic {
		for n := 1; float64(n)*t.pa <= qmax; n++ {
			if cubicAllowed(t.cen, n) {
				qs = append(qs, float64(n)*t.pa)
			}
		}
	} else {
		for l := 0; t.pc*float64(l*l) <= qmax; l++ {
			for m := 0; t.pa*float64(m)+t.pc*float64(l*l) <= qmax; m++ {
				if planeAllowed(t.sys, t.cen, m, l) {
					qs = append(qs, t.pa*float64(m)+t.pc*float64(l*l))
				}
			}
			if len(qs) > 20000 {
				return nil
			}
		}
	}
	sort.Float64s(qs)
	var out []float64
	for _, q := range qs {
		if n := len(out); n > 0 && q-out[n-1] <= 2e-3*q {
			continue
		}
		out = append(out, q)
	}
	return out
}

// sameSet reports whether two sorted lists of Q agree value by value within
// 3e-3 relative.
func sameSet(a, b []float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if math.Abs(a[i]-b[i]) > 3e-3*a[i] {
			return false
		}
	}
	return true
}
