package peaks

import "strings"

// Flags describe a peak beyond its numbers.
type Flags uint8

const (
	// FlagKBeta marks a line at the K-beta position of a much stronger
	// peak: a companion, not a reflection of its own.
	FlagKBeta Flags = 1 << iota
	// FlagShared marks a peak fitted together with overlapping neighbours.
	FlagShared
	// FlagFixedShape marks a weak peak whose FWHM and mixing were held at
	// the values of the scan's width curve instead of being refined.
	FlagFixedShape
	// FlagEdge marks a peak whose fitting window was cut by an end of the
	// scan.
	FlagEdge
	// FlagAdded marks a peak found in the residual of a first fit
	// (typically a shoulder).
	FlagAdded
	// FlagUser marks a peak the user asked for (FitAt).
	FlagUser
	// FlagFilterEdge marks a weak hump between a much stronger line's
	// K-beta and K-alpha positions, where the white radiation that line
	// scatters steps up at the K-beta filter's absorption edge: a
	// companion, not a reflection of its own.
	FlagFilterEdge
)

// String lists the flags as words separated by commas.
func (f Flags) String() string {
	var w []string
	for _, x := range []struct {
		f    Flags
		name string
	}{{FlagKBeta, "K-beta"}, {FlagShared, "overlap"}, {FlagFixedShape, "fixed-shape"}, {FlagEdge, "edge"}, {FlagAdded, "shoulder"}, {FlagUser, "user-added"}, {FlagFilterEdge, "filter-edge-companion"}} {
		if f&x.f != 0 {
			w = append(w, x.name)
		}
	}
	return strings.Join(w, ",")
}

// A Peak is one fitted reflection. Positions, heights and areas refer to the
// K-alpha1 (or single-wavelength) component; every value comes with its
// estimated standard deviation (esd) from the fit's covariance matrix.
type Peak struct {
	TwoTheta, TwoThetaESD float64 // K-alpha1 position, degrees 2θ
	D, DESD               float64 // d-spacing by Bragg's law, Å
	Height, HeightESD     float64 // height above background, counts
	Area, AreaESD         float64 // integrated intensity, counts·degrees 2θ
	FWHM, FWHMESD         float64 // full width at half maximum, degrees 2θ
	Eta, EtaESD           float64 // pseudo-Voigt Lorentzian fraction, 0…1
	// Asymmetry is the line's asymmetry A (split pseudo-Voigt: FWHM
	// w(1 + A) below the maximum, w(1 − A) above); zero when symmetric.
	Asymmetry  float64
	Background float64 // background under the peak, counts
	SNR        float64 // Height / HeightESD
	Flags      Flags
	// Parent is the index (in the same list) of the peak this one is a
	// K-beta companion of, -1 otherwise.
	Parent int
}

// Companion reports whether the peak is a companion line, not a
// reflection of its own.
func (p *Peak) Companion() bool { return p.Flags&(FlagKBeta|FlagFilterEdge) != 0 }
