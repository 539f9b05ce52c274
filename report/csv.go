package report

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"strconv"
	"strings"

	"reticle/analysis"
	"reticle/cell"
)

// csvHeader names the CSV peak list's columns, units in the names.
var csvHeader = []string{
	"peak", "two_theta_deg", "two_theta_esd_deg", "d_angstrom", "d_esd_angstrom",
	"height_counts", "height_esd_counts", "area", "area_esd", "fwhm_deg", "fwhm_esd_deg",
	"eta", "background_counts", "snr", "flags", "companion_of", "rejected",
	"hkl", "two_theta_calc_deg", "delta_two_theta_deg",
}

// A PeakRow is one row of the CSV peak list: a peak with its hkl and
// calculated position under the chosen cell (empty when unindexed).
type PeakRow struct {
	Peak
	HKL          string // "1 1 1", several joined by " / "
	TwoThetaCalc float64
	Delta        float64
	Indexed      bool
}

// PeakRows pairs the peaks with the lines of the chosen cell.
func PeakRows(a *analysis.Analysis) []PeakRow {
	rows := make([]PeakRow, len(a.Peaks))
	c := a.ChosenCandidate()
	for i, p := range a.Peaks {
		rows[i].Peak = NewPeak(p.Peak, p.Rejected)
		l, rr, ok := lineOf(c, p.TwoTheta)
		if !ok || !l.Indexed {
			continue
		}
		rows[i].HKL, rows[i].TwoThetaCalc, rows[i].Delta, rows[i].Indexed = HKLText(l.HKL), l.TwoThetaCalc, l.Delta, true
		if rr != nil {
			rows[i].TwoThetaCalc, rows[i].Delta = rr.TwoThetaCalc, rr.Delta
		}
	}
	return rows
}

// HKLText prints Miller indices as "1 1 1", several as "5 1 1 / 3 3 3".
func HKLText(v []cell.HKL) string {
	var names []string
	for _, h := range v {
		names = append(names, h.String())
	}
	return strings.Join(names, " / ")
}

func ftoa(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// WriteCSV writes the peak list of an analysis with the hkl of the chosen
// cell: one header row, then one row per peak; numbers in full precision.
func WriteCSV(w io.Writer, a *analysis.Analysis) error {
	return writeRows(w, PeakRows(a))
}

// writeRows writes a peak list.
func writeRows(w io.Writer, rows []PeakRow) error {
	cw := csv.NewWriter(w)
	if err := cw.Write(csvHeader); err != nil {
		return err
	}
	for i, r := range rows {
		comp := ""
		if r.CompanionOf != nil {
			comp = strconv.Itoa(*r.CompanionOf + 1)
		}
		calc, delta := "", ""
		if r.Indexed {
			calc, delta = ftoa(r.TwoThetaCalc), ftoa(r.Delta)
		}
		rec := []string{
			strconv.Itoa(i + 1), ftoa(r.TwoTheta), ftoa(r.TwoThetaESD), ftoa(r.D), ftoa(r.DESD),
			ftoa(r.Height), ftoa(r.HeightESD), ftoa(r.Area), ftoa(r.AreaESD), ftoa(r.FWHM), ftoa(r.FWHMESD),
			ftoa(r.Eta), ftoa(r.Background), ftoa(r.SNR), r.Flags, comp, strconv.FormatBool(r.Rejected),
			r.HKL, calc, delta,
		}
		if err := cw.Write(rec); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// ErrCSV: a peak list that is not the one WriteCSV writes.
var ErrCSV = errors.New("not a Reticle peak list")

// ReadCSV reads a peak list written by WriteCSV.
func ReadCSV(r io.Reader) ([]PeakRow, error) {
	cr := csv.NewReader(r)
	cr.FieldsPerRecord = len(csvHeader)
	head, err := cr.Read()
	if err != nil {
		return nil, fmt.Errorf("%w: %w", ErrCSV, err)
	}
	for i, h := range csvHeader {
		if head[i] != h {
			return nil, fmt.Errorf("%w: column %d is %q, want %q", ErrCSV, i+1, head[i], h)
		}
	}
	var rows []PeakRow
	for line := 2; ; line++ {
		rec, err := cr.Read()
		if err == io.EOF {
			return rows, nil
		}
		if err != nil {
			return nil, fmt.Errorf("%w: %w", ErrCSV, err)
		}
		var row PeakRow
		nums := []*float64{nil, &row.TwoTheta, &row.TwoThetaESD, &row.D, &row.DESD, &row.Height, &row.HeightESD,
			&row.Area, &row.AreaESD, &row.FWHM, &row.FWHMESD, &row.Eta, &row.Background, &row.SNR}
		for c := 1; c < len(nums); c++ {
			if *nums[c], err = strconv.ParseFloat(rec[c], 64); err != nil {
				return nil, fmt.Errorf("%w: line %d, column %s: %q is not a number", ErrCSV, line, csvHeader[c], rec[c])
			}
		}
		row.Flags = rec[14]
		if rec[15] != "" {
			n, err := strconv.Atoi(rec[15])
			if err != nil || n < 1 {
				return nil, fmt.Errorf("%w: line %d, column companion_of: %q", ErrCSV, line, rec[15])
			}
			n--
			row.CompanionOf = &n
		}
		if row.Rejected, err = strconv.ParseBool(rec[16]); err != nil {
			return nil, fmt.Errorf("%w: line %d, column rejected: %q", ErrCSV, line, rec[16])
		}
		row.HKL = rec[17]
		if rec[18] != "" {
			row.Indexed = true
			if row.TwoThetaCalc, err = strconv.ParseFloat(rec[18], 64); err != nil {
				return nil, fmt.Errorf("%w: line %d, column two_theta_calc_deg: %q", ErrCSV, line, rec[18])
			}
			if row.Delta, err = strconv.ParseFloat(rec[19], 64); err != nil {
				return nil, fmt.Errorf("%w: line %d, column delta_two_theta_deg: %q", ErrCSV, line, rec[19])
			}
		}
		rows = append(rows, row)
	}
}
