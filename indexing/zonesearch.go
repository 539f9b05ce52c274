package indexing

import (
	"context"
	"math"
	"slices"
	"sort"
	"sync"

	"reticle/cell"
)

// settingTol is how far a lattice found from raw lines may depart from a
// system's metric and still be tried in that system: about the scatter
// of cell parameters from lines measured to a few hundredths of a degree.
// The refinement in the system then decides whether it fits.
var settingTol = cell.Tolerance{Length: 0.004, Angle: 0.4}

// latticeKeep is how many lattices of the zone search, refined as
// triclinic cells, go on to the higher systems' descriptions; heldKeep
// how many that could not be refined so (see zoneCands).
const (
	latticeKeep = 30
	heldKeep    = 10
)

// minTranslation is the shortest lattice translation, Å, of a lattice
// the zone method proposes (the first edge of its Niggli-reduced cell).
// No crystal has one much below 2.3 Å (beryllium's a = 2.29 Å and
// diamond's 2.52 Å are among the shortest; from memory), while lattices
// of edges near 1.5 Å can index the lines of a real cell by number
// coincidence: silicon's lines, those of Q ∝ 3, 8, 11, 16, … (the
// diamond glide leaves out 4, 12, 20, …), are all lines of a body-centred
// orthorhombic cell of edges a/√10, a/√2 and a.
const minTranslation = 2.0

// lowSystems are the systems that the zone search supplies, highest first.
var lowSystems = []cell.System{cell.Orthorhombic, cell.Monoclinic, cell.Triclinic}

// zoneSearch runs the zone method and returns its cands and the ranking
// of pool (the cands of the higher systems) with them. It runs at no zero
// offset first. When a cell it finds explains the lines (acceptable, the
// test that stops the search after the higher systems), the other
// offsets are not searched, except the one nearest the cell's refined
// offset when that is more than half a step from zero (beyond the reach
// of the windows, which are widened by half a step) and the cell is
// doubtful: a lattice seen through the wrong offset can pass the test
// while the true one needs its own, but a cell that the lines it was not
// found from confirm needs no second search, which costs as much as the
// first (BENCHMARKS.md records what it changed). Otherwise every offset of
// zeros is searched. The lattices of the offsets searched are refined
// together. tick is called once per offset of zeros, searched or not.
//
// When the first cell then leaves more of the first lines, or of all,
// unindexed than foreign lines would (leavesLines), or none was found,
// the lattices of rowZones' zones, whose reduced basis lines are not
// seen, are added at the searched offset nearest the first cell's, and
// all are ranked again. A search whose cell explains the lines does not
// need them, and is spared their cost and the chance lattices they add
// to the list of those refined.
func zoneSearch(ctx context.Context, first, all []obs, pool []*cand, o Options, want map[cell.System]bool, need int, zeros []float64, tick func()) (ks, ranked []*cand, err error) {
	searched := zeros[:1]
	forms, err := zoneForms(ctx, first, o, searched, need, false, tick)
	if err != nil {
		return nil, nil, err
	}
	memo := newLatticeMemo()
	for {
		if ks, err = zoneCands(ctx, first, o, want, need, searched, forms, memo); err != nil {
			return nil, nil, err
		}
		ranked = rankCands(append(pool, ks...), first, all, o)
		var next []float64
		switch {
		case len(searched) == len(zeros):
		case !(len(ranked) > 0 && acceptable(ranked[0], o.ExploreLower)):
			for _, z := range zeros {
				if !slices.Contains(searched, z) {
					next = append(next, z)
				}
			}
		case len(searched) == 1 && math.Abs(ranked[0].zero) > zeroStep/2 && doubtful(ranked[0], first, o):
			near := zeros[1]
			for _, z := range zeros[1:] {
				if math.Abs(z-ranked[0].zero) < math.Abs(near-ranked[0].zero) {
					near = z
				}
			}
			next = []float64{near}
		}
		if len(next) == 0 {
			break
		}
		more, err := zoneForms(ctx, first, o, next, need, false, tick)
		if err != nil {
			return nil, nil, err
		}
		searched = append(append([]float64(nil), searched...), next...)
		forms = append(forms, more...)
	}
	for range len(zeros) - len(searched) {
		tick()
	}
	if len(ranked) == 0 || leavesLines(ranked[0]) || ranked[0].whole != nil && leavesLines(ranked[0].whole) {
		// Lines left unexplained: the zones whose reduced basis
		// lines are not seen (rowZones) are tried too, at the searched
		// offset nearest the first cell's.
		at := 0
		for i, z := range searched {
			if len(ranked) > 0 && math.Abs(z-ranked[0].zero) < math.Abs(searched[at]-ranked[0].zero) {
				at = i
			}
		}
		more, err := zoneForms(ctx, first, o, searched[at:at+1], need, true, func() {})
		if err != nil {
			return nil, nil, err
		}
		forms[at] = append(forms[at], more[0]...)
		if ks, err = zoneCands(ctx, first, o, want, need, searched, forms, memo); err != nil {
			return nil, nil, err
		}
		ranked = rankCands(append(pool, ks...), first, all, o)
	}
	return ks, ranked, nil
}

