package report

import (
	"math"

	"reticle/analysis"
	"reticle/cell"
	"reticle/density"
	"reticle/esd"
	"reticle/indexing"
	"reticle/peaks"
	"reticle/refine"
	"reticle/scanfile"
)

// Schema is the version of the Document's JSON layout.
const Schema = 2

// Program and Version name the program in every record.
const (
	Program = "Reticle"
	Version = "0.6.0"
)

// A Document is an analysis as JSON: what `reticle index --json` prints
// and the JSON record of a report. It is made from an analysis.Analysis
// at the edge (NewDocument) and read back only for its settings.
type Document struct {
	Program string `json:"program"`
	Version string `json:"version"`
	Schema  int    `json:"schema"`
	Sample  string `json:"sample,omitempty"`
	ScanInfo
	Wavelength2 float64 `json:"wavelength_ka2,omitempty"`
	Ka2Ratio    float64 `json:"ka2_ratio,omitempty"`
	// Settings are the settings as given; Resolved with every default
	// filled in.
	Settings analysis.Settings  `json:"settings"`
	Resolved *analysis.Settings `json:"settings_used,omitempty"`
	// Profile is the scan-wide line shape the peaks were fitted with.
	Profile *ProfileInfo `json:"profile,omitempty"`
	Lines   int          `json:"lines"` // lines indexed (companions, rejected peaks and the standard's lines left out)
	Peaks   []Peak       `json:"peaks"`
	// StandardLines are the internal standard's lines, when one was used.
	StandardLines []Residual `json:"standard_lines,omitempty"`
	Solutions     []Solution `json:"solutions"`
	// Chosen is the rank of the solution the records report.
	Chosen   int      `json:"chosen"`
	Warnings []string `json:"warnings,omitempty"`
	// Search describes the indexing search.
	Search *SearchInfo `json:"search,omitempty"`
	// Pattern is the whole-pattern fit of the chosen cell, when one was
	// made.
	Pattern *PatternInfo `json:"whole_pattern_fit,omitempty"`
}

// PatternInfo summarises a whole-pattern fit: its agreement factors
// (percent), χ²_red and GoF, and each phase's refined cell.
type PatternInfo struct {
	Rp       float64      `json:"rp"`
	Rwp      float64      `json:"rwp"`
	Rexp     float64      `json:"rexp"`
	Chi2     float64      `json:"chi2"`
	GoF      float64      `json:"gof"`
	Phases   []CellValues `json:"phases"`
	Warnings []string     `json:"warnings,omitempty"`
}

// NewPatternInfo gives a whole-pattern fit's agreement (percent) and
// phases.
func NewPatternInfo(pf *analysis.PatternFit) *PatternInfo {
	f := pf.Fit
	pi := &PatternInfo{Rp: 100 * f.Rp, Rwp: 100 * f.Rwp, Rexp: 100 * f.Rexp, Chi2: f.Chi2, GoF: f.GoF, Warnings: f.Warnings}
	for _, ph := range f.Phases {
		pi.Phases = append(pi.Phases, NewCellValues(ph.Cell, ph.ESD, ph.Volume, ph.VolumeESD))
	}
	return pi
}

// SearchInfo describes the indexing search: the systems searched, why it
// stopped there, its bounds (Å, Å³, degrees 2θ), how clearly the first
// solution beats the next lattice (the ratio of their scores; absent when
// no other lattice was found) and its warnings.
type SearchInfo struct {
	Systems   []cell.System `json:"systems"`
	Stop      string        `json:"stop"`
	MaxEdge   float64       `json:"max_edge"`
	MaxVolume float64       `json:"max_volume"`
	ZeroRange float64       `json:"zero_range"`
	LinesUsed int           `json:"lines_used"`
	Warnings  []string      `json:"warnings,omitempty"`
}

