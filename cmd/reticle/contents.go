package main

import (
	"fmt"
	"io"
	"strings"

	"reticle/analysis"
	"reticle/cell"
	"reticle/density"
	"reticle/esd"
	"reticle/report"
)

func cmdContentsRun(args []string, stdout, stderr io.Writer) int {
	r, files, code, ok := start(cmdContents, args, stderr)
	if !ok {
		return code
	}
	if len(files) > 0 {
		fmt.Fprintf(stderr, "reticle contents: unexpected argument %q (contents works from --cell, not from a scan)\n", files[0])
		return 2
	}
	s := r.settings
	if r.cell == nil || s.Formula == nil {
		fmt.Fprintln(stderr, "reticle contents: --cell and --formula are required, e.g. --cell 'cubic F a=5.6402(3)' --formula NaCl --z 4")
		return 2
	}
	if s.Z == 0 && s.Density == nil {
		fmt.Fprintln(stderr, "reticle contents: give --z N or a measured --density")
		return 2
	}
	_, e, _ := cell.Parse(r.cellText)
	cov := cell.IndependentCovariance(r.cell.System, e)
	c, err := analysis.Contents(*r.cell, cov, s)
	if err != nil {
		fmt.Fprintf(stderr, "reticle contents: %v\n", err)
		return 1
	}
	j := report.NewContents(c, *s.Formula, s.Density)
	if r.json {
		if err := encodeDocs(stdout, []report.Contents{j}); err != nil {
			fmt.Fprintf(stderr, "reticle contents: %v\n", err)
			return 1
		}
		return 0
	}
	printContents(stdout, cell.Format(*r.cell, e), c, *s.Formula, s.Density)
	return 0
}

// printContents prints a cell's contents for the terminal.
func printContents(w io.Writer, cellText string, c *density.Contents, f density.Formula, m *density.Measured) {
	fmt.Fprintf(w, "%s, %s\n", cellText, f.Text)
	fmt.Fprintf(w, "  molar mass            %s g/mol\n", esd.Format(c.MolarMass, c.MolarMassESD))
	fmt.Fprintf(w, "  cell volume           %s Å³\n", esd.Format(c.Volume, c.VolumeESD))
	if m != nil {
		var cands []string
		for _, k := range c.Candidates {
			cands = append(cands, fmt.Sprintf("%d (%+.1fσ)", k.Z, k.Sigmas))
		}
		fmt.Fprintf(w, "  Z from density        %s  (allowed, nearest first: %s)\n", esd.Format(c.ZEst, c.ZEstESD), strings.Join(cands, ", "))
		if !c.Whole {
			fmt.Fprintf(w, "  warning: the measured density gives no whole Z for a cell with %d lattice point(s): the cell, the formula or the density is wrong\n", c.LatticePoints)
		}
	}
	how := "given"
	if c.ZInferred {
		how = "nearest allowed to the estimate"
	}
	fmt.Fprintf(w, "  Z                     %d (%s; %g per lattice point, %d lattice point(s))\n", c.Z, how, c.FormulaUnitsPerLattice, c.LatticePoints)
	fmt.Fprintf(w, "  X-ray density         %s g/cm³\n", esd.Format(c.Density, c.DensityESD))
	if m != nil {
		fmt.Fprintf(w, "  measured density      %s g/cm³, %+.1fσ from the X-ray density\n", m, c.Sigmas)
	}
	fmt.Fprintf(w, "  atoms per cell        %g\n", c.AtomsPerCell)
	fmt.Fprintf(w, "  formula mass per cell %s g/mol\n", esd.Format(c.CellMass, c.CellMassESD))
	if c.NoStandardWeight {
		fmt.Fprintln(w, "  note: an element without a standard atomic weight is counted at the mass number of a long-lived isotope")
	}
}
