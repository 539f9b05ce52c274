package indexing

import (
	"errors"
	"math"
	"strings"
	"testing"
)

func TestParseCell(t *testing.T) {
	for _, test := range []struct {
		in   string
		want Cell
		aESD float64
	}{
		{"cubic F a=5.6402(3)", NewCell(Cubic, F, 5.6402, 0), 0.0003},
		{"tetragonal P a=4.59 c=2.96", NewCell(Tetragonal, P, 4.59, 2.96), 0},
		{"Hexagonal a=3.2094 c=5.2108", NewCell(Hexagonal, P, 3.2094, 5.2108), 0},
		{"rhombohedral a=4.7589(2) c=12.991(1)", NewCell(Rhombohedral, R, 4.7589, 12.991), 0.0002},
		{"trigonal R a=4.7589 c=12.991", NewCell(Rhombohedral, R, 4.7589, 12.991), 0},
		{"orthorhombic C a=4 b=5 c=6", Cell{Orthorhombic, C, 4, 5, 6, 90, 90, 90}, 0},
		{"  cubic   i   a=3.1652  ", NewCell(Cubic, I, 3.1652, 0), 0},
	} {
		got, esd, err := ParseCell(test.in)
		if err != nil {
			t.Errorf("%q: %v", test.in, err)
			continue
		}
		if got != test.want || math.Abs(esd.A-test.aESD) > 1e-12 {
			t.Errorf("%q: %v esd %g, want %v esd %g", test.in, got, esd.A, test.want, test.aESD)
		}
	}
	for _, test := range []struct{ in, msg string }{
		{"", "empty"},
		{"monoclinic P a=3", "unknown crystal system"},
		{"cubic Q a=3", "unknown centring"},
		{"cubic F", "needs a"},
		{"cubic F a=3 c=4", "fixed by the cubic system"},
		{"tetragonal P a=4", "needs a, c"},
		{"cubic F a=x", "not a number"},
		{"cubic F a=-3", "positive"},
		{"cubic F a=3 a=4", "twice"},
		{"cubic F a", "name=value"},
		{"cubic F d=3", "unknown parameter"},
		{"hexagonal F a=3 c=5", "not F-centred"},
		{"cubic F a=5.6(3", "not a number"},
	} {
		_, _, err := ParseCell(test.in)
		if !errors.Is(err, ErrCellText) || !strings.Contains(err.Error(), test.msg) {
			t.Errorf("%q: error %v, want one saying %q", test.in, err, test.msg)
		}
	}
}

func FuzzParseCell(f *testing.F) {
	for _, s := range []string{"cubic F a=5.6402(3)", "tetragonal P a=4.59 c=2.96", "orthorhombic C a=4 b=5 c=6", "rhombohedral a=4.7(1) c=12.9(2)", "cubic F a=1e400"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		c, e, err := ParseCell(s)
		if err != nil {
			return
		}
		if !(c.A > 0 && c.B > 0 && c.C > 0) || math.IsInf(c.A, 0) || math.IsInf(c.C, 0) || e.A < 0 {
			t.Fatalf("%q parsed to %v %v", s, c, e)
		}
		if c2, _, err := ParseCell(c.String()); err != nil || math.Abs(c2.A-c.A) > 1e-4*c.A {
			t.Fatalf("%q → %v → %v, %v", s, c, c2, err)
		}
	})
}
