package report

import (
	"fmt"
	"io"
	"path/filepath"
	"strings"
	"time"

	"reticle/analysis"
	"reticle/cell"
	"reticle/density"
	"reticle/esd"
	"reticle/refine"
)

// cifSystem maps a crystal system to the core dictionary's
// _space_group_crystal_system values (rhombohedral lattices belong to
// the trigonal system).
func cifSystem(s cell.System) string {
	if s == cell.Rhombohedral {
		return "trigonal"
	}
	return s.String()
}

// blockName makes a CIF data block name from the sample or the file name.
func blockName(a *analysis.Analysis) string {
	// Printable ASCII without the characters CIF reserves.
	var b strings.Builder
	for _, r := range recordName(a) {
		if r > ' ' && r < 127 && !strings.ContainsRune(`#$'"_;[]`, r) {
			b.WriteRune(r)
		} else {
			b.WriteByte('_')
		}
	}
	if b.Len() == 0 {
		return "reticle"
	}
	return b.String()
}

// cifString quotes a CIF character value.
func cifString(s string) string {
	if s == "" {
		return "?"
	}
	if !strings.ContainsAny(s, " \t'\"#$_;[]") {
		return s
	}
	if !strings.Contains(s, "'") {
		return "'" + s + "'"
	}
	return "\n;" + s + "\n;"
}

// formulaSum prints a formula in the core dictionary's
// _chemical_formula_sum form, Hill order with spaces, e.g. 'Al2 Mg O4'.
func formulaSum(text string) string {
	f, err := density.ParseFormula(text)
	if err != nil {
		return text
	}
	hill := f.String()
	var b strings.Builder
	for i, r := range hill {
		if i > 0 && r >= 'A' && r <= 'Z' {
			b.WriteByte(' ')
		}
		if r != ' ' {
			b.WriteRune(r)
		}
	}
	return b.String()
}

// LocalPrefix starts the names of this program's own CIF items: the
// IUCr reserves names beginning "_[local]_" for local use, so that they
// can never clash with a registered dictionary's.
const LocalPrefix = "_[local]_reticle"

