// Package report runs the analysis of a scan from its settings and writes
// the result as a record: the JSON document (the same one `reticle index
// --json` prints), a CSV peak list, a CIF cell block (IUCr core
// dictionary) and a PDF for the lab notebook.
//
// # Reproducibility
//
// A Document embeds every setting used, with defaults filled in; running
// the same scan with the same settings gives the same document. Writers
// take the date from their caller and print it on one line only (the PDF's
// date line and its creation date, the CIF's _audit_creation_date), so two
// runs on the same input give identical files apart from that line.
//
// # PDF
//
// The PDF is drawn with fpdf (codeberg.org/go-pdf/fpdf, the library's
// current home, which gonum/plot's PDF back end already brings in): it lays
// out text and tables on A4 or Letter with a searchable UTF-8 text layer
// (Liberation fonts embedded, so θ, Å, χ² print as such). The pattern is
// drawn by gonum/plot, the same figure code as the desktop program's view,
// and embedded as a 200 dpi PNG.
package report
