package report

import (
	"context"
	"math"
	"sort"

	"reticle/density"
	"reticle/indexing"
	"reticle/peaks"
	"reticle/refine"
)

// NewPeak converts an extracted peak.
func NewPeak(p peaks.Peak) Peak {
	j := Peak{
		TwoTheta: p.TwoTheta, TwoThetaESD: p.TwoThetaESD, D: p.D, DESD: p.DESD,
		Height: p.Height, HeightESD: p.HeightESD, Area: p.Area, AreaESD: p.AreaESD,
		FWHM: p.FWHM, FWHMESD: p.FWHMESD, Eta: p.Eta, Background: p.Background, SNR: p.SNR,
		Flags: p.Flags.String(),
	}
	if p.Parent >= 0 {
		parent := p.Parent
		j.CompanionOf = &parent
	}
	return j
}

// HKLs converts Miller indices.
func HKLs(v []indexing.HKL) [][3]int {
	out := make([][3]int, len(v))
	for i, h := range v {
		out[i] = h
	}
	return out
}

// NewSolution converts an indexing solution (before refinement).
func NewSolution(rank int, s indexing.Solution, lambda float64) Solution {
	j := Solution{
		Rank: rank, CellValues: NewCellValues(s.Cell, s.Volume, s.Zero), M: s.M, N: s.N, FN: s.FN, FNMeanDiff: s.FNMeanDiff, FNPossible: s.FNPossible,
		Indexed: s.Indexed, Unindexed: s.Unindexed, Conditions: s.Conditions,
		Lines: []Line{}, Calculated: []Calc{},
	}
	for _, l := range s.Lines {
		j.Lines = append(j.Lines, Line{TwoTheta: l.TwoTheta, ESD: l.ESD, Indexed: l.Indexed, HKL: HKLs(l.HKL), TwoThetaCalc: l.TwoThetaCalc, Delta: l.Delta})
	}
	for _, r := range s.Calculated {
		j.Calculated = append(j.Calculated, Calc{D: r.D, TwoTheta: peaks.TwoTheta(r.D, lambda) + s.Zero, Mult: r.Mult, HKL: HKLs(r.HKL)})
	}
	return j
}

// Cell returns the cell of the values.
func (s *CellValues) Cell() indexing.Cell {
	sys, _ := indexing.ParseSystem(s.System)
	cen := indexing.P
	if s.Centring != "" {
		cen = indexing.Centring(s.Centring[0])
	}
	return indexing.Cell{System: sys, Centring: cen, A: s.A, B: s.B, C: s.C, Alpha: s.Alpha, Beta: s.Beta, Gamma: s.Gamma}
}

// RefineSolution refines a solution's cell against its indexed lines,
// leaving out those within 0.005° of an angle in excluded, and puts the
// refined cell, corrections and residuals into j.
func RefineSolution(ctx context.Context, j *Solution, sol indexing.Solution, opt refine.Options, excluded []float64) {
	var obs []refine.Observation
	var at []int
	for i, l := range sol.Lines {
		if l.Indexed && l.ESD > 0 {
			obs = append(obs, refine.Observation{TwoTheta: l.TwoTheta, ESD: l.ESD, HKL: l.HKL, Excluded: within(l.TwoTheta, excluded)})
			at = append(at, i)
		}
	}
	r, err := refine.Refine(ctx, sol.Cell, obs, opt)
	if err != nil {
		j.RefineError = err.Error()
		return
	}
	c := r.Cell
	j.A, j.B, j.C, j.Volume, j.Zero = c.A, c.B, c.C, r.Volume, r.Zero
	for k, rr := range r.Residuals {
		j.Lines[at[k]].TwoThetaCalc = rr.TwoThetaCalc
		j.Lines[at[k]].Delta = rr.Delta
	}
	for k, cl := range sol.Calculated {
		if tt := r.Position(cl.HKL[0]); !math.IsNaN(tt) {
			j.Calculated[k].TwoTheta = tt
		}
	}
	rj := NewRefined(r)
	j.Refined = &rj
}

