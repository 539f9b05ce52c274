// Package synth simulates powder diffraction scans for the project's own
// tests and demo: the lines of one or more cells, with a K-alpha doublet
// (or a single line with an optional K-alpha2 residue, as a curved
// monochromator passes), K-beta leakage, instrument errors, a width
// curve, the low-angle asymmetry of axial divergence, a background and
// Poisson noise. The
// scans are invented test data; the simulation shares with the program
// only Bragg's law and the cell's reflection list (package cell), and
// writes its profile formula out again so that a mistake in the fitter's
// cannot cancel in a test.
package synth

import (
	"fmt"
	"hash/fnv"
	"math"
	"math/rand/v2"
	"sort"
	"strings"

	"reticle/cell"
)

const deg = math.Pi / 180

// A Phase is one crystalline phase of a simulated sample.
type Phase struct {
	Cell cell.Cell
	// Scale is the height of the phase's strongest line relative to the
	// scan's Peak height; zero means 1.
	Scale float64
	// Height gives a reflection's relative intensity; nil means
	// multiplicity × Lorentz–polarisation factor × a fixed pseudo-random
	// factor between 0.05 and 1 drawn from the indices.
	Height func(h cell.HKL, twoTheta float64, mult int) float64
	// Size is the phase's own size broadening, degrees 2θ: each line is
	// the instrument's line convolved with a Lorentzian of FWHM
	// Size/cos θ (the angular form of Scherrer's equation), its area
	// kept. Line.Height is then the height before the broadening. Zero
	// means lines as the instrument makes them.
	Size float64
	// Strain is the phase's own strain broadening, degrees 2θ: each line
	// is further convolved with a Gaussian of FWHM Strain·tan θ (Stokes
	// & Wilson 1944: a spread of d-spacings broadens a line in
	// proportion to tan θ), its area kept. Zero means none.
	Strain float64
}

// An Instrument describes the radiation and the instrument's errors.
type Instrument struct {
	Lambda1 float64 // K-alpha1 (or single) wavelength, Å
	Lambda2 float64 // K-alpha2, Å; zero for a single line
	// Ratio2 is the K-alpha2/K-alpha1 intensity; zero means 0.5 with
	// Lambda2 (a small value is the residue a monochromator passes).
	Ratio2 float64
	// Zero is the zero shift, degrees 2θ; Displacement the sample
	// displacement in mm (shift −2s·cos θ/R); Radius the goniometer
	// radius in mm (zero means 240).
	Zero, Displacement, Radius float64
	// U, V, W give the FWHM, degrees 2θ: FWHM² = U tan²θ + V tan θ + W
	// (Caglioti et al. 1958). All zero means U 0.004, V −0.001, W 0.0045.
	U, V, W float64
	// Eta is the pseudo-Voigt Lorentzian fraction; zero means 0.5.
	Eta float64
	// Axial is the axial-divergence spread, degrees 2θ at 2θ = 45°: each
	// line is the average of copies shifted by −Axial·cot 2θ·u² for u
	// uniform in [0, 1), the shape that rays tilted out of the
	// diffraction plane give (a tail towards low angles below 90° 2θ,
	// towards high angles above; the functional form as in Finger, Cox &
	// Jephcoat, J. Appl. Cryst. 27 (1994) 892, reduced to its leading
	// term). The line's position (Line.TwoTheta) stays the Bragg angle.
	// Zero means symmetric lines.
	Axial float64
	// KBeta is the K-beta wavelength, Å, and KBetaRatio the K-beta lines'
	// height relative to K-alpha1; zero means none.
	KBeta, KBetaRatio float64
}

// A Spec is a scan to simulate.
type Spec struct {
	Phases     []Phase
	Instrument Instrument
	// From, To and Step are the scan's range and step, degrees 2θ.
	From, To, Step float64
	// Peak is the height of the strongest line in counts; zero means
	// 5,000.
	Peak float64
	// Background gives the background counts at 2θ; nil means
	// 60 + 900/2θ.
	Background func(twoTheta float64) float64
	// Noiseless leaves the counts at their expected values.
	Noiseless bool
}

// A Line is one simulated reflection.
type Line struct {
	Phase    int
	HKL      []cell.HKL
	D        float64 // Å
	TwoTheta float64 // K-alpha1 position with the instrument errors, degrees
	Height   float64 // peak height of the K-alpha1 component, counts
	FWHM     float64 // the instrument's, degrees 2θ
	Size     float64 // FWHM of the phase's size broadening there, degrees 2θ (Phase.Size)
	Strain   float64 // FWHM of the phase's strain broadening there, degrees 2θ (Phase.Strain)
}

// A Scan is a simulated scan with its true lines.
type Scan struct {
	TwoTheta, Counts []float64
	Lines            []Line // sorted by 2θ
}

