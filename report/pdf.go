package report

import (
	"bytes"
	"fmt"
	"io"
	"math"
	"path/filepath"
	"reticle/indexing"
	"slices"
	"strings"
	"time"

	"codeberg.org/go-fonts/liberation/liberationmonoregular"
	"codeberg.org/go-fonts/liberation/liberationsansbold"
	"codeberg.org/go-fonts/liberation/liberationsansitalic"
	"codeberg.org/go-fonts/liberation/liberationsansregular"
	"codeberg.org/go-pdf/fpdf"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"

	"reticle/analysis"
	"reticle/cell"
	"reticle/esd"
	"reticle/figure"
	"reticle/refine"
	"reticle/scanfile"
)

// A Paper is a page size.
type Paper string

// The page sizes.
const (
	A4     Paper = "A4"
	Letter Paper = "Letter"
)

// ParsePaper reads a page size name, ignoring case.
func ParsePaper(s string) (Paper, error) {
	switch strings.ToLower(s) {
	case "a4", "":
		return A4, nil
	case "letter":
		return Letter, nil
	}
	return "", fmt.Errorf("report: unknown paper %q (want A4 or Letter)", s)
}

// Limitations is the paragraph every report carries.
const Limitations = "An indexing is a hypothesis until it is confirmed, for example by a full-pattern fit " +
	"or a crystal structure: a cell that explains the observed lines may be a sub- or super-cell of the " +
	"true one, or a cell of another lattice with the same calculated lines. The uncertainties are " +
	"statistical, from the peak-position esds and the scatter of the residuals; they do not include the " +
	"wavelength's uncertainty, the specimen's temperature, or instrument errors other than those refined. " +
	"Lines of an impurity phase that happen to coincide with calculated lines are counted as indexed."

// pdfWriter lays out a report.
type pdfWriter struct {
	pdf   *fpdf.Fpdf
	width float64 // text width, mm
	left  float64
}

const (
	fontSans = "sans"
	fontMono = "mono"
)

// WritePDF writes the report of an analysis (its chosen cell) on the
// given paper; date fills the date line and the creation date.
func WritePDF(w io.Writer, a *analysis.Analysis, paper Paper, date time.Time) error {
	pdf := fpdf.NewCustom(&fpdf.InitType{OrientationStr: "P", UnitStr: "mm", SizeStr: string(paper)})
	pdf.SetCatalogSort(true)
	pdf.SetCreationDate(date)
	pdf.SetModificationDate(date)
	pdf.SetCompression(true)
	pdf.AddUTF8FontFromBytes(fontSans, "", liberationsansregular.TTF)
	pdf.AddUTF8FontFromBytes(fontSans, "B", liberationsansbold.TTF)
	pdf.AddUTF8FontFromBytes(fontSans, "I", liberationsansitalic.TTF)
	pdf.AddUTF8FontFromBytes(fontMono, "", liberationmonoregular.TTF)
	title := "Refined cell report"
	if a.Settings.Sample != "" {
		title += ": " + a.Settings.Sample
	}
	pdf.SetTitle(title, true)
	pdf.SetCreator(fmt.Sprintf("%s %s", Program, Version), true)
	pdf.SetMargins(18, 16, 18)
	pdf.SetAutoPageBreak(true, 18)
	pdf.AliasNbPages("{pages}")
	pdf.SetFooterFunc(func() {
		pdf.SetY(-12)
		pdf.SetFont(fontSans, "", 7.5)
		pdf.SetTextColor(110, 110, 110)
		pdf.CellFormat(0, 4, fmt.Sprintf("%s %s · %s · page %d of {pages}", Program, Version, filepath.Base(a.Scan.Path), pdf.PageNo()), "", 0, "C", false, 0, "")
		pdf.SetTextColor(0, 0, 0)
	})
	pw, _ := pdf.GetPageSize()
	lm, _, rm, _ := pdf.GetMargins()
	x := &pdfWriter{pdf: pdf, width: pw - lm - rm, left: lm}
	pdf.AddPage()
	x.header(a, title, date)
	if err := x.figure(a); err != nil {
		return err
	}
	if c := a.ChosenCandidate(); c != nil {
		x.refined(c)
		if pf := PatternOf(a, c); pf != nil {
			x.heading("Whole-pattern fit")
			x.keyValues(PatternRows(pf), 30)
		}
		x.contents(a, c)
	} else {
		x.heading("Refined cell")
		x.para("No cell explains the lines within the search bounds.")
	}
	x.candidates(a)
	x.lines(a)
	x.settings(a)
	x.heading("Limitations")
	x.para(Limitations)
	if len(a.Warnings) > 0 {
		x.heading("Warnings")
		for _, m := range a.Warnings {
			x.para("• " + m)
		}
	}
	if err := pdf.Error(); err != nil {
		return fmt.Errorf("report: PDF: %w", err)
	}
	return pdf.Output(w)
}

