package esd

import (
	"errors"
	"math"
	"testing"
)

// The expected strings follow the rounding rule of common practice: one
// significant digit of the uncertainty, two when they begin with 1.
func TestFormat(t *testing.T) {
	for _, test := range []struct {
		v, u float64
		want string
	}{
		{5.64021, 0.00007, "5.64021(7)"},
		{28.44213, 0.00131, "28.4421(13)"},
		{1.5405929, 0, "1.5405929"},
		{123.456, 2.4, "123(2)"},
		{1234.5, 26, "1230(30)"},
		{1234.5, 14, "1235(14)"},
		{0.5, 0.0196, "0.50(2)"},
		{0.0012345, 0.0000019, "0.0012345(19)"},
		{2.0, 0.96, "2.0(10)"},
		{-0.0123, 0.0004, "-0.0123(4)"},
		{3, math.NaN(), "3"},
		{3, math.Inf(1), "3"},
	} {
		if got := Format(test.v, test.u); got != test.want {
			t.Errorf("Format(%g, %g) = %s, want %s", test.v, test.u, got, test.want)
		}
	}
}

func TestParse(t *testing.T) {
	for _, test := range []struct {
		in   string
		v, u float64
		bad  bool
	}{
		{in: "5.6402(3)", v: 5.6402, u: 0.0003},
		{in: " 28.4421(13) ", v: 28.4421, u: 0.0013},
		{in: "1.54056", v: 1.54056},
		{in: "123(2)", v: 123, u: 2},
		{in: "1.2e-3(4)", v: 0.0012, u: 0.0004},
		{in: "-0.5(10)", v: -0.5, u: 1.0},
		{in: "", bad: true},
		{in: "(3)", bad: true},
		{in: "5.6(", bad: true},
		{in: "5.6(x)", bad: true},
		{in: "5.6(-3)", bad: true},
		{in: "NaN", bad: true},
		{in: "Inf", bad: true},
		{in: "0x1p3", bad: true},
		{in: "1_000", bad: true},
		{in: "1e999", bad: true},
		{in: "5,64", bad: true},
	} {
		v, u, err := Parse(test.in)
		if test.bad {
			if !errors.Is(err, ErrSyntax) {
				t.Errorf("Parse(%q) = %g, %g, %v; want ErrSyntax", test.in, v, u, err)
			}
			continue
		}
		if err != nil || math.Abs(v-test.v) > 1e-12 || math.Abs(u-test.u) > 1e-12 {
			t.Errorf("Parse(%q) = %g, %g, %v; want %g, %g", test.in, v, u, err, test.v, test.u)
		}
	}
}

// FuzzParse checks that whatever Parse accepts prints and reads back to
// the same value within the printed precision.
func FuzzParse(f *testing.F) {
	for _, s := range []string{"5.6402(3)", "1.2e-3(4)", "123(2)", "-7", "0.50(2)", "(", "1e999(1)"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		v, u, err := Parse(s)
		if err != nil {
			return
		}
		if math.IsNaN(v) || math.IsInf(v, 0) || u < 0 || math.IsNaN(u) {
			t.Fatalf("Parse(%q) = %g, %g", s, v, u)
		}
		text := Format(v, u)
		v2, u2, err := Parse(text)
		if err != nil {
			t.Fatalf("Format(%g, %g) = %q does not parse: %v", v, u, text, err)
		}
		// The printed value is rounded to the last digit of the printed
		// uncertainty.
		if u > 0 && math.Abs(v2-v) > u2 && math.Abs(v2-v) > 1e-9*math.Abs(v) {
			t.Fatalf("%q → %g(%g) → %q → %g(%g)", s, v, u, text, v2, u2)
		}
	})
}
