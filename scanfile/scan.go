package scanfile

import (
	"fmt"
	"math"
	"sort"
	"strconv"

	"reticle/internal/order"
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

	// Wavelength is the wavelength in Å stated in the file, 0 when none;
	// Wavelength2 and Ratio2 the second line of a doublet the file
	// states (a CIF's looped wavelengths with their weights).
	Wavelength, Wavelength2, Ratio2 float64
	// Anode is the tube target named in the file ("Cu"), empty when none.
	Anode string
	// Probe is the radiation the file names (a CIF's
	// _diffrn_radiation_probe: "x-ray", "neutron", "electron"); empty
	// when it names none.
	Probe string
	// KAlpha1Only is set when the file says the incident beam was
	// K-alpha1 alone (a primary monochromator); NoKBeta when it says a
	// monochromator removed K-beta.
	KAlpha1Only, NoKBeta bool
	// Block is the CIF data block read; Blocks every block of the file
	// that holds a pattern.
	Block    string
	Blocks   []string
	Meta     []MetaItem // header lines in file order
	Warnings []string   // notes on the read: problems that did not stop it (sorted angles, negative counts, ...) and choices made
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
	return order.Nth(d, len(d)/2)
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

// Radiation returns the radiation the scan states:
//   - a neutron or electron probe (a CIF's _diffrn_radiation_probe) of a
//     stated wavelength: that single line;
//   - a doublet the file lists (two wavelengths with their weights);
//   - a stated wavelength equal (to 1e-4 Å) to an anode's K-alpha1 or to
//     its weighted K-alpha mean (2λ₁ + λ₂)/3, when the file does not say
//     K-alpha1 alone: that anode's doublet, the wavelength being the
//     doublet's label rather than a single line (common practice);
//   - any other stated wavelength as a single line;
//   - else the K-alpha doublet of the anode the file names, else the Cu
//     doublet (the commonest laboratory source).
//
// A file that says a monochromator removed K-beta gives no K-beta line.
func (s *Scan) Radiation() Radiation {
	r := s.radiation()
	if s.NoKBeta || s.KAlpha1Only {
		r.KBeta, r.Edge = 0, 0
	}
	return r
}

func (s *Scan) radiation() Radiation {
	if s.Wavelength > 0 && s.Probe != "" && s.Probe != "x-ray" {
		r := SingleLine(s.Wavelength)
		r.Name = fmt.Sprintf("%s Å (%s)", ftoa(s.Wavelength), s.Probe)
		return r
	}
	if s.Wavelength > 0 && s.Wavelength2 > 0 {
		r := Radiation{Name: fmt.Sprintf("%s Å / %s Å", ftoa(s.Wavelength), ftoa(s.Wavelength2)), Lambda1: s.Wavelength, Lambda2: s.Wavelength2, Ratio2: s.Ratio2}
		if r.Ratio2 <= 0 {
			r.Ratio2 = DefaultKAlpha2Ratio
		}
		for _, a := range Anodes {
			if math.Abs(a.KAlpha1-s.Wavelength) < 1e-4 {
				r.KBeta, r.Edge = a.KBeta, a.FilterEdge
			}
		}
		return r
	}
	if s.Wavelength > 0 {
		for _, a := range Anodes {
			mean := (2*a.KAlpha1 + a.KAlpha2) / 3
			if math.Abs(a.KAlpha1-s.Wavelength) < 1e-4 || math.Abs(mean-s.Wavelength) < 1e-4 {
				if s.KAlpha1Only {
					r := SingleLine(a.KAlpha1)
					r.Name = a.Symbol + " K-alpha1"
					return r
				}
				return AnodeRadiation(a)
			}
		}
		return SingleLine(s.Wavelength)
	}
	if a, ok := LookupAnode(s.Anode); ok {
		if s.KAlpha1Only {
			r := SingleLine(a.KAlpha1)
			r.Name = a.Symbol + " K-alpha1"
			return r
		}
		return AnodeRadiation(a)
	}
	a, _ := LookupAnode("Cu")
	return AnodeRadiation(a)
}

// checkNoise compares the esds the file states with the point-to-point
// scatter of the intensities, and sets esds for net intensities the file
// gives none for. For white noise the second difference
// r_i = y_i − (y_{i−1} + y_{i+1})/2 has variance 1.5σ²; its robust spread
// (1.4826 × the median absolute value, which peaks barely move on a
// scan of many points per width) measures σ. Stated esds less than a
// third of that scatter (weights that are not 1/σ², say) would make noise
// look like lines; they are replaced: by counting noise √I when the
// intensities scatter as counts do, else by the constant σ of the
// scatter; the scan says so in a note. Larger esds than the scatter are
// kept (smoothed or processed data). Net intensities (background
// removed) without esds get the constant σ of their scatter.
func (s *Scan) checkNoise(net bool) {
	n := s.Len()
	if n < 5 {
		return
	}
	// spread returns the robust spread of r_i/(σ_i √1.5).
	spread := func(sigma func(i int) float64) float64 {
		t := make([]float64, 0, n-2)
		for i := 1; i < n-1; i++ {
			if sg := sigma(i); sg > 0 {
				r := s.Intensity[i] - (s.Intensity[i-1]+s.Intensity[i+1])/2
				t = append(t, math.Abs(r)/(sg*math.Sqrt(1.5)))
			}
		}
		if len(t) == 0 {
			return math.NaN()
		}
		return 1.4826 * order.Nth(t, len(t)/2)
	}
	counts := spread(func(i int) float64 { return math.Sqrt(math.Max(s.Intensity[i], 1)) })
	constant := spread(func(int) float64 { return 1 })
	plausible := func(v float64) bool { return v > 1.0/3 && v < 3 }
	replace := func(why string) {
		if plausible(counts) {
			s.ESD = nil
			s.Warnings = append(s.Warnings, why+"; counting noise √I was used, which matches the scatter")
			return
		}
		s.ESD = make([]float64, n)
		for i := range s.ESD {
			s.ESD[i] = math.Max(constant, 1e-12)
		}
		s.Warnings = append(s.Warnings, fmt.Sprintf("%s; the scatter of the points, σ = %.3g, was used for every point", why, constant))
	}
	switch {
	case s.ESD != nil:
		if v := spread(func(i int) float64 { return s.ESD[i] }); v > 3 {
			replace(fmt.Sprintf("the esds in the file are %.2g times the point-to-point scatter of the intensities", 1/v))
		}
	case net:
		if !plausible(counts) {
			replace("the file gives background-subtracted intensities without esds")
		}
	}
}