func (x *pdfWriter) heading(s string) {
	p := x.pdf
	_, h := p.GetPageSize()
	if p.GetY() > h-50 {
		p.AddPage()
	}
	p.Ln(3)
	p.SetFont(fontSans, "B", 11)
	p.SetTextColor(0x1f, 0x3a, 0x5f)
	p.CellFormat(0, 6, s, "", 1, "L", false, 0, "")
	p.SetDrawColor(0x1f, 0x3a, 0x5f)
	p.SetLineWidth(0.3)
	y := p.GetY()
	p.Line(x.left, y, x.left+x.width, y)
	p.SetTextColor(0, 0, 0)
	p.Ln(1.5)
}

func (x *pdfWriter) para(s string) {
	x.pdf.SetFont(fontSans, "", 8.5)
	x.pdf.MultiCell(0, 4, s, "", "L", false)
}

// keyValues prints two columns of labels and values.
func (x *pdfWriter) keyValues(rows []Row, labelWidth float64) {
	p := x.pdf
	for _, r := range rows {
		p.SetFont(fontSans, "B", 8.5)
		p.CellFormat(labelWidth, 4.6, r.Label, "", 0, "L", false, 0, "")
		font := fontSans
		size := 8.5
		if strings.HasPrefix(r.Label, "SHA-256") {
			font, size = fontMono, 7.5
		}
		p.SetFont(font, "", size)
		p.MultiCell(x.width-labelWidth, 4.6, r.Value, "", "L", false)
	}
}

func (x *pdfWriter) header(a *analysis.Analysis, title string, date time.Time) {
	p := x.pdf
	p.SetFont(fontSans, "B", 16)
	p.CellFormat(0, 9, title, "", 1, "L", false, 0, "")
	p.SetDrawColor(0x1f, 0x3a, 0x5f)
	p.SetLineWidth(0.6)
	p.Line(x.left, p.GetY(), x.left+x.width, p.GetY())
	p.Ln(2.5)
	r := a.Radiation
	rad := fmt.Sprintf("%s, λ(Kα1) = %s Å", r.Name, ftoa(r.Lambda1))
	if r.Doublet() {
		rad += fmt.Sprintf(", λ(Kα2) = %s Å, I(Kα2)/I(Kα1) = %s", ftoa(r.Lambda2), ftoa(r.Ratio2))
	}
	sample := a.Settings.Sample
	if sample == "" {
		sample = "(not named)"
	}
	lo, hi := a.Scan.Range()
	rows := []Row{
		{"Sample", sample},
		{"Input file", a.Scan.Path},
		{"SHA-256", a.Scan.SHA256},
		{"Scan", fmt.Sprintf("%d points, %.3f–%.3f° 2θ, step %.4f°", a.Scan.Len(), lo, hi, a.Scan.Step())},
		{"Date", date.Format("2006-01-02 15:04 MST")},
		{"Program", fmt.Sprintf("%s %s", Program, Version)},
		{"Radiation", rad},
		{"Corrections", correctionsText(a)},
		{"Lines", linesText(a)},
	}
	if c := a.ChosenCandidate(); c != nil {
		rows = append(rows, Row{"Cell reported", fmt.Sprintf("candidate %d of %d: %s %s", c.Rank, len(a.Candidates), c.Cell().System, c.Cell().Centring)})
	}
	x.keyValues(rows, 30)
}