// NewRefined converts a refinement result.
func NewRefined(r *refine.Result) Refined {
	j := Refined{
		AESD: r.CellESD.A, BESD: r.CellESD.B, CESD: r.CellESD.C, VolumeESD: r.VolumeESD, ZeroESD: r.ZeroESD,
		Radius: r.Radius, Chi2Reduced: r.Chi2Reduced, Fitted: r.N, DOF: r.DOF, Scaled: r.Scaled, Scaling: r.Scaling.String(),
		Correlation: r.Correlation, Flagged: r.Flagged, Warnings: r.Warnings,
		Params: []Param{}, Residuals: []Residual{},
	}
	if r.DisplacementRefined {
		d, e := r.Displacement, r.DisplacementESD
		j.Displacement, j.DisplacementESD = &d, &e
	}
	for _, p := range r.Params {
		j.Params = append(j.Params, Param{Name: p.Name, Value: p.Value, ESD: p.ESD, Unit: p.Unit, Text: peaks.FormatESD(p.Value, p.ESD), FromStandard: p.Fixed})
		j.ParamNames = append(j.ParamNames, p.Name)
	}
	for _, rr := range r.Residuals {
		j.Residuals = append(j.Residuals, NewResidual(rr))
	}
	return j
}

// NewResidual converts one residual.
func NewResidual(rr refine.Residual) Residual {
	return Residual{HKL: HKLs(rr.HKL), TwoTheta: rr.TwoTheta, ESD: rr.ESD, TwoThetaCalc: rr.TwoThetaCalc,
		Delta: rr.Delta, Norm: finite(rr.Norm), Flagged: rr.Flagged, Excluded: rr.Excluded}
}

func finite(v float64) float64 {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return 0
	}
	return v
}

// NewContents converts a contents result.
func NewContents(c *density.Contents, f density.Formula, m *density.Measured) Contents {
	j := Contents{
		Formula: f.Text, MolarMass: c.MolarMass, MolarMassESD: c.MolarMassESD, NoStandardWeight: c.NoStandardWeight,
		Volume: c.Volume, VolumeESD: c.VolumeESD, LatticePoints: c.LatticePoints, Z: c.Z, ZFromDensity: c.ZInferred,
		Density: c.Density, DensityESD: c.DensityESD, DensityText: peaks.FormatESD(c.Density, c.DensityESD),
		AtomsPerCell: c.AtomsPerCell, CellMass: c.CellMass, UnitsPerLattice: c.FormulaUnitsPerLattice,
		AvogadroConstant: density.Avogadro, AtomicWeightTable: "IUPAC 2021 standard atomic weights (conventional values for intervals)",
	}
	if m != nil {
		ze, zu, w, d := c.ZEst, c.ZEstESD, c.Whole, c.Discrepancy
		j.ZEst, j.ZEstESD, j.ZWhole, j.Discrepancy = &ze, &zu, &w, &d
		md, me := m.Density, m.ESD
		j.Measured, j.MeasuredESD = &md, &me
		for _, k := range c.Candidates {
			j.Candidates = append(j.Candidates, ZCandidate{k.Z, finite(k.Sigma)})
		}
	}
	return j
}

// AddContents works out a solution's cell contents; it leaves Contents
// nil when they cannot be computed.
func AddContents(j *Solution, f density.Formula, measured *density.Measured, z int) {
	var vesd float64
	if j.Refined != nil {
		vesd = j.VolumeESD
	}
	c, err := density.Compute(density.Input{Cell: j.Cell(), VolumeESD: vesd, Formula: f, Z: z, Measured: measured})
	if err != nil {
		return
	}
	cj := NewContents(c, f, measured)
	j.Contents = &cj
}

// DemoteFractionalZ moves solutions whose measured density gives no whole
// Z below those that do, keeping the order within each group, and
// renumbers the ranks: a Z far from every allowed value is evidence
// against a cell.
func DemoteFractionalZ(sols []Solution) {
	sort.SliceStable(sols, func(a, b int) bool {
		return wholeZ(sols[a]) && !wholeZ(sols[b])
	})
	for i := range sols {
		sols[i].Rank = i + 1
	}
}

func wholeZ(s Solution) bool {
	return s.Contents == nil || s.Contents.ZWhole == nil || *s.Contents.ZWhole
}
