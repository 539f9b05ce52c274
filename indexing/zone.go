package indexing

import (
	"cmp"
	"context"
	"math"
	"math/bits"
	"slices"
	"sort"

	"reticle/cell"
)

// The lattices of every system are found by the zone method (Ito, as
// developed by Visser, J. Appl. Cryst. 2 (1969) 89), which needs no
// assumption about symmetry:
//
//  1. Zones. Any two reciprocal vectors a*, b* span a plane of the
//     reciprocal lattice, in which Q(h, k) = h²Q_a + k²Q_b + 2hk·R. Two
//     low lines are tried as a* and b* (or as their second orders), and
//     every pair of observed lines Q_k, Q_l with Q_k + Q_l = 2(Q_a + Q_b)
//     is tried as the pair (1, ±1), which gives R = (Q_l − Q_k)/4. A zone
//     is kept when it indexes several lines.
//  2. Lattices. Two zones that share a row (a vector of equal Q in each)
//     give a* and two more vectors whose only unknown product is found
//     from the lines that neither zone indexes: each such line and index
//     triple proposes a value, and the values that many lines agree on
//     are tried.
//     When one zone holds most of the lines, its third vector is also
//     found from the lines off it alone (layerLattices): a lattice
//     with one short edge shows too few of those for a second zone.
//     When the cells found leave lines unexplained, the zones seen
//     through a row of orders instead of their reduced basis
//     (rowZones) are combined as well.
//  3. Symmetry. Each lattice is Niggli reduced, and its descriptions in
//     every system whose metric it has within the tolerance of the lines
//     (cell.Settings) become candidate cells, centred where the setting
//     is.
//
// The search is exhaustive within stated bounds: the first zoneBase lines
// as zone axes (and their second orders), index vectors up to zoneIndex
// in the third step, and the volume and edge limits of Options.

// zoneBase is how many of the first lines are tried as zone axes. A
// lattice with one short edge (2–4 Å beside edges of 7–14 Å) has no
// reciprocal vector off its densest zone among the first eight lines, and
// with two foreign lines among them even its second zone can be missing;
// every zone that completes such a lattice then lies beyond them, within
// the first sixteen (BENCHMARKS.md has the measurements).
const zoneBase = 16

// zoneKeep is how many zones go on to be combined.
const zoneKeep = 40

// zoneIndex bounds the indices tried for the third product.
const zoneIndex = 3

// A zone is a plane of the reciprocal lattice: Q(h, k) = h²qa + k²qb +
// 2hk·r, with the number of first lines it indexes.
type zone struct {
	qa, qb, r float64
	n         int
}

// q returns Q(h, k).
func (z zone) q(h, k int) float64 {
	x, y := float64(h), float64(k)
	return x*x*z.qa + y*y*z.qb + 2*x*y*z.r
}

// reduce returns the zone with a Lagrange–Gauss reduced basis: qa ≤ qb,
// 0 ≤ 2r ≤ qa.
func (z zone) reduce() zone {
	for it := 0; it < 50; it++ {
		if z.qb < z.qa {
			z.qa, z.qb = z.qb, z.qa
		}
		if math.Abs(2*z.r) <= z.qa*(1+1e-9) {
			break
		}
		k := math.Round(z.r / z.qa)
		z.qb, z.r = z.qb-2*k*z.r+k*k*z.qa, z.r-k*z.qa
	}
	z.r = math.Abs(z.r)
	return z
}

// key identifies a reduced zone: its basis rounded to parts in 2000.
func (z zone) key() [3]int64 {
	return [3]int64{int64(math.Round(math.Log(z.qa) * 2000)), int64(math.Round(math.Log(z.qb) * 2000)), int64(math.Round(z.r / z.qa * 2000))}
}

// zoneKeys returns the keys of the zones.
func zoneKeys(zs []zone) map[[3]int64]bool {
	m := make(map[[3]int64]bool, len(zs))
	for _, z := range zs {
		m[z.key()] = true
	}
	return m
}

