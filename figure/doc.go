// Package figure draws a powder pattern and its analysis with gonum/plot:
// observed counts, fitted profile, background, difference and the tick
// marks of the chosen cell, on a linear, square-root or logarithmic
// intensity axis, against 2θ or d. The report's PDF and the desktop
// program's live view draw the same figure.
package figure
