package density

import (
	"errors"
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"
	"unicode"
)

// A Formula is a parsed chemical formula: the amount of each element per
// formula unit (decimal amounts allowed, as in Fe0.95O).
type Formula struct {
	Text   string             // as typed
	Counts map[string]float64 // element symbol → atoms per formula unit
	Order  []string           // symbols in order of first appearance
}

// Errors of ParseFormula, wrapped in a *FormulaError.
var (
	ErrSymbol    = errors.New("unknown element symbol")
	ErrBracket   = errors.New("unbalanced bracket")
	ErrCount     = errors.New("bad count")
	ErrEmpty     = errors.New("empty formula or group")
	ErrCharacter = errors.New("unexpected character")
	ErrTooLarge  = errors.New("count too large")
)

// maxFormulaLen is the longest formula read, in characters.
const maxFormulaLen = 1000

// A FormulaError points at the offending character of a formula.
type FormulaError struct {
	Formula string
	Pos     int // 1-based position in characters (runes)
	Err     error
	Detail  string
}

func (e *FormulaError) Error() string {
	msg := fmt.Sprintf("formula %q, character %d: %v", e.Formula, e.Pos, e.Err)
	if e.Detail != "" {
		msg += ": " + e.Detail
	}
	return msg
}

func (e *FormulaError) Unwrap() error { return e.Err }

// hydrateDots are the separators of adducts and hydrates: the middle dot
// (U+00B7), bullet (U+2022), dot operator (U+22C5), '*' and, where it is
// not a decimal point, '.'.
const hydrateDots = "·•⋅*"

// ParseFormula reads a chemical formula: element symbols with integer or
// decimal counts (Fe0.95O, YBa2Cu3O6.93), nested parentheses and brackets
// (Ca3(PO4)2, [Co(NH3)6]Cl3), and adducts or hydrates joined by ·, *, or .,
// each with an optional leading multiplier (CuSO4·5H2O). A '.' between
// digits is a decimal point unless the digits after it are followed by
// H2O or D2O (CuSO4.5H2O is the pentahydrate; write · or * to be
// unambiguous). Deuterium is D. Spaces are ignored.
func ParseFormula(s string) (Formula, error) {
	p := &formulaParser{src: []rune(strings.TrimSpace(s)), text: s}
	if len(p.src) > maxFormulaLen {
		return Formula{}, p.fail(maxFormulaLen, ErrTooLarge, fmt.Sprintf("longer than %d characters", maxFormulaLen))
	}
	if len(p.src) == 0 {
		return Formula{}, p.fail(0, ErrEmpty, "nothing to read")
	}
	f := Formula{Text: s, Counts: map[string]float64{}}
	for {
		mult := 1.0
		if p.pos < len(p.src) && isDigit(p.src[p.pos]) {
			start := p.pos
			v, err := p.number(true, false)
			if err != nil {
				return Formula{}, err
			}
			if v == 0 {
				return Formula{}, p.fail(start, ErrCount, "a multiplier of zero")
			}
			mult = v
		}
		part, err := p.sequence(0)
		if err != nil {
			return Formula{}, err
		}
		if len(part) == 0 {
			return Formula{}, p.fail(p.pos, ErrEmpty, "expected an element symbol")
		}
		for _, t := range part {
			if _, seen := f.Counts[t.sym]; !seen {
				f.Order = append(f.Order, t.sym)
			}
			f.Counts[t.sym] += t.n * mult
		}
		if p.pos >= len(p.src) {
			break
		}
		c := p.src[p.pos]
		switch {
		case strings.ContainsRune(hydrateDots, c) || c == '.':
			p.pos++
			p.skipSpace()
			if p.pos >= len(p.src) {
				return Formula{}, p.fail(p.pos, ErrEmpty, "nothing after the adduct dot")
			}
		case c == ')' || c == ']':
			return Formula{}, p.fail(p.pos, ErrBracket, fmt.Sprintf("%q closes nothing", c))
		default:
			return Formula{}, p.fail(p.pos, ErrCharacter, fmt.Sprintf("%q", c))
		}
	}
	for _, sym := range f.Order {
		if n := f.Counts[sym]; math.IsInf(n, 0) || n > 1e9 {
			return Formula{}, p.fail(0, ErrTooLarge, fmt.Sprintf("%s count %g", sym, n))
		}
	}
	return f, nil
}

