package analysis

import (
	"context"
	"fmt"
	"sort"

	"reticle/peaks"
	"reticle/scanfile"
)

// An Extraction is a scan with its extracted peaks and the peaks the user
// added; the stages after it start from it, so that edits do not repeat
// the extraction. It is not safe for concurrent use; Clone gives a copy
// that another goroutine may read.
type Extraction struct {
	Scan    *scanfile.Scan
	Result  *peaks.Result
	Added   []peaks.Peak // user-added peaks, in the order added
	Profile []float64    // the extraction's profile with the added peaks
}

// Extract runs the peak extraction of a scan with the settings, and fits
// the peaks they add.
func Extract(ctx context.Context, scan *scanfile.Scan, s Settings, progress Progress) (*Extraction, error) {
	if err := s.Check(); err != nil {
		return nil, fmt.Errorf("%s: settings: %w", scan.Path, err)
	}
	pr, err := peaks.Extract(ctx, scan, s.peakOptions(), progress.of(StageExtraction))
	if err != nil {
		return nil, fmt.Errorf("%s: %w", scan.Path, err)
	}
	e := &Extraction{Scan: scan, Result: pr, Profile: pr.Profile}
	for _, tt := range s.Added {
		if _, err := e.Add(tt); err != nil {
			return nil, fmt.Errorf("%s: added peak near %.4f°: %w", scan.Path, tt, err)
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

// Refit drops the added peaks and fits those at the positions given, in
// order (after an undo).
func (e *Extraction) Refit(added []float64) error {
	e.Added, e.Profile = nil, e.Result.Profile
	for _, tt := range added {
		if _, err := e.Add(tt); err != nil {
			return err
		}
	}
	return nil
}

// Clone returns a copy whose list of added peaks may grow without
// touching e's.
func (e *Extraction) Clone() *Extraction {
	c := *e
	c.Added = append([]peaks.Peak(nil), e.Added...)
	return &c
}

// peaks returns the extracted and the added peaks, sorted by 2θ; added
// peaks carry peaks.FlagUser and no companion link, and companion links
// point into the sorted list.
func (e *Extraction) peaks() []peaks.Peak {
	out := append([]peaks.Peak(nil), e.Result.Peaks...)
	if len(e.Added) == 0 {
		return out
	}
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

// ReadExtract reads a scan file and extracts its peaks.
func ReadExtract(ctx context.Context, path string, s Settings, progress Progress) (*Extraction, error) {
	scan, err := Read(path, s)
	if err != nil {
		return nil, err
	}
	return Extract(ctx, scan, s, progress)
}
