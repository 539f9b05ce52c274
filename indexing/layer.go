package indexing

import (
	"maps"
	"math"
	"math/bits"
	"slices"

	"gonum.org/v1/gonum/mat"

	"reticle/cell"
)

// Layers over one zone. A lattice whose lines lie mostly in one zone
// (one edge much shorter than the others, or a few lines only) shows
// few lines off it, often too few for a second zone of the lattice to
// be found, and then the zone method (zoneLattices) cannot combine two.
// The zone itself fixes two reciprocal vectors p, q; a third, r, adds
// the layers of reflections (i, j, m) with m ≠ 0:
//
//	Q = i²·p·p + j²·q·q + 2ij·p·q + m²·C + 2m(i·D + j·E),
//
// with C = r·r, D = r·p and E = r·q, linear in the three unknowns.
// Taking r as the shortest vector of the first layer (its projection
// on the zone within the zone's reduced mesh, so that |2D| ≤ p·p and
// |2E| ≤ q·q; or, in a second search, one a mesh step from it,
// layerReach), the lowest line off the zone is taken as (0, 0, 1),
// which gives C (or the next lowest, layerAnchors), and every other line
// off the zone and index triple (i, j, m) proposes a straight line in
// the plane of (D, E). Where lines of several observed lines cross is
// the third vector: a Hough transform (Hough, US patent 3 069 654,
// 1962; Duda & Hart, Comm. ACM 15 (1972) 11) over a grid of the mesh,
// each crossing then refined by least squares on the lines it holds.

// layerShare is the least share of the lines a zone must index for its
// layers to be searched. Up to Q_N a plane of the reciprocal lattice
// holds about π·Q_N/A* points (A* its mesh's area) and the lattice
// about (4π/3)·Q_N^{3/2}/V*, so one zone holds most of the first lines
// only when the reciprocal vector off it is long, |r|² of the order of
// Q_N: a short edge, or few lines. That is the case the zone method
// fails on, as the lines off the zone are then few.
const layerShare = 0.5

// layerZones is how many zones, most lines first, have their layers
// searched.
const layerZones = 3

// layerAnchors is how many of the lowest lines off a zone are tried as
// its first layer's shortest reflection: one of them may be foreign, or
// of the second layer.
const layerAnchors = 2

// layerGrid is the number of cells of the Hough grid along each side of
// the mesh. The grid only finds where the proposals meet; least squares
// then places the crossing (layerFit), so it needs to be no finer than
// the proposals of low index triples are thick (a window over 2m·|i|).
const layerGrid = 128

// layerMaxLines bounds the lines off a zone that vote (one bit each).
const layerMaxLines = 64

// layerAgree is the least number of observed lines off the zone,
// anchor included, whose proposals must meet: four, as in zoneLattices
// (three agree by chance for many values).
const layerAgree = 4

// layerPeaks is how many crossings of each anchor are refined.
const layerPeaks = 6

// layerLattices returns the lattices (reciprocal forms in a primitive
// basis) made of the zones zs that index at least layerShare of the
// lines (Q qs, windows ws), at most layerZones of them, and a third
// vector found from the lines off each zone, that index at least need
// of the lines with a figure of at least minFormFigure.
func layerLattices(zs []zone, qs, ws []float64, need int) []cell.QForm {
	qmax := qs[len(qs)-1] + ws[len(ws)-1]
	lines := newLineSet(qs, ws, qmax)
	var out []cell.QForm
	tried := 0
	for _, z := range zs {
		if tried == layerZones || float64(z.n) < layerShare*float64(len(qs)) {
			break
		}
		tried++
		z = z.reduce()
		zq := z.qs(qmax)
		var off []int
		for i, q := range qs {
			j, _ := slices.BinarySearch(zq, q-ws[i])
			if !(j < len(zq) && zq[j] <= q+ws[i]) {
				off = append(off, i)
			}
		}
		if len(off) == 0 {
			continue
		}
		if len(off) < layerAgree {
			// Too few lines off the zone to agree on a crossing: the
			// third vector at the special places alone, its first
			// layer's reflection each of the lowest lines off the zone.
			dMax, eMax := meshBounds(z, layerReach)
			for _, k := range off[:min(len(off), layerAnchors)] {
				for _, p := range halfMesh(z, dMax, eMax) {
					f, ok := layerForm(z, qs[k], p[0], p[1])
					if !ok {
						continue
					}
					if n, fig := lines.count(f, math.MaxInt32); n >= need && fig >= minFormFigure {
						out = append(out, f)
					}
				}
			}
			continue
		}
		off = off[:min(len(off), layerMaxLines)]
		for a := 0; a < min(layerAnchors, len(off)-layerAgree+1); a++ {
			for _, reach := range []float64{0.5, layerReach} {
				for _, f := range layerForms(z, off[a], off, qs, ws, reach) {
					if n, fig := lines.count(f, math.MaxInt32); n >= need && fig >= minFormFigure {
						out = append(out, f)
					}
				}
			}
		}
	}
	return out
}

