package main

import (
	"flag"
	"fmt"
	"strings"

	"reticle/indexing"
	"reticle/refine"
	"reticle/report"
)

// refineFlags are the refinement options shared by index and refine.
type refineFlags struct {
	corrections string
	radius      float64
	flagLimit   float64
	scaling     string
	standard    string
}

func addRefineFlags(fs *flag.FlagSet, defaultCorrections string) *refineFlags {
	f := &refineFlags{}
	fs.StringVar(&f.corrections, "corrections", defaultCorrections, "corrections to refine: zero, displacement, both (zero,displacement) or none")
	fs.Float64Var(&f.radius, "radius", refine.DefaultRadius, "goniometer radius for the displacement correction, mm")
	fs.Float64Var(&f.flagLimit, "flag-limit", refine.DefaultFlagLimit, "flag lines with |Δ/σ| above this")
	fs.StringVar(&f.scaling, "scaling", "significant", "when esds are scaled by χ²_red: significant, above-one, always, never")
	fs.StringVar(&f.standard, "standard", "", "internal standard: Si, LaB6, a lot (Si-640c, Si-640d, LaB6-660a, LaB6-660c) or a cell such as 'cubic F a=5.43119'")
	return f
}

// options turns the flags into refinement options for wavelength λ in Å.
func (f *refineFlags) options(lambda float64) (refine.Options, error) {
	o, err := report.RefineOptions(f.corrections, f.radius, f.flagLimit, f.scaling)
	if err != nil {
		return o, fmt.Errorf("--%v", err)
	}
	o.Wavelength = lambda
	if f.standard != "" {
		st, err := standardFlag(f.standard)
		if err != nil {
			return o, fmt.Errorf("--standard: %v", err)
		}
		o.Standard = &st
		if !o.Zero && !o.Displacement {
			o.Zero, o.Displacement = true, true
		}
	}
	return o, nil
}

// standardFlag reads a built-in standard's name or a typed cell.
func standardFlag(s string) (refine.Standard, error) {
	if !strings.ContainsRune(s, '=') {
		return refine.LookupStandard(s)
	}
	c, e, err := indexing.ParseCell(s)
	if err != nil {
		return refine.Standard{}, err
	}
	return refine.Standard{Name: "typed cell", Cell: c, AESD: e.A, Source: "given on the command line: " + s}, nil
}
