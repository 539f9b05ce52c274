package figure

import (
	"fmt"
	"image/color"
	"math"
	"sort"
	"strconv"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"reticle/analysis"
	"reticle/cell"
)

// Colours of the pattern figure: observed, fitted, background,
// difference, calculated-line ticks; chosen to stay apart for readers with
// the common colour-vision deficiencies (the Okabe–Ito set).
var (
	ColourObserved   = color.RGBA{0x33, 0x33, 0x33, 0xff}
	ColourFitted     = color.RGBA{0xd5, 0x5e, 0x00, 0xff}
	ColourBackground = color.RGBA{0x00, 0x72, 0xb2, 0xff}
	ColourDifference = color.RGBA{0x00, 0x9e, 0x73, 0xff}
	ColourTicks      = color.RGBA{0xcc, 0x79, 0xa7, 0xff}
	// PhaseColours mark the lines of each phase of a whole-pattern fit,
	// the main phase first.
	PhaseColours = []color.Color{ColourTicks, color.RGBA{0x56, 0xb4, 0xe9, 0xff}, color.RGBA{0xe6, 0x9f, 0x00, 0xff}, color.RGBA{0xf0, 0xe4, 0x42, 0xff}}
)

// figureFont is the figures' typeface: sans-serif, like the text around
// them. It is set on each figure, never as gonum/plot's global default.
var figureFont = font.Font{Typeface: "Liberation", Variant: "Sans"}

// setFont gives every text of the plot the figure font, keeping sizes.
func setFont(p *plot.Plot) {
	for _, f := range []*font.Font{&p.Title.TextStyle.Font, &p.X.Label.TextStyle.Font, &p.Y.Label.TextStyle.Font,
		&p.X.Tick.Label.Font, &p.Y.Tick.Label.Font, &p.Legend.TextStyle.Font} {
		f.Typeface, f.Variant = figureFont.Typeface, figureFont.Variant
	}
}

// A Scale is the intensity axis of a figure.
type Scale int

// The intensity scales.
const (
	Linear Scale = iota
	SquareRoot
	Logarithmic
)

func (sc Scale) apply(y float64) float64 {
	switch sc {
	case SquareRoot:
		return math.Copysign(math.Sqrt(math.Abs(y)), y)
	case Logarithmic:
		return math.Log10(math.Max(y, 1))
	}
	return y
}

// Options choose what a pattern figure shows. The zero value is the
// whole scan, linear in intensity, against 2θ, decimated to 1,200 columns.
type Options struct {
	Buckets    int     // columns the curves are decimated to; 0 means 1,200
	XMin, XMax float64 // 2θ range shown, degrees; both zero means the scan's
	Scale      Scale
	// DAxis plots against d (Å), falling from left to right, instead of
	// 2θ.
	DAxis bool
	// Dark draws light on a dark ground, for a window in a dark theme.
	Dark bool
}

// Ink and ground of the dark variant: the observed curve, the rejected
// marks, the axes and the text in light grey on near black.
var (
	darkGround = color.RGBA{0x17, 0x17, 0x18, 0xff}
	darkInk    = color.RGBA{0xe0, 0xe0, 0xe0, 0xff}
)

// ink returns the colour of the observed curve, the axes and the text.
func (o Options) ink() color.Color {
	if o.Dark {
		return darkInk
	}
	return ColourObserved
}

// paint sets the plot's ground, axes and text to the variant's colours.
func (o Options) paint(p *plot.Plot) {
	if !o.Dark {
		return
	}
	p.BackgroundColor = darkGround
	for _, ax := range []*plot.Axis{&p.X, &p.Y} {
		ax.Color = darkInk
		ax.Label.TextStyle.Color = darkInk
		ax.Tick.Color = darkInk
		ax.Tick.Label.Color = darkInk
	}
	p.Title.TextStyle.Color = darkInk
	p.Legend.TextStyle.Color = darkInk
}

// X maps a 2θ (degrees) to the figure's x for wavelength lambda (Å): 2θ,
// or −d so that d falls from left to right.
func (o Options) X(tt, lambda float64) float64 {
	if !o.DAxis {
		return tt
	}
	return -cell.DSpacing(tt, lambda)
}

// TwoTheta inverts X.
func (o Options) TwoTheta(x, lambda float64) float64 {
	if !o.DAxis {
		return x
	}
	return cell.TwoTheta(-x, lambda)
}

// absTicks labels an axis of negated values with their magnitudes.
type absTicks struct{}

func (absTicks) Ticks(min, max float64) []plot.Tick {
	ts := plot.DefaultTicks{}.Ticks(min, max)
	for i := range ts {
		if ts[i].Label != "" {
			ts[i].Label = strconv.FormatFloat(math.Abs(ts[i].Value), 'g', 4, 64)
		}
	}
	return ts
}

