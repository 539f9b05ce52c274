package refine

import (
	"fmt"
	"math"
	"strings"
)

// A Corrections value is a set of instrument corrections of the line
// positions, each a parameter of the refinement.
type Corrections uint8

// The corrections. Each shifts the calculated position of a line at Bragg
// angle θ by (in radians of 2θ, R the goniometer radius):
const (
	// Zero: a constant zero shift Δ2θ₀ of the goniometer.
	Zero Corrections = 1 << iota
	// Displacement: a sample surface displaced by s (mm, positive
	// towards the source side, which lowers 2θ): −2s·cos θ/R.
	Displacement
	// Transparency: X-rays entering a weakly absorbing thick sample
	// (linear absorption coefficient μ) to a mean depth τ = 1/(2μ) (mm):
	// −τ·sin 2θ/R (the shift of an infinitely thick flat sample in
	// Bragg–Brentano geometry; Klug & Alexander, X-ray Diffraction
	// Procedures, 2nd ed. (1974), ch. 5, from memory).
	Transparency
)

// None is the empty set of corrections.
const None Corrections = 0

// Auto asks for the corrections to be chosen from the data (see
// Options.Corrections and Selection): the models of none, zero shift,
// displacement and both are compared, and with Transparency in the set
// also each of them with transparency added.
const Auto Corrections = 1 << 7

// corrNames lists the corrections in parameter order.
var corrNames = []struct {
	c          Corrections
	name, unit string
}{{Zero, "zero", "° 2θ"}, {Displacement, "displacement", "mm"}, {Transparency, "transparency", "mm"}}

// nCorr is the number of corrections.
const nCorr = 3

// Has reports whether the set holds c.
func (s Corrections) Has(c Corrections) bool { return s&c == c }

// Count is the number of corrections in the set.
func (s Corrections) Count() int {
	n := 0
	for _, x := range corrNames {
		if s.Has(x.c) {
			n++
		}
	}
	return n
}

// String names the corrections joined by "+" (e.g. "zero+displacement"),
// or "none".
func (s Corrections) String() string {
	var w []string
	if s.Has(Auto) {
		w = append(w, "auto")
	}
	for _, x := range corrNames {
		if s.Has(x.c) {
			w = append(w, x.name)
		}
	}
	if len(w) == 0 {
		return "none"
	}
	return strings.Join(w, "+")
}

// ParseCorrections reads corrections named as String prints them, joined
// by "+" or ",": zero, displacement, transparency, none, or auto (chosen
// from the data; "auto+transparency" lets the choice add transparency).
func ParseCorrections(text string) (Corrections, error) {
	var s Corrections
	for _, w := range strings.FieldsFunc(strings.ToLower(text), func(r rune) bool { return r == '+' || r == ',' || r == ' ' }) {
		if w == "auto" {
			s |= Auto
			continue
		}
		found := false
		for _, x := range corrNames {
			if w == x.name {
				s |= x.c
				found = true
			}
		}
		if !found && w != "none" {
			return 0, fmt.Errorf("unknown correction %q (want auto, zero, displacement, transparency or none, joined by +)", w)
		}
	}
	return s, nil
}

// MarshalText writes the set as String does.
func (s Corrections) MarshalText() ([]byte, error) { return []byte(s.String()), nil }

// UnmarshalText reads a set as ParseCorrections does.
func (s *Corrections) UnmarshalText(b []byte) error {
	v, err := ParseCorrections(string(b))
	if err != nil {
		return err
	}
	*s = v
	return nil
}

// shifts holds the values of the three corrections: zero shift (degrees
// 2θ), displacement (mm) and transparency depth (mm).
type shifts [nCorr]float64

// shift returns the total shift, degrees 2θ, at Bragg angle th (radians),
// and its derivative with respect to th (degrees per radian).
func (v shifts) shift(th, radius float64) (d, dth float64) {
	d = v[0] + (-2*v[1]*math.Cos(th)-v[2]*math.Sin(2*th))/radius/deg
	dth = (2*v[1]*math.Sin(th) - 2*v[2]*math.Cos(2*th)) / radius / deg
	return d, dth
}

// partials returns ∂2θ/∂ of each correction at Bragg angle th, in degrees
// 2θ per unit of the correction.
func partials(th, radius float64) shifts {
	return shifts{1, -2 * math.Cos(th) / radius / deg, -math.Sin(2*th) / radius / deg}
}

// row appends to dst the partials of the corrections in set, in parameter
// order: the Jacobian columns of the corrections, written once for every
// fit.
func (s Corrections) row(dst []float64, p shifts) []float64 {
	for i, x := range corrNames {
		if s.Has(x.c) {
			dst = append(dst, p[i])
		}
	}
	return dst
}

// names returns the parameter names and units of the set.
func (s Corrections) names() (names, units []string) {
	for _, x := range corrNames {
		if s.Has(x.c) {
			names = append(names, x.name)
			units = append(units, x.unit)
		}
	}
	return
}

// unpack sets the corrections of the set from x, in parameter order,
// leaving the others as they are in base.
func (s Corrections) unpack(x []float64, base shifts) shifts {
	k := 0
	for i, c := range corrNames {
		if s.Has(c.c) {
			base[i] = x[k]
			k++
		}
	}
	return base
}
