package report

import (
	"os"
	"regexp"
	"strings"
	"testing"

	"reticle/internal/glossary"
)

// TestPDFVocabulary: every heading of the PDF, every key of its
// key–value rows and every option its settings section prints is a name
// of the glossary.
func TestPDFVocabulary(t *testing.T) {
	terms, err := glossary.Terms()
	if err != nil {
		t.Fatal(err)
	}
	heading := regexp.MustCompile(`x\.heading\("([^"]+)"\)`)
	row := regexp.MustCompile(`(?:Row|column)?\{"([^"]+)", `)
	for _, file := range []string{"pdf.go", "rows.go"} {
		src, err := os.ReadFile(file)
		if err != nil {
			t.Fatal(err)
		}
		for _, re := range []*regexp.Regexp{heading, row} {
			for _, m := range re.FindAllStringSubmatch(string(src), -1) {
				name := m[1]
				if strings.HasSuffix(name, ", ") {
					name += "BIC" // "models, " + the criterion
				}
				if !terms[name] {
					t.Errorf("%s: %q is not in the glossary", file, name)
				}
			}
		}
	}
	for _, o := range CommandOptions(demoSettings, nil) {
		if !terms[o[0]] {
			t.Errorf("settings section: option %s is not in the glossary", o[0])
		}
	}
}
