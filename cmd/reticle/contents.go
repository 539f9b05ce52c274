package main

import (
	"flag"
	"fmt"
	"io"
	"strings"

	"reticle/density"
	"reticle/indexing"
	"reticle/peaks"
)

// contentsJSON is the cell-contents document (and the part of an index
// solution that describes its contents).
type contentsJSON struct {
	Formula           string       `json:"formula"`
	MolarMass         float64      `json:"molar_mass"`
	MolarMassESD      float64      `json:"molar_mass_esd"`
	NoStandardWeight  bool         `json:"no_standard_weight,omitempty"`
	Volume            float64      `json:"volume"`
	VolumeESD         float64      `json:"volume_esd"`
	LatticePoints     int          `json:"lattice_points"`
	Z                 int          `json:"z"`
	ZFromDensity      bool         `json:"z_from_density"`
	ZEst              *float64     `json:"z_estimated,omitempty"`
	ZEstESD           *float64     `json:"z_estimated_esd,omitempty"`
	ZWhole            *bool        `json:"z_whole,omitempty"`
	Candidates        []zCandidate `json:"z_candidates,omitempty"`
	Density           float64      `json:"density_xray"`
	DensityESD        float64      `json:"density_xray_esd"`
	DensityText       string       `json:"density_xray_text"`
	Measured          *float64     `json:"density_measured,omitempty"`
	MeasuredESD       *float64     `json:"density_measured_esd,omitempty"`
	Discrepancy       *float64     `json:"density_discrepancy_sigma,omitempty"`
	AtomsPerCell      float64      `json:"atoms_per_cell"`
	CellMass          float64      `json:"formula_mass_per_cell"`
	UnitsPerLattice   float64      `json:"formula_units_per_lattice_point"`
	AvogadroConstant  float64      `json:"avogadro_constant"`
	AtomicWeightTable string       `json:"atomic_weights"`
}

type zCandidate struct {
	Z     int     `json:"z"`
	Sigma float64 `json:"sigma"`
}

// contentsFlags are the flags that give a formula and Z or a density.
type contentsFlags struct {
	formula, density string
	z                int
}

func addContentsFlags(fs *flag.FlagSet) *contentsFlags {
	f := &contentsFlags{}
	fs.StringVar(&f.formula, "formula", "", "chemical formula of one formula unit, e.g. MgAl2O4, CuSO4·5H2O")
	fs.StringVar(&f.density, "density", "", "measured density in g/cm³ with its esd, e.g. 2.16(1)")
	fs.IntVar(&f.z, "z", 0, "formula units per cell (instead of a measured density)")
	return f
}

// input parses the flags; ok is false when no formula was given.
func (f *contentsFlags) input() (density.Formula, *density.Measured, error) {
	if f.formula == "" {
		if f.density != "" || f.z != 0 {
			return density.Formula{}, nil, fmt.Errorf("--density and --z need --formula")
		}
		return density.Formula{}, nil, nil
	}
	form, err := density.ParseFormula(f.formula)
	if err != nil {
		return density.Formula{}, nil, fmt.Errorf("--formula: %v", err)
	}
	if f.z < 0 {
		return density.Formula{}, nil, fmt.Errorf("--z: want a positive number of formula units, got %d", f.z)
	}
	var m *density.Measured
	if f.density != "" {
		v, u, err := peaks.ParseESD(f.density)
		if err != nil || !(v > 0) {
			return density.Formula{}, nil, fmt.Errorf("--density: want a density in g/cm³ such as 2.16(1), got %q", f.density)
		}
		if u == 0 {
			u = 0.01 * v
		}
		m = &density.Measured{Density: v, ESD: u}
	}
	return form, m, nil
}

func toContentsJSON(c *density.Contents, f density.Formula, m *density.Measured) contentsJSON {
	j := contentsJSON{
		Formula: f.Text, MolarMass: c.MolarMass, MolarMassESD: c.MolarMassESD, NoStandardWeight: c.NoStandardWeight,
		Volume: c.Volume, VolumeESD: c.VolumeESD, LatticePoints: c.LatticePoints, Z: c.Z, ZFromDensity: c.ZInferred,
		Density: c.Density, DensityESD: c.DensityESD, DensityText: peaks.FormatESD(c.Density, c.DensityESD),
		AtomsPerCell: c.AtomsPerCell, CellMass: c.CellMass, UnitsPerLattice: c.FormulaUnitsPerLattice,
		AvogadroConstant: density.Avogadro, AtomicWeightTable: "IUPAC 2021 standard atomic weights (conventional values for intervals)",
	}
	if m != nil {
		ze, zu, w, d := c.ZEst, c.ZEstESD, c.Whole, c.Discrepancy
		j.ZEst, j.ZEstESD, j.ZWhole, j.Discrepancy = &ze, &zu, &w, &d
		j.Measured, j.MeasuredESD = &m.Density, &m.ESD
		for _, k := range c.Candidates {
			j.Candidates = append(j.Candidates, zCandidate{k.Z, finite(k.Sigma)})
		}
	}
	return j
}

