package report

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
	"time"

	"reticle/analysis"
)

// WriteJSON writes the analysis' document as `reticle index --json`
// prints it.
func WriteJSON(w io.Writer, a *analysis.Analysis) error {
	return EncodeJSON(w, NewDocument(a))
}

// EncodeJSON writes any record as indented JSON.
func EncodeJSON(w io.Writer, v any) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", " ")
	return enc.Encode(v)
}

// ReadJSON reads a document written by WriteJSON (its settings regenerate
// the analysis).
func ReadJSON(r io.Reader) (*Document, error) {
	var d Document
	dec := json.NewDecoder(r)
	if err := dec.Decode(&d); err != nil {
		return nil, fmt.Errorf("report: reading a result document: %w", err)
	}
	if d.Program != Program || d.Schema < 1 || d.Schema > Schema {
		return nil, fmt.Errorf("report: not a %s result document of schema 1–%d (program %q, schema %d)", Program, Schema, d.Program, d.Schema)
	}
	return &d, nil
}

// ErrExists: a file that would be overwritten without permission.
var ErrExists = errors.New("file exists")

// BaseName is the file name, without extension, of an analysis' report
// files: the sample name or the scan's file name, with characters unsafe
// in file names replaced.
func BaseName(a *analysis.Analysis) string {
	name := strings.Map(func(r rune) rune {
		if r < ' ' || strings.ContainsRune(`/\:*?"<>|`, r) {
			return '_'
		}
		if r == ' ' {
			return '-'
		}
		return r
	}, strings.TrimSpace(recordName(a)))
	if name == "" || name == "." || name == ".." {
		name = "reticle-report"
	}
	return name
}

// recordName names an analysis' records: the sample, else the scan's file
// name without its extension.
func recordName(a *analysis.Analysis) string {
	if a.Settings.Sample != "" {
		return a.Settings.Sample
	}
	return strings.TrimSuffix(filepath.Base(a.Scan.Path), filepath.Ext(a.Scan.Path))
}

// Files are the paths WriteAll writes.
type Files struct {
	PDF, CIF, CSV, JSON string
}

// WriteAll writes the four records of an analysis (its chosen cell) into
// dir: BASE.pdf, BASE.cif, BASE.csv and BASE.json. Each is written to a
// temporary file beside its target and then moved into place, so a
// failure never leaves a half-written record; an existing file is
// replaced only when force is set, otherwise WriteAll writes nothing and
// returns an error wrapping ErrExists naming it.
func WriteAll(dir string, a *analysis.Analysis, paper Paper, date time.Time, force bool) (Files, error) {
	base := filepath.Join(dir, BaseName(a))
	f := Files{PDF: base + ".pdf", CIF: base + ".cif", CSV: base + ".csv", JSON: base + ".json"}
	if !force {
		for _, p := range []string{f.PDF, f.CIF, f.CSV, f.JSON} {
			if _, err := os.Lstat(p); err == nil {
				return f, fmt.Errorf("report: %s: %w (give --force to replace it)", p, ErrExists)
			} else if !errors.Is(err, fs.ErrNotExist) {
				return f, fmt.Errorf("report: %w", err)
			}
		}
	}
	outs := []struct {
		path  *string
		write func(*bytes.Buffer) error
	}{
		{&f.PDF, func(b *bytes.Buffer) error { return WritePDF(b, a, paper, date) }},
		{&f.CIF, func(b *bytes.Buffer) error { return WriteCIF(b, a, date) }},
		{&f.CSV, func(b *bytes.Buffer) error { return WriteCSV(b, a) }},
		{&f.JSON, func(b *bytes.Buffer) error { return WriteJSON(b, a) }},
	}
	if a.ChosenCandidate() == nil {
		// No cell, no CIF.
		f.CIF = ""
		outs = append(outs[:1], outs[2:]...)
	}
	// Every record is made before any is written.
	bufs := make([]bytes.Buffer, len(outs))
	for i, o := range outs {
		if err := o.write(&bufs[i]); err != nil {
			return f, err
		}
	}
	for i, o := range outs {
		if err := SafeWrite(*o.path, bufs[i].Bytes(), force); err != nil {
			return f, err
		}
	}
	return f, nil
}

// SafeWrite writes data to path through a temporary file in the same
// directory and a rename; without replace, an existing path is left alone
// and the error wraps ErrExists.
func SafeWrite(path string, data []byte, replace bool) error {
	dir := filepath.Dir(path)
	tmp, err := os.CreateTemp(dir, "."+filepath.Base(path)+".*.tmp")
	if err != nil {
		return fmt.Errorf("report: %w", err)
	}
	name := tmp.Name()
	defer os.Remove(name) // gone after the rename; cleans up after a failure
	if _, err := tmp.Write(data); err != nil {
		tmp.Close()
		return fmt.Errorf("report: writing %s: %w", path, err)
	}
	if err := tmp.Sync(); err != nil {
		tmp.Close()
		return fmt.Errorf("report: writing %s: %w", path, err)
	}
	if err := tmp.Close(); err != nil {
		return fmt.Errorf("report: writing %s: %w", path, err)
	}
	if err := os.Chmod(name, 0o644); err != nil {
		return fmt.Errorf("report: %w", err)
	}
	if replace {
		if err := os.Rename(name, path); err != nil {
			return fmt.Errorf("report: %w", err)
		}
		return nil
	}
	// A hard link fails when the target exists: no check-then-rename race.
	if err := os.Link(name, path); err != nil {
		if errors.Is(err, fs.ErrExist) {
			return fmt.Errorf("report: %s: %w", path, ErrExists)
		}
		// File systems without hard links: check, then rename.
		if _, serr := os.Lstat(path); serr == nil {
			return fmt.Errorf("report: %s: %w", path, ErrExists)
		}
		if err := os.Rename(name, path); err != nil {
			return fmt.Errorf("report: %w", err)
		}
	}
	return nil
}
