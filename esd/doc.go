// Package esd handles values with standard uncertainties (estimated
// standard deviations, esds) in crystallographic notation, where the
// uncertainty is written in parentheses in units of the last digit:
// 5.64021(7) means 5.64021 ± 0.00007.
//
// It is a leaf: every stage of the analysis and both front ends print and
// read uncertainties through it, so that a value prints the same way
// everywhere.
package esd