// correctionsText describes the corrections of the chosen cell's
// refinement.
func correctionsText(a *analysis.Analysis) string {
	c := a.ChosenCandidate()
	if c == nil || c.Refined == nil {
		r := a.Settings.Resolved(a.Scan)
		return r.Corrections.String()
	}
	r := c.Refined
	// The chosen model first, as the batch summary names it.
	s := r.ChosenCorrections().String()
	switch {
	case r.StandardFit != nil:
		s += fmt.Sprintf(", fixed by the internal standard %s (%d lines)", r.StandardFit.Standard.Name, r.StandardFit.Fitted)
		if r.Selection != nil {
			s += "; " + r.Selection.Reason()
		}
	case r.Selection != nil:
		s = r.Selection.Reason()
		if r.Selection.Averaged > 0 && r.Corrections != r.Selection.Chosen {
			s += fmt.Sprintf("; reported: %s, each the mean over that choice", r.Corrections)
		}
	default:
		s += "; fixed by the user"
	}
	if r.Corrections.Has(refine.Displacement) || r.Corrections.Has(refine.Transparency) {
		s += fmt.Sprintf("; goniometer radius %s mm", ftoa(r.Radius))
	}
	return s
}

func (x *pdfWriter) figure(a *analysis.Analysis) error {
	const wmm, hmm = 174.0, 82.0
	pl := figure.Pattern(a, figure.Options{})
	pl.Title.Text = ""
	c := vgimg.NewWith(vgimg.UseWH(vg.Length(wmm)*vg.Millimeter, vg.Length(hmm)*vg.Millimeter), vgimg.UseDPI(200))
	pl.Draw(draw.New(c))
	var buf bytes.Buffer
	if _, err := (vgimg.PngCanvas{Canvas: c}).WriteTo(&buf); err != nil {
		return fmt.Errorf("report: figure: %w", err)
	}
	p := x.pdf
	p.RegisterImageOptionsReader("pattern", fpdf.ImageOptions{ImageType: "PNG"}, &buf)
	p.Ln(2)
	w := x.width
	h := w * hmm / wmm
	p.ImageOptions("pattern", x.left, p.GetY(), w, h, true, fpdf.ImageOptions{ImageType: "PNG"}, 0, "")
	p.SetFont(fontSans, "I", 7.5)
	caption := "Observed counts (dark grey), fitted profile (orange, beneath), background (blue, dashed), difference observed − fitted (green, offset below); " +
		"pink ticks mark the calculated lines of the reported cell; triangles mark accepted peaks, black crosses rejected ones."
	p.MultiCell(0, 3.6, caption, "", "L", false)
	return nil
}

func (x *pdfWriter) refined(c *analysis.Candidate) {
	x.heading("Refined cell")
	ce := c.Cell()
	if c.Refined == nil {
		x.para(fmt.Sprintf("%s (indexing values; the refinement failed: %v)", ce, c.RefineErr))
		return
	}
	r := c.Refined
	s := c.Solution
	rows := append(CellSourceRows(c), RefinementRows(r)...)
	rows = append(rows, Row{"figures of merit", fmt.Sprintf("M_N = %.1f (de Wolff 1968), F_N = %.1f (%.4f°, %d) (Smith & Snyder 1979), N = %d", s.M, s.FN, s.FNMeanDiff, s.FNPossible, s.FigureLines)})
	x.keyValues(rows, 30)
	if n := len(r.Params); n > 1 {
		x.pdf.Ln(1)
		x.pdf.SetFont(fontSans, "B", 8.5)
		x.pdf.CellFormat(0, 4.6, "Correlation matrix", "", 1, "L", false, 0, "")
		cols := []column{{"", 28, "L"}}
		for _, p := range r.Params {
			cols = append(cols, column{p.Name, 20, "R"})
		}
		var rowsT [][]string
		for i, p := range r.Params {
			row := []string{p.Name}
			for j := range r.Params {
				row = append(row, fmt.Sprintf("%+.3f", r.Correlation[i][j]))
			}
			rowsT = append(rowsT, row)
		}
		x.table(cols, rowsT)
	}
	for _, m := range r.Warnings {
		x.para("Note: " + m)
	}
}

