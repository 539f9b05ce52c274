#!/usr/bin/python3
"""Read the demo report's CIF with gemmi, as an independent CIF reader.

Debian's python3-gemmi (apt-get install python3-gemmi). Run from the
repository root after `go test ./report -run CIFRead -regen`:

    /usr/bin/python3 testdata/reference/gemmi_cif.py testdata/reference/kiln-trial-07.cif \
        > testdata/reference/kiln-trial-07.cif.gemmi.tsv

Lines: "value<TAB>tag<TAB>number<TAB>decimals printed", "system<TAB>name",
and "refln<TAB>h<TAB>k<TAB>l<TAB>d<TAB>2theta obs<TAB>2theta calc" (the observed
angle found through the reflection's peak id in the peak loop).
"""
import sys
import gemmi

block = gemmi.cif.read_file(sys.argv[1]).sole_block()
print("# gemmi", gemmi.__version__)
for tag in ["_cell_length_a", "_cell_length_b", "_cell_length_c",
            "_cell_angle_alpha", "_cell_angle_beta", "_cell_angle_gamma",
            "_cell_volume", "_diffrn_radiation_wavelength", "_cell_formula_units_Z",
            "_exptl_crystal_density_diffrn", "_cell_measurement_reflns_used"]:
    raw = block.find_value(tag)
    if raw is None:
        continue
    mant = raw.split("(")[0]
    dec = len(mant.split(".")[1]) if "." in mant else 0
    print("value\t%s\t%r\t%d" % (tag, gemmi.cif.as_number(raw), dec))
print("system\t%s" % gemmi.cif.as_string(block.find_value("_space_group_crystal_system")))
small = gemmi.make_small_structure_from_block(block)
print("# gemmi cell:", small.cell.parameters)
# The peaks and the reflections are two loops joined by the peak's id.
peaks = {row[0]: row[1] for row in block.find("_pd_peak_", ["id", "2theta_centroid"])}
table = block.find("_", ["refln_index_h", "refln_index_k", "refln_index_l", "refln_d_spacing",
                         "pd_refln_peak_id", "[local]_reticle_refln_2theta_calc"])
for row in table:
    h, k, l, d, pid, calc = list(row)
    print("refln\t" + "\t".join([h, k, l, d, peaks[pid], calc]))
