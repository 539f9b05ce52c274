package indexing

import (
	"context"
	"reticle/cell"

	"math"
	"slices"
	"sort"
)

// searchSystem seeds, screens and settles the lattices of one system (and
// its centring variants) over the zero offsets; tick is called after each
// offset.
func searchSystem(ctx context.Context, s cell.System, want map[cell.System]bool, first []obs, zeros []float64, o Options, tick func()) ([]*fit, error) {
	cen := cell.P
	if s == cell.Hexagonal && !want[cell.Hexagonal] {
		cen = cell.R
	}
	var fits []*fit
	// The fits kept, by lattice: the same lattice settled from another
	// seed or zero offset replaces the kept one when its figure is better
	// (a seed at a poor zero offset can settle into a poorer minimum).
	settled := map[[2]int64]int{}
	tried := map[[3]int64]bool{}
	for _, z := range zeros {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		// Q and widened windows of the first lines at this zero.
		qs := make([]float64, len(first))
		ws := make([]float64, len(first))
		for i, l := range first {
			qs[i] = qOf(l.tt, z, o.Wavelength)
			ws[i] = dQ(l.tt, l.tol+screenExtra, o.Wavelength)
		}
		maxCalc := float64(maxCalcLines(len(first)))
		seeds(s, cen, qs, ws, z, o, func(t trial) {
			if density(&t, qs[len(qs)-1]) > maxCalc || !screen(&t, qs, ws, o.MaxImpurities) {
				return
			}
			// Seeds of one lattice from different lines agree to
			// about 1e-3; settle one of them.
			ck := [3]int64{int64(math.Round(math.Log(t.pa) * 700)), int64(math.Round(math.Log(t.pc+1e-300) * 700)), int64(math.Round(t.zero * 1000))}
			if tried[ck] {
				return
			}
			tried[ck] = true
			if f := settle(t, first, o); f != nil {
				k := [2]int64{int64(math.Round(math.Log(f.pa) * 5000)), int64(math.Round(math.Log(f.pc+1e-300) * 5000))}
				f.figures(first, o.Wavelength)
				if f.m20 > 0 {
					if i, ok := settled[k]; !ok {
						settled[k] = len(fits)
						fits = append(fits, f)
					} else if f.m20 > fits[i].m20 {
						fits[i] = f
					}
				}
			}
		})
		tick()
	}
	fits = best(fits, keep)
	pool := append([]*fit(nil), fits...)
	// Centring variants of the primitive lattices.
	for _, f := range fits {
		for _, v := range variants(f.sys, want) {
			t := f.trial
			t.sys, t.cen = v.sys, v.cen
			if g := settle(t, first, o); g != nil {
				g.figures(first, o.Wavelength)
				if g.m20 > 0 {
					pool = append(pool, g)
				}
			}
		}
	}
	return pool, nil
}

// variant is a system and centring to try on a lattice found primitive.
type variant struct {
	sys cell.System
	cen cell.Centring
}

func variants(s cell.System, want map[cell.System]bool) []variant {
	switch s {
	case cell.Cubic:
		return []variant{{cell.Cubic, cell.I}, {cell.Cubic, cell.F}}
	case cell.Tetragonal:
		return []variant{{cell.Tetragonal, cell.I}}
	case cell.Hexagonal:
		if want[cell.Rhombohedral] {
			return []variant{{cell.Rhombohedral, cell.R}}
		}
	}
	return nil
}

