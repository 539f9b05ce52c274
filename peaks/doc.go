// Package peaks extracts the peaks of a powder diffraction scan (read by
// package scanfile).
//
// Extraction estimates the background (SNIP), detects peaks on their
// statistical significance in a Savitzky–Golay smoothed copy of the scan,
// and fits every peak or group of overlapping peaks with pseudo-Voigt
// profiles on the raw counts, K-alpha1 and K-alpha2 together when the
// radiation is a doublet.
//
// # Units
//
// Angles are degrees 2θ, wavelengths and d-spacings are ångström (Å),
// intensities are counts (or whatever the file states, treated as counts).
//
// # Invariants
//
// The input scan is never modified. Extraction is deterministic: the same
// scan and options give the same peaks.
package peaks
