// Package profile holds the line profiles of a powder pattern — the
// pseudo-Voigt and its tailed and split (asymmetric) forms with their
// derivatives, the angular laws of width (Caglioti) and asymmetry — and
// the bounded Levenberg–Marquardt least-squares solver that fits them.
// Peak fitting (package peaks) uses them; a fit of the whole pattern is
// to use the same.
//
// Angles are degrees 2θ; widths are full widths at half maximum (FWHM),
// degrees 2θ.
package profile
