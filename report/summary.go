package report

import (
	"encoding/csv"
	"fmt"
	"io"
	"strconv"
	"strings"

	"reticle/analysis"
	"reticle/cell"
)

// A SummaryRow is one scan of a batch in the summary table: the file,
// whether it was analysed, and the chosen cell with its esds, figures of
// merit and corrections.
type SummaryRow struct {
	File   string `json:"file"`
	SHA256 string `json:"sha256,omitempty"`
	// Status is "ok" (a cell), "no cell" (analysed, no cell found) or
	// "failed" (Error says why).
	Status   string `json:"status"`
	Error    string `json:"error,omitempty"`
	System   string `json:"system,omitempty"`
	Centring string `json:"centring,omitempty"`
	// Cell is the cell's text form with esds, as --cell reads it.
	Cell        string     `json:"cell,omitempty"`
	Params      [6]float64 `json:"parameters"`     // a, b, c (Å), α, β, γ (°)
	ESDs        [6]float64 `json:"parameter_esds"` // in the same order
	Volume      float64    `json:"volume"`         // Å³
	VolumeESD   float64    `json:"volume_esd"`     // Å³
	FigureLines int        `json:"figure_lines"`   // N of M_N and F_N
	M           float64    `json:"m_n"`            // de Wolff's M_N
	FN          float64    `json:"f_n"`            // Smith & Snyder's F_N
	Corrections string     `json:"corrections"`    // the refined (or chosen) corrections
	Warnings    []string   `json:"warnings,omitempty"`
}

// Summary statuses.
const (
	StatusOK     = "ok"
	StatusNoCell = "no cell"
	StatusFailed = "failed"
)

// NewSummaryRow summarises one scan: its analysis, or the error that
// stopped it (sha is the scan's SHA-256 when it was read).
func NewSummaryRow(path, sha string, a *analysis.Analysis, err error) SummaryRow {
	r := SummaryRow{File: path, SHA256: sha}
	if err != nil {
		r.Status, r.Error = StatusFailed, err.Error()
		return r
	}
	r.SHA256 = a.Scan.SHA256
	r.Warnings = append(r.Warnings, a.Warnings...)
	c := a.ChosenCandidate()
	if c == nil {
		r.Status = StatusNoCell
		return r
	}
	r.Status = StatusOK
	ce, e := c.Cell(), c.Covariance().ESD()
	r.System, r.Centring = ce.System.String(), ce.Centring.String()
	r.Cell = cell.Format(ce, e)
	r.Params, r.ESDs = ce.Params(), e.Values()
	r.Volume, r.VolumeESD = c.Volume()
	r.FigureLines, r.M, r.FN = c.FigureLines, c.M, c.FN
	if c.Refined != nil {
		r.Corrections = c.Refined.ChosenCorrections().String()
		r.Warnings = append(r.Warnings, c.Refined.Warnings...)
	} else if c.RefineErr != nil {
		r.Warnings = append(r.Warnings, "not refined: "+c.RefineErr.Error())
	}
	return r
}

// summaryHeader names the CSV columns.
var summaryHeader = []string{"file", "sha256", "status", "error", "system", "centring", "cell",
	"a_A", "a_esd_A", "b_A", "b_esd_A", "c_A", "c_esd_A",
	"alpha_deg", "alpha_esd_deg", "beta_deg", "beta_esd_deg", "gamma_deg", "gamma_esd_deg",
	"volume_A3", "volume_esd_A3", "figure_lines", "M_N", "F_N", "corrections", "warnings"}

// WriteSummaryCSV writes the rows as a CSV table with a header, one scan
// per row, in the order given.
func WriteSummaryCSV(w io.Writer, rows []SummaryRow) error {
	cw := csv.NewWriter(w)
	if err := cw.Write(summaryHeader); err != nil {
		return fmt.Errorf("report: summary: %w", err)
	}
	num := func(v float64, ok bool) string {
		if !ok {
			return ""
		}
		return strconv.FormatFloat(v, 'g', 10, 64)
	}
	for _, r := range rows {
		ok := r.Status == StatusOK
		rec := []string{r.File, r.SHA256, r.Status, r.Error, r.System, r.Centring, r.Cell}
		for i := range r.Params {
			rec = append(rec, num(r.Params[i], ok), num(r.ESDs[i], ok))
		}
		rec = append(rec, num(r.Volume, ok), num(r.VolumeESD, ok), "", "", "", r.Corrections, strings.Join(r.Warnings, "; "))
		if ok {
			rec[len(rec)-5] = strconv.Itoa(r.FigureLines)
			rec[len(rec)-4] = num(r.M, true)
			rec[len(rec)-3] = num(r.FN, true)
		}
		if err := cw.Write(rec); err != nil {
			return fmt.Errorf("report: summary: %w", err)
		}
	}
	cw.Flush()
	if err := cw.Error(); err != nil {
		return fmt.Errorf("report: summary: %w", err)
	}
	return nil
}

// WriteSummaryJSON writes the rows as a JSON document.
func WriteSummaryJSON(w io.Writer, rows []SummaryRow) error {
	return EncodeJSON(w, struct {
		Program string       `json:"program"`
		Version string       `json:"version"`
		Scans   []SummaryRow `json:"scans"`
	}{Program, Version, rows})
}
