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

// A Lattice is one of the fourteen Bravais lattices (rhombohedral on
// hexagonal axes).
type Lattice struct {
	System   cell.System
	Centring cell.Centring
}

func (l Lattice) String() string { return fmt.Sprintf("%s %s", l.System, l.Centring) }

// Lattices are the fourteen Bravais lattices.
var Lattices = []Lattice{
	{cell.Cubic, cell.P}, {cell.Cubic, cell.I}, {cell.Cubic, cell.F},
	{cell.Tetragonal, cell.P}, {cell.Tetragonal, cell.I},
	{cell.Hexagonal, cell.P}, {cell.Rhombohedral, cell.R},
	{cell.Orthorhombic, cell.P}, {cell.Orthorhombic, cell.C}, {cell.Orthorhombic, cell.I}, {cell.Orthorhombic, cell.F},
	{cell.Monoclinic, cell.P}, {cell.Monoclinic, cell.C},
	{cell.Triclinic, cell.P},
}

// A Case is a drawn scan: what to simulate, and the truth to score
// against.
type Case struct {
	// Truth is the lattice of the scan in the conventional cell of its
	// highest metric symmetry: a cell drawn with an exact pseudo-
	// symmetric metric (a tetragonal I cell with c/a = √2) has the
	// higher lattice (cubic F) as its truth.
	Truth cell.Cell
	// Drawn is the cell the lines were simulated from.
	Drawn cell.Cell
	Spec  Spec
	// Conditions says, in words, what was drawn.
	Conditions []string
	// Lambda is the K-alpha1 (or single) wavelength, Å, and Doublet
	// whether the scan has a K-alpha2 line; ScanTo is the scan's end,
	// degrees 2θ.
	Lambda  float64
	Doublet bool
}

// Hölzer et al., Phys. Rev. A 56 (1997) 4554 (from memory): Cu K-alpha1
// and K-alpha2, Å.
const (
	cuKa1 = 1.5405929
	cuKa2 = 1.5444274
)

// drawBounds are the limits of the cells Draw makes: edges of the
// conventional cell 2.5–30 Å, the shortest lattice translation at least
// 2.5 Å, volumes to 3 000 Å³.
const (
	minEdge   = 2.5
	maxEdge   = 30
	maxVolume = 3000
)

// Draw draws a random cell of the lattice and random conditions, and
// returns the scan to simulate with the truth. The conditions, each
// drawn independently:
//   - radiation: a laboratory Cu K-alpha doublet with a zero shift and a
//     sample displacement (each uniform within ±0.05° and ±0.05 mm), or
//     a single line (monochromated Cu K-alpha1) with none;
//   - counts: the strongest line 300–30 000 counts above the background
//     (log-uniform), Poisson noise;
//   - a foreign phase (one case in four): a small cubic or hexagonal
//     cell at 3–10 % of the main phase's strongest line;
//   - few lines (one case in seven): the scan ends after the main
//     phase's 6th–12th line;
//   - a pseudo-symmetric metric (one case in five where the lattice
//     has one): a tetragonal I cell with c/a = √2 (cubic F), a
//     tetragonal cell with c = a (cubic), an orthorhombic cell with two
//     equal edges (tetragonal), a monoclinic cell with β = 90°
//     (orthorhombic), a rhombohedral cell of angle 60°, 90° or 109.47°
//     (cubic F, P, I) — exactly, or 0.3 % away from it.
//
// Cells drawn without a pseudo-symmetric metric have none within 0.5 %
// (0.5°): their truth is the lattice drawn. The scan runs from 5° to
// 120° 2θ or to the main phase's 60th line, whichever is first.
func Draw(rng *rand.Rand, lat Lattice) Case {
	var cs Case
	pseudo := rng.Float64() < 0.2
	for {
		var ok bool
		cs, ok = drawCell(rng, lat, pseudo)
		if ok {
			break
		}
	}
	lab := rng.Float64() < 0.5
	in := Instrument{Lambda1: cuKa1}
	cs.Lambda = cuKa1
	if lab {
		in.Lambda2 = cuKa2
		in.Zero = 0.1 * (rng.Float64() - 0.5)
		in.Displacement = 0.1 * (rng.Float64() - 0.5)
		cs.Doublet = true
		cs.Conditions = append(cs.Conditions, fmt.Sprintf("Cu doublet, zero %+.3f°, displacement %+.3f mm", in.Zero, in.Displacement))
	} else {
		cs.Conditions = append(cs.Conditions, "Cu K-alpha1")
	}
	peak := 300 * math.Pow(100, rng.Float64())
	cs.Conditions = append(cs.Conditions, fmt.Sprintf("%.0f counts", peak))
	salt := rng.Uint64()
	phases := []Phase{{Cell: cs.Drawn, Height: heights(salt)}}
	if rng.Float64() < 0.25 {
		var f cell.Cell
		if rng.Float64() < 0.5 {
			f = cell.Must(cell.Cubic, []cell.Centring{cell.P, cell.I, cell.F}[rng.IntN(3)], 3+5*rng.Float64())
		} else {
			a := 2.8 + 3*rng.Float64()
			f = cell.Must(cell.Hexagonal, cell.P, a, a*(0.8+1.2*rng.Float64()))
		}
		scale := 0.03 + 0.07*rng.Float64()
		phases = append(phases, Phase{Cell: f, Scale: scale, Height: heights(salt + 1)})
		cs.Conditions = append(cs.Conditions, fmt.Sprintf("foreign %v at %.0f %%", f, 100*scale))
	}
	// The scan's end: 120°, or the 60th line, or (few lines) the 6th to
	// 12th.
	qs := distinctQ(cs.Drawn, cell.QOf(120, cuKa1))
	to := 120.0
	last := 60
	if rng.Float64() < 1.0/7 {
		last = 6 + rng.IntN(7)
		cs.Conditions = append(cs.Conditions, fmt.Sprintf("%d lines", last))
	}
	if len(qs) > last {
		a := cell.TwoThetaOfQ(qs[last-1], cuKa1)
		b := cell.TwoThetaOfQ(qs[last], cuKa1)
		to = math.Min(to, (a+b)/2)
	}
	from := 5.0
	if first := cell.TwoThetaOfQ(qs[0], cuKa1); first-3 > from {
		from = math.Min(10, first-3)
	}
	cs.Spec = Spec{Phases: phases, Instrument: in, From: from, To: math.Max(to, from+10), Step: 0.02, Peak: peak}
	return cs
}

