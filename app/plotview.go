package main

import (
	"fmt"
	"image"
	"math"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/canvas"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/driver/desktop"
	"fyne.io/fyne/v2/widget"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"

	"reticle/cell"
	"reticle/figure"
	"reticle/report"
)

// plotView draws the pattern with gonum/plot and turns mouse actions into
// edits: a click on a marker toggles the peak, a click elsewhere adds one,
// the wheel zooms about the cursor, a drag pans, a right-button drag (or a
// drag with Shift) zooms to a box.
type plotView struct {
	widget.BaseWidget
	u     *ui
	image *canvas.Image
	box   *canvas.Rectangle
	opt   figure.Options

	// Geometry of the last render, logical pixels and data units.
	dataMin, dataMax fyne.Position
	xMin, xMax       float64
	yMin, yMax       float64
	span             float64

	dragFrom  fyne.Position
	dragging  bool
	boxZoom   bool
	secondary bool
	shift     bool
}

var (
	_ fyne.Tappable       = (*plotView)(nil)
	_ fyne.Scrollable     = (*plotView)(nil)
	_ fyne.Draggable      = (*plotView)(nil)
	_ desktop.Hoverable   = (*plotView)(nil)
	_ desktop.Mouseable   = (*plotView)(nil)
	_ fyne.Widget         = (*plotView)(nil)
	_ fyne.WidgetRenderer = (*plotRenderer)(nil)
)

func newPlotView(u *ui) *plotView {
	v := &plotView{u: u, image: canvas.NewImageFromImage(image.NewRGBA(image.Rect(0, 0, 1, 1)))}
	v.image.ScaleMode = canvas.ImageScaleFastest
	v.image.FillMode = canvas.ImageFillStretch
	v.box = canvas.NewRectangle(boxColour)
	v.box.Hide()
	v.ExtendBaseWidget(v)
	return v
}

type plotRenderer struct {
	v       *plotView
	objects []fyne.CanvasObject
	stack   *fyne.Container
}

func (v *plotView) CreateRenderer() fyne.WidgetRenderer {
	st := container.NewWithoutLayout(v.image, v.box)
	return &plotRenderer{v: v, objects: []fyne.CanvasObject{st}, stack: st}
}

func (r *plotRenderer) Layout(s fyne.Size) {
	r.stack.Resize(s)
	r.v.image.Resize(s)
	r.v.image.Move(fyne.NewPos(0, 0))
	r.v.render()
}
func (r *plotRenderer) MinSize() fyne.Size           { return fyne.NewSize(320, 220) }
func (r *plotRenderer) Refresh()                     { r.v.render() }
func (r *plotRenderer) Objects() []fyne.CanvasObject { return r.objects }
func (r *plotRenderer) Destroy()                     {}

// scale is the canvas's pixel scale.
func (v *plotView) scale() float32 {
	if c := fyne.CurrentApp().Driver().CanvasForObject(v); c != nil {
		return c.Scale()
	}
	return 1
}

// render draws the current document into the image at the widget's size.
func (v *plotView) render() {
	size := v.Size()
	if size.Width < 10 || size.Height < 10 {
		return
	}
	a := v.u.m.A
	if a == nil {
		return
	}
	sc := float64(v.scale())
	wpx, hpx := int(float64(size.Width)*sc), int(float64(size.Height)*sc)
	opt := v.opt
	opt.Buckets = max(200, wpx/3)
	opt.Dark = v.u.dark
	p := figure.Pattern(a, opt)
	dpi := 96 * sc
	c := vgimg.NewWith(vgimg.UseWH(vg.Length(float64(wpx)/dpi)*vg.Inch, vg.Length(float64(hpx)/dpi)*vg.Inch), vgimg.UseDPI(int(math.Round(dpi))))
	dc := draw.New(c)
	p.Draw(dc)
	da := p.DataCanvas(dc)
	// vg points (origin bottom left) to logical pixels (origin top left).
	toPx := func(l vg.Length) float32 { return float32(float64(l) / 72 * 96) }
	v.dataMin = fyne.NewPos(toPx(da.Min.X), size.Height-toPx(da.Max.Y))
	v.dataMax = fyne.NewPos(toPx(da.Max.X), size.Height-toPx(da.Min.Y))
	v.xMin, v.xMax, v.yMin, v.yMax = p.X.Min, p.X.Max, p.Y.Min, p.Y.Max
	v.span = (p.Y.Max - p.Y.Min) / 1.67
	v.image.Image = c.Image()
	canvas.Refresh(v.image)
}