// A layerVote is the straight line α·D + β·E = γ, within ±τ, that an
// observed line proposes for one index triple (i, j, m).
type layerVote struct {
	line       int // the observed line's place among those off the zone
	i, j, m    int
	al, be, ga float64
	tau        float64
}

// layerForms returns the forms of the zone z completed by a third vector
// whose first layer's reflection (0, 0, 1) is the line anchor, from the
// crossings of the proposals of the lines off (indices into qs, anchor
// among them) where |D| ≤ reach·p·p and |E| ≤ reach·q·q: a half for the
// shortest reflection of the layer, more for one near it.
func layerForms(z zone, anchor int, off []int, qs, ws []float64, reach float64) []cell.QForm {
	c0, w0 := qs[anchor], ws[anchor]
	dMax, eMax := meshBounds(z, reach)
	// The index pairs of a line's layer m: Q(i, j) ≤ Q + 2m(|i|·|D| +
	// |j|·|E|), within |i| ≤ (1 + m)·√(Q_N·q·q/det), likewise j (the
	// zone's pairs up to Q_N, and m times the mesh beyond).
	det := z.qa*z.qb - z.r*z.r
	qn := qs[len(qs)-1]
	im := int(math.Sqrt(qn*z.qb/det)) + 1
	jm := int(math.Sqrt(qn*z.qa/det)) + 1
	var votes []layerVote
	for li, k := range off {
		if k == anchor {
			continue
		}
		for m := 1; m <= 2; m++ {
			fm := float64(m)
			for i := -(m + 1) * im; i <= (m+1)*im; i++ {
				for j := -(m + 1) * jm; j <= (m+1)*jm; j++ {
					if i == 0 && j == 0 || z.q(i, j) > qs[k]+2*fm*(math.Abs(float64(i))*dMax+math.Abs(float64(j))*eMax) {
						continue
					}
					fi, fj := float64(i), float64(j)
					v := layerVote{line: li, i: i, j: j, m: m,
						al:  2 * fm * fi,
						be:  2 * fm * fj,
						ga:  qs[k] - fm*fm*c0 - z.q(i, j),
						tau: ws[k] + fm*fm*w0}
					// Only lines that cross the mesh.
					if math.Abs(v.ga) > math.Abs(v.al)*dMax+math.Abs(v.be)*eMax+v.tau {
						continue
					}
					votes = append(votes, v)
				}
			}
		}
	}
	// The Hough grid: in each cell, a bit per observed line whose
	// proposals cross it, and the closeness of the nearest proposal of
	// each such line summed (1 on the proposal, 0 at τ and half a cell
	// from it): the lines of a window as wide as the mesh cross most
	// cells, and the crossing is where they pass closest together.
	const n = layerGrid
	hd, he := 2*dMax/n, 2*eMax/n
	mask := make([]uint64, n*n)
	score := make([]float32, n*n)
	near := make([]float32, n*n) // this line's closeness
	mark := func(v layerVote, r, c int, d, e, pad float64) {
		w := float32(1 - math.Abs(v.al*d+v.be*e-v.ga)/pad)
		if w > near[r*n+c] {
			near[r*n+c] = w
		}
	}
	for start := 0; start < len(votes); {
		line := votes[start].line
		end := start
		for end < len(votes) && votes[end].line == line {
			end++
		}
		for _, v := range votes[start:end] {
			// A cell is crossed when the line passes within τ of it.
			pad := v.tau + (math.Abs(v.al)*hd+math.Abs(v.be)*he)/2
			if math.Abs(v.be)*he >= math.Abs(v.al)*hd {
				for c := range n {
					d := -dMax + (float64(c)+0.5)*hd
					r0, r1 := crossed(v.ga, v.al, v.be, d, pad, eMax, he, n)
					for r := r0; r <= r1; r++ {
						mark(v, r, c, d, -eMax+(float64(r)+0.5)*he, pad)
					}
				}
			} else {
				for r := range n {
					e := -eMax + (float64(r)+0.5)*he
					c0, c1 := crossed(v.ga, v.be, v.al, e, pad, dMax, hd, n)
					for c := c0; c <= c1; c++ {
						mark(v, r, c, -dMax+(float64(c)+0.5)*hd, e, pad)
					}
				}
			}
		}
		bit := uint64(1) << uint(line)
		for idx, w := range near {
			if w > 0 {
				mask[idx] |= bit
				score[idx] += w
				near[idx] = 0
			}
		}
		start = end
	}
	var out []cell.QForm
	// The special places first (halfMesh): when few lines lie off the
	// zone, their windows cross over much of the grid and the closest
	// crossing is a chance one, and these places are weighed beside it.
	for _, p := range halfMesh(z, dMax, eMax) {
		d, e := p[0], p[1]
		c, r := int(math.Floor((d+dMax)/hd)), int(math.Floor((e+eMax)/he))
		if bits.OnesCount64(mask[r*n+c])+1 < layerAgree {
			continue
		}
		if f, ok := layerFit(z, anchor, off, qs, ws, votes, mask[r*n+c], d, e); ok {
			out = append(out, f)
		}
	}
	// Then the cells crossed by layerAgree lines with the anchor at
	// least, closest crossing first, one of each neighbourhood (the
	// crossing of lines as thick as theirs is a ridge some cells wide),
	// and the same lattice's crossings: −r gives (−D, −E), and over a
	// rectangular zone (findZones makes one with p·q = 0 from a single
	// line) the mirror images (−D, E) and (D, −E) are lattices of the
	// same Q.
	drop := func(r, c int) {
		for rr := max(0, r-layerApart); rr <= min(n-1, r+layerApart); rr++ {
			for cc := max(0, c-layerApart); cc <= min(n-1, c+layerApart); cc++ {
				mask[rr*n+cc] = 0
			}
		}
	}
	for range layerPeaks {
		best := -1
		for idx, b := range mask {
			if bits.OnesCount64(b)+1 >= layerAgree && (best < 0 || score[idx] > score[best]) {
				best = idx
			}
		}
		if best < 0 {
			break
		}
		r, c := best/n, best%n
		if f, ok := layerFit(z, anchor, off, qs, ws, votes, mask[best], -dMax+(float64(c)+0.5)*hd, -eMax+(float64(r)+0.5)*he); ok {
			out = append(out, f)
		}
		drop(r, c)
		drop(n-1-r, n-1-c)
		if z.r == 0 {
			drop(r, n-1-c)
			drop(n-1-r, c)
		}
	}
	return out
}