func (in Instrument) withDefaults() Instrument {
	if in.Radius == 0 {
		in.Radius = 240
	}
	if in.Lambda2 > 0 && in.Ratio2 == 0 {
		in.Ratio2 = 0.5
	}
	if in.U == 0 && in.V == 0 && in.W == 0 {
		in.U, in.V, in.W = 0.004, -0.001, 0.0045
	}
	if in.Eta == 0 {
		in.Eta = 0.5
	}
	return in
}

// position returns the observed 2θ of d-spacing d at wavelength lambda,
// with the zero shift and displacement.
func (in Instrument) position(d, lambda float64) float64 {
	tt := cell.TwoTheta(d, lambda)
	if math.IsNaN(tt) {
		return tt
	}
	return tt + in.Zero - 2*in.Displacement*math.Cos(tt/2*deg)/in.Radius/deg
}

// fwhm returns the width at 2θ.
func (in Instrument) fwhm(tt float64) float64 {
	t := math.Tan(tt / 2 * deg)
	return math.Sqrt(math.Max(in.U*t*t+in.V*t+in.W, 1e-6))
}

// pv is the pseudo-Voigt function of unit height, written out here.
func pv(x, x0, fwhm, eta float64) float64 {
	u := (x - x0) / fwhm
	return eta/(1+4*u*u) + (1-eta)*math.Exp(-4*math.Ln2*u*u)
}

// axialCopies is the number of shifted copies that make an asymmetric
// line.
const axialCopies = 24

// line returns a line of unit pseudo-Voigt height at x0 (before the
// axial spread) at x.
func (in Instrument) line(x, x0, fwhm float64) float64 {
	if in.Axial == 0 {
		return pv(x, x0, fwhm, in.Eta)
	}
	spread := in.Axial / math.Tan(x0*deg)
	var f float64
	for k := 0; k < axialCopies; k++ {
		u := (float64(k) + 0.5) / axialCopies
		f += pv(x, x0-spread*u*u, fwhm, in.Eta)
	}
	return f / axialCopies
}

// sizeSteps is the number of steps per FWHM of the narrowest of the
// line and its broadenings, and sizeReach the reach in FWHMs, of the
// convolution that broadens a line.
const (
	sizeSteps = 6
	sizeReach = 20
)

// A kernel is a sampled broadening function: offsets (degrees 2θ) and
// weights that sum to one.
type kernel struct{ s, w []float64 }

// newKernel returns the convolution of a Lorentzian of FWHM size with a
// Gaussian of FWHM strain (either may be zero), sampled finely enough
// for a line of FWHM fwhm, over sizeReach widths of the broader (the
// Lorentzian's tails beyond, 1.6 % of its area, are left out and the
// rest scaled up, so that the line keeps its area); nil when both are
// zero.
func newKernel(size, strain, fwhm float64) *kernel {
	if size <= 0 && strain <= 0 {
		return nil
	}
	h := fwhm
	for _, v := range []float64{size, strain} {
		if v > 0 {
			h = math.Min(h, v)
		}
	}
	h /= sizeSteps
	m := int(math.Ceil(sizeReach * math.Max(size, strain) / h))
	sample := func(f func(s float64) float64) []float64 {
		out := make([]float64, 2*m+1)
		for k := range out {
			out[k] = f(float64(k-m) * h)
		}
		return out
	}
	lor := []float64{1}
	if size > 0 {
		lor = sample(func(s float64) float64 { return 1 / (1 + 4*s*s/(size*size)) })
	}
	gau := []float64{1}
	if strain > 0 {
		gau = sample(func(s float64) float64 { return math.Exp(-4 * math.Ln2 * s * s / (strain * strain)) })
	}
	// The discrete convolution, centred: offsets run over the sum of
	// both reaches.
	n := len(lor) + len(gau) - 1
	k := &kernel{s: make([]float64, n), w: make([]float64, n)}
	c := (n - 1) / 2
	for i, a := range lor {
		for j, b := range gau {
			k.w[i+j] += a * b
		}
	}
	var sum, top float64
	for i := range k.w {
		k.s[i] = float64(i-c) * h
		sum += k.w[i]
		top = math.Max(top, k.w[i])
	}
	// Weights below 10⁻¹² of the largest (a Gaussian's far samples)
	// change no count and are dropped.
	kept := &kernel{}
	for i := range k.w {
		if k.w[i] >= 1e-12*top {
			kept.s, kept.w = append(kept.s, k.s[i]), append(kept.w, k.w[i]/sum)
		}
	}
	return kept
}

// broadened returns the instrument's line (line) at x convolved with the
// kernel k; the instrument's line when k is nil.
func (in Instrument) broadened(x, x0, fwhm float64, k *kernel) float64 {
	if k == nil {
		return in.line(x, x0, fwhm)
	}
	var f float64
	for i, s := range k.s {
		f += k.w[i] * in.line(x-s, x0, fwhm)
	}
	return f
}

