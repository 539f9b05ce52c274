// Package cell describes the unit cell of a crystal lattice of any crystal
// system: its parameters with their uncertainties, direct and reciprocal
// metric, d-spacings, volume, the reflection conditions of its centring,
// the powder lines it gives, reduction to the Niggli cell and the
// conventional setting of each system, and a text form that every front
// end reads and writes. It also holds the program's one statement of
// Bragg's law.
//
// It is a leaf: every stage (peaks, indexing, refinement, contents) and
// both front ends use it, and it imports none of them.
//
// # Parameters and units
//
// Edges a, b, c are in Å, angles α, β, γ in degrees. The direct metric is
// G_ij = a_i·a_j; the reciprocal metric G* = G⁻¹ gives
//
//	Q(hkl) = 1/d² = hᵀ G* h = A h² + B k² + C l² + D kl + E hl + F hk
//
// in Å⁻², a form linear in the six reciprocal coefficients (QForm), which
// refinement and indexing use as their parameters.
//
// # Systems and settings
//
// Cells are given in the conventional setting of their system
// (International Tables for Crystallography Vol. A, chapter 9; common
// practice): cubic a = b = c, α = β = γ = 90°; tetragonal a = b, c unique;
// hexagonal a = b, γ = 120°; rhombohedral on hexagonal axes (obverse
// setting, centring R); orthorhombic a, b, c, right angles; monoclinic
// with b the unique axis (α = γ = 90°); triclinic any. Conventional
// chooses the standard setting of a cell (see its doc); Reduce gives the
// Niggli reduced cell (Křivý & Gruber, Acta Cryst. A32 (1976) 297, with
// the tolerances of Grosse-Kunstleve, Sauter & Adams, Acta Cryst. A60
// (2004) 1), which names one lattice whatever its description.
package cell