// dataX converts a horizontal pixel position to 2θ (NaN outside the data
// area).
func (v *plotView) dataX(px float32) float64 {
	if px < v.dataMin.X || px > v.dataMax.X || v.dataMax.X <= v.dataMin.X {
		return math.NaN()
	}
	f := float64(px-v.dataMin.X) / float64(v.dataMax.X-v.dataMin.X)
	return v.opt.TwoTheta(v.xMin+f*(v.xMax-v.xMin), v.u.m.A.Radiation.Lambda1)
}

// pixel converts data coordinates to logical pixels.
func (v *plotView) pixel(x, y float64) fyne.Position {
	fx := (x - v.xMin) / (v.xMax - v.xMin)
	fy := (y - v.yMin) / (v.yMax - v.yMin)
	return fyne.NewPos(v.dataMin.X+float32(fx)*(v.dataMax.X-v.dataMin.X), v.dataMax.Y-float32(fy)*(v.dataMax.Y-v.dataMin.Y))
}

// markerAt returns the peak whose marker lies within 9 pixels of pos.
func (v *plotView) markerAt(pos fyne.Position) (int, bool) {
	a := v.u.m.A
	if a == nil {
		return 0, false
	}
	best, bd := -1, float32(9*9)
	for i, pk := range a.Peaks {
		if pk.Companion() && !pk.Rejected {
			continue
		}
		q := v.pixel(v.opt.X(pk.TwoTheta, a.Radiation.Lambda1), figure.MarkerY(pk, v.opt.Scale, v.span))
		dx, dy := q.X-pos.X, q.Y-pos.Y
		if d := dx*dx + dy*dy; d < bd {
			best, bd = i, d
		}
	}
	return best, best >= 0
}

// Tapped toggles the peak under the pointer, or adds one there.
func (v *plotView) Tapped(ev *fyne.PointEvent) {
	if v.u.m.A == nil {
		return
	}
	if i, ok := v.markerAt(ev.Position); ok {
		v.u.togglePeak(i)
		return
	}
	if tt := v.dataX(ev.Position.X); !math.IsNaN(tt) {
		v.u.addPeak(tt)
	}
}

// Scrolled zooms about the pointer: in when scrolling up.
func (v *plotView) Scrolled(ev *fyne.ScrollEvent) {
	if v.u.m.A == nil {
		return
	}
	at := v.dataX(ev.Position.X)
	if math.IsNaN(at) {
		return
	}
	lo, hi := v.viewRange()
	f := 0.8
	if ev.Scrolled.DY < 0 {
		f = 1 / 0.8
	}
	v.setRange(at-(at-lo)*f, at+(hi-at)*f)
}

func (v *plotView) viewRange() (float64, float64) {
	if v.opt.XMax > v.opt.XMin {
		return v.opt.XMin, v.opt.XMax
	}
	return v.u.m.Scan().Range()
}

// setRange shows 2θ from lo to hi, clipped to the scan, at least 0.2° wide.
func (v *plotView) setRange(lo, hi float64) {
	first, last := v.u.m.Scan().Range()
	if hi-lo < 0.2 {
		c := (lo + hi) / 2
		lo, hi = c-0.1, c+0.1
	}
	lo, hi = math.Max(lo, first), math.Min(hi, last)
	if lo <= first && hi >= last {
		lo, hi = 0, 0
	}
	v.opt.XMin, v.opt.XMax = lo, hi
	v.render()
}

