package analysis

import (
	"context"
	"errors"
	"fmt"
	"math"
	"sort"
	"strconv"

	"reticle/cell"
	"reticle/density"
	"reticle/indexing"
	"reticle/peaks"
	"reticle/refine"
	"reticle/scanfile"
)

// An Analysis is the result of every stage for one scan.
type Analysis struct {
	Scan       *scanfile.Scan
	Extraction *Extraction
	// Settings are those the analysis ran with, as given (see
	// Settings.Resolved for the defaults used).
	Settings  Settings
	Radiation scanfile.Radiation // the radiation the peaks were fitted with
	// Peaks are every extracted and added peak, by 2θ, with the user's
	// rejections.
	Peaks []Peak
	// Lines are the lines indexed: peaks neither rejected nor
	// companions, less the internal standard's lines.
	Lines []cell.Line
	// StandardLines are the lines of the internal standard, when one is
	// set.
	StandardLines []refine.Observation
	// Search is the indexing's result; nil when there were no lines.
	Search *indexing.Result
	// Candidates are the cells found, best first.
	Candidates []Candidate
	// Chosen is the index of the candidate the user chose (0: the best).
	Chosen int
	// Pattern is a whole-pattern fit of the chosen cell (and any further
	// phases) when one was asked for (FitPattern); nil otherwise. A
	// re-run after an edit starts without one.
	Pattern  *PatternFit
	Warnings []string

	fit *fitOf // the first candidate's whole-pattern fit (firstFit)
}

// A Peak is an extracted or added peak with the user's verdict.
type Peak struct {
	peaks.Peak
	Rejected bool
}

// A Candidate is one cell from the search, refined, with its contents.
type Candidate struct {
	Rank int // 1-based, after ranking by contents
	indexing.Solution
	// Refined is the least-squares refinement of the cell against its
	// indexed lines; nil, with RefineErr saying why, when it failed.
	Refined   *refine.Result
	RefineErr error
	// Evidence is the candidate's whole-pattern fit when the first
	// candidates were close enough to be weighed by the pattern; nil
	// otherwise.
	Evidence *PatternEvidence
	// Pattern is the whole-pattern refinement of the first candidate's
	// cell when it gives the volume no less precisely than the peak
	// positions (polish); nil otherwise. PolishNote says which cell was kept and
	// why (empty when no fit was tried).
	Pattern    *PatternFit
	PolishNote string
	// Contents, when a formula was given; ContentsErr says why not
	// when they could not be worked out.
	Contents    *density.Contents
	ContentsErr error
}

// Cell returns the refined cell: from the whole pattern when that was
// kept (Pattern), else from the peak positions, else the indexing's
// when the refinement failed.
func (c *Candidate) Cell() cell.Cell {
	if c.Pattern != nil {
		return c.Pattern.Fit.Phases[0].Cell
	}
	if c.Refined != nil {
		return c.Refined.Cell
	}
	return c.Solution.Cell
}

// Covariance returns the covariance of the cell's parameters: that of
// the refinement Cell returns, or none.
func (c *Candidate) Covariance() cell.Covariance {
	if c.Pattern != nil {
		return c.Pattern.Fit.Phases[0].Covariance
	}
	if c.Refined != nil {
		return c.Refined.Covariance
	}
	return cell.Covariance{}
}

// Volume returns the cell volume and its esd in Å³.
func (c *Candidate) Volume() (float64, float64) {
	if c.Pattern != nil {
		ph := c.Pattern.Fit.Phases[0]
		return ph.Volume, ph.VolumeESD
	}
	if c.Refined != nil {
		return c.Refined.Volume, c.Refined.VolumeESD
	}
	return c.Solution.Volume, 0
}

// Position returns the calculated 2θ (degrees) of reflection h: under the
// cell and corrections refined on the peak positions (the lines' own
// residuals), else the indexing's cell and zero offset.
func (c *Candidate) Position(h cell.HKL, lambda float64) float64 {
	if c.Refined != nil {
		return c.Refined.Position(h)
	}
	return cell.TwoTheta(c.Solution.Cell.D(h), lambda) + c.Solution.Zero
}

