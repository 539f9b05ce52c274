package report

import (
	"bytes"
	"fmt"
	"io"
	"path/filepath"
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

	"reticle/peaks"
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

// WritePDF writes the report of solution k (0-based) of the document on
// the given paper; date fills the date line and the creation date.
func WritePDF(w io.Writer, doc *Document, k int, paper Paper, date time.Time) error {
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
	if doc.Sample != "" {
		title += ": " + doc.Sample
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
		pdf.CellFormat(0, 4, fmt.Sprintf("%s %s · %s · page %d of {pages}", Program, Version, filepath.Base(doc.File), pdf.PageNo()), "", 0, "C", false, 0, "")
		pdf.SetTextColor(0, 0, 0)
	})
	pw, _ := pdf.GetPageSize()
	lm, _, rm, _ := pdf.GetMargins()
	x := &pdfWriter{pdf: pdf, width: pw - lm - rm, left: lm}
	pdf.AddPage()
	x.header(doc, k, title, date)
	if err := x.figure(doc, k); err != nil {
		return err
	}
	if k >= 0 && k < len(doc.Solutions) {
		s := &doc.Solutions[k]
		x.refined(doc, s)
		x.contents(s)
	} else {
		x.heading("Refined cell")
		x.para("No cell explains the lines within the search bounds.")
	}
	x.candidates(doc, k)
	x.lines(doc, k)
	x.settings(doc)
	x.heading("Limitations")
	x.para(Limitations)
	if len(doc.Warnings) > 0 {
		x.heading("Warnings")
		for _, m := range doc.Warnings {
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
func (x *pdfWriter) keyValues(rows [][2]string, labelWidth float64) {
	p := x.pdf
	for _, r := range rows {
		p.SetFont(fontSans, "B", 8.5)
		p.CellFormat(labelWidth, 4.6, r[0], "", 0, "L", false, 0, "")
		font := fontSans
		size := 8.5
		if strings.HasPrefix(r[0], "SHA-256") {
			font, size = fontMono, 7.5
		}
		p.SetFont(font, "", size)
		p.MultiCell(x.width-labelWidth, 4.6, r[1], "", "L", false)
	}
}

func (x *pdfWriter) header(doc *Document, k int, title string, date time.Time) {
	p := x.pdf
	p.SetFont(fontSans, "B", 16)
	p.CellFormat(0, 9, title, "", 1, "L", false, 0, "")
	p.SetDrawColor(0x1f, 0x3a, 0x5f)
	p.SetLineWidth(0.6)
	p.Line(x.left, p.GetY(), x.left+x.width, p.GetY())
	p.Ln(2.5)
	rad := fmt.Sprintf("%s, λ(Kα1) = %s Å", doc.Radiation, ftoa(doc.Wavelength))
	if doc.Wavelength2 > 0 {
		rad += fmt.Sprintf(", λ(Kα2) = %s Å, I(Kα2)/I(Kα1) = %s", ftoa(doc.Wavelength2), ftoa(doc.Ka2Ratio))
	}
	corr := doc.Settings.Corrections
	if strings.Contains(corr, "displacement") || corr == "both" {
		corr += fmt.Sprintf(" (goniometer radius %s mm)", ftoa(doc.Settings.Radius))
	}
	sample := doc.Sample
	if sample == "" {
		sample = "(not named)"
	}
	rows := [][2]string{
		{"Sample", sample},
		{"Input file", doc.File},
		{"SHA-256", doc.SHA256},
		{"Scan", fmt.Sprintf("%d points, %.3f–%.3f° 2θ, step %.4f°", doc.Points, doc.Range[0], doc.Range[1], doc.Step)},
		{"Date", date.Format("2006-01-02 15:04 MST")},
		{"Program", fmt.Sprintf("%s %s", Program, Version)},
		{"Radiation", rad},
		{"Corrections", corr},
		{"Lines", fmt.Sprintf("%d peaks extracted, %d lines indexed (K-beta companions and rejected peaks left out)", len(doc.Peaks), doc.Lines)},
	}
	if k >= 0 && k < len(doc.Solutions) {
		s := doc.Solutions[k]
		rows = append(rows, [2]string{"Cell reported", fmt.Sprintf("solution %d of %d: %s %s", k+1, len(doc.Solutions), s.System, s.Centring)})
	}
	x.keyValues(rows, 30)
}

func (x *pdfWriter) figure(doc *Document, k int) error {
	const wmm, hmm = 174.0, 82.0
	pl := Figure(doc, k, FigureOptions{})
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

func (x *pdfWriter) refined(doc *Document, s *Solution) {
	x.heading("Refined cell")
	if s.Refined == nil {
		x.para(fmt.Sprintf("%s %s, a = %.5f Å, c = %.5f Å (indexing values; the refinement failed: %s)", s.System, s.Centring, s.A, s.C, s.RefineError))
		return
	}
	rows := [][2]string{{"Lattice", fmt.Sprintf("%s %s", s.System, s.Centring)}}
	for _, p := range s.Params {
		v := p.Text + " " + p.Unit
		if p.FromStandard {
			v += " (from the internal standard)"
		}
		rows = append(rows, [2]string{p.Name, v})
	}
	rows = append(rows, [2]string{"volume", peaks.FormatESD(s.Volume, s.VolumeESD) + " Å³"})
	scaled := "esds not scaled"
	if s.Scaled {
		scaled = "esds multiplied by χ²_red"
	}
	rows = append(rows, [2]string{"fit", fmt.Sprintf("%d lines, %d degrees of freedom, χ²_red = %.3f (%s; convention: %s)", s.Fitted, s.DOF, s.Chi2Reduced, scaled, s.Scaling)})
	rows = append(rows, [2]string{"figures of merit", fmt.Sprintf("M%d = %.1f (de Wolff 1968), F%d = %.1f (%.4f°, %d) (Smith & Snyder 1979)", s.N, s.M, s.N, s.FN, s.FNMeanDiff, s.FNPossible)})
	x.keyValues(rows, 30)
	if n := len(s.ParamNames); n > 1 {
		x.pdf.Ln(1)
		x.pdf.SetFont(fontSans, "B", 8.5)
		x.pdf.CellFormat(0, 4.6, "Correlation matrix", "", 1, "L", false, 0, "")
		cols := []column{{"", 28, "L"}}
		for _, name := range s.ParamNames {
			cols = append(cols, column{name, 24, "R"})
		}
		var rowsT [][]string
		for i, name := range s.ParamNames {
			r := []string{name}
			for j := range s.ParamNames {
				r = append(r, fmt.Sprintf("%+.3f", s.Correlation[i][j]))
			}
			rowsT = append(rowsT, r)
		}
		x.table(cols, rowsT)
	}
	for _, m := range s.Warnings {
		x.para("Note: " + m)
	}
}

func (x *pdfWriter) contents(s *Solution) {
	c := s.Contents
	if c == nil {
		return
	}
	x.heading("Cell contents")
	how := "given"
	if c.ZFromDensity {
		how = "the allowed value nearest to the estimate from the measured density"
	}
	rows := [][2]string{
		{"Formula", fmt.Sprintf("%s, M = %s g/mol (%s)", c.Formula, peaks.FormatESD(c.MolarMass, c.MolarMassESD), c.AtomicWeightTable)},
		{"Z", fmt.Sprintf("%d (%s; %d lattice point(s) per cell, %g formula unit(s) per lattice point)", c.Z, how, c.LatticePoints, c.UnitsPerLattice)},
	}
	if c.ZEst != nil {
		var cands []string
		for _, k := range c.Candidates {
			cands = append(cands, fmt.Sprintf("%d (%+.1fσ)", k.Z, k.Sigma))
		}
		v := fmt.Sprintf("%s; allowed values nearest first: %s", peaks.FormatESD(*c.ZEst, *c.ZEstESD), strings.Join(cands, ", "))
		if !*c.ZWhole {
			v += " — no whole Z: the cell, the formula or the density is wrong"
		}
		rows = append(rows, [2]string{"Z from density", v})
	}
	rows = append(rows, [2]string{"X-ray density", c.DensityText + " g/cm³ (ρ = Z·M/(N_A·V), N_A = 6.02214076×10²³ per mol)"})
	if c.Measured != nil {
		rows = append(rows, [2]string{"Measured density", fmt.Sprintf("%s g/cm³, %+.1fσ from the X-ray density", peaks.FormatESD(*c.Measured, *c.MeasuredESD), *c.Discrepancy)})
	}
	rows = append(rows, [2]string{"Atoms per cell", ftoa(c.AtomsPerCell)}, [2]string{"Mass per cell", fmt.Sprintf("%.3f g/mol", c.CellMass)})
	x.keyValues(rows, 30)
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
	_, ph := p.GetPageSize()
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
			p.CellFormat(c.width, rh, v, "", 0, c.align, fill, 0, "")
		}
		p.Ln(-1)
	}
}

func (x *pdfWriter) candidates(doc *Document, k int) {
	x.heading("Candidate cells")
	if len(doc.Solutions) == 0 {
		x.para("None within the search bounds.")
		return
	}
	cols := []column{{"#", 7, "R"}, {"system", 24, "L"}, {"", 6, "C"}, {"a (Å)", 22, "R"}, {"c (Å)", 22, "R"}, {"V (Å³)", 20, "R"},
		{"M20", 16, "R"}, {"F_N", 16, "R"}, {"indexed", 16, "R"}, {"Z", 10, "R"}, {"", 15, "L"}}
	var rows [][]string
	for i, s := range doc.Solutions {
		z := ""
		if s.Contents != nil {
			z = fmt.Sprint(s.Contents.Z)
			if s.Contents.ZWhole != nil && !*s.Contents.ZWhole {
				z += "?"
			}
		}
		mark := ""
		if i == k {
			mark = "reported"
		}
		rows = append(rows, []string{fmt.Sprint(s.Rank), s.System, s.Centring, fmt.Sprintf("%.5f", s.A), fmt.Sprintf("%.5f", s.C), fmt.Sprintf("%.2f", s.Volume),
			fmt.Sprintf("%.1f", s.M), fmt.Sprintf("%.1f", s.FN), fmt.Sprintf("%d/%d", s.Indexed, s.Indexed+s.Unindexed), z, mark})
	}
	x.table(cols, rows)
	x.pdf.SetFont(fontSans, "I", 7.5)
	x.pdf.MultiCell(0, 3.6, fmt.Sprintf("M20 after de Wolff (1968) and F_N after Smith & Snyder (1979), over the first %d lines; a Z marked ? is not whole for the measured density.", doc.Solutions[0].N), "", "L", false)
}

func (x *pdfWriter) lines(doc *Document, k int) {
	x.heading("Peaks and their indices")
	res := map[float64]Residual{}
	if k >= 0 && k < len(doc.Solutions) && doc.Solutions[k].Refined != nil {
		for _, r := range doc.Solutions[k].Residuals {
			res[r.TwoTheta] = r
		}
	}
	cols := []column{{"#", 7, "R"}, {"2θ obs (°)", 24, "R"}, {"d (Å)", 22, "R"}, {"height", 16, "R"}, {"FWHM (°)", 15, "R"},
		{"hkl", 30, "C"}, {"2θ calc (°)", 19, "R"}, {"Δ2θ (°)", 15, "R"}, {"Δ/σ", 11, "R"}, {"", 15, "L"}}
	var rows [][]string
	for i, r := range PeakRows(doc, k) {
		note := ""
		switch {
		case r.Rejected:
			note = "rejected"
		case r.CompanionOf != nil:
			note = fmt.Sprintf("Kβ of %d", *r.CompanionOf+1)
		case !r.Indexed && k >= 0 && k < len(doc.Solutions):
			note = "unindexed"
		}
		calc, delta, norm := "", "", ""
		if r.Indexed {
			calc, delta = fmt.Sprintf("%.4f", r.TwoThetaCalc), fmt.Sprintf("%+.4f", r.Delta)
			if rr, ok := res[r.TwoTheta]; ok {
				norm = fmt.Sprintf("%+.1f", rr.Norm)
				if rr.Flagged {
					note = "flagged"
				}
				if rr.Excluded {
					note = "excluded"
				}
			}
		}
		rows = append(rows, []string{fmt.Sprint(i + 1), peaks.FormatESD(r.TwoTheta, r.TwoThetaESD), peaks.FormatESD(r.D, r.DESD),
			fmt.Sprintf("%.0f", r.Height), fmt.Sprintf("%.4f", r.FWHM), r.HKL, calc, delta, norm, note})
	}
	x.table(cols, rows)
}

func (x *pdfWriter) settings(doc *Document) {
	x.heading("Settings used")
	s := doc.Settings
	wl := s.Wavelength
	if wl == "" {
		wl = "from the file, else Cu"
	}
	opt := func(v string) string {
		if v == "" {
			return "none"
		}
		return v
	}
	z := "from the density"
	if s.Z > 0 {
		z = fmt.Sprint(s.Z)
	}
	rows := [][2]string{
		{"wavelength", wl},
		{"ka2_ratio", ftoa(s.Ka2Ratio)},
		{"threshold", ftoa(s.Threshold) + " esd of the fitted height"},
		{"background_width", ftoa(s.BackgroundWidth) + "° 2θ (SNIP window)"},
		{"systems", strings.Join(s.Systems, ", ")},
		{"impurities", fmt.Sprintf("%d among the first 20 lines", s.Impurities)},
		{"tolerance", ftoa(s.Tolerance) + "° 2θ (smallest matching window)"},
		{"corrections", s.Corrections},
		{"goniometer_radius_mm", ftoa(s.Radius)},
		{"flag_limit", ftoa(s.FlagLimit) + " esd"},
		{"esd_scaling", s.Scaling},
		{"formula", opt(s.Formula)},
		{"density", opt(s.Density)},
		{"z", z},
		{"rejected_peaks", angles(s.Rejected)},
		{"added_peaks", angles(s.Added)},
		{"excluded_lines", angles(s.Excluded)},
	}
	x.keyValues(rows, 38)
	x.pdf.SetFont(fontSans, "I", 7.5)
	x.pdf.MultiCell(0, 3.6, "The same settings, given to reticle report (or read back from this report's JSON with --session), regenerate this report.", "", "L", false)
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