// shade is a fixed pseudo-random factor in [0.05, 1) from the indices.
func shade(h cell.HKL, phase int) float64 {
	f := fnv.New32a()
	fmt.Fprintf(f, "%d %d %d %d", phase, h[0], h[1], h[2])
	return 0.05 + 0.95*float64(f.Sum32()%1000)/1000
}

// Simulate computes the scan.
func Simulate(s Spec, rng *rand.Rand) *Scan {
	in := s.Instrument.withDefaults()
	if s.Peak == 0 {
		s.Peak = 5000
	}
	if s.Background == nil {
		s.Background = func(tt float64) float64 { return 60 + 900/tt }
	}
	n := int(math.Round((s.To-s.From)/s.Step)) + 1
	out := &Scan{TwoTheta: make([]float64, n), Counts: make([]float64, n)}
	for i := range out.TwoTheta {
		out.TwoTheta[i] = s.From + float64(i)*s.Step
	}
	qmax := cell.QOf(math.Min(s.To+2, 179), in.Lambda1)
	for pi, ph := range s.Phases {
		scale := ph.Scale
		if scale == 0 {
			scale = 1
		}
		var lines []Line
		top := 0.0
		for _, r := range cell.Reflections(ph.Cell, qmax) {
			tt := in.position(r.D, in.Lambda1)
			if math.IsNaN(tt) || tt < s.From-1 || tt > s.To+1 {
				continue
			}
			var h float64
			if ph.Height != nil {
				h = ph.Height(r.HKL[0], tt, r.Mult)
			} else {
				th := tt / 2 * deg
				lp := (1 + math.Pow(math.Cos(2*th), 2)) / (math.Pow(math.Sin(th), 2) * math.Cos(th))
				h = float64(r.Mult) * lp * shade(r.HKL[0], pi)
			}
			top = math.Max(top, h)
			lines = append(lines, Line{Phase: pi, HKL: r.HKL, D: r.D, TwoTheta: tt, Height: h, FWHM: in.fwhm(tt), Size: ph.Size / math.Cos(tt/2*deg), Strain: ph.Strain * math.Tan(tt/2*deg)})
		}
		for i := range lines {
			lines[i].Height *= s.Peak * scale / top
		}
		out.Lines = append(out.Lines, lines...)
	}
	sort.SliceStable(out.Lines, func(i, j int) bool { return out.Lines[i].TwoTheta < out.Lines[j].TwoTheta })
	for i, x := range out.TwoTheta {
		out.Counts[i] = s.Background(x)
	}
	for _, l := range out.Lines {
		k := newKernel(l.Size, l.Strain, l.FWHM)
		comps := [][2]float64{{l.TwoTheta, l.Height}}
		if in.Lambda2 > 0 {
			comps = append(comps, [2]float64{in.position(l.D, in.Lambda2), l.Height * in.Ratio2})
		}
		if in.KBeta > 0 && in.KBetaRatio > 0 {
			comps = append(comps, [2]float64{in.position(l.D, in.KBeta), l.Height * in.KBetaRatio})
		}
		for _, c := range comps {
			if math.IsNaN(c[0]) {
				continue
			}
			reach := 40 * (l.FWHM + l.Size + l.Strain)
			lo := sort.SearchFloat64s(out.TwoTheta, c[0]-reach)
			for i := lo; i < n && out.TwoTheta[i] <= c[0]+reach; i++ {
				out.Counts[i] += c[1] * in.broadened(out.TwoTheta[i], c[0], l.FWHM, k)
			}
		}
	}
	if !s.Noiseless {
		for i, m := range out.Counts {
			out.Counts[i] = float64(poisson(rng, m))
		}
	}
	return out
}

// poisson returns a Poisson variate of the given mean: Knuth's
// multiplication method below 50, the normal approximation with continuity
// correction above.
func poisson(rng *rand.Rand, mean float64) int {
	if mean <= 0 {
		return 0
	}
	if mean > 50 {
		return int(math.Max(0, math.Floor(mean+math.Sqrt(mean)*rng.NormFloat64()+0.5)))
	}
	l := math.Exp(-mean)
	k, p := 0, 1.0
	for {
		p *= rng.Float64()
		if p <= l {
			return k
		}
		k++
	}
}

// Text writes the scan as a whitespace two-column export with a comment
// header.
func (s *Scan) Text(header string) []byte {
	var b strings.Builder
	for _, h := range strings.Split(header, "\n") {
		if h != "" {
			b.WriteString("# " + h + "\n")
		}
	}
	for i := range s.TwoTheta {
		fmt.Fprintf(&b, "%.4f %.0f\n", s.TwoTheta[i], s.Counts[i])
	}
	return []byte(b.String())
}