// Line returns the candidate's record of the observed line at tt
// (degrees 2θ): its indexing and, when refined, its residual.
func (c *Candidate) Line(tt float64) (indexing.IndexedLine, *refine.Residual, bool) {
	for _, l := range c.Lines {
		if l.TwoTheta != tt {
			continue
		}
		if c.Refined != nil {
			for i := range c.Refined.Residuals {
				if c.Refined.Residuals[i].TwoTheta == tt {
					return l, &c.Refined.Residuals[i], true
				}
			}
		}
		return l, nil, true
	}
	return indexing.IndexedLine{}, nil, false
}

// ChosenCandidate returns the chosen candidate, or nil.
func (a *Analysis) ChosenCandidate() *Candidate {
	if a == nil || a.Chosen < 0 || a.Chosen >= len(a.Candidates) {
		return nil
	}
	return &a.Candidates[a.Chosen]
}

// RelativeHeight returns the height of peak i as a percentage of the
// highest peak's, I/I₀ (K-beta companions, which are not lines of the
// sample's radiation, are not counted as the highest).
func (a *Analysis) RelativeHeight(i int) float64 {
	top := 0.0
	for _, p := range a.Peaks {
		if !p.Companion() {
			top = math.Max(top, p.Height)
		}
	}
	if i < 0 || i >= len(a.Peaks) || !(top > 0) {
		return math.NaN()
	}
	return 100 * a.Peaks[i].Height / top
}

// Choose makes candidate k (0-based) the chosen one.
func (a *Analysis) Choose(k int) error {
	if k < 0 || k >= len(a.Candidates) {
		return fmt.Errorf("no candidate cell %d (%d found)", k+1, len(a.Candidates))
	}
	a.Chosen = k
	return nil
}

// Run analyses a scan with the settings: Extract, then Analyse.
func Run(ctx context.Context, scan *scanfile.Scan, s Settings, progress Progress) (*Analysis, error) {
	e, err := Extract(ctx, scan, s, progress)
	if err != nil {
		return nil, err
	}
	return Analyse(ctx, e, s, progress)
}

// Open reads a scan file and analyses it.
func Open(ctx context.Context, path string, s Settings, progress Progress) (*Analysis, error) {
	scan, err := Read(path, s)
	if err != nil {
		return nil, err
	}
	return Run(ctx, scan, s, progress)
}

// Read reads a scan file as the settings say (its CIF block).
func Read(path string, s Settings) (*scanfile.Scan, error) {
	return scanfile.ReadFileWith(path, scanfile.ReadOptions{Block: s.Block})
}

// Analyse runs the stages after the extraction: it indexes the peaks that
// are neither rejected nor companions (less the internal standard's
// lines), refines every candidate cell against its indexed lines and,
// with a formula, works out the cells' contents (cells whose measured
// density gives no whole Z rank last). The context cancels the work.
func Analyse(ctx context.Context, e *Extraction, s Settings, progress Progress) (*Analysis, error) {
	return analyse(ctx, e, s, progress, nil)
}

// ErrNoEarlierSearch is returned by Reweigh when the earlier analysis is
// not one it can start from.
var ErrNoEarlierSearch = errors.New("analysis: no earlier search of this scan under these settings")

// Reweigh is Analyse without the search for cells: the candidates of an
// earlier analysis are weighed again on the lines of the present
// settings (see indexing.Reweigh), then refined as Analyse refines
// them — only the first and the one shown before the edit, the others
// carrying ErrProvisional; the pattern is not fitted. It answers an
// edit of the lines at once while Analyse runs, and its Search is
// marked provisional. The earlier analysis must be of the same scan
// with the same settings but for the lines rejected, added or left out
// of refinement, and have found a cell; otherwise it returns
// ErrNoEarlierSearch.
func Reweigh(ctx context.Context, e *Extraction, s Settings, earlier *Analysis, progress Progress) (*Analysis, error) {
	if earlier == nil || earlier.Search == nil || len(earlier.Search.Solutions) == 0 || earlier.Scan != e.Scan || !sameBesidesLines(earlier.Settings, s) {
		return nil, ErrNoEarlierSearch
	}
	var shown *cell.Cell
	if c := earlier.ChosenCandidate(); c != nil {
		x := c.Solution.Cell
		shown = &x
	}
	return analyse(ctx, e, s, progress, &reweighing{earlier.Search.Solutions, shown})
}

// reweighing is what Reweigh passes to analyse: the earlier solutions,
// and the cell of the candidate that was shown (nil: none).
type reweighing struct {
	solutions []indexing.Solution
	shown     *cell.Cell
}