// distinctQ lists the distinct Q of a cell's reflections up to qmax.
func distinctQ(c cell.Cell, qmax float64) []float64 {
	var out []float64
	for _, r := range cell.Reflections(c, qmax) {
		if n := len(out); n == 0 || r.Q-out[n-1] > 1e-7*r.Q {
			out = append(out, r.Q)
		}
	}
	sort.Float64s(out)
	return out
}

// heights returns a height law: multiplicity × Lorentz–polarisation
// factor × a pseudo-random factor 0.05–1 drawn from the indices and the
// salt, so that each drawn case has a structure of its own.
func heights(salt uint64) func(h cell.HKL, tt float64, mult int) float64 {
	return func(h cell.HKL, tt float64, mult int) float64 {
		f := fnv.New64a()
		fmt.Fprintf(f, "%d %d %d %d", salt, h[0], h[1], h[2])
		shade := 0.05 + 0.95*float64(f.Sum64()%1000)/1000
		th := tt / 2 * deg
		lp := (1 + math.Pow(math.Cos(2*th), 2)) / (math.Pow(math.Sin(th), 2) * math.Cos(th))
		return float64(mult) * lp * shade
	}
}

// logUniform draws from [lo, hi] uniformly in the logarithm.
func logUniform(rng *rand.Rand, lo, hi float64) float64 {
	return lo * math.Pow(hi/lo, rng.Float64())
}

