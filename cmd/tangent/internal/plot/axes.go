package plot

import (
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// newPanel returns a plot with the house axes: no axis lines of their own
// (a framePlotter outlines the data area), short outward ticks flush with
// the frame, sans-serif labels.
func newPanel() *plot.Plot {
	p := plot.New()
	p.BackgroundColor = nil // the page is already white
	for _, a := range []*plot.Axis{&p.X, &p.Y} {
		a.LineStyle = draw.LineStyle{Color: colFrame, Width: 0} // the frame plotter draws it
		a.Padding = 0
		a.Tick.LineStyle = draw.LineStyle{Color: colFrame, Width: vg.Points(0.7)}
		a.Tick.Length = vg.Points(4)
		a.Label.Padding = vg.Points(4)
		a.Label.TextStyle = textStyle(sizeLabel, colText, false)
		a.Label.TextStyle.XAlign = draw.XCenter
		a.Tick.Label = textStyle(sizeTick, colText, false)
	}
	p.X.Label.TextStyle.YAlign = draw.YBottom
	p.X.Tick.Label.XAlign, p.X.Tick.Label.YAlign = draw.XCenter, draw.YTop
	p.Y.Label.TextStyle.YAlign = draw.YBottom
	p.Y.Tick.Label.XAlign, p.Y.Tick.Label.YAlign = draw.XRight, draw.YCenter
	return p
}

// gridPlotter draws grid lines at the given data values, minor ones first
// and fainter, plus the frame around the data area last of all (add it
// first and a frame plotter last).
type gridPlotter struct {
	xMajor, xMinor, yMajor, yMinor []float64
}

func (g gridPlotter) Plot(c draw.Canvas, p *plot.Plot) {
	tx, ty := p.Transforms(&c)
	minor := draw.LineStyle{Color: colGridMinor, Width: vg.Points(0.5)}
	major := draw.LineStyle{Color: colGridMajor, Width: vg.Points(0.6)}
	vert := func(sty draw.LineStyle, vs []float64) {
		for _, v := range vs {
			if x := tx(v); c.ContainsX(x) {
				c.StrokeLine2(sty, x, c.Min.Y, x, c.Max.Y)
			}
		}
	}
	horiz := func(sty draw.LineStyle, vs []float64) {
		for _, v := range vs {
			if y := ty(v); c.ContainsY(y) {
				c.StrokeLine2(sty, c.Min.X, y, c.Max.X, y)
			}
		}
	}
	vert(minor, g.xMinor)
	horiz(minor, g.yMinor)
	vert(major, g.xMajor)
	horiz(major, g.yMajor)
}

// framePlotter outlines the data area.
type framePlotter struct{}

func (framePlotter) Plot(c draw.Canvas, _ *plot.Plot) {
	sty := draw.LineStyle{Color: colFrame, Width: vg.Points(0.7)}
	c.StrokeLines(sty, []vg.Point{
		c.Min, {X: c.Max.X, Y: c.Min.Y}, c.Max, {X: c.Min.X, Y: c.Max.Y}, c.Min,
	})
}

// plotterFunc adapts a function to plot.Plotter.
type plotterFunc func(c draw.Canvas, p *plot.Plot)

func (f plotterFunc) Plot(c draw.Canvas, p *plot.Plot) { f(c, p) }

// maxLabelsAlong is how many labels of width w fit along length l with
// room between them.
func maxLabelsAlong(l, w vg.Length) int {
	n := int(math.Floor(float64(l / w)))
	if n < 2 {
		n = 2
	}
	return n
}
