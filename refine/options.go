package refine

import (
	"fmt"

	"gonum.org/v1/gonum/stat/distuv"

	"reticle/cell"
)

// DefaultRadius is the goniometer radius assumed when none is given, in
// mm: a typical laboratory Bragg–Brentano instrument (common practice;
// the radius of each instrument is in its manual and should be set).
const DefaultRadius = 240.0

// DefaultFlagLimit is the |Δ/σ| above which a line is flagged as an
// outlier when no limit is given (three standard deviations, common
// practice).
const DefaultFlagLimit = 3.0

// DefaultCorrections are the corrections of a refinement when the user
// names none: chosen from the data (see Selection).
const DefaultCorrections = Auto

// Options control a refinement. The zero value of every field means its
// documented default.
type Options struct {
	// Wavelength of the lines' radiation in Å (K-alpha1 for a doublet).
	// Required.
	Wavelength float64
	// Corrections are the instrument corrections refined with the cell
	// (or, with a Standard, fixed by the standard's lines). The zero
	// value refines none; Auto chooses them from the data (see
	// Selection), and with a Standard means zero shift and
	// displacement.
	Corrections Corrections
	// Radius is the goniometer radius R in mm. Zero means DefaultRadius.
	Radius float64
	// FlagLimit is the |Δ/σ| above which a line is flagged. Zero means
	// DefaultFlagLimit.
	FlagLimit float64
	// Standard, when set, is an internal standard mixed into the sample:
	// the observations marked Standard fix the corrections (at least one
	// required) with the standard's cell held at its stated value.
	Standard *Standard
	// Scaling chooses when the covariance is multiplied by the reduced
	// χ². The zero value is ScaleSignificant.
	Scaling Scaling
	// MaxIterations bounds the Gauss–Newton iterations. Zero means 100.
	MaxIterations int

	// blended marks observations whose esds already include blendESDs.
	blended bool
}

// Resolved returns the options with every zero field at its default.
func (o Options) Resolved() Options { return o.withDefaults() }

func (o Options) withDefaults() Options {
	if o.Radius == 0 {
		o.Radius = DefaultRadius
	}
	if o.FlagLimit == 0 {
		o.FlagLimit = DefaultFlagLimit
	}
	if o.MaxIterations == 0 {
		o.MaxIterations = 100
	}
	return o
}

// An Observation is one observed line with its assignment.
type Observation struct {
	cell.Line // position and esd, degrees 2θ; the esd must be > 0
	// HKL are the indices of the calculated line it matches: several
	// when reflections coincide; the first is used in the model.
	HKL []cell.HKL
	// Standard marks a line of the internal standard.
	Standard bool
	// Excluded lines take no part in the fit; their residuals are still
	// reported.
	Excluded bool
	// Width is the FWHM of the observed peak, degrees 2θ; zero when
	// unknown. A line with another calculated line of its phase closer
	// than its width is an unresolved blend, and its esd is widened (see
	// blendESD).
	Width float64

	ambiguous bool // a widened assignment window held several lines
}

// A Scaling is a convention for scaling the covariance by the reduced χ².
type Scaling int

// The scaling conventions. With line esds that are right, χ²_red
// scatters about 1 (its standard deviation is √(2/ν) for ν degrees of
// freedom), so scaling whenever it exceeds 1 inflates the uncertainties
// of about half of all honest fits; ScaleSignificant scales only when the
// excess is significant.
const (
	// ScaleSignificant multiplies the covariance by χ²_red when χ²
	// exceeds the 95 % point of the χ² distribution with ν degrees of
	// freedom: the positions then scatter more than their esds allow.
	ScaleSignificant Scaling = iota
	// ScaleAboveOne multiplies by χ²_red whenever it exceeds 1
	// (conservative).
	ScaleAboveOne
	// ScaleAlways multiplies by χ²_red, above or below 1 (the esds of the
	// lines are taken as relative weights only).
	ScaleAlways
	// ScaleNever keeps (JᵀWJ)⁻¹ (the esds of the lines are taken as
	// exact).
	ScaleNever
)

var scalingNames = [...]string{"chi2-test", "above-one", "always", "never"}

func (s Scaling) String() string {
	if s >= 0 && int(s) < len(scalingNames) {
		return scalingNames[s]
	}
	return "Scaling(?)"
}

// ParseScaling reads a scaling name as String prints it.
func ParseScaling(name string) (Scaling, error) {
	if name == "significant" {
		// The name of sessions written before version 0.4.
		return ScaleSignificant, nil
	}
	for i, n := range scalingNames {
		if n == name {
			return Scaling(i), nil
		}
	}
	return 0, fmt.Errorf("unknown scaling %q (want chi2-test, above-one, always or never)", name)
}

// MarshalText writes the scaling's name.
func (s Scaling) MarshalText() ([]byte, error) { return []byte(s.String()), nil }

// UnmarshalText reads a scaling's name.
func (s *Scaling) UnmarshalText(b []byte) error {
	v, err := ParseScaling(string(b))
	if err != nil {
		return err
	}
	*s = v
	return nil
}

// scale reports whether a fit with χ² over dof degrees of freedom has its
// covariance multiplied by χ²/dof.
func (s Scaling) scale(chi2 float64, dof int) bool {
	if dof <= 0 {
		return false
	}
	red := chi2 / float64(dof)
	switch s {
	case ScaleAboveOne:
		return red > 1
	case ScaleAlways:
		return true
	case ScaleNever:
		return false
	}
	return chi2 > distuv.ChiSquared{K: float64(dof)}.Quantile(0.95)
}
