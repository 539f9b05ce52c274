package indexing

import (
	"math"
	"sort"

	"gonum.org/v1/gonum/mat"

	"reticle/cell"
)

// The evidence of a candidate cell is the probability of the observed
// line positions under it, its parameters integrated out. It is the
// one quantity that ranks candidates and, normalised over them, gives
// each its probability.
//
// # The model
//
// The observed lines x_i (degrees 2θ) within the measured range
// [lo, hi] are taken as a Poisson point process whose rate, in lines per
// degree, is
//
//	λ(x) = p·Σ_j φ(x − c_j; s) + ρ
//
// c_j the cell's calculated lines in the range (lines closer than the
// resolution merged: they make one peak), φ the normal density, s² =
// esd² + σ² the line's position error (its own esd and a term σ shared by
// all lines for the errors that no esd holds: displacement, asymmetry,
// blends; at least weightFloor), p the chance that a calculated line is
// seen (structure factors, overlap and the detection limit leave many
// unseen), and ρ the rate of foreign lines (another phase, artefacts),
// spread evenly over the range. Its log-likelihood is
//
//	ln L = Σ_i ln λ(x_i) − p·N_c − ρ·(hi − lo)
//
// with N_c the calculated lines. Predicted lines that are not seen cost
// through p·N_c — de Wolff's idea behind M_N (J. Appl. Cryst. 1 (1968)
// 108), that a cell with many calculated lines explains lines by chance,
// in probabilistic form: a cell whose lines crowd the range explains
// each observed line no better than the foreign rate does. A line no
// calculated line is near counts as foreign; no hard window decides. p,
// ρ and σ are set to their maximum-likelihood values by expectation
// maximisation (Dempster, Laird & Rubin, J. R. Stat. Soc. B 39 (1977) 1);
// every candidate has the same three, so they leave the comparison fair.
//
// # The Occam factor
//
// The cell parameters θ (free reciprocal coefficients, cell.Basis, and
// the zero offset) are integrated out by Laplace's method (MacKay,
// Information Theory, Inference and Learning Algorithms (2003) ch. 27–
// 28): ln E = ln L(θ̂) + ln π(θ̂) + (d/2)·ln 2π − ½·ln det(H + P), H the
// information matrix of the positions, P the prior's precision (so that
// a parameter the lines do not fix costs nothing rather than infinity).
// The prior π is uniform in the logarithm of each scale coefficient over
// edges of minTranslation to MaxEdge, uniform in the cosine of each
// reciprocal angle over a width of 1 (about the span of a reduced
// cell's), and uniform in the zero offset over the searched range; each
// free parameter therefore costs about the logarithm of how much more
// precisely the lines fix it than the prior did. Every Bravais lattice
// is equally likely a priori.

// A lineFit is a candidate's evidence over the lines and the nuisance
// parameters at their maximum.
type lineFit struct {
	logL     float64 // ln L at the maximum
	logOccam float64 // ln of the Occam factor of the cell parameters
	p, rho   float64 // chance a calculated line is seen; foreign lines per degree
	sys      float64 // shared position error σ, degrees 2θ
	nCalc    int     // calculated lines in the range (merged)
	explain  float64 // Σ of the lines' chance of belonging to the cell
	// The split of the calculated lines that fits best, its
	// log-likelihood, and the lines its class B explains: those that
	// demand this cell over the smaller one of class A.
	splitUsed *split
	bestSplit float64
	demanding []int
	// own is each line's chance of belonging to the cell.
	own []float64
	// second is, in a fit beside a second phase, the Σ of the lines'
	// chance of belonging to it.
	second float64
	// paired marks a fit weighed with second phases too (see pairUp):
	// partner is the best of them (nil when none qualified), pairE the
	// log evidence of the cell beside it and pairLines the lines it takes.
	paired    bool
	partner   *cand
	pairE     float64
	pairLines float64
	// weights are the lines' weights for a refinement under the model,
	// 1/degree²: chance of belonging times the t distribution's weight
	// over the variance.
	weights []float64
}

// soloE returns the log evidence of the cell alone.
func (f lineFit) soloE() float64 { return f.logL + f.logOccam }

// logE returns the log evidence: over the cell alone, or, once the
// ranking weighs second phases (see pairUp), averaged over the cell
// alone and the cell beside its best second phase, each with prior ½.
func (f lineFit) logE() float64 {
	solo := f.soloE()
	if !f.paired {
		return solo
	}
	return logSumExp([]float64{math.Log(0.5) + solo, math.Log(0.5) + f.pairE})
}