// resetZoom shows the whole scan.
func (v *plotView) resetZoom() {
	v.opt.XMin, v.opt.XMax = 0, 0
	v.render()
}

func (v *plotView) MouseDown(ev *desktop.MouseEvent) {
	v.secondary = ev.Button == desktop.MouseButtonSecondary
	v.shift = ev.Modifier&fyne.KeyModifierShift != 0
}
func (v *plotView) MouseUp(*desktop.MouseEvent) {}

// Dragged pans, or draws the zoom box.
func (v *plotView) Dragged(ev *fyne.DragEvent) {
	if v.u.m.A == nil {
		return
	}
	if !v.dragging {
		v.dragging = true
		v.dragFrom = ev.Position.Subtract(ev.Dragged)
		v.boxZoom = v.secondary || v.shift
	}
	if v.boxZoom {
		x0, x1 := v.dragFrom.X, ev.Position.X
		if x1 < x0 {
			x0, x1 = x1, x0
		}
		v.box.Move(fyne.NewPos(x0, v.dataMin.Y))
		v.box.Resize(fyne.NewSize(x1-x0, v.dataMax.Y-v.dataMin.Y))
		v.box.Show()
		v.box.Refresh()
		return
	}
	lo, hi := v.viewRange()
	w := float64(v.dataMax.X - v.dataMin.X)
	if w <= 0 || v.opt.DAxis {
		return
	}
	shift := -float64(ev.Dragged.DX) / w * (hi - lo)
	first, last := v.u.m.Scan().Range()
	if lo+shift < first {
		shift = first - lo
	}
	if hi+shift > last {
		shift = last - hi
	}
	v.opt.XMin, v.opt.XMax = lo+shift, hi+shift
	v.render()
}

// DragEnd ends a pan or zooms to the box.
func (v *plotView) DragEnd() {
	if v.boxZoom && v.box.Visible() {
		a := v.dataX(v.box.Position().X)
		b := v.dataX(v.box.Position().X + v.box.Size().Width)
		v.box.Hide()
		if !math.IsNaN(a) && !math.IsNaN(b) {
			if a > b {
				a, b = b, a
			}
			v.setRange(a, b)
		}
	}
	v.dragging, v.boxZoom = false, false
}

func (v *plotView) MouseIn(*desktop.MouseEvent) {}
func (v *plotView) MouseOut()                   { v.u.setHover("") }

// MouseMoved shows the position, and the hkl of a calculated line near it.
func (v *plotView) MouseMoved(ev *desktop.MouseEvent) {
	a := v.u.m.A
	if a == nil {
		return
	}
	tt := v.dataX(ev.Position.X)
	if math.IsNaN(tt) {
		v.u.setHover("")
		return
	}
	lam := a.Radiation.Lambda1
	text := fmt.Sprintf("2θ %.4f°   d %.5f Å", tt, cell.DSpacing(tt, lam))
	if s := v.u.m.Solution(); s != nil {
		// The calculated line within 4 pixels.
		perPx := (v.xMax - v.xMin) / float64(v.dataMax.X-v.dataMin.X)
		var names []string
		for _, c := range s.Calculated {
			ctt := s.Position(c.HKL[0], lam)
			if math.Abs(v.opt.X(ctt, lam)-v.opt.X(tt, lam)) <= 4*perPx {
				names = append(names, report.HKLText(c.HKL)+fmt.Sprintf(" at %.4f°", ctt))
			}
		}
		if len(names) > 0 {
			text += "   hkl " + strings.Join(names, "; ")
		}
	}
	if i, ok := v.markerAt(ev.Position); ok {
		pk := a.Peaks[i]
		state := "accepted: click to reject"
		if pk.Rejected {
			state = "rejected: click to accept"
		}
		text += fmt.Sprintf("   peak %d (%s)", i+1, state)
	}
	v.u.setHover(text)
}