// NewSearchInfo describes an indexing result.
func NewSearchInfo(r *indexing.Result) *SearchInfo {
	si := &SearchInfo{Systems: r.Searched, Stop: r.Stop, MaxEdge: r.Bounds.MaxEdge, MaxVolume: r.Bounds.MaxVolume,
		ZeroRange: r.Bounds.ZeroRange, LinesUsed: r.LinesUsed, Warnings: r.Warnings}
	return si
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
func NewScanInfo(s *scanfile.Scan, r scanfile.Radiation) ScanInfo {
	lo, hi := s.Range()
	return ScanInfo{File: s.Path, SHA256: s.SHA256, Points: s.Len(), Range: [2]float64{lo, hi}, Step: s.Step(), Radiation: r.Name, Wavelength: r.Lambda1}
}

// CellValues are a cell's parameters (Å, degrees) with their esds (zero
// when not refined or fixed by the system) and its text form.
type CellValues struct {
	System   cell.System   `json:"system"`
	Centring cell.Centring `json:"centring"`
	A        float64       `json:"a"`
	B        float64       `json:"b"`
	C        float64       `json:"c"`
	Alpha    float64       `json:"alpha"`
	Beta     float64       `json:"beta"`
	Gamma    float64       `json:"gamma"`
	AESD     float64       `json:"a_esd,omitempty"`
	BESD     float64       `json:"b_esd,omitempty"`
	CESD     float64       `json:"c_esd,omitempty"`
	AlphaESD float64       `json:"alpha_esd,omitempty"`
	BetaESD  float64       `json:"beta_esd,omitempty"`
	GammaESD float64       `json:"gamma_esd,omitempty"`
	// Volume in Å³ with its esd from the full covariance.
	Volume    float64 `json:"volume"`
	VolumeESD float64 `json:"volume_esd,omitempty"`
	// Text is the cell's text form, which --cell reads back.
	Text string `json:"cell"`
}

// NewCellValues gives a cell's values with its esds and volume.
func NewCellValues(c cell.Cell, e cell.ESD, v, ve float64) CellValues {
	return CellValues{System: c.System, Centring: c.Centring, A: c.A, B: c.B, C: c.C, Alpha: c.Alpha, Beta: c.Beta, Gamma: c.Gamma,
		AESD: e.A, BESD: e.B, CESD: e.C, AlphaESD: e.Alpha, BetaESD: e.Beta, GammaESD: e.Gamma,
		Volume: v, VolumeESD: ve, Text: cell.Format(c, e)}
}

// ProfileInfo is the scan-wide line shape the peaks were fitted with
// (see package peaks): the width curve FWHM² = U tan²θ + V tanθ + W
// (degrees²), the median Lorentzian fraction, the asymmetry law
// A = c0 + c1·t + c2·t² with t = (2θ − 90°)/90° (fitted over
// asymmetry_range, degrees 2θ), the ratio of the lines' Lorentzian to
// Gaussian width, the K-alpha2 and K-beta intensity ratios, and the factor
// applied to the points' esds.
type ProfileInfo struct {
	UVW            [3]float64 `json:"fwhm_uvw"`
	Eta            float64    `json:"eta"`
	Asymmetry      [3]float64 `json:"asymmetry"`
	AsymmetryRange []float64  `json:"asymmetry_range,omitempty"`
	TailRatio      float64    `json:"tail_ratio"`
	Ka2Ratio       float64    `json:"ka2_ratio"`
	KBetaRatio     float64    `json:"kbeta_ratio"`
	NoiseScale     float64    `json:"noise_scale"`
}

// NewProfileInfo describes an extraction's line shape.
func NewProfileInfo(r *peaks.Result) *ProfileInfo {
	p := &ProfileInfo{
		UVW: [3]float64{r.FWHMCurve.U, r.FWHMCurve.V, r.FWHMCurve.W}, Eta: r.Eta,
		Asymmetry: r.Asymmetry.C, TailRatio: r.TailRatio, KBetaRatio: r.KBetaRatio, NoiseScale: r.NoiseScale,
	}
	if r.Asymmetry.Hi > r.Asymmetry.Lo {
		p.AsymmetryRange = []float64{r.Asymmetry.Lo, r.Asymmetry.Hi}
	}
	if r.Radiation.Doublet() {
		p.Ka2Ratio = r.Radiation.Ratio2
	}
	return p
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
	Asymmetry   float64 `json:"asymmetry"`
	Background  float64 `json:"background"`
	SNR         float64 `json:"snr"`
	Flags       string  `json:"flags,omitempty"`
	CompanionOf *int    `json:"companion_of,omitempty"`
	Rejected    bool    `json:"rejected,omitempty"`
}

// NewPeak converts a peak.
func NewPeak(p peaks.Peak, rejected bool) Peak {
	j := Peak{
		TwoTheta: p.TwoTheta, TwoThetaESD: p.TwoThetaESD, D: p.D, DESD: p.DESD,
		Height: p.Height, HeightESD: p.HeightESD, Area: p.Area, AreaESD: p.AreaESD,
		FWHM: p.FWHM, FWHMESD: p.FWHMESD, Eta: p.Eta, Asymmetry: p.Asymmetry, Background: p.Background, SNR: p.SNR,
		Flags: p.Flags.String(), Rejected: rejected,
	}
	if p.Parent >= 0 {
		parent := p.Parent
		j.CompanionOf = &parent
	}
	return j
}

// A Line is an observed line under a solution.
type Line struct {
	TwoTheta     float64    `json:"two_theta"`
	ESD          float64    `json:"esd"`
	Indexed      bool       `json:"indexed"`
	HKL          []cell.HKL `json:"hkl,omitempty"`
	TwoThetaCalc float64    `json:"two_theta_calc,omitempty"`
	Delta        float64    `json:"delta,omitempty"`
}

// A Calc is a calculated line of a solution (for tick marks).
type Calc struct {
	D        float64    `json:"d"`
	TwoTheta float64    `json:"two_theta"`
	Mult     int        `json:"multiplicity"`
	HKL      []cell.HKL `json:"hkl"`
}

// A Solution is one ranked cell with its refinement and contents.
type Solution struct {
	Rank int `json:"rank"`
	CellValues
	// Probability is the chance that the cell is the lattice of the
	// lines among the candidates found (indexing.Solution.Probability);
	// LogEvidence the log of the lines' probability density under it.
	Probability float64 `json:"probability"`
	LogEvidence float64 `json:"log_evidence"`
	// DemandingLines are the lines (degrees 2θ) that demand this
	// lattice over one with DemandingIndex times its lattice points
	// (indexing.Solution.Demanding).
	DemandingLines []float64 `json:"demanding_lines,omitempty"`
	DemandingIndex int       `json:"demanding_index,omitempty"`
	// SecondPhase is the cell of the second phase that the evidence
	// weighed beside this one, and SecondPhaseLines about how many
	// lines it takes (indexing.Solution.SecondPhase).
	SecondPhase      string `json:"second_phase,omitempty"`
	SecondPhaseLines int    `json:"second_phase_lines,omitempty"`
	// Zero is the zero shift the search found, degrees 2θ; the refined
	// one, with its esd, is the refinement's.
	Zero        float64  `json:"zero_shift"`
	M           float64  `json:"m_n"`
	FigureLines int      `json:"figure_lines"`
	FN          float64  `json:"f_n"`
	FNMeanDiff  float64  `json:"f_n_mean_delta"`
	FNPossible  int      `json:"f_n_possible"`
	Indexed     int      `json:"indexed"`
	Unindexed   int      `json:"unindexed"`
	Conditions  []string `json:"conditions,omitempty"`
	Extinction  string   `json:"extinction_symbol,omitempty"`
	// Parameters refined in the search (cell and zero), the χ² of the
	// first lines' positions with its degrees of freedom, and the Niggli
	// reduced cell of the lattice with the matrix whose rows give its
	// vectors in the basis of the cell.
	Parameters  int           `json:"parameters"`
	Chi2        float64       `json:"chi2"`
	DOF         int           `json:"degrees_of_freedom"`
	Reduced     string        `json:"reduced_cell"`
	FromReduced [3][3]float64 `json:"reduced_from_cell"`
	Lines       []Line        `json:"lines"`
	Calculated  []Calc        `json:"calculated"`
	// The refinement of the cell against its indexed lines; absent, with
	// RefineError saying why, when it could not be done.
	Refined     *Refined `json:"refinement,omitempty"`
	RefineError string   `json:"refinement_error,omitempty"`
	// Contents, when a formula was given.
	Contents      *Contents `json:"contents,omitempty"`
	ContentsError string    `json:"contents_error,omitempty"`
	// PatternEvidence is what the whole pattern said of the candidate
	// when the first candidates were close (analysis.PatternEvidence).
	PatternEvidence *PatternEvidence `json:"pattern_evidence,omitempty"`
	// CellFrom says which refinement gave the cell and its esds:
	// "pattern" (the whole-pattern fit, Pattern) or "lines" (the peak
	// positions, Refined); CellNote says why (analysis.Candidate's
	// PolishNote), when a whole-pattern fit was tried.
	CellFrom string       `json:"cell_from"`
	CellNote string       `json:"cell_note,omitempty"`
	Pattern  *PatternInfo `json:"pattern,omitempty"`
}

// PatternEvidence is what the whole pattern said of a close candidate
// (analysis.PatternEvidence): the fit's agreement (percent; the first
// candidate's, the one fit made), whether the candidate was weighed
// against the first, the log Bayes factor over the first from the weak
// lines that tell them apart and how many there were, and the
// probability the line positions alone gave the candidate.
type PatternEvidence struct {
	Rwp        float64 `json:"rwp,omitempty"`
	Rexp       float64 `json:"rexp,omitempty"`
	Chi2       float64 `json:"chi2,omitempty"`
	Parameters int     `json:"parameters,omitempty"`
	Reference  bool    `json:"reference,omitempty"`
	Compared   bool    `json:"compared"`
	LogBayes   float64 `json:"log_bayes_factor"`
	Extra      int     `json:"extra_lines"`
	Missing    int     `json:"missing_lines"`
	Split      bool    `json:"split_lines,omitempty"`
	Prior      float64 `json:"probability_from_lines"`
	Error      string  `json:"error,omitempty"`
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

// NewParam converts one refined parameter.
func NewParam(p refine.Param) Param {
	return Param{Name: p.Name, Value: p.Value, ESD: p.ESD, Unit: p.Unit, Text: esd.Format(p.Value, p.ESD), FromStandard: p.Fixed}
}

// A Residual is one line after the refinement.
type Residual struct {
	HKL          []cell.HKL `json:"hkl"`
	TwoTheta     float64    `json:"two_theta"`
	ESD          float64    `json:"esd"`
	TwoThetaCalc float64    `json:"two_theta_calc"`
	Delta        float64    `json:"delta"`
	Sigmas       float64    `json:"delta_sigmas"`
	Flagged      bool       `json:"flagged"`
	Excluded     bool       `json:"excluded"`
}

// NewResidual converts one residual.
func NewResidual(rr refine.Residual) Residual {
	return Residual{HKL: rr.HKL, TwoTheta: rr.TwoTheta, ESD: rr.ESD, TwoThetaCalc: rr.TwoThetaCalc,
		Delta: rr.Delta, Sigmas: finite(rr.Sigmas), Flagged: rr.Flagged, Excluded: rr.Excluded}
}

// Refined is a refinement of a cell.
type Refined struct {
	Corrections     refine.Corrections `json:"corrections"`
	ZeroShift       *float64           `json:"zero_shift,omitempty"` // degrees 2θ
	ZeroShiftESD    *float64           `json:"zero_shift_esd,omitempty"`
	Displacement    *float64           `json:"displacement_mm,omitempty"`
	DisplacementESD *float64           `json:"displacement_mm_esd,omitempty"`
	Transparency    *float64           `json:"transparency_mm,omitempty"`
	TransparencyESD *float64           `json:"transparency_mm_esd,omitempty"`
	Radius          float64            `json:"radius_mm"`
	Chi2Reduced     float64            `json:"chi2_reduced"`
	Fitted          int                `json:"lines_fitted"` // residuals not excluded
	DOF             int                `json:"degrees_of_freedom"`
	Scaled          bool               `json:"esd_scaled_by_chi2"`
	Scaling         refine.Scaling     `json:"scaling"`
	Params          []Param            `json:"parameters"`
	Correlation     [][]float64        `json:"correlation"` // in the order of Params
	Residuals       []Residual         `json:"residuals"`
	Flagged         int                `json:"flagged"`
	Standard        string             `json:"standard,omitempty"`
	// Selection says how the corrections were chosen from the data;
	// absent when the user fixed them.
	Selection *Selection `json:"correction_choice,omitempty"`
	Warnings  []string   `json:"warnings,omitempty"`
}

// Selection is the choice of the correction model.
type Selection struct {
	Criterion string     `json:"criterion"`
	Chosen    string     `json:"chosen"`
	Reason    string     `json:"reason"`
	Widening  float64    `json:"esd_widening"`
	Models    []ModelFit `json:"models"`
}

// ModelFit is one correction model compared.
type ModelFit struct {
	Corrections string  `json:"corrections"`
	Params      int     `json:"parameters,omitempty"`
	Chi2        float64 `json:"chi2,omitempty"`
	DOF         int     `json:"degrees_of_freedom,omitempty"`
	BIC         float64 `json:"bic,omitempty"`
	Weight      float64 `json:"weight"`
	Error       string  `json:"error,omitempty"`
}

// NewSelection converts a correction-model choice.
func NewSelection(s *refine.Selection) *Selection {
	if s == nil {
		return nil
	}
	j := &Selection{Criterion: s.Criterion, Chosen: s.Chosen.String(), Reason: s.Reason(), Widening: s.Widening}
	for _, m := range s.Models {
		j.Models = append(j.Models, ModelFit{Corrections: m.Corrections.String(), Params: m.Params, Chi2: m.Chi2, DOF: m.DOF, BIC: m.BIC, Weight: m.Weight, Error: m.Err})
	}
	return j
}

// NewRefined converts a refinement result.
func NewRefined(r *refine.Result) Refined {
	j := Refined{
		Corrections: r.Corrections, Radius: r.Radius, Chi2Reduced: r.Chi2Reduced, Fitted: r.Fitted, DOF: r.DOF,
		Scaled: r.Scaled, Scaling: r.Scaling, Correlation: r.Correlation, Flagged: r.Flagged, Warnings: r.Warnings,
		Params: []Param{}, Residuals: []Residual{}, Selection: NewSelection(r.Selection),
	}
	if r.Corrections.Has(refine.Zero) {
		z, e := r.Zero()
		j.ZeroShift, j.ZeroShiftESD = &z, &e
	}
	if r.Corrections.Has(refine.Displacement) {
		d, e := r.Displacement()
		j.Displacement, j.DisplacementESD = &d, &e
	}
	if r.Corrections.Has(refine.Transparency) {
		d, e := r.Transparency()
		j.Transparency, j.TransparencyESD = &d, &e
	}
	for _, p := range r.Params {
		j.Params = append(j.Params, NewParam(p))
	}
	for _, rr := range r.Residuals {
		j.Residuals = append(j.Residuals, NewResidual(rr))
	}
	if r.StandardFit != nil {
		j.Standard = r.StandardFit.Standard.Name
	}
	return j
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
	Measured          *float64     `json:"density_measured,omitempty"`
	MeasuredESD       *float64     `json:"density_measured_esd,omitempty"`
	Sigmas            *float64     `json:"density_delta_sigmas,omitempty"`
	AtomsPerCell      float64      `json:"atoms_per_cell"`
	CellMass          float64      `json:"formula_mass_per_cell"`
	CellMassESD       float64      `json:"formula_mass_per_cell_esd"`
	UnitsPerLattice   float64      `json:"formula_units_per_lattice_point"`
	AvogadroConstant  float64      `json:"avogadro_constant"`
	AtomicWeightTable string       `json:"atomic_weights"`
	// ZGuessed: Z is the most plausible of Plausible, without a measured
	// density.
	ZGuessed  bool         `json:"z_guessed,omitempty"`
	Plausible []PlausibleZ `json:"z_plausible,omitempty"`
}

// A PlausibleZ is a Z the cell can hold, with its X-ray density.
type PlausibleZ struct {
	Z          int     `json:"z"`
	AtomVolume float64 `json:"volume_per_atom"`
	Density    float64 `json:"density_xray"`
	DensityESD float64 `json:"density_xray_esd"`
	Kind       string  `json:"kind"`
	Typical    bool    `json:"typical"`
	Likeliest  bool    `json:"most_plausible"`
}

// A ZCandidate is an allowed Z with its distance from the estimate.
type ZCandidate struct {
	Z      int     `json:"z"`
	Sigmas float64 `json:"delta_sigmas"`
}

// AtomicWeights names the table of atomic weights the contents use.
const AtomicWeights = "IUPAC 2021 standard atomic weights (conventional values for intervals)"

// NewContents converts a contents result.
func NewContents(c *density.Contents, f density.Formula, m *density.Measured) Contents {
	j := Contents{
		Formula: f.Text, MolarMass: c.MolarMass, MolarMassESD: c.MolarMassESD, NoStandardWeight: c.NoStandardWeight,
		Volume: c.Volume, VolumeESD: c.VolumeESD, LatticePoints: c.LatticePoints, Z: c.Z, ZFromDensity: c.ZInferred,
		Density: c.Density, DensityESD: c.DensityESD,
		AtomsPerCell: c.AtomsPerCell, CellMass: c.CellMass, CellMassESD: c.CellMassESD, UnitsPerLattice: c.FormulaUnitsPerLattice,
		AvogadroConstant: density.Avogadro, AtomicWeightTable: AtomicWeights, ZGuessed: c.ZGuessed,
	}
	for _, p := range c.Plausible {
		j.Plausible = append(j.Plausible, PlausibleZ{p.Z, p.AtomVolume, p.Density, p.DensityESD, p.Kind, p.Typical, p.Likeliest})
	}
	if m != nil {
		ze, zu, w, d := c.ZEst, c.ZEstESD, c.Whole, c.Sigmas
		j.ZEst, j.ZEstESD, j.ZWhole, j.Sigmas = &ze, &zu, &w, &d
		md, me := m.Density, m.ESD
		j.Measured, j.MeasuredESD = &md, &me
		for _, k := range c.Candidates {
			j.Candidates = append(j.Candidates, ZCandidate{k.Z, finite(k.Sigmas)})
		}
	}
	return j
}

func finite(v float64) float64 {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return 0
	}
	return v
}

// NewDocument makes the JSON document of an analysis.
func NewDocument(a *analysis.Analysis) *Document {
	r := a.Settings.Resolved(a.Scan)
	doc := &Document{
		Program: Program, Version: Version, Schema: Schema, Sample: a.Settings.Sample,
		ScanInfo: NewScanInfo(a.Scan, a.Radiation), Settings: a.Settings, Resolved: &r,
		Lines: len(a.Lines), Peaks: []Peak{}, Solutions: []Solution{}, Warnings: a.Warnings,
	}
	if a.Extraction != nil && a.Extraction.Result != nil {
		doc.Profile = NewProfileInfo(a.Extraction.Result)
	}
	if a.Search != nil {
		doc.Search = NewSearchInfo(a.Search)
	}
	if a.Radiation.Doublet() {
		doc.Wavelength2, doc.Ka2Ratio = a.Radiation.Lambda2, a.Radiation.Ratio2
	}
	for _, p := range a.Peaks {
		doc.Peaks = append(doc.Peaks, NewPeak(p.Peak, p.Rejected))
	}
	for i := range a.Candidates {
		doc.Solutions = append(doc.Solutions, NewSolution(a, &a.Candidates[i]))
	}
	if c := a.ChosenCandidate(); c != nil {
		doc.Chosen = c.Rank
	}
	if pf := a.Pattern; pf != nil {
		doc.Pattern = NewPatternInfo(pf)
	}
	for _, c := range a.Candidates {
		if c.Refined != nil && c.Refined.StandardFit != nil {
			for _, rr := range c.Refined.StandardFit.Residuals {
				doc.StandardLines = append(doc.StandardLines, NewResidual(rr))
			}
			break
		}
	}
	return doc
}

// NewSolution converts a candidate cell.
func NewSolution(a *analysis.Analysis, c *analysis.Candidate) Solution {
	v, ve := c.Volume()
	lambda := a.Radiation.Lambda1
	s := c.Solution
	j := Solution{
		Rank: c.Rank, CellValues: NewCellValues(c.Cell(), c.Covariance().ESD(), v, ve), Zero: s.Zero,
		Probability: s.Probability, LogEvidence: s.LogEvidence, DemandingLines: s.Demanding, DemandingIndex: s.Index,
		M: s.M, FigureLines: s.FigureLines, FN: s.FN, FNMeanDiff: s.FNMeanDiff, FNPossible: s.FNPossible,
		Indexed: s.Indexed, Unindexed: s.Unindexed, Conditions: s.Conditions, Extinction: s.Extinction, Lines: []Line{}, Calculated: []Calc{},
		Parameters: s.Parameters, Chi2: s.ChiSquare, DOF: s.DOF, FromReduced: s.FromReduced,
	}
	if s.SecondPhase != nil {
		j.SecondPhase, j.SecondPhaseLines = cell.Format(*s.SecondPhase, cell.ESD{}), s.SecondPhaseLines
	}
	if s.Reduced.Volume() > 0 {
		j.Reduced = cell.Format(s.Reduced, cell.ESD{})
	}
	if ev := c.Evidence; ev != nil {
		j.PatternEvidence = &PatternEvidence{Rwp: 100 * ev.Rwp, Rexp: 100 * ev.Rexp, Chi2: ev.Chi2, Parameters: ev.Parameters,
			Reference: ev.Reference, Compared: ev.Compared, LogBayes: ev.LogBayes, Extra: ev.Extra, Missing: ev.Missing, Split: ev.Split, Prior: ev.Prior, Error: ev.Err}
	}
	j.CellFrom, j.CellNote = "lines", c.PolishNote
	if pf := c.Pattern; pf != nil {
		j.CellFrom, j.Pattern = "pattern", NewPatternInfo(pf)
	}
	for _, l := range s.Lines {
		jl := Line{TwoTheta: l.TwoTheta, ESD: l.ESD, Indexed: l.Indexed, HKL: l.HKL, TwoThetaCalc: l.TwoThetaCalc, Delta: l.Delta}
		if _, rr, ok := c.Line(l.TwoTheta); ok && rr != nil {
			jl.TwoThetaCalc, jl.Delta = rr.TwoThetaCalc, rr.Delta
		}
		j.Lines = append(j.Lines, jl)
	}
	for _, r := range s.Calculated {
		j.Calculated = append(j.Calculated, Calc{D: r.D, TwoTheta: c.Position(r.HKL[0], lambda), Mult: r.Mult, HKL: r.HKL})
	}
	if c.Refined != nil {
		rj := NewRefined(c.Refined)
		j.Refined = &rj
	} else if c.RefineErr != nil {
		j.RefineError = c.RefineErr.Error()
	}
	if c.Contents != nil {
		cj := NewContents(c.Contents, *a.Settings.Formula, a.Settings.Density)
		j.Contents = &cj
	} else if c.ContentsErr != nil {
		j.ContentsError = c.ContentsErr.Error()
	}
	return j
}

// lineOf is a helper for renderers: the indexed line at tt under
// candidate c, if any.
func lineOf(c *analysis.Candidate, tt float64) (indexing.IndexedLine, *refine.Residual, bool) {
	if c == nil {
		return indexing.IndexedLine{}, nil, false
	}
	return c.Line(tt)
}
