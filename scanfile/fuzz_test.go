package scanfile

import (
	"strings"
	"testing"
)

// FuzzParseText feeds arbitrary bytes to the text reader: it must return a
// scan satisfying the invariants or an error, never panic.
func FuzzParseText(f *testing.F) {
	f.Add([]byte(rows(25, " ", ".")))
	f.Add([]byte("Angle,Counts\n" + rows(25, ",", ".")))
	f.Add([]byte("2Theta;Intensity\n" + rows(25, ";", ",")))
	f.Add([]byte("Wavelength\t1.54\n" + rows(25, "\t", ".")))
	f.Add([]byte("\xef\xbb\xbf10 1 1\r\n10.1 2 1\r\n"))
	f.Add([]byte("10 NaN\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		s, err := Parse("fuzz.xy", data)
		checkScan(t, s, err)
		if err == nil {
			// Writing the points out and reading them again gives the
			// same scan.
			var b strings.Builder
			for i := range s.TwoTheta {
				b.WriteString(formatRow(s, i))
			}
			s2, err := Parse("again.xy", []byte(b.String()))
			if err != nil || s2.Len() != s.Len() {
				t.Fatalf("round trip: %v", err)
			}
		}
	})
}

// FuzzParseCIF feeds arbitrary text to the pdCIF reader.
func FuzzParseCIF(f *testing.F) {
	f.Add(cifScan(25))
	f.Add("data_r\n_pd_meas_2theta_range_min 10.0\n_pd_meas_2theta_range_max 10.5\n_pd_meas_2theta_range_inc 0.02\nloop_\n_pd_proc_intensity_total\n" + strings.Repeat("5\n", 26))
	f.Add("data_x\n_pd_block_id 'open\n")
	f.Add("data_x\nloop_\n_pd_meas_2theta_scan\n_pd_meas_intensity_total\n1 2(\n")
	f.Add(pdcif{angles: "corrected", intensity: "_pd_proc_intensity_net", weights: true}.text())
	f.Add(pdcif{angles: "scan", intensity: "_pd_meas_counts_total", rangeOff: 0.3, before: "data_a\n_cell_length_a 3\n"}.text())
	f.Add("data_tof\nloop_\n_pd_meas_time_of_flight\n_pd_meas_counts_total\n1 2\n")
	f.Add("data_p\n_diffrn_radiation_probe neutron\n_pd_proc_wavelength 1.5\nloop_\n_a\n_b\n1 2 3\n" + quirkPoints("_pd_proc_2theta_scan"))
	f.Fuzz(func(t *testing.T, text string) {
		s, err := Parse("fuzz.cif", []byte(text))
		checkScan(t, s, err)
	})
}

func checkScan(t *testing.T, s *Scan, err error) {
	t.Helper()
	if err != nil {
		if s != nil {
			t.Fatal("scan and error both returned")
		}
		if err.Error() == "" {
			t.Fatal("empty error message")
		}
		return
	}
	if s.Len() < MinPoints || len(s.Intensity) != s.Len() || (s.ESD != nil && len(s.ESD) != s.Len()) {
		t.Fatalf("bad lengths %d %d", s.Len(), len(s.Intensity))
	}
	for i := 1; i < s.Len(); i++ {
		if !(s.TwoTheta[i] > s.TwoTheta[i-1]) {
			t.Fatalf("angles not increasing at %d", i)
		}
	}
}

func formatRow(s *Scan, i int) string {
	return strings.Join([]string{ftoa(s.TwoTheta[i]), ftoa(s.Intensity[i])}, " ") + "\n"
}

// FuzzFastRow checks the allocation-free row parser against the general
// one: whenever the fast path accepts a line, both give the same numbers.
func FuzzFastRow(f *testing.F) {
	for _, seed := range []string{"10.00 100", "8.9000,52", "12,9300;50", "10.1\t475", "1,5,3 2", " -0.5  +7 \r", "5. .5 1", "1;2;", "00012.50000 3"} {
		for sep := sepSpace; sep <= sepTab; sep++ {
			f.Add(seed, uint8(sep))
		}
	}
	f.Fuzz(func(t *testing.T, line string, sepIdx uint8) {
		sep := separator(sepIdx % 4)
		var row [3]float64
		for ncol := 2; ncol <= 3; ncol++ {
			if !fastRow([]byte(line), sep, ncol, &row) {
				continue
			}
			vals, _, err := splitWith(strings.TrimRight(strings.TrimSuffix(line, "\r"), " \t\f"), sep)
			if err != nil || len(vals) != ncol {
				t.Fatalf("%q sep %d: fast path gave %v, general path %v %v", line, sep, row[:ncol], vals, err)
			}
			for i := range vals {
				if vals[i] != row[i] {
					t.Fatalf("%q: column %d fast %v general %v", line, i+1, row[i], vals[i])
				}
			}
		}
	})
}