// decimateIndex returns the indices, in order, of the lowest and highest
// value of each of buckets equal runs of [a, b): at most 2·buckets points
// that keep every peak.
func decimateIndex(a, b, buckets int, val func(int) float64) []int {
	n := b - a
	if n <= 0 {
		return nil
	}
	if n <= 2*buckets {
		idx := make([]int, n)
		for i := range idx {
			idx[i] = a + i
		}
		return idx
	}
	idx := make([]int, 0, 2*buckets)
	per := float64(n) / float64(buckets)
	for k := 0; k < buckets; k++ {
		lo, hi := a+int(float64(k)*per), min(a+int(float64(k+1)*per), b)
		if lo >= hi {
			continue
		}
		imin, imax := lo, lo
		vmin, vmax := val(lo), val(lo)
		for i := lo + 1; i < hi; i++ {
			v := val(i)
			if v < vmin {
				imin, vmin = i, v
			}
			if v > vmax {
				imax, vmax = i, v
			}
		}
		if imin > imax {
			imin, imax = imax, imin
		}
		idx = append(idx, imin)
		if imax != imin {
			idx = append(idx, imax)
		}
	}
	return idx
}

// Pattern draws an analysis' pattern: observed counts, fitted profile,
// background, the difference beneath, tick marks of the calculated lines
// of the chosen cell and markers of the peaks, accepted as up-triangles
// and rejected as crosses. The figure is the same for the report and the
// desktop view.
func Pattern(a *analysis.Analysis, o Options) *plot.Plot {
	p := plot.New()
	setFont(p)
	p.X.Label.Text = "2θ (degrees)"
	if o.DAxis {
		p.X.Label.Text = "d (Å)"
		p.X.Tick.Marker = absTicks{}
	}
	p.Y.Label.Text = "intensity (counts)"
	switch o.Scale {
	case SquareRoot:
		p.Y.Label.Text = "√intensity (√counts)"
	case Logarithmic:
		p.Y.Label.Text = "log₁₀ intensity (counts)"
	}
	p.Legend.Top = true
	if a == nil || a.Scan == nil || a.Scan.Len() == 0 {
		return p
	}
	if o.Buckets <= 0 {
		o.Buckets = 1200
	}
	lo, hi := a.Scan.Range()
	if o.XMax > o.XMin {
		lo, hi = math.Max(lo, o.XMin), math.Min(hi, o.XMax)
	}
	pt := pattern{TwoTheta: a.Scan.TwoTheta, Intensity: a.Scan.Intensity, Background: a.Extraction.Result.Background, Profile: a.Extraction.Profile}
	// A whole-pattern fit, when there is one, replaces the peaks' profile:
	// its curve, background and difference, and a row of ticks per
	// phase.
	var whole *analysis.PatternFit
	fitName := "fitted"
	if pf := a.Pattern; pf != nil && len(pf.Fit.Calc) == len(pt.TwoTheta) {
		whole, fitName = pf, "whole-pattern fit"
		pt.Profile, pt.Background = pf.Fit.Calc, pf.Fit.Background
	}
	lam := a.Radiation.Lambda1
	// The points in view: decimated over the raw values first (min and
	// max per column survive any monotonic scale), transformed after, so
	// that a million-point scan costs a few passes over it.
	first := max(sort.SearchFloat64s(pt.TwoTheta, lo)-1, 0)
	last := min(sort.SearchFloat64s(pt.TwoTheta, hi)+1, len(pt.TwoTheta))
	curve := func(val func(i int) float64, shift float64) plotter.XYs {
		idx := decimateIndex(first, last, o.Buckets, val)
		xy := make(plotter.XYs, len(idx))
		for j, i := range idx {
			xy[j].X = o.X(pt.TwoTheta[i], lam)
			xy[j].Y = val(i)
		}
		if shift == 0 {
			for j := range xy {
				xy[j].Y = o.Scale.apply(xy[j].Y)
			}
		}
		if o.DAxis {
			for i, j := 0, len(xy)-1; i < j; i, j = i+1, j-1 {
				xy[i], xy[j] = xy[j], xy[i]
			}
		}
		return xy
	}
	obs := curve(func(i int) float64 { return pt.Intensity[i] }, 0)
	top, low := math.Inf(-1), math.Inf(1)
	for _, v := range obs {
		top, low = math.Max(top, v.Y), math.Min(low, v.Y)
	}
	if math.IsInf(top, 0) {
		top, low = 1, 0
	}
	span := top - math.Min(low, 0)
	if span <= 0 {
		span = 1
	}
	// The difference curve sits below the data, its zero at −12 % of the
	// span; the ticks between it and the data.
	rows := 1
	if whole != nil {
		rows = len(whole.Fit.Phases)
	}
	diffZero := math.Min(low, 0) - (0.08+0.04*float64(rows))*span
	tickTop, tickLow := math.Min(low, 0)-0.02*span, math.Min(low, 0)-0.05*span

	add := func(xy plotter.XYs, c color.Color, width vg.Length, dashes []vg.Length, name string) {
		l, err := plotter.NewLine(xy)
		if err != nil {
			return
		}
		l.Color, l.Width, l.Dashes = c, width, dashes
		p.Add(l)
		if name != "" {
			p.Legend.Add(name, l)
		}
	}
	haveFit := len(pt.Profile) == len(pt.TwoTheta)
	if haveFit {
		add(curve(func(i int) float64 { return pt.Profile[i] }, 0), ColourFitted, vg.Points(1.4), nil, fitName)
	}
	add(obs, o.ink(), vg.Points(0.5), nil, "observed")
	if len(pt.Background) == len(pt.TwoTheta) {
		add(curve(func(i int) float64 { return pt.Background[i] }, 0), ColourBackground, vg.Points(0.8), []vg.Length{vg.Points(3), vg.Points(2)}, "background")
	}
	if haveFit {
		diff := curve(func(i int) float64 {
			return o.Scale.apply(pt.Intensity[i]) - o.Scale.apply(pt.Profile[i]) + diffZero
		}, diffZero)
		add(diff, ColourDifference, vg.Points(0.5), nil, "difference")
	}
	if whole != nil {
		for i, ph := range whole.Fit.Phases {
			var segs plotter.XYs
			off := 0.04 * float64(i) * span
			for _, r := range ph.Reflections {
				if r.TwoTheta >= lo && r.TwoTheta <= hi {
					x := o.X(r.TwoTheta, lam)
					segs = append(segs, plotter.XY{X: x, Y: tickLow - off}, plotter.XY{X: x, Y: tickTop - off})
				}
			}
			if len(segs) > 0 {
				ticks := &tickMarks{xy: segs, colour: PhaseColours[i%len(PhaseColours)]}
				p.Add(ticks)
				p.Legend.Add(fmt.Sprintf("phase %d lines", i+1), ticks)
			}
		}
	} else if c := a.ChosenCandidate(); c != nil {
		var segs plotter.XYs
		for _, r := range c.Calculated {
			if tt := c.Position(r.HKL[0], lam); tt >= lo && tt <= hi {
				x := o.X(tt, lam)
				segs = append(segs, plotter.XY{X: x, Y: tickLow}, plotter.XY{X: x, Y: tickTop})
			}
		}
		if len(segs) > 0 {
			ticks := &tickMarks{xy: segs}
			p.Add(ticks)
			p.Legend.Add("calculated lines", ticks)
		}
	}
	var acc, rej plotter.XYs
	for _, pk := range a.Peaks {
		if pk.TwoTheta < lo || pk.TwoTheta > hi {
			continue
		}
		xy := plotter.XY{X: o.X(pk.TwoTheta, lam), Y: MarkerY(pk, o.Scale, span)}
		if pk.Rejected {
			rej = append(rej, xy)
		} else if !pk.Companion() {
			acc = append(acc, xy)
		}
	}
	if len(acc) > 0 {
		s, _ := plotter.NewScatter(acc)
		s.GlyphStyle = draw.GlyphStyle{Color: ColourFitted, Radius: vg.Points(3), Shape: draw.TriangleGlyph{}}
		p.Add(s)
		p.Legend.Add("accepted peak", s)
	}
	if len(rej) > 0 {
		s, _ := plotter.NewScatter(rej)
		s.GlyphStyle = draw.GlyphStyle{Color: o.ink(), Radius: vg.Points(4), Shape: draw.CrossGlyph{}}
		p.Add(s)
		p.Legend.Add("rejected peak", s)
	}
	p.X.Min, p.X.Max = o.X(lo, lam), o.X(hi, lam)
	if p.X.Min > p.X.Max {
		p.X.Min, p.X.Max = p.X.Max, p.X.Min
	}
	p.Y.Min = diffZero - 0.1*span
	// Head room for the legend.
	p.Y.Max = top + 0.45*span
	o.paint(p)
	p.Legend.TextStyle.Font.Size = vg.Points(8)
	p.Legend.ThumbnailWidth = vg.Points(14)
	return p
}