// refines reports whether the provisional result refines the solution
// of rank i (from 0): the first, and the cell that was shown.
func (r *reweighing) refines(i int, c cell.Cell) bool {
	return i == 0 || r.shown != nil && c.System == r.shown.System && cell.SameLattice(c, *r.shown, 2e-3)
}

// ErrProvisional is the refinement error of the candidates that Reweigh
// leaves unrefined: all but the first and the one shown before the edit.
var ErrProvisional = errors.New("not refined in the provisional result; the full analysis follows")

// analyse is Analyse, or Reweigh with what it passes.
func analyse(ctx context.Context, e *Extraction, s Settings, progress Progress, earlier *reweighing) (*Analysis, error) {
	if err := s.Check(); err != nil {
		return nil, fmt.Errorf("%s: settings: %w", e.Scan.Path, err)
	}
	pr := e.Result
	a := &Analysis{
		Scan: e.Scan, Extraction: e, Settings: s.Clone(), Radiation: pr.Radiation,
		Warnings: append(append([]string(nil), e.Scan.Warnings...), pr.Warnings...),
	}
	if w := radiationDisagrees(e.Scan, s); w != "" {
		a.Warnings = append(a.Warnings, w)
	}
	for _, p := range e.peaks() {
		a.Peaks = append(a.Peaks, Peak{Peak: p, Rejected: within(p.TwoTheta, s.Rejected)})
	}
	lambda := pr.Radiation.Lambda1
	var lines []cell.Line
	widths := map[float64]float64{} // FWHM of the line at each 2θ
	for _, p := range a.Peaks {
		if !p.Companion() && !p.Rejected {
			lines = append(lines, cell.Line{TwoTheta: p.TwoTheta, ESD: pr.LineESD(p.Peak), Intensity: p.Area, FWHM: p.FWHM})
			widths[p.TwoTheta] = p.FWHM
		}
	}
	ro := s.refineOptions(lambda)
	if s.Standard != nil {
		std, rest, err := refine.MatchStandard(ctx, lines, *s.Standard, ro)
		if err != nil {
			return nil, fmt.Errorf("%s: internal standard %s: %w", e.Scan.Path, s.Standard.Name, err)
		}
		a.StandardLines, lines = std, rest
		for i := range a.StandardLines {
			a.StandardLines[i].Excluded = within(a.StandardLines[i].TwoTheta, s.Excluded)
		}
	}
	a.Lines = lines
	if len(lines) == 0 {
		a.Warnings = append(a.Warnings, "no lines to index")
		return a, nil
	}
	io := s.indexOptions(lambda)
	io.MinTwoTheta, io.MaxTwoTheta = e.Scan.Range()
	var res *indexing.Result
	var err error
	if earlier != nil {
		res, err = indexing.Reweigh(ctx, lines, io, earlier.solutions)
	} else {
		res, err = indexing.Index(ctx, lines, io, progress.of(StageIndexing))
	}
	if err != nil {
		if errors.Is(err, context.Canceled) || errors.Is(err, context.DeadlineExceeded) {
			return nil, err
		}
		return nil, fmt.Errorf("%s: %w", e.Scan.Path, err)
	}
	a.Search = res
	for i, sol := range res.Solutions {
		if progress != nil {
			progress(StageRefinement, i, len(res.Solutions))
		}
		c := Candidate{Rank: i + 1, Solution: sol}
		if earlier != nil && !earlier.refines(i, sol.Cell) {
			c.RefineErr = ErrProvisional
		} else {
			c.Refined, c.RefineErr = refineSolution(ctx, sol, a.StandardLines, ro, s.Excluded, widths)
		}
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		if s.Formula != nil {
			c.Contents, c.ContentsErr = contents(&c, s)
		}
		a.Candidates = append(a.Candidates, c)
	}
	if !s.LinesOnly && earlier == nil {
		if err := weighByPattern(ctx, a, e, s); err != nil {
			return nil, err
		}
	}
	if earlier == nil {
		if err := polish(ctx, a, e, s); err != nil {
			return nil, err
		}
		if len(a.Candidates) > 0 && a.Candidates[0].Pattern != nil && s.Formula != nil {
			c := &a.Candidates[0]
			c.Contents, c.ContentsErr = contents(c, s)
		}
	}
	if s.Density != nil {
		demoteFractionalZ(a.Candidates)
	}
	if progress != nil {
		progress(StageRefinement, len(res.Solutions), len(res.Solutions))
	}
	return a, nil
}