// seeds calls visit with every candidate lattice of system s from the Q
// values qs of the first lines at zero offset z:
//   - cubic: each of the first SeedLines lines as each h²+k²+l² ≤
//     2·MaxM + MaxL²;
//   - two-parameter systems, three families that together cover every cell
//     with a low-index line among the first SeedLines lines:
//     (a) every pair of the first four lines as every pair of index
//     vectors with m ≤ 9 and l ≤ 4 (m = h²+k² or h²+hk+k²);
//     (b) one of the first SeedLines lines as hk0 (m ≤ MaxM), which fixes
//     1/a², and each of the first three lines that this does not index as
//     any (m ≤ MaxM, 1 ≤ l ≤ MaxL), which fixes 1/c²;
//     (c) the same with a 00l line (l ≤ MaxL) fixing 1/c² first.
func seeds(s cell.System, cen cell.Centring, qs, ws []float64, z float64, o Options, visit func(trial)) {
	k := min(len(qs), o.SeedLines)
	emit := func(pa, pc float64) {
		if !(pa > 0) || s != cell.Cubic && !(pc > 0) {
			return
		}
		t := trial{sys: s, cen: cen, pa: pa, pc: pc, zero: z}
		var a, c, v float64
		switch s {
		case cell.Cubic:
			a = 1 / math.Sqrt(pa)
			c, v = a, a*a*a
		case cell.Tetragonal:
			a, c = 1/math.Sqrt(pa), 1/math.Sqrt(pc)
			v = a * a * c
		default:
			a, c = math.Sqrt(4/(3*pa)), 1/math.Sqrt(pc)
			v = math.Sqrt(3) / 2 * a * a * c
		}
		if a > o.MaxEdge || c > o.MaxEdge || v > o.MaxVolume {
			return
		}
		visit(t)
	}
	if s == cell.Cubic {
		nmax := 2*o.MaxM + o.MaxL*o.MaxL
		for i := 0; i < k; i++ {
			for n := 1; n <= nmax; n++ {
				if cubicAllowed(cell.P, n) {
					emit(qs[i]/float64(n), 0)
				}
			}
		}
		return
	}
	type vec struct{ m, l2 float64 }
	var small []vec
	for m := 0; m <= 9; m++ {
		for l := 0; l <= 4; l++ {
			if planeAllowed(s, cell.P, m, l) {
				small = append(small, vec{float64(m), float64(l * l)})
			}
		}
	}
	// (a) pairs of the first four lines.
	k4 := min(len(qs), 4)
	for i := 0; i < k4; i++ {
		for j := i + 1; j < k4; j++ {
			for _, u := range small {
				for _, v := range small {
					det := u.m*v.l2 - v.m*u.l2
					if det == 0 {
						continue
					}
					emit((qs[i]*v.l2-qs[j]*u.l2)/det, (u.m*qs[j]-v.m*qs[i])/det)
				}
			}
		}
	}
	// unexplained returns up to three lines, other than i, that no
	// (m, 0) (or (0, l)) of the fixed parameter explains.
	unexplained := func(i int, fits func(q, w float64) bool) []int {
		var out []int
		for j := 0; j < len(qs) && len(out) < 3; j++ {
			if j != i && !fits(qs[j], ws[j]) {
				out = append(out, j)
			}
		}
		return out
	}
	// (b) an hk0 line first.
	for i := 0; i < k; i++ {
		for m := 1; m <= o.MaxM; m++ {
			if !planeAllowed(s, cell.P, m, 0) {
				continue
			}
			pa := qs[i] / float64(m)
			for _, j := range unexplained(i, func(q, w float64) bool {
				n := math.Round(q / pa)
				return n >= 1 && n < tableSize && planeAllowed(s, cell.P, int(n), 0) && math.Abs(n*pa-q) <= w
			}) {
				for l := 1; l <= o.MaxL; l++ {
					for mm := 0; mm <= o.MaxM && float64(mm)*pa < qs[j]; mm++ {
						if planeAllowed(s, cell.P, mm, l) {
							emit(pa, (qs[j]-float64(mm)*pa)/float64(l*l))
						}
					}
				}
			}
		}
	}
	// (c) a 00l line first.
	for i := 0; i < k; i++ {
		for l := 1; l <= o.MaxL; l++ {
			pc := qs[i] / float64(l*l)
			for _, j := range unexplained(i, func(q, w float64) bool {
				n := math.Round(math.Sqrt(q / pc))
				return n >= 1 && math.Abs(n*n*pc-q) <= w
			}) {
				for m := 1; m <= o.MaxM; m++ {
					for ll := 0; ll <= o.MaxL && float64(ll*ll)*pc < qs[j]; ll++ {
						if planeAllowed(s, cell.P, m, ll) {
							emit((qs[j]-float64(ll*ll)*pc)/float64(m), pc)
						}
					}
				}
			}
		}
	}
}

// screen reports whether the trial indexes all but maxImp of the lines of
// Q values qs within windows ws.
func screen(t *trial, qs, ws []float64, maxImp int) bool {
	miss := 0
	for i, q := range qs {
		if _, _, _, ok := t.assign(q, ws[i]); !ok {
			miss++
			if miss > maxImp {
				return false
			}
		}
	}
	return true
}

