package cell

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat"
	"gonum.org/v1/gonum/stat/distmv"
)

// TestVolume checks the volume formula on cells whose volume is known in
// closed form (common practice): a cube a³, a hexagonal cell (√3/2)a²c,
// and the rhombohedral primitive cell of a face-centred cube, a quarter of
// the cube.
func TestVolume(t *testing.T) {
	for _, test := range []struct {
		c    Cell
		want float64
	}{
		{Must(Cubic, P, 4), 64},
		{Must(Hexagonal, P, 3, 5), math.Sqrt(3) / 2 * 9 * 5},
		{Must(Orthorhombic, P, 2, 3, 4), 24},
		{Must(Monoclinic, P, 2, 3, 4, 120), 24 * math.Sqrt(3) / 2},
		{Cell{Triclinic, P, 4 / math.Sqrt2, 4 / math.Sqrt2, 4 / math.Sqrt2, 60, 60, 60}, 16},
	} {
		if got := test.c.Volume(); math.Abs(got-test.want) > 1e-9*test.want {
			t.Errorf("%v: V = %.12g, want %.12g", test.c, got, test.want)
		}
	}
}

// TestDirectJacobian compares the analytic derivatives of the cell
// parameters with respect to the reciprocal coefficients with central
// differences.
func TestDirectJacobian(t *testing.T) {
	c := Cell{Triclinic, P, 6.12, 10.69, 5.96, 82.35, 107.33, 102.6}
	jac := c.DirectJacobian()
	f := c.QForm()
	for k := 0; k < 6; k++ {
		h := 1e-7 * math.Max(math.Abs(f[k]), 1e-3)
		up, dn := f, f
		up[k] += h
		dn[k] -= h
		cu, err1 := up.Cell(Triclinic, P)
		cd, err2 := dn.Cell(Triclinic, P)
		if err1 != nil || err2 != nil {
			t.Fatal(err1, err2)
		}
		pu, pd := cu.Params(), cd.Params()
		for i := 0; i < 6; i++ {
			num := (pu[i] - pd[i]) / (2 * h)
			if math.Abs(num-jac[i][k]) > 1e-5*math.Max(math.Abs(num), 1) {
				t.Errorf("∂%s/∂q%d = %g, numerical %g", ParamNames[i], k, jac[i][k], num)
			}
		}
	}
}

// TestVolumeESDMonteCarlo checks VolumeESD against the spread of the
// volumes of 10,000 cells drawn from a correlated covariance of a
// triclinic cell (the covariance is a random positive-definite matrix
// scaled to esds of 1e-3 Å and 0.05°): within 2 %.
func TestVolumeESDMonteCarlo(t *testing.T) {
	c := Cell{Triclinic, P, 6.12, 10.69, 5.96, 82.35, 107.33, 102.6}
	rng := rand.New(rand.NewPCG(1, 2))
	var a mat.Dense
	raw := mat.NewDense(6, 6, nil)
	for i := 0; i < 6; i++ {
		for j := 0; j < 6; j++ {
			raw.Set(i, j, rng.NormFloat64())
		}
	}
	a.Mul(raw, raw.T())
	scale := [6]float64{1e-3, 1e-3, 1e-3, 0.05, 0.05, 0.05}
	var cv Covariance
	sym := mat.NewSymDense(6, nil)
	for i := 0; i < 6; i++ {
		for j := 0; j < 6; j++ {
			v := a.At(i, j) / math.Sqrt(a.At(i, i)*a.At(j, j)) * scale[i] * scale[j]
			cv[i][j] = v
			sym.SetSym(i, j, v)
		}
	}
	p := c.Params()
	dist, ok := distmv.NewNormal(p[:], sym, rng)
	if !ok {
		t.Fatal("covariance not positive definite")
	}
	vols := make([]float64, 10000)
	x := make([]float64, 6)
	for i := range vols {
		dist.Rand(x)
		vols[i] = Cell{Triclinic, P, x[0], x[1], x[2], x[3], x[4], x[5]}.Volume()
	}
	sd := stat.StdDev(vols, nil)
	got := c.VolumeESD(cv)
	if math.Abs(got-sd)/sd > 0.02 {
		t.Errorf("VolumeESD %.5g Å³, Monte Carlo %.5g Å³", got, sd)
	}
	t.Logf("VolumeESD %.5g Å³, Monte Carlo spread of 10,000 draws %.5g Å³", got, sd)
	// Tied parameters: a cubic a ± σ gives σV = 3a²σ.
	cub := Must(Cubic, F, 5.6402)
	if got, want := cub.VolumeESD(IndependentCovariance(Cubic, ESD{A: 3e-4})), 3*5.6402*5.6402*3e-4; math.Abs(got-want) > 1e-12 {
		t.Errorf("cubic σV = %g, want 3a²σ = %g", got, want)
	}
}