func (x *pdfWriter) contents(a *analysis.Analysis, cand *analysis.Candidate) {
	if cand.Contents == nil {
		return
	}
	x.heading("Cell contents")
	x.keyValues(ContentsRows(cand.Contents, *a.Settings.Formula, a.Settings.Density), 30)
}

// A column of a table: title, width in mm, alignment "L", "C" or "R".
type column struct {
	title string
	width float64
	align string
}

// table prints a table with a shaded header and banded rows, repeating the
// header after a page break.
func (x *pdfWriter) table(cols []column, rows [][]string) {
	p := x.pdf
	const rh = 4.4
	pw, ph := p.GetPageSize()
	// Columns wider together than the text area are narrowed alike.
	lm, _, rm, _ := p.GetMargins()
	total := 0.0
	for _, c := range cols {
		total += c.width
	}
	if avail := pw - lm - rm; total > avail {
		cols = slices.Clone(cols)
		for i := range cols {
			cols[i].width *= avail / total
		}
	}
	head := func() {
		p.SetFont(fontSans, "B", 7.5)
		p.SetFillColor(0xe4, 0xea, 0xf2)
		for _, c := range cols {
			p.CellFormat(c.width, rh+0.6, c.title, "", 0, c.align, true, 0, "")
		}
		p.Ln(-1)
	}
	head()
	p.SetFont(fontSans, "", 7.5)
	for i, r := range rows {
		if p.GetY()+rh > ph-20 {
			p.AddPage()
			head()
			p.SetFont(fontSans, "", 7.5)
		}
		fill := i%2 == 1
		p.SetFillColor(0xf5, 0xf7, 0xfa)
		for j, c := range cols {
			v := ""
			if j < len(r) {
				v = r[j]
			}
			// A value wider than its column is set smaller rather
			// than run into the next.
			if w := p.GetStringWidth(v); w > c.width-1 {
				p.SetFontSize(math.Max(7.5*(c.width-1)/w, 4.5))
			}
			p.CellFormat(c.width, rh, v, "", 0, c.align, fill, 0, "")
			p.SetFontSize(7.5)
		}
		p.Ln(-1)
	}
}

func (x *pdfWriter) candidates(a *analysis.Analysis) {
	x.heading("Candidate cells")
	if len(a.Candidates) == 0 {
		x.para("None within the search bounds.")
		return
	}
	// Columns for the parameters that some candidate's system leaves
	// free.
	free := map[string]bool{}
	for _, c := range a.Candidates {
		for _, n := range c.Cell().System.FreeNames() {
			free[n] = true
		}
	}
	cols := []column{{"#", 7, "R"}, {"system", 22, "L"}, {"centring", 13, "C"}}
	type param struct {
		name, title string
		get         func(cell.Cell) float64
	}
	params := []param{
		{"a", "a (Å)", func(c cell.Cell) float64 { return c.A }}, {"b", "b (Å)", func(c cell.Cell) float64 { return c.B }},
		{"c", "c (Å)", func(c cell.Cell) float64 { return c.C }}, {"alpha", "α (°)", func(c cell.Cell) float64 { return c.Alpha }},
		{"beta", "β (°)", func(c cell.Cell) float64 { return c.Beta }}, {"gamma", "γ (°)", func(c cell.Cell) float64 { return c.Gamma }},
	}
	var shown []param
	for _, p := range params {
		if free[p.name] || p.name == "c" {
			shown = append(shown, p)
			cols = append(cols, column{p.title, 15, "R"})
		}
	}
	cols = append(cols, column{"V (Å³)", 15, "R"}, column{"probability", 15, "R"}, column{"M_N", 12, "R"},
		column{"F_N", 12, "R"}, column{"indexed", 13, "R"}, column{"Z", 17, "R"}, column{"note", 13, "L"})
	var rows [][]string
	for i, c := range a.Candidates {
		ce := c.Cell()
		z := ""
		if c.Contents != nil {
			z = fmt.Sprint(c.Contents.Z)
			if !c.Contents.Whole {
				z += " (not whole)"
			}
		}
		mark := ""
		if i == a.Chosen {
			mark = "reported"
		}
		v, _ := c.Volume()
		row := []string{fmt.Sprint(c.Rank), ce.System.String(), ce.Centring.String()}
		for _, p := range shown {
			row = append(row, fmt.Sprintf("%.4f", p.get(ce)))
		}
		row = append(row, fmt.Sprintf("%.2f", v), Percent(c.Probability), fmt.Sprintf("%.1f", c.M), fmt.Sprintf("%.1f", c.FN), fmt.Sprintf("%d/%d", c.Indexed, c.Indexed+c.Unindexed), z, mark)
		rows = append(rows, row)
	}
	x.table(cols, rows)
	x.pdf.SetFont(fontSans, "I", 7.5)
	x.pdf.MultiCell(0, 3.6, fmt.Sprintf("probability: the chance that the cell is the lattice of the lines, of the candidates found or none (the evidence of the line positions under each cell, normalised); M_N after de Wolff (1968) and F_N after Smith & Snyder (1979), over the first %d lines; a Z marked (not whole) does not fit the measured density.", a.Candidates[0].FigureLines), "", "L", false)
	if r := a.Search; r != nil {
		x.pdf.MultiCell(0, 3.6, SearchText(r), "", "L", false)
	}
}

