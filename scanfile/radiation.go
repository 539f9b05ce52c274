package scanfile

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

// An Anode is an X-ray tube target with its characteristic K lines.
type Anode struct {
	Symbol  string  // element symbol, "Cu"
	KAlpha1 float64 // K-alpha1 wavelength, Å
	KAlpha2 float64 // K-alpha2 wavelength, Å
	KBeta   float64 // K-beta1 wavelength, Å
	Source  string  // where the wavelengths come from
	// Filter is the usual K-beta filter's element and FilterEdge its K
	// absorption edge, Å (from memory of the edge tables; the tests check
	// them against xraylib's edge energies). The white radiation a
	// strong reflection scatters steps up at the edge, which leaves a weak
	// hump between a line's K-beta and K-alpha positions.
	Filter     string
	FilterEdge float64
}

// Sources of the wavelengths below. The values were written from memory of
// the published tables, not copied from a file on this machine; the tests
// check them against xraylib's line energies.
const (
	srcHolzer = "Hölzer et al., Phys. Rev. A 56 (1997) 4554 (from memory)"
	srcITC    = "International Tables for Crystallography Vol. C (2004), Table 4.2.2.1 (from memory)"
)

// Anodes lists the supported tube targets.
var Anodes = []Anode{
	{"Cu", 1.5405929, 1.5444274, 1.3922340, srcHolzer, "Ni", 1.4881},
	{"Co", 1.7889961, 1.7928350, 1.6208260, srcHolzer, "Fe", 1.7433},
	{"Cr", 2.2897260, 2.2936510, 2.0848810, srcHolzer, "V", 2.2691},
	{"Fe", 1.9360410, 1.9399730, 1.7566040, srcHolzer, "Mn", 1.8964},
	{"Mo", 0.7093171, 0.7136043, 0.6323040, srcITC, "Zr", 0.6889},
	{"Ag", 0.5594075, 0.5638130, 0.4970650, srcITC, "Pd", 0.5092},
}

// DefaultKAlpha2Ratio is the intensity of K-alpha2 relative to K-alpha1
// (common practice: 0.5, from the 2:1 occupancy of the L3 and L2 levels).
const DefaultKAlpha2Ratio = 0.5

// LookupAnode returns the anode with the given symbol, case-insensitive.
func LookupAnode(symbol string) (Anode, bool) {
	for _, a := range Anodes {
		if strings.EqualFold(a.Symbol, symbol) {
			return a, true
		}
	}
	return Anode{}, false
}

// Radiation is the incident spectrum as the fitter models it: one line, or
// a K-alpha doublet of fixed wavelength and intensity ratio.
type Radiation struct {
	Name    string  // "Cu K-alpha1/K-alpha2" or "1.5406 Å"
	Lambda1 float64 // primary wavelength (K-alpha1), Å
	Lambda2 float64 // K-alpha2 wavelength, Å; 0 for a single line
	Ratio2  float64 // intensity of K-alpha2 relative to K-alpha1
	KBeta   float64 // K-beta wavelength used to flag companion peaks, Å; 0 when unknown
	// Edge is the K absorption edge of the K-beta filter, Å; 0 when the
	// beam is monochromated or the filter unknown.
	Edge float64
}

// Doublet reports whether the radiation has a K-alpha2 line.
func (r Radiation) Doublet() bool { return r.Lambda2 > 0 && r.Ratio2 > 0 }

// AnodeRadiation returns the K-alpha doublet of an anode with the default
// K-alpha2 ratio.
func AnodeRadiation(a Anode) Radiation {
	return Radiation{
		Name:    a.Symbol + " K-alpha1/K-alpha2",
		Lambda1: a.KAlpha1, Lambda2: a.KAlpha2, Ratio2: DefaultKAlpha2Ratio, KBeta: a.KBeta, Edge: a.FilterEdge,
	}
}

// SingleLine returns a monochromatic radiation of wavelength lambda Å.
func SingleLine(lambda float64) Radiation {
	return Radiation{Name: strconv.FormatFloat(lambda, 'g', -1, 64) + " Å", Lambda1: lambda}
}

// ParseRadiation reads a wavelength setting: an anode symbol ("Cu", a
// K-alpha doublet), an anode with "Ka1" ("CuKa1", K-alpha1 alone), or a
// number in Å (one line).
func ParseRadiation(s string) (Radiation, error) {
	t := strings.TrimSpace(s)
	if a, ok := LookupAnode(t); ok {
		return AnodeRadiation(a), nil
	}
	if len(t) > 2 {
		if a, ok := LookupAnode(t[:2]); ok && strings.EqualFold(strings.TrimSpace(t[2:]), "ka1") {
			// K-alpha1 alone means a monochromator, which passes no
			// K-beta line.
			r := SingleLine(a.KAlpha1)
			r.Name = a.Symbol + " K-alpha1"
			return r, nil
		}
	}
	v, err := strconv.ParseFloat(strings.Replace(t, ",", ".", 1), 64)
	if err != nil || math.IsNaN(v) || v < 0.1 || v > 5 {
		var syms []string
		for _, a := range Anodes {
			syms = append(syms, a.Symbol)
		}
		return Radiation{}, fmt.Errorf("%w %q: expected an anode (%s), an anode with Ka1, or a wavelength between 0.1 and 5 Å",
			ErrUnknownLine, s, strings.Join(syms, ", "))
	}
	return SingleLine(v), nil
}

// Setting returns the text that ParseRadiation reads back as this
// radiation: an anode symbol for its K-alpha doublet ("Cu"), the symbol
// with Ka1 for K-alpha1 alone ("CuKa1"), else the wavelength in Å. The
// K-alpha2 ratio is a setting of its own and is not part of the text.
func (r Radiation) Setting() string {
	for _, a := range Anodes {
		if r.Lambda1 != a.KAlpha1 {
			continue
		}
		if r.Lambda2 == a.KAlpha2 && r.Lambda2 > 0 {
			return a.Symbol
		}
		if r.Lambda2 == 0 {
			return a.Symbol + "Ka1"
		}
	}
	return strconv.FormatFloat(r.Lambda1, 'g', -1, 64)
}

// MarshalText writes Setting.
func (r Radiation) MarshalText() ([]byte, error) { return []byte(r.Setting()), nil }

// UnmarshalText reads a radiation as ParseRadiation does.
func (r *Radiation) UnmarshalText(b []byte) error {
	v, err := ParseRadiation(string(b))
	if err != nil {
		return err
	}
	*r = v
	return nil
}