// TestReflections checks powder multiplicities of cubic and hexagonal
// lines (common practice: {100} 6, {110} 12, {111} 8 in m-3m; {100} 6,
// {001} 2 in 6/mmm) and the representative names.
func TestReflections(t *testing.T) {
	refs := Reflections(Must(Cubic, P, 4), 3.01/16)
	want := []struct {
		hkl  HKL
		mult int
	}{{HKL{1, 0, 0}, 6}, {HKL{1, 1, 0}, 12}, {HKL{1, 1, 1}, 8}}
	if len(refs) != 3 {
		t.Fatalf("%d lines, want 3", len(refs))
	}
	for i, w := range want {
		if refs[i].HKL[0] != w.hkl || refs[i].Mult != w.mult {
			t.Errorf("line %d: %v ×%d, want %v ×%d", i, refs[i].HKL[0], refs[i].Mult, w.hkl, w.mult)
		}
	}
	hex := Reflections(Must(Hexagonal, P, 3, 10), 1.0/9)
	if hex[0].HKL[0] != (HKL{0, 0, 1}) || hex[0].Mult != 2 {
		t.Errorf("first hexagonal line %v ×%d, want 0 0 1 ×2", hex[0].HKL[0], hex[0].Mult)
	}
	// A monoclinic cell keeps h0l and h0-l apart, and merges hkl with
	// h-kl.
	mono := Reflections(Must(Monoclinic, P, 5, 6, 7, 100), 0.2)
	for _, r := range mono {
		for _, v := range r.HKL {
			if v[1] < 0 {
				t.Errorf("monoclinic representative %v has k < 0", v)
			}
		}
	}
}

// TestConventional checks the settings Conventional chooses: the same
// lattice, in the system's conventional form.
func TestConventional(t *testing.T) {
	for _, test := range []struct {
		in   Cell
		want Cell
	}{
		// Orthorhombic axes sorted; an A-centred cell relabelled to C.
		{Must(Orthorhombic, P, 7, 5, 6), Must(Orthorhombic, P, 5, 6, 7)},
		{Must(Orthorhombic, A, 3.9, 6.1, 5.5), Must(Orthorhombic, C, 5.5, 6.1, 3.9)},
		// Monoclinic: β made obtuse; an I-centred cell turned to C.
		{Must(Monoclinic, P, 5, 6, 7, 80), Must(Monoclinic, P, 5, 6, 7, 100)},
		{Must(Monoclinic, I, 8.3, 5.38, 6.12, 94.7), Cell{}},
	} {
		got, m, err := Conventional(test.in)
		if err != nil {
			t.Fatalf("%v: %v", test.in, err)
		}
		if !SameLattice(got, test.in, 1e-6) {
			t.Errorf("%v → %v: not the same lattice", test.in, got)
		}
		// The transform carries the input metric to the output's.
		g := test.in.Metric().Transform(m)
		if h := got.Metric(); math.Abs(g[0][0]-h[0][0]) > 1e-8 || math.Abs(g[0][2]-h[0][2]) > 1e-8 || math.Abs(g[2][2]-h[2][2]) > 1e-8 {
			t.Errorf("%v: transform gives metric %v, want %v", test.in, g, h)
		}
		if test.want != (Cell{}) && !near(got, test.want) {
			t.Errorf("Conventional(%v) = %v, want %v", test.in, got, test.want)
		}
		if got.System == Monoclinic && (got.Beta < 90 || got.Centring != P && got.Centring != C) {
			t.Errorf("Conventional(%v) = %v: want β ≥ 90° and P or C", test.in, got)
		}
	}
	// A triclinic cell becomes its Niggli cell.
	tri := Cell{Triclinic, P, 6.12, 10.69, 5.96, 82.35, 107.33, 102.6}
	got, _, err := Conventional(tri)
	red, _ := Reduce(tri)
	if err != nil || !near(got, red.Cell) {
		t.Errorf("Conventional(%v) = %v, %v; want the reduced cell %v", tri, got, err, red.Cell)
	}
}

