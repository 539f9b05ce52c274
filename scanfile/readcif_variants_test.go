package scanfile

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"
)

// pdcif writes a pdCIF of 60 points of a made-up pattern (a flat 500
// counts with Poisson noise; the numbers are invented test data) in one of
// the variants the IUCr powder dictionary allows.
type pdcif struct {
	angles    string // "scan", "corrected" or "range"
	intensity string // the intensity item
	su        bool   // uncertainties in parentheses
	weights   bool   // _pd_proc_ls_weight column (1/σ²)
	wavelines []string
	extra     string // items added to the pattern's block
	before    string // blocks written before the pattern's
	after     string // blocks written after it
	rangeOff  float64
}

func (c pdcif) text() string {
	rng := rand.New(rand.NewPCG(4, 4))
	var b strings.Builder
	b.WriteString(c.before)
	b.WriteString("data_pattern\n_pd_block_id kiln|trial-12\n")
	for _, w := range c.wavelines {
		b.WriteString(w + "\n")
	}
	b.WriteString(c.extra)
	if c.angles == "range" || c.rangeOff != 0 {
		fmt.Fprintf(&b, "_pd_meas_2theta_range_min %g\n_pd_meas_2theta_range_max %g\n_pd_meas_2theta_range_inc 0.02\n", 20+c.rangeOff, 20+c.rangeOff+59*0.02)
	}
	b.WriteString("loop_\n")
	switch c.angles {
	case "scan":
		b.WriteString("_pd_meas_2theta_scan\n")
	case "corrected":
		b.WriteString("_pd_proc_point_id\n_pd_proc_2theta_corrected\n")
	}
	b.WriteString(c.intensity + "\n")
	if c.weights {
		b.WriteString("_pd_proc_ls_weight\n")
	}
	for i := 0; i < 60; i++ {
		y := 500 + math.Sqrt(500)*rng.NormFloat64()
		switch c.angles {
		case "scan":
			fmt.Fprintf(&b, "%.2f ", 20+0.02*float64(i))
		case "corrected":
			fmt.Fprintf(&b, "%d %.2f ", i+1, 20+0.02*float64(i))
		}
		if c.su {
			fmt.Fprintf(&b, "%.0f(%.0f)", y, math.Sqrt(y))
		} else {
			fmt.Fprintf(&b, "%.0f", y)
		}
		if c.weights {
			fmt.Fprintf(&b, " %.6g", 1/y)
		}
		b.WriteString("\n")
	}
	b.WriteString(c.after)
	return b.String()
}

// TestCIFVariants reads pdCIF files written in every variant the reader
// supports: each item name for angles and intensities, uncertainties in
// parentheses, weights, range items (and a column that overrides them),
// several blocks, looped wavelengths.
func TestCIFVariants(t *testing.T) {
	single := []string{"_diffrn_radiation_wavelength 1.540593"}
	doublet := []string{"loop_", "_diffrn_radiation_wavelength_id", "_diffrn_radiation_wavelength", "_diffrn_radiation_wavelength_wt", "1 1.540593 1.0", "2 1.544427 0.5"}
	for _, test := range []struct {
		name  string
		c     pdcif
		check func(*Scan) string
	}{
		{"meas scan, counts with su", pdcif{angles: "scan", intensity: "_pd_meas_counts_total", su: true, wavelines: single}, func(s *Scan) string {
			if s.ESD == nil || s.Wavelength != 1.540593 {
				return "no esds or wavelength"
			}
			return ""
		}},
		{"proc corrected, intensity total", pdcif{angles: "corrected", intensity: "_pd_proc_intensity_total", wavelines: single}, nil},
		{"proc corrected, net with weights", pdcif{angles: "corrected", intensity: "_pd_proc_intensity_net", weights: true, wavelines: single}, func(s *Scan) string {
			if s.ESD == nil || math.Abs(s.ESD[0]-math.Sqrt(s.Intensity[0])) > 1e-3*s.ESD[0] {
				return fmt.Sprintf("weights not read as 1/σ²: %v", s.ESD != nil)
			}
			return ""
		}},
		{"net without esds", pdcif{angles: "corrected", intensity: "_pd_proc_intensity_net"}, nil},
		{"range items", pdcif{angles: "range", intensity: "_pd_meas_intensity_total"}, func(s *Scan) string {
			if math.Abs(s.TwoTheta[59]-21.18) > 1e-9 {
				return fmt.Sprintf("last angle %g", s.TwoTheta[59])
			}
			return ""
		}},
		{"column overrides range", pdcif{angles: "scan", intensity: "_pd_meas_counts_total", rangeOff: 0.5}, func(s *Scan) string {
			if s.TwoTheta[0] != 20 || !strings.Contains(strings.Join(s.Warnings, " "), "the column was used") {
				return fmt.Sprintf("first angle %g, notes %q", s.TwoTheta[0], s.Warnings)
			}
			return ""
		}},
		{"looped doublet", pdcif{angles: "scan", intensity: "_pd_meas_counts_total", wavelines: doublet}, func(s *Scan) string {
			r := s.Radiation()
			if !r.Doublet() || r.Lambda2 != 1.544427 || r.Ratio2 != 0.5 {
				return fmt.Sprintf("radiation %+v", r)
			}
			return ""
		}},
		{"several blocks, wavelength elsewhere", pdcif{angles: "scan", intensity: "_pd_meas_counts_total",
			before: "data_global\n_journal_name_full 'none'\n", after: "data_phase\n_diffrn_radiation_wavelength 0.49935\n_cell_length_a 5\n"}, func(s *Scan) string {
			if s.Block != "pattern" || s.Wavelength != 0.49935 {
				return fmt.Sprintf("block %q, λ %g", s.Block, s.Wavelength)
			}
			return ""
		}},
		{"K-alpha1 only", pdcif{angles: "scan", intensity: "_pd_meas_counts_total", wavelines: single,
			extra: "_diffrn_radiation_type 'Cu K\\a~1~'\n_diffrn_radiation_monochromator 'primary Ge(111)'\n"}, func(s *Scan) string {
			if r := s.Radiation(); r.Doublet() || r.KBeta != 0 || !s.KAlpha1Only {
				return fmt.Sprintf("radiation %+v", r)
			}
			return ""
		}},
		{"weighted mean wavelength means the doublet", pdcif{angles: "scan", intensity: "_pd_meas_counts_total", wavelines: []string{"_diffrn_radiation_wavelength 1.5418"},
			extra: "_diffrn_radiation_monochromator graphite\n"}, func(s *Scan) string {
			if r := s.Radiation(); !r.Doublet() || r.Lambda1 != 1.5405929 || r.KBeta != 0 {
				return fmt.Sprintf("radiation %+v", r)
			}
			return ""
		}},
	} {
		s, err := Parse("v.cif", []byte(test.c.text()))
		if err != nil {
			t.Errorf("%s: %v", test.name, err)
			continue
		}
		if s.Len() != 60 || s.Format != "pdcif" {
			t.Errorf("%s: %d points, format %s", test.name, s.Len(), s.Format)
			continue
		}
		if test.check != nil {
			if msg := test.check(s); msg != "" {
				t.Errorf("%s: %s", test.name, msg)
			}
		}
	}
}

