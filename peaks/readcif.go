package peaks

import (
	"fmt"
	"math"
	"strings"

	"reticle/esd"
)

// A cifToken is one word of a CIF file with the line it starts on.
type cifToken struct {
	text   string
	line   int
	quoted bool // a quoted string or text field, never a tag or keyword
}

// tokenizeCIF splits CIF text into tokens: tags, keywords, bare words,
// quoted strings and semicolon text fields; comments are dropped.
func tokenizeCIF(file string, text string) ([]cifToken, error) {
	var toks []cifToken
	lines := strings.Split(text, "\n")
	for i := 0; i < len(lines); i++ {
		line := strings.TrimSuffix(lines[i], "\r")
		lineNo := i + 1
		if strings.HasPrefix(line, ";") {
			// Text field up to the next line starting with ';'.
			var b strings.Builder
			b.WriteString(line[1:])
			j := i + 1
			for ; j < len(lines) && !strings.HasPrefix(lines[j], ";"); j++ {
				b.WriteString("\n")
				b.WriteString(strings.TrimSuffix(lines[j], "\r"))
			}
			if j == len(lines) {
				return nil, &ParseError{File: file, Line: lineNo, Err: fmt.Errorf("%w: text field never closed by a line starting with ';'", ErrCIF)}
			}
			toks = append(toks, cifToken{text: b.String(), line: lineNo, quoted: true})
			i = j
			continue
		}
		for p := 0; p < len(line); {
			c := line[p]
			switch {
			case c == ' ' || c == '\t':
				p++
			case c == '#':
				p = len(line)
			case c == '\'' || c == '"':
				// A quote closes only when followed by white space or the end.
				q := p + 1
				for q < len(line) && !(line[q] == c && (q+1 == len(line) || line[q+1] == ' ' || line[q+1] == '\t')) {
					q++
				}
				if q >= len(line) {
					return nil, &ParseError{File: file, Line: lineNo, Column: p + 1, Text: line[p:], Err: fmt.Errorf("%w: unclosed quote", ErrCIF)}
				}
				toks = append(toks, cifToken{text: line[p+1 : q], line: lineNo, quoted: true})
				p = q + 1
			default:
				q := p
				for q < len(line) && line[q] != ' ' && line[q] != '\t' {
					q++
				}
				toks = append(toks, cifToken{text: line[p:q], line: lineNo})
				p = q
			}
		}
	}
	return toks, nil
}

// cifValue is a value with the line it came from.
type cifValue struct {
	text string
	line int
}

// cifBlock holds the items and loops of the first data block.
type cifBlock struct {
	items map[string]cifValue   // lower-case tag → single value
	loops map[string][]cifValue // lower-case tag → looped column
}

// parseCIFBlock reads the first data_ block of a CIF file.
func parseCIFBlock(file, text string) (*cifBlock, error) {
	toks, err := tokenizeCIF(file, text)
	if err != nil {
		return nil, err
	}
	b := &cifBlock{items: map[string]cifValue{}, loops: map[string][]cifValue{}}
	started := false
	for i := 0; i < len(toks); {
		t := toks[i]
		low := strings.ToLower(t.text)
		switch {
		case !t.quoted && strings.HasPrefix(low, "data_"):
			if started {
				return b, nil // only the first block is read
			}
			started = true
			i++
		case !t.quoted && low == "loop_":
			i++
			var tags []string
			for i < len(toks) && !toks[i].quoted && strings.HasPrefix(toks[i].text, "_") {
				tags = append(tags, strings.ToLower(toks[i].text))
				i++
			}
			if len(tags) == 0 {
				return nil, &ParseError{File: file, Line: t.line, Err: fmt.Errorf("%w: loop_ without tags", ErrCIF)}
			}
			var vals []cifToken
			for i < len(toks) && (toks[i].quoted || !isCIFReserved(toks[i].text)) {
				vals = append(vals, toks[i])
				i++
			}
			if len(vals)%len(tags) != 0 {
				return nil, &ParseError{File: file, Line: t.line, Err: fmt.Errorf("%w: loop of %d tags has %d values, not a multiple", ErrCIF, len(tags), len(vals))}
			}
			for k, v := range vals {
				tag := tags[k%len(tags)]
				b.loops[tag] = append(b.loops[tag], cifValue{v.text, v.line})
			}
		case !t.quoted && strings.HasPrefix(t.text, "_"):
			if i+1 >= len(toks) || (!toks[i+1].quoted && isCIFReserved(toks[i+1].text)) {
				return nil, &ParseError{File: file, Line: t.line, Text: t.text, Err: fmt.Errorf("%w: tag without a value", ErrCIF)}
			}
			b.items[low] = cifValue{toks[i+1].text, toks[i+1].line}
			i += 2
		case !t.quoted && (strings.HasPrefix(low, "save_") || strings.HasPrefix(low, "global_")):
			i++
		default:
			return nil, &ParseError{File: file, Line: t.line, Text: t.text, Err: fmt.Errorf("%w: value without a tag", ErrCIF)}
		}
	}
	if !started {
		return nil, &ParseError{File: file, Err: fmt.Errorf("%w: no data_ block", ErrCIF)}
	}
	return b, nil
}

// isCIFReserved reports whether an unquoted word starts a new tag, loop or
// block.
func isCIFReserved(w string) bool {
	low := strings.ToLower(w)
	return strings.HasPrefix(w, "_") || low == "loop_" || strings.HasPrefix(low, "data_") ||
		strings.HasPrefix(low, "save_") || strings.HasPrefix(low, "global_") || low == "stop_"
}

