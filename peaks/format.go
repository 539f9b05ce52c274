package peaks

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

// FormatESD prints a value with its standard uncertainty in crystallographic
// notation: the uncertainty in units of the last digit, in parentheses,
// rounded to one or two significant digits (two when they begin with 1, as
// is common practice), e.g. 5.64021(7), 28.4421(13). A zero, negative or
// non-finite uncertainty prints the value alone.
func FormatESD(v, u float64) string {
	if !(u > 0) || math.IsInf(u, 0) || math.IsNaN(v) {
		return strconv.FormatFloat(v, 'f', -1, 64)
	}
	// Exponent of the last digit kept: two significant digits when the
	// uncertainty rounds to 10–19 in them, one otherwise.
	e := int(math.Floor(math.Log10(u))) - 1
	digits := math.Round(u / math.Pow(10, float64(e)))
	if digits >= 100 {
		e++
		digits = math.Round(u / math.Pow(10, float64(e)))
	}
	if digits >= 20 {
		e++
		digits = math.Round(u / math.Pow(10, float64(e)))
	}
	if e >= 0 {
		// Uncertainty at or above the units: print integers.
		scale := math.Pow(10, float64(e))
		return fmt.Sprintf("%.0f(%.0f)", math.Round(v/scale)*scale, digits*scale)
	}
	return fmt.Sprintf("%.*f(%.0f)", -e, v, digits)
}

// ParseESD reads a number in crystallographic notation, "5.6402(3)" →
// 5.6402, 0.0003 (the digits in parentheses are the uncertainty in units
// of the last digit); a plain number has uncertainty 0.
func ParseESD(s string) (v, u float64, err error) {
	v, u, err = cifNumber(strings.TrimSpace(s))
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, 0, fmt.Errorf("%q is not a number with an optional uncertainty such as 5.6402(3)", s)
	}
	return v, u, nil
}
