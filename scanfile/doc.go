// Package scanfile reads powder diffraction scans: plain-text exports in
// the common column layouts and the IUCr powder CIF (pdCIF), with the
// radiation they state.
//
// A scan is a list of points (2θ in degrees, intensity in counts, optional
// estimated standard deviation). A Scan returned by a reader has at least
// MinPoints points, strictly increasing finite angles and finite
// intensities. The input file is never modified. Bad input is an error
// naming the file, the line and what was expected (ParseError).
package scanfile
