package main

import (
	"math"

	"reticle/peaks"
	"reticle/refine"
)

// paramJSON is one refined parameter.
type paramJSON struct {
	Name  string  `json:"name"`
	Value float64 `json:"value"`
	ESD   float64 `json:"esd"`
	Unit  string  `json:"unit"`
	Text  string  `json:"text"` // crystallographic notation, e.g. 5.64021(7)
	// FromStandard marks corrections fixed by the internal standard.
	FromStandard bool `json:"from_standard,omitempty"`
}

// residualJSON is one line after the refinement.
type residualJSON struct {
	HKL          [][3]int `json:"hkl"`
	TwoTheta     float64  `json:"two_theta_obs"`
	ESD          float64  `json:"esd"`
	TwoThetaCalc float64  `json:"two_theta_calc"`
	Delta        float64  `json:"delta"`
	Norm         float64  `json:"delta_over_esd"`
	Flagged      bool     `json:"flagged"`
	Excluded     bool     `json:"excluded"`
}

// RefinedJSON is the refinement's part of a solution or of the refine
// document; its fields sit beside the cell's.
type RefinedJSON struct {
	AESD            float64        `json:"a_esd"`
	BESD            float64        `json:"b_esd"`
	CESD            float64        `json:"c_esd"`
	VolumeESD       float64        `json:"volume_esd"`
	ZeroESD         float64        `json:"zero_shift_esd"`
	Displacement    *float64       `json:"displacement_mm,omitempty"`
	DisplacementESD *float64       `json:"displacement_mm_esd,omitempty"`
	Radius          float64        `json:"goniometer_radius_mm"`
	Chi2Reduced     float64        `json:"chi2_reduced"`
	DOF             int            `json:"degrees_of_freedom"`
	Scaled          bool           `json:"esd_scaled_by_chi2"`
	Scaling         string         `json:"esd_scaling"`
	Params          []paramJSON    `json:"parameters"`
	ParamNames      []string       `json:"correlation_order"`
	Correlation     [][]float64    `json:"correlation"`
	Residuals       []residualJSON `json:"residuals"`
	Flagged         int            `json:"flagged"`
	Warnings        []string       `json:"refine_warnings,omitempty"`
}

func toRefinedJSON(r *refine.Result) RefinedJSON {
	j := RefinedJSON{
		AESD: r.CellESD.A, BESD: r.CellESD.B, CESD: r.CellESD.C, VolumeESD: r.VolumeESD, ZeroESD: r.ZeroESD,
		Radius: r.Radius, Chi2Reduced: r.Chi2Reduced, DOF: r.DOF, Scaled: r.Scaled, Scaling: r.Scaling.String(),
		Correlation: r.Correlation, Flagged: r.Flagged, Warnings: r.Warnings,
		Params: []paramJSON{}, Residuals: []residualJSON{},
	}
	if r.DisplacementRefined {
		d, e := r.Displacement, r.DisplacementESD
		j.Displacement, j.DisplacementESD = &d, &e
	}
	for _, p := range r.Params {
		j.Params = append(j.Params, paramJSON{Name: p.Name, Value: p.Value, ESD: p.ESD, Unit: p.Unit, Text: peaks.FormatESD(p.Value, p.ESD), FromStandard: p.Fixed})
		j.ParamNames = append(j.ParamNames, p.Name)
	}
	for _, rr := range r.Residuals {
		j.Residuals = append(j.Residuals, toResidualJSON(rr))
	}
	return j
}

func toResidualJSON(rr refine.Residual) residualJSON {
	return residualJSON{HKL: hkls(rr.HKL), TwoTheta: rr.TwoTheta, ESD: rr.ESD, TwoThetaCalc: rr.TwoThetaCalc,
		Delta: rr.Delta, Norm: finite(rr.Norm), Flagged: rr.Flagged, Excluded: rr.Excluded}
}

func finite(v float64) float64 {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return 0
	}
	return v
}
