package main

import (
	"strings"
	"testing"

	"reticle/analysis"
)

// TestEvidenceText: the text output names how the whole pattern weighed
// the close candidates, and nothing when it weighed none.
func TestEvidenceText(t *testing.T) {
	ref := &analysis.PatternEvidence{Reference: true, Compared: true, Rwp: 0.0715, Prior: 0.7}
	other := &analysis.PatternEvidence{Compared: true, Rwp: 0.0712, LogBayes: 0.65, Extra: 4, Prior: 0.047}
	unfit := &analysis.PatternEvidence{Compared: true, LogBayes: 0, Extra: 2, Prior: 0.2, Err: "not refined on the whole pattern"}
	split := &analysis.PatternEvidence{Compared: true, Rwp: 0.0958, LogBayes: 80.86, Split: true, Prior: 0.011}
	for _, c := range []struct {
		name string
		cs   []analysis.Candidate
		want []string // "" alone: no text
	}{
		{"none", []analysis.Candidate{{}, {}}, []string{""}},
		{"reference alone", []analysis.Candidate{{Evidence: ref}}, []string{""}},
		{"weighed", []analysis.Candidate{{Evidence: ref}, {Evidence: other}, {Evidence: unfit}},
			[]string{"Rwp 7.15 %", "+0.65 (4 extra lines, 0 missing; 4.7 % from the lines alone; Rwp 7.12 %)", "no fit"}},
		{"split lines", []analysis.Candidate{{Evidence: ref}, {Evidence: split}},
			[]string{"+80.86 (its lines split the first's within their widths: the fits' χ² compared; 1.1 % from the lines alone; Rwp 9.58 %)"}},
	} {
		for i := range c.cs {
			c.cs[i].Rank = i + 1
		}
		got := evidenceText(c.cs)
		if len(c.want) == 1 && c.want[0] == "" {
			if got != "" {
				t.Errorf("%s: %q, want none", c.name, got)
			}
			continue
		}
		for _, w := range c.want {
			if !strings.Contains(got, w) {
				t.Errorf("%s: %q lacks %q", c.name, got, w)
			}
		}
	}
}
