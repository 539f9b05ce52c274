package report

import (
	"reticle/indexing"
	"reticle/peaks"
)

// Schema is the version of the Document's JSON layout.
const Schema = 1

// Program and Version name the program in every record.
const (
	Program = "Reticle"
	Version = "0.5.0"
)

// A Document is the result of one analysis: what `reticle index --json`
// prints and every report is drawn from.
type Document struct {
	Program string `json:"program"`
	Version string `json:"version"`
	Schema  int    `json:"schema"`
	Sample  string `json:"sample,omitempty"`
	ScanInfo
	Wavelength2 float64    `json:"wavelength_ka2,omitempty"`
	Ka2Ratio    float64    `json:"ka2_ratio,omitempty"`
	Settings    Settings   `json:"settings"`
	Lines       int        `json:"lines"` // lines indexed (companions and rejected peaks left out)
	Peaks       []Peak     `json:"peaks"`
	Solutions   []Solution `json:"solutions"`
	Warnings    []string   `json:"warnings,omitempty"`

	// Pattern holds the curves for figures; it is not part of the JSON.
	Pattern *Pattern `json:"-"`
}

// ScanInfo describes the scan a result comes from.
type ScanInfo struct {
	File       string     `json:"file"`
	SHA256     string     `json:"sha256"`
	Points     int        `json:"points"`
	Range      [2]float64 `json:"range_two_theta"`
	Step       float64    `json:"step"`
	Radiation  string     `json:"radiation"`
	Wavelength float64    `json:"wavelength"` // K-alpha1 or the single line, Å
}

// NewScanInfo describes a scan read with the given radiation.
func NewScanInfo(s *peaks.Scan, r peaks.Radiation) ScanInfo {
	lo, hi := s.Range()
	return ScanInfo{File: s.Path, SHA256: s.SHA256, Points: s.Len(), Range: [2]float64{lo, hi}, Step: s.Step(), Radiation: r.Name, Wavelength: r.Lambda1}
}

// CellValues are a cell's parameters (Å, degrees), volume (Å³) and zero
// shift (degrees 2θ) as the JSON documents print them.
type CellValues struct {
	System   string  `json:"system"`
	Centring string  `json:"centring"`
	A        float64 `json:"a"`
	B        float64 `json:"b"`
	C        float64 `json:"c"`
	Alpha    float64 `json:"alpha"`
	Beta     float64 `json:"beta"`
	Gamma    float64 `json:"gamma"`
	Volume   float64 `json:"volume"`
	Zero     float64 `json:"zero_shift"`
}

// NewCellValues gives a cell's values with its volume and zero shift.
func NewCellValues(c indexing.Cell, volume, zero float64) CellValues {
	return CellValues{System: c.System.String(), Centring: c.Centring.String(), A: c.A, B: c.B, C: c.C,
		Alpha: c.Alpha, Beta: c.Beta, Gamma: c.Gamma, Volume: volume, Zero: zero}
}

// A Pattern is a scan with its fitted curves, for figures.
type Pattern struct {
	TwoTheta, Intensity, Background, Profile []float64
}

// A Peak is one extracted peak.
type Peak struct {
	TwoTheta    float64 `json:"two_theta"`
	TwoThetaESD float64 `json:"two_theta_esd"`
	D           float64 `json:"d"`
	DESD        float64 `json:"d_esd"`
	Height      float64 `json:"height"`
	HeightESD   float64 `json:"height_esd"`
	Area        float64 `json:"area"`
	AreaESD     float64 `json:"area_esd"`
	FWHM        float64 `json:"fwhm"`
	FWHMESD     float64 `json:"fwhm_esd"`
	Eta         float64 `json:"eta"`
	Background  float64 `json:"background"`
	SNR         float64 `json:"snr"`
	Flags       string  `json:"flags,omitempty"`
	CompanionOf *int    `json:"companion_of,omitempty"`
	Rejected    bool    `json:"rejected,omitempty"`
}

// A Line is an observed line under a solution.
type Line struct {
	TwoTheta     float64  `json:"two_theta"`
	ESD          float64  `json:"esd"`
	Indexed      bool     `json:"indexed"`
	HKL          [][3]int `json:"hkl,omitempty"`
	TwoThetaCalc float64  `json:"two_theta_calc,omitempty"`
	Delta        float64  `json:"delta,omitempty"`
}

// A Calc is a calculated line of a solution (for tick marks).
type Calc struct {
	D        float64  `json:"d"`
	TwoTheta float64  `json:"two_theta"`
	Mult     int      `json:"multiplicity"`
	HKL      [][3]int `json:"hkl"`
}