func near(a, b Cell) bool {
	pa, pb := a.Params(), b.Params()
	for i := range pa {
		if math.Abs(pa[i]-pb[i]) > 1e-6*math.Max(pa[i], 1) {
			return false
		}
	}
	return a.System == b.System && a.Centring == b.Centring
}

// TestSettings finds the symmetry of lattices given as triclinic cells:
// a face-centred cube and a C-centred monoclinic lattice, from their
// reduced cells.
func TestSettings(t *testing.T) {
	fcc := Must(Cubic, F, 5.6402)
	red, err := Reduce(fcc)
	if err != nil {
		t.Fatal(err)
	}
	st := Settings(red, Cubic, Tolerance{Length: 1e-4, Angle: 0.01})
	if len(st) == 0 || st[0].Cell.Centring != F || math.Abs(st[0].Cell.A-5.6402) > 1e-9 {
		t.Fatalf("cubic settings of the reduced fcc cell: %v", st)
	}
	mc := Must(Monoclinic, C, 9.41, 5.38, 6.12, 102.4)
	red, _ = Reduce(mc)
	st = Settings(red, Monoclinic, Tolerance{Length: 1e-4, Angle: 0.01})
	if len(st) == 0 || !SameLattice(st[0].Cell, mc, 1e-6) {
		t.Fatalf("monoclinic settings of a reduced mC cell: %v", st)
	}
	if len(Settings(red, Orthorhombic, Tolerance{Length: 1e-4, Angle: 0.01})) != 0 {
		t.Error("a monoclinic lattice with β = 102.4° has no orthorhombic setting within 0.01°")
	}
}

func TestParse(t *testing.T) {
	for _, test := range []struct {
		in   string
		want Cell
		e    ESD
	}{
		{"cubic F a=5.6402(3)", Must(Cubic, F, 5.6402), ESD{A: 0.0003, B: 0.0003, C: 0.0003}},
		{"tetragonal P a=4.59 c=2.96", Must(Tetragonal, P, 4.59, 2.96), ESD{}},
		{"rhombohedral a=4.759 c=12.991", Must(Rhombohedral, R, 4.759, 12.991), ESD{}},
		{"hexagonal P a=3.2 c=5.2 gamma=120", Must(Hexagonal, P, 3.2, 5.2), ESD{}},
		{"orthorhombic C a=2.85 b=4.95 c=4.61", Must(Orthorhombic, C, 2.85, 4.95, 4.61), ESD{}},
		{"monoclinic C a=9.41 b=5.38 c=6.12 beta=102.4(1)", Must(Monoclinic, C, 9.41, 5.38, 6.12, 102.4), ESD{Beta: 0.1}},
		{"triclinic P a=6.12 b=10.69 c=5.96 α=82.35 β=107.33 γ=102.6", Cell{Triclinic, P, 6.12, 10.69, 5.96, 82.35, 107.33, 102.6}, ESD{}},
		{"Cubic i a=3.1652", Must(Cubic, I, 3.1652), ESD{}},
	} {
		c, e, err := Parse(test.in)
		if err != nil || c != test.want || e != test.e {
			t.Errorf("Parse(%q) = %v, %v, %v; want %v, %v", test.in, c, e, err, test.want, test.e)
		}
	}
	for _, bad := range []string{
		"", "cubic", "cubes P a=3", "cubic Q a=3", "cubic C a=3", "cubic P a", "cubic P a=-3",
		"cubic P a=3 a=3", "cubic P z=3", "tetragonal P a=3", "tetragonal P a=3 b=4 c=5",
		"hexagonal P a=3 c=5 gamma=90", "monoclinic P a=5 b=6 c=7", "triclinic P a=1 b=1 c=1 alpha=10 beta=10 gamma=100",
		"monoclinic P a=5 b=6 c=7 beta=190", "cubic P a=3(x)",
	} {
		if _, _, err := Parse(bad); !errors.Is(err, ErrText) {
			t.Errorf("Parse(%q): %v, want ErrText", bad, err)
		}
	}
}

