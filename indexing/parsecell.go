package indexing

import (
	"errors"
	"fmt"
	"strings"

	"reticle/peaks"
)

// CellESD holds the standard uncertainties of a cell's edges (Å) and
// angles (degrees); zero means exact or not given.
type CellESD struct {
	A, B, C, Alpha, Beta, Gamma float64
}

// ErrCellText: a cell description that cannot be read.
var ErrCellText = errors.New("cell description")

// ParseCell reads a cell typed as "system [centring] name=value ...", for
// example "tetragonal P a=4.59 c=2.96" or "cubic F a=5.6402(3)": values in
// Å and degrees, optionally with an uncertainty in parentheses. The
// centring defaults to P (R for rhombohedral); rhombohedral cells are given
// on hexagonal axes (a, c); orthorhombic cells need a, b and c. Errors name
// the word at fault.
func ParseCell(s string) (Cell, CellESD, error) {
	fail := func(word int, f string, args ...any) (Cell, CellESD, error) {
		return Cell{}, CellESD{}, fmt.Errorf("%w %q, word %d: %s", ErrCellText, s, word, fmt.Sprintf(f, args...))
	}
	words := strings.Fields(s)
	if len(words) == 0 {
		return fail(1, "empty; want e.g. 'cubic F a=5.6402'")
	}
	sys, err := ParseSystem(strings.ToLower(words[0]))
	if err != nil {
		return fail(1, "unknown crystal system %q (want cubic, tetragonal, hexagonal, rhombohedral or orthorhombic)", words[0])
	}
	cen := P
	if sys == Rhombohedral {
		cen = R
	}
	k := 1
	if k < len(words) && !strings.Contains(words[k], "=") {
		w := strings.ToUpper(words[k])
		if len(w) != 1 || !strings.Contains("PIFRC", w) {
			return fail(k+1, "unknown centring %q (want P, I, F, R or C)", words[k])
		}
		cen = Centring(w[0])
		k++
	}
	vals := map[string]float64{}
	esds := map[string]float64{}
	for ; k < len(words); k++ {
		name, val, ok := strings.Cut(words[k], "=")
		name = strings.ToLower(name)
		if !ok || val == "" {
			return fail(k+1, "want name=value, e.g. a=5.6402, got %q", words[k])
		}
		switch name {
		case "a", "b", "c", "alpha", "beta", "gamma":
		default:
			return fail(k+1, "unknown parameter %q (want a, b, c, alpha, beta or gamma)", name)
		}
		if _, dup := vals[name]; dup {
			return fail(k+1, "%s given twice", name)
		}
		v, u, err := peaks.ParseESD(val)
		if err != nil {
			return fail(k+1, "%s: %v", name, err)
		}
		if !(v > 0) {
			return fail(k+1, "%s must be positive, got %g", name, v)
		}
		vals[name], esds[name] = v, u
	}
	need := map[System][]string{
		Cubic: {"a"}, Tetragonal: {"a", "c"}, Hexagonal: {"a", "c"}, Rhombohedral: {"a", "c"}, Orthorhombic: {"a", "b", "c"},
	}[sys]
	for _, n := range need {
		if _, ok := vals[n]; !ok {
			return fail(len(words), "a %s cell needs %s", sys, strings.Join(need, ", "))
		}
	}
	for n := range vals {
		found := false
		for _, m := range need {
			found = found || m == n
		}
		if !found {
			return fail(len(words), "%s is fixed by the %s system (give %s only)", n, sys, strings.Join(need, ", "))
		}
	}
	allowed := map[System]string{Cubic: "PIF", Tetragonal: "PI", Hexagonal: "P", Rhombohedral: "R", Orthorhombic: "PIFC"}[sys]
	if !strings.ContainsRune(allowed, rune(cen)) {
		return fail(2, "a %s lattice is not %s-centred (want one of %s)", sys, cen, allowed)
	}
	var c Cell
	var e CellESD
	switch sys {
	case Orthorhombic:
		c = Cell{System: sys, Centring: cen, A: vals["a"], B: vals["b"], C: vals["c"], Alpha: 90, Beta: 90, Gamma: 90}
		e = CellESD{A: esds["a"], B: esds["b"], C: esds["c"]}
	case Cubic:
		c = NewCell(sys, cen, vals["a"], vals["a"])
		e = CellESD{A: esds["a"], B: esds["a"], C: esds["a"]}
	default:
		c = NewCell(sys, cen, vals["a"], vals["c"])
		e = CellESD{A: esds["a"], B: esds["a"], C: esds["c"]}
	}
	return c, e, nil
}
