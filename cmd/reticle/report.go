package main

import (
	"context"
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"time"

	"reticle/peaks"
	"reticle/report"
)

func cmdReport(args []string, stdout, stderr io.Writer) int {
	return reportAt(args, stdout, stderr, time.Now())
}

// reportAt is cmdReport with the date of the records given.
func reportAt(args []string, stdout, stderr io.Writer, date time.Time) int {
	fs := flag.NewFlagSet("report", flag.ContinueOnError)
	fs.SetOutput(stderr)
	out := fs.String("out", "", "directory to write the report files into (required)")
	session := fs.String("session", "", "session file, or the JSON of an earlier report, to regenerate")
	paper := fs.String("paper", "A4", "page size of the PDF: A4 or Letter")
	force := fs.Bool("force", false, "replace report files that exist")
	solution := fs.Int("solution", 0, "rank of the solution to report (0: the session's choice, else the best)")
	sf := addSettingsFlags(fs)
	if err := fs.Parse(args); err != nil {
		return 2
	}
	if *out == "" {
		fmt.Fprintln(stderr, "reticle report: --out DIR is required")
		return 2
	}
	pp, err := report.ParsePaper(*paper)
	if err != nil {
		fmt.Fprintf(stderr, "reticle report: --paper: %v\n", err)
		return 2
	}
	if *solution < 0 {
		fmt.Fprintf(stderr, "reticle report: --solution: want a rank of 1 or more (0: the best), got %d\n", *solution)
		return 2
	}
	var settings report.Settings
	var paths []string
	var wantSHA string // the session's record of the scan
	chosen := *solution
	if *session != "" {
		if fs.NArg() > 0 {
			fmt.Fprintln(stderr, "reticle report: give --session or scan files, not both")
			return 2
		}
		s, err := report.ReadSession(*session)
		if err != nil {
			fmt.Fprintf(stderr, "reticle report: %v\n", err)
			return 1
		}
		settings, paths, wantSHA = s.Settings, []string{s.Scan.Path}, s.Scan.SHA256
		if !filepath.IsAbs(s.Scan.Path) {
			// A relative scan path not found from here is taken from
			// the session's directory.
			if _, err := os.Stat(s.Scan.Path); err != nil {
				paths[0] = filepath.Join(filepath.Dir(*session), s.Scan.Path)
			}
		}
		if chosen == 0 {
			chosen = s.Solution
		}
	} else {
		if fs.NArg() == 0 {
			fmt.Fprintln(stderr, "reticle report: no scan file given")
			return 2
		}
		if settings, err = sf.settings(); err != nil {
			fmt.Fprintf(stderr, "reticle report: %v\n", err)
			return 2
		}
		paths = fs.Args()
	}
	status := 0
	for _, path := range paths {
		scan, err := peaks.ReadFile(path)
		if err != nil {
			fmt.Fprintf(stderr, "reticle report: %v\n", err)
			status = 1
			continue
		}
		if wantSHA != "" && scan.SHA256 != wantSHA {
			fmt.Fprintf(stderr, "reticle report: warning: %s has changed since the session was saved (SHA-256 %s, session %s)\n", path, scan.SHA256, wantSHA)
		}
		doc, err := report.Run(context.Background(), scan, settings, nil)
		if err != nil {
			fmt.Fprintf(stderr, "reticle report: %v\n", err)
			status = 1
			continue
		}
		k := 0
		if chosen > 0 {
			k = chosen - 1
			if k >= len(doc.Solutions) {
				fmt.Fprintf(stderr, "reticle report: %s: no solution %d (%d found)\n", path, chosen, len(doc.Solutions))
				status = 1
				continue
			}
		}
		files, err := report.WriteAll(*out, doc, k, pp, date, *force)
		if err != nil {
			fmt.Fprintf(stderr, "reticle report: %v\n", err)
			status = 1
			continue
		}
		for _, f := range []string{files.PDF, files.CIF, files.CSV, files.JSON} {
			if f != "" {
				fmt.Fprintln(stdout, f)
			}
		}
	}
	return status
}