// refineSolution refines a solution's cell against its indexed lines
// (and the internal standard's), leaving out those within EditTolerance
// of an angle in excluded; widths holds each line's FWHM by its 2θ.
func refineSolution(ctx context.Context, sol indexing.Solution, std []refine.Observation, opt refine.Options, excluded []float64, widths map[float64]float64) (*refine.Result, error) {
	var obs []refine.Observation
	for _, l := range sol.Lines {
		if l.Indexed && l.ESD > 0 {
			obs = append(obs, refine.Observation{Line: cell.Line{TwoTheta: l.TwoTheta, ESD: l.ESD}, HKL: l.HKL, Excluded: within(l.TwoTheta, excluded), Width: widths[l.TwoTheta]})
		}
	}
	obs = append(obs, std...)
	return refine.Refine(ctx, sol.Cell, obs, opt)
}

// contents works out a candidate's contents with the settings' formula,
// density and Z.
func contents(c *Candidate, s Settings) (*density.Contents, error) {
	_, vesd := c.Volume()
	return density.Compute(density.Input{Cell: c.Cell(), VolumeESD: vesd, Formula: *s.Formula, Z: s.Z, Measured: s.Density})
}

// demoteFractionalZ moves candidates whose measured density gives no whole
// Z below those that do, keeping the order within each group, and
// renumbers the ranks: a Z far from every allowed value is evidence
// against a cell.
func demoteFractionalZ(cs []Candidate) {
	whole := func(c Candidate) bool { return c.Contents == nil || c.Contents.Whole }
	sort.SliceStable(cs, func(a, b int) bool { return whole(cs[a]) && !whole(cs[b]) })
	for i := range cs {
		cs[i].Rank = i + 1
	}
}

// Contents works out the contents of a cell with the given covariance
// (zero when unknown) from the settings' formula, measured density and
// Z.
func Contents(c cell.Cell, cov cell.Covariance, s Settings) (*density.Contents, error) {
	if s.Formula == nil {
		return nil, fmt.Errorf("%w: no formula", density.ErrInput)
	}
	return density.Compute(density.Input{Cell: c, VolumeESD: c.VolumeESD(cov), Formula: *s.Formula, Z: s.Z, Measured: s.Density})
}

// RefineCell refines a known cell (typed in, or from the literature)
// against the extraction's lines that are not rejected or companions:
// the lines are assigned to the cell's calculated lines (and to the
// internal standard's, when the settings name one) and the cell is
// refined until the assignment is stable.
func RefineCell(ctx context.Context, e *Extraction, c cell.Cell, s Settings) (*refine.Result, error) {
	if err := s.Check(); err != nil {
		return nil, fmt.Errorf("%s: settings: %w", e.Scan.Path, err)
	}
	var obs []refine.Observation
	for _, p := range e.peaks() {
		if !p.Companion() && !within(p.TwoTheta, s.Rejected) {
			obs = append(obs, refine.Observation{Line: cell.Line{TwoTheta: p.TwoTheta, ESD: e.Result.LineESD(p)}, Excluded: within(p.TwoTheta, s.Excluded), Width: p.FWHM})
		}
	}
	opt := s.refineOptions(e.Result.Radiation.Lambda1)
	r, err := refine.RefineLines(ctx, c, obs, opt, refine.Matching{Tolerance: s.Tolerance})
	if err != nil {
		return nil, fmt.Errorf("%s: %w", e.Scan.Path, err)
	}
	return r, nil
}

// radiationDisagrees says so when the settings give a wavelength that
// differs (by more than 1e-4 relative) from the one the file states.
func radiationDisagrees(scan *scanfile.Scan, s Settings) string {
	if s.Radiation == nil || scan.Wavelength <= 0 {
		return ""
	}
	file := scan.Radiation()
	if math.Abs(file.Lambda1-s.Radiation.Lambda1) <= 1e-4*file.Lambda1 {
		return ""
	}
	return fmt.Sprintf("the file states the radiation %s; the %s Å given was used", file.Name, strconv.FormatFloat(s.Radiation.Lambda1, 'f', -1, 64))
}
