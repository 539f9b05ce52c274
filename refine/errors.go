package refine

import "errors"

// Errors a refinement reports; they are wrapped with the details.
var (
	// ErrTooFew: fewer fitted lines than refined parameters.
	ErrTooFew = errors.New("fewer lines than parameters")
	// ErrBadESD: a line without a positive, finite esd.
	ErrBadESD = errors.New("line esd must be positive and finite")
	// ErrUnreachable: a line's hkl lies beyond 2θ = 180° for the cell.
	ErrUnreachable = errors.New("reflection beyond 180° 2θ")
	// ErrSingular: the lines do not determine the parameters (for
	// example a zero shift and a displacement from lines at one angle).
	ErrSingular = errors.New("parameters not determined by the lines")
	// ErrCell: a starting cell that is not usable.
	ErrCell = errors.New("unusable cell")
	// ErrOptions: inconsistent options.
	ErrOptions = errors.New("inconsistent options")
)
