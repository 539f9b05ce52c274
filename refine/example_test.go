package refine_test

import (
	"context"
	"fmt"

	"reticle/cell"
	"reticle/refine"
)

// A cubic cell from five indexed lines (Cu K-alpha1), refining a zero
// shift as well.
func ExampleRefine() {
	lines := []struct {
		tt  float64
		hkl cell.HKL
	}{
		{27.386, cell.HKL{1, 1, 1}}, {31.725, cell.HKL{2, 0, 0}}, {45.467, cell.HKL{2, 2, 0}},
		{53.888, cell.HKL{3, 1, 1}}, {56.493, cell.HKL{2, 2, 2}}, {66.247, cell.HKL{4, 0, 0}},
	}
	var obs []refine.Observation
	for _, l := range lines {
		obs = append(obs, refine.Observation{Line: cell.Line{TwoTheta: l.tt, ESD: 0.003}, HKL: []cell.HKL{l.hkl}})
	}
	start := cell.Must(cell.Cubic, cell.F, 5.64)
	res, err := refine.Refine(context.Background(), start, obs, refine.Options{Wavelength: 1.5405929, Corrections: refine.Zero})
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, p := range res.Params {
		fmt.Println(p)
	}
	fmt.Printf("V = %.2f Å³, χ²_red = %.2f\n", res.Volume, res.Chi2Reduced)
	// Output:
	// a = 5.6401(4) Å
	// zero = 0.020(4) ° 2θ
	// V = 179.42 Å³, χ²_red = 0.10
}
