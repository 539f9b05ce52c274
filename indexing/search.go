package indexing

import (
	"context"
	"math"
	"slices"
	"sort"

	"reticle/cell"
)

// searchSystem seeds, screens and settles the lattices of one system (and
// its centring variants) over the zero offsets, as cands settled on the
// first lines with need of them indexed; tick is called after each
// offset.
func searchSystem(ctx context.Context, s cell.System, want map[cell.System]bool, first []obs, zeros []float64, o Options, need int, tick func()) ([]*cand, error) {
	cen := cell.P
	if s == cell.Hexagonal && !want[cell.Hexagonal] {
		cen = cell.R
	}
	zeroFree := o.ZeroRange > 0
	settle := func(c cell.Cell, zero float64) *cand {
		k := &cand{c: c, zero: zero, zeroFree: zeroFree}
		if !k.settle(first, o.Wavelength, screenExtra, need) || math.Abs(k.zero) > o.zeroBound() ||
			k.c.A > o.MaxEdge || k.c.C > o.MaxEdge || k.c.Volume() > o.MaxVolume {
			return nil
		}
		k.figures(first, o.Wavelength)
		if !(k.m > 0) {
			return nil
		}
		return k
	}
	var ks []*cand
	// The cells kept, by lattice: the same lattice settled from another
	// seed or zero offset replaces the kept one when its figure is better
	// (a seed at a poor zero offset can settle into a poorer minimum).
	settled := map[[2]int64]int{}
	tried := map[[3]int64]bool{}
	type screened struct {
		t   trial
		fig float64
	}
	var trials []screened
	seed, four := seedLines(first, o.SeedLines), seedLines(first, 4)
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
		seeds(s, cen, qs, ws, z, seed, four, o, func(t trial) {
			if density(&t, qs[len(qs)-1]) > maxCalc {
				return
			}
			fig, ok := screen(&t, qs, ws, o.MaxImpurities)
			if !ok {
				return
			}
			// Seeds of one lattice from different lines agree to
			// about 1e-3; one of them is kept.
			ck := [3]int64{int64(math.Round(math.Log(t.pa) * 700)), int64(math.Round(math.Log(t.pc+1e-300) * 700)), int64(math.Round(t.zero * 1000))}
			if tried[ck] {
				return
			}
			tried[ck] = true
			trials = append(trials, screened{t, fig})
		})
		tick()
	}
	// The best screened trials are settled: the figure of a trial as
	// seeded tells a lattice from chance well enough to leave most
	// trials out (settleKeep).
	sort.SliceStable(trials, func(i, j int) bool { return trials[i].fig > trials[j].fig })
	for _, st := range trials[:min(len(trials), settleKeep)] {
		if k := settle(st.t.cell(), st.t.zero); k != nil {
			key := [2]int64{int64(math.Round(math.Log(k.c.A) * 10000)), int64(math.Round(math.Log(k.c.C) * 10000))}
			if i, ok := settled[key]; !ok {
				settled[key] = len(ks)
				ks = append(ks, k)
			} else if k.m > ks[i].m {
				ks[i] = k
			}
		}
	}
	ks = bestCands(ks, keep)
	pool := append([]*cand(nil), ks...)
	// Centring variants of the primitive lattices.
	for _, k := range ks {
		for _, v := range variants(k.c.System, want) {
			c := k.c
			c.System, c.Centring = v.sys, v.cen
			if g := settle(c, k.zero); g != nil {
				pool = append(pool, g)
			}
		}
	}
	return pool, nil
}

// settleKeep is how many screened trials of each system are settled,
// best figure first: four times the cells kept (keep), since a trial
// settles into the same cell as others or into none.
const settleKeep = 4 * keep

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

// seedLines returns the indices, in order of angle, of the first n lines
// and of the first n lines stronger than strongCut. A foreign phase of a
// few per cent shows weak lines only (see strongCut), and where they
// come first the sample's own cell would go unseeded among the first n;
// its strong lines seed it whatever comes before them.
func seedLines(ls []obs, n int) []int {
	out := strongLines(ls, n)
	for i := range min(n, len(ls)) {
		out = append(out, i)
	}
	slices.Sort(out)
	return slices.Compact(out)
}

// seeds calls visit with every candidate lattice of system s from the Q
// values qs of the first lines at zero offset z, seeded by the lines
// seed lists (seedLines, in order of angle; four is the first four of
// them and of the strong ones, see seedLines):
//   - cubic: each seed line as each h²+k²+l² ≤ 2·MaxM + MaxL²;
//   - two-parameter systems, three families that together cover every cell
//     with a low-index line among the seed lines:
//     (a) every pair of the lines of four as every pair of index
//     vectors with m ≤ 9 and l ≤ 4 (m = h²+k² or h²+hk+k²);
//     (b) one seed line as hk0 (m ≤ MaxM), which fixes 1/a², and each of
//     the first three lines that this does not index as any (m ≤ MaxM,
//     1 ≤ l ≤ MaxL), which fixes 1/c²;
//     (c) the same with a 00l line (l ≤ MaxL) fixing 1/c² first.
func seeds(s cell.System, cen cell.Centring, qs, ws []float64, z float64, seed, four []int, o Options, visit func(trial)) {
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
		for _, i := range seed {
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
	// (a) pairs of the lines of four.
	for x, i := range four {
		for _, j := range four[x+1:] {
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
	for _, i := range seed {
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
	for _, i := range seed {
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
// Q values qs within windows ws, and gives its figure: de Wolff's M_N of
// the trial as it stands (Q_N over twice the mean discrepancy of the
// lines it indexes, each at least a tenth of its window, and the
// estimated number of calculated lines, see density), times (indexed/N)⁴
// as the ranking of cells within a search does (see cand.score).
func screen(t *trial, qs, ws []float64, maxImp int) (float64, bool) {
	miss := 0
	var sum float64
	for i, q := range qs {
		_, _, qc, ok := t.assign(q, ws[i])
		if !ok {
			miss++
			if miss > maxImp {
				return 0, false
			}
			continue
		}
		sum += math.Max(math.Abs(q-qc), ws[i]/10)
	}
	n := len(qs)
	idx := float64(n - miss)
	qn := qs[n-1]
	m := qn / (2 * sum / idx * math.Max(density(t, qn), 1))
	r := idx / float64(n)
	return m * r * r * r * r, true
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
