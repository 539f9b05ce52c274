package refine

import (
	"math"
	"math/rand/v2"
	"sort"

	"gonum.org/v1/gonum/mat"

	"reticle/cell"
)

// BootstrapRounds is the number of simulated data sets from which the
// covariance of a cell refined with corrections chosen from the data is
// found (see Selection): a variance from 400 draws is within about 7 %
// of its value, an esd within 4 %.
const BootstrapRounds = 400

// minSpreadDOF is the fewest degrees of freedom for which the scatter of
// the lines about the reference fit may set the draws' scatter below
// their esds: with 5, χ²_red is still uncertain by ±63 % (√(2/ν)), and
// lower it would rest on chance.
const minSpreadDOF = 5

// A linearFit is one model's least-squares fit, linearised at its
// solution, ready to be refitted to data that differ a little from those
// it was fitted to.
type linearFit struct {
	res  *Result
	pinv *mat.Dense  // (AᵀA)⁻¹Aᵀ of the weighted Jacobian A, k × n
	qt   *mat.Dense  // Qᵀ of A = QR, k × n: |Qᵀu|² is the part of u the model explains
	k    int         // parameters: reciprocal coefficients, then corrections
	nr   int         // reciprocal coefficients
	j6   [][]float64 // ∂(a, b, c, α, β, γ)/∂ coefficients, 6 × nr
	yhat []float64   // fitted positions of the lines, degrees 2θ
	corr []int       // index in shifts of each refined correction

	delta, qtu *mat.VecDense // scratch, k each
}

// linearise builds the linear fit of res at its solution, for the lines
// rows (indices into res.Residuals). It fails when the lines do not
// determine the parameters.
func linearise(res *Result, rows []int, opt Options) (*linearFit, bool) {
	m := newModel(res.Cell.System, opt.Wavelength, opt.Radius)
	rc := start(res.Cell)
	nr := len(rc)
	var corr []int
	for i, x := range corrNames {
		if res.Corrections.Has(x.c) {
			corr = append(corr, i)
		}
	}
	k := nr + len(corr)
	if len(rows) <= k {
		return nil, false
	}
	a := mat.NewDense(len(rows), k, nil)
	f := &linearFit{res: res, k: k, nr: nr, j6: res.Cell.ReciprocalToDirect(), yhat: make([]float64, len(rows)), corr: corr}
	for r, i := range rows {
		o := res.Residuals[i]
		pt := m.eval(rc, o.HKL[0], res.shifts)
		if !pt.inside {
			return nil, false
		}
		f.yhat[r] = pt.tt
		for c, d := range pt.dR {
			a.Set(r, c, d/o.ESD)
		}
		for c, i := range corr {
			a.Set(r, nr+c, pt.dCorr[i]/o.ESD)
		}
	}
	var qr mat.QR
	qr.Factorize(a)
	if qr.Cond() > 1e14 {
		return nil, false
	}
	var q, rm mat.Dense
	qr.QTo(&q)
	qr.RTo(&rm)
	n := len(rows)
	f.qt = mat.DenseCopyOf(q.Slice(0, n, 0, k).T())
	// A⁺ = R⁻¹Qᵀ.
	var rinv mat.Dense
	if err := rinv.Inverse(rm.Slice(0, k, 0, k)); err != nil {
		return nil, false
	}
	f.pinv = mat.NewDense(k, n, nil)
	f.pinv.Mul(&rinv, f.qt)
	f.delta, f.qtu = mat.NewVecDense(k, nil), mat.NewVecDense(k, nil)
	return f, true
}

