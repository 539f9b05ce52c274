package peaks

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
	lines := bytes.Split(data, []byte("\n"))
	var pts []point
	var errs ErrorList
	inData := false
	var sep separator
	ncol := 0
	oneCol := 0 // first line holding a single number before the data block
	for i, raw := range lines {
		lineNo := i + 1
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
	if s.Wavelength == 0 {
		if w, ok := wavelengthFromMeta(item.Key, item.Value); ok {
			s.Wavelength = w
		}
	}
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