// zoneQs lists the distinct Q of a zone up to qmax.
func (z zone) qs(qmax float64) []float64 {
	var out []float64
	det := z.qa*z.qb - z.r*z.r
	if !(det > 0) {
		return nil
	}
	// |h| ≤ √(qmax·qb/det), likewise k.
	hm := int(math.Sqrt(qmax*z.qb/det)) + 1
	km := int(math.Sqrt(qmax*z.qa/det)) + 1
	if hm*km > 20000 {
		return nil
	}
	for h := 0; h <= hm; h++ {
		for k := -km; k <= km; k++ {
			if h == 0 && k <= 0 {
				continue
			}
			if q := z.q(h, k); q <= qmax {
				out = append(out, q)
			}
		}
	}
	sort.Float64s(out)
	return out
}

// countIn returns how many of the lines (Q qs, windows ws) lie within
// their window of a value of the sorted list cl.
func countIn(cl, qs, ws []float64) int {
	n := 0
	for i, q := range qs {
		j := sort.SearchFloat64s(cl, q-ws[i])
		if j < len(cl) && cl[j] <= q+ws[i] {
			n++
		}
	}
	return n
}

// tally returns the zone reduced, with the number of lines (Q qs,
// windows ws) it indexes up to qmax, and whether it is new: not among
// seen, to which its key is added.
func tally(z zone, qs, ws []float64, qmax float64, seen map[[3]int64]bool) (zone, bool) {
	z = z.reduce()
	key := z.key()
	if seen[key] {
		return z, false
	}
	seen[key] = true
	z.n = countIn(z.qs(qmax), qs, ws)
	return z, true
}

// findZones returns the zones of the lines (Q qs, windows ws) that index
// at least minLines of them, best first, at most zoneKeep.
func findZones(qs, ws []float64, minLines int) []zone {
	qmax := qs[len(qs)-1] + ws[len(ws)-1]
	nb := min(zoneBase, len(qs))
	var out []zone
	seen := map[[3]int64]bool{}
	for i := 0; i < nb; i++ {
		for j := i; j < nb; j++ {
			for m := 1; m <= 2; m++ {
				for n := 1; n <= 2; n++ {
					qa, qb := qs[i]/float64(m*m), qs[j]/float64(n*n)
					wab := ws[i]/float64(m*m) + ws[j]/float64(n*n)
					sum := 2 * (qa + qb)
					for k := range qs {
						for l := k; l < len(qs); l++ {
							if math.Abs(qs[k]+qs[l]-sum) > ws[k]+ws[l]+2*wab {
								continue
							}
							r := (qs[l] - qs[k]) / 4
							if 2*r > math.Min(qa, qb)+wab {
								continue
							}
							if z, ok := tally(zone{qa: qa, qb: qb, r: r}, qs, ws, qmax, seen); ok && z.n >= minLines {
								out = append(out, z)
							}
						}
					}
				}
			}
		}
	}
	sort.SliceStable(out, func(a, b int) bool {
		if out[a].n != out[b].n {
			return out[a].n > out[b].n
		}
		// Of zones indexing as many lines, the denser lattice first.
		return out[a].qa*out[a].qb-out[a].r*out[a].r > out[b].qa*out[b].qb-out[b].r*out[b].r
	})
	if len(out) > zoneKeep {
		out = out[:zoneKeep]
	}
	return out
}

// rowZones returns the zones, not among seen, that hold a row of
// the reciprocal lattice whose orders are observed and three points of
// a parallel row: Ito's construction (Visser 1969) with a row in place
// of the pair of shortest vectors. findZones takes a zone only from its
// reduced basis lines; when a long edge's 00l orders crowd the low
// angles, the other basis line of a zone (h00, or 0k0) may be extinct or
// too weak to see while the rows beside the 00l row are seen, and the
// zone is missed.
//
// A line Q_a whose second and third orders, 4Q_a and 9Q_a, are observed
// too is taken as a row's first point a* (two orders besides the first
// make a row, not a chance coincidence of two lines). Any three lines j,
// k, l taken as points b*, b* + a*, b* + 2a* of a parallel row satisfy
// Q_l − 2Q_k + Q_j = 2Q_a, since Q(b* + n·a*) = Q_b + n²Q_a + 2n·r,
// which gives the product r = (Q_k − Q_j − Q_a)/2. The zones are
// returned most lines first, at most rowKeep.
func rowZones(qs, ws []float64, minLines int, seen map[[3]int64]bool) []zone {
	if seen == nil {
		seen = map[[3]int64]bool{}
	}
	qmax := qs[len(qs)-1] + ws[len(ws)-1]
	wmax := slices.Max(ws)
	nb := min(zoneBase, len(qs))
	var out []zone
	for i := 0; i < nb; i++ {
		qa, wa := qs[i], ws[i]
		if !observedAt(qs, ws, wmax, 4*qa, 4*wa) || !observedAt(qs, ws, wmax, 9*qa, 9*wa) {
			continue
		}
		for j := range qs {
			for k := range qs {
				if k == j {
					continue
				}
				want := 2*qa + 2*qs[k] - qs[j]
				w := 2*wa + 2*ws[k] + ws[j]
				if !observedAt(qs, ws, wmax, want, w) {
					continue
				}
				r := (qs[k] - qs[j] - qa) / 2
				if !(qa*qs[j]-r*r > 0) {
					continue
				}
				if z, ok := tally(zone{qa: qa, qb: qs[j], r: r}, qs, ws, qmax, seen); ok && z.n >= minLines {
					out = append(out, z)
				}
			}
		}
	}
	slices.SortStableFunc(out, func(a, b zone) int { return cmp.Compare(b.n, a.n) })
	return out[:min(len(out), rowKeep)]
}

