// Package peaks reads powder diffraction scans and extracts their peaks.
//
// A scan is a list of points (2θ in degrees, intensity in counts, optional
// estimated standard deviation). Readers accept plain-text exports in the
// common column layouts and the IUCr powder CIF (pdCIF). Extraction estimates
// the background (SNIP), detects peaks on their statistical significance in a
// Savitzky–Golay smoothed copy of the scan, and fits every peak or group of
// overlapping peaks with pseudo-Voigt profiles on the raw counts, K-alpha1 and
// K-alpha2 together when the radiation is a doublet.
//
// # Units
//
// Angles are degrees 2θ, wavelengths and d-spacings are ångström (Å),
// intensities are counts (or whatever the file states, treated as counts).
//
// # Invariants
//
// A Scan returned by a reader has at least MinPoints points, strictly
// increasing finite angles and finite intensities. The input file is never
// modified. Extraction is deterministic: the same scan and options give the
// same peaks.
package peaks
