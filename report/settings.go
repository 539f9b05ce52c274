package report

import (
	"fmt"
	"strings"

	"reticle/density"
	"reticle/indexing"
	"reticle/peaks"
	"reticle/refine"
)

// Settings are every choice that shapes an analysis, as a user gives them;
// Resolve fills in the defaults. The JSON names are part of the document
// and of session files.
type Settings struct {
	Sample string `json:"sample,omitempty"`
	// Wavelength is an anode symbol (K-alpha doublet), an anode with Ka1,
	// or a wavelength in Å; empty means the file's statement, else Cu.
	Wavelength      string  `json:"wavelength,omitempty"`
	Ka2Ratio        float64 `json:"ka2_ratio"`
	Threshold       float64 `json:"threshold"`
	BackgroundWidth float64 `json:"background_width"`

	Systems    []string `json:"systems"`
	Impurities int      `json:"impurities"` // -1: none
	Tolerance  float64  `json:"tolerance"`

	Corrections string  `json:"corrections"` // zero, displacement, both or none
	Radius      float64 `json:"goniometer_radius_mm"`
	FlagLimit   float64 `json:"flag_limit"`
	Scaling     string  `json:"esd_scaling"`

	Formula string `json:"formula,omitempty"`
	Density string `json:"density,omitempty"` // measured, g/cm³, e.g. 3.58(2)
	Z       int    `json:"z,omitempty"`

	// Rejected lists the 2θ (degrees) of extracted peaks the user
	// rejected; each removes the peak within 0.005° of it.
	Rejected []float64 `json:"rejected_peaks,omitempty"`
	// Added lists the 2θ (degrees) the user pointed at to add a peak the
	// extraction missed; each is fitted again, in order, by
	// peaks.FitAt.
	Added []float64 `json:"added_peaks,omitempty"`
	// Excluded lists the 2θ (degrees) of indexed lines left out of the
	// cell refinement; their residuals are still reported.
	Excluded []float64 `json:"excluded_lines,omitempty"`
}

// Resolve fills in the defaults and checks the settings.
func (s Settings) Resolve() (Settings, error) {
	if s.Ka2Ratio == 0 {
		s.Ka2Ratio = peaks.DefaultKAlpha2Ratio
	}
	if s.Threshold == 0 {
		s.Threshold = 4.5
	}
	if s.BackgroundWidth == 0 {
		s.BackgroundWidth = 1.5
	}
	if len(s.Systems) == 0 {
		s.Systems = []string{"cubic", "tetragonal", "hexagonal", "rhombohedral"}
	}
	if s.Impurities == 0 {
		s.Impurities = 3
	}
	if s.Tolerance == 0 {
		s.Tolerance = 0.03
	}
	if s.Corrections == "" {
		s.Corrections = "zero"
	}
	if s.Radius == 0 {
		s.Radius = refine.DefaultRadius
	}
	if s.FlagLimit == 0 {
		s.FlagLimit = refine.DefaultFlagLimit
	}
	if s.Scaling == "" {
		s.Scaling = refine.ScaleSignificant.String()
	}
	switch {
	case !(s.Ka2Ratio >= 0 && s.Ka2Ratio <= 1):
		return s, fmt.Errorf("ka2_ratio: want 0…1, got %g", s.Ka2Ratio)
	case s.Threshold < 0 || s.BackgroundWidth < 0:
		return s, fmt.Errorf("threshold and background_width must not be negative")
	case s.Tolerance < 0:
		return s, fmt.Errorf("tolerance: want a window in degrees, got %g", s.Tolerance)
	case s.Z < 0:
		return s, fmt.Errorf("z: want a positive number of formula units, got %d", s.Z)
	}
	if s.Formula == "" && (s.Density != "" || s.Z != 0) {
		return s, fmt.Errorf("a density or Z needs a formula")
	}
	if s.Formula != "" && s.Density == "" && s.Z == 0 {
		return s, fmt.Errorf("a formula needs a measured density (or Z) to give each cell its contents")
	}
	return s, nil
}

