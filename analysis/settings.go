package analysis

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"slices"

	"reticle/cell"
	"reticle/density"
	"reticle/indexing"
	"reticle/peaks"
	"reticle/refine"
	"reticle/scanfile"
)

// EditTolerance is the distance, degrees 2θ, within which an edit's
// position names a peak or a line: well below any peak's width, well
// above the rounding of a position printed to 0.0001°.
const EditTolerance = 0.005

// Settings are every choice that shapes an analysis. The zero value of
// every field means the default of the stage it belongs to; Resolved
// fills the defaults in. The JSON names are those of session files and
// result documents.
type Settings struct {
	// Sample names the specimen in the records.
	Sample string `json:"sample,omitempty"`
	// Block is the data block of a CIF file to read; empty means the
	// block that holds the measured pattern.
	Block string `json:"cif_block,omitempty"`

	// Radiation is the incident spectrum; nil means what the scan
	// states (scanfile.Scan.Radiation).
	Radiation *scanfile.Radiation `json:"radiation,omitempty"`
	// KAlpha2Ratio is the K-alpha2/K-alpha1 intensity ratio of a
	// doublet (scanfile.DefaultKAlpha2Ratio).
	KAlpha2Ratio float64 `json:"ka2_ratio,omitempty"`
	// Threshold is the significance a peak must reach, in esds of its
	// height (peaks.DefaultThreshold).
	Threshold float64 `json:"threshold,omitempty"`
	// BackgroundWidth is the background window, degrees 2θ
	// (peaks.DefaultBackgroundWidth).
	BackgroundWidth float64 `json:"background_width,omitempty"`

	// Systems are the crystal systems searched (indexing's default).
	Systems []cell.System `json:"systems,omitempty"`
	// SearchLower searches the lower systems even when a higher cell
	// explains the lines.
	SearchLower bool `json:"search_lower,omitempty"`
	// Unindexed is how many of the first 20 lines may stay unindexed
	// (indexing's default when zero; negative: none). Settings written
	// by earlier versions name it "impurities"; it is read under both.
	Unindexed int `json:"unindexed,omitempty"`
	// Tolerance is the smallest window, degrees 2θ, within which a
	// calculated line indexes an observed one (indexing's default).
	Tolerance float64 `json:"tolerance,omitempty"`
	// LinesOnly ranks the candidates by the line positions alone: the
	// whole pattern's evidence on the lines that tell the close first
	// candidates apart (weighByPattern) is left out. Settings written by
	// earlier versions may hold "weigh_by_pattern", an option that is
	// now the default; it is ignored.
	LinesOnly bool `json:"lines_only,omitempty"`

	// Corrections are the instrument corrections refined with each cell;
	// nil means refine.DefaultCorrections (chosen from the data).
	Corrections *refine.Corrections `json:"corrections,omitempty"`
	// Radius is the goniometer radius in mm (refine.DefaultRadius).
	Radius float64 `json:"radius_mm,omitempty"`
	// FlagLimit is the |Δ/σ| beyond which a line is flagged
	// (refine.DefaultFlagLimit).
	FlagLimit float64 `json:"flag_limit,omitempty"`
	// Scaling is the convention for scaling esds by χ²_red.
	Scaling refine.Scaling `json:"scaling"`
	// Standard is an internal standard mixed into the sample, whose
	// lines fix the corrections; nil means none.
	Standard *refine.Standard `json:"standard,omitempty"`

	// Formula, with a measured density or Z, gives every cell its
	// contents; nil means none.
	Formula *density.Formula `json:"formula,omitempty"`
	// Density is the measured density; nil means none.
	Density *density.Measured `json:"density,omitempty"`
	// Z is the number of formula units per cell, when known.
	Z int `json:"z,omitempty"`

	// Rejected are the positions (degrees 2θ) of extracted peaks left
	// out of the indexing.
	Rejected []float64 `json:"rejected_peaks,omitempty"`
	// Added are the positions (degrees 2θ) the user pointed at to add a
	// peak the extraction missed; each is fitted again, in order.
	Added []float64 `json:"added_peaks,omitempty"`
	// Excluded are the positions (degrees 2θ) of indexed lines left out
	// of the refinement.
	Excluded []float64 `json:"excluded_lines,omitempty"`
}

// Clone returns a copy that shares no slices with s.
func (s Settings) Clone() Settings {
	s.Systems = slices.Clone(s.Systems)
	s.Rejected = slices.Clone(s.Rejected)
	s.Added = slices.Clone(s.Added)
	s.Excluded = slices.Clone(s.Excluded)
	return s
}

// sameBesidesLines reports whether s and t differ at most in the lines
// rejected, added or left out of refinement.
func sameBesidesLines(s, t Settings) bool {
	s.Rejected, s.Added, s.Excluded = nil, nil, nil
	t.Rejected, t.Added, t.Excluded = nil, nil, nil
	a, err1 := json.Marshal(s)
	b, err2 := json.Marshal(t)
	return err1 == nil && err2 == nil && bytes.Equal(a, b)
}