// meshBounds returns the bounds of the place of the third vector
// searched with reach (|D| ≤ reach·p·p, |E| ≤ reach·q·q), a twentieth of
// the zone's mesh wider for the windows.
func meshBounds(z zone, reach float64) (dMax, eMax float64) {
	return (reach + 0.05) * z.qa, (reach + 0.05) * z.qb
}

// layerForm returns the lattice's form in the basis (p, q, r) of the
// zone z and a third vector r with C = r·r, D = r·p and E = r·q; false
// when they make no lattice.
func layerForm(z zone, c, d, e float64) (cell.QForm, bool) {
	// A = p·p, B = q·q, C = r·r, D = 2q·r, E = 2p·r, F = 2p·q.
	f := cell.QForm{z.qa, z.qb, c, 2 * e, 2 * d, 2 * z.r}
	return f, f.Reciprocal().Det() > 0
}

// halfMesh returns the special places (D, E) of the third vector r over
// the zone z within |D| < dMax and |E| < eMax: those where its
// projection on the zone is a point of the zone's half mesh, x·p + y·q
// with x and y whole or half (at most one step), D = r·p and E = r·q.
// There the lattice has a twofold axis normal to the zone (the rotation
// takes r to r − 2(x·p + y·q), a lattice vector), as the monoclinic and
// orthorhombic lattices have, and its reflections coincide in pairs.
// −r stands for r, so x ≥ 0.
func halfMesh(z zone, dMax, eMax float64) [][2]float64 {
	var out [][2]float64
	for _, x := range []float64{0, 0.5, 1} {
		for _, y := range []float64{-1, -0.5, 0, 0.5, 1} {
			if x == 0 && y < 0 {
				continue
			}
			d, e := x*z.qa+y*z.r, x*z.r+y*z.qb
			if math.Abs(d) < dMax && math.Abs(e) < eMax {
				out = append(out, [2]float64{d, e})
			}
		}
	}
	return out
}

