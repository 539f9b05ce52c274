package analysis

// A Stage is a step of the analysis that reports progress.
type Stage int

// The stages, in order.
const (
	StageExtraction Stage = iota + 1 // finding and fitting peaks
	StageIndexing                    // searching for cells
	StageRefinement                  // refining the candidate cells
	StagePattern                     // fitting the whole pattern, a step of its own
)

func (s Stage) String() string {
	switch s {
	case StageExtraction:
		return "peaks"
	case StageIndexing:
		return "cells"
	case StageRefinement:
		return "refinement"
	case StagePattern:
		return "whole-pattern fit"
	}
	return "stage?"
}

// Progress receives the stage running and how much of it is done (done
// of total units); it may be nil. It is the one progress type of every
// stage: each stage's own callback, func(done, total int), is adapted to
// it.
type Progress func(stage Stage, done, total int)

// of adapts p to a stage's callback; nil stays nil.
func (p Progress) of(s Stage) func(done, total int) {
	if p == nil {
		return nil
	}
	return func(done, total int) { p(s, done, total) }
}

// Fraction returns the share of the whole analysis done when stage s has
// done done of total units, weighting the stages by their usual cost (a
// whole-pattern fit, run on its own, is the whole).
func Fraction(s Stage, done, total int) float64 {
	f := 0.0
	if total > 0 {
		f = float64(done) / float64(total)
	}
	switch s {
	case StageExtraction:
		return 0.3 * f
	case StageIndexing:
		return 0.3 + 0.6*f
	case StagePattern:
		return f
	}
	return 0.9 + 0.1*f
}
