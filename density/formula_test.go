package density

import (
	"errors"
	"math"
	"strings"
	"testing"
)

func TestParseFormula(t *testing.T) {
	for _, test := range []struct {
		in   string
		want map[string]float64
	}{
		{"NaCl", map[string]float64{"Na": 1, "Cl": 1}},
		{"Fe0.95O", map[string]float64{"Fe": 0.95, "O": 1}},
		{"YBa2Cu3O6.93", map[string]float64{"Y": 1, "Ba": 2, "Cu": 3, "O": 6.93}},
		{"Ca3(PO4)2", map[string]float64{"Ca": 3, "P": 2, "O": 8}},
		{"[Co(NH3)6]Cl3", map[string]float64{"Co": 1, "N": 6, "H": 18, "Cl": 3}},
		{"CuSO4·5H2O", map[string]float64{"Cu": 1, "S": 1, "O": 9, "H": 10}},
		{"CuSO4.5H2O", map[string]float64{"Cu": 1, "S": 1, "O": 9, "H": 10}},
		{"CuSO4*5H2O", map[string]float64{"Cu": 1, "S": 1, "O": 9, "H": 10}},
		{"CuSO4 · 5 H2O", map[string]float64{"Cu": 1, "S": 1, "O": 9, "H": 10}},
		{"CaSO4·0.5H2O", map[string]float64{"Ca": 1, "S": 1, "O": 4.5, "H": 1}},
		{"La1.85Sr0.15CuO4", map[string]float64{"La": 1.85, "Sr": 0.15, "Cu": 1, "O": 4}},
		{"D2O", map[string]float64{"D": 2, "O": 1}},
		{"Mg(OH)2", map[string]float64{"Mg": 1, "O": 2, "H": 2}},
		{"K4[Fe(CN)6]·3H2O", map[string]float64{"K": 4, "Fe": 1, "C": 6, "N": 6, "H": 6, "O": 3}},
		{"CO", map[string]float64{"C": 1, "O": 1}},
		{"Co", map[string]float64{"Co": 1}},
		{"Al2O3.H2O", map[string]float64{"Al": 2, "O": 4, "H": 2}},
	} {
		f, err := ParseFormula(test.in)
		if err != nil {
			t.Errorf("%q: %v", test.in, err)
			continue
		}
		if len(f.Counts) != len(test.want) {
			t.Errorf("%q: %v, want %v", test.in, f.Counts, test.want)
		}
		for k, v := range test.want {
			if math.Abs(f.Counts[k]-v) > 1e-12 {
				t.Errorf("%q: %s = %g, want %g", test.in, k, f.Counts[k], v)
			}
		}
	}
}

func TestParseFormulaErrors(t *testing.T) {
	for _, test := range []struct {
		in   string
		err  error
		pos  int
		word string
	}{
		{"", ErrEmpty, 1, "nothing"},
		{"Xx2O", ErrSymbol, 1, `"Xx"`},
		{"NaCL", ErrSymbol, 4, "capital"},
		{"nacl", ErrSymbol, 1, "capital"},
		{"Ca3(PO4", ErrBracket, 4, "never closed"},
		{"Ca3PO4)2", ErrBracket, 7, "closes nothing"},
		{"[Co(NH3]6)Cl3", ErrBracket, 8, "closes"},
		{"Fe2O3·", ErrEmpty, 7, "nothing after"},
		{"()", ErrEmpty, 1, "empty brackets"},
		{"Fe2.O3", ErrCount, 4, "decimal point"},
		{"Na0Cl", ErrCount, 3, "zero"},
		{"Na-Cl", ErrCharacter, 3, `'-'`},
		{"Fe99999999999O", ErrTooLarge, 3, ""},
	} {
		_, err := ParseFormula(test.in)
		var fe *FormulaError
		if !errors.As(err, &fe) || !errors.Is(err, test.err) || fe.Pos != test.pos || !strings.Contains(err.Error(), test.word) {
			t.Errorf("%q: %v; want %v at character %d mentioning %s", test.in, err, test.err, test.pos, test.word)
		}
	}
}

func FuzzParseFormula(f *testing.F) {
	for _, s := range []string{"NaCl", "Fe0.95O", "CuSO4·5H2O", "CuSO4.5H2O", "[Co(NH3)6]Cl3", "Ga1.5H2O", "Ca3(PO4)2", "((H)2)3", "K4[Fe(CN)6]·3H2O"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		p, err := ParseFormula(s)
		if err != nil {
			var fe *FormulaError
			if !errors.As(err, &fe) || fe.Pos < 1 {
				t.Fatalf("%q: error without a position: %v", s, err)
			}
			return
		}
		m, u, _ := p.MolarMass()
		if !(m > 0) || math.IsInf(m, 0) || u < 0 || len(p.Order) != len(p.Counts) {
			t.Fatalf("%q: M = %g(%g), %v", s, m, u, p.Counts)
		}
		q, err := ParseFormula(p.String())
		if err != nil {
			t.Fatalf("%q → %q: %v", s, p.String(), err)
		}
		for k, v := range p.Counts {
			if math.Abs(q.Counts[k]-v) > 1e-9*v {
				t.Fatalf("%q → %q: %s %g then %g", s, p.String(), k, v, q.Counts[k])
			}
		}
	})
}