// TestCIFBlocks: the measured pattern's block is read by default, another
// when asked for, and a block that does not exist is an error naming the
// blocks that hold patterns.
func TestCIFBlocks(t *testing.T) {
	calc := pdcif{angles: "corrected", intensity: "_pd_proc_intensity_total"}.text()
	calc = strings.Replace(calc, "data_pattern", "data_fitted", 1)
	meas := pdcif{angles: "scan", intensity: "_pd_meas_counts_total"}.text()
	file := []byte(calc + meas)
	s, err := Parse("b.cif", file)
	if err != nil || s.Block != "pattern" || len(s.Blocks) != 2 {
		t.Fatalf("default block: %v, %q of %q", err, s.Block, s.Blocks)
	}
	if s, err := ParseWith("b.cif", file, ReadOptions{Block: "fitted"}); err != nil || s.Block != "fitted" {
		t.Errorf("asked block: %v", err)
	}
	if _, err := ParseWith("b.cif", file, ReadOptions{Block: "nothing"}); !errors.Is(err, ErrCIFMissing) || !strings.Contains(err.Error(), "fitted, pattern") {
		t.Errorf("missing block: %v", err)
	}
}

// TestNotAngleDispersive: a time-of-flight pattern is refused with a
// message that says so.
func TestNotAngleDispersive(t *testing.T) {
	text := "data_tof\nloop_\n_pd_meas_time_of_flight\n_pd_meas_counts_total\n" + strings.Repeat("1000 5\n", 30)
	_, err := Parse("t.cif", []byte(text))
	if !errors.Is(err, ErrNotAngle) || !strings.Contains(err.Error(), "_pd_meas_time_of_flight") {
		t.Errorf("time-of-flight: %v", err)
	}
}

// TestVendorFiles: markup and binary files are refused with a message
// naming what the file looks like and what Reticle reads.
func TestVendorFiles(t *testing.T) {
	for _, test := range []struct {
		data string
		want error
		msg  string
	}{
		{"<?xml version=\"1.0\"?>\n<!-- export -->\n<RawData><Scan/></RawData>\n", ErrVendor, "root element <RawData>"},
		{"<scan><point/></scan>", ErrVendor, "XML document"},
		{"{\"data\": [1, 2]}", ErrVendor, "JSON document"},
		{"RAW\x00\x01\x02\x03binary", ErrBinary, "pdCIF"},
	} {
		_, err := Parse("instrument.raw", []byte(test.data))
		if !errors.Is(err, test.want) || !strings.Contains(err.Error(), test.msg) || !strings.Contains(err.Error(), "instrument.raw") {
			t.Errorf("%q: %v", test.data[:10], err)
		}
	}
}

// TestNoiseCheck: esds a tenth of the scatter of the counts are replaced
// by counting noise, with a note; esds that match are kept.
func TestNoiseCheck(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 1))
	var good, bad strings.Builder
	for i := 0; i < 200; i++ {
		y := 900 + 30*rng.NormFloat64()
		fmt.Fprintf(&good, "%.2f %.0f %.1f\n", 20+0.02*float64(i), y, 30.0)
		fmt.Fprintf(&bad, "%.2f %.0f %.1f\n", 20+0.02*float64(i), y, 3.0)
	}
	s, err := Parse("good.xye", []byte(good.String()))
	if err != nil || s.ESD == nil || len(s.Warnings) != 0 {
		t.Errorf("matching esds: %v, notes %q", err, s.Warnings)
	}
	s, err = Parse("bad.xye", []byte(bad.String()))
	if err != nil || s.ESD != nil || !strings.Contains(strings.Join(s.Warnings, " "), "counting noise") {
		t.Errorf("esds too small: %v, esd %v, notes %q", err, s.ESD != nil, s.Warnings)
	}
}
