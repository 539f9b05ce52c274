package scanfile

import (
	"fmt"
	"math"
	"slices"
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

// cifBlock holds the items and loops of one data block.
type cifBlock struct {
	name  string
	line  int
	items map[string]cifValue   // lower-case tag → single value
	loops map[string][]cifValue // lower-case tag → looped column
	notes []string              // problems outside the pattern that did not stop the read
}

// parseCIFBlocks reads every data_ block of a CIF file.
func parseCIFBlocks(file, text string) ([]*cifBlock, error) {
	toks, err := tokenizeCIF(file, text)
	if err != nil {
		return nil, err
	}
	var blocks []*cifBlock
	var b *cifBlock
	for i := 0; i < len(toks); {
		t := toks[i]
		low := strings.ToLower(t.text)
		switch {
		case !t.quoted && strings.HasPrefix(low, "data_"):
			b = &cifBlock{name: t.text[5:], line: t.line, items: map[string]cifValue{}, loops: map[string][]cifValue{}}
			blocks = append(blocks, b)
			i++
		case b == nil:
			if !t.quoted && (strings.HasPrefix(low, "global_") || strings.HasPrefix(low, "save_")) {
				i++
				continue
			}
			return nil, &ParseError{File: file, Line: t.line, Text: t.text, Err: fmt.Errorf("%w: %q before the first data_ block", ErrCIF, t.text)}
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
				// A broken loop of the pattern cannot be read; one of
				// metadata costs only its own items.
				if !patternLoop(tags) {
					b.notes = append(b.notes, fmt.Sprintf("line %d: a loop of %d items (%s, …) has %d values, not a multiple; it was skipped", t.line, len(tags), tags[0], len(vals)))
					continue
				}
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
			if old, ok := b.items[low]; ok {
				b.notes = append(b.notes, fmt.Sprintf("line %d: %s is given again (first on line %d); the first value was kept", t.line, t.text, old.line))
			} else {
				b.items[low] = cifValue{toks[i+1].text, toks[i+1].line}
			}
			i += 2
		case !t.quoted && (strings.HasPrefix(low, "save_") || strings.HasPrefix(low, "global_")):
			i++
		default:
			return nil, &ParseError{File: file, Line: t.line, Text: t.text, Err: fmt.Errorf("%w: value without a tag", ErrCIF)}
		}
	}
	if len(blocks) == 0 {
		return nil, &ParseError{File: file, Err: fmt.Errorf("%w: no data_ block", ErrCIF)}
	}
	return blocks, nil
}

// patternLoop reports whether a loop's tags hold a pattern: angles,
// intensities or their weights.
func patternLoop(tags []string) bool {
	for _, t := range tags {
		if isAngleTag(t) || slices.Contains(cifIntensities, t) || t == "_pd_proc_ls_weight" {
			return true
		}
	}
	return false
}

// isAngleTag reports whether a looped item holds the 2θ of each point:
// one of the powder dictionary's (cifAngleColumns), or a name that mixes
// them, as some programs write (_pd_proc_2theta_scan,
// _pd_meas_2theta_corrected): a _pd_meas_ or _pd_proc_ item about 2θ
// that is neither a range item nor an uncertainty.
func isAngleTag(t string) bool {
	if slices.Contains(cifAngleColumns, t) {
		return true
	}
	return (strings.HasPrefix(t, "_pd_meas_") || strings.HasPrefix(t, "_pd_proc_")) &&
		strings.Contains(t, "2theta") && !strings.Contains(t, "range") && !strings.HasSuffix(t, "_su") && !strings.Contains(t, "fixed")
}

// angleColumn returns the block's looped 2θ column: a name of the
// dictionary first, else a mixed name (see isAngleTag).
func (b *cifBlock) angleColumn() ([]cifValue, string) {
	if x, t := b.firstLoop(cifAngleColumns); x != nil {
		return x, t
	}
	var tags []string
	for t := range b.loops {
		if isAngleTag(t) {
			tags = append(tags, t)
		}
	}
	slices.Sort(tags)
	if len(tags) == 0 {
		return nil, ""
	}
	return b.loops[tags[0]], tags[0]
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

// cifNull reports whether a CIF value is unknown ('?') or inapplicable
// ('.').
func cifNull(s string) bool { return s == "?" || s == "." }

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

// The pdCIF items (IUCr powder dictionary) that hold a pattern's angles
// and intensities, in order of preference.
var (
	cifAngleColumns = []string{"_pd_meas_2theta_scan", "_pd_proc_2theta_corrected", "_pd_meas_angle_2theta"}
	cifAngleRanges  = []string{"_pd_meas_2theta_range", "_pd_proc_2theta_range"}
	cifIntensities  = []string{"_pd_meas_counts_total", "_pd_meas_intensity_total", "_pd_proc_intensity_total", "_pd_proc_intensity_net"}
	// Items of patterns that are not angle-dispersive.
	cifOtherAxes = []string{"_pd_meas_time_of_flight", "_pd_proc_time_of_flight", "_pd_meas_2theta_fixed", "_pd_meas_detector_energy", "_pd_proc_energy_detection"}
)

// firstLoop returns the first of tags that the block loops, with its
// values; nil when it loops none.
func (b *cifBlock) firstLoop(tags []string) ([]cifValue, string) {
	for _, t := range tags {
		if l := b.loops[t]; len(l) > 0 {
			return l, t
		}
	}
	return nil, ""
}

// hasPattern reports whether a block holds a looped intensity and angles,
// a column or a range.
func (b *cifBlock) hasPattern() bool {
	if y, _ := b.firstLoop(cifIntensities); y == nil {
		return false
	}
	if x, _ := b.angleColumn(); x != nil {
		return true
	}
	for _, r := range cifAngleRanges {
		if _, ok := b.value(r + "_inc"); ok {
			return true
		}
	}
	return false
}

// measured reports whether a block's intensities are measured (_pd_meas)
// rather than processed.
func (b *cifBlock) measured() bool {
	return len(b.loops["_pd_meas_counts_total"]) > 0 || len(b.loops["_pd_meas_intensity_total"]) > 0
}

// ReadOptions choose what a reader takes from a file.
type ReadOptions struct {
	// Block names the data block of a CIF file to read; empty means the
	// first that holds a measured pattern, else the first that holds a
	// processed one.
	Block string
}

// parseCIF reads a powder CIF: the pattern of one data block, its
// wavelength and what the file says of the radiation.
func parseCIF(file string, data []byte, opt ReadOptions) (*Scan, error) {
	blocks, err := parseCIFBlocks(file, string(data))
	if err != nil {
		return nil, err
	}
	var withPattern []*cifBlock
	for _, b := range blocks {
		if b.hasPattern() {
			withPattern = append(withPattern, b)
		}
	}
	var b *cifBlock
	if opt.Block != "" {
		for _, c := range blocks {
			if strings.EqualFold(c.name, opt.Block) {
				b = c
			}
		}
		if b == nil {
			return nil, &ParseError{File: file, Err: fmt.Errorf("%w: no data block %q (blocks with a pattern: %s)", ErrCIFMissing, opt.Block, blockNames(withPattern))}
		}
	} else {
		for _, c := range withPattern {
			if c.measured() {
				b = c
				break
			}
		}
		if b == nil && len(withPattern) > 0 {
			b = withPattern[0]
		}
	}
	if b == nil {
		b = blocks[0]
		for _, c := range blocks {
			for _, t := range cifOtherAxes {
				if len(c.loops[t]) > 0 || c.items[t].text != "" {
					return nil, &ParseError{File: file, Line: c.line, Err: fmt.Errorf("%w: the pattern of block %q is not angle-dispersive (it has %s); Reticle reads intensities against 2θ at one wavelength", ErrNotAngle, c.name, t)}
				}
			}
		}
	}
	s := &Scan{Format: "pdcif", Block: b.name}
	s.Warnings = append(s.Warnings, b.notes...)
	if len(blocks) > 1 && len(withPattern) == 1 {
		s.Warnings = append(s.Warnings, fmt.Sprintf("the file holds %d data blocks; the pattern of block %s was read", len(blocks), b.name))
	}
	for _, c := range withPattern {
		s.Blocks = append(s.Blocks, c.name)
	}
	if len(withPattern) > 1 {
		s.Warnings = append(s.Warnings, fmt.Sprintf("the file holds %d patterns (data blocks %s); block %s was read", len(withPattern), blockNames(withPattern), b.name))
	}
	// The radiation is stated in the pattern's block, or (files that
	// keep the experiment and the pattern apart) in another.
	rb := b
	if !b.statesRadiation() {
		for _, c := range blocks {
			if c.statesRadiation() {
				rb = c
				break
			}
		}
	}
	if rb != b {
		s.Warnings = append(s.Warnings, rb.notes...)
	}
	if err := cifRadiation(file, rb, s); err != nil {
		return nil, err
	}
	for _, tag := range []string{"_pd_block_id", "_diffrn_radiation_type", "_diffrn_source_target", "_diffrn_radiation_monochromator", "_pd_meas_datetime_initiated"} {
		if v, ok := b.items[tag]; ok {
			s.Meta = append(s.Meta, MetaItem{Line: v.line, Key: tag, Value: v.text})
		}
	}
	ycol, ytag := b.firstLoop(cifIntensities)
	if ycol == nil {
		return nil, &ParseError{File: file, Line: b.line, Err: fmt.Errorf("%w: block %s has no looped intensities (%s)", ErrCIFMissing, b.name, strings.Join(cifIntensities, ", "))}
	}
	xs, err := cifAngles(file, b, s, ycol, ytag)
	if err != nil {
		return nil, err
	}
	var errs ErrorList
	pts := make([]point, 0, len(ycol))
	hasESD := false
	weights := b.loops["_pd_proc_ls_weight"]
	if len(weights) != len(ycol) {
		weights = nil
	}
	sucol := b.loops[ytag+"_su"]
	if len(sucol) != len(ycol) {
		sucol = nil
	}
	dropped, nulls, nullWeights := 0, 0, 0
	for i, v := range ycol {
		if cifNull(v.text) || math.IsNaN(xs[i]) {
			nulls++
			continue
		}
		y, su, err := cifNumber(v.text)
		if err != nil {
			errs.Add(&ParseError{File: file, Line: v.line, Text: v.text, Err: fmt.Errorf("%s: %w", ytag, err)})
			if len(errs) >= 20 {
				break
			}
			continue
		}
		if su == 0 && sucol != nil {
			if cifNull(sucol[i].text) {
				nullWeights++
			} else if e, _, err := cifNumber(sucol[i].text); err == nil && e > 0 {
				su = e
			} else {
				errs.Add(&ParseError{File: file, Line: sucol[i].line, Text: sucol[i].text, Err: fmt.Errorf("%s_su: want an uncertainty above 0: %w", ytag, ErrText)})
			}
		}
		if su == 0 && weights != nil {
			if cifNull(weights[i].text) {
				nullWeights++
				pts = append(pts, point{x: xs[i], y: y, line: v.line})
				continue
			}
			w, _, err := cifNumber(weights[i].text)
			switch {
			case err != nil || w < 0:
				errs.Add(&ParseError{File: file, Line: weights[i].line, Text: weights[i].text, Err: fmt.Errorf("_pd_proc_ls_weight: want a weight 1/σ² of 0 or more: %w", ErrText)})
			case w == 0:
				// A zero weight leaves the point out of every fit
				// (excluded regions).
				dropped++
				continue
			default:
				su = 1 / math.Sqrt(w)
			}
		}
		if su > 0 {
			hasESD = true
		}
		pts = append(pts, point{x: xs[i], y: y, e: su, line: v.line})
	}
	if err := errs.Err(); err != nil {
		return nil, err
	}
	if dropped > 0 {
		s.Warnings = append(s.Warnings, fmt.Sprintf("%d points with zero weight (_pd_proc_ls_weight) were left out", dropped))
	}
	if nulls > 0 {
		s.Warnings = append(s.Warnings, fmt.Sprintf("%d of the points had an unknown (?) or inapplicable (.) angle or intensity and were left out", nulls))
	}
	if nullWeights > 0 {
		s.Warnings = append(s.Warnings, fmt.Sprintf("%d of the points had no weight or uncertainty (? or .) and take counting noise", nullWeights))
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
	s.checkNoise(ytag == "_pd_proc_intensity_net")
	return s, nil
}

// blockNames lists the names of blocks.
func blockNames(bs []*cifBlock) string {
	var w []string
	for _, b := range bs {
		w = append(w, b.name)
	}
	if len(w) == 0 {
		return "none"
	}
	return strings.Join(w, ", ")
}

// cifAngles returns the 2θ of every point: from a looped column, else
// from range items. When both exist and disagree the column wins, with a
// note.
func cifAngles(file string, b *cifBlock, s *Scan, ycol []cifValue, ytag string) ([]float64, error) {
	xs := make([]float64, len(ycol))
	xcol, xtag := b.angleColumn()
	var rng [3]float64
	var rtag string
	for _, r := range cifAngleRanges {
		ok := true
		for k, suffix := range []string{"_min", "_max", "_inc"} {
			v, found := b.value(r + suffix)
			if !found {
				ok = false
				break
			}
			x, _, err := cifNumber(v.text)
			if err != nil {
				if xcol != nil {
					ok = false // the column will do
					break
				}
				return nil, &ParseError{File: file, Line: v.line, Text: v.text, Err: fmt.Errorf("%s%s: %w", r, suffix, err)}
			}
			rng[k] = x
		}
		if ok {
			rtag = r
			break
		}
	}
	if xcol != nil {
		if len(xcol) != len(ycol) {
			return nil, &ParseError{File: file, Line: xcol[0].line, Err: fmt.Errorf("%w: %s has %d values, %s has %d", ErrCIF, xtag, len(xcol), ytag, len(ycol))}
		}
		if !slices.Contains(cifAngleColumns, xtag) {
			s.Warnings = append(s.Warnings, fmt.Sprintf("the angles were read from %s, which is not a name of the powder dictionary (%s)", xtag, strings.Join(cifAngleColumns, ", ")))
		}
		var errs ErrorList
		for i, v := range xcol {
			if cifNull(v.text) {
				xs[i] = math.NaN() // the point is left out
				continue
			}
			x, _, err := cifNumber(v.text)
			if err != nil {
				errs.Add(&ParseError{File: file, Line: v.line, Text: v.text, Err: fmt.Errorf("%s: %w", xtag, err)})
			}
			xs[i] = x
		}
		if err := errs.Err(); err != nil {
			return nil, err
		}
		if rtag != "" && rng[2] > 0 {
			want := int(math.Round((rng[1]-rng[0])/rng[2])) + 1
			if want != len(xs) || math.Abs(xs[0]-rng[0]) > rng[2]/2 || math.Abs(xs[len(xs)-1]-rng[1]) > rng[2]/2 {
				s.Warnings = append(s.Warnings, fmt.Sprintf("the %s items (%s to %s° in steps of %s, %d points) disagree with the %s column (%s to %s°, %d points); the column was used",
					rtag, ftoa(rng[0]), ftoa(rng[1]), ftoa(rng[2]), want, xtag, ftoa(xs[0]), ftoa(xs[len(xs)-1]), len(xs)))
			}
		}
		return xs, nil
	}
	if rtag == "" {
		return nil, &ParseError{File: file, Line: b.line, Err: fmt.Errorf("%w: block %s has neither a 2θ column (%s) nor the range items (%s_min, _max, _inc)", ErrCIFMissing, b.name, strings.Join(cifAngleColumns, ", "), cifAngleRanges[0])}
	}
	if !(rng[2] > 0) || rng[1] < rng[0] {
		return nil, &ParseError{File: file, Err: fmt.Errorf("%w: 2θ range min %g, max %g, increment %g", ErrCIF, rng[0], rng[1], rng[2])}
	}
	want := int(math.Round((rng[1]-rng[0])/rng[2])) + 1
	if want != len(ycol) {
		return nil, &ParseError{File: file, Line: ycol[0].line, Err: fmt.Errorf("%w: the 2θ range gives %d points, %s has %d", ErrCIF, want, ytag, len(ycol))}
	}
	for i := range xs {
		xs[i] = rng[0] + float64(i)*rng[2]
	}
	return xs, nil
}

// statesRadiation reports whether a block gives a wavelength.
func (b *cifBlock) statesRadiation() bool {
	_, ok := b.value("_diffrn_radiation_wavelength")
	_, proc := b.items["_pd_proc_wavelength"]
	return ok || proc
}

// cifRadiation reads the wavelength (one, or a looped list with weights:
// a K-alpha doublet) and what the block says of the radiation: K-alpha1
// alone, or a monochromator that removes K-beta.
func cifRadiation(file string, b *cifBlock, s *Scan) error {
	lams := b.loops["_diffrn_radiation_wavelength"]
	wts := b.loops["_diffrn_radiation_wavelength_wt"]
	if len(lams) == 0 {
		// The wavelength the data were processed with (refined against
		// a standard) before the one stated for the source.
		stated, sok := b.items["_diffrn_radiation_wavelength"]
		proc, pok := b.items["_pd_proc_wavelength"]
		switch {
		case pok && !cifNull(proc.text):
			lams = []cifValue{proc}
			if sok && stated.text != proc.text && !cifNull(stated.text) {
				s.Warnings = append(s.Warnings, fmt.Sprintf("the file states the wavelength %s Å (_diffrn_radiation_wavelength) and %s Å (_pd_proc_wavelength, the one the data were processed with); the second was used", stated.text, proc.text))
			}
		case sok:
			lams = []cifValue{stated}
		}
	}
	var ls, ws []float64
	for i, v := range lams {
		w, _, err := cifNumber(v.text)
		if err != nil || !(w > 0) {
			return &ParseError{File: file, Line: v.line, Text: v.text, Err: fmt.Errorf("_diffrn_radiation_wavelength: expected a wavelength in Å: %w", err)}
		}
		ls = append(ls, w)
		wt := 1.0
		if i < len(wts) {
			if x, _, err := cifNumber(wts[i].text); err == nil && x > 0 {
				wt = x
			}
		}
		ws = append(ws, wt)
	}
	switch {
	case len(ls) == 1:
		s.Wavelength = ls[0]
	case len(ls) >= 2:
		// The strongest line is K-alpha1; the next the second line of
		// the doublet, its weight relative to the first.
		i1 := 0
		for i := range ls {
			if ws[i] > ws[i1] {
				i1 = i
			}
		}
		i2 := -1
		for i := range ls {
			if i != i1 && (i2 < 0 || ws[i] > ws[i2]) {
				i2 = i
			}
		}
		s.Wavelength, s.Wavelength2, s.Ratio2 = ls[i1], ls[i2], ws[i2]/ws[i1]
	}
	if p := strings.ToLower(b.items["_diffrn_radiation_probe"].text); p != "" && !cifNull(p) {
		s.Probe = p
		if p != "x-ray" {
			// Neutrons and electrons of one wavelength: no K lines.
			s.NoKBeta = true
		}
	}
	typ := strings.ToLower(b.items["_diffrn_radiation_type"].text)
	mono := strings.ToLower(b.items["_diffrn_radiation_monochromator"].text)
	if t := b.items["_diffrn_source_target"].text; t != "" && t != "?" {
		s.Anode = t
	}
	// K-alpha1 alone: the type says so (CIF markup \a~1~, or a1 / alpha1),
	// or a monochromator in the incident beam.
	if strings.Contains(typ, "\\a~1~") || strings.Contains(typ, "a1") || strings.Contains(typ, "alpha1") ||
		strings.Contains(mono, "primary") || strings.Contains(mono, "incident") || strings.Contains(mono, "johans") {
		s.KAlpha1Only = true
	}
	if s.KAlpha1Only || mono != "" && mono != "?" && mono != "." && mono != "none" {
		s.NoKBeta = true
	}
	if s.Anode == "" {
		for _, a := range Anodes {
			if strings.HasPrefix(typ, strings.ToLower(a.Symbol)) {
				s.Anode = a.Symbol
			}
		}
	}
	return nil
}