// pattern holds the curves a figure draws, point by point.
type pattern struct {
	TwoTheta, Intensity, Background, Profile []float64
}

// MarkerY is the height at which a peak's marker is drawn: a little
// above its top, on the figure's intensity scale of the given span.
func MarkerY(pk analysis.Peak, sc Scale, span float64) float64 {
	return sc.apply(pk.Background+pk.Height) + 0.04*span
}

// tickMarks draws vertical segments given as pairs of points, in colour
// (ColourTicks when nil).
type tickMarks struct {
	xy     plotter.XYs
	colour color.Color
}

func (t *tickMarks) ink() color.Color {
	if t.colour == nil {
		return ColourTicks
	}
	return t.colour
}

func (t *tickMarks) Plot(c draw.Canvas, p *plot.Plot) {
	tr, ty := p.Transforms(&c)
	ls := draw.LineStyle{Color: t.ink(), Width: vg.Points(0.8)}
	for i := 0; i+1 < len(t.xy); i += 2 {
		a, b := t.xy[i], t.xy[i+1]
		c.StrokeLine2(ls, tr(a.X), ty(a.Y), tr(b.X), ty(b.Y))
	}
}

// Thumbnail draws the legend entry.
func (t *tickMarks) Thumbnail(c *draw.Canvas) {
	x := (c.Min.X + c.Max.X) / 2
	c.StrokeLine2(draw.LineStyle{Color: t.ink(), Width: vg.Points(0.8)}, x, c.Min.Y, x, c.Max.Y)
}
