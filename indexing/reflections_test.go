package indexing

import (
	"fmt"
	"testing"
)

func TestReflectionsNames(t *testing.T) {
	// Corundum on hexagonal axes, a = 4.759, c = 12.99 Å (handbook values,
	// from memory). Its observed lines are conventionally named 012, 104,
	// 110, 006, 113, 202 (common practice); the R lattice alone also
	// allows 003, 101, 015 and 021, which the c-glide of R-3c removes.
	c := NewCell(Rhombohedral, R, 4.759, 12.99)
	rs := Reflections(c, 1/(1.9*1.9))
	var got []string
	for _, r := range rs {
		got = append(got, fmt.Sprintf("%d%d%d", r.HKL[0][0], r.HKL[0][1], r.HKL[0][2]))
	}
	want := []string{"003", "101", "012", "104", "110", "015", "006", "113", "021", "202"}
	for i := range want {
		if i >= len(got) || got[i] != want[i] {
			t.Fatalf("names %v, want prefix %v", got, want)
		}
	}
	// Rock salt F: 111 has multiplicity 8, 200 has 6 (common practice).
	nacl := Reflections(NewCell(Cubic, F, 5.6402, 0), 0.2)
	if nacl[0].Mult != 8 || nacl[1].Mult != 6 || nacl[0].HKL[0] != (HKL{1, 1, 1}) {
		t.Errorf("NaCl first lines %+v %+v", nacl[0], nacl[1])
	}
	// Cubic P: 300 and 221 share Q = 9/a², multiplicity 6 + 24 = 30.
	for _, r := range Reflections(NewCell(Cubic, P, 4, 0), 9.0/16+1e-9) {
		if r.Q > 9.0/16-1e-9 && (r.Mult != 30 || len(r.HKL) != 2) {
			t.Errorf("300/221: %+v", r)
		}
	}
}