// WriteCIF writes the chosen cell of an analysis as a CIF data block
// (IUCr core and powder dictionaries): the cell with its esds, crystal
// system, wavelength, Z and X-ray density when known, and a loop of the
// indexed lines (hkl, d, observed and calculated 2θ). date fills
// _audit_creation_date.
func WriteCIF(w io.Writer, a *analysis.Analysis, date time.Time) error {
	c := a.ChosenCandidate()
	if c == nil {
		return fmt.Errorf("report: %s: no cell to write", a.Scan.Path)
	}
	ce := c.Cell()
	e := c.Covariance().ESD()
	v, ve := c.Volume()
	var b strings.Builder
	p := func(format string, args ...any) { fmt.Fprintf(&b, format, args...) }
	p("#\\#CIF_1.1\n")
	p("# Unit cell from powder diffraction, written by %s %s.\n", Program, Version)
	p("# Scan %s (SHA-256 %s).\n", filepath.Base(a.Scan.Path), a.Scan.SHA256)
	p("# An indexing is a hypothesis until confirmed, e.g. by a full-pattern fit or a structure.\n")
	p("data_%s\n\n", blockName(a))
	p("_audit_creation_date %s\n", date.Format("2006-01-02"))
	p("_audit_creation_method %s\n", cifString(fmt.Sprintf("%s %s", Program, Version)))
	method := "weighted least squares in 2theta"
	if pf := c.Pattern; pf != nil {
		method = fmt.Sprintf("whole-pattern fit (Pawley), intensities free, every point weighted by its counting error, corrections %s, Rwp %.2f %%; it gave the volume no less precisely than the peak positions", pf.Fit.Corrections, 100*pf.Fit.Rwp)
	} else if r := c.Refined; r != nil && r.Selection != nil {
		method += fmt.Sprintf("; instrument corrections chosen from the data (lowest %s: %s)", r.Selection.Criterion, r.Selection.Chosen)
		if r.Selection.Averaged > 0 {
			method += fmt.Sprintf(", cell and corrections the mean of that choice over %d bootstrap sets", r.Selection.Averaged)
		}
	}
	p("_computing_cell_refinement %s\n", cifString(fmt.Sprintf("%s %s, %s", Program, Version, method)))
	if a.Settings.Sample != "" {
		p("_pd_spec_description %s\n", cifString(a.Settings.Sample))
	}
	p("\n_space_group_crystal_system %s\n", cifSystem(ce.System))
	p("_space_group_centring_type %s\n", ce.Centring)
	p("_cell_length_a %s\n", esd.Format(ce.A, e.A))
	p("_cell_length_b %s\n", esd.Format(ce.B, e.B))
	p("_cell_length_c %s\n", esd.Format(ce.C, e.C))
	p("_cell_angle_alpha %s\n", esd.Format(ce.Alpha, e.Alpha))
	p("_cell_angle_beta %s\n", esd.Format(ce.Beta, e.Beta))
	p("_cell_angle_gamma %s\n", esd.Format(ce.Gamma, e.Gamma))
	p("_cell_volume %s\n", esd.Format(v, ve))
	p("_cell_measurement_reflns_used %d\n", c.Indexed)
	var lo, hi float64
	for _, l := range c.Lines {
		if l.Indexed {
			if lo == 0 || l.TwoTheta < lo {
				lo = l.TwoTheta
			}
			hi = max(hi, l.TwoTheta)
		}
	}
	if hi > 0 {
		p("_cell_measurement_theta_min %.4f\n", lo/2)
		p("_cell_measurement_theta_max %.4f\n", hi/2)
	}
	if r := a.Search; r != nil {
		// The search that found the cell (items of this program's own).
		var names []string
		for _, s := range r.Searched {
			names = append(names, s.String())
		}
		p("\n%s_indexing_systems_searched %s\n", LocalPrefix, cifString(strings.Join(names, " ")))
		p("%s_indexing_max_volume %g\n", LocalPrefix, r.Bounds.MaxVolume)
		p("%s_indexing_figure_of_merit_M %.1f\n", LocalPrefix, c.M)
		p("%s_indexing_probability %.4f\n", LocalPrefix, c.Probability)
		p("%s_indexing_stop %s\n", LocalPrefix, cifString(r.Stop))
	}
	p("\n_diffrn_radiation_wavelength %s\n", ftoa(a.Radiation.Lambda1))
	p("_diffrn_radiation_type %s\n", cifString(a.Radiation.Name))
	if k := c.Contents; k != nil {
		p("\n_chemical_formula_sum %s\n", cifString(formulaSum(a.Settings.Formula.Text)))
		p("_chemical_formula_weight %.4f\n", k.MolarMass)
		p("_cell_formula_units_Z %d\n", k.Z)
		p("_exptl_crystal_density_diffrn %s\n", esd.Format(k.Density, k.DensityESD))
		if m := a.Settings.Density; m != nil {
			p("_exptl_crystal_density_meas %s\n", esd.Format(m.Density, m.ESD))
		}
	}
	// The observed lines (PD_PEAK), then the reflections that index
	// them (REFLN, with PD_REFLN's link to the peak): two categories, two
	// loops, joined by the peak's identifier as the powder dictionary
	// defines.
	p("\nloop_\n_pd_peak_id\n_pd_peak_2theta_centroid\n_pd_peak_d_spacing\n")
	for i, l := range c.Lines {
		p("%d %.5f %.6f\n", i+1, l.TwoTheta, cell.DSpacing(l.TwoTheta, a.Radiation.Lambda1))
	}
	p("\nloop_\n_refln_index_h\n_refln_index_k\n_refln_index_l\n_refln_d_spacing\n_pd_refln_peak_id\n%s_refln_2theta_calc\n", LocalPrefix)
	for i, l := range c.Lines {
		if !l.Indexed {
			continue
		}
		calc := l.TwoThetaCalc
		if _, rr, ok := c.Line(l.TwoTheta); ok && rr != nil {
			calc = rr.TwoThetaCalc
		}
		for _, h := range l.HKL {
			p("%d %d %d %.6f %d %.5f\n", h[0], h[1], h[2], ce.D(h), i+1, calc)
		}
	}
	if pf := a.Pattern; pf != nil && len(pf.Fit.Calc) == a.Scan.Len() {
		writePatternCIF(&b, a, pf)
	}
	_, err := io.WriteString(w, b.String())
	return err
}

// writePatternCIF adds a whole-pattern fit: its agreement factors under
// the powder dictionary's names (fractions, as the dictionary defines
// them) and the profile, point by point (measured 2θ and counts, the
// calculated total and background).
func writePatternCIF(b *strings.Builder, a *analysis.Analysis, pf *analysis.PatternFit) {
	f := pf.Fit
	p := func(format string, args ...any) { fmt.Fprintf(b, format, args...) }
	p("\n_pd_proc_ls_prof_R_factor %.5f\n", f.Rp)
	p("_pd_proc_ls_prof_wR_factor %.5f\n", f.Rwp)
	p("_pd_proc_ls_prof_wR_expected %.5f\n", f.Rexp)
	p("_refine_ls_goodness_of_fit_all %.4f\n", f.GoF)
	p("_refine_ls_number_parameters %d\n", f.Parameters)
	p("_pd_proc_ls_profile_function %s\n", cifString("pseudo-Voigt lines (Thompson, Cox & Hastings 1987): Gaussian FWHM^2 = U tan^2 theta + V tan theta + W, Lorentzian FWHM = X tan theta + Y / cos theta, shared by the phases; split for asymmetry (Toraya 1990)"))
	p("_pd_proc_ls_background_function %s\n", cifString(fmt.Sprintf("Chebyshev polynomial, %d terms", refine.DefaultBackgroundTerms)))
	p("\nloop_\n_pd_meas_2theta_scan\n_pd_meas_counts_total\n_pd_calc_intensity_total\n_pd_proc_intensity_bkg_calc\n")
	sc := a.Scan
	for i := range sc.TwoTheta {
		p("%.5f %s %.2f %.2f\n", sc.TwoTheta[i], ftoa(sc.Intensity[i]), f.Calc[i], f.Background[i])
	}
}