func cmdContents(args []string, stdout, stderr io.Writer) int {
	fs := flag.NewFlagSet("contents", flag.ContinueOnError)
	fs.SetOutput(stderr)
	cellText := fs.String("cell", "", "the cell, e.g. 'cubic F a=5.6402(3)' (required)")
	asJSON := fs.Bool("json", false, "print a JSON document instead of text")
	cf := addContentsFlags(fs)
	if err := fs.Parse(args); err != nil {
		return 2
	}
	if fs.NArg() > 0 {
		fmt.Fprintf(stderr, "reticle contents: unexpected argument %q (contents works from --cell, not from a scan)\n", fs.Arg(0))
		return 2
	}
	if *cellText == "" || cf.formula == "" {
		fmt.Fprintln(stderr, "reticle contents: --cell and --formula are required, e.g. --cell 'cubic F a=5.6402(3)' --formula NaCl --z 4")
		return 2
	}
	cell, esd, err := indexing.ParseCell(*cellText)
	if err != nil {
		fmt.Fprintf(stderr, "reticle contents: --cell: %v\n", err)
		return 2
	}
	form, meas, err := cf.input()
	if err != nil {
		fmt.Fprintf(stderr, "reticle contents: %v\n", err)
		return 2
	}
	if cf.z == 0 && meas == nil {
		fmt.Fprintln(stderr, "reticle contents: give --z N or a measured --density")
		return 2
	}
	_, vesd := density.VolumeESD(cell, esd)
	c, err := density.Compute(density.Input{Cell: cell, VolumeESD: vesd, Formula: form, Z: cf.z, Measured: meas})
	if err != nil {
		fmt.Fprintf(stderr, "reticle contents: %v\n", err)
		return 1
	}
	j := toContentsJSON(c, form, meas)
	if *asJSON {
		if err := encodeDocs(stdout, []contentsJSON{j}); err != nil {
			fmt.Fprintf(stderr, "reticle contents: %v\n", err)
			return 1
		}
		return 0
	}
	printContents(stdout, cell, j)
	return 0
}

func printContents(w io.Writer, cell indexing.Cell, j contentsJSON) {
	fmt.Fprintf(w, "%s, %s\n", cell, j.Formula)
	fmt.Fprintf(w, "  molar mass            %s g/mol\n", peaks.FormatESD(j.MolarMass, j.MolarMassESD))
	fmt.Fprintf(w, "  cell volume           %s Å³\n", peaks.FormatESD(j.Volume, j.VolumeESD))
	if j.ZEst != nil {
		var cands []string
		for _, k := range j.Candidates {
			cands = append(cands, fmt.Sprintf("%d (%+.1fσ)", k.Z, k.Sigma))
		}
		fmt.Fprintf(w, "  Z from density        %s  (allowed, nearest first: %s)\n", peaks.FormatESD(*j.ZEst, *j.ZEstESD), strings.Join(cands, ", "))
		if !*j.ZWhole {
			fmt.Fprintf(w, "  warning: the measured density gives no whole Z for a cell with %d lattice point(s): the cell, the formula or the density is wrong\n", j.LatticePoints)
		}
	}
	how := "given"
	if j.ZFromDensity {
		how = "nearest allowed to the estimate"
	}
	fmt.Fprintf(w, "  Z                     %d (%s; %g per lattice point, %d lattice point(s))\n", j.Z, how, j.UnitsPerLattice, j.LatticePoints)
	fmt.Fprintf(w, "  X-ray density         %s g/cm³\n", j.DensityText)
	if j.Measured != nil {
		fmt.Fprintf(w, "  measured density      %s g/cm³, %+.1fσ from the X-ray density\n", peaks.FormatESD(*j.Measured, *j.MeasuredESD), *j.Discrepancy)
	}
	fmt.Fprintf(w, "  atoms per cell        %g\n", j.AtomsPerCell)
	fmt.Fprintf(w, "  formula mass per cell %s g/mol\n", peaks.FormatESD(j.CellMass, j.MolarMassESD*float64(j.Z)))
	if j.NoStandardWeight {
		fmt.Fprintln(w, "  note: an element without a standard atomic weight is counted at the mass number of a long-lived isotope")
	}
}
