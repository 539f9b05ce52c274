package main

import (
	"flag"
	"fmt"
	"io"
	"runtime"
	"strconv"
	"strings"

	"reticle/analysis"
	"reticle/cell"
	"reticle/density"
	"reticle/indexing"
	"reticle/peaks"
	"reticle/refine"
	"reticle/scanfile"
)

// A command is a subcommand, as a bit of the set of commands an option
// belongs to.
type command uint

const (
	cmdPeaks command = 1 << iota
	cmdIndex
	cmdRefine
	cmdContents
	cmdReport
	cmdFit
)

var commandNames = map[command]string{cmdPeaks: "peaks", cmdIndex: "index", cmdRefine: "refine", cmdContents: "contents", cmdReport: "report", cmdFit: "fit"}

// request is everything a command line asks for: the analysis settings
// and the options of the command itself.
type request struct {
	settings analysis.Settings
	json     bool
	cell     *cell.Cell // --cell
	cellText string
	// more are the further --cell values, the further phases of fit, with
	// their texts.
	more      []cell.Cell
	moreTexts []string
	out       string // report
	paper     string
	force     bool
	session   string
	solution  int
	jobs      int    // scans analysed at once
	summary   string // base path of the batch summary table
	curves    bool   // fit: the observed, calculated and difference curves in the JSON
	// fitPattern: report fits the chosen cell to the whole pattern.
	fitPattern bool
}

// An option is one command-line option: its name, the placeholder of its
// value (empty for a switch), its help, the default it shows, the
// commands that accept it, and how it sets the request. Help and parsing
// are both made from this one list.
type option struct {
	name, arg, help string
	def             string
	in              command
	set             func(r *request, v string) error
}

// scanCommands are the commands that read scans.
const scanCommands = cmdPeaks | cmdIndex | cmdRefine | cmdReport | cmdFit

// analysisCommands are the commands that index, refine or report.
const analysisCommands = cmdIndex | cmdRefine | cmdReport | cmdFit

func floatOpt(dst func(r *request) *float64, check func(float64) bool, want string) func(*request, string) error {
	return func(r *request, v string) error {
		x, err := strconv.ParseFloat(strings.TrimSpace(v), 64)
		if err != nil || !check(x) {
			return fmt.Errorf("want %s, got %q", want, v)
		}
		*dst(r) = x
		return nil
	}
}

func positive(x float64) bool { return x > 0 && x < 1e300 }

