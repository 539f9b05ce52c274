package indexing

import (
	"fmt"

	"reticle/cell"
)

// loneZone reports whether every line that a cand indexes is indexed as
// well by the reflections of one zone of its lattice, those hkl with
// hu + kv + lw = 0 for a zone axis [uvw] (Weiss's zone law): the
// reflections of a plane of the reciprocal lattice. The lines then
// measure that plane alone. A cell with any third reciprocal vector
// whose own lines fall beyond the scan, or onto the zone's, explains
// them as well, so the cell's edges and angles off the zone are not
// measured and the cell is one guess among many.
//
// A line may be indexed by any calculated reflection within its window
// of the one assigned to it. The axes tried are the cross products of
// the reflections that the first few indexed lines may take: a zone
// that holds every indexed line holds those of the first two
// independent ones.
func loneZone(k *cand, ls []obs, lambda float64) (cell.HKL, bool) {
	if k == nil || len(k.ref) != len(ls) || len(k.qc) != len(ls) {
		return cell.HKL{}, false
	}
	var lines [][]cell.HKL // per indexed line, the reflections it may take
	for i, j := range k.ref {
		if j < 0 {
			continue
		}
		w := dQ(ls[i].tt, ls[i].tol, lambda)
		var hs []cell.HKL
		for _, c := range k.calc {
			if c.q >= k.qc[i]-w && c.q <= k.qc[i]+w {
				hs = append(hs, c.h)
			}
		}
		lines = append(lines, hs)
	}
	if len(lines) < 3 {
		return cell.HKL{}, false
	}
	// The reflections of the first loneZoneSeeds indexed lines span the
	// axes tried.
	var seeds []cell.HKL
	for _, hs := range lines[:min(len(lines), loneZoneSeeds)] {
		seeds = append(seeds, hs...)
	}
	seen := map[cell.HKL]bool{}
	for a := range seeds {
		for b := a + 1; b < len(seeds); b++ {
			u, ok := zoneAxis(seeds[a], seeds[b])
			if !ok || seen[u] {
				continue
			}
			seen[u] = true
			if holdsAll(u, lines) {
				return u, true
			}
		}
	}
	return cell.HKL{}, false
}

// loneZoneSeeds is how many of the first indexed lines give the zone
// axes loneZone tries. The axes grow as the square of the reflections
// the lines may take, so they come from a few lines only; six hold two
// independent reflections unless all six are orders of one row, and then
// the warning is missed, never given wrongly (holdsAll decides).
const loneZoneSeeds = 6

// zoneAxis returns the zone axis of two reflections, their cross product
// divided by its common factor, with its first non-zero index positive;
// false when they are parallel.
func zoneAxis(a, b cell.HKL) (cell.HKL, bool) {
	u := a.Cross(b)
	g := gcd(gcd(abs(u[0]), abs(u[1])), abs(u[2]))
	if g == 0 {
		return u, false
	}
	for i := range u {
		u[i] /= g
	}
	for _, v := range u {
		if v != 0 {
			if v < 0 {
				u = cell.HKL{-u[0], -u[1], -u[2]}
			}
			break
		}
	}
	return u, true
}

// holdsAll reports whether every line may take a reflection of the zone
// of axis u.
func holdsAll(u cell.HKL, lines [][]cell.HKL) bool {
	for _, hs := range lines {
		in := false
		for _, h := range hs {
			if h.Dot(u) == 0 {
				in = true
				break
			}
		}
		if !in {
			return false
		}
	}
	return true
}

// loneZoneWarning is the warning of a first cell whose lines lie in one
// zone of axis u.
func loneZoneWarning(u cell.HKL) string {
	return fmt.Sprintf("every line the first cell indexes lies in its zone [%d %d %d] (the hkl with %s = 0): no line measures the cell off that plane, so its edges and angles off it are a guess; a scan to higher angles (or a second line off the zone) would fix them", u[0], u[1], u[2], zoneLaw(u))
}

// zoneLaw writes hu + kv + lw with the axis's indices.
func zoneLaw(u cell.HKL) string {
	s := ""
	for i, name := range []string{"h", "k", "l"} {
		switch v := u[i]; {
		case v == 0:
			continue
		case s == "" && v == 1:
			s = name
		case s == "" && v == -1:
			s = "−" + name
		case s == "":
			s = fmt.Sprintf("%d%s", v, name)
		case v == 1:
			s += " + " + name
		case v == -1:
			s += " − " + name
		case v > 0:
			s += fmt.Sprintf(" + %d%s", v, name)
		default:
			s += fmt.Sprintf(" − %d%s", -v, name)
		}
	}
	return s
}