type term struct {
	sym string
	n   float64
}

type formulaParser struct {
	src  []rune
	text string
	pos  int
}

func (p *formulaParser) fail(pos int, err error, detail string) error {
	return &FormulaError{Formula: p.text, Pos: pos + 1, Err: err, Detail: detail}
}

func isDigit(r rune) bool { return r >= '0' && r <= '9' }

func (p *formulaParser) skipSpace() {
	for p.pos < len(p.src) && unicode.IsSpace(p.src[p.pos]) {
		p.pos++
	}
}

// sequence reads terms until the end, an adduct dot or a closing bracket
// (depth > 0).
func (p *formulaParser) sequence(depth int) ([]term, error) {
	var out []term
	for {
		p.skipSpace()
		if p.pos >= len(p.src) {
			return out, nil
		}
		c := p.src[p.pos]
		switch {
		case c == '(' || c == '[' || c == '{':
			open := p.pos
			closer := map[rune]rune{'(': ')', '[': ']', '{': '}'}[c]
			p.pos++
			inner, err := p.sequence(depth + 1)
			if err != nil {
				return nil, err
			}
			if p.pos >= len(p.src) {
				return nil, p.fail(open, ErrBracket, fmt.Sprintf("%q is never closed", c))
			}
			if p.src[p.pos] != closer {
				return nil, p.fail(p.pos, ErrBracket, fmt.Sprintf("%q closes %q", p.src[p.pos], c))
			}
			if len(inner) == 0 {
				return nil, p.fail(open, ErrEmpty, "empty brackets")
			}
			p.pos++
			n, err := p.count()
			if err != nil {
				return nil, err
			}
			for _, t := range inner {
				out = append(out, term{t.sym, t.n * n})
			}
		case c == ')' || c == ']' || c == '}':
			if depth == 0 {
				return nil, p.fail(p.pos, ErrBracket, fmt.Sprintf("%q closes nothing", c))
			}
			return out, nil
		case unicode.IsUpper(c):
			start := p.pos
			p.pos++
			for p.pos < len(p.src) && unicode.IsLower(p.src[p.pos]) && p.pos-start < 2 {
				p.pos++
			}
			sym := string(p.src[start:p.pos])
			if _, ok := bySymbol[sym]; !ok {
				return nil, p.fail(start, ErrSymbol, fmt.Sprintf("%q (symbols are H to Pu and D, a capital then lowercase, e.g. Co, not CO)", sym))
			}
			n, err := p.count()
			if err != nil {
				return nil, err
			}
			out = append(out, term{sym, n})
		case strings.ContainsRune(hydrateDots, c) || c == '.':
			return out, nil
		case unicode.IsLower(c):
			return nil, p.fail(p.pos, ErrSymbol, fmt.Sprintf("%q: element symbols begin with a capital letter", c))
		case isDigit(c):
			return nil, p.fail(p.pos, ErrCount, "a count must follow an element or a bracket")
		default:
			return nil, p.fail(p.pos, ErrCharacter, fmt.Sprintf("%q", c))
		}
	}
}

// count reads the optional count after a symbol or bracket (1 when
// absent).
func (p *formulaParser) count() (float64, error) {
	if p.pos >= len(p.src) || !(isDigit(p.src[p.pos]) || p.src[p.pos] == '.' && p.pos+1 < len(p.src) && isDigit(p.src[p.pos+1]) && !p.hydrateAhead(p.pos)) {
		return 1, nil
	}
	start := p.pos
	v, err := p.number(true, true)
	if err != nil {
		return 0, err
	}
	if v == 0 {
		return 0, p.fail(start, ErrCount, "a count of zero")
	}
	return v, nil
}

