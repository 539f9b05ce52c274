package main

import (
	"context"
	"fmt"
	"io"
	"strings"
	"text/tabwriter"

	"reticle/analysis"
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
	// text is the terminal's description of the refinement.
	text string
}

func cmdRefineRun(ctx context.Context, args []string, stdout, stderr io.Writer) int {
	r, files, code, ok := start(cmdRefine, args, stderr)
	if !ok {
		return code
	}
	if r.cell == nil {
		fmt.Fprintln(stderr, "reticle refine: --cell is required, e.g. --cell 'cubic F a=5.64'")
		return 2
	}
	if len(r.more) > 0 {
		fmt.Fprintln(stderr, "reticle refine: --cell given more than once; refine takes one cell (reticle fit takes one per phase)")
		return 2
	}
	if len(files) == 0 {
		fmt.Fprintln(stderr, "reticle refine: no scan file given")
		return 2
	}
	var docs []refineDocJSON
	status := 0
	for _, path := range files {
		doc, err := refineFile(ctx, path, r)
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
func refineFile(ctx context.Context, path string, r *request) (refineDocJSON, error) {
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
		text: report.Text(report.RefinementRows(res)),
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
	fmt.Fprintf(w, "refined from %s:\n%s\n%s", d.StartCell, d.Text, d.text)
	f := d.Refined
	printResiduals(w, "lines", f.Residuals)
	if d.Standard != nil {
		printResiduals(w, "standard lines", d.Standard.Residuals)
	}
	if len(d.Unmatched) > 0 {
		fmt.Fprintf(w, "unmatched lines (°): %s\n", joinAngles(d.Unmatched))
	}
	if len(d.Overlapped) > 0 {
		fmt.Fprintf(w, "left out as overlapped (°): %s\n", joinAngles(d.Overlapped))
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