// span is the range of 2θ over which lines were looked for.
type span struct{ lo, hi float64 }

// spanOf returns the measured range of the options, or that of the lines
// (from the first line less its window, which claims nothing below it:
// a scan may start just below its first line) when the options give
// none.
func spanOf(o Options, ls []obs) span {
	s := span{o.MinTwoTheta, o.MaxTwoTheta}
	if !(s.lo > 0) || s.lo > ls[0].tt {
		s.lo = math.Max(0.5, ls[0].tt-ls[0].tol)
	}
	if !(s.hi > s.lo) || s.hi < ls[len(ls)-1].tt {
		s.hi = ls[len(ls)-1].tt + ls[len(ls)-1].tol
	}
	return s
}

// shapeShare is the share of a line's FWHM to which a fitted position
// carries errors that its esd does not hold: the profile model's
// mismatch of asymmetric or anisotropically broadened lines and
// unresolved neighbours move a fitted position by a few per cent of the
// width (common practice: positions are trusted to a twentieth of the
// FWHM). A splitting of lines below it is no evidence of a lower metric.
const shapeShare = 0.05

// variance returns the variance of the line's position under the
// evidence's model, degrees² 2θ: its esd and the larger of the shared
// error sys and the share of its width that profile fitting leaves
// uncertain.
func (l obs) variance(sys float64) float64 {
	f := math.Max(sys, shapeShare*l.fwhm)
	return l.esd*l.esd + f*f
}

// errDOF is the number of degrees of freedom of the Student t
// distribution of a line's position about its calculated place: measured
// positions have wider tails than a normal distribution (a blend, an
// asymmetric line, a shift the search does not model), and a t of few
// degrees of freedom keeps one such line from inflating the shared error
// σ or from counting as foreign (Lange, Little & Taylor, J. Am. Stat.
// Assoc. 84 (1989) 881, fit ν = 4 to many data sets).
const errDOF = 4

// reach is how many scales s from a line a calculated line still adds
// to its density (the t density of 4 degrees of freedom has fallen to
// 1e-5 of its peak there).
const reach = 15

// studentT is the density at d of a Student t of errDOF degrees of
// freedom and scale s.
func studentT(d, s float64) float64 {
	const c = 0.375 // Γ(5/2)/(Γ(2)·√(4π)) for ν = 4
	u := 1 + d*d/(errDOF*s*s)
	return c / (s * u * u * math.Sqrt(u)) // (1 + d²/νs²)^(−5/2)
}

// emRounds is the number of expectation-maximisation rounds: p, ρ and σ
// settle to a few parts in a thousand well before it.
const emRounds = 25

// splitRounds is the number of rounds of a split's fit, which starts
// from the one-class fit's p and ρ.
const splitRounds = 12

// A calcLine is a calculated line in the range. Lines closer than the
// resolution form a group, which shows as one peak: the group is one
// expected line, at the place of any of its members.
type calcLine struct {
	tt    float64 // degrees 2θ, zero offset included
	j     int     // index in the cand's calc
	group int     // index of its group
	w     float64 // 1 / the number of members of its group
}

// A near is a group within reach of an observed line, with its density
// there.
type near struct {
	group int
	phi   float64
}

// evidence computes the cand's evidence over the lines ls within the
// range sp. The cand's calculated lines must reach the end of the range
// (weigh sees to it).
//
// The chance p that a calculated line is seen is in truth not one number:
// a superstructure's extra lines, or those a centring of a smaller
// cell would remove, are as a class much weaker than the rest. The
// detection model is therefore averaged over two hypotheses, equally
// likely a priori: one p for every line, or a split (see split) of the
// lines into two classes with a p each, every split that the cell's
// symmetry allows equally likely. A larger cell whose extra class is not
// seen then costs only what the second p costs, and the lines of that
// class that are seen are the lines that demand the larger cell (see
// lineFit.demanding). Each p is integrated out under a uniform prior
// (occamP).
func (k *cand) evidence(ls []obs, lambda float64, sp span, o Options) lineFit {
	return k.evidenceWith(ls, lambda, sp, o, nil)
}

