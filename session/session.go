// Package session reads and writes session files: the state of an
// analysis that reopens it (the scan, the settings with the user's edits,
// the chosen candidate). A result document of the report reopens the same
// way.
package session

import (
	"encoding/json"
	"fmt"
	"os"

	"reticle/analysis"
	"reticle/report"
)

// Format and Version identify a session file.
const (
	Format  = "reticle-session"
	Version = 1
)

// A Session is the state of an analysis that reopens it: the scan (path
// and SHA-256, to warn when the file has changed), the settings with the
// user's peak edits, and the chosen solution.
type Session struct {
	Format   string            `json:"format"`
	Version  int               `json:"version"`
	Scan     ScanRef           `json:"scan"`
	Settings analysis.Settings `json:"settings"`
	// Solution is the chosen solution's rank (1-based); 0 means the best.
	Solution int `json:"solution"`
}

// A ScanRef names a scan file.
type ScanRef struct {
	Path   string `json:"path"`
	SHA256 string `json:"sha256"`
}

// Read reads a session file, or the JSON document of an earlier
// report, whose settings and scan regenerate it.
func Read(path string) (*Session, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("session: %w", err)
	}
	var probe struct {
		Format  string `json:"format"`
		Program string `json:"program"`
	}
	if err := json.Unmarshal(data, &probe); err != nil {
		return nil, fmt.Errorf("session: %s is not JSON: %w", path, err)
	}
	switch {
	case probe.Format == Format:
		var s Session
		if err := json.Unmarshal(data, &s); err != nil {
			return nil, fmt.Errorf("session: session %s: %w", path, err)
		}
		if s.Version < 1 || s.Version > Version {
			return nil, fmt.Errorf("session: session %s has version %d; this program reads versions 1–%d", path, s.Version, Version)
		}
		if s.Scan.Path == "" {
			return nil, fmt.Errorf("session: session %s names no scan", path)
		}
		return &s, nil
	case probe.Program == report.Program:
		var d report.Document
		if err := json.Unmarshal(data, &d); err != nil {
			return nil, fmt.Errorf("session: result document %s: %w", path, err)
		}
		if d.File == "" {
			return nil, fmt.Errorf("session: result document %s names no scan", path)
		}
		return &Session{Format: Format, Version: Version, Scan: ScanRef{d.File, d.SHA256}, Settings: d.Settings, Solution: d.Chosen}, nil
	}
	return nil, fmt.Errorf("session: %s is neither a %s session (format %q) nor a result document", path, report.Program, Format)
}

// Write writes a session file safely (temporary file and rename).
func Write(path string, s *Session, replace bool) error {
	s.Format, s.Version = Format, Version
	data, err := json.MarshalIndent(s, "", " ")
	if err != nil {
		return err
	}
	return report.SafeWrite(path, append(data, '\n'), replace)
}