// Check reports a setting that no analysis can use, naming it.
func (s Settings) Check() error {
	switch {
	case s.KAlpha2Ratio < 0 || s.KAlpha2Ratio > 1 || math.IsNaN(s.KAlpha2Ratio):
		return fmt.Errorf("ka2_ratio: want 0…1, got %g", s.KAlpha2Ratio)
	case s.Threshold < 0 || math.IsNaN(s.Threshold):
		return fmt.Errorf("threshold: want a number of esds, got %g", s.Threshold)
	case s.BackgroundWidth < 0 || math.IsNaN(s.BackgroundWidth):
		return fmt.Errorf("background_width: want a window in degrees, got %g", s.BackgroundWidth)
	case s.Tolerance < 0 || math.IsNaN(s.Tolerance):
		return fmt.Errorf("tolerance: want a window in degrees, got %g", s.Tolerance)
	case s.Radius < 0 || math.IsNaN(s.Radius) || math.IsInf(s.Radius, 0):
		return fmt.Errorf("radius_mm: want a goniometer radius in mm, got %g", s.Radius)
	case s.FlagLimit < 0 || math.IsNaN(s.FlagLimit):
		return fmt.Errorf("flag_limit: want a number of esds, got %g", s.FlagLimit)
	case s.Z < 0:
		return fmt.Errorf("z: want a positive number of formula units, got %d", s.Z)
	case s.Formula == nil && (s.Density != nil || s.Z != 0):
		return fmt.Errorf("a density or Z needs a formula")
	case s.Standard != nil && s.Corrections != nil && *s.Corrections == refine.None:
		return fmt.Errorf("an internal standard fixes the instrument corrections: choose at least one")
	}
	for _, sys := range s.Systems {
		if !sys.Valid() {
			return fmt.Errorf("systems: unknown crystal system %d", int(sys))
		}
	}
	return nil
}

// Resolved returns the settings with every default filled in from the
// stage that owns it, as the records print them; the radiation is the
// one scan implies when none is set (it stays unset without a scan).
func (s Settings) Resolved(scan *scanfile.Scan) Settings {
	s = s.Clone()
	if scan == nil {
		scan = &scanfile.Scan{}
	}
	po := s.peakOptions().Resolved(scan)
	s.KAlpha2Ratio, s.Threshold, s.BackgroundWidth = po.KAlpha2Ratio, po.Threshold, po.BackgroundWidth
	if s.Radiation != nil || scan.Len() > 0 {
		s.Radiation = &po.Radiation
	}
	io := s.indexOptions(0).Resolved()
	// Unindexed stays 0 (indexing's default, a share of the lines
	// searched, known only with the lines) or as set.
	s.Systems, s.Tolerance = io.Systems, io.Tolerance
	ro := s.refineOptions(0).Resolved()
	c := ro.Corrections
	s.Corrections, s.Radius, s.FlagLimit = &c, ro.Radius, ro.FlagLimit
	return s
}

// peakOptions are the extraction's options.
func (s Settings) peakOptions() peaks.Options {
	o := peaks.Options{KAlpha2Ratio: s.KAlpha2Ratio, Threshold: s.Threshold, BackgroundWidth: s.BackgroundWidth}
	if s.Radiation != nil {
		o.Radiation = *s.Radiation
	}
	return o
}

// indexOptions are the search's options for wavelength λ (Å).
func (s Settings) indexOptions(lambda float64) indexing.Options {
	return indexing.Options{Wavelength: lambda, Systems: s.Systems, MaxImpurities: s.Unindexed, Tolerance: s.Tolerance, ExploreLower: s.SearchLower}
}

// refineOptions are the refinement's options for wavelength λ (Å).
func (s Settings) refineOptions(lambda float64) refine.Options {
	o := refine.Options{Wavelength: lambda, Corrections: refine.DefaultCorrections, Radius: s.Radius, FlagLimit: s.FlagLimit, Scaling: s.Scaling, Standard: s.Standard}
	if s.Corrections != nil {
		o.Corrections = *s.Corrections
	}
	return o
}

// within reports whether tt lies within EditTolerance of an angle in
// list.
func within(tt float64, list []float64) bool {
	for _, r := range list {
		if math.Abs(r-tt) <= EditTolerance {
			return true
		}
	}
	return false
}

// IsRejected reports whether the peak at tt (degrees 2θ) is left out of
// the indexing.
func (s Settings) IsRejected(tt float64) bool { return within(tt, s.Rejected) }

// Reject leaves the peak at tt (degrees 2θ) out of the indexing, or takes
// it back when it was left out.
func (s *Settings) Reject(tt float64) {
	s.Rejected = toggle(s.Rejected, tt)
}

// Exclude leaves the indexed line at tt (degrees 2θ) out of the
// refinement, or takes it back when it was left out.
func (s *Settings) Exclude(tt float64) {
	s.Excluded = toggle(s.Excluded, tt)
}

// toggle removes the angles within EditTolerance of tt from list, or adds
// tt when there were none.
func toggle(list []float64, tt float64) []float64 {
	n := len(list)
	list = slices.DeleteFunc(slices.Clone(list), func(x float64) bool { return math.Abs(x-tt) <= EditTolerance })
	if len(list) == n {
		list = append(list, tt)
	}
	return list
}

// UnmarshalJSON reads settings, also those of earlier versions, which
// name the unindexed lines allowed "impurities".
func (s *Settings) UnmarshalJSON(data []byte) error {
	type plain Settings // without this method
	var v struct {
		plain
		Impurities int `json:"impurities,omitempty"`
	}
	if err := json.Unmarshal(data, &v); err != nil {
		return err
	}
	*s = Settings(v.plain)
	if s.Unindexed == 0 {
		s.Unindexed = v.Impurities
	}
	return nil
}
