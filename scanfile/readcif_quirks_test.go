package scanfile

import (
	"strings"
	"testing"
)

// quirkPoints is the data loop of a small pattern (invented test data):
// 30 points of 20.00–20.58° 2θ, with a null intensity at the 5th point, a
// null angle at the 9th and a null weight at the 12th.
func quirkPoints(angleTag string) string {
	var b strings.Builder
	b.WriteString("loop_\n" + angleTag + "\n_pd_proc_intensity_total\n_pd_proc_ls_weight\n")
	for i := 0; i < 30; i++ {
		angle := ftoa(20 + 0.02*float64(i))
		y, w := "500", "0.002"
		switch i {
		case 4:
			y = "?"
		case 8:
			angle = "."
		case 11:
			w = "?"
		}
		b.WriteString(angle + " " + y + " " + w + "\n")
	}
	return b.String()
}

// TestCIFQuirks reads the variants of pdCIF that journals' files show
// (each a small file written for the test): null values in the data
// loop, a 2θ column beside disagreeing range items and under a name that
// mixes the dictionary's, a broken metadata loop and a repeated item
// outside the pattern, several data blocks, and the probe and wavelength
// of a neutron file.
func TestCIFQuirks(t *testing.T) {
	const rangeItems = "_pd_meas_2theta_range_min 10\n_pd_meas_2theta_range_max 50\n_pd_meas_2theta_range_inc 0.1\n"
	for _, test := range []struct {
		name, text string
		points     int
		notes      []string // every one must appear among the warnings
		check      func(*Scan) string
	}{
		{"nulls in the data loop", "data_p\n_diffrn_radiation_wavelength 1.54056\n" + quirkPoints("_pd_proc_2theta_corrected"), 28,
			[]string{"2 of the points had an unknown (?) or inapplicable (.) angle or intensity", "1 of the points had no weight"}, nil},
		{"column beats range items", "data_p\n" + rangeItems + quirkPoints("_pd_meas_2theta_scan"), 28,
			[]string{"the column was used"}, func(s *Scan) string {
				if s.TwoTheta[0] != 20 {
					return "angles from the range items"
				}
				return ""
			}},
		{"mixed 2θ name", "data_p\n" + rangeItems + quirkPoints("_pd_proc_2theta_scan"), 28,
			[]string{"read from _pd_proc_2theta_scan", "the column was used"}, nil},
		{"broken metadata loop, repeated item", "data_p\n_diffrn_source tube\nloop_\n_publ_author_name\n_publ_author_address\nA B C\n_diffrn_source tube2\n" + quirkPoints("_pd_meas_2theta_scan"), 28,
			[]string{"has 3 values, not a multiple; it was skipped", "_diffrn_source is given again"}, nil},
		{"several blocks", "data_global\n_journal_year 2020\ndata_phase\n_cell_length_a 4\ndata_pattern\n" + quirkPoints("_pd_meas_2theta_scan"), 28,
			[]string{"holds 3 data blocks; the pattern of block pattern was read"}, nil},
		{"neutron probe and processed wavelength", "data_p\n_diffrn_radiation_probe neutron\n_diffrn_radiation_wavelength 1.5482\n_pd_proc_wavelength 1.548165\n" + quirkPoints("_pd_proc_2theta_corrected"), 28,
			[]string{"the second was used"}, func(s *Scan) string {
				r := s.Radiation()
				if r.Lambda1 != 1.548165 || r.Doublet() || r.KBeta != 0 || s.Probe != "neutron" {
					return "radiation " + r.Name
				}
				return ""
			}},
		{"neutron wavelength that looks like an anode's", "data_p\n_diffrn_radiation_probe neutron\n_diffrn_radiation_wavelength 1.540593\n" + quirkPoints("_pd_proc_2theta_corrected"), 28,
			nil, func(s *Scan) string {
				if r := s.Radiation(); r.Doublet() {
					return "read as an X-ray doublet"
				}
				return ""
			}},
	} {
		s, err := Parse("q.cif", []byte(test.text))
		if err != nil {
			t.Errorf("%s: %v", test.name, err)
			continue
		}
		if s.Len() != test.points {
			t.Errorf("%s: %d points, want %d", test.name, s.Len(), test.points)
		}
		all := strings.Join(s.Warnings, " | ")
		for _, n := range test.notes {
			if !strings.Contains(all, n) {
				t.Errorf("%s: no note %q in %q", test.name, n, all)
			}
		}
		if test.check != nil {
			if msg := test.check(s); msg != "" {
				t.Errorf("%s: %s", test.name, msg)
			}
		}
	}
}

// TestCIFBrokenPatternLoop: a data loop with a wrong number of values is
// still an error, naming the line.
func TestCIFBrokenPatternLoop(t *testing.T) {
	_, err := Parse("b.cif", []byte("data_p\nloop_\n_pd_meas_2theta_scan\n_pd_meas_counts_total\n"+strings.Repeat("20 5\n", 25)+"21\n"))
	if err == nil || !strings.Contains(err.Error(), "b.cif") || !strings.Contains(err.Error(), "not a multiple") {
		t.Errorf("broken data loop: %v", err)
	}
}
