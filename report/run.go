package report

import (
	"context"
	"fmt"
	"math"

	"reticle/indexing"
	"reticle/peaks"
)

// A Progress callback receives the stage running ("peaks", "indexing",
// "refinement") and the fraction done of it.
type Progress func(stage string, fraction float64)

// Run analyses a scan with the settings: peak extraction, indexing of the
// non-companion peaks that are not rejected, refinement of every
// candidate cell against its indexed lines and, with a formula, the cells'
// contents (cells whose measured density gives no whole Z rank last). The
// context cancels the work.
func Run(ctx context.Context, scan *peaks.Scan, s Settings, progress Progress) (*Document, error) {
	s, err := s.Resolve()
	if err != nil {
		return nil, fmt.Errorf("%s: settings: %w", scan.Path, err)
	}
	o, err := s.options()
	if err != nil {
		return nil, fmt.Errorf("%s: settings: %w", scan.Path, err)
	}
	if progress == nil {
		progress = func(string, float64) {}
	}
	pr, err := peaks.Extract(ctx, scan, o.peaks, func(done, total int) { progress("peaks", frac(done, total)) })
	if err != nil {
		return nil, fmt.Errorf("%s: %w", scan.Path, err)
	}
	doc := &Document{
		Program: Program, Version: Version, Schema: Schema, Sample: s.Sample,
		ScanInfo: NewScanInfo(scan, pr.Radiation), Settings: s,
		Peaks: []Peak{}, Solutions: []Solution{}, Warnings: append(append([]string(nil), scan.Warnings...), pr.Warnings...),
		Pattern: &Pattern{TwoTheta: scan.TwoTheta, Intensity: scan.Intensity, Background: pr.Background, Profile: pr.Profile},
	}
	if pr.Radiation.Doublet() {
		doc.Wavelength2, doc.Ka2Ratio = pr.Radiation.Lambda2, pr.Radiation.Ratio2
	}
	var lines []indexing.Line
	for _, p := range pr.Peaks {
		j := NewPeak(p)
		j.Rejected = rejected(p.TwoTheta, s.Rejected)
		doc.Peaks = append(doc.Peaks, j)
		if !p.Companion() && !j.Rejected {
			lines = append(lines, indexing.Line{TwoTheta: p.TwoTheta, ESD: p.TwoThetaESD})
		}
	}
	doc.Lines = len(lines)
	if len(lines) == 0 {
		doc.Warnings = append(doc.Warnings, "no lines to index")
		return doc, nil
	}
	o.indexing.Wavelength = pr.Radiation.Lambda1
	res, err := indexing.Index(ctx, lines, o.indexing, func(done, total int) { progress("indexing", frac(done, total)) })
	if err != nil {
		return nil, fmt.Errorf("%s: %w", scan.Path, err)
	}
	o.refine.Wavelength = res.Wavelength
	for i, sol := range res.Solutions {
		progress("refinement", float64(i)/float64(len(res.Solutions)))
		j := NewSolution(i+1, sol, res.Wavelength)
		RefineSolution(ctx, &j, sol, o.refine)
		if o.formula != nil {
			AddContents(&j, *o.formula, o.measured, s.Z)
		}
		doc.Solutions = append(doc.Solutions, j)
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	if o.measured != nil {
		DemoteFractionalZ(doc.Solutions)
	}
	progress("refinement", 1)
	return doc, nil
}

// rejected reports whether the peak at tt is among the rejected angles
// (within 0.005°).
func rejected(tt float64, list []float64) bool {
	for _, r := range list {
		if math.Abs(r-tt) <= 0.005 {
			return true
		}
	}
	return false
}

func frac(done, total int) float64 {
	if total <= 0 {
		return 0
	}
	return float64(done) / float64(total)
}
