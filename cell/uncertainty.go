package cell

import "math"

// ESD holds the standard uncertainties of a cell's parameters: edges in
// Å, angles in degrees. Zero means exact (an angle fixed by the system)
// or not known.
type ESD struct {
	A, B, C, Alpha, Beta, Gamma float64
}

// Values returns the six uncertainties in the order of Cell.Params.
func (e ESD) Values() [6]float64 { return [6]float64{e.A, e.B, e.C, e.Alpha, e.Beta, e.Gamma} }

// Free returns the uncertainties of the system's free parameters.
func (e ESD) Free(s System) []float64 {
	c := Cell{System: s, A: e.A, B: e.B, C: e.C, Alpha: e.Alpha, Beta: e.Beta, Gamma: e.Gamma}
	return c.Free()
}

// A Covariance is the covariance matrix of a cell's six parameters a, b,
// c (Å), α, β, γ (degrees), in that order. Parameters tied by the system
// carry their full correlation (a and b of a tetragonal cell are one
// number), so that derived quantities come out right.
type Covariance [6][6]float64

// ESD returns the standard uncertainties on the diagonal.
func (cv Covariance) ESD() ESD {
	s := func(i int) float64 { return math.Sqrt(math.Max(cv[i][i], 0)) }
	return ESD{s(0), s(1), s(2), s(3), s(4), s(5)}
}

// freeIndex maps each of the six parameters to the free parameter it
// equals (−1 for an angle the system fixes).
func freeIndex(s System) [6]int {
	switch s {
	case Cubic:
		return [6]int{0, 0, 0, -1, -1, -1}
	case Tetragonal, Hexagonal, Rhombohedral:
		return [6]int{0, 0, 1, -1, -1, -1}
	case Orthorhombic:
		return [6]int{0, 1, 2, -1, -1, -1}
	case Monoclinic:
		return [6]int{0, 1, 2, -1, 3, -1}
	}
	return [6]int{0, 1, 2, 3, 4, 5}
}

// FreeCovariance expands a covariance of the system's free parameters
// (in the order of System.FreeNames) to the six parameters.
func FreeCovariance(s System, free [][]float64) Covariance {
	idx := freeIndex(s)
	var cv Covariance
	for i := 0; i < 6; i++ {
		for j := 0; j < 6; j++ {
			if idx[i] >= 0 && idx[j] >= 0 {
				cv[i][j] = free[idx[i]][idx[j]]
			}
		}
	}
	return cv
}

// IndependentCovariance builds the covariance of a cell whose free
// parameters have the given uncertainties and are taken as uncorrelated
// (a cell typed in, or copied from a publication).
func IndependentCovariance(s System, e ESD) Covariance {
	u := e.Free(s)
	free := make([][]float64, len(u))
	for i := range free {
		free[i] = make([]float64, len(u))
		free[i][i] = u[i] * u[i]
	}
	return FreeCovariance(s, free)
}

// VolumeESD returns the standard uncertainty of the cell volume in Å³
// from a covariance of its parameters: √(gᵀ·Cov·g), g = VolumeGradient.
func (c Cell) VolumeESD(cv Covariance) float64 {
	g := c.VolumeGradient()
	var s float64
	for i := 0; i < 6; i++ {
		for j := 0; j < 6; j++ {
			s += g[i] * cv[i][j] * g[j]
		}
	}
	return math.Sqrt(math.Max(s, 0))
}

// ReciprocalToDirect returns the Jacobian ∂(a, b, c, α, β, γ)/∂r of the
// cell's six parameters with respect to its free reciprocal coefficients
// r (Cell.ReciprocalFree): DirectJacobian times the system's Basis.
func (c Cell) ReciprocalToDirect() [][]float64 {
	jd := c.DirectJacobian()
	basis := Basis(c.System)
	out := make([][]float64, 6)
	for i := range out {
		out[i] = make([]float64, len(basis))
		for j, b := range basis {
			for k := 0; k < 6; k++ {
				out[i][j] += jd[i][k] * b[k]
			}
		}
	}
	return out
}
