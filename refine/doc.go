// Package refine refines a unit cell against the observed positions of
// indexed powder lines by weighted least squares in 2θ, with optional
// instrument corrections, and reports the parameters with honest standard
// uncertainties.
//
// # Model
//
// The calculated position of line hkl is
//
//	2θ_calc = 2·asin(λ·√Q(hkl)/2) + Δ2θ₀ − 2·s·cos θ / R
//
// in degrees, where Q = 1/d² follows from the free cell parameters of the
// crystal system (a for cubic; a and c for tetragonal, hexagonal and
// rhombohedral on hexagonal axes; a, b and c for orthorhombic), Δ2θ₀ is
// the zero shift, s the sample displacement in mm (positive towards the
// source side, which lowers 2θ) and R the goniometer radius in mm. Each
// correction is switched on separately.
//
// # Weights and uncertainties
//
// Each line is weighted by 1/σ², σ being the esd of its position. The
// covariance of the parameters is (JᵀWJ)⁻¹ at the minimum, multiplied by
// the reduced χ² = χ²/(n − p) when χ²_red exceeds 1 significantly: when
// χ² lies beyond the 95 % point of the χ² distribution with n − p degrees
// of freedom, the positions scatter more than their esds allow and the
// parameters are less certain than the esds alone would claim. Below
// that point the esds of the lines are trusted: scaling by every χ²_red
// above 1 would inflate the uncertainties of about half of all fits whose
// esds are right (χ²_red scatters about 1 by √(2/ν)), and a scatter
// smaller than stated is never taken as extra precision. Options.Scaling
// selects the stricter "whenever χ²_red > 1", "always" or "never"
// conventions instead; Result.Scaled and Result.Scaling say what was
// applied. Derived quantities (the volume)
// take their uncertainty from the full covariance, correlations included.
// The wavelength is taken as exact.
//
// # Internal standard
//
// When a standard of known cell is mixed into the sample, its lines alone
// fix the correction curve (zero shift and/or displacement, the cell held
// at its certified value); the curve is then applied to the unknown phase,
// whose covariance carries the curve's uncertainty as well.
package refine