// calcIn returns the cand's calculated lines in the range sp, in 2θ,
// grouped by the resolution of the lines ls, and the number of groups.
func (k *cand) calcIn(ls []obs, lambda float64, sp span) ([]calcLine, int) {
	res := resolution(ls)
	var calc []calcLine
	groups, start := 0, math.Inf(-1)
	var size []int
	for j, c := range k.calc {
		tt := ttOf(c.q, lambda)
		tt += k.shift(tt)
		if math.IsNaN(tt) || tt < sp.lo || tt > sp.hi {
			continue
		}
		if tt-start >= res(tt) {
			groups++
			start = tt
			size = append(size, 0)
		}
		size[groups-1]++
		calc = append(calc, calcLine{tt: tt, j: j, group: groups - 1})
	}
	for i := range calc {
		calc[i].w = 1 / float64(size[calc[i].group])
	}
	return calc, groups
}

// evidenceWith is evidence with a second phase pt beside the cand (nil
// for none): the rate of lines at line i then has the term q·h_i·m_i,
// h_i the second phase's density of calculated lines there, q the
// chance that one of them is seen (fitted with p, ρ and σ) and m_i the
// ratio of the densities of the line's intensity under the second phase
// and under the cand (see phaseMarks); the evidence pays q's Occam
// factor and the second phase's cell's.
func (k *cand) evidenceWith(ls []obs, lambda float64, sp span, o Options, pt *partner) lineFit {
	calc, groups := k.calcIn(ls, lambda, sp)
	f := lineFit{nCalc: groups}
	R := sp.hi - sp.lo
	n := len(ls)
	if groups == 0 || n == 0 {
		f.rho = float64(n) / R
		f.logL = nullLogL(ls, R)
		return f
	}
	// Per line: the nearest calculated line.
	nearest := make([]int, n)
	for i, l := range ls {
		p := sort.Search(len(calc), func(j int) bool { return calc[j].tt >= l.tt })
		b := -1
		for _, j := range []int{p - 1, p} {
			if j >= 0 && j < len(calc) && (b < 0 || math.Abs(calc[j].tt-l.tt) < math.Abs(calc[b].tt-l.tt)) {
				b = j
			}
		}
		nearest[i] = b
	}
	nears := make([][]near, n)
	densities := func(sys float64) {
		for i, l := range ls {
			s2 := l.variance(sys)
			s := math.Sqrt(s2)
			p := sort.Search(len(calc), func(j int) bool { return calc[j].tt >= l.tt-reach*s })
			nears[i] = nears[i][:0]
			for j := p; j < len(calc) && calc[j].tt <= l.tt+reach*s; j++ {
				nears[i] = append(nears[i], near{calc[j].group, calc[j].w * studentT(l.tt-calc[j].tt, s)})
			}
		}
	}
	// One class: p, ρ and σ.
	t := make([]float64, n) // chance of belonging to the cell
	g := make([]float64, n)
	mk := marks(ls)
	f.sys = weightFloor
	f.p = math.Min(1, float64(n)/float64(groups))
	f.rho = 1 / R
	minRho := 1e-6 / R
	// The second phase's lines, seen each with chance q; e[i] is their
	// rate at line i.
	var q, sq float64
	var e []float64
	if pt != nil {
		q, e = math.Min(1, float64(n)/float64(pt.groups)), make([]float64, n)
	}
	for round := 0; round <= emRounds; round++ {
		densities(f.sys)
		var st, ss float64
		sq = 0
		for i, l := range ls {
			g[i] = 0
			for _, x := range nears[i] {
				g[i] += x.phi
			}
			a := f.p * g[i]
			tot := a + f.rho*mk[i]
			if e != nil {
				e[i] = q * pt.h[i] * pt.mk[i]
				tot += e[i]
				sq += e[i] / tot
			}
			t[i] = a / tot
			st += t[i]
			d := l.tt - calc[nearest[i]].tt
			s2 := l.variance(f.sys)
			u := (errDOF + 1) / (errDOF + d*d/s2) // the t distribution's weight of a residual
			ss += t[i] * math.Max(u*d*d-l.esd*l.esd, 0)
		}
		if round == emRounds {
			break
		}
		f.p = math.Min(1, st/float64(groups))
		f.rho = math.Max(math.Max(float64(n)-st-sq, 0)/R, minRho)
		if pt != nil {
			q = math.Min(1, sq/float64(pt.groups))
		}
		if st > 0 {
			f.sys = math.Max(weightFloor, math.Sqrt(ss/st))
		}
	}
	f.own = t
	f.weights = make([]float64, n)
	for i, l := range ls {
		d := l.tt - calc[nearest[i]].tt
		s2 := l.variance(f.sys)
		f.weights[i] = t[i] * (errDOF + 1) / (errDOF + d*d/s2) / s2
	}
	one := -f.p*float64(groups) - f.rho*R
	for i := range ls {
		x := f.p*g[i] + f.rho*mk[i]
		if e != nil {
			x += e[i]
		}
		one += math.Log(x)
		f.explain += t[i]
	}
	one += occamP(f.explain, groups)
	// What the second phase adds to every model of the cand's lines:
	// its lines' expected count, q's Occam factor and its cell's.
	var second float64
	if pt != nil {
		second = -q*float64(pt.groups) + occamP(sq, pt.groups) + pt.logOccam
		one += second
		f.second = sq
	}
	// Two classes, for every split the symmetry allows.
	splits := splitsOf[k.c.System]
	terms := []float64{math.Log(0.5) + one}
	classA := make([]bool, groups)
	r4, r3 := make([]int, len(calc)), make([]int, len(calc))
	if len(splits) > 0 {
		for ci, c := range calc {
			r4[ci], r3[ci] = residues(k.calc[c.j].h)
		}
	}
	for si, s := range splits {
		clear(classA)
		for ci, c := range calc {
			classA[c.group] = classA[c.group] || s.inClassA(r4[ci], r3[ci])
		}
		na := 0
		for _, a := range classA {
			if a {
				na++
			}
		}
		nb := groups - na
		if na == 0 || nb == 0 {
			terms = append(terms, math.Log(0.5/float64(len(splits)))+one)
			continue
		}
		l2, dem, weak := twoClass(ls, nears, mk, e, classA, na, nb, f.p, f.rho, R, minRho)
		l2 += second
		terms = append(terms, math.Log(0.5/float64(len(splits)))+l2)
		if l2 > f.bestSplit || f.splitUsed == nil {
			f.bestSplit, f.splitUsed, f.demanding = l2, &splits[si], nil
			if weak {
				f.demanding = dem
			}
		}
	}
	// The lines of a weak class B demand this cell over the smaller
	// one only when the split is the better model, its prior cost paid.
	if f.splitUsed != nil && f.bestSplit+math.Log(0.5/float64(len(splits))) <= terms[0] {
		f.demanding = nil
	}
	f.logL = logSumExp(terms)
	f.logOccam = k.occam(ls, lambda, t, nearest, func(i int) int { return calc[nearest[i]].j }, f.sys, o)
	return f
}