// settle refines a trial: index with widened windows, refine parameters and
// zero, index with the true windows, refine again. It returns nil when too
// many lines stay unindexed.
func settle(t trial, ls []obs, o Options) *fit {
	f := &fit{trial: t}
	zeroFree := o.ZeroRange > 0
	f.assignAll(ls, o.Wavelength, screenExtra)
	if f.indexed < len(ls)-o.MaxImpurities || !f.refine(ls, o.Wavelength, zeroFree) {
		return nil
	}
	// Index and refine until the assignment stops changing.
	var prevM, prevL []int
	for pass := 0; pass < 6; pass++ {
		f.assignAll(ls, o.Wavelength, 0)
		if f.indexed < len(ls)-o.MaxImpurities || !f.refine(ls, o.Wavelength, zeroFree) {
			return nil
		}
		if slices.Equal(f.m, prevM) && slices.Equal(f.l, prevL) {
			break
		}
		prevM, prevL = f.m, f.l
	}
	if math.Abs(f.zero) > o.zeroBound() {
		return nil
	}
	f.assignAll(ls, o.Wavelength, 0)
	if f.indexed < len(ls)-o.MaxImpurities {
		return nil
	}
	c := f.cell()
	if c.A > o.MaxEdge || c.C > o.MaxEdge || c.Volume() > o.MaxVolume {
		return nil
	}
	return f
}

// maxCalcLines is the most calculated lines, up to the last of n
// observed lines, of a cell worth considering: 4 per observed line plus
// 20. A cell with more indexes lines largely by chance. It bounds the
// search (trials beyond it are not screened) and the ranking (cells
// beyond it are not ranked, whichever search found them).
func maxCalcLines(n int) int { return 4*n + 20 }

// density estimates the number of calculated lines up to q from the
// volume of the reciprocal sphere, (4π/3) q^(3/2) V, over the order of the
// Laue group (primitive lattice).
func density(t *trial, q float64) float64 {
	var v, order float64
	switch t.sys {
	case cell.Cubic:
		v, order = math.Pow(t.pa, -1.5), 48
	case cell.Tetragonal:
		v, order = 1/(t.pa*math.Sqrt(t.pc)), 16
	default:
		v, order = 2/math.Sqrt(3)/(t.pa*math.Sqrt(t.pc)), 24
	}
	return 4 * math.Pi / 3 * q * math.Sqrt(q) * v / order
}

// best returns up to n fits of highest M, distinct cells only.
func best(fs []*fit, n int) []*fit { return bestDistinct(fs, n, better, same) }

// bestDistinct orders xs by better (stably) and returns up to n of them,
// the first of each group that same says are one.
func bestDistinct[T any](xs []T, n int, better, same func(a, b T) bool) []T {
	sort.SliceStable(xs, func(i, j int) bool { return better(xs[i], xs[j]) })
	var out []T
	for _, x := range xs {
		dup := false
		for _, y := range out {
			if same(x, y) {
				dup = true
				break
			}
		}
		if !dup {
			out = append(out, x)
			if len(out) == n {
				break
			}
		}
	}
	return out
}

// better orders fits by their score, then by indexed lines, then
// deterministically by their parameters.
func better(a, b *fit) bool {
	if sa, sb := a.score(), b.score(); sa != sb {
		return sa > sb
	}
	if a.indexed != b.indexed {
		return a.indexed > b.indexed
	}
	if a.pa != b.pa {
		return a.pa < b.pa
	}
	return a.pc < b.pc
}

// score is M_N times (indexed/N)⁴: each line left unindexed costs about a
// fifth of the figure among 20 lines, so that a cell which explains fewer
// lines must be much sharper to rank above one that explains them all.
func (f *fit) score() float64 {
	r := float64(f.indexed) / float64(len(f.m))
	s := f.m20 * r * r * r * r
	return s
}

// same reports whether two fits are one cell: same system and centring,
// parameters within 2e-4.
func same(a, b *fit) bool {
	return a.sys == b.sys && a.cen == b.cen &&
		math.Abs(a.pa-b.pa) <= 4e-4*a.pa && math.Abs(a.pc-b.pc) <= 4e-4*math.Max(a.pc, 1e-300)
}
