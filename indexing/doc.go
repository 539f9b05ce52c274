// Package indexing finds the unit cell of a powder pattern from its list of
// peak positions.
//
// Lines are converted by Bragg's law to Q = 1/d² (Å⁻²). For a cell with
// reciprocal metric G*, Q(hkl) = hᵀ G* h; for the systems searched here
//
//	cubic         Q = (h² + k² + l²)/a²
//	tetragonal    Q = (h² + k²)/a² + l²/c²
//	hexagonal     Q = 4(h² + hk + k²)/(3a²) + l²/c²
//	rhombohedral  as hexagonal, on hexagonal axes (obverse setting)
//
// The lattice centring removes reflections (P none; I h+k+l = 2n; F h, k, l
// all even or all odd; R −h+k+l = 3n; C h+k = 2n).
//
// # Search
//
// The search is exhaustive within stated bounds, not random. Cubic cells
// come from every one of the first lines against every allowed h²+k²+l²;
// two-parameter cells from every pair of the first lines against every pair
// of index vectors (h²+k² or h²+hk+k² up to MaxM, l up to MaxL), which
// determines (1/a², 1/c²) by a 2×2 linear system. Any cell inside the edge
// and volume bounds whose two low-angle lines have indices within those
// bounds is therefore generated. The zero-point error is an unknown: the
// search runs on a grid of zero offsets and every candidate is refined with
// a free zero (from five lines for a cubic cell and six for the others,
// zeroLines). Orthorhombic, monoclinic and triclinic lattices come from
// the zone method (zone.go): pairs of zones of the lines combined, and,
// when one zone holds most lines, that zone's layers (layer.go), down
// to a single line off the zone at the places where the lattice has a
// twofold axis normal to it.
//
// # Ranking and probability
//
// Candidates are ranked by their evidence: the probability density of
// every observed line's position under the cell, its parameters
// integrated out (evidence.go: a Poisson model of calculated lines seen
// and foreign lines, Student t position errors, intensities that make a
// strong line hard to call foreign, a detection model averaged over the
// cell's derivative lattices in split.go, and a Laplace Occam factor).
// When some lines are weak, each candidate is also weighed beside
// another as a second phase that takes the lines it leaves (pair.go),
// the phase of the stronger lines being the sample's.
// Normalised over the candidates and the hypothesis that no cell
// explains the lines, the evidence gives each candidate its probability.
// De Wolff's M_N (J. Appl. Cryst. 1 (1968) 108) and Smith & Snyder's F_N
// (J. Appl. Cryst. 12 (1979) 60) are reported beside it, and order the
// cells within a search.
package indexing
