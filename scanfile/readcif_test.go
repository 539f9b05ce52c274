package scanfile

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"
)

func cifScan(n int) string {
	var b strings.Builder
	b.WriteString("data_kiln_trial_12\n_diffrn_radiation_wavelength 1.540593(2)\n_diffrn_radiation_type 'Cu K\\a~1~'\n")
	b.WriteString("_pd_block_id 2026-11-30|KT12|demo\n_pd_proc_info_data_reduction\n;\nfree text\n;\n")
	b.WriteString("loop_\n_pd_meas_2theta_scan\n_pd_meas_counts_total\n")
	for i := 0; i < n; i++ {
		fmt.Fprintf(&b, "%.2f %d(%d)  # row\n", 20+0.02*float64(i), 400+i, 20)
	}
	return b.String()
}

func TestParseCIF(t *testing.T) {
	s, err := Parse("k.cif", []byte(cifScan(30)))
	if err != nil {
		t.Fatal(err)
	}
	if s.Format != "pdcif" || s.Len() != 30 || s.Wavelength != 1.540593 || s.ESD == nil || s.ESD[0] != 20 {
		t.Errorf("got format %s, %d points, λ %g, esd %v", s.Format, s.Len(), s.Wavelength, s.ESD != nil)
	}
	// Range form with intensities and no esds.
	var b strings.Builder
	b.WriteString("data_r\n_pd_meas_2theta_range_min 10.0\n_pd_meas_2theta_range_max 10.5\n_pd_meas_2theta_range_inc 0.02\n")
	b.WriteString("loop_\n_pd_proc_intensity_total\n")
	for i := 0; i < 26; i++ {
		fmt.Fprintf(&b, "%g\n", 1.5e2+float64(i))
	}
	s, err = Parse("r.cif", []byte(b.String()))
	if err != nil {
		t.Fatal(err)
	}
	if s.Len() != 26 || math.Abs(s.TwoTheta[25]-10.5) > 1e-12 || s.ESD != nil || s.Wavelength != 0 {
		t.Errorf("range form: %d points, last %g, esd %v", s.Len(), s.TwoTheta[25], s.ESD != nil)
	}
}

func TestCIFNumber(t *testing.T) {
	for _, test := range []struct {
		in    string
		v, su float64
	}{
		{"1.54056(2)", 1.54056, 0.00002},
		{"5.6402(13)", 5.6402, 0.0013},
		{"123(11)", 123, 11},
		{"1.2e3(4)", 1200, 400},
		{"7", 7, 0},
	} {
		v, su, err := cifNumber(test.in)
		if err != nil || math.Abs(v-test.v) > 1e-12 || math.Abs(su-test.su) > 1e-12 {
			t.Errorf("%s: %g(%g) %v", test.in, v, su, err)
		}
	}
	for _, bad := range []string{"?", ".", "1.0(", "1(x)", "abc"} {
		if _, _, err := cifNumber(bad); err == nil {
			t.Errorf("%q: no error", bad)
		}
	}
}

func TestParseCIFBad(t *testing.T) {
	base := cifScan(25)
	for _, test := range []struct {
		name string
		text string
		want error
		line int
	}{
		{"no intensities", "data_x\n_pd_meas_2theta_range_min 1\n", ErrCIFMissing, 1},
		{"no angles", "data_x\nloop_\n_pd_meas_counts_total\n1\n2\n", ErrCIFMissing, 1},
		{"ragged loop", strings.Replace(base, "20.00 400(20)", "20.00", 1), ErrCIF, 9},
		{"text count", strings.Replace(base, "20.02 401(20)", "20.02 many", 1), ErrText, 13},
		{"unclosed quote", "data_x\n_pd_block_id 'open\n", ErrCIF, 2},
		{"open text field", "data_x\n_pd_block_id\n;\nnever closed\n", ErrCIF, 3},
		{"bad wavelength", strings.Replace(base, "1.540593(2)", "?", 1), ErrText, 2},
		{"too few", cifScan(5), ErrTooFew, 0},
		{"range mismatch", "data_r\n_pd_meas_2theta_range_min 10\n_pd_meas_2theta_range_max 11\n_pd_meas_2theta_range_inc 0.5\nloop_\n_pd_meas_counts_total\n1 2\n", ErrCIF, 7},
	} {
		_, err := Parse("b.cif", []byte(test.text))
		var pe *ParseError
		if !errors.Is(err, test.want) || !errors.As(err, &pe) || pe.Line != test.line {
			t.Errorf("%s: %v; want %v at line %d", test.name, err, test.want, test.line)
		}
	}
}
