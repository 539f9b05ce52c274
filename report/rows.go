package report

import (
	"fmt"
	"strings"

	"reticle/analysis"
	"reticle/cell"
	"reticle/density"
	"reticle/esd"
	"reticle/refine"
)

// A Row is one labelled value of a record, the form in which the PDF, the
// terminal and the desktop program all print a refinement and a cell's
// contents: one printer per record.
type Row struct {
	Label, Value string
}

// Text prints rows as aligned lines of plain text.
func Text(rows []Row) string {
	w := 0
	for _, r := range rows {
		w = max(w, len([]rune(r.Label)))
	}
	var b strings.Builder
	for _, r := range rows {
		fmt.Fprintf(&b, "%s%s  %s\n", r.Label, strings.Repeat(" ", w-len([]rune(r.Label))), r.Value)
	}
	return b.String()
}

// ContentsRows describes a cell's contents: the formula and its molar
// mass, Z (given or from the measured density, with the allowed values
// nearest to the estimate), the X-ray density, the measured density's
// distance from it, atoms and formula mass per cell, all with their esds.
func ContentsRows(c *density.Contents, f density.Formula, m *density.Measured) []Row {
	how := "given"
	switch {
	case c.ZInferred:
		how = "the allowed value nearest to the estimate from the measured density"
	case c.ZGuessed:
		how = "the most plausible from typical volumes per atom; a measured density decides"
	}
	rows := []Row{
		{"formula", fmt.Sprintf("%s, M = %s g/mol (%s)", f.Text, esd.Format(c.MolarMass, c.MolarMassESD), AtomicWeights)},
		{"Z", fmt.Sprintf("%d (%s; %d lattice point(s) per cell, %g formula unit(s) per lattice point)", c.Z, how, c.LatticePoints, c.FormulaUnitsPerLattice)},
	}
	if m != nil {
		var cands []string
		for _, k := range c.Candidates {
			cands = append(cands, fmt.Sprintf("%d (%+.1fσ)", k.Z, k.Sigmas))
		}
		v := fmt.Sprintf("%s; allowed values nearest first: %s", esd.Format(c.ZEst, c.ZEstESD), strings.Join(cands, ", "))
		if !c.Whole {
			v += " — no whole Z: the cell, the formula or the density is wrong"
		}
		rows = append(rows, Row{"Z from density", v})
	}
	rows = append(rows, Row{"X-ray density", esd.Format(c.Density, c.DensityESD) + " g/cm³ (ρ = Z·M/(N_A·V), N_A = 6.02214076×10²³ per mol)"})
	if len(c.Plausible) > 0 {
		var ps []string
		for _, p := range c.Plausible {
			t := fmt.Sprintf("Z = %d: %s g/cm³, %.1f Å³ per atom", p.Z, esd.Format(p.Density, p.DensityESD), p.AtomVolume)
			switch {
			case p.Likeliest:
				t += " (most plausible)"
			case p.Typical:
				t += " (typical)"
			}
			ps = append(ps, t)
		}
		rows = append(rows, Row{"plausible Z", strings.Join(ps, "; ")},
			Row{"note", fmt.Sprintf("without a measured density Z is a guess: every multiple of the lattice points that leaves at least %g Å³ per atom is listed, and the most plausible is the one nearest the typical volume per atom of the kind of solid (taken as %s); a measured density decides", density.MinAtomVolume, c.Plausible[0].Kind)})
	}
	if m != nil {
		rows = append(rows, Row{"measured density", fmt.Sprintf("%s g/cm³, %+.1fσ from the X-ray density", esd.Format(m.Density, m.ESD), c.Sigmas)})
	}
	rows = append(rows,
		Row{"atoms per cell", ftoa(c.AtomsPerCell)},
		Row{"mass per cell", esd.Format(c.CellMass, c.CellMassESD) + " u (Z·M)"})
	if c.NoStandardWeight {
		rows = append(rows, Row{"note", "an element without a standard atomic weight is counted at the mass number of a long-lived isotope"})
	}
	return rows
}

// CellSourceRows says where a candidate's cell comes from when a
// whole-pattern refinement of it was tried (analysis.Candidate's
// PolishNote), with the whole pattern's cell when it was kept, and ends
// with a row that introduces the refinement on the peak positions
// (RefinementRows), which follows them.
func CellSourceRows(c *analysis.Candidate) []Row {
	if c.PolishNote == "" {
		return nil
	}
	rows := []Row{{"cell from", c.PolishNote}}
	if pf := c.Pattern; pf != nil {
		ph := pf.Fit.Phases[0]
		rows = append(rows, Row{"cell", fmt.Sprintf("%s, V = %s Å³", cell.Format(ph.Cell, ph.ESD), esd.Format(ph.Volume, ph.VolumeESD))})
	}
	return append(rows, Row{"peak positions", "the cell refined on the peak positions, with its corrections:"})
}

// PatternOf returns the whole-pattern fit that goes with candidate c of
// the analysis: the one asked for (Analysis.Pattern, of the chosen
// cell), else the candidate's own (Candidate.Pattern).
func PatternOf(a *analysis.Analysis, c *analysis.Candidate) *analysis.PatternFit {
	if a.Pattern != nil && c == a.ChosenCandidate() {
		return a.Pattern
	}
	return c.Pattern
}

