package cell

import "testing"

// TestZoneLaw checks Cross and Dot on zones whose axes are known: the
// reflections h00 and 00l lie in the zone [010], hh0 and 00l in [1−10].
func TestZoneLaw(t *testing.T) {
	for _, tc := range []struct{ a, b, axis HKL }{
		{HKL{1, 0, 0}, HKL{0, 0, 1}, HKL{0, -1, 0}},
		{HKL{1, 1, 0}, HKL{0, 0, 1}, HKL{1, -1, 0}},
		{HKL{1, 2, 3}, HKL{2, 4, 6}, HKL{}},
	} {
		u := tc.a.Cross(tc.b)
		if u != tc.axis {
			t.Errorf("%v × %v = %v, want %v", tc.a, tc.b, u, tc.axis)
		}
		if tc.a.Dot(u) != 0 || tc.b.Dot(u) != 0 {
			t.Errorf("%v or %v is not in the zone [%v]", tc.a, tc.b, u)
		}
	}
	if d := (HKL{1, 2, 3}).Dot(HKL{4, -5, 6}); d != 12 {
		t.Errorf("(1 2 3)·[4 −5 6] = %d, want 12", d)
	}
}
