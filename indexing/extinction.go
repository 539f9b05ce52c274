package indexing

import (
	"fmt"
	"slices"
	"strings"

	"reticle/cell"
)

// A condition is a reflection condition of International Tables for
// Crystallography Vol. A (Table 2.2.13.2 of the 2005 edition, from
// memory): the reflections of a class (a zone or a row of the
// reciprocal lattice) that a glide plane or a screw axis leaves, written
// as ITA writes them ("h0l: l = 2n"). The reflections of a zone have
// index axis zero; those of a row only index axis nonzero. A condition
// says coef·hkl ≡ 0 (mod n).
type condition struct {
	name  string
	class func(cell.HKL) bool
	row   bool // a row along axis; else the zone whose index axis is zero
	axis  int
	coef  cell.HKL
	n     int
}

// ok reports whether v satisfies the condition.
func (c condition) ok(v cell.HKL) bool {
	return mod(c.coef[0]*v[0]+c.coef[1]*v[1]+c.coef[2]*v[2], c.n) == 0
}

// conditionRules are the zone and row conditions beyond the lattice's
// centring, on the cell's own axes: the glide planes of each zone
// (axial glides, the diagonal n and the d glide) and the screw axes of
// each row (2₁, 4₁ or 4₂, 3₁ or 6₂, 6₁).
var conditionRules = func() []condition {
	letters := "hkl"
	var out []condition
	add := func(c condition, class func(cell.HKL) bool) {
		c.class = class
		var terms []string
		for i, x := range c.coef {
			if x != 0 {
				terms = append(terms, letters[i:i+1])
			}
		}
		c.name = fmt.Sprintf("%s: %s = %dn", c.name, strings.Join(terms, " + "), c.n)
		out = append(out, c)
	}
	for z := 0; z < 3; z++ {
		a, b := (z+1)%3, (z+2)%3
		if a > b {
			a, b = b, a
		}
		name := []byte("hkl")
		name[z] = '0'
		class := func(v cell.HKL) bool { return v[z] == 0 && v[a] != 0 && v[b] != 0 }
		var ca, cb, cab cell.HKL
		ca[a], cb[b], cab[a], cab[b] = 1, 1, 1, 1
		for _, c := range []condition{{coef: ca, n: 2}, {coef: cb, n: 2}, {coef: cab, n: 2}, {coef: cab, n: 4}} {
			c.name, c.axis = string(name), z
			add(c, class)
		}
	}
	for ax := 0; ax < 3; ax++ {
		name := []byte("000")
		name[ax] = letters[ax]
		class := func(v cell.HKL) bool {
			for i := range v {
				if (i == ax) != (v[i] != 0) {
					return false
				}
			}
			return true
		}
		for _, n := range []int{2, 3, 4, 6} {
			var c cell.HKL
			c[ax] = 1
			add(condition{name: string(name), row: true, axis: ax, coef: c, n: n}, class)
		}
	}
	add(condition{name: "hhl", axis: -1, coef: cell.HKL{0, 0, 1}, n: 2},
		func(v cell.HKL) bool { return v[0] == v[1] && v[0] != 0 && v[2] != 0 })
	return out
}()

// conditions lists the reflection conditions (conditionRules) that the
// lines indexed show: at least two indexed lines of the class, all of
// them satisfying it, and a calculated line of the class in the range
// that would violate it, alone at its place, not observed. They are
// information on the space group, after the lattice; they never change
// it. A condition implied by a stronger one shown (l = 2n by l = 4n) is
// left out.
func conditions(s Solution) []condition {
	observed := map[cell.HKL]bool{}
	for _, l := range s.Lines {
		for _, v := range l.HKL {
			observed[v] = true
		}
	}
	var out []condition
	for _, r := range conditionRules {
		members, violating, unobservedViolating := 0, 0, 0
		for _, ref := range s.Calculated {
			for _, v := range ref.HKL {
				if !r.class(v) {
					continue
				}
				if observed[v] {
					members++
					if !r.ok(v) {
						violating++
					}
				} else if !r.ok(v) && len(ref.HKL) == 1 {
					unobservedViolating++
				}
			}
		}
		if members >= 2 && violating == 0 && unobservedViolating > 0 {
			out = append(out, r)
		}
	}
	// Leave out a condition of a row or zone that a stronger one of the
	// same class and indices implies (2n by 4n or 6n; 3n by 6n).
	var kept []condition
	for _, c := range out {
		implied := false
		for _, d := range out {
			if d.name != c.name && d.row == c.row && d.axis == c.axis && d.coef == c.coef && d.n > c.n && d.n%c.n == 0 {
				implied = true
			}
		}
		if !implied {
			kept = append(kept, c)
		}
	}
	return kept
}