// RefinementRows describes a refinement: every parameter with its esd
// (corrections fixed by an internal standard marked), the volume, the
// fit, the goniometer radius when a correction uses it, the internal
// standard, and the correlations above 0.5 in magnitude.
func RefinementRows(r *refine.Result) []Row {
	rows := []Row{{"lattice", fmt.Sprintf("%s %s", r.Cell.System, r.Cell.Centring)}}
	for _, p := range r.Params {
		v := esd.Format(p.Value, p.ESD) + " " + p.Unit
		if p.Fixed {
			v += " (from the internal standard)"
		}
		rows = append(rows, Row{p.Name, v})
	}
	rows = append(rows, Row{"volume", esd.Format(r.Volume, r.VolumeESD) + " Å³"})
	scaled := "esds not scaled"
	if r.Scaled {
		scaled = "esds multiplied by χ²_red"
	}
	rows = append(rows, Row{"fit", fmt.Sprintf("%d lines, %d degrees of freedom, χ²_red = %.3f (%s; convention: %s)", r.Fitted, r.DOF, r.Chi2Reduced, scaled, r.Scaling)})
	switch {
	case r.Selection != nil:
		rows = append(rows, Row{"corrections", r.Selection.Reason()})
		var ms []string
		for _, m := range r.Selection.Models {
			if m.Err != "" {
				ms = append(ms, fmt.Sprintf("%s not refined", m.Corrections))
				continue
			}
			ms = append(ms, fmt.Sprintf("%s %.1f (weight %.2f)", m.Corrections, m.BIC, m.Weight))
		}
		rows = append(rows, Row{"models, " + r.Selection.Criterion, strings.Join(ms, "; ")})
	case r.StandardFit == nil:
		rows = append(rows, Row{"corrections", r.Corrections.String() + ", fixed by the user"})
	}
	if r.Corrections.Has(refine.Displacement) || r.Corrections.Has(refine.Transparency) {
		rows = append(rows, Row{"radius", ftoa(r.Radius) + " mm (goniometer)"})
	}
	if sf := r.StandardFit; sf != nil {
		rows = append(rows, Row{"standard", fmt.Sprintf("%s, %d lines, χ²_red = %.3f (%s)", sf.Standard.Name, sf.Fitted, sf.Chi2Reduced, sf.Standard.Source)})
	}
	var corr []string
	for i := range r.Params {
		for j := i + 1; j < len(r.Params); j++ {
			if rho := r.Correlation[i][j]; rho > 0.5 || rho < -0.5 {
				corr = append(corr, fmt.Sprintf("%s–%s %+.3f", r.Params[i].Name, r.Params[j].Name, rho))
			}
		}
	}
	if len(corr) > 0 {
		rows = append(rows, Row{"correlations", strings.Join(corr, ", ")})
	}
	return rows
}

// Percent prints a probability as a percentage with one decimal; the
// ends print as "> 99.9 %" and "< 0.1 %" rather than as a certainty.
func Percent(p float64) string {
	switch {
	case p > 0.999:
		return "> 99.9 %"
	case p < 0.001:
		return "< 0.1 %"
	}
	return fmt.Sprintf("%.1f %%", 100*p)
}

// PatternRows describes a whole-pattern fit: the agreement factors, how
// the esds were scaled, the shared parameters, each phase's cell and
// profile, the strongest correlations and the lines no phase explains.
func PatternRows(pf *analysis.PatternFit) []Row {
	f := pf.Fit
	scaled := "esds from the counts' weights"
	if f.Scaled {
		scaled = fmt.Sprintf("esds multiplied by GoF = %.3f", f.GoF)
	}
	rows := []Row{
		{"method", fmt.Sprintf("Pawley fit of %d phase(s), %d points, %d parameters, corrections %s", len(f.Phases), f.Points, f.Parameters, f.Corrections)},
		{"agreement", fmt.Sprintf("Rp %.2f %%, Rwp %.2f %%, Rexp %.2f %%, χ²_red %.3f, GoF %.3f (%s)", 100*f.Rp, 100*f.Rwp, 100*f.Rexp, f.Chi2, f.GoF, scaled)},
	}
	for _, p := range f.Params {
		rows = append(rows, Row{p.Name, strings.TrimSpace(esd.Format(p.Value, p.ESD) + " " + p.Unit)})
	}
	for i, ph := range f.Phases {
		label := fmt.Sprintf("phase %d", i+1)
		rows = append(rows, Row{label, fmt.Sprintf("%s, V = %s Å³ (from %s; %d reflections)", cell.Format(ph.Cell, ph.ESD), esd.Format(ph.Volume, ph.VolumeESD), pf.Texts[i], len(ph.Reflections))})
		var prof []string
		for _, p := range ph.Params[len(ph.Cell.System.FreeNames()):] {
			prof = append(prof, strings.TrimSpace(fmt.Sprintf("%s %s %s", p.Name, esd.Format(p.Value, p.ESD), p.Unit)))
		}
		text := strings.Join(prof, ", ")
		switch {
		case i > 0 && len(prof) == 0:
			text = "the main phase's"
		case i > 0 && len(prof) == 1:
			text += " (its own size term; the rest the main phase's)"
		case i > 0:
			text += " (its own size and strain terms; V and W the main phase's)"
		}
		rows = append(rows, Row{label + " profile", text})
	}
	if len(f.Correlations) > 0 {
		var cs []string
		for _, c := range f.Correlations {
			cs = append(cs, fmt.Sprintf("%s–%s %+.2f", c.A, c.B, c.R))
		}
		rows = append(rows, Row{"correlations", strings.Join(cs, "; ")})
	}
	if n := len(pf.Unexplained); n > 0 {
		var ls []string
		for _, u := range pf.Unexplained {
			ls = append(ls, fmt.Sprintf("%.3f° (height %.0f)", u.TwoTheta, u.Height))
		}
		rows = append(rows, Row{"lines no phase explains", strings.Join(ls, ", ")})
	}
	for _, w := range f.Warnings {
		rows = append(rows, Row{"note", w})
	}
	return rows
}
