package indexing

import (
	"context"
	"math"

	"gonum.org/v1/gonum/mat"

	"reticle/cell"
)

// deriveProbes is how many of the best ranked lattices have their
// derivative lattices tried.
const deriveProbes = 3

// deriveIndices are the indices of the derivative lattices tried: a
// superstructure or a centring doubles, triples or quadruples the cell
// (Kroll, Stöckelmann & Heinemann, J. Appl. Cryst. 44 (2011) 812).
var deriveIndices = []int{2, 3, 4}

// derivatives returns cands of the lattices related to the best ranked
// ones, which the searches may have missed or found in a lower
// description:
//   - the lattice itself in every system of higher symmetry whose metric
//     it has within its own uncertainty (see tolerance): a tetragonal I
//     cell with c/a = √2 within its esds is a cubic F lattice, a
//     monoclinic cell with β = 90° within its esd an orthorhombic one
//     (the lattice is found from the Niggli cell by the search for
//     twofold axes of cell.Settings, Le Page 1982);
//   - its superlattices of index 2, 3 and 4 (subcells), each in every
//     system its metric allows.
//
// The evidence then decides: a subcell that explains every line the
// larger cell explains wins by its fewer calculated lines, and a higher
// lattice when the lower one's extra freedom does not buy a better fit
// than its Occam factor costs. Supercells are not made here: the
// searches propose them (long axes from the two-parameter seeds, any
// lattice from the zone method), and a supercell made from every
// candidate that leaves a line unexplained explains foreign lines by
// chance more often than it finds a superstructure (BENCHMARKS.md). The
// evidence's splits decide whether a supercell's extra lines are seen
// (split.go).
func derivatives(ctx context.Context, ranked []*cand, first, all []obs, o Options, want map[cell.System]bool, need int) ([]*cand, error) {
	seen := map[[6]int64]bool{}
	for _, k := range ranked {
		if key, ok := reducedKey(k.c.QForm()); ok {
			seen[key] = true
		}
	}
	var out []*cand
	for _, k := range ranked[:min(len(ranked), deriveProbes)] {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		w := k.whole
		red, err := cell.Reduce(w.c)
		if err != nil {
			continue
		}
		higher := map[cell.System]bool{}
		for s := range want {
			if s.LaueOrder() > k.c.System.LaueOrder() {
				higher[s] = true
			}
		}
		if len(higher) > 0 {
			out = append(out, describeLattice(red, w.zero, k.zeroFree, first, o, higher, need, w.tolerance(all, o.Wavelength))...)
		}
		g := red.G6.Metric()
		gr, ok := g.Inverse()
		if !ok {
			continue
		}
		for _, m := range deriveIndices {
			for _, h := range cell.Sublattices(m) {
				// A subcell: a sublattice of the reciprocal lattice.
				// It must index every line the cell indexes: a
				// subcell is the answer only when the larger cell's
				// extra lines are not needed.
				if gs, ok := h.Mul(gr).Mul(h.T()).Inverse(); ok {
					out = append(out, derived(gs, seen, w, first, o, want, max(need, k.indexed))...)
				}
			}
		}
	}
	return out, nil
}

// derived returns the cands of the lattice of metric g (a primitive
// basis) in every wanted system, unless it was seen or is out of bounds.
func derived(g cell.Matrix, seen map[[6]int64]bool, parent *cand, first []obs, o Options, want map[cell.System]bool, need int) []*cand {
	c := cell.FromMetric(cell.Triclinic, cell.P, g)
	if c.Check() != nil || c.Volume() > o.MaxVolume {
		return nil
	}
	red, err := cell.Reduce(c)
	if err != nil || red.Cell.A < minTranslation {
		return nil
	}
	key, ok := reducedKey(red.Cell.QForm())
	if !ok || seen[key] {
		return nil
	}
	seen[key] = true
	// The lattice as it stands first: its descriptions of higher
	// symmetry have the same lines, or fewer, so they index no more.
	k := &cand{c: red.Cell, zero: parent.zero, zeroFree: parent.zeroFree}
	if !k.settle(first, o.Wavelength, 0, need) || math.Abs(k.zero) > o.zeroBound() {
		return nil
	}
	k.figures(first, o.Wavelength)
	var out []*cand
	if want[cell.Triclinic] && k.m > 0 {
		out = append(out, k)
	}
	return append(out, describeLattice(red, parent.zero, parent.zeroFree, first, o, want, need, settingTol)...)
}

// maxTolerance bounds tolerance: 2 % in the edges, 2° in the angles.
var maxTolerance = cell.Tolerance{Length: 0.02, Angle: 2}

// tolerance returns how far the cand's lattice may depart from a higher
// system's metric and still be tried in it: four standard deviations of
// its edges (relative) and angles, from the covariance of its parameters
// refined on the lines it indexes (scaled by χ²/ν when above one), and
// not less than settingTol, the scatter of cells found from raw lines.
func (k *cand) tolerance(ls []obs, lambda float64) cell.Tolerance {
	tol := settingTol
	basis := cell.Basis(k.c.System)
	np := k.nparams()
	f := k.c.QForm()
	grad := make([]float64, np)
	a := mat.NewSymDense(np, nil)
	var chi2 float64
	n := 0
	for i, l := range ls {
		if i >= len(k.ref) || k.ref[i] < 0 {
			continue
		}
		tt, ok := k.gradient(k.calc[k.ref[i]].h, f, basis, lambda, grad)
		if !ok {
			continue
		}
		w := 1 / (l.esd*l.esd + weightFloor*weightFloor)
		for p := 0; p < np; p++ {
			for q := p; q < np; q++ {
				a.SetSym(p, q, a.At(p, q)+w*grad[p]*grad[q])
			}
		}
		d := l.tt - k.shift(tt) - tt
		chi2 += w * d * d
		n++
	}
	if n <= np {
		return tol
	}
	var ch mat.Cholesky
	if !ch.Factorize(a) {
		return tol
	}
	var cov mat.SymDense
	if err := ch.InverseTo(&cov); err != nil {
		return tol
	}
	scale := math.Max(1, chi2/float64(n-np))
	jac := k.c.ReciprocalToDirect()
	var sd [6]float64
	for i := 0; i < 6; i++ {
		var v float64
		for p := range basis {
			for q := range basis {
				v += jac[i][p] * cov.At(p, q) * jac[i][q]
			}
		}
		sd[i] = math.Sqrt(math.Max(v*scale, 0))
	}
	p := k.c.Params()
	for i := 0; i < 3; i++ {
		tol.Length = math.Max(tol.Length, 4*sd[i]/p[i])
	}
	for i := 3; i < 6; i++ {
		tol.Angle = math.Max(tol.Angle, 4*sd[i])
	}
	// A cell known this poorly is no evidence of any metric; the search
	// stops there.
	tol.Length, tol.Angle = math.Min(tol.Length, maxTolerance.Length), math.Min(tol.Angle, maxTolerance.Angle)
	return tol
}
