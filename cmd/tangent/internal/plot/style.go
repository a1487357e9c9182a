package plot

import (
	"image/color"
	"math"

	xfnt "golang.org/x/image/font"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// The house look. These are read-only after package initialisation.
var (
	colPage      = color.RGBA{R: 0xff, G: 0xff, B: 0xff, A: 0xff}
	colText      = color.RGBA{R: 0x22, G: 0x28, B: 0x31, A: 0xff}
	colSubtle    = color.RGBA{R: 0x5c, G: 0x65, B: 0x70, A: 0xff}
	colFrame     = color.RGBA{R: 0x8c, G: 0x95, B: 0xa0, A: 0xff}
	colGridMajor = color.RGBA{R: 0xd6, G: 0xdb, B: 0xe1, A: 0xff}
	colGridMinor = color.RGBA{R: 0xec, G: 0xef, B: 0xf2, A: 0xff}
	colAxisZero  = color.RGBA{R: 0x3d, G: 0x45, B: 0x4f, A: 0xff}
	colPole      = color.RGBA{R: 0xb0, G: 0x3a, B: 0x2e, A: 0xff}
	colZero      = color.RGBA{R: 0x1f, G: 0x5a, B: 0x96, A: 0xff}

	// palette: muted, well apart in hue and in lightness.
	palette = [...]color.RGBA{
		{R: 0x1f, G: 0x5a, B: 0x96, A: 0xff}, // deep blue
		{R: 0xc0, G: 0x50, B: 0x2e, A: 0xff}, // brick
		{R: 0x2e, G: 0x8b, B: 0x6a, A: 0xff}, // pine green
		{R: 0x7b, G: 0x5a, B: 0xa6, A: 0xff}, // violet
		{R: 0xa8, G: 0x7a, B: 0x0c, A: 0xff}, // ochre
		{R: 0x4a, G: 0x4f, B: 0x57, A: 0xff}, // graphite
	}

	// dashes pairs with palette: solid, dashed, dotted, dash-dot, long dash,
	// dash-dot-dot (lengths in points).
	dashes = [...][]float64{
		nil,
		{5, 2.5},
		{1.3, 1.9},
		{6, 2, 1.3, 2},
		{10, 3},
		{5, 1.8, 1.3, 1.8, 1.3, 1.8},
	}

	// curveGlyphs pairs with palette.
	curveGlyphs = [...]glyphKind{glyphRing, glyphSquare, glyphTriangle, glyphDiamond, glyphPlus, glyphCross}
)

// Font sizes in points.
const (
	sizeTitle  = 11
	sizeLabel  = 9
	sizeTick   = 8
	sizeLegend = 8.5
	sizeNote   = 7.5
)

const curveWidth = 1.4 // points

// seriesStyle is how curve number i of n is drawn.
type seriesStyle struct {
	line  draw.LineStyle
	glyph draw.GlyphStyle // Shape nil: no glyphs (a single curve)
}

func seriesStyleFor(i, n int) seriesStyle {
	c := palette[i%len(palette)]
	s := seriesStyle{line: draw.LineStyle{Color: c, Width: vg.Points(curveWidth)}}
	if n == 1 {
		return s
	}
	// Past six curves the three cycles drift apart so no two curves of a
	// dozen share all three attributes.
	d := dashes[(i+i/len(palette))%len(dashes)]
	for _, v := range d {
		s.line.Dashes = append(s.line.Dashes, vg.Points(v))
	}
	s.glyph = draw.GlyphStyle{
		Color:  c,
		Radius: vg.Points(3),
		Shape:  glyph{kind: curveGlyphs[(i+2*(i/len(palette)))%len(curveGlyphs)], stroke: vg.Points(1), fill: colPage},
	}
	return s
}

func sansFont(size float64, bold bool) font.Font {
	f := font.Font{Typeface: "Liberation", Variant: "Sans"}
	if bold {
		f.Weight = xfnt.WeightBold
	}
	return font.From(f, font.Length(size))
}

// textStyle is the house text in the given size and colour, anchored by
// its left baseline-ish bottom unless the caller changes the alignment.
func textStyle(size float64, c color.Color, bold bool) text.Style {
	return text.Style{
		Color:   c,
		Font:    sansFont(size, bold),
		XAlign:  draw.XLeft,
		YAlign:  draw.YBottom,
		Handler: text.Plain{Fonts: font.DefaultCache},
	}
}

type glyphKind int

const (
	glyphRing glyphKind = iota
	glyphSquare
	glyphTriangle
	glyphDiamond
	glyphPlus
	glyphCross
	glyphDot
)

// glyph draws the point symbols with a chosen stroke width (gonum's own
// glyphs use a fixed hairline). Closed shapes are filled with fill first,
// so a symbol stays readable where it sits on its own curve.
type glyph struct {
	kind   glyphKind
	stroke vg.Length
	fill   color.Color
}

var _ draw.GlyphDrawer = glyph{}

// DrawGlyph implements draw.GlyphDrawer.
func (g glyph) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	r := sty.Radius
	var p vg.Path
	open := false
	switch g.kind {
	case glyphRing, glyphDot:
		p.Move(vg.Point{X: pt.X + r, Y: pt.Y})
		p.Arc(pt, r, 0, 2*math.Pi)
		p.Close()
	case glyphSquare:
		a := r * 0.85
		p.Move(vg.Point{X: pt.X - a, Y: pt.Y - a})
		p.Line(vg.Point{X: pt.X + a, Y: pt.Y - a})
		p.Line(vg.Point{X: pt.X + a, Y: pt.Y + a})
		p.Line(vg.Point{X: pt.X - a, Y: pt.Y + a})
		p.Close()
	case glyphTriangle:
		a := r * 1.15
		p.Move(vg.Point{X: pt.X, Y: pt.Y + a})
		p.Line(vg.Point{X: pt.X - a*0.866, Y: pt.Y - a*0.5})
		p.Line(vg.Point{X: pt.X + a*0.866, Y: pt.Y - a*0.5})
		p.Close()
	case glyphDiamond:
		a := r * 1.15
		p.Move(vg.Point{X: pt.X, Y: pt.Y + a})
		p.Line(vg.Point{X: pt.X + a, Y: pt.Y})
		p.Line(vg.Point{X: pt.X, Y: pt.Y - a})
		p.Line(vg.Point{X: pt.X - a, Y: pt.Y})
		p.Close()
	case glyphPlus:
		open = true
		p.Move(vg.Point{X: pt.X, Y: pt.Y - r})
		p.Line(vg.Point{X: pt.X, Y: pt.Y + r})
		p.Move(vg.Point{X: pt.X - r, Y: pt.Y})
		p.Line(vg.Point{X: pt.X + r, Y: pt.Y})
	case glyphCross:
		open = true
		a := r * 0.8
		p.Move(vg.Point{X: pt.X - a, Y: pt.Y - a})
		p.Line(vg.Point{X: pt.X + a, Y: pt.Y + a})
		p.Move(vg.Point{X: pt.X - a, Y: pt.Y + a})
		p.Line(vg.Point{X: pt.X + a, Y: pt.Y - a})
	}
	if g.kind == glyphDot {
		c.SetColor(sty.Color)
		c.Fill(p)
		if g.fill != nil { // a thin outline in fill colour lifts the dot off a line
			c.SetLineStyle(draw.LineStyle{Color: g.fill, Width: g.stroke})
			c.Stroke(p)
		}
		return
	}
	if !open && g.fill != nil {
		c.SetColor(g.fill)
		c.Fill(p)
	}
	c.SetLineStyle(draw.LineStyle{Color: sty.Color, Width: g.stroke})
	c.Stroke(p)
}
