package main

import (
	"context"
	"fmt"
	"io"
	"text/tabwriter"

	"reticle/analysis"
	"reticle/cell"
	"reticle/esd"
	"reticle/report"
)

// reflectionJSON is one fitted position of a phase.
type reflectionJSON struct {
	HKL          []cell.HKL `json:"hkl"`
	Multiplicity int        `json:"multiplicity"`
	TwoTheta     float64    `json:"two_theta"`
	Intensity    float64    `json:"intensity"`
	IntensityESD float64    `json:"intensity_esd"`
}

// phaseJSON is one phase of a whole-pattern fit.
type phaseJSON struct {
	StartCell string `json:"start_cell"`
	report.CellValues
	Parameters  []report.Param   `json:"parameters"`
	Reflections []reflectionJSON `json:"reflections"`
}

// correlationJSON is the correlation coefficient of two parameters.
type correlationJSON struct {
	A string  `json:"a"`
	B string  `json:"b"`
	R float64 `json:"r"`
}

// unexplainedJSON is a line of the scan that no phase explains.
type unexplainedJSON struct {
	TwoTheta float64 `json:"two_theta"`
	Height   float64 `json:"height"`
}

// curvesJSON are the fit's curves, point by point.
type curvesJSON struct {
	TwoTheta   []float64 `json:"two_theta"`
	Observed   []float64 `json:"observed"`
	Calculated []float64 `json:"calculated"`
	Background []float64 `json:"background"`
	Difference []float64 `json:"difference"`
}

// fitDocJSON is the --json document of reticle fit: the main phase's
// cell at the top level with refine's keys, the agreement factors
// (percent, as the pdCIF dictionary's R factors are usually quoted) and
// every phase.
type fitDocJSON struct {
	report.ScanInfo
	StartCell string `json:"start_cell"`
	report.CellValues
	Rp          float64 `json:"rp"`
	Rwp         float64 `json:"rwp"`
	Rexp        float64 `json:"rexp"`
	Chi2        float64 `json:"chi2"`
	GoF         float64 `json:"gof"`
	Points      int     `json:"points"`
	Parameters  int     `json:"parameters"`
	Corrections string  `json:"corrections"`
	ESDScaling  string  `json:"esd_scaling"`
	// Shared are the parameters all phases share: the corrections and
	// the asymmetry terms.
	Shared       []report.Param    `json:"shared_parameters"`
	Correlations []correlationJSON `json:"correlations"`
	Phases       []phaseJSON       `json:"phases"`
	Unexplained  []unexplainedJSON `json:"unexplained_lines"`
	Warnings     []string          `json:"warnings"`
	Curves       *curvesJSON       `json:"curves,omitempty"`
}

func cmdFitRun(ctx context.Context, args []string, stdout, stderr io.Writer) int {
	r, files, code, ok := start(cmdFit, args, stderr)
	if !ok {
		return code
	}
	if r.cell == nil {
		fmt.Fprintln(stderr, "reticle fit: --cell is required, e.g. --cell 'cubic F a=5.64'")
		return 2
	}
	if len(files) == 0 {
		fmt.Fprintln(stderr, "reticle fit: no scan file given")
		return 2
	}
	files = expandInputs(files)
	docs := make([]fitDocJSON, len(files))
	errs := make([]error, len(files))
	done := forEach(ctx, len(files), r.jobs, stderr, "fitting", largestFirst(files), func(i int) bool {
		docs[i], errs[i] = fitFile(ctx, files[i], r)
		return finished(errs[i])
	})
	if ctx.Err() != nil {
		return interrupted(cmdFit, files, done, stderr)
	}
	status := 0
	var out []fitDocJSON
	for i, err := range errs {
		if err != nil {
			fmt.Fprintf(stderr, "reticle fit: %v\n", err)
			status = 1
			continue
		}
		if r.json {
			out = append(out, docs[i])
		} else {
			printFit(stdout, docs[i])
		}
	}
	docs = out
	if r.json && len(docs) > 0 {
		if err := encodeDocs(stdout, docs); err != nil {
			fmt.Fprintf(stderr, "reticle fit: %v\n", err)
			return 1
		}
	}
	return status
}