// hydrateAhead reports whether the '.' at i starts an adduct: digits then
// H2O or D2O.
func (p *formulaParser) hydrateAhead(i int) bool {
	j := i + 1
	for j < len(p.src) && isDigit(p.src[j]) {
		j++
	}
	rest := string(p.src[j:])
	return strings.HasPrefix(rest, "H2O") || strings.HasPrefix(rest, "D2O")
}

// number reads digits with an optional decimal part (allowed when frac);
// with adduct set, a '.' that starts a hydrate ends the number.
func (p *formulaParser) number(frac, adduct bool) (float64, error) {
	start := p.pos
	for p.pos < len(p.src) && isDigit(p.src[p.pos]) {
		p.pos++
	}
	if frac && p.pos < len(p.src) && p.src[p.pos] == '.' && !(adduct && p.hydrateAhead(p.pos)) {
		p.pos++
		if p.pos >= len(p.src) || !isDigit(p.src[p.pos]) {
			return 0, p.fail(p.pos-1, ErrCount, "a decimal point without digits after it")
		}
		for p.pos < len(p.src) && isDigit(p.src[p.pos]) {
			p.pos++
		}
	}
	txt := string(p.src[start:p.pos])
	if txt == "" {
		return 0, p.fail(start, ErrCount, "empty count")
	}
	v, err := strconv.ParseFloat(txt, 64)
	if err != nil || math.IsInf(v, 0) || v > 1e9 {
		return 0, p.fail(start, ErrTooLarge, txt)
	}
	return v, nil
}

// String prints the formula in Hill order (C, H, then alphabetical; all
// alphabetical without carbon) with its counts, e.g. "Cl Na" as "ClNa".
func (f Formula) String() string {
	syms := append([]string(nil), f.Order...)
	_, hasC := f.Counts["C"]
	rank := func(s string) string {
		if hasC && s == "C" {
			return "0"
		}
		if hasC && s == "H" {
			return "1"
		}
		return "2" + s
	}
	sort.Slice(syms, func(i, j int) bool { return rank(syms[i]) < rank(syms[j]) })
	var b strings.Builder
	decimal := false
	for i, s := range syms {
		// A decimal count before "H2O" or "D2O" would read as a hydrate
		// dot: a space keeps it a decimal point.
		if decimal && (s == "H" || s == "D") && f.Counts[s] == 2 && i+1 < len(syms) && syms[i+1] == "O" {
			b.WriteByte(' ')
		}
		b.WriteString(s)
		n := f.Counts[s]
		decimal = n != math.Trunc(n)
		if n != 1 {
			b.WriteString(strconv.FormatFloat(n, 'f', -1, 64))
		}
	}
	return b.String()
}

// Atoms returns the number of atoms per formula unit.
func (f Formula) Atoms() float64 {
	var n float64
	for _, c := range f.Counts {
		n += c
	}
	return n
}

// MolarMass returns the molar mass in g/mol and its uncertainty, the
// atomic weights' uncertainties added in quadrature (treated as
// independent); NoStandard is set when an element has no standard atomic
// weight.
func (f Formula) MolarMass() (m, u float64, noStandard bool) {
	var v float64
	for _, sym := range f.Order {
		e := bySymbol[sym]
		n := f.Counts[sym]
		m += n * e.Weight
		v += n * n * e.Uncertainty * e.Uncertainty
		noStandard = noStandard || e.NoStandard
	}
	return m, math.Sqrt(v), noStandard
}

// MarshalText writes the formula as it was typed.
func (f Formula) MarshalText() ([]byte, error) { return []byte(f.Text), nil }

// UnmarshalText reads a formula as ParseFormula does.
func (f *Formula) UnmarshalText(b []byte) error {
	v, err := ParseFormula(string(b))
	if err != nil {
		return err
	}
	*f = v
	return nil
}
