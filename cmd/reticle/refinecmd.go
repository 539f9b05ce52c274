package main

import (
	"context"
	"flag"
	"fmt"
	"io"
	"strconv"
	"strings"
	"text/tabwriter"

	"reticle/indexing"
	"reticle/peaks"
	"reticle/refine"
	"reticle/report"
)

// standardJSON describes the internal standard's part of a refinement.
type standardJSON struct {
	Name        string            `json:"name"`
	Source      string            `json:"source"`
	Cell        string            `json:"cell"`
	Lines       int               `json:"lines"`
	Chi2Reduced float64           `json:"chi2_reduced"`
	Residuals   []report.Residual `json:"residuals"`
}

// refineDocJSON is the --json document of reticle refine.
type refineDocJSON struct {
	report.ScanInfo
	StartCell string `json:"start_cell"`
	report.CellValues
	report.Refined
	Standard   *standardJSON `json:"standard,omitempty"`
	Unmatched  []float64     `json:"unmatched_lines"`
	Overlapped []float64     `json:"overlapped_lines,omitempty"`
}

func cmdRefine(args []string, stdout, stderr io.Writer) int {
	fs := flag.NewFlagSet("refine", flag.ContinueOnError)
	fs.SetOutput(stderr)
	wl := fs.String("wavelength", "", "anode symbol (K-alpha doublet), anode+Ka1, or wavelength in Å")
	cellText := fs.String("cell", "", "starting cell, e.g. 'tetragonal P a=4.59 c=2.96' (required)")
	asJSON := fs.Bool("json", false, "print a JSON document instead of a table")
	tol := fs.Float64("tolerance", 0.03, "smallest 2θ window for matching a line, degrees")
	exclude := fs.String("exclude", "", "comma-separated 2θ of lines to leave out, degrees")
	rf := addRefineFlags(fs, "zero")
	if err := fs.Parse(args); err != nil {
		return 2
	}
	if *cellText == "" {
		fmt.Fprintln(stderr, "reticle refine: --cell is required, e.g. --cell 'cubic F a=5.64'")
		return 2
	}
	cell, _, err := indexing.ParseCell(*cellText)
	if err != nil {
		fmt.Fprintf(stderr, "reticle refine: --cell: %v\n", err)
		return 2
	}
	if fs.NArg() == 0 {
		fmt.Fprintln(stderr, "reticle refine: no scan file given")
		return 2
	}
	if !(*tol > 0) {
		fmt.Fprintf(stderr, "reticle refine: --tolerance: want a positive window in degrees, got %g\n", *tol)
		return 2
	}
	m := refine.Matching{Tolerance: *tol}
	if *exclude != "" {
		for _, f := range strings.Split(*exclude, ",") {
			v, err := strconv.ParseFloat(strings.TrimSpace(f), 64)
			if err != nil {
				fmt.Fprintf(stderr, "reticle refine: --exclude: %q is not an angle in degrees\n", f)
				return 2
			}
			m.Exclude = append(m.Exclude, v)
		}
	}
	if _, err := rf.options(1); err != nil {
		fmt.Fprintf(stderr, "reticle refine: %v\n", err)
		return 2
	}
	var popt peaks.Options
	if *wl != "" {
		r, err := peaks.ParseRadiation(*wl)
		if err != nil {
			fmt.Fprintf(stderr, "reticle refine: --wavelength: %v\n", err)
			return 2
		}
		popt.Radiation = r
	}
	var docs []refineDocJSON
	status := 0
	for _, path := range fs.Args() {
		doc, err := refineFile(path, cell, *cellText, popt, rf, m)
		if err != nil {
			fmt.Fprintf(stderr, "reticle refine: %v\n", err)
			status = 1
			continue
		}
		if *asJSON {
			docs = append(docs, doc)
		} else {
			printRefinement(stdout, doc)
		}
	}
	if *asJSON && len(docs) > 0 {
		if err := encodeDocs(stdout, docs); err != nil {
			fmt.Fprintf(stderr, "reticle refine: %v\n", err)
			return 1
		}
	}
	return status
}