// SearchText describes an indexing search in one paragraph: the systems
// searched, the bounds, why it stopped, the first cell's probability and
// the warnings.
func SearchText(r *indexing.Result) string {
	var names []string
	for _, s := range r.Searched {
		names = append(names, s.String())
	}
	t := fmt.Sprintf("Searched %s (first %d lines; edges up to %g Å, volumes up to %g Å³, zero shift up to %.3g°): %s.",
		strings.Join(names, ", "), r.LinesUsed, r.Bounds.MaxEdge, r.Bounds.MaxVolume, r.Bounds.ZeroRange, r.Stop)
	if len(r.Solutions) > 0 {
		t += fmt.Sprintf(" The first cell's probability from the line positions, among the candidates found, is %s.", Percent(r.Solutions[0].Probability))
	}
	for _, w := range r.Warnings {
		t += " Warning: " + w + "."
	}
	return t
}

func (x *pdfWriter) lines(a *analysis.Analysis) {
	x.heading("Peaks and their indices")
	cols := []column{{"#", 7, "R"}, {"2θ obs (°)", 24, "R"}, {"d (Å)", 22, "R"}, {"height", 16, "R"}, {"FWHM (°)", 15, "R"},
		{"hkl", 30, "C"}, {"2θ calc (°)", 19, "R"}, {"Δ2θ (°)", 15, "R"}, {"Δ/σ", 11, "R"}, {"flags", 15, "L"}}
	c := a.ChosenCandidate()
	var rows [][]string
	for i, r := range PeakRows(a) {
		note := ""
		switch {
		case r.Rejected:
			note = "rejected"
		case r.CompanionOf != nil:
			note = fmt.Sprintf("K-beta of %d", *r.CompanionOf+1)
		case !r.Indexed && c != nil:
			note = "unindexed"
		}
		calc, delta, norm := "", "", ""
		if r.Indexed {
			calc, delta = fmt.Sprintf("%.4f", r.TwoThetaCalc), fmt.Sprintf("%+.4f", r.Delta)
			if _, rr, ok := lineOf(c, r.TwoTheta); ok && rr != nil {
				norm = fmt.Sprintf("%+.1f", rr.Sigmas)
				if rr.Flagged {
					note = "flagged"
				}
				if rr.Excluded {
					note = "excluded"
				}
			}
		}
		rows = append(rows, []string{fmt.Sprint(i + 1), esd.Format(r.TwoTheta, r.TwoThetaESD), esd.Format(r.D, r.DESD),
			fmt.Sprintf("%.0f", r.Height), fmt.Sprintf("%.4f", r.FWHM), r.HKL, calc, delta, norm, note})
	}
	x.table(cols, rows)
}

