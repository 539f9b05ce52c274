package scanfile

import (
	"errors"
	"fmt"
	"strings"
)

// Sentinel errors that a *ParseError may wrap; test with errors.Is.
var (
	ErrEmpty       = errors.New("file holds no data: no line with two or three numbers (2θ in degrees, counts, optional esd) was found")
	ErrBinary      = errors.New("binary file, not a text export: Reticle reads plain-text columns (2θ, intensity, optional esd) and pdCIF; export the scan in one of those from the instrument's software")
	ErrColumns     = errors.New("expected 2 or 3 numeric columns (2θ in degrees, intensity, optional esd)")
	ErrText        = errors.New("text where the data block expects numbers")
	ErrNotFinite   = errors.New("value is NaN or infinite")
	ErrRepeated    = errors.New("angle repeats an earlier point")
	ErrTooFew      = errors.New("too few data points")
	ErrBadESD      = errors.New("esd must not be negative")
	ErrCIF         = errors.New("malformed CIF")
	ErrCIFMissing  = errors.New("CIF lacks a required item")
	ErrOutOfRange  = errors.New("angle outside 0 to 180 degrees 2θ")
	ErrUnknownLine = errors.New("unknown radiation")
	ErrNotAngle    = errors.New("not an angle-dispersive pattern")
	ErrVendor      = errors.New("not an open export")
)

// A ParseError reports a problem at a place in a scan file. Line and Column
// are 1-based; zero means the position is not known (for example a problem
// with the file as a whole).
type ParseError struct {
	File   string // path as given by the caller
	Line   int    // 1-based line number, 0 when not tied to a line
	Column int    // 1-based column (field) number, 0 when not known
	Text   string // the offending text, shortened, may be empty
	Err    error  // the cause, often one of the sentinel errors
}

func (e *ParseError) Error() string {
	var b strings.Builder
	b.WriteString(e.File)
	if e.Line > 0 {
		fmt.Fprintf(&b, ":%d", e.Line)
	}
	if e.Column > 0 {
		fmt.Fprintf(&b, ": column %d", e.Column)
	}
	b.WriteString(": ")
	b.WriteString(e.Err.Error())
	if e.Text != "" {
		fmt.Fprintf(&b, ", found %q", shorten(e.Text, 40))
	}
	return b.String()
}

// Unwrap returns the cause.
func (e *ParseError) Unwrap() error { return e.Err }

// ErrorList collects the problems of one file so that a reader can report
// every bad line at once. The zero value is an empty list.
type ErrorList []*ParseError

// Add appends a problem.
func (l *ErrorList) Add(e *ParseError) { *l = append(*l, e) }

// Error prints the first problem and how many more there are.
func (l ErrorList) Error() string {
	switch len(l) {
	case 0:
		return "no errors"
	case 1:
		return l[0].Error()
	}
	return fmt.Sprintf("%s (and %d more errors)", l[0], len(l)-1)
}

// Unwrap returns the individual problems so that errors.Is and errors.As see
// each of them.
func (l ErrorList) Unwrap() []error {
	out := make([]error, len(l))
	for i, e := range l {
		out[i] = e
	}
	return out
}

// Err returns nil for an empty list and the list otherwise.
func (l ErrorList) Err() error {
	if len(l) == 0 {
		return nil
	}
	return l
}

func shorten(s string, n int) string {
	r := []rune(s)
	if len(r) <= n {
		return s
	}
	return string(r[:n]) + "…"
}
