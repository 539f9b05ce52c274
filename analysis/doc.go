// Package analysis runs the analysis of a powder scan, stage after stage:
//
//	scan ──peaks──▶ peaks and lines ──indexing──▶ candidate cells ──refine──▶ refined cells ──density──▶ contents
//
// It is the one place where the stages meet. The desktop program, every
// `reticle` command and the report all call it and only it; they render
// its typed result and never call a stage themselves.
//
// # Settings
//
// Settings hold every choice a user makes, as typed values whose zero
// value means "the stage's default": each stage owns its defaults
// (peaks.DefaultThreshold, refine.DefaultRadius, ...), and Resolved
// fills them in from there for the record. Settings also hold the user's
// edits: peaks rejected and added, lines excluded from the refinement.
// An edit names a peak by its position; positions within EditTolerance
// of each other name the same peak.
//
// # Re-running after an edit
//
// Run reads nothing: it takes a scan. Extract does the costly peak
// extraction once; Analyse runs the stages after it, so that an edit of
// the peaks kept, the corrections or the formula re-runs only those.
// An added peak is fitted on top of the extraction (Extraction.Add).
package analysis