// rowKeep is how many zones of rowZones, most lines first, go on to be
// combined with findZones' own: half as many as zoneKeep, since a row
// zone is wanted only where a long edge leaves few zones to find.
const rowKeep = zoneKeep / 2

// observedAt reports whether a line of the sorted qs (windows ws, the
// widest wmax) lies within w of q.
func observedAt(qs, ws []float64, wmax, q, w float64) bool {
	j := sort.SearchFloat64s(qs, q-w-wmax)
	for ; j < len(qs) && qs[j] <= q+w+ws[j]; j++ {
		if math.Abs(qs[j]-q) <= w+ws[j] {
			return true
		}
	}
	return false
}

// A row is a primitive vector of a zone with a vector that completes it
// to a basis of the zone: Q of both and their product.
type row struct {
	qu, qp, up float64
}

// rows lists the primitive vectors (h, k) of a zone with |h|, |k| ≤ 2 and
// their completions.
func (z zone) rows() []row {
	var out []row
	for h := 0; h <= 2; h++ {
		for k := -2; k <= 2; k++ {
			if h == 0 && k <= 0 || gcd(h, abs(k)) != 1 {
				continue
			}
			// (p1, p2) with h·p2 − k·p1 = 1.
			p1, p2 := complete(h, k)
			qu := z.q(h, k)
			qp := z.q(p1, p2)
			x, y := float64(h), float64(k)
			px, py := float64(p1), float64(p2)
			up := x*px*z.qa + y*py*z.qb + (x*py+y*px)*z.r
			out = append(out, row{qu, qp, up})
		}
	}
	return out
}

// complete returns (p1, p2) with h·p2 − k·p1 = 1 for coprime h, k.
func complete(h, k int) (int, int) {
	// Extended Euclid on (h, −k).
	g, x, y := extGCD(h, -k)
	if g < 0 {
		x, y = -x, -y
	}
	// h·x + (−k)·y = 1 → p2 = x, p1 = y.
	return y, x
}

func extGCD(a, b int) (int, int, int) {
	if b == 0 {
		return a, 1, 0
	}
	g, x, y := extGCD(b, a%b)
	return g, y, x - (a/b)*y
}

func gcd(a, b int) int {
	for b != 0 {
		a, b = b, a%b
	}
	return a
}

func abs(a int) int {
	if a < 0 {
		return -a
	}
	return a
}

// minFormFigure is the least figure (see countForm) of a lattice worth
// refining.
const minFormFigure = 3

// formKeep is how many lattices of the zone search, best figure first,
// are refined.
const formKeep = 150

// A scored form is a lattice of the zone search with its figure.
type scored struct {
	f     cell.QForm
	score float64
}