// TestFormatParse prints cells of every system with and without esds and
// reads them back.
func TestFormatParse(t *testing.T) {
	for _, c := range []Cell{
		Must(Cubic, F, 8.0827), Must(Tetragonal, I, 3.2523, 4.9461), Must(Hexagonal, P, 3.2094, 5.2105),
		Must(Rhombohedral, R, 5.0356, 13.7489), Must(Orthorhombic, P, 12.2665, 4.8875, 8.3697),
		Must(Monoclinic, P, 7.5878, 4.1397, 6.0594, 101.529), {Triclinic, P, 6.12, 10.69, 5.96, 82.35, 107.33, 102.6},
	} {
		for _, e := range []ESD{{}, {A: 3e-5, B: 4e-5, C: 1.3e-4, Alpha: 0.002, Beta: 0.01, Gamma: 0.003}} {
			text := Format(c, e)
			got, ge, err := Parse(text)
			if err != nil || !near(got, c) {
				t.Errorf("Format %q → %v, %v; want %v", text, got, err, c)
			}
			if e.A > 0 && ge.A == 0 {
				t.Errorf("Format %q lost the esd", text)
			}
		}
	}
}

// FuzzParse checks that every cell Parse accepts is usable and prints to a
// text that Parse reads back as the same cell.
func FuzzParse(f *testing.F) {
	for _, s := range []string{"cubic F a=5.6402(3)", "monoclinic C a=9.41 b=5.38 c=6.12 beta=102.4",
		"triclinic P a=6.12 b=10.69 c=5.96 alpha=82.35 beta=107.33 gamma=102.6", "rhombohedral a=5 c=13", "orthorhombic A a=1 b=2 c=3"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		c, e, err := Parse(s)
		if err != nil {
			return
		}
		if err := c.Check(); err != nil {
			t.Fatalf("Parse(%q) accepted an unusable cell: %v", s, err)
		}
		text := Format(c, e)
		c2, _, err := Parse(text)
		if err != nil {
			t.Fatalf("%q → %q: %v", s, text, err)
		}
		if c2.System != c.System || c2.Centring != c.Centring {
			t.Fatalf("%q → %q → %v", s, text, c2)
		}
	})
}

// TestSublattices: a three-dimensional lattice has 1, 7, 13 and 35
// sublattices of index 1 to 4 (the subgroups of index n of Z³, the
// sequence A001001 of the OEIS, from memory), each basis has
// determinant n, and no two generate the same sublattice.
func TestSublattices(t *testing.T) {
	for n, want := range map[int]int{1: 1, 2: 7, 3: 13, 4: 35} {
		bs := Sublattices(n)
		if len(bs) != want {
			t.Errorf("index %d: %d sublattices, want %d", n, len(bs), want)
		}
		for i, b := range bs {
			if d := b.Det(); math.Abs(d-float64(n)) > 1e-9 {
				t.Errorf("index %d: basis %v has determinant %g", n, b, d)
			}
			for _, c := range bs[i+1:] {
				// One lattice: each basis is an integer combination
				// of the other's vectors.
				inv, _ := c.Inverse()
				m := b.Mul(inv)
				whole := true
				for _, row := range m {
					for _, x := range row {
						whole = whole && math.Abs(x-math.Round(x)) < 1e-9
					}
				}
				if whole {
					t.Errorf("index %d: %v and %v are one sublattice", n, b, c)
				}
			}
		}
	}
}

// TestG6Distance: the Euclidean distance of Gruber vectors, worked by
// hand (a 3-4-5 triangle in two components, and no distance to itself).
func TestG6Distance(t *testing.T) {
	for _, tc := range []struct {
		v, w G6
		want float64
	}{
		{G6{A: 9, B: 9, C: 9}, G6{A: 9, B: 9, C: 9}, 0},
		{G6{A: 10, B: 12, C: 14, Xi: 1}, G6{A: 13, B: 12, C: 14, Xi: 5}, 5},
		{G6{Eta: -2}, G6{Zeta: 2}, 2 * math.Sqrt2},
	} {
		if got := tc.v.Distance(tc.w); math.Abs(got-tc.want) > 1e-12 {
			t.Errorf("%+v to %+v: %g, want %g", tc.v, tc.w, got, tc.want)
		}
	}
}