// A Solution is one ranked cell with its refinement and contents.
type Solution struct {
	Rank int `json:"rank"`
	CellValues
	M          float64  `json:"m20"`
	N          int      `json:"m_lines"`
	FN         float64  `json:"fn"`
	FNMeanDiff float64  `json:"fn_mean_delta"`
	FNPossible int      `json:"fn_possible"`
	Indexed    int      `json:"indexed"`
	Unindexed  int      `json:"unindexed"`
	Conditions []string `json:"conditions,omitempty"`
	Lines      []Line   `json:"lines"`
	Calculated []Calc   `json:"calculated"`
	// The refinement of the cell against its indexed lines; absent, with
	// RefineError saying why, when it could not be done.
	*Refined
	RefineError string `json:"refine_error,omitempty"`
	// Contents, when a formula and a density or Z were given.
	Contents *Contents `json:"contents,omitempty"`
}

// A Param is one refined parameter.
type Param struct {
	Name         string  `json:"name"`
	Value        float64 `json:"value"`
	ESD          float64 `json:"esd"`
	Unit         string  `json:"unit"`
	Text         string  `json:"text"` // crystallographic notation, e.g. 5.64021(7)
	FromStandard bool    `json:"from_standard,omitempty"`
}

// A Residual is one line after the refinement.
type Residual struct {
	HKL          [][3]int `json:"hkl"`
	TwoTheta     float64  `json:"two_theta_obs"`
	ESD          float64  `json:"esd"`
	TwoThetaCalc float64  `json:"two_theta_calc"`
	Delta        float64  `json:"delta"`
	Norm         float64  `json:"delta_over_esd"`
	Flagged      bool     `json:"flagged"`
	Excluded     bool     `json:"excluded"`
}

// Refined is the refinement's part of a solution; its fields sit beside
// the cell's in JSON.
type Refined struct {
	AESD            float64     `json:"a_esd"`
	BESD            float64     `json:"b_esd"`
	CESD            float64     `json:"c_esd"`
	VolumeESD       float64     `json:"volume_esd"`
	ZeroESD         float64     `json:"zero_shift_esd"`
	Displacement    *float64    `json:"displacement_mm,omitempty"`
	DisplacementESD *float64    `json:"displacement_mm_esd,omitempty"`
	Radius          float64     `json:"goniometer_radius_mm"`
	Chi2Reduced     float64     `json:"chi2_reduced"`
	Fitted          int         `json:"lines_fitted"` // residuals not excluded
	DOF             int         `json:"degrees_of_freedom"`
	Scaled          bool        `json:"esd_scaled_by_chi2"`
	Scaling         string      `json:"esd_scaling"`
	Params          []Param     `json:"parameters"`
	ParamNames      []string    `json:"correlation_order"`
	Correlation     [][]float64 `json:"correlation"`
	Residuals       []Residual  `json:"residuals"`
	Flagged         int         `json:"flagged"`
	Warnings        []string    `json:"refine_warnings,omitempty"`
}

// Contents is a cell's contents.
type Contents struct {
	Formula           string       `json:"formula"`
	MolarMass         float64      `json:"molar_mass"`
	MolarMassESD      float64      `json:"molar_mass_esd"`
	NoStandardWeight  bool         `json:"no_standard_weight,omitempty"`
	Volume            float64      `json:"volume"`
	VolumeESD         float64      `json:"volume_esd"`
	LatticePoints     int          `json:"lattice_points"`
	Z                 int          `json:"z"`
	ZFromDensity      bool         `json:"z_from_density"`
	ZEst              *float64     `json:"z_estimated,omitempty"`
	ZEstESD           *float64     `json:"z_estimated_esd,omitempty"`
	ZWhole            *bool        `json:"z_whole,omitempty"`
	Candidates        []ZCandidate `json:"z_candidates,omitempty"`
	Density           float64      `json:"density_xray"`
	DensityESD        float64      `json:"density_xray_esd"`
	DensityText       string       `json:"density_xray_text"`
	Measured          *float64     `json:"density_measured,omitempty"`
	MeasuredESD       *float64     `json:"density_measured_esd,omitempty"`
	Discrepancy       *float64     `json:"density_discrepancy_sigma,omitempty"`
	AtomsPerCell      float64      `json:"atoms_per_cell"`
	CellMass          float64      `json:"formula_mass_per_cell"`
	UnitsPerLattice   float64      `json:"formula_units_per_lattice_point"`
	AvogadroConstant  float64      `json:"avogadro_constant"`
	AtomicWeightTable string       `json:"atomic_weights"`
}

// A ZCandidate is an allowed Z with its discrepancy from the estimate.
type ZCandidate struct {
	Z     int     `json:"z"`
	Sigma float64 `json:"sigma"`
}
