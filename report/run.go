package report

import (
	"context"
	"fmt"
	"math"
	"sort"

	"reticle/indexing"
	"reticle/peaks"
)

// A Progress callback receives the stage running ("peaks", "indexing",
// "refinement") and the fraction done of it.
type Progress func(stage string, fraction float64)

// An Extraction is a scan with its extracted peaks and the peaks the user
// added; the indexing stage starts from it, so that peak edits do not
// repeat the extraction.
type Extraction struct {
	Scan    *peaks.Scan
	Result  *peaks.Result
	Added   []peaks.Peak // user-added peaks, in the order added
	Profile []float64    // the extraction's profile with the added peaks
}

// Extract runs the peak extraction of a scan with the settings, and fits
// the peaks the settings add.
func Extract(ctx context.Context, scan *peaks.Scan, s Settings, progress Progress) (*Extraction, error) {
	s, o, progress, err := prepare(scan, s, progress)
	if err != nil {
		return nil, err
	}
	pr, err := peaks.Extract(ctx, scan, o.peaks, func(done, total int) { progress("peaks", frac(done, total)) })
	if err != nil {
		return nil, fmt.Errorf("%s: %w", scan.Path, err)
	}
	e := &Extraction{Scan: scan, Result: pr, Profile: pr.Profile}
	for _, tt := range s.Added {
		if _, err := e.Add(tt); err != nil {
			return nil, fmt.Errorf("%s: added peak: %w", scan.Path, err)
		}
	}
	return e, nil
}

// Add fits a peak near tt (degrees 2θ) on top of the current profile
// (peaks.FitAt) and keeps it.
func (e *Extraction) Add(tt float64) (peaks.Peak, error) {
	r := *e.Result
	r.Profile = e.Profile
	p, prof, err := peaks.FitAt(e.Scan, &r, tt)
	if err != nil {
		return p, err
	}
	e.Added = append(e.Added, p)
	e.Profile = prof
	return p, nil
}

// Peaks returns the extracted and the added peaks, sorted by 2θ; added
// peaks carry peaks.FlagUser and no companion link.
func (e *Extraction) Peaks() []peaks.Peak {
	out := append([]peaks.Peak(nil), e.Result.Peaks...)
	if len(e.Added) == 0 {
		return out
	}
	// Companion links are indices into the extracted list: keep them
	// pointing at the same peaks after sorting.
	type item struct {
		p    peaks.Peak
		orig int
	}
	items := make([]item, 0, len(out)+len(e.Added))
	for i, p := range out {
		items = append(items, item{p, i})
	}
	for _, p := range e.Added {
		p.Parent = -1
		items = append(items, item{p, -1})
	}
	sort.SliceStable(items, func(a, b int) bool { return items[a].p.TwoTheta < items[b].p.TwoTheta })
	where := map[int]int{}
	for i, it := range items {
		if it.orig >= 0 {
			where[it.orig] = i
		}
	}
	res := make([]peaks.Peak, len(items))
	for i, it := range items {
		res[i] = it.p
		if it.p.Parent >= 0 && it.orig >= 0 {
			res[i].Parent = where[it.p.Parent]
		}
	}
	return res
}

// Run analyses a scan with the settings: Extract, then Analyse.
func Run(ctx context.Context, scan *peaks.Scan, s Settings, progress Progress) (*Document, error) {
	e, err := Extract(ctx, scan, s, progress)
	if err != nil {
		return nil, err
	}
	return Analyse(ctx, e, s, progress)
}

// Analyse indexes the non-companion peaks of an extraction that are not
// rejected, refines every candidate cell against its indexed lines and,
// with a formula, works out the cells' contents (cells whose measured
// density gives no whole Z rank last). The context cancels the work.
func Analyse(ctx context.Context, e *Extraction, s Settings, progress Progress) (*Document, error) {
	scan, pr := e.Scan, e.Result
	s, o, progress, err := prepare(scan, s, progress)
	if err != nil {
		return nil, err
	}
	doc := &Document{
		Program: Program, Version: Version, Schema: Schema, Sample: s.Sample,
		ScanInfo: NewScanInfo(scan, pr.Radiation), Settings: s,
		Peaks: []Peak{}, Solutions: []Solution{}, Warnings: append(append([]string(nil), scan.Warnings...), pr.Warnings...),
		Pattern: &Pattern{TwoTheta: scan.TwoTheta, Intensity: scan.Intensity, Background: pr.Background, Profile: e.Profile},
	}
	if pr.Radiation.Doublet() {
		doc.Wavelength2, doc.Ka2Ratio = pr.Radiation.Lambda2, pr.Radiation.Ratio2
	}
	var lines []indexing.Line
	for _, p := range e.Peaks() {
		j := NewPeak(p)
		j.Rejected = within(p.TwoTheta, s.Rejected)
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
		RefineSolution(ctx, &j, sol, o.refine, s.Excluded)
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

// prepare resolves the settings into each stage's options and gives a
// progress callback that may be called.
func prepare(scan *peaks.Scan, s Settings, progress Progress) (Settings, options, Progress, error) {
	s, err := s.Resolve()
	if err != nil {
		return s, options{}, nil, fmt.Errorf("%s: settings: %w", scan.Path, err)
	}
	o, err := s.options()
	if err != nil {
		return s, o, nil, fmt.Errorf("%s: settings: %w", scan.Path, err)
	}
	if progress == nil {
		progress = func(string, float64) {}
	}
	return s, o, progress, nil
}

// within reports whether tt lies within 0.005° of an angle in list (the
// user's rejected peaks or excluded lines).
func within(tt float64, list []float64) bool {
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
