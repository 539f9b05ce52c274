package main

import (
	"context"
	"fmt"
	"io"
	"os"
	"strings"
	"text/tabwriter"

	"reticle/analysis"
	"reticle/cell"
	"reticle/esd"
	"reticle/report"
	"reticle/scanfile"
)

func cmdIndexRun(ctx context.Context, args []string, stdout, stderr io.Writer) int {
	r, files, code, ok := start(cmdIndex, args, stderr)
	if !ok {
		return code
	}
	if len(files) == 0 {
		fmt.Fprintln(stderr, "reticle index: no scan file given")
		return 2
	}
	files = expandInputs(files)
	as := make([]*analysis.Analysis, len(files))
	rows := make([]report.SummaryRow, len(files))
	done := forEach(ctx, len(files), r.jobs, stderr, "indexing", largestFirst(files), func(i int) bool {
		a, sha, err := analyse(ctx, files[i], r.settings)
		as[i], rows[i] = a, report.NewSummaryRow(files[i], sha, a, err)
		return finished(err)
	})
	if ctx.Err() != nil {
		return interrupted(cmdIndex, files, done, stderr)
	}
	var docs []*report.Document
	status := 0
	for i, a := range as {
		if a == nil {
			fmt.Fprintf(stderr, "reticle index: %s\n", rows[i].Error)
			status = 1
			continue
		}
		if r.json {
			docs = append(docs, report.NewDocument(a))
		} else {
			printCandidates(stdout, a)
		}
	}
	if r.json && len(docs) > 0 {
		if err := encodeDocs(stdout, docs); err != nil {
			fmt.Fprintf(stderr, "reticle index: %v\n", err)
			return 1
		}
	}
	return finishBatch(cmdIndex, r.summary, rows, r.force, status, stderr)
}

// analyse reads and analyses one scan; sha is the SHA-256 of the file's
// bytes whenever they could be read, so that a scan that fails is still
// identified in the summary.
func analyse(ctx context.Context, path string, s analysis.Settings) (a *analysis.Analysis, sha string, err error) {
	scan, err := analysis.Read(path, s)
	if err != nil {
		if data, rerr := os.ReadFile(path); rerr == nil {
			sha = scanfile.Digest(data)
		}
		return nil, sha, err
	}
	a, err = analysis.Run(ctx, scan, s, nil)
	if err != nil {
		return nil, scan.SHA256, err
	}
	return a, scan.SHA256, nil
}

func printCandidates(w io.Writer, a *analysis.Analysis) {
	fmt.Fprintf(w, "%s  %d lines, %s\n", a.Scan.Path, len(a.Lines), a.Radiation.Name)
	for _, m := range a.Warnings {
		fmt.Fprintf(w, "warning: %s\n", m)
	}
	if r := a.Search; r != nil {
		fmt.Fprintln(w, report.SearchText(r))
	}
	if len(a.Candidates) == 0 {
		fmt.Fprintln(w, "no cell explains the lines within the search bounds")
		fmt.Fprintln(w)
		return
	}
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintf(tw, "#\tcell\tV (Å³)\tprobability\tM_N\tF_N\tindexed\t\n")
	for _, c := range a.Candidates {
		v, ve := c.Volume()
		fmt.Fprintf(tw, "%d\t%s\t%s\t%s\t%.1f\t%.1f(%.4f,%d)\t%d/%d\t\n", c.Rank, cell.Format(c.Cell(), c.Covariance().ESD()),
			esd.Format(v, ve), report.Percent(c.Probability), c.M, c.FN, c.FNMeanDiff, c.FNPossible, c.Indexed, c.Indexed+c.Unindexed)
	}
	tw.Flush()
	if t := evidenceText(a.Candidates); t != "" {
		fmt.Fprintln(w, t)
	}
	if n := a.Candidates[0].PolishNote; n != "" {
		fmt.Fprintf(w, "cell 1: %s\n", n)
	}
	best := a.ChosenCandidate()
	fmt.Fprintf(w, "\nlines of cell %d (%s %s):\n", best.Rank, best.Cell().System, best.Cell().Centring)
	tw = tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintln(tw, "2θ obs (°)\thkl\t2θ calc (°)\tΔ2θ (°)\t")
	for _, l := range best.Lines {
		if !l.Indexed {
			fmt.Fprintf(tw, "%.4f\tunindexed\t\t\t\n", l.TwoTheta)
			continue
		}
		calc, delta := l.TwoThetaCalc, l.Delta
		if _, rr, ok := best.Line(l.TwoTheta); ok && rr != nil {
			calc, delta = rr.TwoThetaCalc, rr.Delta
		}
		fmt.Fprintf(tw, "%.4f\t%s\t%.4f\t%+.4f\t\n", l.TwoTheta, report.HKLText(l.HKL), calc, delta)
	}
	tw.Flush()
	if len(best.Demanding) > 0 {
		var tts []string
		for _, tt := range best.Demanding {
			tts = append(tts, fmt.Sprintf("%.4f", tt))
		}
		fmt.Fprintf(w, "lines that demand this lattice over one with %d times its lattice points (a centring or a smaller cell): %s°\n", best.Index, strings.Join(tts, ", "))
	}
	// The search's warnings name the first solution's second phase.
	if best.SecondPhase != nil && best.Solution.Cell != a.Search.Solutions[0].Cell {
		fmt.Fprintf(w, "weighed beside a second phase, %s, which takes about %d of the lines this cell leaves\n", cell.Format(*best.SecondPhase, cell.ESD{}), best.SecondPhaseLines)
	}
	if len(best.Conditions) > 0 {
		fmt.Fprintf(w, "observed conditions: %s\n", strings.Join(best.Conditions, "; "))
	}
	if best.Extinction != "" {
		fmt.Fprintf(w, "extinction symbol: %s (information on the space group; the lattice does not depend on it)\n", best.Extinction)
	}
	fmt.Fprintln(w)
}

// evidenceText says how the whole pattern weighed the close candidates
// (analysis.PatternEvidence), or "" when it weighed none.
func evidenceText(cs []analysis.Candidate) string {
	var parts []string
	var first *analysis.PatternEvidence
	for _, c := range cs {
		ev := c.Evidence
		if ev == nil || !ev.Compared {
			continue
		}
		if ev.Reference {
			first = ev
			continue
		}
		fit := "no fit"
		if ev.Rwp > 0 {
			fit = fmt.Sprintf("Rwp %.2f %%", 100*ev.Rwp)
		}
		lines := fmt.Sprintf("%d extra lines, %d missing", ev.Extra, ev.Missing)
		if ev.Split {
			lines = "its lines split the first's within their widths: the fits' χ² compared"
		}
		parts = append(parts, fmt.Sprintf("#%d %+.2f (%s; %s from the lines alone; %s)", c.Rank, ev.LogBayes, lines, report.Percent(ev.Prior), fit))
	}
	if first == nil || first.Rwp == 0 || len(parts) == 0 {
		return ""
	}
	return fmt.Sprintf("whole pattern: the first cell's fit (Rwp %.2f %%) measured the weak lines that tell it from the close candidates; ln Bayes factor of each over it: %s", 100*first.Rwp, strings.Join(parts, "; "))
}
