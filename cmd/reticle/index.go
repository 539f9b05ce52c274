package main

import (
	"context"
	"encoding/json"
	"flag"
	"fmt"
	"io"
	"math"
	"sort"
	"strings"
	"text/tabwriter"

	"reticle/density"
	"reticle/indexing"
	"reticle/peaks"
	"reticle/refine"
)

// lineJSON is an observed line under a solution.
type lineJSON struct {
	TwoTheta     float64  `json:"two_theta"`
	Indexed      bool     `json:"indexed"`
	HKL          [][3]int `json:"hkl,omitempty"`
	TwoThetaCalc float64  `json:"two_theta_calc,omitempty"`
	Delta        float64  `json:"delta,omitempty"`
}

// calcJSON is a calculated line (for tick marks).
type calcJSON struct {
	D        float64  `json:"d"`
	TwoTheta float64  `json:"two_theta"`
	Mult     int      `json:"multiplicity"`
	HKL      [][3]int `json:"hkl"`
}

// solutionJSON is one ranked cell in the --json document.
type solutionJSON struct {
	Rank       int        `json:"rank"`
	System     string     `json:"system"`
	Centring   string     `json:"centring"`
	A          float64    `json:"a"`
	B          float64    `json:"b"`
	C          float64    `json:"c"`
	Alpha      float64    `json:"alpha"`
	Beta       float64    `json:"beta"`
	Gamma      float64    `json:"gamma"`
	Volume     float64    `json:"volume"`
	Zero       float64    `json:"zero_shift"`
	M          float64    `json:"m20"`
	N          int        `json:"m_lines"`
	FN         float64    `json:"fn"`
	FNMeanDiff float64    `json:"fn_mean_delta"`
	FNPossible int        `json:"fn_possible"`
	Indexed    int        `json:"indexed"`
	Unindexed  int        `json:"unindexed"`
	Conditions []string   `json:"conditions,omitempty"`
	Lines      []lineJSON `json:"lines"`
	Calculated []calcJSON `json:"calculated"`
	// The refinement of the cell against its indexed lines; absent, with
	// RefineError saying why, when it could not be done.
	*RefinedJSON
	RefineError string `json:"refine_error,omitempty"`
	// Contents, with --formula and --density or --z.
	Contents *contentsJSON `json:"contents,omitempty"`
}

// indexJSON is the --json document of one scan.
type indexJSON struct {
	File       string         `json:"file"`
	SHA256     string         `json:"sha256"`
	Radiation  string         `json:"radiation"`
	Wavelength float64        `json:"wavelength"`
	Lines      int            `json:"lines"`
	Solutions  []solutionJSON `json:"solutions"`
}

