package scanfile

import (
	"bytes"
	"math"
	"strconv"
	"strings"
)

// A separator is how the columns of a text data line are split.
type separator int

const (
	sepSpace     separator = iota // runs of spaces or tabs
	sepComma                      // ","
	sepSemicolon                  // ";"
	sepTab                        // a single tab
)

// parseText reads a plain-text export: any number of header, comment and
// metadata lines, then a block of rows with 2θ, intensity and an optional esd.
func parseText(file string, data []byte) (*Scan, error) {
	s := &Scan{Format: "text"}
	// One point per line at most: sized once, the rows never move.
	pts := make([]point, 0, bytes.Count(data, []byte{'\n'})+1)
	var errs ErrorList
	inData := false
	var sep separator
	ncol := 0
	oneCol := 0 // first line holding a single number before the data block
	var row [3]float64
	lineNo := 0
	for rest := data; len(rest) > 0; {
		lineNo++
		raw := rest
		if k := bytes.IndexByte(rest, '\n'); k >= 0 {
			raw, rest = rest[:k], rest[k+1:]
		} else {
			rest = nil
		}
		if inData && fastRow(raw, sep, ncol, &row) {
			p := point{x: row[0], y: row[1], line: lineNo}
			if ncol == 3 {
				p.e = row[2]
				if p.e < 0 {
					errs.Add(&ParseError{File: file, Line: lineNo, Column: 3, Text: string(raw), Err: ErrBadESD})
				}
			}
			pts = append(pts, p)
			continue
		}
		line := strings.TrimRight(string(bytes.TrimSuffix(raw, []byte("\r"))), " \t\f")
		trim := strings.TrimSpace(line)
		if trim == "" {
			continue
		}
		if isComment(trim) {
			s.addMeta(lineNo, strings.TrimSpace(strings.TrimLeft(trim, "#!;'/*%")))
			continue
		}
		if !inData {
			sp, vals, ok := splitNumbers(line)
			if ok && len(vals) == 1 {
				// A lone number before the data (a point count, a
				// sample number) is a header line.
				if oneCol == 0 {
					oneCol = lineNo
				}
				ok = false
			}
			if !ok {
				s.addMeta(lineNo, trim)
				continue
			}
			inData, sep, ncol = true, sp, len(vals)
			if ncol < 2 || ncol > 3 {
				errs.Add(&ParseError{File: file, Line: lineNo, Text: trim, Err: ErrColumns})
				return nil, errs
			}
		}
		vals, col, err := splitWith(line, sep)
		if err != nil {
			errs.Add(&ParseError{File: file, Line: lineNo, Column: col, Text: trim, Err: err})
		} else if len(vals) != ncol {
			errs.Add(&ParseError{File: file, Line: lineNo, Text: trim, Err: ErrColumns})
		} else {
			p := point{x: vals[0], y: vals[1], line: lineNo}
			if ncol == 3 {
				p.e = vals[2]
				if p.e < 0 {
					errs.Add(&ParseError{File: file, Line: lineNo, Column: 3, Text: trim, Err: ErrBadESD})
				}
			}
			pts = append(pts, p)
		}
		if len(errs) >= 20 {
			break
		}
	}
	if err := errs.Err(); err != nil {
		return nil, err
	}
	if !inData {
		if oneCol > 0 {
			return nil, &ParseError{File: file, Line: oneCol, Err: ErrColumns}
		}
		return nil, &ParseError{File: file, Err: ErrEmpty}
	}
	if err := s.finish(file, pts, ncol == 3); err != nil {
		return nil, err
	}
	return s, nil
}

// isComment reports whether a trimmed line is a comment by its first
// character.
func isComment(t string) bool {
	switch t[0] {
	case '#', '!', ';', '\'', '%':
		return true
	case '/':
		return strings.HasPrefix(t, "//") || strings.HasPrefix(t, "/*")
	}
	return false
}

