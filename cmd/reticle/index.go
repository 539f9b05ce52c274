package main

import (
	"context"
	"encoding/json"
	"flag"
	"fmt"
	"io"
	"strings"
	"text/tabwriter"

	"reticle/peaks"
	"reticle/report"
)

// settingsFlags are the flags of an analysis (index and report).
type settingsFlags struct {
	wavelength  *string
	systems     *string
	impurities  *int
	tolerance   *float64
	refine      *refineFlags
	contents    *contentsFlags
	sample      *string
	ka2, thresh *float64
	bgWidth     *float64
}

func addSettingsFlags(fs *flag.FlagSet) *settingsFlags {
	return &settingsFlags{
		wavelength: fs.String("wavelength", "", "anode symbol (K-alpha doublet), anode+Ka1, or wavelength in Å"),
		systems:    fs.String("systems", "", "comma-separated systems to search (default cubic,tetragonal,hexagonal,rhombohedral)"),
		impurities: fs.Int("impurities", 0, "lines among the first 20 that may stay unindexed (0: the default, 3; -1: none)"),
		tolerance:  fs.Float64("tolerance", 0, "smallest 2θ window for a match, degrees (0: the default, 0.03)"),
		refine:     addRefineFlags(fs, "zero"),
		contents:   addContentsFlags(fs),
		sample:     fs.String("sample", "", "sample name for the record"),
		ka2:        fs.Float64("ka2-ratio", peaks.DefaultKAlpha2Ratio, "K-alpha2/K-alpha1 intensity ratio of a doublet"),
		thresh:     fs.Float64("threshold", 0, "significance a peak must reach, in esds of its height (0: the default, 4.5)"),
		bgWidth:    fs.Float64("background-width", 0, "background clipping window, degrees 2θ (0: the default, 1.5)"),
	}
}

// settings turns the flags into resolved analysis settings.
func (f *settingsFlags) settings() (report.Settings, error) {
	if f.refine.standard != "" {
		return report.Settings{}, fmt.Errorf("--standard belongs to reticle refine, which assigns the standard's lines")
	}
	s := report.Settings{
		Sample: *f.sample, Wavelength: *f.wavelength, Ka2Ratio: *f.ka2, Threshold: *f.thresh, BackgroundWidth: *f.bgWidth,
		Impurities: *f.impurities, Tolerance: *f.tolerance,
		Corrections: f.refine.corrections, Radius: f.refine.radius, FlagLimit: f.refine.flagLimit, Scaling: f.refine.scaling,
		Formula: f.contents.formula, Density: f.contents.density, Z: f.contents.z,
	}
	if *f.systems != "" {
		for _, name := range strings.Split(*f.systems, ",") {
			s.Systems = append(s.Systems, strings.TrimSpace(name))
		}
	}
	// Every part is parsed now, so that a bad flag stops before any
	// file is read; the errors name the setting.
	return s.Check()
}

func cmdIndex(args []string, stdout, stderr io.Writer) int {
	fs := flag.NewFlagSet("index", flag.ContinueOnError)
	fs.SetOutput(stderr)
	asJSON := fs.Bool("json", false, "print a JSON document instead of a table")
	sf := addSettingsFlags(fs)
	if err := fs.Parse(args); err != nil {
		return 2
	}
	if fs.NArg() == 0 {
		fmt.Fprintln(stderr, "reticle index: no scan file given")
		return 2
	}
	settings, err := sf.settings()
	if err != nil {
		fmt.Fprintf(stderr, "reticle index: %v\n", err)
		return 2
	}
	var docs []*report.Document
	status := 0
	for _, path := range fs.Args() {
		doc, err := analyse(path, settings)
		if err != nil {
			fmt.Fprintf(stderr, "reticle index: %v\n", err)
			status = 1
			continue
		}
		if *asJSON {
			docs = append(docs, doc)
		} else {
			printSolutions(stdout, doc)
		}
	}
	if *asJSON {
		if err := encodeDocs(stdout, docs); err != nil {
			fmt.Fprintf(stderr, "reticle index: %v\n", err)
			return 1
		}
	}
	return status
}

// analyse reads a scan and runs the analysis on it.
func analyse(path string, s report.Settings) (*report.Document, error) {
	scan, err := peaks.ReadFile(path)
	if err != nil {
		return nil, err
	}
	return report.Run(context.Background(), scan, s, nil)
}

// encodeDocs prints one document, or {"scans": [...]} for several.
func encodeDocs[T any](w io.Writer, docs []T) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", " ")
	if len(docs) == 1 {
		return enc.Encode(docs[0])
	}
	return enc.Encode(struct {
		Scans []T `json:"scans"`
	}{docs})
}

func printSolutions(w io.Writer, d *report.Document) {
	fmt.Fprintf(w, "%s  %d lines, %s\n", d.File, d.Lines, d.Radiation)
	if len(d.Solutions) == 0 {
		fmt.Fprintln(w, "no cell explains the lines within the search bounds")
		fmt.Fprintln(w)
		return
	}
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintln(tw, "#\tsystem\t\ta (Å)\tc (Å)\tV (Å³)\tM20\tF_N\tindexed\tzero (°)\t")
	for _, s := range d.Solutions {
		fmt.Fprintf(tw, "%d\t%s\t%s\t%.5f\t%.5f\t%.2f\t%.1f\t%.1f(%.4f,%d)\t%d/%d\t%+.4f\t\n", s.Rank, s.System, s.Centring,
			s.A, s.C, s.Volume, s.M, s.FN, s.FNMeanDiff, s.FNPossible, s.Indexed, s.Indexed+s.Unindexed, s.Zero)
	}
	tw.Flush()
	best := d.Solutions[0]
	fmt.Fprintf(w, "\nlines of solution 1 (%s %s):\n", best.System, best.Centring)
	tw = tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintln(tw, "2θ obs (°)\thkl\t2θ calc (°)\tΔ2θ (°)\t")
	for _, l := range best.Lines {
		if !l.Indexed {
			fmt.Fprintf(tw, "%.4f\tunindexed\t\t\t\n", l.TwoTheta)
			continue
		}
		var names []string
		for _, h := range l.HKL {
			names = append(names, fmt.Sprintf("%d %d %d", h[0], h[1], h[2]))
		}
		fmt.Fprintf(tw, "%.4f\t%s\t%.4f\t%+.4f\t\n", l.TwoTheta, strings.Join(names, " / "), l.TwoThetaCalc, l.Delta)
	}
	tw.Flush()
	if len(best.Conditions) > 0 {
		fmt.Fprintf(w, "observed conditions: %s\n", strings.Join(best.Conditions, "; "))
	}
	fmt.Fprintln(w)
}
