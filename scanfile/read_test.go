package scanfile

import (
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// rows returns n data rows "x<sep>y" starting at 10° in 0.02° steps, with
// the given decimal mark.
func rows(n int, sep, dec string) string {
	var b strings.Builder
	for i := 0; i < n; i++ {
		x := strings.Replace(fmt.Sprintf("%.2f", 10+0.02*float64(i)), ".", dec, 1)
		fmt.Fprintf(&b, "%s%s%d\n", x, sep, 100+i)
	}
	return b.String()
}

func TestParseTextLayouts(t *testing.T) {
	for _, test := range []struct {
		name   string
		text   string
		n      int
		lambda float64
		esd    bool
	}{
		{"whitespace", rows(30, "  ", "."), 30, 0, false},
		{"comma header", "Angle,Counts\n" + rows(25, ",", "."), 25, 0, false},
		{"semicolon decimal comma", "2Theta;Intensity\n" + rows(25, ";", ","), 25, 0, false},
		{"tab key value", "Sample\tkiln trial 7\nWavelength\t1.540593\n\n2Theta\tCounts\n" + rows(22, "\t", "."), 22, 1.540593, false},
		{"tab decimal comma", "Anode: Co\n" + rows(22, "\t", ","), 22, 0, false},
		{"colon metadata nm", "# lambda = 0.1540593 nm\n" + rows(22, " ", "."), 22, 1.540593, false},
		{"crlf bom", "\xef\xbb\xbf# x y\r\n" + strings.ReplaceAll(rows(21, " ", "."), "\n", "\r\n"), 21, 0, false},
		{"three columns sci", strings.Repeat("", 0) + func() string {
			var b strings.Builder
			for i := 0; i < 20; i++ {
				fmt.Fprintf(&b, "%.4e %.3E %g\n", 5+0.01*float64(i), 1e3+float64(i), 31.6)
			}
			return b.String()
		}(), 20, 0, true},
		{"lone number header", "42\n" + rows(20, " ", "."), 20, 0, false},
		{"trailing separator", strings.ReplaceAll(rows(20, ";", ","), "\n", ";\n"), 20, 0, false},
	} {
		s, err := Parse(test.name, []byte(test.text))
		if err != nil {
			t.Errorf("%s: %v", test.name, err)
			continue
		}
		if s.Len() != test.n || (s.ESD != nil) != test.esd || math.Abs(s.Wavelength-test.lambda) > 1e-9 {
			t.Errorf("%s: %d points, esd %v, λ %g; want %d, %v, %g", test.name, s.Len(), s.ESD != nil, s.Wavelength, test.n, test.esd, test.lambda)
		}
		if len(s.SHA256) != 64 || s.Step() <= 0 {
			t.Errorf("%s: sha %q step %g", test.name, s.SHA256, s.Step())
		}
	}
}

func TestParseTextValues(t *testing.T) {
	s, err := Parse("v", []byte("2Theta;Intensity\n"+rows(20, ";", ",")))
	if err != nil {
		t.Fatal(err)
	}
	if s.TwoTheta[3] != 10.06 || s.Intensity[3] != 103 {
		t.Errorf("row 4 = %g, %g; want 10.06, 103", s.TwoTheta[3], s.Intensity[3])
	}
	if s, _ := Parse("a", []byte("# Anode: Co K-alpha\n"+rows(20, " ", "."))); s.Anode != "Co" {
		t.Errorf("anode %q, want Co", s.Anode)
	}
	if lo, hi := s.Range(); lo != 10 || math.Abs(hi-10.38) > 1e-12 {
		t.Errorf("range %g..%g", lo, hi)
	}
	if math.Abs(s.Step()-0.02) > 1e-12 {
		t.Errorf("step %g", s.Step())
	}
}

func TestParseBadInput(t *testing.T) {
	good := rows(25, " ", ".")
	for _, test := range []struct {
		name string
		text string
		want error
		line int
	}{
		{"empty", "", ErrEmpty, 0},
		{"blank", "  \n\n", ErrEmpty, 0},
		{"header only", "# nothing\nAngle Counts\n", ErrEmpty, 0},
		{"binary", "\x00\x01\x02PK\x03\x04" + good, ErrBinary, 0},
		{"one column", "10.0\n10.1\n10.2\n", ErrColumns, 1},
		{"four columns", "10 1 2 3\n" + good, ErrColumns, 1},
		{"nan", good + "10.6 NaN\n", ErrNotFinite, 26},
		{"inf", good + "Inf 5\n", ErrNotFinite, 26},
		{"overflow", good + "10.7 1e999\n", ErrNotFinite, 26},
		{"text in data", good + "end of scan\n", ErrText, 26},
		{"ragged", good + "10.9\n", ErrColumns, 26},
		{"repeated", good + "10.48 5\n", ErrRepeated, 26},
		{"too few", rows(19, " ", "."), ErrTooFew, 0},
		{"negative esd", "10 5 -1\n10.1 5 1\n", ErrBadESD, 1},
		{"angle range", "190 5\n" + good, ErrOutOfRange, 1},
	} {
		_, err := Parse("bad.xy", []byte(test.text))
		if !errors.Is(err, test.want) {
			t.Errorf("%s: error %v, want %v", test.name, err, test.want)
			continue
		}
		var pe *ParseError
		if !errors.As(err, &pe) || pe.File != "bad.xy" || pe.Line != test.line {
			t.Errorf("%s: %v: want file bad.xy line %d", test.name, err, test.line)
		}
		if !strings.HasPrefix(err.Error(), "bad.xy") {
			t.Errorf("%s: message %q does not start with the file name", test.name, err)
		}
	}
}

func TestParseWarnings(t *testing.T) {
	text := "10.04 5\n10.00 -3\n10.02 7\n" + rows(20, " ", ".")[len("10.00 100\n10.02 101\n10.04 102\n"):]
	s, err := Parse("w", []byte(text))
	if err != nil {
		t.Fatal(err)
	}
	if len(s.Warnings) != 2 {
		t.Fatalf("warnings %q, want sorted and negative", s.Warnings)
	}
	if s.TwoTheta[0] != 10 || s.Intensity[0] != -3 {
		t.Errorf("first point %g %g, want 10 -3 (sorted, kept)", s.TwoTheta[0], s.Intensity[0])
	}
}

// TestErrorListAll checks that every bad line is reported, not only the
// first.
func TestErrorListAll(t *testing.T) {
	_, err := Parse("many", []byte(rows(25, " ", ".")+"a b\nc d\n"))
	var list ErrorList
	if !errors.As(err, &list) || len(list) != 2 || list[1].Line != 27 {
		t.Fatalf("got %v", err)
	}
	if !strings.Contains(err.Error(), "and 1 more") {
		t.Errorf("message %q", err)
	}
}

func TestReadFileUntouched(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "kiln.xy")
	data := []byte("20 1\n19 2\n" + rows(20, " ", "."))
	if err := os.WriteFile(p, data, 0o444); err != nil {
		t.Fatal(err)
	}
	st0, _ := os.Stat(p)
	if _, err := ReadFile(p); err != nil {
		t.Fatal(err)
	}
	got, _ := os.ReadFile(p)
	st1, _ := os.Stat(p)
	if string(got) != string(data) || !st0.ModTime().Equal(st1.ModTime()) {
		t.Error("reading changed the file")
	}
	if _, err := ReadFile(filepath.Join(dir, "missing.xy")); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("missing file: %v", err)
	}
}