// addMeta keeps a header line, splitting "key: value", "key = value" and
// "key<TAB>value", and picks up a stated wavelength.
func (s *Scan) addMeta(line int, text string) {
	if text == "" {
		return
	}
	item := MetaItem{Line: line, Value: text}
	for _, sep := range []string{"\t", ":", "="} {
		if k, v, ok := strings.Cut(text, sep); ok && strings.TrimSpace(k) != "" {
			item.Key, item.Value = strings.TrimSpace(k), strings.TrimSpace(v)
			break
		}
	}
	s.Meta = append(s.Meta, item)
	if s.Anode == "" {
		s.Anode = anodeFromMeta(item.Key, item.Value)
	}
	if s.Wavelength == 0 {
		if w, ok := wavelengthFromMeta(item.Key, item.Value); ok {
			s.Wavelength = w
		}
	}
}

// anodeFromMeta returns the anode symbol named by a header item such as
// "Anode: Cu" or "Target = Co K-alpha", or "".
func anodeFromMeta(key, value string) string {
	k := strings.ToLower(key)
	if !(strings.Contains(k, "anode") || strings.Contains(k, "target") || strings.Contains(k, "tube")) {
		return ""
	}
	f := strings.FieldsFunc(value, func(r rune) bool { return r == ' ' || r == ',' || r == '-' || r == '\t' })
	if len(f) == 0 {
		return ""
	}
	if a, ok := LookupAnode(f[0]); ok {
		return a.Symbol
	}
	return ""
}

// wavelengthFromMeta returns a wavelength in Å stated by a header item such
// as "Wavelength: 1.5406 A", "lambda = 0.15406 nm" or "Kalpha1 1.540598".
func wavelengthFromMeta(key, value string) (float64, bool) {
	k := strings.ToLower(key)
	if k == "" {
		// "wavelength 1.5406" without a separator.
		f := strings.Fields(strings.ToLower(value))
		if len(f) < 2 {
			return 0, false
		}
		k, value = f[0], strings.Join(f[1:], " ")
	}
	if !(strings.Contains(k, "wavelength") || strings.Contains(k, "lambda") ||
		strings.Contains(k, "alpha1") || strings.Contains(k, "alpha 1") || strings.Contains(k, "λ")) {
		return 0, false
	}
	if strings.Contains(k, "ratio") || strings.Contains(k, "alpha2") {
		return 0, false
	}
	f := strings.Fields(strings.NewReplacer(",", ".", "Å", " Å", "=", " ").Replace(value))
	for i, tok := range f {
		w, err := strconv.ParseFloat(tok, 64)
		if err != nil || !(w > 0) || math.IsInf(w, 0) {
			continue
		}
		unit := strings.ToLower(strings.Join(append([]string{k}, f[i+1:]...), " "))
		if strings.Contains(unit, "nm") {
			w *= 10
		}
		if w >= 0.1 && w <= 5 {
			return w, true
		}
	}
	return 0, false
}

// splitNumbers finds the separator of a candidate data line and parses it.
// It reports false when the line is not all numbers (a header).
func splitNumbers(line string) (separator, []float64, bool) {
	var order []separator
	switch {
	case strings.Contains(line, ";"):
		order = []separator{sepSemicolon}
	case strings.Contains(line, "\t"):
		order = []separator{sepTab, sepSpace}
	case strings.Contains(line, ","):
		order = []separator{sepComma, sepSpace}
	default:
		order = []separator{sepSpace}
	}
	for _, sp := range order {
		vals, _, err := splitWith(line, sp)
		if err == nil && len(vals) >= 1 {
			return sp, vals, true
		}
	}
	return 0, nil, false
}

// splitWith splits line by sep and parses every field. Decimal commas are
// accepted when sep is not a comma. It returns the 1-based column of the
// first bad field.
func splitWith(line string, sep separator) ([]float64, int, error) {
	var fields []string
	line = strings.TrimLeft(line, " \t")
	switch sep {
	case sepSpace:
		fields = strings.Fields(line)
	case sepComma:
		fields = strings.Split(line, ",")
	case sepSemicolon:
		fields = strings.Split(line, ";")
	case sepTab:
		fields = strings.Split(line, "\t")
	}
	// A trailing separator ("1.0;2.0;") leaves an empty last field.
	if n := len(fields); n > 1 && strings.TrimSpace(fields[n-1]) == "" {
		fields = fields[:n-1]
	}
	vals := make([]float64, 0, len(fields))
	for i, f := range fields {
		f = strings.TrimSpace(f)
		if sep != sepComma {
			f = strings.Replace(f, ",", ".", 1)
		}
		v, err := parseNumber(f)
		if err != nil {
			return nil, i + 1, err
		}
		vals = append(vals, v)
	}
	return vals, 0, nil
}

