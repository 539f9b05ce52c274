package scanfile

import (
	"bufio"
	"math"
	"os"
	"strconv"
	"strings"
	"testing"
)

// TestAnodesAgainstXraylib compares every tabulated wavelength with the
// golden file made by testdata/reference/xraylib_lines.py from xraylib's
// K-line energies. The two compilations differ in the fifth significant
// figure at most, so the tolerance is 6e-5 relative.
func TestAnodesAgainstXraylib(t *testing.T) {
	f, err := os.Open("../testdata/reference/xraylib_lines.tsv")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	seen := 0
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		if strings.HasPrefix(sc.Text(), "#") {
			continue
		}
		fs := strings.Split(sc.Text(), "\t")
		if len(fs) != 4 {
			t.Fatalf("bad golden line %q", sc.Text())
		}
		want, err := strconv.ParseFloat(fs[3], 64)
		if err != nil {
			t.Fatal(err)
		}
		a, ok := LookupAnode(fs[0])
		if !ok {
			t.Errorf("anode %s missing", fs[0])
			continue
		}
		got := map[string]float64{"KAlpha1": a.KAlpha1, "KAlpha2": a.KAlpha2, "KBeta": a.KBeta}[fs[1]]
		if rel := math.Abs(got-want) / want; rel > 6e-5 {
			t.Errorf("%s %s = %.7f Å, xraylib %.7f Å (rel %.1e)", fs[0], fs[1], got, want, rel)
		}
		seen++
	}
	if seen != 3*len(Anodes) {
		t.Errorf("checked %d lines, want %d", seen, 3*len(Anodes))
	}
}

// TestFilterEdgesAgainstXraylib checks the K-beta filters' K edges
// against the golden file made by testdata/reference/xraylib_edges.py.
// Edge tables differ by a few eV, so the tolerance is 5e-4 relative.
func TestFilterEdgesAgainstXraylib(t *testing.T) {
	raw, err := os.ReadFile("../testdata/reference/xraylib_edges.tsv")
	if err != nil {
		t.Fatal(err)
	}
	seen := 0
	for _, line := range strings.Split(strings.TrimSpace(string(raw)), "\n") {
		if strings.HasPrefix(line, "#") {
			continue
		}
		fs := strings.Split(line, "\t")
		if len(fs) != 4 {
			t.Fatalf("bad golden line %q", line)
		}
		want, err := strconv.ParseFloat(fs[3], 64)
		if err != nil {
			t.Fatal(err)
		}
		a, ok := LookupAnode(fs[0])
		if !ok || a.Filter != fs[1] {
			t.Errorf("anode %s: filter %q, xraylib file %q", fs[0], a.Filter, fs[1])
			continue
		}
		if rel := math.Abs(a.FilterEdge-want) / want; rel > 5e-4 {
			t.Errorf("%s K edge %.4f Å, xraylib %.7f Å", a.Filter, a.FilterEdge, want)
		}
		if !(a.KBeta < a.FilterEdge && a.FilterEdge < a.KAlpha1) {
			t.Errorf("%s filter edge %.4f Å not between K-beta and K-alpha1", a.Symbol, a.FilterEdge)
		}
		seen++
	}
	if seen != len(Anodes) {
		t.Errorf("checked %d edges, want %d", seen, len(Anodes))
	}
}

func TestParseRadiation(t *testing.T) {
	for _, test := range []struct {
		in      string
		lambda1 float64
		doublet bool
		bad     bool
	}{
		{"Cu", 1.5405929, true, false},
		{"mo", 0.7093171, true, false},
		{"CuKa1", 1.5405929, false, false},
		{"1.5405929", 1.5405929, false, false},
		{"0,7093", 0.7093, false, false},
		{"Xx", 0, false, true},
		{"12", 0, false, true},
		{"NaN", 0, false, true},
	} {
		r, err := ParseRadiation(test.in)
		if test.bad {
			if err == nil {
				t.Errorf("%q: no error", test.in)
			}
			continue
		}
		if err != nil || r.Lambda1 != test.lambda1 || r.Doublet() != test.doublet {
			t.Errorf("%q: got %+v, %v", test.in, r, err)
		}
	}
}
