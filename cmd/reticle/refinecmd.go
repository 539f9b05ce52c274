package main

import (
	"context"
	"fmt"
	"io"
	"strings"
	"text/tabwriter"

	"reticle/analysis"
	"reticle/esd"
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
	Refined    report.Refined `json:"refinement"`
	Standard   *standardJSON  `json:"standard,omitempty"`
	Unmatched  []float64      `json:"unmatched_lines"`
	Overlapped []float64      `json:"overlapped_lines,omitempty"`
}

func cmdRefineRun(args []string, stdout, stderr io.Writer) int {
	r, files, code, ok := start(cmdRefine, args, stderr)
	if !ok {
		return code
	}
	if r.cell == nil {
		fmt.Fprintln(stderr, "reticle refine: --cell is required, e.g. --cell 'cubic F a=5.64'")
		return 2
	}
	if len(files) == 0 {
		fmt.Fprintln(stderr, "reticle refine: no scan file given")
		return 2
	}
	var docs []refineDocJSON
	status := 0
	for _, path := range files {
		doc, err := refineFile(path, r)
		if err != nil {
			fmt.Fprintf(stderr, "reticle refine: %v\n", err)
			status = 1
			continue
		}
		if r.json {
			docs = append(docs, doc)
		} else {
			printRefinement(stdout, doc)
		}
	}
	if r.json && len(docs) > 0 {
		if err := encodeDocs(stdout, docs); err != nil {
			fmt.Fprintf(stderr, "reticle refine: %v\n", err)
			return 1
		}
	}
	return status
}

// refineFile extracts a scan's peaks and refines the cell against them.
func refineFile(path string, r *request) (refineDocJSON, error) {
	ctx := context.Background()
	e, err := analysis.ReadExtract(ctx, path, r.settings, nil)
	if err != nil {
		return refineDocJSON{}, err
	}
	res, err := analysis.RefineCell(ctx, e, *r.cell, r.settings)
	if err != nil {
		return refineDocJSON{}, err
	}
	doc := refineDocJSON{
		ScanInfo: report.NewScanInfo(e.Scan, e.Result.Radiation), StartCell: r.cellText,
		CellValues: report.NewCellValues(res.Cell, res.ESD, res.Volume, res.VolumeESD), Refined: report.NewRefined(res), Unmatched: []float64{},
	}
	for _, l := range res.Unmatched {
		doc.Unmatched = append(doc.Unmatched, l.TwoTheta)
	}
	for _, l := range res.Overlapped {
		doc.Overlapped = append(doc.Overlapped, l.TwoTheta)
	}
	if sf := res.StandardFit; sf != nil {
		sj := &standardJSON{Name: sf.Standard.Name, Source: sf.Standard.Source, Cell: sf.Standard.Cell.String(), Lines: sf.Fitted, Chi2Reduced: sf.Chi2Reduced, Residuals: []report.Residual{}}
		for _, rr := range sf.Residuals {
			sj.Residuals = append(sj.Residuals, report.NewResidual(rr))
		}
		doc.Standard = sj
	}
	return doc, nil
}

func printRefinement(w io.Writer, d refineDocJSON) {
	fmt.Fprintf(w, "%s  %s, λ = %.7f Å\n", d.File, d.Radiation, d.Wavelength)
	f := d.Refined
	fmt.Fprintf(w, "refined %s %s from %d lines (started from %s)\n", d.System, d.Centring, f.Fitted, d.StartCell)
	fmt.Fprintf(w, "  cell          %s\n", d.Text)
	for _, p := range f.Params {
		note := ""
		if p.FromStandard {
			note = "  (from the internal standard)"
		}
		fmt.Fprintf(w, "  %-13s %s %s%s\n", p.Name, p.Text, p.Unit, note)
	}
	fmt.Fprintf(w, "  %-13s %s Å³\n", "volume", formatESD(d.Volume, d.VolumeESD))
	scaled := "not scaled"
	if f.Scaled {
		scaled = "esds scaled by it"
	}
	fmt.Fprintf(w, "  χ²_red = %.3f over %d degrees of freedom (%s; convention %s)\n", f.Chi2Reduced, f.DOF, scaled, f.Scaling)
	if f.Displacement != nil || f.Transparency != nil {
		fmt.Fprintf(w, "  goniometer radius %g mm\n", f.Radius)
	}
	if len(f.Params) > 1 {
		fmt.Fprintln(w, "correlations:")
		tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
		var names []string
		for _, p := range f.Params {
			names = append(names, p.Name)
		}
		fmt.Fprintf(tw, "\t%s\t\n", strings.Join(names, "\t"))
		for i, n := range names {
			row := []string{n}
			for j := range names {
				row = append(row, fmt.Sprintf("%+.3f", f.Correlation[i][j]))
			}
			fmt.Fprintf(tw, "%s\t\n", strings.Join(row, "\t"))
		}
		tw.Flush()
	}
	printResiduals(w, "lines", f.Residuals)
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
	for _, warn := range f.Warnings {
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
		fmt.Fprintf(tw, "%s\t%.4f\t%.4f\t%.4f\t%+.4f\t%+.1f\t%s\t\n", report.HKLText(r.HKL), r.TwoTheta, r.ESD, r.TwoThetaCalc, r.Delta, r.Sigmas, mark)
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

// formatESD prints a value with its esd.
func formatESD(v, u float64) string { return esd.Format(v, u) }