// twoClass fits p_A, p_B and ρ by expectation maximisation with the
// densities nears of each line, classA telling the class of each merged
// line (na and nb in each), and returns the log-likelihood with each p
// integrated out, and the lines that class B explains better than the
// foreign rate and class A together (the lines demanding the split's
// larger cell), and whether class B is the weaker (its p below half of
// class A's: a superstructure's lines, or those of a weak centring
// violation).
func twoClass(ls []obs, nears [][]near, mk, e []float64, classA []bool, na, nb int, p, rho, R, minRho float64) (float64, []int, bool) {
	n := len(ls)
	ga := make([]float64, n)
	gb := make([]float64, n)
	for i := range ls {
		for _, x := range nears[i] {
			if classA[x.group] {
				ga[i] += x.phi
			} else {
				gb[i] += x.phi
			}
		}
	}
	// Lines near no calculated line add nothing to sa and sb.
	near := make([]int, 0, n)
	for i := range ls {
		if ga[i] != 0 || gb[i] != 0 {
			near = append(near, i)
		}
	}
	// The rate of a second phase's lines at line i (e, fixed by the
	// one-class fit; none without a second phase).
	fe := func(i int) float64 {
		if e == nil {
			return 0
		}
		return e[i]
	}
	pa, pb := p, p
	var sa, sb, se float64
	for round := 0; round <= splitRounds; round++ {
		sa, sb, se = 0, 0, 0
		for _, i := range near {
			a, b := pa*ga[i], pb*gb[i]
			tot := a + b + rho*mk[i] + fe(i)
			sa += a / tot
			sb += b / tot
		}
		if e != nil {
			for i := range ls {
				se += e[i] / (pa*ga[i] + pb*gb[i] + rho*mk[i] + e[i])
			}
		}
		if round == splitRounds {
			break
		}
		pa = math.Min(1, sa/float64(na))
		pb = math.Min(1, sb/float64(nb))
		rho = math.Max(math.Max(float64(n)-sa-sb-se, 0)/R, minRho)
	}
	ll := -pa*float64(na) - pb*float64(nb) - rho*R
	var dem []int
	for i := range ls {
		a, b := pa*ga[i], pb*gb[i]
		ll += math.Log(a + b + rho*mk[i] + fe(i))
		if b > a+rho*mk[i]+fe(i) {
			dem = append(dem, i)
		}
	}
	return ll + occamP(sa, na) + occamP(sb, nb), dem, pb < pa/2
}

