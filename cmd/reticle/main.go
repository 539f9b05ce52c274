// Command reticle is the headless twin of the Reticle desktop program: it
// runs the same analysis on scan files from the command line, for batches
// and scripts.
//
// Usage:
//
//	reticle peaks [--wavelength W] [--ka2-ratio R] [--threshold Z] [--background-width D] [--json] FILE...
//	reticle index [--wavelength W] [--systems LIST] [--corrections LIST] [--json] FILE...
//	reticle report --out DIR [--sample NAME] [--formula F --density D] [--force] FILE...
//	reticle contents --cell CELL --formula F [--z N | --density D] [--json]
//	reticle refine --cell CELL [--corrections LIST] [--standard S] [--exclude LIST] [--json] FILE...
//
// W is an anode symbol (Cu, Co, Cr, Fe, Mo, Ag: the K-alpha doublet), an
// anode with Ka1 (CuKa1: K-alpha1 alone) or a wavelength in Å (one line).
// The default is the wavelength stated in the file, else the anode it
// names, else Cu.
package main

import (
	"fmt"
	"io"
	"os"
)

func main() {
	os.Exit(run(os.Args[1:], os.Stdout, os.Stderr))
}

const usage = `reticle: powder diffraction scans from the command line

usage:
  reticle peaks [options] FILE...   find and fit the peaks of each scan
  reticle index [options] FILE...   find the unit cell from the peaks of each scan
  reticle refine --cell CELL [options] FILE...
                                    refine a known cell against the peaks of each scan
  reticle contents --cell CELL --formula F (--z N | --density D)
                                    formula units, X-ray density and atoms per cell
  reticle report --out DIR [index options] FILE...
  reticle report --out DIR --session FILE
                                    write the PDF, CIF, CSV and JSON records

options of peaks:
  --wavelength W          radiation (see below)
  --ka2-ratio R           K-alpha2/K-alpha1 intensity ratio, default 0.5
  --threshold Z           significance a peak must reach, in esds, default 4.5
  --background-width D    background clipping window in degrees 2θ, default 1.5
  --json                  print JSON instead of a table

options of index (and --wavelength, --json as above):
  --systems LIST          systems to search, default cubic,tetragonal,hexagonal,rhombohedral
  --impurities N          lines among the first 20 that may stay unindexed, default 3 (-1: none)
  --tolerance D           smallest 2θ window for a match in degrees, default 0.03
  --corrections LIST      refine zero, displacement, both or none; default zero
  --radius R              goniometer radius for the displacement, mm, default 240
  --flag-limit K          flag lines with |Δ/σ| above K, default 3
  --scaling S             scale esds by χ²_red when: significant (default: χ²
                          beyond its 95 % point), above-one, always, never

options of refine (and all of index's refinement options):
  --cell CELL             the starting cell, e.g. 'tetragonal P a=4.59 c=2.96';
                          systems cubic, tetragonal, hexagonal, rhombohedral
                          (hexagonal axes), orthorhombic; values may carry
                          esds, a=5.6402(3)
  --standard S            internal standard mixed into the sample: Si, LaB6,
                          Si-640c, Si-640d, LaB6-660a, LaB6-660c (NIST
                          certificates, from memory) or a cell; its lines fix
                          the corrections (default then both)
  --exclude LIST          2θ of lines to leave out of the fit, degrees

options of contents (index accepts --formula, --density and --z too):
  --formula F             one formula unit: MgAl2O4, Fe0.95O, Ca3(PO4)2, CuSO4·5H2O
  --density D             measured density in g/cm³ with esd, e.g. 3.58(2)
                          (no esd: 1 % is assumed)
  --z N                   formula units per cell

options of report (and every option of index):
  --out DIR               directory for NAME.pdf, NAME.cif, NAME.csv, NAME.json
                          (NAME: --sample, else the scan's file name)
  --sample NAME           sample name printed in the records
  --paper P               A4 (default) or Letter
  --solution N            report the solution ranked N (default the best)
  --session FILE          regenerate from a session or an earlier report's JSON
  --force                 replace existing files (otherwise nothing is written)

W is an anode (Cu, Co, Cr, Fe, Mo, Ag: K-alpha1/K-alpha2 doublet), an anode
with Ka1 (CuKa1: K-alpha1 only) or a wavelength in angstrom (one line).
Without --wavelength the file's stated wavelength is used (one line), else
the doublet of the anode the file names, else Cu.
`

// run executes one command line and returns the process exit status.
func run(args []string, stdout, stderr io.Writer) int {
	if len(args) == 0 {
		fmt.Fprint(stderr, usage)
		return 2
	}
	switch args[0] {
	case "peaks":
		return cmdPeaks(args[1:], stdout, stderr)
	case "index":
		return cmdIndex(args[1:], stdout, stderr)
	case "refine":
		return cmdRefine(args[1:], stdout, stderr)
	case "contents":
		return cmdContents(args[1:], stdout, stderr)
	case "report":
		return cmdReport(args[1:], stdout, stderr)
	case "help", "-h", "--help":
		fmt.Fprint(stdout, usage)
		return 0
	}
	fmt.Fprintf(stderr, "reticle: unknown command %q\n\n%s", args[0], usage)
	return 2
}