// crossed returns the first and last of the n cells, of width h from
// −lim, along y that the line a·x + b·y = g, within ±pad, crosses at x.
func crossed(g, a, b, x, pad, lim, h float64, n int) (int, int) {
	lo, hi := (g-a*x-pad)/b, (g-a*x+pad)/b
	if lo > hi {
		lo, hi = hi, lo
	}
	return max(0, int(math.Floor((lo+lim)/h))), min(n-1, int(math.Floor((hi+lim)/h)))
}

// layerApart is how many cells of the Hough grid apart the crossings
// refined must lie, along each side: a thirty-second of the mesh.
const layerApart = layerGrid / 32

// layerFit refines C, D and E by weighted least squares on the anchor
// and, for each line whose bit is set in mask, the index triple whose
// proposal passes nearest (d, e); then, twice, on every line off the
// zone whose nearest calculated Q of the refined vector lies within its
// window. It returns the lattice's form in the basis (p, q, r).
func layerFit(z zone, anchor int, off []int, qs, ws []float64, votes []layerVote, mask uint64, d, e float64) (cell.QForm, bool) {
	c := qs[anchor]
	for it := range 3 {
		// The nearest proposal of each line: by its line's distance
		// from (d, e) at first, then by the refined Q's.
		best := map[int]layerVote{}
		miss := func(v layerVote) float64 {
			if it == 0 {
				return math.Abs(v.al*d+v.be*e-v.ga) / v.tau
			}
			fm := float64(v.m)
			return math.Abs(qs[off[v.line]]-fm*fm*c-2*fm*(float64(v.i)*d+float64(v.j)*e)-z.q(v.i, v.j)) / ws[off[v.line]]
		}
		for _, v := range votes {
			if it == 0 && mask&(uint64(1)<<uint(v.line)) == 0 || it > 0 && miss(v) > 1 {
				continue
			}
			if b, ok := best[v.line]; !ok || miss(v) < miss(b) {
				best[v.line] = v
			}
		}
		if len(best)+1 < layerAgree {
			return cell.QForm{}, false
		}
		// Rows: Q − Q(i, j) = m²·C + 2mi·D + 2mj·E, weighted by
		// 1/window.
		a := mat.NewDense(len(best)+1, 3, nil)
		y := mat.NewVecDense(len(best)+1, nil)
		a.SetRow(0, []float64{1 / ws[anchor], 0, 0})
		y.SetVec(0, qs[anchor]/ws[anchor])
		r := 1
		for _, li := range slices.Sorted(maps.Keys(best)) {
			v := best[li]
			k := off[li]
			fm, fi, fj := float64(v.m), float64(v.i), float64(v.j)
			w := ws[k]
			a.SetRow(r, []float64{fm * fm / w, 2 * fm * fi / w, 2 * fm * fj / w})
			y.SetVec(r, (qs[k]-z.q(v.i, v.j))/w)
			r++
		}
		var x mat.VecDense
		if err := x.SolveVec(a, y); err != nil {
			return cell.QForm{}, false
		}
		c, d, e = x.AtVec(0), x.AtVec(1), x.AtVec(2)
	}
	return layerForm(z, c, d, e)
}

// layerReach bounds the third vector's products with the zone's in a
// second search, |D| ≤ layerReach·p·p and |E| ≤ layerReach·q·q: the
// anchor may then be any reflection of the first layer within one step
// of the mesh of its shortest, which may be too weak to be seen.
const layerReach = 1.5
