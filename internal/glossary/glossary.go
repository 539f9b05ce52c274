// Package glossary reads the project's glossary (GLOSSARY.md at the
// repository root) for the tests that hold every name the window, the
// command line and the PDF print to it.
package glossary

import (
	"errors"
	"os"
	"path/filepath"
	"regexp"
)

// quoted matches a name in backticks.
var quoted = regexp.MustCompile("`([^`]+)`")

// Terms returns every name in backticks in GLOSSARY.md, found in the
// working directory or the nearest directory above it that holds one.
func Terms() (map[string]bool, error) {
	dir, err := os.Getwd()
	if err != nil {
		return nil, err
	}
	for {
		data, err := os.ReadFile(filepath.Join(dir, "GLOSSARY.md"))
		if err == nil {
			out := map[string]bool{}
			for _, m := range quoted.FindAllStringSubmatch(string(data), -1) {
				out[m[1]] = true
			}
			return out, nil
		}
		up := filepath.Dir(dir)
		if up == dir {
			return nil, errors.New("glossary: no GLOSSARY.md in the working directory or above it")
		}
		dir = up
	}
}
