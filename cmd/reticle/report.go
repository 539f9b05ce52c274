package main

import (
	"flag"
	"fmt"
	"io"
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
	var settings report.Settings
	var paths []string
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
		settings, paths = s.Settings, []string{s.Scan.Path}
		if !filepath.IsAbs(s.Scan.Path) {
			// Relative scan paths are taken from the session's directory.
			if _, err := peaks.ReadFile(s.Scan.Path); err != nil {
				paths[0] = filepath.Join(filepath.Dir(*session), s.Scan.Path)
			}
		}
		if chosen == 0 {
			chosen = s.Solution
		}
		if err := checkHash(paths[0], s.Scan.SHA256, stderr); err != nil {
			fmt.Fprintf(stderr, "reticle report: %v\n", err)
			return 1
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
		doc, err := analyse(path, settings)
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

// checkHash warns when a scan no longer matches the SHA-256 a session
// recorded.
func checkHash(path, want string, stderr io.Writer) error {
	s, err := peaks.ReadFile(path)
	if err != nil {
		return err
	}
	if want != "" && s.SHA256 != want {
		fmt.Fprintf(stderr, "reticle report: warning: %s has changed since the session was saved (SHA-256 %s, session %s)\n", path, s.SHA256, want)
	}
	return nil
}
