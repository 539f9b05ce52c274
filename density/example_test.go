package density_test

import (
	"fmt"
	"testing"

	"reticle/cell"
	"reticle/density"
	"reticle/esd"
)

// Formula units of a spinel from its cell and a measured density.
func ExampleCompute() {
	f, err := density.ParseFormula("MgAl2O4")
	if err != nil {
		fmt.Println(err)
		return
	}
	spinel := cell.Must(cell.Cubic, cell.F, 8.0830)
	v := spinel.Volume()
	vesd := spinel.VolumeESD(cell.IndependentCovariance(cell.Cubic, cell.ESD{A: 0.0002}))
	c, err := density.Compute(density.Input{Cell: spinel, VolumeESD: vesd, Formula: f, Measured: &density.Measured{Density: 3.55, ESD: 0.03}})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("V = %s Å³, Z_est = %s, Z = %d\n", esd.Format(v, vesd), esd.Format(c.ZEst, c.ZEstESD), c.Z)
	fmt.Printf("ρ(X-ray) = %s g/cm³, %d atoms per cell\n", esd.Format(c.Density, c.DensityESD), int(c.AtomsPerCell))
	// Output:
	// V = 528.10(4) Å³, Z_est = 7.94(7), Z = 8
	// ρ(X-ray) = 3.5786(3) g/cm³, 56 atoms per cell
}

func ExampleParseFormula() {
	f, err := density.ParseFormula("CuSO4·5H2O")
	if err != nil {
		fmt.Println(err)
		return
	}
	m, u, _ := f.MolarMass()
	fmt.Println(f, esd.Format(m, u))
	_, err = density.ParseFormula("Ca3(PO4")
	fmt.Println(err)
	// Output:
	// CuH10O9S 249.677(18)
	// formula "Ca3(PO4", character 4: unbalanced bracket: '(' is never closed
}

func BenchmarkParseFormula(b *testing.B) {
	for i := 0; i < b.N; i++ {
		if _, err := density.ParseFormula("K4[Fe(CN)6]·3H2O"); err != nil {
			b.Fatal(err)
		}
	}
}
