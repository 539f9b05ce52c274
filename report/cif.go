package report

import (
	"fmt"
	"io"
	"path/filepath"
	"strings"
	"time"

	"reticle/density"
	"reticle/peaks"
)

// cifSystem maps a crystal system to the core dictionary's
// _space_group_crystal_system values (rhombohedral lattices belong to
// the trigonal system).
func cifSystem(s string) string {
	if s == "rhombohedral" {
		return "trigonal"
	}
	return s
}

// blockName makes a CIF data block name from the sample or the file name.
func blockName(doc *Document) string {
	// Printable ASCII without the characters CIF reserves.
	var b strings.Builder
	for _, r := range recordName(doc) {
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

// WriteCIF writes solution k of the document as a CIF data block (IUCr
// core and powder dictionaries): the cell with its esds, crystal system,
// wavelength, Z and X-ray density when known, and a loop of the indexed
// lines (hkl, d, observed and calculated 2θ). date fills
// _audit_creation_date.
func WriteCIF(w io.Writer, doc *Document, k int, date time.Time) error {
	if k < 0 || k >= len(doc.Solutions) {
		return fmt.Errorf("report: no solution %d to write (the scan has %d)", k+1, len(doc.Solutions))
	}
	s := doc.Solutions[k]
	cell := s.Cell()
	var b strings.Builder
	p := func(format string, args ...any) { fmt.Fprintf(&b, format, args...) }
	p("#\\#CIF_1.1\n")
	p("# Unit cell from powder diffraction, written by %s %s.\n", Program, Version)
	p("# Scan %s (SHA-256 %s).\n", filepath.Base(doc.File), doc.SHA256)
	p("# An indexing is a hypothesis until confirmed, e.g. by a full-pattern fit or a structure.\n")
	p("data_%s\n\n", blockName(doc))
	p("_audit_creation_date %s\n", date.Format("2006-01-02"))
	p("_audit_creation_method %s\n", cifString(fmt.Sprintf("%s %s", Program, Version)))
	p("_computing_cell_refinement %s\n", cifString(fmt.Sprintf("%s %s, weighted least squares in 2theta", Program, Version)))
	if doc.Sample != "" {
		p("_pd_spec_description %s\n", cifString(doc.Sample))
	}
	p("\n_space_group_crystal_system %s\n", cifSystem(s.System))
	p("_space_group_centring_type %s\n", s.Centring)
	esd := func(v, u float64) string { return peaks.FormatESD(v, u) }
	var aE, bE, cE, vE float64
	if s.Refined != nil {
		aE, bE, cE, vE = s.AESD, s.BESD, s.CESD, s.VolumeESD
	}
	p("_cell_length_a %s\n", esd(s.A, aE))
	p("_cell_length_b %s\n", esd(s.B, bE))
	p("_cell_length_c %s\n", esd(s.C, cE))
	p("_cell_angle_alpha %s\n", ftoa(s.Alpha))
	p("_cell_angle_beta %s\n", ftoa(s.Beta))
	p("_cell_angle_gamma %s\n", ftoa(s.Gamma))
	p("_cell_volume %s\n", esd(s.Volume, vE))
	p("_cell_measurement_reflns_used %d\n", s.Indexed)
	var lo, hi float64
	for _, l := range s.Lines {
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
	p("\n_diffrn_radiation_wavelength %s\n", ftoa(doc.Wavelength))
	p("_diffrn_radiation_type %s\n", cifString(doc.Radiation))
	if s.Contents != nil {
		c := s.Contents
		p("\n_chemical_formula_sum %s\n", cifString(formulaSum(c.Formula)))
		p("_chemical_formula_weight %.4f\n", c.MolarMass)
		p("_cell_formula_units_Z %d\n", c.Z)
		p("_exptl_crystal_density_diffrn %s\n", esd(c.Density, c.DensityESD))
		if c.Measured != nil {
			p("_exptl_crystal_density_meas %s\n", esd(*c.Measured, *c.MeasuredESD))
		}
	}
	p("\nloop_\n_refln_index_h\n_refln_index_k\n_refln_index_l\n_refln_d_spacing\n_pd_peak_2theta_centroid\n_reticle_refln_2theta_calc\n")
	for _, l := range s.Lines {
		if !l.Indexed {
			continue
		}
		h := l.HKL[0]
		d := cell.D(h[0], h[1], h[2])
		p("%d %d %d %.6f %.5f %.5f\n", h[0], h[1], h[2], d, l.TwoTheta, l.TwoThetaCalc)
	}
	_, err := io.WriteString(w, b.String())
	return err
}