// drawCell draws the cell of a case; false means try again (out of
// bounds, or an accidental higher metric).
func drawCell(rng *rand.Rand, lat Lattice, pseudo bool) (Case, bool) {
	s, cen := lat.System, lat.Centring
	edge := func() float64 { return logUniform(rng, minEdge, maxEdge) }
	var c cell.Cell
	var err error
	cs := Case{}
	off := rng.Float64() < 0.5 // a pseudo-symmetric metric 0.3 % away, not exact
	mark := func(what string) {
		if off {
			cs.Conditions = append(cs.Conditions, "pseudo-symmetric, 0.3 % from "+what)
		} else {
			cs.Conditions = append(cs.Conditions, "metric exactly "+what)
		}
	}
	near := func(x float64) float64 {
		if off {
			if rng.Float64() < 0.5 {
				return x * 1.003
			}
			return x * 0.997
		}
		return x
	}
	switch s {
	case cell.Cubic:
		c, err = cell.New(s, cen, edge())
		pseudo = false
	case cell.Tetragonal, cell.Hexagonal:
		a, cc := edge(), edge()
		switch {
		case pseudo && s == cell.Tetragonal && cen == cell.I && rng.Float64() < 0.5:
			cc = near(a * math.Sqrt2)
			mark("cubic F (c/a = √2)")
		case pseudo && s == cell.Tetragonal:
			cc = near(a)
			mark("cubic (c = a)")
		default:
			pseudo = false
		}
		c, err = cell.New(s, cen, a, cc)
	case cell.Rhombohedral:
		a := edge()
		ratio := logUniform(rng, 0.4, 6)
		if pseudo {
			// c/a on hexagonal axes of a rhombohedral lattice of angle
			// 60° (cubic F), 90° (cubic P), 109.47° (cubic I).
			r := []struct {
				v    float64
				name string
			}{{math.Sqrt(6), "cubic F (angle 60°)"}, {math.Sqrt(1.5), "cubic P (angle 90°)"}, {math.Sqrt(3.0 / 8), "cubic I (angle 109.47°)"}}[rng.IntN(3)]
			ratio = near(r.v)
			mark(r.name)
		}
		c, err = cell.New(s, cen, a, a*ratio)
	case cell.Orthorhombic:
		a, b, cc := edge(), edge(), edge()
		if pseudo {
			b = near(a)
			mark("tetragonal (a = b)")
		}
		c, err = cell.New(s, cen, a, b, cc)
	case cell.Monoclinic:
		beta := 90.5 + 34.5*rng.Float64()
		if pseudo {
			beta = 90
			if off {
				beta = 90 * 1.003
			}
			mark("orthorhombic (β = 90°)")
		}
		c, err = cell.New(s, cen, edge(), edge(), edge(), beta)
	default:
		var ang [3]float64
		for i := range ang {
			for {
				ang[i] = 60 + 60*rng.Float64()
				if math.Abs(ang[i]-90) >= 1 {
					break
				}
			}
		}
		c, err = cell.New(s, cen, edge(), edge(), edge(), ang[0], ang[1], ang[2])
		pseudo = false
	}
	if err != nil || c.Check() != nil || c.Volume() > maxVolume || !(c.Volume() > 0) {
		return cs, false
	}
	red, err := cell.Reduce(c)
	if err != nil || red.Cell.A < minEdge || math.Max(c.A, math.Max(c.B, c.C)) > maxEdge {
		return cs, false
	}
	cs.Drawn = c
	// The truth: the highest-symmetry description of the lattice within
	// rounding (an exact pseudo-symmetric metric), and no cell drawn
	// plainly may have a higher one within 0.5 %.
	cs.Truth = c
	tol := cell.Tolerance{Length: 1e-6, Angle: 1e-4}
	if !pseudo {
		tol = cell.Tolerance{Length: 0.005, Angle: 0.5}
	}
	if h, ok := highest(red, tol); ok && h.System.LaueOrder() > c.System.LaueOrder() {
		if !pseudo || off {
			return cs, false
		}
		cs.Truth = h
	}
	if pseudo && !off && cs.Truth.System == c.System {
		return cs, false // the exact metric should have raised it
	}
	cs.Conditions = append([]string{fmt.Sprintf("drawn %v", c)}, cs.Conditions...)
	return cs, true
}

// highest returns the description of a reduced lattice in the system of
// highest symmetry whose metric it has within tol.
func highest(red cell.Reduced, tol cell.Tolerance) (cell.Cell, bool) {
	for _, s := range []cell.System{cell.Cubic, cell.Hexagonal, cell.Tetragonal, cell.Rhombohedral, cell.Orthorhombic, cell.Monoclinic} {
		if st := cell.Settings(red, s, tol); len(st) > 0 {
			c := st[0].Cell
			c.System = s
			return c, true
		}
	}
	return red.Cell, false
}

// String describes the case on one line.
func (c Case) String() string {
	return fmt.Sprintf("truth %v; %s", c.Truth, strings.Join(c.Conditions, "; "))
}

// SameLines reports whether two cells allow the same d-spacings, within
// 0.1 % in d, among the first n of the truth's lines up to qmax (Å⁻²; n
// = 0: all of them) and no others up to the last of those: the test of
// the public benchmark's scorer, which takes any cell of the lattice.
func SameLines(truth, got cell.Cell, qmax float64, n int) bool {
	tq := distinctQ(truth, qmax)
	if n > 0 && len(tq) > n {
		tq = tq[:n]
	}
	if len(tq) == 0 {
		return false
	}
	gq := distinctQ(got, tq[len(tq)-1]*1.001)
	near := func(q float64, set []float64) bool {
		i := sort.SearchFloat64s(set, q*(1-2e-3))
		return i < len(set) && set[i] <= q*(1+2e-3)
	}
	for _, q := range tq {
		if !near(q, gq) {
			return false
		}
	}
	for _, q := range gq {
		if !near(q, tq) {
			return false
		}
	}
	return true
}
