package indexing

import (
	"context"
	"math"
	"sync"

	"reticle/cell"
)

// settingTol is how far a lattice found from raw lines may depart from a
// system's metric and still be tried in that system: about the scatter
// of cell parameters from lines measured to a few hundredths of a degree.
// The refinement in the system then decides whether it fits.
var settingTol = cell.Tolerance{Length: 0.004, Angle: 0.4}

// latticeKeep is how many lattices of the zone search, refined as
// triclinic cells, go on to the higher systems' descriptions.
const latticeKeep = 30

// lowSystems are the systems that the zone search supplies, highest first.
var lowSystems = []cell.System{cell.Orthorhombic, cell.Monoclinic, cell.Triclinic}

// searchZones finds lattices by the zone method and returns their
// descriptions in the wanted systems as settled cands.
func searchZones(ctx context.Context, first []obs, o Options, want map[cell.System]bool, need int, tick func()) ([]*cand, error) {
	// Passes at the zero offsets of the grid (zeroStep apart), the
	// windows widened as in the other searches; each lattice's
	// refinement then finds the offset.
	zeros := []float64{0}
	for z := zeroStep; z <= o.ZeroRange+1e-9; z += zeroStep {
		zeros = append(zeros, z, -z)
	}
	// The offsets are searched at once, one goroutine each (the outcome
	// is merged in a fixed order, so it does not depend on the schedule).
	formsAt := make([][]cell.QForm, len(zeros))
	errs := make([]error, len(zeros))
	var wg sync.WaitGroup
	for zi, z := range zeros {
		wg.Add(1)
		go func() {
			defer wg.Done()
			qs := make([]float64, len(first))
			ws := make([]float64, len(first))
			for i, l := range first {
				qs[i] = qOf(l.tt, z, o.Wavelength)
				ws[i] = dQ(l.tt, l.tol+screenExtra, o.Wavelength)
			}
			formsAt[zi], errs[zi] = zoneLattices(ctx, findZones(qs, ws, 4), qs, ws, need, o)
			tick()
		}()
	}
	wg.Wait()
	var lattices []cell.Reduced
	var latticeZero []float64
	seenLattice := map[[6]int64]bool{}
	for zi, z := range zeros {
		if errs[zi] != nil {
			return nil, errs[zi]
		}
		forms := formsAt[zi]
		for _, f := range forms {
			c, err := f.Cell(cell.Triclinic, cell.P)
			if err != nil || c.Volume() > o.MaxVolume {
				continue
			}
			red, err := cell.Reduce(c)
			if err != nil {
				continue
			}
			key, _ := reducedKey(f)
			if !seenLattice[key] {
				seenLattice[key] = true
				lattices = append(lattices, red)
				latticeZero = append(latticeZero, z)
			}
		}
	}
	// Each lattice is first refined as it is (triclinic); the best go on
	// to their descriptions in the higher systems.
	var tri []*cand
	for i, red := range lattices {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		k := &cand{c: red.Cell, zero: latticeZero[i], zeroFree: o.ZeroRange > 0}
		if !k.settle(first, o.Wavelength, screenExtra, need) || math.Abs(k.zero) > o.ZeroRange+2*zeroStep {
			continue
		}
		k.figures(first, o.Wavelength)
		if k.m > 0 {
			tri = append(tri, k)
		}
	}
	tri = bestCands(tri, latticeKeep)
	var out []*cand
	for _, t := range tri {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		red, err := cell.Reduce(t.c)
		if err != nil {
			continue
		}
		for _, s := range []cell.System{cell.Cubic, cell.Tetragonal, cell.Hexagonal, cell.Rhombohedral, cell.Orthorhombic, cell.Monoclinic, cell.Triclinic} {
			if !want[s] {
				continue
			}
			if s == cell.Triclinic {
				out = append(out, t)
				continue
			}
			sts := cell.Settings(red, s, settingTol)
			if len(sts) > 2 {
				sts = sts[:2]
			}
			for _, st := range sts {
				c := st.Cell
				c.System = s
				if c.A > o.MaxEdge || c.B > o.MaxEdge || c.C > o.MaxEdge {
					continue
				}
				k := &cand{c: c, zero: t.zero, zeroFree: t.zeroFree}
				if !k.settle(first, o.Wavelength, 0, need) {
					continue
				}
				// The refined cell in its system's conventional setting.
				if cc, _, err := cell.Conventional(k.c); err == nil {
					k.c = cc
					k.assign(first, o.Wavelength, 0)
				}
				if math.Abs(k.zero) > o.ZeroRange+2*zeroStep || k.c.Volume() > o.MaxVolume {
					continue
				}
				k.figures(first, o.Wavelength)
				if k.m > 0 {
					out = append(out, k)
				}
			}
		}
	}
	return out, nil
}

// candOf turns a fit of the two-parameter search into a cand.
func candOf(f *fit, first []obs, o Options, need int) *cand {
	k := &cand{c: f.cell(), zero: f.zero, zeroFree: f.zeroFree}
	if !k.settle(first, o.Wavelength, 0, need) {
		return nil
	}
	k.figures(first, o.Wavelength)
	if !(k.m > 0) {
		return nil
	}
	return k
}

// bestCands returns up to n cands of highest score, one per cell.
func bestCands(ks []*cand, n int) []*cand { return bestDistinct(ks, n, betterCand, sameCand) }

// betterCand orders cands by score, then indexed lines, then volume,
// then deterministically by their cells.
func betterCand(a, b *cand) bool {
	if sa, sb := a.score(), b.score(); sa != sb {
		return sa > sb
	}
	if a.indexed != b.indexed {
		return a.indexed > b.indexed
	}
	if va, vb := a.c.Volume(), b.c.Volume(); va != vb {
		return va < vb
	}
	if a.c.System != b.c.System {
		return a.c.System < b.c.System
	}
	return a.c.Centring < b.c.Centring
}

// sameCand reports whether two cands are one cell: same system and
// centring, same lattice.
func sameCand(a, b *cand) bool { return sameCell(a.c, b.c, 5e-4) }

// sameCell reports whether two cells have one system and centring and
// describe one lattice within tol (see cell.SameLattice).
func sameCell(a, b cell.Cell, tol float64) bool {
	return a.System == b.System && a.Centring == b.Centring && cell.SameLattice(a, b, tol)
}
