package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"time"

	"reticle/analysis"
	"reticle/cell"
	"reticle/report"
	"reticle/session"
)

func cmdReportRun(ctx context.Context, args []string, stdout, stderr io.Writer) int {
	return reportAt(ctx, args, stdout, stderr, time.Now())
}

// reportAt is cmdReportRun with the date of the records given.
func reportAt(ctx context.Context, args []string, stdout, stderr io.Writer, date time.Time) int {
	r, files, code, ok := start(cmdReport, args, stderr)
	if !ok {
		return code
	}
	if r.out == "" {
		fmt.Fprintln(stderr, "reticle report: --out DIR is required")
		return 2
	}
	pp, err := report.ParsePaper(r.paper)
	if err != nil {
		fmt.Fprintf(stderr, "reticle report: --paper: %v\n", err)
		return 2
	}
	if fi, err := os.Stat(r.out); errors.Is(err, fs.ErrNotExist) {
		if err := os.MkdirAll(r.out, 0o755); err != nil {
			fmt.Fprintf(stderr, "reticle report: --out %s: cannot create the folder: %v; name a folder you can write to\n", r.out, err)
			return 1
		}
		fmt.Fprintf(stderr, "reticle report: created the folder %s\n", r.out)
	} else if err != nil {
		fmt.Fprintf(stderr, "reticle report: --out %s: %v; name a folder you can write to\n", r.out, err)
		return 1
	} else if !fi.IsDir() {
		fmt.Fprintf(stderr, "reticle report: --out %s is a file, not a folder; name a folder for the four records\n", r.out)
		return 2
	}
	settings := r.settings
	var wantSHA string // the session's record of the scan
	chosen := r.solution
	if r.session != "" {
		if len(files) > 0 {
			fmt.Fprintln(stderr, "reticle report: give --session or scan files, not both")
			return 2
		}
		s, err := session.Read(r.session)
		if err != nil {
			fmt.Fprintf(stderr, "reticle report: %v\n", err)
			return 1
		}
		settings, files, wantSHA = s.Settings, []string{s.Scan.Path}, s.Scan.SHA256
		if !filepath.IsAbs(s.Scan.Path) {
			// A relative scan path not found from here is taken from
			// the session's directory.
			if _, err := os.Stat(s.Scan.Path); err != nil {
				files[0] = filepath.Join(filepath.Dir(r.session), s.Scan.Path)
			}
		}
		if chosen == 0 {
			chosen = s.Solution
		}
	} else if len(files) == 0 {
		fmt.Fprintln(stderr, "reticle report: no scan file given")
		return 2
	}
	files = expandInputs(files)
	type outcome struct {
		written report.Files
		notes   []string // warnings printed before the files
		err     error
	}
	outs := make([]outcome, len(files))
	rows := make([]report.SummaryRow, len(files))
	done := forEach(ctx, len(files), r.jobs, stderr, "reporting", largestFirst(files), func(i int) bool {
		path := files[i]
		o := &outs[i]
		a, sha, err := analyse(ctx, path, settings)
		if wantSHA != "" && sha != "" && sha != wantSHA {
			o.notes = append(o.notes, fmt.Sprintf("warning: %s has changed since the session was saved (SHA-256 %s, session %s)", path, sha, wantSHA))
		}
		if err == nil && chosen > 0 {
			if err = a.Choose(chosen - 1); err != nil {
				err = fmt.Errorf("%s: %w", path, err)
			}
		}
		if err == nil && r.fitPattern {
			// The report goes out without the fit when it fails, and
			// says why.
			if c := a.ChosenCandidate(); c != nil {
				pf, ferr := analysis.FitPattern(ctx, a.Extraction, []cell.Cell{c.Cell()}, a.Settings, nil)
				switch {
				case ferr == nil:
					a.Pattern = pf
				case ctx.Err() != nil:
					err = ctx.Err()
				default:
					o.notes = append(o.notes, fmt.Sprintf("warning: %v; the report has no whole-pattern fit", ferr))
				}
			}
		}
		if err == nil {
			o.written, err = report.WriteAll(r.out, a, pp, date, r.force)
		}
		if err != nil {
			o.err, rows[i] = err, report.NewSummaryRow(path, sha, nil, err)
			return finished(err)
		}
		rows[i] = report.NewSummaryRow(path, sha, a, nil)
		return true
	})
	if ctx.Err() != nil {
		for i, o := range outs {
			if done[i] {
				for _, f := range []string{o.written.PDF, o.written.CIF, o.written.CSV, o.written.JSON} {
					if f != "" {
						fmt.Fprintln(stdout, f)
					}
				}
			}
		}
		return interrupted(cmdReport, files, done, stderr)
	}
	status := 0
	for _, o := range outs {
		for _, n := range o.notes {
			fmt.Fprintf(stderr, "reticle report: %s\n", n)
		}
		if o.err != nil {
			fmt.Fprintf(stderr, "reticle report: %v\n", o.err)
			status = 1
			continue
		}
		for _, f := range []string{o.written.PDF, o.written.CIF, o.written.CSV, o.written.JSON} {
			if f != "" {
				fmt.Fprintln(stdout, f)
			}
		}
	}
	base := r.summary
	if base == "" && len(files) > 1 {
		base = filepath.Join(r.out, "summary")
	}
	return finishBatch(cmdReport, base, rows, r.force, status, stderr)
}