// bootstrap returns the result of the whole procedure on fits (each a
// model of corrections refined on the same lines) — refine every model,
// keep the one of lowest BIC — in the parameters of the fit with the most
// corrections, its values and covariance found from BootstrapRounds
// simulated sets of line positions:
//
//   - each set is drawn about the calculated positions of one of the
//     models, taken with its Akaike weight exp(−AIC/2), AIC = χ² + 2k
//     (Akaike 1973; Burnham & Anderson, Model Selection and Multimodel
//     Inference, 2002; from memory): which corrections the instrument
//     needs is itself uncertain, and a fit is a poor stand-in for the
//     truth when its corrections rest on noise (the fit with the most
//     corrections, when the lines barely separate them);
//   - each line is moved by its esd times the scatter of the lines about
//     the fit with the most corrections (√χ²_red, a measure that does not
//     depend on the choice);
//   - every model is refitted to each set by its least-squares fit
//     linearised at its solution (exact to far better than the esds over
//     such small changes) and the one of lowest BIC kept;
//   - the reported cell and corrections are the mean over the sets of the
//     kept fits (the smoothed, or bagged, estimate of Efron, J. Am.
//     Stat. Assoc. 109 (2014) 991; from memory): it does not jump between
//     models as the choice on the data alone does, and lies closer to the
//     truth;
//   - the covariance is the mean square of the kept fits' departures from
//     the model each set was drawn about: the scatter of the choice and
//     the bias of leaving a correction out, together.
//   - when the fit without corrections is credible (uncorrectedCredible),
//     each esd is instead the half-width that holds 68.27 % of those
//     departures, the correlations kept (coverageScale): the shifts are
//     then below what the lines show, and the mean square is set by the
//     few sets on which a fit with corrections is kept on noise, while the
//     value reported is the mean over all sets.
//
// A correction a kept model lacks counts as zero. The generator is
// seeded by the data, so a result is reproducible. It returns nil when
// the fits cannot be linearised, or when no fit holds every correction
// of the others (the fit with both would need a correction beyond
// plausible bounds). The fits are not modified.
func bootstrap(fits []*Result, opt Options) *Result {
	full := -1
	for k, f := range fits {
		if f != nil && (full < 0 || f.Corrections.Count() > fits[full].Corrections.Count()) {
			full = k
		}
	}
	if full < 0 {
		return nil
	}
	ref := fits[full]
	// The values are reported in the parameters of ref: every correction
	// a kept fit can hold must be among them.
	for _, f := range fits {
		if f != nil && f.Corrections&^ref.Corrections != 0 {
			return nil
		}
	}
	// The lines in the fit, in the order every model lists them.
	var rows []int
	for i, r := range ref.Residuals {
		if !r.Excluded {
			rows = append(rows, i)
		}
	}
	var lin []*linearFit
	for _, f := range fits {
		if f == nil {
			continue
		}
		if len(f.Residuals) != len(ref.Residuals) {
			return nil
		}
		l, ok := linearise(f, rows, opt)
		if !ok {
			return nil
		}
		lin = append(lin, l)
	}
	weights := akaikeWeights(lin)
	spread := 1.0
	if ref.DOF > 0 {
		spread = math.Sqrt(ref.Chi2Reduced)
		if ref.DOF < minSpreadDOF {
			spread = math.Max(spread, 1)
		}
	}
	n := len(rows)
	esd := make([]float64, n)
	seed := uint64(n)
	for r, i := range rows {
		esd[r] = ref.Residuals[i].ESD
		seed = seed*1000003 + math.Float64bits(ref.Residuals[i].TwoTheta)
	}
	rng := rand.New(rand.NewPCG(seed, 0x5e1ec7))

	res := ref.clone()
	np := len(res.Params)
	// Each model's value of every reported parameter (0 for a correction
	// it does not refine) and its cell's six parameters.
	values := make([][]float64, len(lin))
	cells := make([][6]float64, len(lin))
	for k, l := range lin {
		cells[k] = l.res.Cell.Params()
		values[k] = make([]float64, np)
		for i, p := range res.Params {
			if q, ok := l.res.Param(p.Name); ok {
				values[k][i] = q.Value
			}
		}
	}
	pc := make([][]float64, np)
	for i := range pc {
		pc[i] = make([]float64, np)
	}
	var c6 cell.Covariance
	u := mat.NewVecDense(n, nil)
	e := make([]float64, np)
	eps := make([]float64, n)
	// The departures themselves, kept when the esds are taken from
	// their quantiles (see uncorrectedCredible).
	credible := uncorrectedCredible(lin, weights)
	dep6 := make([][]float64, 6)
	depP := make([][]float64, np)
	meanR := make([]float64, lin[0].nr) // Σ of the kept reciprocal coefficients
	var meanShift shifts                // Σ of the kept corrections
	for b := 0; b < BootstrapRounds; b++ {
		gen := draw(rng, weights)
		for r := range eps {
			eps[r] = spread * rng.NormFloat64()
		}
		var kept *linearFit
		var keptDelta []float64
		var keptShift shifts
		least := math.Inf(1)
		for _, l := range lin {
			// The draw, weighted, less the model's fitted positions: the
			// model's parameters move by A⁺u, and its χ² is |u|² less
			// the part it explains.
			for r := 0; r < n; r++ {
				u.SetVec(r, (lin[gen].yhat[r]-l.yhat[r])/esd[r]+eps[r])
			}
			delta, qtu := l.delta, l.qtu
			delta.MulVec(l.pinv, u)
			qtu.MulVec(l.qt, u)
			chi2 := mat.Dot(u, u) - mat.Dot(qtu, qtu)
			v := l.res.shifts
			for c, i := range l.corr {
				v[i] += delta.AtVec(l.nr + c)
			}
			if v.implausible() != nil {
				continue
			}
			if b := bic(chi2, len(l.res.Params), n); b < least {
				kept, least, keptShift = l, b, v
				keptDelta = append(keptDelta[:0], delta.RawVector().Data...)
			}
		}
		if kept == nil {
			return nil
		}
		// The kept model's cell and corrections on this draw, and their
		// departure from the model drawn about.
		rc := start(kept.res.Cell)
		for c := range meanR {
			meanR[c] += rc[c] + keptDelta[c]
		}
		for i := range meanShift {
			meanShift[i] += keptShift[i]
		}
		q := kept.res.Cell.Params()
		for i := 0; i < 6; i++ {
			for c := 0; c < kept.nr; c++ {
				q[i] += kept.j6[i][c] * keptDelta[c]
			}
		}
		q0 := cells[gen]
		for i := 0; i < 6; i++ {
			if credible {
				dep6[i] = append(dep6[i], q[i]-q0[i])
			}
			for j := 0; j < 6; j++ {
				c6[i][j] += (q[i] - q0[i]) * (q[j] - q0[j])
			}
		}
		for i, p := range res.Params {
			var x float64
			if k := corrIndex(p.Name); k >= 0 {
				x = keptShift[k]
			} else {
				x = q[paramIndex(p.Name)]
			}
			e[i] = x - values[gen][i]
			if credible {
				depP[i] = append(depP[i], e[i])
			}
		}
		for i := range e {
			for j := range e {
				pc[i][j] += e[i] * e[j]
			}
		}
	}
	for c := range meanR {
		meanR[c] /= BootstrapRounds
	}
	for i := range meanShift {
		meanShift[i] /= BootstrapRounds
	}
	m := newModel(res.Cell.System, res.Wavelength, res.Radius)
	c, err := m.cellOf(meanR, res.Cell.Centring)
	if err != nil {
		return nil
	}
	for i := 0; i < 6; i++ {
		for j := 0; j < 6; j++ {
			c6[i][j] /= BootstrapRounds
		}
	}
	for i := range pc {
		for j := range pc {
			pc[i][j] /= BootstrapRounds
		}
	}
	res.setValues(m, c, meanR, meanShift)
	if credible {
		c6s := make([][]float64, 6)
		for i := range c6s {
			c6s[i] = c6[i][:]
		}
		coverageScale(c6s, dep6)
		coverageScale(pc, depP)
	}
	setCovariance(res, c6, pc)
	return res
}