// zoneForms runs the zone method at each of the zero offsets (degrees
// 2θ), one goroutine each, and returns the lattices (forms) found at each.
// The windows are widened as in the other searches; each lattice's
// refinement then finds the offset. With rows, it returns instead the
// lattices that rowZones' zones complete (with a zone of findZones or
// another of their own).
func zoneForms(ctx context.Context, first []obs, o Options, zeros []float64, need int, rows bool, tick func()) ([][]cell.QForm, error) {
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
			zs := findZones(qs, ws, 4)
			if rows {
				if rz := rowZones(qs, ws, 4, zoneKeys(zs)); len(rz) > 0 {
					formsAt[zi], errs[zi] = zoneLattices(ctx, append(zs, rz...), len(zs), qs, ws, need, o)
				}
			} else {
				formsAt[zi], errs[zi] = zoneLattices(ctx, zs, 0, qs, ws, need, o)
				formsAt[zi] = append(formsAt[zi], layerLattices(zs, qs, ws, need)...)
			}
			tick()
		}()
	}
	wg.Wait()
	for _, err := range errs {
		if err != nil {
			return nil, err
		}
	}
	return formsAt, nil
}

// doubtful reports whether the cell k, found from the lines first, is
// put in doubt by the lines it was not found from or by its own
// indexing: it leaves more of the next lines unexplained than chance
// allows (unexplainedLater), or every line it indexes lies in one zone
// (loneZone).
func doubtful(k *cand, first []obs, o Options) bool {
	if unexplainedLater(k, len(first)) {
		return true
	}
	_, lone := loneZone(k, first, o.Wavelength)
	return lone
}

// A latticeMemo keeps what zoneCands made of each lattice: its
// refinement as a triclinic cell (nil when that failed), by the
// lattice's reduced key, and its descriptions in the higher systems, by
// that cell. A later round of the zone search, at further offsets, then
// refines only the lattices it adds; the cands are the same objects, so
// their evidence is not taken again either. A lattice is refined at the
// offset where it was first found, which the fixed order of the rounds'
// forms makes the same in every round, so the outcome is that of
// refining every lattice afresh.
type latticeMemo struct {
	tri       map[[6]int64]*cand
	described map[*cand][]*cand
	// held are the lattices that index enough lines but whose lines do
	// not fix them as triclinic cells (see zoneCands), by key.
	held map[[6]int64]*cand
}

func newLatticeMemo() *latticeMemo {
	return &latticeMemo{tri: map[[6]int64]*cand{}, described: map[*cand][]*cand{}, held: map[[6]int64]*cand{}}
}

