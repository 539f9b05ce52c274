package main

import (
	"context"
	"flag"
	"fmt"
	"io"
	"text/tabwriter"

	"reticle/peaks"
	"reticle/report"
)

// peakJSON is one peak in the --json document.
type peakJSON = report.Peak

// scanJSON is the --json document for one scan.
type scanJSON struct {
	report.ScanInfo
	Warnings []string   `json:"warnings,omitempty"`
	Peaks    []peakJSON `json:"peaks"`
}

func cmdPeaks(args []string, stdout, stderr io.Writer) int {
	fs := flag.NewFlagSet("peaks", flag.ContinueOnError)
	fs.SetOutput(stderr)
	wl := fs.String("wavelength", "", "anode symbol (K-alpha doublet), anode+Ka1, or wavelength in Å")
	asJSON := fs.Bool("json", false, "print a JSON document instead of a table")
	ratio := fs.Float64("ka2-ratio", peaks.DefaultKAlpha2Ratio, "K-alpha2/K-alpha1 intensity ratio of a doublet")
	threshold := fs.Float64("threshold", 0, "significance a peak must reach, in esds of its height (0: the default, 4.5)")
	bgWidth := fs.Float64("background-width", 0, "background clipping window, degrees 2θ (0: the default, 1.5)")
	if err := fs.Parse(args); err != nil {
		return 2
	}
	if fs.NArg() == 0 {
		fmt.Fprintln(stderr, "reticle peaks: no scan file given")
		return 2
	}
	if !(*ratio >= 0 && *ratio <= 1) || *threshold < 0 || *bgWidth < 0 {
		fmt.Fprintln(stderr, "reticle peaks: --ka2-ratio must lie in 0…1, --threshold and --background-width must not be negative")
		return 2
	}
	opt := peaks.Options{Threshold: *threshold, BackgroundWidth: *bgWidth}
	if *wl != "" {
		r, err := peaks.ParseRadiation(*wl)
		if err != nil {
			fmt.Fprintf(stderr, "reticle peaks: --wavelength: %v\n", err)
			return 2
		}
		if r.Doublet() {
			r.Ratio2 = *ratio
		}
		opt.Radiation = r
	}
	var docs []scanJSON
	status := 0
	for _, path := range fs.Args() {
		s, err := peaks.ReadFile(path)
		if err != nil {
			fmt.Fprintf(stderr, "reticle peaks: %v\n", err)
			status = 1
			continue
		}
		res, err := peaks.Extract(context.Background(), s, opt, nil)
		if err != nil {
			fmt.Fprintf(stderr, "reticle peaks: %s: %v\n", path, err)
			status = 1
			continue
		}
		doc := toJSON(s, res)
		if *asJSON {
			docs = append(docs, doc)
		} else {
			printTable(stdout, doc)
		}
	}
	if *asJSON {
		if err := encodeDocs(stdout, docs); err != nil {
			fmt.Fprintf(stderr, "reticle peaks: %v\n", err)
			return 1
		}
	}
	return status
}

func toJSON(s *peaks.Scan, res *peaks.Result) scanJSON {
	doc := scanJSON{
		ScanInfo: report.NewScanInfo(s, res.Radiation), Warnings: s.Warnings,
		Peaks: []peakJSON{},
	}
	for _, p := range res.Peaks {
		doc.Peaks = append(doc.Peaks, report.NewPeak(p))
	}
	return doc
}

func printTable(w io.Writer, d scanJSON) {
	fmt.Fprintf(w, "%s  %d points, %.3f–%.3f° 2θ, step %.4f°, %s\n", d.File, d.Points, d.Range[0], d.Range[1], d.Step, d.Radiation)
	for _, m := range d.Warnings {
		fmt.Fprintf(w, "warning: %s\n", m)
	}
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintln(tw, "#\t2θ (°)\td (Å)\theight\tFWHM (°)\tη\tS/N\tflags\t")
	for i, p := range d.Peaks {
		fmt.Fprintf(tw, "%d\t%s\t%s\t%.0f\t%.4f\t%.2f\t%.0f\t%s\t\n", i+1,
			peaks.FormatESD(p.TwoTheta, p.TwoThetaESD), peaks.FormatESD(p.D, p.DESD),
			p.Height, p.FWHM, p.Eta, p.SNR, p.Flags)
	}
	tw.Flush()
	fmt.Fprintln(w)
}