// occamP is the log of the factor by which integrating a detection
// chance p over a uniform prior on [0, 1] lowers the likelihood at its
// maximum, for k lines seen of n calculated: ∫p^k·e^(−pn)dp = Γ(k+1)/
// n^(k+1) against (k/n)^k·e^(−k), about ½·ln(2πk) − ln n.
func occamP(k float64, n int) float64 {
	lg, _ := math.Lgamma(k + 1)
	x := lg + k - math.Log(float64(n))
	if k > 0 {
		x -= k * math.Log(k)
	}
	return x
}

// logSumExp returns ln Σ exp(x_i).
func logSumExp(xs []float64) float64 {
	top := math.Inf(-1)
	for _, x := range xs {
		top = math.Max(top, x)
	}
	var s float64
	for _, x := range xs {
		s += math.Exp(x - top)
	}
	return top + math.Log(s)
}

// nullLogL is the log-likelihood of the lines if all are foreign, at
// the rate's maximum n/R: the model no cell beats by luck.
func nullLogL(ls []obs, R float64) float64 {
	n := len(ls)
	if n == 0 {
		return 0
	}
	r := float64(n) / R
	ll := -r * R
	for _, m := range marks(ls) {
		ll += math.Log(r * m)
	}
	return ll
}

// foreignScale is the scale of the intensities of foreign lines
// relative to the strongest line of the scan: a sample meant to be one
// phase holds other phases and artefacts at a few per cent of its own
// strongest line, and a line above a quarter of it is a second main
// phase or the sample's own (common practice).
const foreignScale = 0.1

// marks returns, per line, the ratio of the densities of its relative
// intensity r if it is foreign to if it belongs to the cell: foreign
// lines' r half-normal of scale foreignScale, the cell's lines' r
// uniform in ln r from the weakest line's to 1 (many weak lines, few
// strong ones, common practice). A weak line is about as likely
// foreign as not, one of a fifth of the strongest line ten times less,
// and the strongest lines cannot be foreign (the ratio is e^-12 at r =
// 0.5, e^-50 at r = 1). Lines of unknown intensity have ratio 1.
func marks(ls []obs) []float64 {
	lo := weakestRel(ls)
	out := make([]float64, len(ls))
	for i, l := range ls {
		out[i] = 1
		if l.rel > 0 && lo < 1 {
			r := math.Min(l.rel, 1)
			fF := math.Sqrt(2/math.Pi) / foreignScale * math.Exp(-r*r/(2*foreignScale*foreignScale))
			fC := 1 / (r * math.Log(1/lo))
			out[i] = fF / fC
		}
	}
	return out
}

// weakestRel returns the relative intensity of the weakest line of
// known intensity, at least 1e-4 (1 when none is known).
func weakestRel(ls []obs) float64 {
	lo := 1.0
	for _, l := range ls {
		if l.rel > 0 {
			lo = math.Min(lo, l.rel)
		}
	}
	return math.Max(lo, 1e-4)
}

// phaseMarks returns, per line, the ratio of the densities of its
// relative intensity r under a second phase whose strongest line has
// relative intensity top to under the first phase (see marks): each
// phase's r uniform in ln r from the weakest line's to its strongest
// line's, the first phase's strongest line being the scan's. The
// ratio is ln(1/lo)/ln(top/lo) up to top and zero above it; a second
// phase of weak lines takes weak lines more readily than the first.
// Lines of unknown intensity have ratio 1.
func phaseMarks(ls []obs, top float64) []float64 {
	lo := weakestRel(ls)
	out := make([]float64, len(ls))
	for i, l := range ls {
		out[i] = 1
		switch {
		case l.rel <= 0 || lo >= 1:
		case l.rel > top*(1+1e-9):
			out[i] = 0
		default:
			out[i] = math.Log(1/lo) / math.Max(math.Log(top/lo), math.Log(2))
		}
	}
	return out
}

