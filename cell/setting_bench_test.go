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

// BenchmarkSettingSearch is BenchmarkSettings with the lattice's setting
// search prepared once for the six systems, as the lattice decision
// does, on the cubic F cell and on a triclinic one (whose settings are
// few, so that the preparation is most of the cost).
func BenchmarkSettingSearch(b *testing.B) {
	for _, c := range []Cell{Must(Cubic, F, 5.6402), {System: Triclinic, Centring: P, A: 5.31, B: 6.02, C: 7.14, Alpha: 97.3, Beta: 104.8, Gamma: 91.6}} {
		red, err := Reduce(c)
		if err != nil {
			b.Fatal(err)
		}
		tol := Tolerance{Length: 0.002, Angle: 0.2}
		b.Run(c.System.String(), func(b *testing.B) {
			for i := 0; i < b.N; i++ {
				ss := NewSettingSearch(red)
				for _, s := range []System{Cubic, Tetragonal, Hexagonal, Rhombohedral, Orthorhombic, Monoclinic} {
					ss.Settings(s, tol)
				}
			}
		})
		b.Run(c.System.String()+"-each", func(b *testing.B) {
			for i := 0; i < b.N; i++ {
				for _, s := range []System{Cubic, Tetragonal, Hexagonal, Rhombohedral, Orthorhombic, Monoclinic} {
					Settings(red, s, tol)
				}
			}
		})
	}
}