// akaikeWeights returns each fit's Akaike weight exp(−AIC/2), AIC = χ² +
// 2k with k its parameters, normalised to a sum of one.
func akaikeWeights(lin []*linearFit) []float64 {
	w := make([]float64, len(lin))
	best := math.Inf(1)
	for k, l := range lin {
		w[k] = l.res.Chi2 + 2*float64(len(l.res.Params)) // AIC
		best = math.Min(best, w[k])
	}
	total := 0.0
	for k := range w {
		w[k] = math.Exp(-(w[k] - best) / 2)
		total += w[k]
	}
	for k := range w {
		w[k] /= total
	}
	return w
}

// draw picks an index with the probabilities p (summing to one).
func draw(rng *rand.Rand, p []float64) int {
	x := rng.Float64()
	for k, w := range p {
		if x -= w; x < 0 {
			return k
		}
	}
	return len(p) - 1
}

// paramIndex returns the position of a cell parameter in
// cell.ParamNames.
func paramIndex(name string) int {
	for i, n := range cell.ParamNames {
		if n == name {
			return i
		}
	}
	return -1
}

// credibleRatio is the likelihood ratio beyond which one model is
// fairly strongly preferred to another (Royall, Statistical Evidence: A
// Likelihood Paradigm, 1997, whose benchmarks are 8 and 32; from
// memory): an Akaike weight within that factor of the best is credible.
const credibleRatio = 8

// uncorrectedCredible reports whether the fit without any correction is
// among fits and credible: its Akaike weight is at least 1/credibleRatio
// of the best. The instrument's shifts are then below what the lines can
// show.
func uncorrectedCredible(lin []*linearFit, weights []float64) bool {
	best := 0.0
	for _, w := range weights {
		best = math.Max(best, w)
	}
	for k, l := range lin {
		if l.res.Corrections == 0 && weights[k] >= best/credibleRatio {
			return true
		}
	}
	return false
}

// coverageQuantile is the share of a normal distribution within one
// standard deviation of its mean.
const coverageQuantile = 0.6827

// coverageScale rescales the covariance cov so that each parameter's esd
// is the half-width of the interval about zero that holds 68.27 % of its
// simulated departures dep (a coverage interval from the quantiles of the
// simulated distribution, JCGM 101:2008 §7.7; from memory), keeping the
// correlations. The departures are a mixture: most sets keep a model whose
// cell scatters as the lines do, a few keep one whose cell scatters many
// times more; their mean square is set by those few, their quantile by
// what the value does with probability 68 %, the meaning of an esd.
func coverageScale(cov [][]float64, dep [][]float64) {
	f := make([]float64, len(cov))
	for i := range cov {
		f[i] = 1
		if cov[i][i] <= 0 || len(dep[i]) == 0 {
			continue
		}
		a := make([]float64, len(dep[i]))
		for k, x := range dep[i] {
			a[k] = math.Abs(x)
		}
		sort.Float64s(a)
		q := a[int(coverageQuantile*float64(len(a)-1)+0.5)]
		if q > 0 {
			f[i] = q / math.Sqrt(cov[i][i])
		}
	}
	for i := range cov {
		for j := range cov[i] {
			cov[i][j] *= f[i] * f[j]
		}
	}
}
