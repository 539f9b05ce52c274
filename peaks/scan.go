package peaks

import (
	"fmt"
	"math"
	"sort"
	"strconv"
)

// MinPoints is the fewest points a scan may have; fewer cannot hold a
// background and a peak.
const MinPoints = 20

// A MetaItem is one header or metadata line kept from a scan file.
type MetaItem struct {
	Line  int    // 1-based line number in the file
	Key   string // key of a "key: value", "key = value" or "key<TAB>value" line; empty for free text
	Value string // the value, or the whole line for free text
}

// A Scan is one measured powder pattern.
type Scan struct {
	Path   string // file path as given to the reader
	SHA256 string // hex SHA-256 of the file's bytes
	Format string // "text" or "pdcif"

	TwoTheta  []float64 // degrees 2θ, strictly increasing
	Intensity []float64 // counts
	ESD       []float64 // estimated standard deviation of Intensity; nil when the file has none

	// Wavelength is the wavelength in Å stated in the file, 0 when none.
	Wavelength float64
	// Anode is the tube target named in the file ("Cu"), empty when none.
	Anode    string
	Meta     []MetaItem // header lines in file order
	Warnings []string   // problems that did not stop the read (sorted angles, negative counts, ...)
}

// Len returns the number of points.
func (s *Scan) Len() int { return len(s.TwoTheta) }

// Range returns the first and last angle in degrees 2θ.
func (s *Scan) Range() (min, max float64) {
	if len(s.TwoTheta) == 0 {
		return 0, 0
	}
	return s.TwoTheta[0], s.TwoTheta[len(s.TwoTheta)-1]
}

// Step returns the median spacing of the angles in degrees 2θ.
func (s *Scan) Step() float64 {
	n := len(s.TwoTheta)
	if n < 2 {
		return 0
	}
	d := make([]float64, n-1)
	for i := 1; i < n; i++ {
		d[i-1] = s.TwoTheta[i] - s.TwoTheta[i-1]
	}
	sort.Float64s(d)
	return d[len(d)/2]
}

// Sigma returns the standard deviation of point i: the esd column when
// present, otherwise the counting noise √max(I, 1).
func (s *Scan) Sigma(i int) float64 {
	if s.ESD != nil {
		return s.ESD[i]
	}
	return math.Sqrt(math.Max(s.Intensity[i], 1))
}

// point is one row with its source line, used while reading.
type point struct {
	x, y, e float64
	line    int
}

// finish sorts, checks and stores the points; file names the source in
// errors.
func (s *Scan) finish(file string, pts []point, hasESD bool) error {
	if len(pts) == 0 {
		return &ParseError{File: file, Err: ErrEmpty}
	}
	sorted := sort.SliceIsSorted(pts, func(i, j int) bool { return pts[i].x < pts[j].x })
	if !sorted {
		sort.SliceStable(pts, func(i, j int) bool { return pts[i].x < pts[j].x })
		s.Warnings = append(s.Warnings, "angles were not in increasing order; the points were sorted")
	}
	var errs ErrorList
	neg := 0
	for i, p := range pts {
		if p.x < 0 || p.x >= 180 {
			errs.Add(&ParseError{File: file, Line: p.line, Column: 1, Text: fmt.Sprint(p.x), Err: ErrOutOfRange})
		}
		if i > 0 && p.x == pts[i-1].x {
			errs.Add(&ParseError{File: file, Line: p.line, Column: 1, Text: fmt.Sprint(p.x),
				Err: fmt.Errorf("%w (line %d)", ErrRepeated, pts[i-1].line)})
		}
		if p.y < 0 {
			neg++
		}
		if len(errs) >= 20 {
			break
		}
	}
	if err := errs.Err(); err != nil {
		return err
	}
	if len(pts) < MinPoints {
		return &ParseError{File: file, Err: fmt.Errorf("%w: %d, need at least %d", ErrTooFew, len(pts), MinPoints)}
	}
	if neg > 0 {
		s.Warnings = append(s.Warnings, fmt.Sprintf("%d points have negative intensity; they were kept", neg))
	}
	s.TwoTheta = make([]float64, len(pts))
	s.Intensity = make([]float64, len(pts))
	if hasESD {
		s.ESD = make([]float64, len(pts))
	}
	zero := 0
	for i, p := range pts {
		s.TwoTheta[i], s.Intensity[i] = p.x, p.y
		if hasESD {
			e := p.e
			if e == 0 {
				// A zero esd (often √0 for an empty channel) would give the
				// point infinite weight; use the one-count floor instead.
				e = 1
				zero++
			}
			s.ESD[i] = e
		}
	}
	if zero > 0 {
		s.Warnings = append(s.Warnings, fmt.Sprintf("%d points have a zero esd; 1 count was used instead", zero))
	}
	return nil
}

func ftoa(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// Radiation returns the radiation the scan states: its wavelength as a
// single line, else the K-alpha doublet of the anode it names, else the
// Cu K-alpha doublet (the commonest laboratory source).
func (s *Scan) Radiation() Radiation {
	if s.Wavelength > 0 {
		return SingleLine(s.Wavelength)
	}
	if a, ok := LookupAnode(s.Anode); ok {
		return AnodeRadiation(a)
	}
	a, _ := LookupAnode("Cu")
	return AnodeRadiation(a)
}
