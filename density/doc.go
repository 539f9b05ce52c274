// Package density turns a unit cell into its contents: formula units per
// cell (Z), X-ray density, atoms per cell and formula mass per cell, with
// uncertainties, from a chemical formula and, optionally, a measured
// density.
//
// # Constants and units
//
// Densities are in g/cm³, volumes in Å³ (1 Å³ = 10⁻²⁴ cm³), molar masses
// in g/mol. The Avogadro constant is N_A = 6.02214076×10²³ mol⁻¹, exact
// since the 2019 redefinition of the SI. Atomic weights are the IUPAC 2021
// standard atomic weights (see Elements).
//
// # Z and the lattice
//
// Every lattice point of a conventional cell carries the same contents, so
// Z is a whole multiple of the lattice points per cell: P 1, I 2, C 2,
// F 4, R on hexagonal axes 3 (common practice). A Z estimated from a
// measured density that lies far from every such multiple is evidence
// against the cell.
package density
