package analysis

import (
	"math"

	"reticle/internal/order"
	"reticle/refine"
)

// classEvidence returns ln K, the natural log of the Bayes factor of
// "the extra reflections are present" over "they are all absent", from
// their measured intensities and esds (lineMeter.amplitude), in the
// manner of Markvardsen, David, Johnson & Shankland (2001, Acta Cryst.
// A57, 47), who decide systematic absences from the intensities a
// whole-pattern fit extracts by the probability of each class. Under
// "present" the class's true intensities are drawn from an exponential
// distribution (Wilson's acentric law, 1949) with mean μ; under
// "absent" they are zero; a measured intensity is normal about the true
// one with its esd. The class mean μ is unknown and is integrated over a
// prior uniform in ln μ from a tenth of the extras' median esd (a class
// that weak is indistinguishable from absent) to mean, the mean
// intensity of the lines both cells share (no class of reflections is
// stronger on average than the pattern's lines). The width of that
// prior is the class's Occam factor: absent extras make ln K small and
// negative; many present ones make it large.
//
// Under either hypothesis a reflection may instead coincide with a
// foreign line (another phase's, a tube's), with probability
// foreign(2θ), whose intensity is drawn like a line of the pattern (mean mean): one
// such line then costs ln foreign under both, and a class is decided by
// its reflections together, not by one of them (the robust likelihood
// of a mixture with an outlier class, as in Box & Tiao 1968).
//
// Per reflection, with t = Î/σ, s = σ/μ and M(u) = exp(u²/2)·Φ(−u),
// the likelihood ratio ∫₀^∞ N(Î; x, σ) e^(−x/μ)/μ dx / N(Î; 0, σ) is
// R(μ) = s·√(2π)·M(s − t); the reflection's factor in K at μ is
// ((1 − f)R(μ) + fR(mean)) / ((1 − f) + fR(mean)) for f = foreign(2θ).
// Reflections without an esd are skipped.
func classEvidence(extras []refine.PatternReflection, mean float64, foreign func(tt float64) float64) float64 {
	var sig []float64
	for _, r := range extras {
		if r.IntensityESD > 0 {
			sig = append(sig, r.IntensityESD)
		}
	}
	if len(sig) == 0 || !(mean > 0) {
		return 0
	}
	lo := order.Median(sig) / 10
	if !(mean > lo) {
		return 0
	}
	logR := func(r refine.PatternReflection, mu float64) float64 {
		s, t := r.IntensityESD/mu, r.Intensity/r.IntensityESD
		return math.Log(s) + 0.5*math.Log(2*math.Pi) + logMills(s-t)
	}
	// Per reflection, the terms that do not depend on μ: ln(1 − f), the
	// foreign line's ln(f·R(mean)), and the "absent" side's normaliser.
	lk, q, norm := make([]float64, len(extras)), make([]float64, len(extras)), make([]float64, len(extras))
	for j, r := range extras {
		if !(r.IntensityESD > 0) {
			continue
		}
		f := math.Min(math.Max(foreign(r.TwoTheta), 0), 0.5)
		lk[j] = math.Log1p(-f)
		q[j] = math.Log(f) + logR(r, mean)
		norm[j] = logAddExp(lk[j], q[j])
	}
	const grid = 64
	step := math.Log(mean/lo) / (grid - 1)
	logs := make([]float64, grid)
	top := math.Inf(-1)
	for g := range logs {
		mu := lo * math.Exp(float64(g)*step)
		var l float64
		for j, r := range extras {
			if !(r.IntensityESD > 0) {
				continue
			}
			l += logAddExp(lk[j]+logR(r, mu), q[j]) - norm[j]
		}
		logs[g] = l
		top = math.Max(top, l)
	}
	var sum float64
	for _, l := range logs {
		sum += math.Exp(l - top)
	}
	return top + math.Log(sum/grid)
}

// logAddExp returns ln(eˣ + eʸ).
func logAddExp(x, y float64) float64 {
	if math.IsInf(x, -1) {
		return y
	}
	if math.IsInf(y, -1) {
		return x
	}
	if x < y {
		x, y = y, x
	}
	return x + math.Log1p(math.Exp(y-x))
}

// logMills returns ln M(u), M(u) = exp(u²/2)·Φ(−u), Φ the standard
// normal distribution function: directly below u = 25, and above by the
// asymptotic series M(u) ≈ (1 − u⁻² + 3u⁻⁴ − 15u⁻⁶)/(u√(2π))
// (Abramowitz & Stegun 1964, 26.2.12), whose error there is below
// 105u⁻⁸ < 10⁻⁹ of M (directly, Φ(−u) would underflow from u ≈ 38).
func logMills(u float64) float64 {
	if u < 25 {
		return u*u/2 + math.Log(0.5*math.Erfc(u/math.Sqrt2))
	}
	v := 1 / (u * u)
	return math.Log((1 - v + 3*v*v - 15*v*v*v) / (u * math.Sqrt(2*math.Pi)))
}

// noiseScale returns the factor by which the measured intensities'
// esds understate their scatter: the root mean square of t = Î/σ over
// the negative estimates, which noise alone makes (true intensities are
// not negative; under a correct esd their t are the negative half of a
// standard normal, whose mean square is 1), or 1 when that is smaller
// or fewer than minNegative estimates are negative. A fit whose model
// misses the profile leaves residuals of both signs beside its lines,
// and their size is told by this scatter, not by counting statistics.
func noiseScale(rs []refine.PatternReflection) float64 {
	var s2 float64
	n := 0
	for _, r := range rs {
		if r.IntensityESD > 0 && r.Intensity < 0 {
			t := r.Intensity / r.IntensityESD
			s2 += t * t
			n++
		}
	}
	if n < minNegative {
		return 1
	}
	return math.Max(1, math.Sqrt(s2/float64(n)))
}

// minNegative is the fewest negative estimates from which noiseScale
// takes a scale (the mean square of three halves of normals has a
// relative spread of about 0.8; fewer say nothing).
const minNegative = 3

// scaled returns the reflections with their esds multiplied by k.
func scaled(rs []refine.PatternReflection, k float64) []refine.PatternReflection {
	out := append([]refine.PatternReflection(nil), rs...)
	for i := range out {
		out[i].IntensityESD *= k
	}
	return out
}
