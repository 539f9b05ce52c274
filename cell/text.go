package cell

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"

	"reticle/esd"
)

// ErrText is wrapped by the errors of a cell description that cannot be
// read.
var ErrText = errors.New("cell description")

// Format prints the cell in its text form, the free parameters of its
// system with their uncertainties in crystallographic notation, e.g.
// "monoclinic C a=9.4102(3) b=5.3801(2) c=6.1203(4) beta=102.41(1)".
// Parameters without an uncertainty print to 0.00001 Å and 0.001°. Parse
// reads the text back.
func Format(c Cell, e ESD) string {
	var b strings.Builder
	fmt.Fprintf(&b, "%s %s", c.System, c.Centring)
	vals, errs := c.Free(), e.Free(c.System)
	for i, name := range c.System.FreeNames() {
		fmt.Fprintf(&b, " %s=%s", name, number(vals[i], errs[i], i >= 3 || name == "beta"))
	}
	return b.String()
}

// number prints a parameter with its esd, or rounded to 0.00001 Å
// (0.001° for an angle) without one.
func number(v, u float64, angle bool) string {
	if u > 0 {
		return esd.Format(v, u)
	}
	digits := 5
	if angle {
		digits = 3
	}
	p := math.Pow(10, float64(digits))
	return strconv.FormatFloat(math.Round(v*p)/p, 'f', -1, 64)
}

// String prints the cell's text form without uncertainties.
func (c Cell) String() string { return Format(c, ESD{}) }

// names maps the parameter names Parse accepts to their index in Params.
var names = map[string]int{"a": 0, "b": 1, "c": 2, "alpha": 3, "beta": 4, "gamma": 5, "α": 3, "β": 4, "γ": 5}

// Parse reads a cell typed as "system [centring] name=value ...", for
// example "tetragonal P a=4.59 c=2.96", "cubic F a=5.6402(3)" or
// "monoclinic C a=9.41 b=5.38 c=6.12 beta=102.4": values in Å and
// degrees, optionally with an uncertainty in parentheses; names a, b, c,
// alpha, beta, gamma (or α, β, γ). The system's free parameters are
// required; the parameters it ties may be given too when they agree (b
// equal to a, right angles ...). The centring defaults to P (R for
// rhombohedral); rhombohedral cells are on hexagonal axes, monoclinic ones
// have b unique. Errors name the word at fault.
func Parse(s string) (Cell, ESD, error) {
	fail := func(word int, f string, args ...any) (Cell, ESD, error) {
		return Cell{}, ESD{}, fmt.Errorf("%w %q, word %d: %s", ErrText, s, word, fmt.Sprintf(f, args...))
	}
	words := strings.Fields(s)
	if len(words) == 0 {
		return fail(1, "empty; want e.g. 'cubic F a=5.6402'")
	}
	sys, err := ParseSystem(words[0])
	if err != nil {
		return fail(1, "%v", err)
	}
	cen := P
	if sys == Rhombohedral {
		cen = R
	}
	k := 1
	if k < len(words) && !strings.Contains(words[k], "=") {
		cen, err = ParseCentring(words[k])
		if err != nil {
			return fail(k+1, "%v", err)
		}
		k++
	}
	var vals, errs [6]float64
	var given [6]bool
	for ; k < len(words); k++ {
		name, val, ok := strings.Cut(words[k], "=")
		if !ok || val == "" {
			return fail(k+1, "want name=value, e.g. a=5.6402, got %q", words[k])
		}
		i, known := names[strings.ToLower(name)]
		if !known {
			return fail(k+1, "unknown parameter %q (want a, b, c, alpha, beta or gamma)", name)
		}
		if given[i] {
			return fail(k+1, "%s given twice", ParamNames[i])
		}
		v, u, err := esd.Parse(val)
		if err != nil {
			return fail(k+1, "%s: %v", ParamNames[i], err)
		}
		if !(v > 0) || i >= 3 && !(v < 180) {
			return fail(k+1, "%s must be %s, got %g", ParamNames[i], map[bool]string{false: "positive", true: "between 0 and 180°"}[i >= 3], v)
		}
		vals[i], errs[i], given[i] = v, u, true
	}
	need := sys.FreeNames()
	free := make([]float64, len(need))
	freeErr := make([]float64, len(need))
	for j, n := range need {
		i := names[n]
		if !given[i] {
			return fail(len(words), "a %s cell needs %s", sys, strings.Join(need, ", "))
		}
		free[j], freeErr[j] = vals[i], errs[i]
	}
	c := Cell{System: sys, Centring: cen}
	c.setFree(free)
	ce := Cell{System: sys}
	ce.setFree(freeErr)
	e := ESD{ce.A, ce.B, ce.C, 0, 0, 0}
	if sys == Triclinic {
		e = ESD{ce.A, ce.B, ce.C, ce.Alpha, ce.Beta, ce.Gamma}
	} else if sys == Monoclinic {
		e.Beta = ce.Beta
	}
	// Tied parameters given as well must agree with the system.
	p := c.Params()
	for i := range given {
		if given[i] && math.Abs(vals[i]-p[i]) > 1e-6*p[i] {
			return fail(len(words), "%s = %g does not fit a %s cell (it is %g there); give %s", ParamNames[i], vals[i], sys, p[i], strings.Join(need, ", "))
		}
	}
	if err := c.Check(); err != nil {
		return fail(2, "%v", err)
	}
	return c, e, nil
}