func cmdIndex(args []string, stdout, stderr io.Writer) int {
	fs := flag.NewFlagSet("index", flag.ContinueOnError)
	fs.SetOutput(stderr)
	wl := fs.String("wavelength", "", "anode symbol (K-alpha doublet), anode+Ka1, or wavelength in Å")
	asJSON := fs.Bool("json", false, "print a JSON document instead of a table")
	systems := fs.String("systems", "", "comma-separated systems to search (default cubic,tetragonal,hexagonal,rhombohedral)")
	impurities := fs.Int("impurities", 0, "lines among the first 20 that may stay unindexed (0: the default, 3; -1: none)")
	tol := fs.Float64("tolerance", 0, "smallest 2θ window for a match, degrees (0: the default, 0.03)")
	rf := addRefineFlags(fs, "zero")
	cf := addContentsFlags(fs)
	if err := fs.Parse(args); err != nil {
		return 2
	}
	form, meas, err := cf.input()
	if err != nil {
		fmt.Fprintf(stderr, "reticle index: %v\n", err)
		return 2
	}
	if cf.formula != "" && meas == nil && cf.z == 0 {
		fmt.Fprintln(stderr, "reticle index: --formula needs a measured --density (or --z) to give each cell its contents")
		return 2
	}
	var ci *contentsInput
	if cf.formula != "" {
		ci = &contentsInput{form, meas, cf.z}
	}
	if fs.NArg() == 0 {
		fmt.Fprintln(stderr, "reticle index: no scan file given")
		return 2
	}
	var popt peaks.Options
	if *wl != "" {
		r, err := peaks.ParseRadiation(*wl)
		if err != nil {
			fmt.Fprintf(stderr, "reticle index: --wavelength: %v\n", err)
			return 2
		}
		popt.Radiation = r
	}
	iopt := indexing.Options{MaxImpurities: *impurities, Tolerance: *tol}
	if *systems != "" {
		for _, name := range strings.Split(*systems, ",") {
			s, err := indexing.ParseSystem(strings.TrimSpace(name))
			if err != nil {
				fmt.Fprintf(stderr, "reticle index: --systems: %v\n", err)
				return 2
			}
			iopt.Systems = append(iopt.Systems, s)
		}
	}
	if rf.standard != "" {
		fmt.Fprintln(stderr, "reticle index: --standard belongs to reticle refine, which assigns the standard's lines")
		return 2
	}
	if _, err := rf.options(1); err != nil {
		fmt.Fprintf(stderr, "reticle index: %v\n", err)
		return 2
	}
	var docs []indexJSON
	status := 0
	for _, path := range fs.Args() {
		doc, err := indexFile(path, popt, iopt, rf, ci)
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

// indexFile reads a scan, extracts its peaks and indexes the reflections
// (companion lines left out).
func indexFile(path string, popt peaks.Options, iopt indexing.Options, rf *refineFlags, ci *contentsInput) (indexJSON, error) {
	s, err := peaks.ReadFile(path)
	if err != nil {
		return indexJSON{}, err
	}
	pr, err := peaks.Extract(context.Background(), s, popt, nil)
	if err != nil {
		return indexJSON{}, fmt.Errorf("%s: %w", path, err)
	}
	var lines []indexing.Line
	for _, p := range pr.Peaks {
		if !p.Companion() {
			lines = append(lines, indexing.Line{TwoTheta: p.TwoTheta, ESD: p.TwoThetaESD})
		}
	}
	iopt.Wavelength = pr.Radiation.Lambda1
	doc := indexJSON{File: path, SHA256: s.SHA256, Radiation: pr.Radiation.Name, Wavelength: pr.Radiation.Lambda1, Lines: len(lines), Solutions: []solutionJSON{}}
	res, err := indexing.Index(context.Background(), lines, iopt, nil)
	if err != nil {
		return indexJSON{}, fmt.Errorf("%s: %w", path, err)
	}
	ropt, err := rf.options(res.Wavelength)
	if err != nil {
		return indexJSON{}, err
	}
	for i, sol := range res.Solutions {
		j := toSolutionJSON(i+1, sol, res.Wavelength)
		refineSolution(&j, sol, ropt)
		if ci != nil {
			addContents(&j, ci)
		}
		doc.Solutions = append(doc.Solutions, j)
	}
	if ci != nil && ci.measured != nil {
		demoteFractionalZ(doc.Solutions)
	}
	return doc, nil
}

// contentsInput is the formula and the measured density or Z that index
// applies to every solution.
type contentsInput struct {
	formula  density.Formula
	measured *density.Measured
	z        int
}

// addContents works out a solution's cell contents.
func addContents(j *solutionJSON, ci *contentsInput) {
	cell := indexing.Cell{System: systemOf(j.System), Centring: indexing.Centring(j.Centring[0]), A: j.A, B: j.B, C: j.C, Alpha: j.Alpha, Beta: j.Beta, Gamma: j.Gamma}
	var vesd float64
	if j.RefinedJSON != nil {
		vesd = j.VolumeESD
	}
	c, err := density.Compute(density.Input{Cell: cell, VolumeESD: vesd, Formula: ci.formula, Z: ci.z, Measured: ci.measured})
	if err != nil {
		return
	}
	cj := toContentsJSON(c, ci.formula, ci.measured)
	j.Contents = &cj
}

func systemOf(name string) indexing.System {
	s, _ := indexing.ParseSystem(name)
	return s
}

// demoteFractionalZ moves solutions whose measured density gives no whole
// Z below those that do, keeping the order within each group, and renumbers
// the ranks: a Z far from every allowed value is evidence against a cell.
func demoteFractionalZ(sols []solutionJSON) {
	sort.SliceStable(sols, func(a, b int) bool {
		return wholeZ(sols[a]) && !wholeZ(sols[b])
	})
	for i := range sols {
		sols[i].Rank = i + 1
	}
}

func wholeZ(s solutionJSON) bool {
	return s.Contents == nil || s.Contents.ZWhole == nil || *s.Contents.ZWhole
}

// refineSolution refines a solution's cell against its indexed lines and
// puts the refined cell, corrections and residuals into its document.
func refineSolution(j *solutionJSON, sol indexing.Solution, ropt refine.Options) {
	var obs []refine.Observation
	var at []int
	for i, l := range sol.Lines {
		if l.Indexed && l.ESD > 0 {
			obs = append(obs, refine.Observation{TwoTheta: l.TwoTheta, ESD: l.ESD, HKL: l.HKL})
			at = append(at, i)
		}
	}
	r, err := refine.Refine(context.Background(), sol.Cell, obs, ropt)
	if err != nil {
		j.RefineError = err.Error()
		return
	}
	c := r.Cell
	j.A, j.B, j.C, j.Volume, j.Zero = c.A, c.B, c.C, r.Volume, r.Zero
	for k, rr := range r.Residuals {
		j.Lines[at[k]].TwoThetaCalc = rr.TwoThetaCalc
		j.Lines[at[k]].Delta = rr.Delta
	}
	for k, cl := range sol.Calculated {
		if tt := r.Position(cl.HKL[0]); !math.IsNaN(tt) {
			j.Calculated[k].TwoTheta = tt
		}
	}
	rj := toRefinedJSON(r)
	j.RefinedJSON = &rj
}

func hkls(v []indexing.HKL) [][3]int {
	out := make([][3]int, len(v))
	for i, h := range v {
		out[i] = h
	}
	return out
}

func toSolutionJSON(rank int, s indexing.Solution, lambda float64) solutionJSON {
	c := s.Cell
	j := solutionJSON{
		Rank: rank, System: c.System.String(), Centring: c.Centring.String(),
		A: c.A, B: c.B, C: c.C, Alpha: c.Alpha, Beta: c.Beta, Gamma: c.Gamma, Volume: s.Volume,
		Zero: s.Zero, M: s.M, N: s.N, FN: s.FN, FNMeanDiff: s.FNMeanDiff, FNPossible: s.FNPossible,
		Indexed: s.Indexed, Unindexed: s.Unindexed, Conditions: s.Conditions,
		Lines: []lineJSON{}, Calculated: []calcJSON{},
	}
	for _, l := range s.Lines {
		j.Lines = append(j.Lines, lineJSON{TwoTheta: l.TwoTheta, Indexed: l.Indexed, HKL: hkls(l.HKL), TwoThetaCalc: l.TwoThetaCalc, Delta: l.Delta})
	}
	for _, r := range s.Calculated {
		j.Calculated = append(j.Calculated, calcJSON{D: r.D, TwoTheta: peaks.TwoTheta(r.D, lambda) + s.Zero, Mult: r.Mult, HKL: hkls(r.HKL)})
	}
	return j
}

func printSolutions(w io.Writer, d indexJSON) {
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