// value returns a single item, or the first entry of a looped one.
func (b *cifBlock) value(tag string) (cifValue, bool) {
	if v, ok := b.items[tag]; ok {
		return v, true
	}
	if l := b.loops[tag]; len(l) > 0 {
		return l[0], true
	}
	return cifValue{}, false
}

// cifNumber parses a CIF number with an optional standard uncertainty in
// parentheses, "1.54056(2)" → 1.54056, 0.00002. The uncertainty is 0 when
// absent. Unknown ('?') and inapplicable ('.') values are ErrText.
func cifNumber(s string) (v, su float64, err error) {
	if s == "?" || s == "." {
		return 0, 0, ErrText
	}
	num, _, _ := strings.Cut(s, "(")
	if _, err := parseNumber(num); err != nil {
		return 0, 0, err // ErrText or ErrNotFinite
	}
	v, su, err = esd.Parse(s)
	if err != nil {
		return 0, 0, ErrText
	}
	return v, su, nil
}

// parseCIF reads a powder CIF: angles from _pd_meas_2theta_scan (or the
// range items), intensities from the first of the count or intensity items
// present, and _diffrn_radiation_wavelength.
func parseCIF(file string, data []byte) (*Scan, error) {
	b, err := parseCIFBlock(file, string(data))
	if err != nil {
		return nil, err
	}
	s := &Scan{Format: "pdcif"}
	if v, ok := b.value("_diffrn_radiation_wavelength"); ok {
		w, _, err := cifNumber(v.text)
		if err != nil || !(w > 0) {
			return nil, &ParseError{File: file, Line: v.line, Text: v.text, Err: fmt.Errorf("_diffrn_radiation_wavelength: expected a wavelength in Å: %w", err)}
		}
		s.Wavelength = w
	}
	for _, tag := range []string{"_pd_block_id", "_diffrn_radiation_type", "_diffrn_source_target", "_pd_meas_datetime_initiated"} {
		if v, ok := b.items[tag]; ok {
			s.Meta = append(s.Meta, MetaItem{Line: v.line, Key: tag, Value: v.text})
		}
	}
	var ycol []cifValue
	var ytag string
	for _, tag := range []string{"_pd_meas_counts_total", "_pd_meas_intensity_total", "_pd_proc_intensity_total"} {
		if l := b.loops[tag]; len(l) > 0 {
			ycol, ytag = l, tag
			break
		}
	}
	if ycol == nil {
		return nil, &ParseError{File: file, Err: fmt.Errorf("%w: no looped _pd_meas_counts_total, _pd_meas_intensity_total or _pd_proc_intensity_total", ErrCIFMissing)}
	}
	var errs ErrorList
	xs := make([]float64, len(ycol))
	if xcol := b.loops["_pd_meas_2theta_scan"]; len(xcol) > 0 {
		if len(xcol) != len(ycol) {
			return nil, &ParseError{File: file, Line: xcol[0].line, Err: fmt.Errorf("%w: _pd_meas_2theta_scan has %d values, %s has %d", ErrCIF, len(xcol), ytag, len(ycol))}
		}
		for i, v := range xcol {
			x, _, err := cifNumber(v.text)
			if err != nil {
				errs.Add(&ParseError{File: file, Line: v.line, Text: v.text, Err: fmt.Errorf("_pd_meas_2theta_scan: %w", err)})
			}
			xs[i] = x
		}
	} else {
		var r [3]float64
		for k, tag := range []string{"_pd_meas_2theta_range_min", "_pd_meas_2theta_range_max", "_pd_meas_2theta_range_inc"} {
			v, ok := b.value(tag)
			if !ok {
				return nil, &ParseError{File: file, Err: fmt.Errorf("%w: neither _pd_meas_2theta_scan nor %s", ErrCIFMissing, tag)}
			}
			x, _, err := cifNumber(v.text)
			if err != nil {
				return nil, &ParseError{File: file, Line: v.line, Text: v.text, Err: fmt.Errorf("%s: %w", tag, err)}
			}
			r[k] = x
		}
		if !(r[2] > 0) || r[1] < r[0] {
			return nil, &ParseError{File: file, Err: fmt.Errorf("%w: 2θ range min %g, max %g, increment %g", ErrCIF, r[0], r[1], r[2])}
		}
		want := int(math.Round((r[1]-r[0])/r[2])) + 1
		if want != len(ycol) {
			return nil, &ParseError{File: file, Line: ycol[0].line, Err: fmt.Errorf("%w: the 2θ range gives %d points, %s has %d", ErrCIF, want, ytag, len(ycol))}
		}
		for i := range xs {
			xs[i] = r[0] + float64(i)*r[2]
		}
	}
	pts := make([]point, len(ycol))
	hasESD := false
	for i, v := range ycol {
		y, su, err := cifNumber(v.text)
		if err != nil {
			errs.Add(&ParseError{File: file, Line: v.line, Text: v.text, Err: fmt.Errorf("%s: %w", ytag, err)})
		}
		if su > 0 {
			hasESD = true
		}
		pts[i] = point{x: xs[i], y: y, e: su, line: v.line}
		if len(errs) >= 20 {
			break
		}
	}
	if err := errs.Err(); err != nil {
		return nil, err
	}
	if hasESD {
		for i := range pts {
			if pts[i].e == 0 {
				pts[i].e = math.Sqrt(math.Max(pts[i].y, 1))
			}
		}
	}
	if err := s.finish(file, pts, hasESD); err != nil {
		return nil, err
	}
	return s, nil
}
