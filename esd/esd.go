package esd

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"
)

// A Value is a number with its standard uncertainty; U = 0 means exact or
// not known.
type Value struct {
	V, U float64
}

// String prints the value in crystallographic notation (Format).
func (x Value) String() string { return Format(x.V, x.U) }

// Format prints a value with its standard uncertainty in crystallographic
// notation: the uncertainty in units of the last digit, in parentheses,
// rounded to one significant digit, or to two when they begin with 1
// (common practice), e.g. 5.64021(7), 28.4421(13). A zero, negative or
// non-finite uncertainty prints the value alone, as briefly as it reads
// back exactly.
func Format(v, u float64) string {
	if !(u > 0) || math.IsInf(u, 0) || math.IsNaN(v) || math.IsInf(v, 0) {
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

// ErrSyntax is wrapped by Parse's errors.
var ErrSyntax = errors.New("not a number with an optional uncertainty such as 5.6402(3)")

// Parse reads a number in crystallographic notation: "5.6402(3)" gives
// 5.6402 and 0.0003 (the digits in parentheses are the uncertainty in
// units of the last digit of the mantissa, exponent included:
// "1.2e-3(4)" is 0.0012 ± 0.0004). A plain number has uncertainty 0.
// NaN, infinities and anything but a plain decimal number are refused.
func Parse(s string) (v, u float64, err error) {
	s = strings.TrimSpace(s)
	fail := func() (float64, float64, error) {
		return 0, 0, fmt.Errorf("%q: %w", s, ErrSyntax)
	}
	num := s
	if i := strings.IndexByte(s, '('); i >= 0 {
		if !strings.HasSuffix(s, ")") || i == 0 {
			return fail()
		}
		num = s[:i]
		digits := s[i+1 : len(s)-1]
		if digits == "" || strings.TrimLeft(digits, "0123456789") != "" {
			return fail()
		}
		d, e := strconv.ParseFloat(digits, 64)
		if e != nil {
			return fail()
		}
		mant, exp := num, 0
		if k := strings.IndexAny(mant, "eE"); k >= 0 {
			exp, e = strconv.Atoi(mant[k+1:])
			if e != nil {
				return fail()
			}
			mant = mant[:k]
		}
		dec := 0
		if k := strings.IndexByte(mant, '.'); k >= 0 {
			dec = len(mant) - k - 1
		}
		// Dividing by a power of ten keeps 3 × 10⁻⁴ at 0.0003 exactly.
		if k := dec - exp; k > 0 {
			u = float64(d) / math.Pow(10, float64(k))
		} else {
			u = float64(d) * math.Pow(10, float64(-k))
		}
	}
	if !plain(num) {
		return fail()
	}
	v, e := strconv.ParseFloat(num, 64)
	// Magnitudes beyond 10³⁰⁰ are no measurement and would overflow
	// when printed back.
	if e != nil || !(math.Abs(v) <= 1e300) || !(u <= 1e300) {
		return fail()
	}
	return v, u, nil
}

// plain reports whether s is made only of the characters of a decimal
// number with an optional exponent (no NaN, Inf, hexadecimal or
// underscores, which strconv would accept).
func plain(s string) bool {
	if s == "" {
		return false
	}
	for i := 0; i < len(s); i++ {
		c := s[i]
		if !(c >= '0' && c <= '9' || c == '.' || c == '-' || c == '+' || c == 'e' || c == 'E') {
			return false
		}
	}
	return true
}

// ParseValue is Parse returning a Value.
func ParseValue(s string) (Value, error) {
	v, u, err := Parse(s)
	return Value{v, u}, err
}