// zoneLattices combines pairs of zones into lattices (reciprocal forms in
// a primitive basis) that index at least need of the lines, and returns
// the formKeep best. Only pairs whose second zone is zs[from:] are tried.
func zoneLattices(ctx context.Context, zs []zone, from int, qs, ws []float64, need int, o Options) ([]cell.QForm, error) {
	qmax := qs[len(qs)-1] + ws[len(ws)-1]
	var out []scored
	seen := map[[6]int64]bool{}
	minDet := 1 / (o.MaxVolume * o.MaxVolume)
	rowsOf := make([][]row, len(zs))
	for i, z := range zs {
		rowsOf[i] = z.rows()
	}
	xs := make([]vote, 0, 4096)
	var order voteOrder
	top := newCutoff(formKeep, minFormFigure, qs, ws, need)
	lines := newLineSet(qs, ws, qmax)
	for i := range zs {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		for j := max(i+1, from); j < len(zs); j++ {
			for _, u := range rowsOf[i] {
				for _, v := range rowsOf[j] {
					tol := 2e-3*u.qu + 1e-5
					if math.Abs(u.qu-v.qu) > tol {
						continue
					}
					qu := (u.qu + v.qu) / 2
					// Basis (u, p, q): G* known but for X = p·q.
					base := [6]float64{qu, u.qp, v.qp, 0, u.up, v.up}
					xs = xs[:0]
					lim := math.Sqrt(u.qp * v.qp)
					for li, q := range qs {
						for a := -zoneIndex; a <= zoneIndex; a++ {
							for b := -zoneIndex; b <= zoneIndex; b++ {
								if b == 0 {
									continue
								}
								for c := 1; c <= zoneIndex; c++ {
									fa, fb, fc := float64(a), float64(b), float64(c)
									known := fa*fa*qu + fb*fb*u.qp + fc*fc*v.qp + 2*fa*fb*u.up + 2*fa*fc*v.up
									x := (q - known) / (2 * fb * fc)
									if math.Abs(x) > lim {
										continue
									}
									xs = append(xs, vote{x, ws[li] / (2 * math.Abs(fb*fc)), li})
								}
							}
						}
					}
					// A value of X that four distinct lines propose:
					// three agree by chance for many values, and each
					// chance lattice costs a count.
					for _, x := range agreed(xs, 4, &order) {
						g := base
						g[3] = x
						// Basis order (u, p, q): A = u·u, B = p·p,
						// C = q·q, D = 2p·q, E = 2u·q, F = 2u·p.
						f := cell.QForm{g[0], g[1], g[2], 2 * g[3], 2 * g[5], 2 * g[4]}
						if !(f.Reciprocal().Det() > minDet) {
							continue
						}
						// The count first: most lattices fail it, and
						// a repeated lattice fails it again (the cutoff
						// only rises).
						n, fig := lines.count(f, top.limit())
						if n < need || fig < minFormFigure {
							continue
						}
						score := fig * math.Pow(0.84, float64(len(qs)-n))
						if !top.admits(score) {
							continue
						}
						key, ok := reducedKey(f)
						if !ok || seen[key] {
							continue
						}
						seen[key] = true
						top.add(score)
						out = append(out, scored{f, score})
						if len(out) > 8*formKeep {
							out = bestForms(out, formKeep)
						}
					}
				}
			}
		}
	}
	out = bestForms(out, formKeep)
	fs := make([]cell.QForm, len(out))
	for i, x := range out {
		fs[i] = x.f
	}
	return fs, nil
}

// bestForms returns the n best scored forms, best first, the earlier of
// equal scores first: what a stable sort by score would give. Only the
// scores are sorted, to find the n-th best; the forms themselves are
// moved and stably sorted only for the n kept.
func bestForms(out []scored, n int) []scored {
	if len(out) > n {
		s := make([]float64, len(out))
		for i, x := range out {
			s[i] = x.score
		}
		slices.Sort(s)
		cut := s[len(s)-n] // the n-th best score
		above := 0
		for _, v := range s {
			if v > cut {
				above++
			}
		}
		// Every form above the cut, and the first of those at it.
		at := n - above
		kept := make([]scored, 0, n)
		for _, x := range out {
			switch {
			case x.score > cut:
				kept = append(kept, x)
			case x.score == cut && at > 0:
				kept = append(kept, x)
				at--
			}
		}
		out = kept
	}
	slices.SortStableFunc(out, func(a, b scored) int { return cmp.Compare(b.score, a.score) })
	return out
}

// A vote is a value of the unknown product proposed by a line.
type vote struct {
	x, w float64
	line int
}