// occam returns the log Occam factor of the cand's parameters: ln π(θ̂) +
// (d/2)·ln 2π − ½·ln det(H + P), H = Σ_i t_i·∇c_i∇c_iᵀ/s_i² over the lines
// (∇c_i the gradient of the calculated angle of line i's nearest
// calculated line calcOf(i)), P the prior's precision (each prior's
// variance that of its uniform width, width²/12).
func (k *cand) occam(ls []obs, lambda float64, t []float64, near []int, calcOf func(int) int, sys float64, o Options) float64 {
	basis := cell.Basis(k.c.System)
	nr := len(basis)
	d := k.nparams()
	r := k.c.ReciprocalFree()
	form := k.c.QForm()
	// Prior: log density at θ̂ and its standard deviation per parameter.
	logPrior := 0.0
	sd := make([]float64, d)
	scaleWidth := 2 * math.Log(o.MaxEdge/minTranslation) // ln(r_max/r_min)
	for p, b := range basis {
		if b[0] != 0 || b[1] != 0 || b[2] != 0 {
			// A scale coefficient: uniform in ln r.
			logPrior += -math.Log(r[p]) - math.Log(scaleWidth)
			sd[p] = r[p] * scaleWidth / math.Sqrt(12)
			continue
		}
		// A cross term 2√(XY)·cos: uniform in the cosine over width 1.
		var x, y float64
		switch {
		case b[3] != 0:
			x, y = form[1], form[2]
		case b[4] != 0:
			x, y = form[0], form[2]
		default:
			x, y = form[0], form[1]
		}
		w := 2 * math.Sqrt(x*y)
		logPrior -= math.Log(w)
		sd[p] = w / math.Sqrt(12)
	}
	c := nr
	if k.zeroFree {
		z := o.zeroBound()
		logPrior -= math.Log(2 * z)
		sd[c] = 2 * z / math.Sqrt(12)
		c++
	}
	if k.dispFree {
		logPrior -= math.Log(2 * dispRange)
		sd[c] = 2 * dispRange / math.Sqrt(12)
	}
	// H + P in units of the prior's deviations: I + D·H·D.
	h := mat.NewSymDense(d, nil)
	row := make([]float64, d)
	f := cell.FormOf(k.c.System, r)
	for i, l := range ls {
		if t[i] < 1e-6 || near[i] < 0 {
			continue
		}
		if _, ok := k.gradient(k.calc[calcOf(i)].h, f, basis, lambda, row); !ok {
			continue
		}
		for p := range row {
			row[p] *= sd[p]
		}
		w := t[i] / l.variance(sys)
		for a := 0; a < d; a++ {
			for b := a; b < d; b++ {
				h.SetSym(a, b, h.At(a, b)+w*row[a]*row[b])
			}
		}
	}
	for a := 0; a < d; a++ {
		h.SetSym(a, a, h.At(a, a)+1)
	}
	var ch mat.Cholesky
	logDet := 0.0
	if ch.Factorize(h) {
		logDet = ch.LogDet()
	}
	for a := 0; a < d; a++ {
		logDet -= 2 * math.Log(sd[a]) // det(H + P) = det(I + DHD)/det(D)²
	}
	return logPrior + float64(d)/2*math.Log(2*math.Pi) - logDet/2
}

// dispRange bounds the displacement shift's coefficient, degrees 2θ: a
// specimen 1 mm off the axis of a 240 mm goniometer gives 2s/R = 0.48°
// (the radius and the largest plausible displacement, common practice).
const dispRange = 0.5

// minDispLines is the fewest lines indexed from which the evidence
// refines a displacement shift beside the zero offset: it tells a shift
// that varies as cos θ from a cell error only over many lines.
const minDispLines = 12