func (x *pdfWriter) settings(a *analysis.Analysis) {
	x.heading("Settings used")
	s := a.Settings.Resolved(a.Scan)
	var rows []Row
	for _, o := range CommandOptions(a.Settings, a.Scan) {
		rows = append(rows, Row{o[0], o[1]})
	}
	rows = append(rows,
		Row{"rejected peaks", angles(s.Rejected)},
		Row{"added peaks", angles(s.Added)})
	x.keyValues(rows, 38)
	x.pdf.SetFont(fontSans, "I", 7.5)
	x.pdf.MultiCell(0, 3.6, "These options, given to reticle report with the scan, rebuild the analysis; the peaks rejected or added in the window travel in this report's JSON, and reticle report --session with that JSON rebuilds the report exactly.", "", "L", false)
}

// CommandOptions returns the settings of an analysis as the options of
// reticle report that rebuild it (every setting, defaults resolved), in
// the order of its help: each an option and its value.
func CommandOptions(set analysis.Settings, scan *scanfile.Scan) [][2]string {
	s := set.Resolved(scan)
	var systems []string
	for _, sys := range s.Systems {
		systems = append(systems, sys.String())
	}
	var out [][2]string
	if s.Radiation != nil {
		out = append(out, [2]string{"--wavelength", s.Radiation.Setting()})
	}
	out = append(out, [][2]string{
		{"--ka2-ratio", ftoa(s.KAlpha2Ratio)},
		{"--threshold", ftoa(s.Threshold)},
		{"--background-width", ftoa(s.BackgroundWidth)},
		{"--systems", strings.Join(systems, ",")},
		{"--tolerance", ftoa(s.Tolerance)},
		{"--corrections", s.Corrections.String()},
		{"--radius", ftoa(s.Radius)},
		{"--flag-limit", ftoa(s.FlagLimit)},
		{"--scaling", s.Scaling.String()},
	}...)
	switch {
	case s.Unindexed > 0:
		out = append(out, [2]string{"--unindexed", fmt.Sprint(s.Unindexed)})
	case s.Unindexed < 0:
		out = append(out, [2]string{"--unindexed", "0"}) // none
	}
	if s.Standard != nil {
		out = append(out, [2]string{"--standard", s.Standard.Name})
	}
	if s.Formula != nil {
		out = append(out, [2]string{"--formula", s.Formula.Text})
	}
	if s.Density != nil {
		out = append(out, [2]string{"--density", s.Density.String()})
	}
	if s.Z > 0 {
		out = append(out, [2]string{"--z", fmt.Sprint(s.Z)})
	}
	if len(s.Excluded) > 0 {
		var v []string
		for _, x := range s.Excluded {
			v = append(v, fmt.Sprintf("%.4f", x))
		}
		out = append(out, [2]string{"--exclude", strings.Join(v, ",")})
	}
	if s.Sample != "" {
		out = append(out, [2]string{"--sample", s.Sample})
	}
	return out
}

func angles(v []float64) string {
	if len(v) == 0 {
		return "none"
	}
	var r []string
	for _, x := range v {
		r = append(r, fmt.Sprintf("%.4f°", x))
	}
	return strings.Join(r, ", ")
}

// linesText counts the peaks, the lines given to the indexing and those
// the reported cell indexes, as the peak table shows them.
func linesText(a *analysis.Analysis) string {
	used := fmt.Sprintf("%d lines used (K-beta companions, rejected peaks and the standard's lines left out)", len(a.Lines))
	if a.ChosenCandidate() == nil {
		return fmt.Sprintf("%d peaks extracted, %s", len(a.Peaks), used)
	}
	n := 0
	for _, r := range PeakRows(a) {
		if r.Indexed {
			n++
		}
	}
	return fmt.Sprintf("%d peaks extracted; %d indexed by the reported cell, of %s", len(a.Peaks), n, used)
}
