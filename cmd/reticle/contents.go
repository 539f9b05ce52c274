package main

import (
	"fmt"
	"io"

	"reticle/analysis"
	"reticle/cell"
	"reticle/density"
	"reticle/report"
)

func cmdContentsRun(args []string, stdout, stderr io.Writer) int {
	r, files, code, ok := start(cmdContents, args, stderr)
	if !ok {
		return code
	}
	if len(files) > 0 {
		fmt.Fprintf(stderr, "reticle contents: unexpected argument %q (contents works from --cell, not from a scan)\n", files[0])
		return 2
	}
	s := r.settings
	if r.cell == nil || s.Formula == nil {
		fmt.Fprintln(stderr, "reticle contents: --cell and --formula are required, e.g. --cell 'cubic F a=5.6402(3)' --formula NaCl --z 4")
		return 2
	}
	if len(r.more) > 0 {
		fmt.Fprintln(stderr, "reticle contents: --cell given more than once; contents takes one cell")
		return 2
	}
	_, e, _ := cell.Parse(r.cellText)
	cov := cell.IndependentCovariance(r.cell.System, e)
	c, err := analysis.Contents(*r.cell, cov, s)
	if err != nil {
		fmt.Fprintf(stderr, "reticle contents: %v\n", err)
		return 1
	}
	j := report.NewContents(c, *s.Formula, s.Density)
	if r.json {
		if err := encodeDocs(stdout, []report.Contents{j}); err != nil {
			fmt.Fprintf(stderr, "reticle contents: %v\n", err)
			return 1
		}
		return 0
	}
	printContents(stdout, cell.Format(*r.cell, e), c, *s.Formula, s.Density)
	return 0
}

// printContents prints a cell's contents for the terminal.
func printContents(w io.Writer, cellText string, c *density.Contents, f density.Formula, m *density.Measured) {
	fmt.Fprintf(w, "%s\n%s", cellText, report.Text(report.ContentsRows(c, f, m)))
}