// weigh computes the cand's evidence over all lines once. The search
// refined the cell on the first lines; here it is refined on all of
// them by iteratively reweighted least squares with the evidence's own
// weights (each line's chance of belonging to the cell, times its weight
// under the t distribution, over its variance; each line at its nearest
// calculated line), so that a line no calculated line explains moves
// nothing. With enough lines a displacement shift (cos θ) is tried as
// well, restrained by its prior. The refinement of highest evidence is
// kept (the shift's Occam factor charged).
func (k *cand) weigh(all []obs, sp span, o Options) {
	if k.whole != nil {
		return
	}
	top := qOf(math.Min(sp.hi+0.5, 179), k.zero-0.5, o.Wavelength)
	g := &cand{c: k.c, zero: k.zero, zeroFree: k.zeroFree, qTop: top}
	g.assign(all, o.Wavelength, 0)
	k.whole, k.ev = g, g.evidence(all, o.Wavelength, sp, o)
	if k.once {
		return
	}
	disps := []bool{false}
	if k.zeroFree && len(all) >= minDispLines {
		disps = append(disps, true)
	}
	for _, disp := range disps {
		h, ev := k.whole, k.ev
		for round := 0; round < 3; round++ {
			next := &cand{c: h.c, zero: h.zero, disp: h.disp, zeroFree: h.zeroFree, dispFree: disp, qTop: top}
			next.assignNearest(all, o.Wavelength)
			if !next.refineW(all, o.Wavelength, ev.weights, dispRange/3) || math.Abs(next.disp) > dispRange || math.Abs(next.zero) > o.zeroBound() {
				break
			}
			next.assign(all, o.Wavelength, 0)
			h, ev = next, next.evidence(all, o.Wavelength, sp, o)
			if ev.logE() > k.ev.logE() {
				k.whole, k.ev = h, ev
			}
		}
	}
}

// assignNearest assigns every line to its nearest calculated line, with
// no window (for a refinement whose weights judge the lines).
func (k *cand) assignNearest(ls []obs, lambda float64) {
	n := len(ls)
	k.ref, k.qc = make([]int, n), make([]float64, n)
	k.setCalc(qOf(math.Min(ls[n-1].tt+ls[n-1].tol+1, 179), k.zero-0.5, lambda))
	k.indexed = 0
	for i, o := range ls {
		j := k.nearest(qOf(o.tt, k.shift(o.tt), lambda), math.Inf(1))
		k.ref[i] = j
		if j >= 0 {
			k.qc[i] = k.calc[j].q
			k.indexed++
		}
	}
}

// probabilities returns the posterior probability of each ranked cand:
// its evidence over the sum of every ranked cand's and that of the model
// in which all n lines are foreign (no cell), every model equally likely
// a priori. The lattices the search did not find are not in the sum, so
// the probabilities are those given that the answer is among the
// candidates or none.
func probabilities(ks []*cand, all []obs, sp span) []float64 {
	null := nullLogL(all, sp.hi-sp.lo)
	if len(ks) > 0 && ks[0].ev.paired {
		// Weighed with second phases, each cell's evidence is averaged
		// over one phase and two, each with prior ½; the model of no
		// cell has no second phase of its own.
		null += math.Log(0.5)
	}
	top := null
	for _, k := range ks {
		top = math.Max(top, k.ev.logE())
	}
	sum := math.Exp(null - top)
	for _, k := range ks {
		sum += math.Exp(k.ev.logE() - top)
	}
	out := make([]float64, len(ks))
	for i, k := range ks {
		out[i] = math.Exp(k.ev.logE()-top) / sum
	}
	return out
}

// resolution returns the separation, degrees 2θ, below which two lines
// at 2θ show as one peak: half the width of the nearest observed line
// (two equal pseudo-Voigt lines show a single maximum up to a separation
// of 0.58 (Lorentzian) to 0.85 (Gaussian) of their FWHM, and a shoulder
// needs more), and not less than the narrowest window of the lines.
// Widths are known only when the lines carry them.
func resolution(ls []obs) func(tt float64) float64 {
	floor := math.Inf(1)
	for _, l := range ls {
		floor = math.Min(floor, l.tol)
	}
	return func(tt float64) float64 {
		i := sort.Search(len(ls), func(i int) bool { return ls[i].tt >= tt })
		w := 0.0
		switch {
		case i == len(ls):
			w = ls[i-1].fwhm
		case i == 0 || ls[i].tt-tt < tt-ls[i-1].tt:
			w = ls[i].fwhm
		default:
			w = ls[i-1].fwhm
		}
		return math.Max(floor, w/2)
	}
}
