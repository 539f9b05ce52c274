package indexing

import "reticle/cell"

// superProbes is the number of the best cells whose doubled cells are
// tried when they leave lines unindexed, and whose halved cells are tried.
const superProbes = 3

// subcells returns the cells, refined and scored on the first lines, of
// the lattices of half the volume that contain the lattice of each of the
// superProbes best triclinic cands (the lattice with one of a, b, c, a +
// b, a + c, b + c, a + b + c halved added), reduced. A search over many
// parameters can settle on a cell of twice the volume that indexes the
// lines as well; the ranking then keeps the smaller cell unless the
// larger indexes lines beyond chance (see rankCands).
func subcells(ranked []*cand, first []obs, o Options, need int) []*cand {
	var out []*cand
	for _, k := range ranked[:min(len(ranked), superProbes)] {
		if k.c.System != cell.Triclinic {
			continue
		}
		g := k.c.Metric()
		for _, v := range [][3]float64{{1, 0, 0}, {0, 1, 0}, {0, 0, 1}, {1, 1, 0}, {1, 0, 1}, {0, 1, 1}, {1, 1, 1}} {
			// The first axis v holds is replaced by v/2.
			m := cell.Identity
			for ax := range 3 {
				if v[ax] != 0 {
					m[ax] = [3]float64{v[0] / 2, v[1] / 2, v[2] / 2}
					break
				}
			}
			r, err := cell.Reduce(cell.FromMetric(cell.Triclinic, cell.P, g.Transform(m)))
			if err != nil {
				continue
			}
			// Its lines are some of the refined cell's, at the same
			// places: assigned, not refined again (a refinement from
			// fewer calculated lines can settle on another assignment).
			s := &cand{c: r.Cell, zero: k.zero, zeroFree: k.zeroFree}
			s.assign(first, o.Wavelength, 0)
			if s.indexed < need {
				continue
			}
			s.figures(first, o.Wavelength)
			if s.m > 0 {
				out = append(out, s)
			}
		}
	}
	return out
}

// supercells returns the cells, refined and scored on the first lines,
// made by doubling one axis of each of the superProbes best cands that
// leave some of those lines unindexed, when the doubled cell indexes more
// of them than its extra calculated lines would by chance (see
// significantExtra): a superstructure's weak extra lines are exactly the
// lines its subcell cannot index, while a foreign phase's fall anywhere.
func supercells(ranked []*cand, first []obs, o Options, need int) []*cand {
	var out []*cand
	for _, k := range ranked[:min(len(ranked), superProbes)] {
		if k.indexed == len(first) {
			continue
		}
		for _, c := range doubled(k.c) {
			s := &cand{c: c, zero: k.zero, zeroFree: k.zeroFree}
			if !s.settle(first, o.Wavelength, 0, need) || s.indexed <= k.indexed {
				continue
			}
			s.figures(first, o.Wavelength)
			if s.m > 0 && significantExtra(s, k, first, o.Wavelength) {
				out = append(out, s)
			}
		}
	}
	return out
}

// doubled returns the cells with one axis of c doubled that keep its
// system: any axis of an orthorhombic or monoclinic cell, the c axis of a
// tetragonal or hexagonal one. Each comes primitive, and also centred
// where the centring translation of c has no part along the doubled axis
// (C when c doubles: a C or F cell keeps the C translation).
func doubled(c cell.Cell) []cell.Cell {
	var axes []int
	switch c.System {
	case cell.Orthorhombic, cell.Monoclinic:
		axes = []int{0, 1, 2}
	case cell.Tetragonal, cell.Hexagonal:
		axes = []int{2}
	default:
		return nil
	}
	var out []cell.Cell
	for _, ax := range axes {
		d := c
		switch ax {
		case 0:
			d.A *= 2
		case 1:
			d.B *= 2
		default:
			d.C *= 2
		}
		cens := []cell.Centring{cell.P}
		if ax == 2 && (c.Centring == cell.C || c.Centring == cell.F) && c.System != cell.Tetragonal {
			cens = append(cens, cell.C)
		}
		for _, cen := range cens {
			d.Centring = cen
			if d.Check() == nil {
				out = append(out, d)
			}
		}
	}
	return out
}
