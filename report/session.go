package report

import (
	"encoding/json"
	"fmt"
	"os"

	"reticle/analysis"
)

// SessionFormat and SessionVersion identify a session file.
const (
	SessionFormat  = "reticle-session"
	SessionVersion = 1
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

// ReadSession reads a session file, or the JSON document of an earlier
// report, whose settings and scan regenerate it.
func ReadSession(path string) (*Session, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("report: %w", err)
	}
	var probe struct {
		Format  string `json:"format"`
		Program string `json:"program"`
	}
	if err := json.Unmarshal(data, &probe); err != nil {
		return nil, fmt.Errorf("report: %s is not JSON: %w", path, err)
	}
	switch {
	case probe.Format == SessionFormat:
		var s Session
		if err := json.Unmarshal(data, &s); err != nil {
			return nil, fmt.Errorf("report: session %s: %w", path, err)
		}
		if s.Version < 1 || s.Version > SessionVersion {
			return nil, fmt.Errorf("report: session %s has version %d; this program reads versions 1–%d", path, s.Version, SessionVersion)
		}
		if s.Scan.Path == "" {
			return nil, fmt.Errorf("report: session %s names no scan", path)
		}
		return &s, nil
	case probe.Program == Program:
		var d Document
		if err := json.Unmarshal(data, &d); err != nil {
			return nil, fmt.Errorf("report: result document %s: %w", path, err)
		}
		if d.File == "" {
			return nil, fmt.Errorf("report: result document %s names no scan", path)
		}
		return &Session{Format: SessionFormat, Version: SessionVersion, Scan: ScanRef{d.File, d.SHA256}, Settings: d.Settings, Solution: d.Chosen}, nil
	}
	return nil, fmt.Errorf("report: %s is neither a %s session (format %q) nor a result document", path, Program, SessionFormat)
}

// WriteSession writes a session file safely (temporary file and rename).
func WriteSession(path string, s *Session, replace bool) error {
	s.Format, s.Version = SessionFormat, SessionVersion
	data, err := json.MarshalIndent(s, "", " ")
	if err != nil {
		return err
	}
	return SafeWrite(path, append(data, '\n'), replace)
}