// refineFile extracts a scan's peaks and refines the cell against them.
func refineFile(path string, cell indexing.Cell, cellText string, popt peaks.Options, rf *refineFlags, m refine.Matching) (refineDocJSON, error) {
	s, err := peaks.ReadFile(path)
	if err != nil {
		return refineDocJSON{}, err
	}
	pr, err := peaks.Extract(context.Background(), s, popt, nil)
	if err != nil {
		return refineDocJSON{}, fmt.Errorf("%s: %w", path, err)
	}
	var lines []indexing.Line
	for _, p := range pr.Peaks {
		if !p.Companion() {
			lines = append(lines, indexing.Line{TwoTheta: p.TwoTheta, ESD: p.TwoThetaESD})
		}
	}
	ropt, err := rf.options(pr.Radiation.Lambda1)
	if err != nil {
		return refineDocJSON{}, err
	}
	r, err := refine.RefineLines(context.Background(), cell, lines, ropt, m)
	if err != nil {
		return refineDocJSON{}, fmt.Errorf("%s: %w", path, err)
	}
	doc := refineDocJSON{
		ScanInfo: report.NewScanInfo(s, pr.Radiation), StartCell: cellText,
		CellValues: report.NewCellValues(r.Cell, r.Volume, r.Zero), Refined: report.NewRefined(r), Unmatched: []float64{},
	}
	for _, l := range r.Unmatched {
		doc.Unmatched = append(doc.Unmatched, l.TwoTheta)
	}
	for _, l := range r.Overlapped {
		doc.Overlapped = append(doc.Overlapped, l.TwoTheta)
	}
	if sf := r.StandardFit; sf != nil {
		sj := &standardJSON{Name: sf.Standard.Name, Source: sf.Standard.Source, Cell: sf.Standard.Cell.String(), Lines: sf.N, Chi2Reduced: sf.Chi2Reduced, Residuals: []report.Residual{}}
		for _, rr := range sf.Residuals {
			sj.Residuals = append(sj.Residuals, report.NewResidual(rr))
		}
		doc.Standard = sj
	}
	return doc, nil
}

func printRefinement(w io.Writer, d refineDocJSON) {
	fmt.Fprintf(w, "%s  %s, λ = %.7f Å\n", d.File, d.Radiation, d.Wavelength)
	fmt.Fprintf(w, "refined %s %s from %d lines (started from %s)\n", d.System, d.Centring, d.Fitted, d.StartCell)
	for _, p := range d.Params {
		note := ""
		if p.FromStandard {
			note = "  (from the internal standard)"
		}
		fmt.Fprintf(w, "  %-13s %s %s%s\n", p.Name, p.Text, p.Unit, note)
	}
	fmt.Fprintf(w, "  %-13s %s Å³\n", "volume", peaks.FormatESD(d.Volume, d.VolumeESD))
	scaled := "not scaled"
	if d.Scaled {
		scaled = "esds scaled by it"
	}
	fmt.Fprintf(w, "  χ²_red = %.3f over %d degrees of freedom (%s; convention %q)\n", d.Chi2Reduced, d.DOF, scaled, d.Scaling)
	if d.Displacement != nil {
		fmt.Fprintf(w, "  goniometer radius %g mm\n", d.Radius)
	}
	if len(d.ParamNames) > 1 {
		fmt.Fprintln(w, "correlations:")
		tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
		fmt.Fprintf(tw, "\t%s\t\n", strings.Join(d.ParamNames, "\t"))
		for i, n := range d.ParamNames {
			row := []string{n}
			for j := range d.ParamNames {
				row = append(row, fmt.Sprintf("%+.3f", d.Correlation[i][j]))
			}
			fmt.Fprintf(tw, "%s\t\n", strings.Join(row, "\t"))
		}
		tw.Flush()
	}
	printResiduals(w, "lines", d.Residuals)
	if d.Standard != nil {
		fmt.Fprintf(w, "internal standard %s (%s), %d lines, χ²_red = %.3f\n", d.Standard.Name, d.Standard.Cell, d.Standard.Lines, d.Standard.Chi2Reduced)
		printResiduals(w, "standard lines", d.Standard.Residuals)
	}
	if len(d.Unmatched) > 0 {
		fmt.Fprintf(w, "unmatched lines (°): %s\n", joinAngles(d.Unmatched))
	}
	if len(d.Overlapped) > 0 {
		fmt.Fprintf(w, "left out, overlapping both phases (°): %s\n", joinAngles(d.Overlapped))
	}
	for _, warn := range d.Warnings {
		fmt.Fprintf(w, "warning: %s\n", warn)
	}
	fmt.Fprintln(w)
}

func printResiduals(w io.Writer, title string, rs []report.Residual) {
	fmt.Fprintf(w, "%s:\n", title)
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintln(tw, "hkl\t2θ obs (°)\tesd\t2θ calc (°)\tΔ2θ (°)\tΔ/σ\t\t")
	for _, r := range rs {
		mark := ""
		switch {
		case r.Excluded:
			mark = "excluded"
		case r.Flagged:
			mark = "flagged"
		}
		fmt.Fprintf(tw, "%s\t%.4f\t%.4f\t%.4f\t%+.4f\t%+.1f\t%s\t\n", report.HKLText(r.HKL), r.TwoTheta, r.ESD, r.TwoThetaCalc, r.Delta, r.Norm, mark)
	}
	tw.Flush()
}

func joinAngles(v []float64) string {
	var s []string
	for _, x := range v {
		s = append(s, fmt.Sprintf("%.4f", x))
	}
	return strings.Join(s, ", ")
}
