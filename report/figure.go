package report

import (
	"image/color"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
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
)

func init() {
	// Sans-serif figures, like the text around them.
	plot.DefaultFont = font.Font{Typeface: "Liberation", Variant: "Sans"}
	plotter.DefaultFont = plot.DefaultFont
}

// Decimate reduces a curve to at most 2·buckets points for drawing by
// keeping the lowest and highest point of each of buckets equal spans of
// x, so that no peak disappears. The data for computing are never
// decimated.
func Decimate(x, y []float64, buckets int) (xs, ys []float64) {
	n := len(x)
	if n <= 2*buckets || buckets < 1 {
		return x, y
	}
	per := float64(n) / float64(buckets)
	for b := 0; b < buckets; b++ {
		lo, hi := int(float64(b)*per), int(float64(b+1)*per)
		if hi > n {
			hi = n
		}
		if lo >= hi {
			continue
		}
		imin, imax := lo, lo
		for i := lo; i < hi; i++ {
			if y[i] < y[imin] {
				imin = i
			}
			if y[i] > y[imax] {
				imax = i
			}
		}
		a, c := imin, imax
		if a > c {
			a, c = c, a
		}
		xs, ys = append(xs, x[a]), append(ys, y[a])
		if c != a {
			xs, ys = append(xs, x[c]), append(ys, y[c])
		}
	}
	return xs, ys
}

// Figure draws a document's pattern: observed counts, fitted profile,
// background, the difference beneath, tick marks of the calculated lines
// of solution k (0-based; none when out of range) and markers of the
// peaks, accepted as up-triangles and rejected as crosses. The figure is
// the same for the report and the desktop view.
func Figure(doc *Document, k int, buckets int) *plot.Plot {
	p := plot.New()
	p.X.Label.Text = "2θ (degrees)"
	p.Y.Label.Text = "intensity (counts)"
	p.Legend.Top = true
	if doc.Pattern == nil || len(doc.Pattern.TwoTheta) == 0 {
		return p
	}
	pt := doc.Pattern
	top, low := math.Inf(-1), math.Inf(1)
	for _, v := range pt.Intensity {
		top, low = math.Max(top, v), math.Min(low, v)
	}
	span := top - math.Min(low, 0)
	// The difference curve sits below the data, its zero at −12 % of the
	// span; the ticks between it and the data.
	diffZero := math.Min(low, 0) - 0.12*span
	tickTop, tickLow := math.Min(low, 0)-0.02*span, math.Min(low, 0)-0.05*span

	add := func(x, y []float64, c color.Color, width vg.Length, dashes []vg.Length, name string) {
		xs, ys := Decimate(x, y, buckets)
		xy := make(plotter.XYs, len(xs))
		for i := range xs {
			xy[i].X, xy[i].Y = xs[i], ys[i]
		}
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
	if len(pt.Profile) == len(pt.TwoTheta) {
		add(pt.TwoTheta, pt.Profile, ColourFitted, vg.Points(1.4), nil, "fitted")
	}
	add(pt.TwoTheta, pt.Intensity, ColourObserved, vg.Points(0.5), nil, "observed")
	if len(pt.Background) == len(pt.TwoTheta) {
		add(pt.TwoTheta, pt.Background, ColourBackground, vg.Points(0.8), []vg.Length{vg.Points(3), vg.Points(2)}, "background")
	}
	if len(pt.Profile) == len(pt.TwoTheta) {
		diff := make([]float64, len(pt.TwoTheta))
		for i := range diff {
			diff[i] = pt.Intensity[i] - pt.Profile[i] + diffZero
		}
		add(pt.TwoTheta, diff, ColourDifference, vg.Points(0.5), nil, "difference")
	}
	if k >= 0 && k < len(doc.Solutions) {
		var segs plotter.XYs
		for _, c := range doc.Solutions[k].Calculated {
			if c.TwoTheta >= doc.Range[0] && c.TwoTheta <= doc.Range[1] {
				segs = append(segs, plotter.XY{X: c.TwoTheta, Y: tickLow}, plotter.XY{X: c.TwoTheta, Y: tickTop})
			}
		}
		if len(segs) > 0 {
			ticks := &tickMarks{xy: segs}
			p.Add(ticks)
			p.Legend.Add("calculated lines", ticks)
		}
	}
	var acc, rej plotter.XYs
	for _, pk := range doc.Peaks {
		y := pk.Background + pk.Height + 0.04*span
		if pk.Rejected {
			rej = append(rej, plotter.XY{X: pk.TwoTheta, Y: y})
		} else if pk.CompanionOf == nil {
			acc = append(acc, plotter.XY{X: pk.TwoTheta, Y: y})
		}
	}
	if len(acc) > 0 {
		s, _ := plotter.NewScatter(acc)
		s.GlyphStyle = draw.GlyphStyle{Color: ColourFitted, Radius: vg.Points(2.2), Shape: draw.TriangleGlyph{}}
		p.Add(s)
		p.Legend.Add("accepted peak", s)
	}
	if len(rej) > 0 {
		s, _ := plotter.NewScatter(rej)
		s.GlyphStyle = draw.GlyphStyle{Color: ColourObserved, Radius: vg.Points(2.2), Shape: draw.CrossGlyph{}}
		p.Add(s)
		p.Legend.Add("rejected peak", s)
	}
	p.X.Min, p.X.Max = doc.Range[0], doc.Range[1]
	p.Y.Min = diffZero - 0.1*span
	// Head room for the legend.
	p.Y.Max = top + 0.45*span
	p.Legend.TextStyle.Font.Size = vg.Points(8)
	p.Legend.ThumbnailWidth = vg.Points(14)
	return p
}

// tickMarks draws vertical segments given as pairs of points.
type tickMarks struct{ xy plotter.XYs }

func (t *tickMarks) Plot(c draw.Canvas, p *plot.Plot) {
	tr, ty := p.Transforms(&c)
	ls := draw.LineStyle{Color: ColourTicks, Width: vg.Points(0.8)}
	for i := 0; i+1 < len(t.xy); i += 2 {
		a, b := t.xy[i], t.xy[i+1]
		c.StrokeLine2(ls, tr(a.X), ty(a.Y), tr(b.X), ty(b.Y))
	}
}

// Thumbnail draws the legend entry.
func (t *tickMarks) Thumbnail(c *draw.Canvas) {
	x := (c.Min.X + c.Max.X) / 2
	c.StrokeLine2(draw.LineStyle{Color: ColourTicks, Width: vg.Points(0.8)}, x, c.Min.Y, x, c.Max.Y)
}