// options are the settings turned into each stage's options.
type options struct {
	peaks    peaks.Options
	indexing indexing.Options
	refine   refine.Options // Wavelength set by Run
	formula  *density.Formula
	measured *density.Measured
}

// Check resolves the settings and parses every part of them (radiation,
// systems, corrections, formula, density), so that a bad setting is
// reported before any scan is read. Errors begin with the setting's name.
func (s Settings) Check() (Settings, error) {
	r, err := s.Resolve()
	if err != nil {
		return r, err
	}
	_, err = r.options()
	return r, err
}

func (s Settings) options() (options, error) {
	var o options
	o.peaks = peaks.Options{Threshold: s.Threshold, BackgroundWidth: s.BackgroundWidth}
	if s.Wavelength != "" {
		r, err := peaks.ParseRadiation(s.Wavelength)
		if err != nil {
			return o, fmt.Errorf("wavelength: %v", err)
		}
		if r.Doublet() {
			r.Ratio2 = s.Ka2Ratio
		}
		o.peaks.Radiation = r
	}
	o.indexing = indexing.Options{MaxImpurities: s.Impurities, Tolerance: s.Tolerance}
	for _, name := range s.Systems {
		sys, err := indexing.ParseSystem(strings.TrimSpace(name))
		if err != nil {
			return o, fmt.Errorf("systems: %v", err)
		}
		o.indexing.Systems = append(o.indexing.Systems, sys)
	}
	ro, err := RefineOptions(s.Corrections, s.Radius, s.FlagLimit, s.Scaling)
	if err != nil {
		return o, err
	}
	o.refine = ro
	if s.Formula != "" {
		f, err := density.ParseFormula(s.Formula)
		if err != nil {
			return o, fmt.Errorf("formula: %v", err)
		}
		o.formula = &f
	}
	if s.Density != "" {
		m, err := ParseDensity(s.Density)
		if err != nil {
			return o, err
		}
		o.measured = m
	}
	return o, nil
}

// RefineOptions builds refinement options from the corrections named in
// a comma-separated list (zero, displacement, both, none), the goniometer
// radius in mm, the flag limit in esds and the name of a scaling
// convention; the wavelength is left for the caller.
func RefineOptions(corrections string, radius, flagLimit float64, scaling string) (refine.Options, error) {
	o := refine.Options{Radius: radius, FlagLimit: flagLimit}
	for _, c := range strings.Split(corrections, ",") {
		switch strings.TrimSpace(strings.ToLower(c)) {
		case "zero":
			o.Zero = true
		case "displacement":
			o.Displacement = true
		case "both":
			o.Zero, o.Displacement = true, true
		case "none", "":
		default:
			return o, fmt.Errorf("corrections: unknown correction %q (want zero, displacement, both or none)", c)
		}
	}
	if !(radius > 0) {
		return o, fmt.Errorf("radius: want a positive goniometer radius in mm, got %g", radius)
	}
	if !(flagLimit > 0) {
		return o, fmt.Errorf("flag-limit: want a positive number of esds, got %g", flagLimit)
	}
	sc, err := refine.ParseScaling(scaling)
	if err != nil {
		return o, fmt.Errorf("scaling: %v", err)
	}
	o.Scaling = sc
	return o, nil
}

// ParseDensity reads a measured density in g/cm³ with its esd, e.g.
// 2.16(1); without an esd, 1 % is assumed.
func ParseDensity(s string) (*density.Measured, error) {
	v, u, err := peaks.ParseESD(s)
	if err != nil || !(v > 0) {
		return nil, fmt.Errorf("density: want a density in g/cm³ such as 2.16(1), got %q", s)
	}
	if u == 0 {
		u = 0.01 * v
	}
	return &density.Measured{Density: v, ESD: u}, nil
}