var options = []option{
	{name: "wavelength", arg: "W", in: scanCommands, def: "the file's, else Cu",
		help: "radiation: an anode (Cu, Co, Cr, Fe, Mo, Ag: its K-alpha doublet), an anode with Ka1 (CuKa1: K-alpha1 only) or a wavelength in Å",
		set: func(r *request, v string) error {
			rad, err := scanfile.ParseRadiation(v)
			if err != nil {
				return err
			}
			r.settings.Radiation = &rad
			return nil
		}},
	{name: "block", arg: "NAME", in: scanCommands, def: "the block with the measured pattern",
		help: "data block of a CIF file to read",
		set:  func(r *request, v string) error { r.settings.Block = v; return nil }},
	{name: "ka2-ratio", arg: "R", in: scanCommands, def: ftoa(scanfile.DefaultKAlpha2Ratio),
		help: "K-alpha2/K-alpha1 intensity ratio of a doublet",
		set:  floatOpt(func(r *request) *float64 { return &r.settings.KAlpha2Ratio }, func(x float64) bool { return x > 0 && x <= 1 }, "a ratio above 0, at most 1")},
	{name: "threshold", arg: "Z", in: scanCommands, def: ftoa(peaks.DefaultThreshold),
		help: "significance a peak must reach, in esds of its height",
		set:  floatOpt(func(r *request) *float64 { return &r.settings.Threshold }, positive, "a positive number of esds")},
	{name: "background-width", arg: "D", in: scanCommands, def: ftoa(peaks.DefaultBackgroundWidth),
		help: "background window (SNIP) of the background estimate, degrees 2θ",
		set:  floatOpt(func(r *request) *float64 { return &r.settings.BackgroundWidth }, positive, "a positive window in degrees")},
	{name: "systems", arg: "LIST", in: cmdIndex | cmdReport, def: "all seven",
		help: "crystal systems to search, comma-separated; the lower ones (orthorhombic, monoclinic, triclinic) only when no higher cell explains the lines, unless --search-lower",
		set: func(r *request, v string) error {
			r.settings.Systems = nil
			for _, name := range strings.Split(v, ",") {
				s, err := cell.ParseSystem(name)
				if err != nil {
					return err
				}
				r.settings.Systems = append(r.settings.Systems, s)
			}
			return nil
		}},
	{name: "lines-only", in: cmdIndex | cmdReport,
		help: "rank the candidates by the line positions alone, without the whole pattern's evidence on the weak lines that tell the close first candidates apart",
		set:  func(r *request, _ string) error { r.settings.LinesOnly = true; return nil }},
	{name: "weigh-by-pattern", in: cmdIndex | cmdReport,
		help: "the default now (see --lines-only); accepted so that earlier scripts run",
		set:  func(r *request, _ string) error { return nil }},
	{name: "search-lower", in: cmdIndex | cmdReport,
		help: "search the lower systems even when a higher cell explains the lines",
		set:  func(r *request, _ string) error { r.settings.SearchLower = true; return nil }},
	{name: "unindexed", arg: "N", in: cmdIndex | cmdReport, def: fmt.Sprintf("%g %% of the lines, and every line below %g %% of the strongest", 100*indexing.DefaultImpurityShare, 100*indexing.WeakLine),
		help: "lines among the first 20 that may stay unindexed, 0 for none (each also costs its cell by its strength)",
		set: func(r *request, v string) error {
			n, err := strconv.Atoi(v)
			if err != nil || n < 0 {
				return fmt.Errorf("want a number of lines, 0 or more, got %q", v)
			}
			r.settings.Unindexed = n
			if n == 0 {
				r.settings.Unindexed = -1
			}
			return nil
		}},
	{name: "tolerance", arg: "D", in: analysisCommands, def: ftoa(cell.MatchTolerance),
		help: "smallest window within which a calculated line indexes an observed one, degrees 2θ",
		set:  floatOpt(func(r *request) *float64 { return &r.settings.Tolerance }, positive, "a positive window in degrees")},
	{name: "corrections", arg: "LIST", in: analysisCommands, def: refine.DefaultCorrections.String(),
		help: "instrument corrections refined with the cell: auto (the model of lowest BIC among none, zero, displacement and zero+displacement, the esds widened by the uncertainty of that choice; auto+transparency adds transparency to the models), or a fixed set of zero, displacement, transparency or none, joined by +",
		set: func(r *request, v string) error {
			c, err := refine.ParseCorrections(v)
			if err != nil {
				return err
			}
			r.settings.Corrections = &c
			return nil
		}},
	{name: "radius", arg: "MM", in: analysisCommands, def: ftoa(refine.DefaultRadius),
		help: "goniometer radius for the displacement and transparency corrections, mm",
		set:  floatOpt(func(r *request) *float64 { return &r.settings.Radius }, positive, "a positive radius in mm")},
	{name: "flag-limit", arg: "K", in: analysisCommands, def: ftoa(refine.DefaultFlagLimit),
		help: "flag lines whose |Δ/σ| exceeds K",
		set:  floatOpt(func(r *request) *float64 { return &r.settings.FlagLimit }, positive, "a positive number of esds")},
	{name: "scaling", arg: "S", in: analysisCommands, def: refine.ScaleSignificant.String(),
		help: "when esds are multiplied by χ²_red: chi2-test (when χ² lies beyond its 95 % point), above-one, always or never",
		set: func(r *request, v string) error {
			s, err := refine.ParseScaling(v)
			r.settings.Scaling = s
			return err
		}},
	{name: "standard", arg: "S", in: analysisCommands, def: "none",
		help: "internal standard mixed into the sample: Si, LaB6, a NIST lot (Si-640c, Si-640d, LaB6-660a, LaB6-660c; certified cells from memory) or a cell; its lines fix the corrections",
		set: func(r *request, v string) error {
			s, err := refine.ParseStandard(v)
			if err != nil {
				return err
			}
			r.settings.Standard = &s
			return nil
		}},
	{name: "exclude", arg: "LIST", in: analysisCommands, def: "none",
		help: "positions of lines to leave out of the refinement, degrees 2θ, comma-separated",
		set: func(r *request, v string) error {
			r.settings.Excluded = nil
			for _, f := range strings.Split(v, ",") {
				x, err := strconv.ParseFloat(strings.TrimSpace(f), 64)
				if err != nil {
					return fmt.Errorf("%q is not an angle in degrees", f)
				}
				r.settings.Excluded = append(r.settings.Excluded, x)
			}
			return nil
		}},
	{name: "cell", arg: "CELL", in: cmdRefine | cmdContents | cmdFit, def: "required",
		help: "the cell, e.g. 'tetragonal P a=4.59 c=2.96' or 'monoclinic C a=9.41 b=5.38 c=6.12 beta=102.4'; values may carry esds, a=5.6402(3); fit takes it again for each further phase",
		set: func(r *request, v string) error {
			c, _, err := cell.Parse(v)
			if err != nil {
				return err
			}
			if r.cell != nil {
				r.more, r.moreTexts = append(r.more, c), append(r.moreTexts, v)
				return nil
			}
			r.cell, r.cellText = &c, v
			return nil
		}},
	{name: "formula", arg: "F", in: cmdIndex | cmdContents | cmdReport, def: "none",
		help: "one formula unit: MgAl2O4, Fe0.95O, Ca3(PO4)2, CuSO4·5H2O",
		set: func(r *request, v string) error {
			f, err := density.ParseFormula(v)
			if err != nil {
				return err
			}
			r.settings.Formula = &f
			return nil
		}},
	{name: "density", arg: "D", in: cmdIndex | cmdContents | cmdReport, def: "none",
		help: "measured density in g/cm³ with its esd, e.g. 3.58(2) (without an esd, 1 % is assumed)",
		set: func(r *request, v string) error {
			m, err := density.ParseMeasured(v)
			if err != nil {
				return err
			}
			r.settings.Density = &m
			return nil
		}},
	{name: "z", arg: "N", in: cmdIndex | cmdContents | cmdReport, def: "from the density; without one, the most plausible",
		help: "formula units per cell",
		set: func(r *request, v string) error {
			n, err := strconv.Atoi(v)
			if err != nil || n < 1 {
				return fmt.Errorf("want a whole number of formula units, 1 or more, got %q", v)
			}
			r.settings.Z = n
			return nil
		}},
	{name: "sample", arg: "NAME", in: cmdIndex | cmdReport, def: "none; the records name the scan by its file",
		help: "sample name printed in the records",
		set:  func(r *request, v string) error { r.settings.Sample = v; return nil }},
	{name: "out", arg: "DIR", in: cmdReport, def: "required",
		help: "folder for NAME.pdf, NAME.cif, NAME.csv and NAME.json (NAME: the sample, else the scan's file name)",
		set:  func(r *request, v string) error { r.out = v; return nil }},
	{name: "paper", arg: "P", in: cmdReport, def: "A4",
		help: "page size of the PDF: A4 or Letter",
		set:  func(r *request, v string) error { r.paper = v; return nil }},
	{name: "candidate", arg: "N", in: cmdReport, def: "the session's, else 1",
		help: "rank of the candidate cell to report",
		set: func(r *request, v string) error {
			n, err := strconv.Atoi(v)
			if err != nil || n < 1 {
				return fmt.Errorf("want a rank of 1 or more, got %q", v)
			}
			r.solution = n
			return nil
		}},
	{name: "session", arg: "FILE", in: cmdReport, def: "none",
		help: "regenerate from a session file of the desktop program or an earlier report's JSON",
		set:  func(r *request, v string) error { r.session = v; return nil }},
	{name: "jobs", arg: "N", in: cmdIndex | cmdReport | cmdFit, def: "every core (" + strconv.Itoa(runtime.NumCPU()) + " here)",
		help: "scans analysed at once; the run uses at most N cores",
		set: func(r *request, v string) error {
			n, err := strconv.Atoi(v)
			if err != nil || n < 1 {
				return fmt.Errorf("want a number of scans at once, 1 or more, got %q", v)
			}
			r.jobs = n
			return nil
		}},
	{name: "summary", arg: "BASE", in: cmdIndex | cmdReport, def: "none for index; DIR/summary for report with several scans",
		help: "write a table of every scan (file, SHA-256, status, cell with esds, figures of merit, corrections, warnings) as BASE.csv and BASE.json",
		set:  func(r *request, v string) error { r.summary = v; return nil }},
	{name: "force", in: cmdIndex | cmdReport,
		help: "replace report or summary files that exist (otherwise nothing is written)",
		set:  func(r *request, _ string) error { r.force = true; return nil }},
	{name: "fit-pattern", in: cmdReport,
		help: "fit the chosen cell to the whole pattern (Pawley) and add the fit to the records: its figure and section in the PDF, its R factors and profile in the CIF, its figures in the JSON",
		set:  func(r *request, _ string) error { r.fitPattern = true; return nil }},
	{name: "curves", in: cmdFit,
		help: "add the observed, calculated, background and difference curves to the JSON document",
		set:  func(r *request, _ string) error { r.curves = true; return nil }},
	{name: "json", in: cmdPeaks | cmdIndex | cmdRefine | cmdContents | cmdFit,
		help: "print a JSON document instead of text",
		set:  func(r *request, _ string) error { r.json = true; return nil }},
}

