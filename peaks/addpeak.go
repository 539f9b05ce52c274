package peaks

import (
	"errors"
	"fmt"
	"math"
	"sort"

	"reticle/scanfile"
)

// ErrNoPeak: nothing significant where a peak was asked for.
var ErrNoPeak = errors.New("no significant peak there")

// FitAt fits one more peak near twoTheta (degrees), on top of an
// extraction's profile: a shoulder or a weak line that the detection
// missed and the user points at. The peak is placed at the highest point
// of the residual (counts minus profile) within one FWHM of twoTheta, its
// width and mixing come from the extraction's width curve, and its
// position and height are fitted with a local linear background while the
// existing profile is held fixed. It returns the peak (flagged
// FlagUser) and the profile with the peak included; the peak must reach
// 3 esds of its height, else the error wraps ErrNoPeak.
func FitAt(s *scanfile.Scan, res *Result, twoTheta float64) (Peak, []float64, error) {
	x, y := s.TwoTheta, s.Intensity
	n := len(x)
	if n < scanfile.MinPoints || len(res.Profile) != n || len(res.Background) != n {
		return Peak{}, nil, fmt.Errorf("peaks: FitAt needs the scan's own extraction: %w", scanfile.ErrTooFew)
	}
	lo, hi := s.Range()
	if !(twoTheta > lo && twoTheta < hi) {
		return Peak{}, nil, fmt.Errorf("peaks: %.4f° lies outside the scan (%.3f–%.3f°): %w", twoTheta, lo, hi, scanfile.ErrOutOfRange)
	}
	w0 := res.FWHMCurve.At(twoTheta)
	if !(w0 > 0) || math.IsInf(w0, 0) {
		w0 = 5 * s.Step()
	}
	eta := res.Eta
	if !(eta >= 0 && eta <= 1) {
		eta = 0.5
	}
	// The highest residual point within one FWHM of the click.
	a := sort.SearchFloat64s(x, twoTheta-w0)
	b := min(sort.SearchFloat64s(x, twoTheta+w0), n-1)
	best := sort.SearchFloat64s(x, twoTheta)
	best = min(best, n-1)
	for i := a; i <= b; i++ {
		if y[i]-res.Profile[i] > y[best]-res.Profile[best] {
			best = i
		}
	}
	w := make([]float64, n)
	md := &model{x: x, y: y, w: w, bg: res.Background, rad: res.Radiation}
	c := &component{x: x[best], anchor: x[best], h: math.Max(y[best]-res.Profile[best], 1), w: w0, eta: eta, fixedShape: true, flags: FlagUser}
	c.asym = res.Asymmetry.At(x[best])
	wlo, whi := md.window(c)
	if whi-wlo < 8 {
		return Peak{}, nil, fmt.Errorf("peaks: too few points near %.4f°: %w", twoTheta, ErrNoPeak)
	}
	// Weights where the fit looks: the esd column, else the model counts.
	for i := wlo; i < whi; i++ {
		if s.ESD != nil {
			w[i] = 1 / (s.ESD[i] * s.ESD[i])
		} else {
			w[i] = 1 / math.Max(res.Profile[i], 1)
		}
	}
	base := append([]float64(nil), res.Profile[wlo:whi]...)
	md.fitGroup([]*component{c}, wlo, whi, base)
	if !(c.h > 0) || !(c.sh > 0) || c.h/c.sh < 3 {
		return Peak{}, nil, fmt.Errorf("peaks: near %.4f° the residual holds %.1f esd at most: %w", twoTheta, c.h/c.sh, ErrNoPeak)
	}
	p := peaksOf(md, []*component{c})[0]
	prof := append([]float64(nil), res.Profile...)
	md.addProfile(prof[wlo:whi], wlo, whi, c)
	for i := wlo; i < whi; i++ {
		prof[i] += c.b0 + c.b1*(x[i]-c.xc)
	}
	return p, prof, nil
}
