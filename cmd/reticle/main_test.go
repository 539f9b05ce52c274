package main

import (
	"bytes"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

const demo = "../../assets/demo/kiln-trial-07.xy"

func runCmd(args ...string) (int, string, string) {
	var out, errb bytes.Buffer
	code := run(args, &out, &errb)
	return code, out.String(), errb.String()
}

func TestPeaksJSON(t *testing.T) {
	code, out, errs := runCmd("peaks", "--json", "--wavelength", "Cu", demo)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var doc scanJSON
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	// The demo holds 18 invented spinel lines between 15° and 100°
	// (assets/demo/make_demo.go); a few of the weakest may stay hidden.
	if len(doc.Peaks) < 15 || len(doc.Peaks) > 18 || doc.Points != 4251 || len(doc.SHA256) != 64 {
		t.Errorf("%d peaks, %d points, sha %q", len(doc.Peaks), doc.Points, doc.SHA256)
	}
	for _, p := range doc.Peaks {
		if !(p.TwoTheta > 15 && p.TwoTheta < 100 && p.TwoThetaESD > 0 && p.D > 0) {
			t.Errorf("bad peak %+v", p)
		}
	}
}

func TestPeaksTableAndSeveralFiles(t *testing.T) {
	code, out, _ := runCmd("peaks", demo, demo)
	if code != 0 || strings.Count(out, "kiln-trial-07.xy") != 2 || !strings.Contains(out, "2θ (°)") {
		t.Errorf("exit %d, output:\n%s", code, out)
	}
	code, out, _ = runCmd("peaks", "--json", demo, demo)
	var many struct{ Scans []scanJSON }
	if code != 0 || json.Unmarshal([]byte(out), &many) != nil || len(many.Scans) != 2 {
		t.Errorf("several files in JSON: exit %d", code)
	}
}

func TestPeaksErrors(t *testing.T) {
	dir := t.TempDir()
	bad := filepath.Join(dir, "kiln-bad.xy")
	os.WriteFile(bad, []byte("10 1\n10.02 2\n10.04 oops\n"), 0o644)
	for _, test := range []struct {
		args []string
		code int
		msg  string
	}{
		{nil, 2, "usage"},
		{[]string{"frobnicate"}, 2, "unknown command"},
		{[]string{"peaks"}, 2, "no scan file"},
		{[]string{"peaks", "--wavelength", "Zz", demo}, 2, "expected an anode"},
		{[]string{"peaks", bad}, 1, "kiln-bad.xy:3: column 2"},
		{[]string{"peaks", "--ka2-ratio", "2", demo}, 2, "--ka2-ratio"},
		{[]string{"peaks", "--systems", "cubic", demo}, 2, "unknown option --systems"},
		{[]string{"peaks", filepath.Join(dir, "none.xy")}, 1, "no such file"},
	} {
		code, _, errs := runCmd(test.args...)
		if code != test.code || !strings.Contains(errs, test.msg) {
			t.Errorf("%v: exit %d, stderr %q; want %d and %q", test.args, code, errs, test.code, test.msg)
		}
	}
}

// TestIndexJSON checks the wiring of `reticle index --json`: the document
// carries the keys the benchmark scorer reads, and the demo scan (made as a
// face-centred cubic pattern by assets/demo/make_demo.go) comes out cubic F.
func TestIndexJSON(t *testing.T) {
	code, out, errs := runCmd("index", "--json", "--wavelength", "Cu", demo)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var doc map[string]any
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	sols, _ := doc["solutions"].([]any)
	if len(sols) == 0 {
		t.Fatalf("no solutions: %s", out)
	}
	first := sols[0].(map[string]any)
	for _, k := range []string{"system", "centring", "a", "b", "c", "alpha", "beta", "gamma", "m_n", "f_n", "indexed", "unindexed", "lines", "calculated"} {
		if _, ok := first[k]; !ok {
			t.Errorf("solution lacks %q", k)
		}
	}
	if first["system"] != "cubic" || first["centring"] != "F" {
		t.Errorf("demo indexed as %v %v", first["system"], first["centring"])
	}
	code, _, errs = runCmd("index", "--systems", "cubic,monoclinical", demo)
	if code != 2 || !strings.Contains(errs, "unknown crystal system") {
		t.Errorf("bad --systems: exit %d, %q", code, errs)
	}
}

// TestOptionsAnywhere: options are read before, between and after the
// file names; after "--" every argument is a file name.
func TestOptionsAnywhere(t *testing.T) {
	for _, c := range []struct {
		args []string
		code int
		json bool
	}{
		{[]string{"peaks", "--json", demo}, 0, true},
		{[]string{"peaks", demo, "--json"}, 0, true},
		{[]string{"peaks", demo, "--threshold", "6", "--json"}, 0, true},
		{[]string{"peaks", "--", demo}, 0, false},
		{[]string{"peaks", demo, "--", "--json"}, 1, false}, // "--json" is a file name there, and missing
		{[]string{"peaks", demo, "--bogus"}, 2, false},
	} {
		code, out, errs := runCmd(c.args...)
		if code != c.code {
			t.Errorf("%q: exit %d, want %d (%s)", c.args, code, c.code, errs)
			continue
		}
		if code == 0 && strings.HasPrefix(strings.TrimSpace(out), "{") != c.json {
			t.Errorf("%q: JSON %v, want %v", c.args, !c.json, c.json)
		}
	}
}