// agreed returns the values that at least min distinct lines propose
// within their windows, one per cluster (the mean of its members). The
// votes are put in order of x (voteOrder.sort).
func agreed(vs []vote, min int, scratch *voteOrder) []float64 {
	scratch.sort(vs)
	var out []float64
	var lines []int // the distinct lines of a cluster (few)
	for i := 0; i < len(vs); {
		lines = lines[:0]
		var s, sw float64
		j := i
		for ; j < len(vs) && vs[j].x-vs[i].x <= vs[i].w+vs[j].w; j++ {
			if !slices.Contains(lines, vs[j].line) {
				lines = append(lines, vs[j].line)
				s += vs[j].x
				sw++
			}
		}
		if len(lines) >= min {
			out = append(out, s/sw)
			i = j
			continue
		}
		i++
	}
	return out
}

// voteOrder is the scratch of a sort of votes.
type voteOrder struct {
	keys []uint64
	tmp  []vote
}

// sort puts votes in increasing order of x, ties in the order given.
// Each vote's key is x's bits made to order as unsigned integers (the
// sign bit flipped, or every bit of a negative value) with the vote's
// place in the low bits: a sort of plain integers, several times faster
// than a sort of the structs by a comparison function (the zone search
// sorts thousands of votes for every pair of zones). The low bits give
// up the last 12 or so of x's 52 bits of mantissa, a relative 1e-12 —
// far below every window — to keep the order total and the outcome the
// same whatever the sort.
func (o *voteOrder) sort(vs []vote) {
	n := len(vs)
	shift := uint(bits.Len(uint(n)))
	o.keys = o.keys[:0]
	for i, v := range vs {
		b := math.Float64bits(v.x)
		if b>>63 == 1 {
			b = ^b
		} else {
			b |= 1 << 63
		}
		o.keys = append(o.keys, b>>shift<<shift|uint64(i))
	}
	slices.Sort(o.keys)
	o.tmp = append(o.tmp[:0], vs...)
	mask := uint64(1)<<shift - 1
	for i, k := range o.keys {
		vs[i] = o.tmp[k&mask]
	}
}

// reducedKey rounds the Niggli reduced Gruber vector of a form's lattice
// for de-duplication (keyOf).
func reducedKey(f cell.QForm) ([6]int64, bool) {
	c, err := f.Cell(cell.Triclinic, cell.P)
	if err != nil {
		return [6]int64{}, false
	}
	red, err := cell.Reduce(c)
	if err != nil {
		return [6]int64{}, false
	}
	return keyOf(red), true
}

// keyOf rounds a reduced lattice's Gruber vector for de-duplication:
// each edge² in relative steps of 1e-3 (half that in the edge), each
// product 2b·c·cos α, 2a·c·cos β, 2a·b·cos γ over its two edges
// (the cosine) in steps of 1e-3. Each component to its own scale: a
// short edge beside long ones is told apart to the same precision
// (steps of the mean edge² would merge short edges 1 % apart).
func keyOf(red cell.Reduced) [6]int64 {
	g := red.G6
	return [6]int64{
		int64(math.Round(math.Log(g.A) * 1000)),
		int64(math.Round(math.Log(g.B) * 1000)),
		int64(math.Round(math.Log(g.C) * 1000)),
		int64(math.Round(g.Xi / (2 * math.Sqrt(g.B*g.C)) * 1000)),
		int64(math.Round(g.Eta / (2 * math.Sqrt(g.A*g.C)) * 1000)),
		int64(math.Round(g.Zeta / (2 * math.Sqrt(g.A*g.B)) * 1000)),
	}
}

// A lineSet holds the lines (Q qs, windows ws, sorted) that countForm
// compares lattices with, and a lookup from Q to the lines.
type lineSet struct {
	qs, ws []float64
	qmax   float64
	scale  float64
	// start[b] is the first line at or above the bottom of bucket b of
	// [0, qmax]: a lookup that replaces a search per reflection.
	start [lineBuckets + 1]int32
	// padded is qs with +Inf after the last line (qs is padded without
	// it), so that the walk from a bucket's first line to the first line
	// at or above a Q needs no test of the end.
	padded []float64
	best   []float64 // countForm's scratch: each line's least discrepancy, and the pad's
}

const lineBuckets = 256

func newLineSet(qs, ws []float64, qmax float64) *lineSet {
	padded := append(slices.Clone(qs), math.Inf(1))
	l := &lineSet{qs: padded[:len(qs)], padded: padded, ws: ws, qmax: qmax, scale: lineBuckets / qmax * (1 - 1e-12), best: make([]float64, len(qs)+1)}
	for b, j := 0, 0; b <= lineBuckets; b++ {
		for j < len(qs) && qs[j]*l.scale < float64(b) {
			j++
		}
		l.start[b] = int32(j)
	}
	return l
}

