package main

import (
	"io"
	"regexp"
	"strings"
	"testing"

	"reticle/analysis"
	"reticle/internal/glossary"
	"reticle/report"
)

// TestHelpVocabulary: every option in the help of every command, and
// every command, is a name of the glossary; each command's help lists
// exactly the options it parses; the options the PDF prints to rebuild a
// report are options of reticle report.
func TestHelpVocabulary(t *testing.T) {
	terms, err := glossary.Terms()
	if err != nil {
		t.Fatal(err)
	}
	optName := regexp.MustCompile(`(?m)^  (--[a-z0-9-]+)`)
	for c, name := range commandNames {
		if !terms[name] {
			t.Errorf("command %s is not in the glossary", name)
		}
		h := help(c)
		seen := map[string]bool{}
		for _, m := range optName.FindAllStringSubmatch(h, -1) {
			seen[m[1]] = true
			if !terms[m[1]] {
				t.Errorf("reticle %s --help: %s is not in the glossary", name, m[1])
			}
		}
		for _, o := range options {
			if (o.in&c != 0) != seen["--"+o.name] {
				t.Errorf("reticle %s: --%s accepted %v, listed in the help %v", name, o.name, o.in&c != 0, seen["--"+o.name])
			}
		}
		if !strings.Contains(h, "  --") {
			t.Errorf("reticle %s --help lists no option", name)
		}
	}
	for _, o := range report.CommandOptions(demoReportSettings(t), nil) {
		found := false
		for _, opt := range options {
			found = found || "--"+opt.name == o[0] && opt.in&cmdReport != 0
		}
		if !found {
			t.Errorf("the PDF prints %s, which reticle report does not take", o[0])
		}
	}
}

// demoReportSettings are settings with every option of reticle report
// set, as its own parser reads them.
func demoReportSettings(t *testing.T) analysis.Settings {
	t.Helper()
	r, _, err := parse(cmdReport, []string{"--formula", "MgAl2O4", "--density", "3.58(2)", "--z", "8", "--standard", "Si",
		"--exclude", "44.8", "--sample", "kiln 07", "--wavelength", "Cu", "--corrections", "auto"}, io.Discard)
	if err != nil {
		t.Fatal(err)
	}
	return r.settings
}
