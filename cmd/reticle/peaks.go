package main

import (
	"context"
	"fmt"
	"io"
	"text/tabwriter"

	"reticle/analysis"
	"reticle/esd"
	"reticle/report"
)

// scanJSON is the --json document of reticle peaks for one scan.
type scanJSON struct {
	report.ScanInfo
	Warnings []string            `json:"warnings,omitempty"`
	Profile  *report.ProfileInfo `json:"profile"`
	Peaks    []report.Peak       `json:"peaks"`
}

func cmdPeaksRun(ctx context.Context, args []string, stdout, stderr io.Writer) int {
	r, files, code, ok := start(cmdPeaks, args, stderr)
	if !ok {
		return code
	}
	if len(files) == 0 {
		fmt.Fprintln(stderr, "reticle peaks: no scan file given")
		return 2
	}
	var docs []scanJSON
	status := 0
	done := make([]bool, len(files))
	for i, path := range files {
		e, err := analysis.ReadExtract(ctx, path, r.settings, nil)
		if ctx.Err() != nil {
			return interrupted(cmdPeaks, files, done, stderr)
		}
		done[i] = true
		if err != nil {
			fmt.Fprintf(stderr, "reticle peaks: %v\n", err)
			status = 1
			continue
		}
		doc := scanJSON{
			ScanInfo: report.NewScanInfo(e.Scan, e.Result.Radiation),
			Warnings: append(append([]string(nil), e.Scan.Warnings...), e.Result.Warnings...),
			Profile:  report.NewProfileInfo(e.Result), Peaks: []report.Peak{},
		}
		for _, p := range e.Result.Peaks {
			doc.Peaks = append(doc.Peaks, report.NewPeak(p, false))
		}
		if r.json {
			docs = append(docs, doc)
		} else {
			printPeaks(stdout, doc)
		}
	}
	if r.json && len(docs) > 0 {
		if err := encodeDocs(stdout, docs); err != nil {
			fmt.Fprintf(stderr, "reticle peaks: %v\n", err)
			return 1
		}
	}
	return status
}

// encodeDocs prints one document, or {"scans": [...]} for several.
func encodeDocs[T any](w io.Writer, docs []T) error {
	if len(docs) == 1 {
		return report.EncodeJSON(w, docs[0])
	}
	return report.EncodeJSON(w, struct {
		Scans []T `json:"scans"`
	}{docs})
}

func printPeaks(w io.Writer, d scanJSON) {
	fmt.Fprintf(w, "%s  %d points, %.3f–%.3f° 2θ, step %.4f°, %s\n", d.File, d.Points, d.Range[0], d.Range[1], d.Step, d.Radiation)
	for _, m := range d.Warnings {
		fmt.Fprintf(w, "warning: %s\n", m)
	}
	if p := d.Profile; p != nil {
		fmt.Fprintf(w, "line shape: FWHM² = %.3g tan²θ %+.3g tanθ %+.3g (°²), η %.2f, asymmetry %s, tail ratio %.3g, K-alpha2 ratio %.3g, K-beta ratio %.3g\n",
			p.UVW[0], p.UVW[1], p.UVW[2], p.Eta, asymmetryText(p), p.TailRatio, p.Ka2Ratio, p.KBetaRatio)
	}
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintln(tw, "#\t2θ (°)\td (Å)\theight\tFWHM (°)\tη\tS/N\tflags\t")
	for i, p := range d.Peaks {
		fmt.Fprintf(tw, "%d\t%s\t%s\t%.0f\t%.4f\t%.2f\t%.0f\t%s\t\n", i+1,
			esd.Format(p.TwoTheta, p.TwoThetaESD), esd.Format(p.D, p.DESD),
			p.Height, p.FWHM, p.Eta, p.SNR, p.Flags)
	}
	tw.Flush()
	fmt.Fprintln(w)
}

// asymmetryText prints the asymmetry law, or "none".
func asymmetryText(p *report.ProfileInfo) string {
	if p.Asymmetry == [3]float64{} {
		return "none"
	}
	t := fmt.Sprintf("%.3g %+.3g·t %+.3g·t² (t = (2θ − 90°)/90°)", p.Asymmetry[0], p.Asymmetry[1], p.Asymmetry[2])
	if len(p.AsymmetryRange) == 2 {
		t += fmt.Sprintf(" over %.1f–%.1f°", p.AsymmetryRange[0], p.AsymmetryRange[1])
	}
	return t
}