// fitFile extracts a scan's peaks, refines the cell on them and fits the
// whole pattern from there.
func fitFile(ctx context.Context, path string, r *request) (fitDocJSON, error) {
	e, err := analysis.ReadExtract(ctx, path, r.settings, nil)
	if err != nil {
		return fitDocJSON{}, err
	}
	cells := append([]cell.Cell{*r.cell}, r.more...)
	texts := append([]string{r.cellText}, r.moreTexts...)
	pf, err := analysis.FitPattern(ctx, e, cells, r.settings, nil)
	if err != nil {
		return fitDocJSON{}, err
	}
	f := pf.Fit
	scaling := "esds are (JᵀWJ)⁻¹ with weights 1/σ² of the counts"
	if f.Scaled {
		scaling += fmt.Sprintf(", multiplied by GoF = %.3f (χ²_red above 1)", f.GoF)
	}
	doc := fitDocJSON{ScanInfo: report.NewScanInfo(e.Scan, e.Result.Radiation), StartCell: r.cellText,
		Rp: 100 * f.Rp, Rwp: 100 * f.Rwp, Rexp: 100 * f.Rexp, Chi2: f.Chi2, GoF: f.GoF, Points: f.Points, Parameters: f.Parameters,
		Corrections: f.Corrections.String(), ESDScaling: scaling, Shared: []report.Param{}, Correlations: []correlationJSON{},
		Unexplained: []unexplainedJSON{}, Warnings: append([]string{}, f.Warnings...)}
	for _, p := range f.Params {
		doc.Shared = append(doc.Shared, report.NewParam(p))
	}
	for _, c := range f.Correlations {
		doc.Correlations = append(doc.Correlations, correlationJSON{A: c.A, B: c.B, R: c.R})
	}
	for _, u := range pf.Unexplained {
		doc.Unexplained = append(doc.Unexplained, unexplainedJSON{TwoTheta: u.TwoTheta, Height: u.Height})
	}
	for i, fp := range f.Phases {
		ph := phaseJSON{StartCell: texts[i], CellValues: report.NewCellValues(fp.Cell, fp.ESD, fp.Volume, fp.VolumeESD),
			Parameters: []report.Param{}, Reflections: []reflectionJSON{}}
		for _, p := range fp.Params {
			ph.Parameters = append(ph.Parameters, report.NewParam(p))
		}
		for _, rf := range fp.Reflections {
			ph.Reflections = append(ph.Reflections, reflectionJSON{HKL: rf.HKL, Multiplicity: rf.Mult, TwoTheta: rf.TwoTheta, Intensity: rf.Intensity, IntensityESD: rf.IntensityESD})
		}
		doc.Phases = append(doc.Phases, ph)
	}
	doc.CellValues = doc.Phases[0].CellValues
	if r.curves {
		c := &curvesJSON{TwoTheta: e.Scan.TwoTheta, Observed: e.Scan.Intensity, Calculated: f.Calc, Background: f.Background, Difference: make([]float64, len(f.Calc))}
		for i := range f.Calc {
			c.Difference[i] = e.Scan.Intensity[i] - f.Calc[i]
		}
		doc.Curves = c
	}
	return doc, nil
}

func printFit(w io.Writer, d fitDocJSON) {
	fmt.Fprintf(w, "%s  %s, λ = %.7f Å\n", d.File, d.Radiation, d.Wavelength)
	fmt.Fprintf(w, "whole-pattern fit (Pawley) of %d phase(s): %d points, %d parameters, corrections %s\n", len(d.Phases), d.Points, d.Parameters, d.Corrections)
	fmt.Fprintf(w, "  Rp %.2f %%  Rwp %.2f %%  Rexp %.2f %%  χ²_red %.3f  GoF %.3f\n", d.Rp, d.Rwp, d.Rexp, d.Chi2, d.GoF)
	fmt.Fprintf(w, "  %s\n", d.ESDScaling)
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	for _, p := range d.Shared {
		fmt.Fprintf(tw, "  %s\t%s\t%s\n", p.Name, p.Text, p.Unit)
	}
	tw.Flush()
	for i, ph := range d.Phases {
		fmt.Fprintf(w, "phase %d, from %s:\n", i+1, ph.StartCell)
		fmt.Fprintf(w, "  cell  %s   V = %s Å³\n", ph.CellValues.Text, esd.Format(ph.Volume, ph.VolumeESD))
		tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
		for _, p := range ph.Parameters {
			fmt.Fprintf(tw, "  %s\t%s\t%s\n", p.Name, p.Text, p.Unit)
		}
		tw.Flush()
		fmt.Fprintf(w, "  reflections (%d):\n", len(ph.Reflections))
		tw = tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
		fmt.Fprintln(tw, "  hkl\t2θ (°)\tintensity\t")
		for _, r := range ph.Reflections {
			fmt.Fprintf(tw, "  %s\t%.4f\t%s\t\n", report.HKLText(r.HKL), r.TwoTheta, esd.Format(r.Intensity, r.IntensityESD))
		}
		tw.Flush()
	}
	if len(d.Correlations) > 0 {
		fmt.Fprintln(w, "strongest correlations:")
		for _, c := range d.Correlations {
			fmt.Fprintf(w, "  %s, %s: %+.3f\n", c.A, c.B, c.R)
		}
	}
	if len(d.Unexplained) > 0 {
		fmt.Fprintf(w, "lines no phase explains (%d; a further phase may index them):\n", len(d.Unexplained))
		for _, u := range d.Unexplained {
			fmt.Fprintf(w, "  %.4f°  height %.0f\n", u.TwoTheta, u.Height)
		}
	}
	for _, warn := range d.Warnings {
		fmt.Fprintf(w, "warning: %s\n", warn)
	}
	fmt.Fprintln(w)
}