// countForm counts the lines within their window of a Q of the form and
// gives a figure of merit of de Wolff's kind (discrepancies floored at a
// tenth of the window); it gives up (returning 0) when the form has more
// than maxFormLines lines below qmax, too many to tell a lattice from
// chance, or more than ncMax calculated lines up to the last line.
func countForm(f cell.QForm, qmax float64, qs, ws []float64, ncMax int) (int, float64) {
	return newLineSet(qs, ws, qmax).count(f, ncMax)
}

// count is countForm on the set's lines.
func (ls *lineSet) count(f cell.QForm, ncMax int) (int, float64) {
	qs, ws, qmax := ls.qs, ls.ws, ls.qmax
	g, ok := f.Reciprocal().Inverse()
	if !ok || !(g[0][0] > 0 && g[1][1] > 0 && g[2][2] > 0) {
		return 0, 0
	}
	hm := int(math.Sqrt(qmax * g[0][0]))
	km := int(math.Sqrt(qmax * g[1][1]))
	lm := int(math.Sqrt(qmax * g[2][2]))
	if (hm+1)*(2*km+1)*(2*lm+1) > 8*maxFormLines {
		return 0, 0
	}
	// Each calculated Q is looked up among the lines (sorted) rather
	// than the calculated list sorted: the nearest discrepancy of every
	// line and the number of calculated lines up to the last line.
	best := ls.best
	for i := range best {
		best[i] = math.Inf(1)
	}
	start, scale, padded := &ls.start, ls.scale, ls.padded
	qn := qs[len(qs)-1] * (1 + 1e-9)
	nc, total := 0, 0
	for h := 0; h <= hm; h++ {
		x := float64(h)
		for k := -km; k <= km; k++ {
			if h == 0 && k < 0 {
				continue
			}
			y := float64(k)
			base := f[0]*x*x + f[1]*y*y + f[5]*x*y
			// Q is C·l² + B·l + base along l: only the l between the
			// roots of Q = qmax can count (a little margin for
			// rounding; the test below decides).
			bl, c := f[3]*y+f[4]*x, f[2]
			disc := bl*bl - 4*c*(base-qmax)
			if disc < 0 {
				continue
			}
			sq := math.Sqrt(disc)
			// The integers between the roots, each root widened by a
			// relative 1e-9 for rounding (the test below decides).
			inv := 1 / (2 * c)
			r0, r1 := (-bl-sq)*inv, (-bl+sq)*inv
			e := 1e-9 * (1 + math.Abs(r0) + math.Abs(r1))
			l0 := max(-lm, int(math.Ceil(r0-e)))
			l1 := min(lm, int(math.Floor(r1+e)))
			if h == 0 && k == 0 {
				l0 = max(l0, 1) // one of each Friedel pair, and not the origin
			}
			for l := l0; l <= l1; l++ {
				z := float64(l)
				q := base + c*z*z + bl*z
				if q > qmax || q <= 0 {
					continue
				}
				total++
				if q <= qn {
					if nc++; nc > ncMax {
						return 0, 0
					}
				}
				// The first line at or above q, from its bucket on (the
				// pad stops the walk); and the line below it.
				j := int(start[int(q*scale)])
				for padded[j] < q {
					j++
				}
				if d := padded[j] - q; d < best[j] {
					best[j] = d
				}
				if j > 0 {
					if d := q - padded[j-1]; d < best[j-1] {
						best[j-1] = d
					}
				}
			}
		}
	}
	if total > maxFormLines {
		return 0, 0
	}
	// Lines found and a figure of de Wolff's kind: Q_N over twice the
	// mean discrepancy and the number of calculated lines.
	n := 0
	var sum float64
	for i, d := range best[:len(qs)] {
		if d <= ws[i] {
			n++
			sum += math.Max(d, ws[i]/10)
		}
	}
	if n == 0 {
		return 0, 0
	}
	return n, qs[len(qs)-1] / (2 * sum / float64(n) * float64(max(nc, 1)))
}

// maxFormLines bounds the lines (counted with their Friedel mates once)
// below the last observed line of a lattice worth counting.
const maxFormLines = 4000