// parseNumber parses a decimal number with optional exponent. It rejects
// NaN, infinities, hexadecimal and anything that is not plainly a number.
func parseNumber(f string) (float64, error) {
	if f == "" {
		return 0, ErrText
	}
	for i := 0; i < len(f); i++ {
		c := f[i]
		if !(c >= '0' && c <= '9' || c == '.' || c == '-' || c == '+' || c == 'e' || c == 'E') {
			low := strings.ToLower(strings.TrimLeft(f, "+-"))
			if low == "nan" || strings.HasPrefix(low, "inf") {
				return 0, ErrNotFinite
			}
			return 0, ErrText
		}
	}
	v, err := strconv.ParseFloat(f, 64)
	if err != nil {
		if ne, ok := err.(*strconv.NumError); ok && ne.Err == strconv.ErrRange {
			return 0, ErrNotFinite
		}
		return 0, ErrText
	}
	return v, nil
}

// fastRow parses a plain data row of exactly ncol decimal numbers split by
// sep into row without allocating. It reports false for anything else
// (comments, text, exponents, NaN ...), which the general path then reads
// and, if need be, reports.
func fastRow(b []byte, sep separator, ncol int, row *[3]float64) bool {
	b = bytes.TrimSuffix(b, []byte("\r"))
	n := 0
	i := 0
	for {
		// Skip blanks before a field.
		for i < len(b) && (b[i] == ' ' || b[i] == '\t') {
			if sep == sepTab && b[i] == '\t' && n > 0 {
				break
			}
			i++
		}
		if i == len(b) {
			return n == ncol
		}
		if n == ncol {
			return false
		}
		v, k, ok := fastNumber(b[i:], sep)
		if !ok {
			return false
		}
		row[n] = v
		n++
		i += k
		// Expect blanks, then a separator, the end, or (for whitespace)
		// the next field.
		for i < len(b) && (b[i] == ' ' || (b[i] == '\t' && sep != sepTab)) {
			i++
		}
		if i == len(b) {
			return n == ncol
		}
		switch {
		case sep == sepComma && b[i] == ',', sep == sepSemicolon && b[i] == ';', sep == sepTab && b[i] == '\t':
			i++
			if i == len(b) || n == ncol {
				// A trailing separator ends the row.
				return n == ncol && i == len(b)
			}
		case sep == sepSpace:
		default:
			return false
		}
	}
}

// pow10 holds the exactly representable powers of ten.
var pow10 = [...]float64{1, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10,
	1e11, 1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22}

// fastNumber parses an optionally signed decimal without exponent, with at
// most 15 significant digits, at the start of b; decComma also accepts a
// comma as the decimal mark. With an integer mantissa below 2⁵³ and a
// power of ten up to 10²², one correctly rounded division gives the same
// value as strconv.ParseFloat (Clinger, PLDI 1990). It returns the value,
// the bytes used and false when b needs the general parser.
func fastNumber(b []byte, sep separator) (float64, int, bool) {
	decComma := sep != sepComma
	i := 0
	neg := false
	if i < len(b) && (b[i] == '-' || b[i] == '+') {
		neg = b[i] == '-'
		i++
	}
	var mant uint64
	digits, frac := 0, 0
	dot := false
	start := i
	for ; i < len(b); i++ {
		c := b[i]
		switch {
		case c >= '0' && c <= '9':
			if mant == 0 && c == '0' && !dot {
				continue // leading zeros
			}
			mant = mant*10 + uint64(c-'0')
			digits++
			if dot {
				frac++
			}
		case (c == '.' || decComma && c == ',') && !dot:
			dot = true
		default:
			goto end
		}
	}
end:
	if i == start || (dot && i == start+1) || digits > 15 || frac > 22 {
		return 0, 0, false
	}
	if i < len(b) {
		c := b[i]
		ok := c == ' ' || c == '\t' ||
			sep == sepComma && c == ',' || sep == sepSemicolon && c == ';'
		if !ok {
			return 0, 0, false
		}
	}
	v := float64(mant) / pow10[frac]
	if neg {
		v = -v
	}
	return v, i, true
}