// conditionNames returns the conditions' names.
func conditionNames(cs []condition) []string {
	var out []string
	for _, c := range cs {
		out = append(out, c.name)
	}
	return out
}

// extinctionSymbol returns the extinction symbol of International Tables
// for Crystallography Vol. A (Part 3, "Determination of space groups",
// 2005 edition; from memory) that the conditions cs shown by a cell of
// system sys and centring cen give, for orthorhombic and monoclinic
// (b unique) cells, and "" for the others. Each symmetry direction
// (a, b, c; monoclinic b alone) gets the glide plane perpendicular to it
// (a, b or c for an axial glide, n diagonal, d diamond; two letters in
// parentheses, "(ab)", when the lines show both axial glides, which only
// a centring allows: the double glide of a C, A, B or F cell, written so
// by Tables; in an I cell two glides at different heights that the
// absences cannot tell apart, of which Tables name one), else the 2₁ screw
// axis along it when its row condition is not implied by a glide of a
// zone that holds the row, else "-"; the monoclinic b direction writes
// both, "2₁/c".
//
// In these systems the indices that share a line are related by the
// Laue group alone (mmm or 2/m: changes of sign), so a line stands for
// one class of reflections. In the higher systems the metric makes
// reflections of different classes of the space group's Laue group
// coincide ((hk0) and (kh0) of a tetragonal 4/m group, for example), and
// a powder line can hide the very reflection a condition concerns; there
// the conditions are listed, but no symbol is given.
func extinctionSymbol(sys cell.System, cen cell.Centring, cs []condition) string {
	axes := "abc"
	glide := func(z int) string {
		var ls []string
		for _, c := range cs {
			if c.row || c.axis != z {
				continue
			}
			nz := 0
			var l string
			for i, x := range c.coef {
				if x != 0 {
					nz++
					l = axes[i : i+1]
				}
			}
			switch {
			case nz == 1 && c.n == 2:
				ls = append(ls, l)
			case nz == 2 && c.n == 2:
				ls = append(ls, "n")
			case nz == 2 && c.n == 4:
				ls = append(ls, "d")
			}
		}
		// d implies n; n with an axial glide happens only beside a
		// centring, where ITA writes the axial glides.
		switch {
		case slices.Contains(ls, "d"):
			return "d"
		case len(ls) == 1:
			return ls[0]
		case len(ls) > 1:
			var ax []string
			for _, l := range ls {
				if l != "n" {
					ax = append(ax, l)
				}
			}
			if len(ax) == 1 {
				return ax[0]
			}
			return "(" + strings.Join(ax, "") + ")"
		}
		return ""
	}
	// screw reports whether the row along ax shows h = 2n that no zone
	// condition shown implies; byZones says whether the zones that hold
	// the row are symmetry zones of the system (orthorhombic: yes; the
	// monoclinic 0k0 lies in none, and a condition seen by chance in
	// another zone implies nothing).
	screw := func(ax int, byZones bool) bool {
		shown := false
		for _, c := range cs {
			if c.row && c.axis == ax && c.n%2 == 0 {
				shown = true
			}
		}
		if !shown || !byZones {
			return shown
		}
		for _, c := range cs {
			// A zone holds the row when its zero index is not the row's
			// axis; on the row its condition reads coef[ax]·h ≡ 0.
			if !c.row && c.axis >= 0 && c.axis != ax && c.coef[ax] != 0 && c.n%2 == 0 {
				return false
			}
		}
		return true
	}
	dash := func(s string) string {
		if s == "" {
			return "-"
		}
		return s
	}
	switch sys {
	case cell.Orthorhombic:
		parts := []string{cen.String()}
		for ax := 0; ax < 3; ax++ {
			g := glide(ax)
			if g == "" && screw(ax, true) {
				g = "21"
			}
			parts = append(parts, dash(g))
		}
		return strings.Join(parts, " ")
	case cell.Monoclinic:
		g := glide(1)
		if screw(1, false) {
			if g != "" {
				g = "21/" + g
			} else {
				g = "21"
			}
		}
		return cen.String() + " 1 " + dash(g) + " 1"
	}
	return ""
}
