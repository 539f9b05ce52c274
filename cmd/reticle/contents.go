package main

import (
	"flag"
	"fmt"
	"io"
	"strings"

	"reticle/density"
	"reticle/indexing"
	"reticle/peaks"
	"reticle/report"
)

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

// input parses the flags; without a formula it returns the zero Formula.
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
		m, err = report.ParseDensity(f.density)
		if err != nil {
			return density.Formula{}, nil, fmt.Errorf("--%v", err)
		}
	}
	return form, m, nil
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
	j := report.NewContents(c, form, meas)
	if *asJSON {
		if err := encodeDocs(stdout, []report.Contents{j}); err != nil {
			fmt.Fprintf(stderr, "reticle contents: %v\n", err)
			return 1
		}
		return 0
	}
	printContents(stdout, cell, j)
	return 0
}

func printContents(w io.Writer, cell indexing.Cell, j report.Contents) {
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
