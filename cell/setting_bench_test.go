package cell

import "testing"

// BenchmarkSettings finds the conventional descriptions of a cubic F
// lattice's reduced cell in every system (the lattice decision's inner
// step), the most symmetric and so the costliest case.
func BenchmarkSettings(b *testing.B) {
	red, err := Reduce(Must(Cubic, F, 5.6402))
	if err != nil {
		b.Fatal(err)
	}
	tol := Tolerance{Length: 0.002, Angle: 0.2}
	for i := 0; i < b.N; i++ {
		for _, s := range []System{Cubic, Tetragonal, Hexagonal, Rhombohedral, Orthorhombic, Monoclinic} {
			Settings(red, s, tol)
		}
	}
}