// zoneCands refines the lattices the zone method found at the zero
// offsets zeros (formsAt[i] at zeros[i]; merged in this fixed order, so
// the outcome does not depend on the schedule) and returns their
// descriptions in the wanted systems as settled cands; memo holds what
// earlier rounds made (see latticeMemo).
func zoneCands(ctx context.Context, first []obs, o Options, want map[cell.System]bool, need int, zeros []float64, formsAt [][]cell.QForm, memo *latticeMemo) ([]*cand, error) {
	// Each lattice is first refined as it is (triclinic); the best go on
	// to their descriptions in the higher systems. A lattice that
	// indexes enough lines whose refinement as a triclinic cell fails
	// (its lines do not fix all six parameters: the lines off one zone
	// too few to fix the third vector's three products) goes on as it
	// is, since a system's constraints may leave the lines enough to
	// fix the rest (an orthorhombic cell's third vector has one
	// parameter, its length); the first heldKeep of them, most lines
	// first.
	var tri, held []*cand
	seen := map[[6]int64]bool{}
	for zi, z := range zeros {
		for _, f := range formsAt[zi] {
			c, err := f.Cell(cell.Triclinic, cell.P)
			if err != nil || c.Volume() > o.MaxVolume {
				continue
			}
			red, err := cell.Reduce(c)
			if err != nil || red.Cell.A < minTranslation {
				continue
			}
			key := keyOf(red)
			if seen[key] {
				continue
			}
			seen[key] = true
			k, done := memo.tri[key]
			if !done {
				if err := ctx.Err(); err != nil {
					return nil, err
				}
				k = &cand{c: red.Cell, zero: z, zeroFree: o.ZeroRange > 0}
				settled := k.settle(first, o.Wavelength, screenExtra, need)
				ok := settled && math.Abs(k.zero) <= o.zeroBound()
				if ok {
					k.figures(first, o.Wavelength)
				}
				if !settled && k.indexed >= need {
					// Indexed enough, and the refinement failed.
					memo.held[key] = &cand{c: red.Cell, zero: z, zeroFree: o.ZeroRange > 0, indexed: k.indexed}
				}
				if !ok || !(k.m > 0) {
					k = nil
				}
				memo.tri[key] = k
			}
			if k != nil {
				tri = append(tri, k)
			} else if h := memo.held[key]; h != nil {
				held = append(held, h)
			}
		}
	}
	tri = bestCands(tri, latticeKeep)
	nTri := len(tri) // the held follow, not refined as triclinic cells
	tri = append(tri, bestCands(held, heldKeep)...)
	var out []*cand
	for i, t := range tri {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		red, err := cell.Reduce(t.c)
		if err != nil {
			continue
		}
		if want[cell.Triclinic] && i < nTri {
			out = append(out, t)
		}
		ds, done := memo.described[t]
		if !done {
			ds = describeLattice(red, t.zero, t.zeroFree, first, o, want, need, settingTol)
			memo.described[t] = ds
		}
		out = append(out, ds...)
	}
	return out, nil
}

// describeLattice returns the lattice of a reduced cell described in
// every wanted system other than triclinic whose metric it has within
// tol (at most the two best settings of each, cell.Settings), each
// settled on the lines and put in its system's conventional setting.
func describeLattice(red cell.Reduced, zero float64, zeroFree bool, first []obs, o Options, want map[cell.System]bool, need int, tol cell.Tolerance) []*cand {
	var out []*cand
	var search *cell.SettingSearch // built for the first system wanted
	for _, s := range []cell.System{cell.Cubic, cell.Tetragonal, cell.Hexagonal, cell.Rhombohedral, cell.Orthorhombic, cell.Monoclinic} {
		if !want[s] {
			continue
		}
		if search == nil {
			search = cell.NewSettingSearch(red)
		}
		sts := search.Settings(s, tol)
		if len(sts) > 2 {
			sts = sts[:2]
		}
		for _, st := range sts {
			c := st.Cell
			c.System = s
			if c.A > o.MaxEdge || c.B > o.MaxEdge || c.C > o.MaxEdge {
				continue
			}
			k := &cand{c: c, zero: zero, zeroFree: zeroFree}
			if !k.settle(first, o.Wavelength, 0, need) {
				continue
			}
			// The refined cell in its system's conventional setting.
			if cc, _, err := cell.Conventional(k.c); err == nil {
				k.c = cc
				k.assign(first, o.Wavelength, 0)
			}
			if math.Abs(k.zero) > o.zeroBound() || k.c.Volume() > o.MaxVolume {
				continue
			}
			k.figures(first, o.Wavelength)
			if k.m > 0 {
				out = append(out, k)
			}
		}
	}
	return out
}

// bestCands returns up to n cands of highest score, one per cell.
func bestCands(ks []*cand, n int) []*cand {
	sort.SliceStable(ks, func(i, j int) bool { return betterCand(ks[i], ks[j]) })
	var out []*cand
	for _, k := range ks {
		if !slices.ContainsFunc(out, func(x *cand) bool { return sameCand(k, x) }) {
			out = append(out, k)
			if len(out) == n {
				break
			}
		}
	}
	return out
}

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
