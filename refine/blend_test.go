package refine

import (
	"context"
	"math"
	"testing"

	"reticle/cell"
)

// TestBlendESD checks that a line whose neighbouring calculated line lies
// within its width gets a quarter of their separation as its esd, and
// that a line clear of its neighbours, or of unknown width, keeps its own.
func TestBlendESD(t *testing.T) {
	const lambda = 1.5405929
	c := cell.Must(cell.Tetragonal, cell.P, 4.0, 4.02)
	tt := func(h cell.HKL) float64 { return cell.TwoTheta(c.D(h), lambda) }
	sep := tt(cell.HKL{1, 0, 0}) - tt(cell.HKL{0, 0, 1}) // about 0.11°
	line := func(h cell.HKL, width float64) Observation {
		return Observation{Line: cell.Line{TwoTheta: tt(h), ESD: 0.001}, HKL: []cell.HKL{h}, Width: width}
	}
	cases := []struct {
		name string
		obs  Observation
		want float64
	}{
		{"blend", line(cell.HKL{1, 0, 0}, 0.2), blendShare * sep},
		{"resolved", line(cell.HKL{1, 0, 0}, 0.05), 0.001},
		{"width unknown", line(cell.HKL{1, 0, 0}, 0), 0.001},
		{"alone", line(cell.HKL{1, 1, 1}, 0.2), 0.001},
	}
	for _, k := range cases {
		in := []Observation{k.obs}
		got := blendESDs(c, in, lambda)[0].ESD
		if math.Abs(got-k.want) > 1e-9 {
			t.Errorf("%s: esd %.6f°, want %.6f°", k.name, got, k.want)
		}
		if in[0].ESD != 0.001 {
			t.Errorf("%s: the caller's observation was changed", k.name)
		}
	}
}

// TestBootstrapReproducible checks that the covariance of a cell refined
// with corrections chosen from the data is the same on every run, and
// that it is no smaller than the chosen model's own when the models
// disagree.
func TestBootstrapReproducible(t *testing.T) {
	const lambda = 1.5405929
	c := cell.Must(cell.Cubic, cell.F, 5.4309)
	var obs []Observation
	for i, r := range cell.Reflections(c, cell.QOf(120, lambda)) {
		th := cell.TwoTheta(c.D(r.HKL[0]), lambda) / 2 * math.Pi / 180
		// A zero shift of 0.02° and a displacement of 0.03 mm (radius
		// 240 mm), with a little noise of alternating sign.
		shift := 0.02 - 2*0.03*math.Cos(th)/240*180/math.Pi + 0.0004*float64(1-2*(i%2))
		obs = append(obs, Observation{Line: cell.Line{TwoTheta: 2*th*180/math.Pi + shift, ESD: 0.0005}, HKL: r.HKL})
	}
	opt := Options{Wavelength: lambda, Corrections: Auto}
	a, err := Refine(context.Background(), c, obs, opt)
	if err != nil {
		t.Fatal(err)
	}
	b, err := Refine(context.Background(), c, obs, opt)
	if err != nil {
		t.Fatal(err)
	}
	if a.ESD != b.ESD {
		t.Errorf("two runs: esd %v and %v", a.ESD, b.ESD)
	}
	if a.Selection == nil || a.Selection.Widening < 1 {
		t.Errorf("selection %+v: the esds should include the choice", a.Selection)
	}
}