func ftoa(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// parse reads the options of command c; errors name the option.
func parse(c command, args []string, stderr io.Writer) (*request, []string, error) {
	r := &request{jobs: runtime.NumCPU()}
	fs := flag.NewFlagSet(commandNames[c], flag.ContinueOnError)
	fs.SetOutput(io.Discard)
	for _, o := range options {
		if o.in&c == 0 {
			continue
		}
		o := o
		f := func(v string) error {
			if err := o.set(r, v); err != nil {
				return fmt.Errorf("%w", err)
			}
			return nil
		}
		if o.arg == "" {
			fs.BoolFunc(o.name, o.help, f)
		} else {
			fs.Func(o.name, o.help, f)
		}
	}
	// Options may stand before, between and after the file names; "--"
	// ends them (every later argument is a file name).
	var files []string
	for rest := args; ; {
		if err := fs.Parse(rest); err != nil {
			if err == flag.ErrHelp {
				fmt.Fprint(stderr, help(c))
				return nil, nil, errHelp
			}
			return nil, nil, optionError{err, commandNames[c]}
		}
		rem := fs.Args()
		if used := len(rest) - len(rem); used > 0 && rest[used-1] == "--" {
			files = append(files, rem...)
			break
		}
		if len(rem) == 0 {
			break
		}
		files = append(files, rem[0])
		rest = rem[1:]
	}
	return r, files, nil
}

// An optionError is the flag package's error about an option, its
// message rewritten in the -- style this program's help uses; it unwraps
// to that error.
type optionError struct {
	err     error
	command string
}

func (e optionError) Unwrap() error { return e.err }

func (e optionError) Error() string {
	s := e.err.Error()
	s = strings.Replace(s, "invalid value", "bad value", 1)
	s = strings.Replace(s, " for flag -", " for --", 1)
	s = strings.Replace(s, "flag provided but not defined: -", "unknown option --", 1)
	s = strings.Replace(s, "flag needs an argument: -", "option needs a value: --", 1)
	return fmt.Sprintf("%s (see reticle %s --help)", s, e.command)
}

// errHelp: the user asked for help, which was printed.
var errHelp = fmt.Errorf("help")

// help prints the options of command c from the option list.
func help(c command) string {
	var b strings.Builder
	fmt.Fprintf(&b, "usage: reticle %s %s\n\n%s\n\noptions:\n", commandNames[c], synopsis[c], about[c])
	for _, o := range options {
		if o.in&c == 0 {
			continue
		}
		head := "  --" + o.name
		if o.arg != "" {
			head += " " + o.arg
		}
		text := o.help
		if o.def != "" {
			text += " (default: " + o.def + ")"
		}
		fmt.Fprintf(&b, "%-24s %s\n", head, wrap(text, 24, 78))
	}
	return b.String()
}

// wrap breaks text into lines of at most width columns, continuation
// lines indented by indent.
func wrap(text string, indent, width int) string {
	var b strings.Builder
	col := indent
	for i, w := range strings.Fields(text) {
		n := len([]rune(w))
		if i > 0 && col+1+n > width {
			b.WriteString("\n" + strings.Repeat(" ", indent+1))
			col = indent
		} else if i > 0 {
			b.WriteByte(' ')
			col++
		}
		b.WriteString(w)
		col += n
	}
	return b.String()
}

var synopsis = map[command]string{
	cmdPeaks:    "[options] FILE...",
	cmdIndex:    "[options] FILE...",
	cmdRefine:   "--cell CELL [options] FILE...",
	cmdContents: "--cell CELL --formula F [--z N | --density D] [options]",
	cmdReport:   "--out DIR [options] FILE... | --out DIR --session FILE",
	cmdFit:      "--cell CELL [options] FILE...",
}

var about = map[command]string{
	cmdPeaks:    "Finds and fits the peaks of each scan.",
	cmdIndex:    "Finds the unit cell from the peaks of each scan, refines every candidate cell and, with a formula, works out its contents.",
	cmdRefine:   "Refines a known cell against the peaks of each scan.",
	cmdContents: "Works out formula units, X-ray density and atoms per cell of a cell.",
	cmdReport:   "Runs the analysis of index and writes its records (PDF, CIF, CSV, JSON) into a folder.",
	cmdFit:      "Fits every point of each scan with a known cell (Pawley's whole-pattern method), starting from the cell refined on the peaks.",
}
