package scanfile

import (
	"path/filepath"
	"testing"
)

// TestReadBenchLayouts reads every public benchmark scan: the five layouts
// real exports use (whitespace, comma with header, three-column, semicolon
// with decimal commas, tab with key/value header lines).
func TestReadBenchLayouts(t *testing.T) {
	files, _ := filepath.Glob("../../shared/bench/public/scan*")
	if len(files) == 0 {
		t.Skip("../shared/bench/public not present")
	}
	for _, f := range files {
		s, err := ReadFile(f)
		if err != nil {
			t.Errorf("%v", err)
			continue
		}
		lo, hi := s.Range()
		if s.Len() < 1000 || lo < 5 || hi > 160 || s.Step() <= 0 {
			t.Errorf("%s: %d points %g..%g step %g", f, s.Len(), lo, hi, s.Step())
		}
		if filepath.Ext(f) == ".xye" && s.ESD == nil {
			t.Errorf("%s: esd column lost", f)
		}
	}
}
