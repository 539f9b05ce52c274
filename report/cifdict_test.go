package report

import (
	"bufio"
	"bytes"
	"io"
	"strings"
	"testing"
)

// cifCategories gives the category of every data name the CIF writer
// uses, as the IUCr core and powder dictionaries define them (recalled
// from memory: cif_core.dic 2.4, cif_pd.dic 1.0); PD_REFLN extends
// REFLN, so their items may share a loop.
var cifCategories = map[string]string{
	"_audit_creation_date": "audit", "_audit_creation_method": "audit",
	"_computing_cell_refinement": "computing", "_pd_spec_description": "pd_spec",
	"_space_group_crystal_system": "space_group", "_space_group_centring_type": "space_group",
	"_cell_length_a": "cell", "_cell_length_b": "cell", "_cell_length_c": "cell",
	"_cell_angle_alpha": "cell", "_cell_angle_beta": "cell", "_cell_angle_gamma": "cell",
	"_cell_volume": "cell", "_cell_measurement_reflns_used": "cell_measurement",
	"_cell_measurement_theta_min": "cell_measurement", "_cell_measurement_theta_max": "cell_measurement",
	"_cell_formula_units_Z": "cell", "_diffrn_radiation_wavelength": "diffrn_radiation",
	"_diffrn_radiation_type": "diffrn_radiation", "_chemical_formula_sum": "chemical_formula",
	"_chemical_formula_weight": "chemical_formula", "_exptl_crystal_density_diffrn": "exptl_crystal",
	"_exptl_crystal_density_meas": "exptl_crystal",
	"_pd_peak_id":                 "pd_peak", "_pd_peak_2theta_centroid": "pd_peak", "_pd_peak_d_spacing": "pd_peak",
	"_refln_index_h": "refln", "_refln_index_k": "refln", "_refln_index_l": "refln",
	"_refln_d_spacing": "refln", "_pd_refln_peak_id": "refln",
	// A whole-pattern fit's items (cif_pd.dic 1.0, from memory). The
	// dictionary loops a point's measured, processed and calculated
	// profile values together, as one profile loop.
	"_pd_proc_ls_prof_R_factor": "pd_proc_ls", "_pd_proc_ls_prof_wR_factor": "pd_proc_ls",
	"_pd_proc_ls_prof_wR_expected": "pd_proc_ls", "_pd_proc_ls_profile_function": "pd_proc_ls",
	"_pd_proc_ls_background_function": "pd_proc_ls", "_refine_ls_goodness_of_fit_all": "refine",
	"_refine_ls_number_parameters": "refine",
	"_pd_meas_2theta_scan":         "pd_profile", "_pd_meas_counts_total": "pd_profile",
	"_pd_calc_intensity_total": "pd_profile", "_pd_proc_intensity_bkg_calc": "pd_profile",
}

// TestCIFCategories reads the demo's CIF: every data name is a
// dictionary item of a known category or a local item under the IUCr's
// local prefix, and each loop holds the items of one category (local
// items may join a loop).
func TestCIFCategories(t *testing.T) {
	var buf bytes.Buffer
	if err := WriteCIF(&buf, demoAnalysis(t), goldenDate); err != nil {
		t.Fatal(err)
	}
	if loops := checkCIFCategories(t, &buf); loops != 2 {
		t.Errorf("%d loops, want the peaks' and the reflections'", loops)
	}
}

// checkCIFCategories reports every data name of a CIF that is neither a
// dictionary item of a known category nor a local one, and every loop
// that holds items of two categories; it returns the number of loops.
func checkCIFCategories(t *testing.T, r io.Reader) int {
	t.Helper()
	sc := bufio.NewScanner(r)
	inLoop, loops := false, 0
	var loopCat string
	for n := 1; sc.Scan(); n++ {
		line := strings.TrimSpace(sc.Text())
		switch {
		case line == "loop_":
			inLoop, loopCat = true, ""
			loops++
			continue
		case !strings.HasPrefix(line, "_"):
			if line != "" && !strings.HasPrefix(line, "#") && !strings.HasPrefix(line, "data_") && !strings.HasPrefix(line, ";") {
				inLoop = inLoop && loopCat == "" // values end the loop's names
			}
			continue
		}
		name := strings.Fields(line)[0]
		if strings.HasPrefix(name, "_[local]_") {
			continue
		}
		cat, ok := cifCategories[name]
		if !ok {
			t.Errorf("line %d: %s is neither a dictionary item this test knows nor a local one", n, name)
			continue
		}
		if inLoop {
			if loopCat == "" {
				loopCat = cat
			} else if cat != loopCat {
				t.Errorf("line %d: %s (%s) in a loop of %s", n, name, cat, loopCat)
			}
		}
	}
	return loops
}
