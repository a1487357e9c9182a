package plot

import (
	"image/color"

	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Spacing of the page furniture, in points.
const (
	pagePad    = 8 // around the whole figure
	blockGap   = 5 // between title, legend, panels and footer
	legendGap  = 14
	sampleLen  = 24 // legend line sample
	sampleText = 4  // between a legend sample and its label
)

// fillTextAt draws one line of txt so that its baseline passes through
// y, aligned horizontally at x by xa (draw.XLeft, XCenter, XRight).
func fillTextAt(c *draw.Canvas, sty text.Style, x, y vg.Length, xa draw.XAlignment, txt string) {
	sty.XAlign = xa
	sty.YAlign = draw.YBottom
	// text.Plain puts the baseline at pt.Y − ascent + size for YBottom.
	asc := sty.FontExtents().Ascent
	c.FillText(sty, vg.Point{X: x, Y: y + asc - sty.Font.Size}, txt)
}

// textBox is the rectangle that one line of txt covers when its baseline
// starts at (x, y): from the descent below to the ascent above.
func textBox(sty text.Style, x, y vg.Length, txt string) vg.Rectangle {
	e := sty.FontExtents()
	return vg.Rectangle{
		Min: vg.Point{X: x, Y: y - e.Descent},
		Max: vg.Point{X: x + sty.Width(txt), Y: y + e.Ascent},
	}
}

// baselineFor returns the baseline that centres capitals and digits of sty
// vertically on mid.
func baselineFor(sty text.Style, mid vg.Length) vg.Length {
	return mid - 0.36*sty.Font.Size
}

// legendEntry is one key of a legend: a line sample, a glyph, or both,
// followed by its label.
type legendEntry struct {
	label string
	line  *draw.LineStyle
	glyph draw.GlyphStyle // Shape nil: none
}

func (e legendEntry) sampleWidth() vg.Length {
	if e.line != nil {
		return vg.Points(sampleLen)
	}
	if e.glyph.Shape != nil {
		return 2*e.glyph.Radius + vg.Points(2)
	}
	return 0
}

func (e legendEntry) width(sty text.Style) vg.Length {
	w := e.sampleWidth()
	if w > 0 {
		w += vg.Points(sampleText)
	}
	return w + sty.Width(e.label)
}

// legendRows breaks entries into centred rows no wider than maxW.
func legendRows(entries []legendEntry, sty text.Style, maxW vg.Length) [][]legendEntry {
	var rows [][]legendEntry
	var row []legendEntry
	var w vg.Length
	for _, e := range entries {
		ew := e.width(sty)
		if len(row) > 0 && w+vg.Points(legendGap)+ew > maxW {
			rows = append(rows, row)
			row, w = nil, 0
		}
		if len(row) > 0 {
			w += vg.Points(legendGap)
		}
		row = append(row, e)
		w += ew
	}
	if len(row) > 0 {
		rows = append(rows, row)
	}
	return rows
}

func legendRowHeight(sty text.Style) vg.Length { return sty.Font.Size * 1.6 }

// drawLegend draws rows centred in [x0, x1], the first row's top at top,
// and returns the height used.
func drawLegend(c *draw.Canvas, rows [][]legendEntry, sty text.Style, x0, x1, top vg.Length) vg.Length {
	rh := legendRowHeight(sty)
	for i, row := range rows {
		var w vg.Length
		for j, e := range row {
			if j > 0 {
				w += vg.Points(legendGap)
			}
			w += e.width(sty)
		}
		x := (x0 + x1 - w) / 2
		mid := top - rh*vg.Length(i) - rh/2
		for _, e := range row {
			sw := e.sampleWidth()
			if e.line != nil {
				c.StrokeLine2(*e.line, x, mid, x+sw, mid)
			}
			if e.glyph.Shape != nil {
				c.DrawGlyphNoClip(e.glyph, vg.Point{X: x + sw/2, Y: mid})
			}
			if sw > 0 {
				x += sw + vg.Points(sampleText)
			}
			fillTextAt(c, sty, x, baselineFor(sty, mid), draw.XLeft, e.label)
			x += sty.Width(e.label) + vg.Points(legendGap)
		}
	}
	return rh * vg.Length(len(rows))
}

// drawFrame lays out the page furniture: the title on top, the legend
// under it, a footnote at the bottom. It returns the canvas left for the
// panels.
func drawFrame(dc draw.Canvas, title string, legend []legendEntry, footer string) draw.Canvas {
	pad := vg.Points(pagePad)
	gap := vg.Points(blockGap)
	x0, x1 := dc.Min.X+pad, dc.Max.X-pad
	top := dc.Max.Y - pad
	if title != "" {
		ts := textStyle(sizeTitle, colText, true)
		e := ts.FontExtents()
		fillTextAt(&dc, ts, (x0+x1)/2, top-e.Ascent, draw.XCenter, title)
		top -= e.Ascent + e.Descent + gap
	}
	if len(legend) > 0 {
		ls := textStyle(sizeLegend, colText, false)
		rows := legendRows(legend, ls, x1-x0)
		top -= drawLegend(&dc, rows, ls, x0, x1, top) + gap/2
	}
	bottom := dc.Min.Y + pad
	if footer != "" {
		fs := textStyle(sizeNote, colSubtle, false)
		e := fs.FontExtents()
		fillTextAt(&dc, fs, x1, bottom+e.Descent, draw.XRight, footer)
		bottom += e.Ascent + e.Descent + gap
	}
	body := dc
	body.Min = vg.Point{X: x0, Y: bottom}
	body.Max = vg.Point{X: x1, Y: top}
	return body
}

// drawHalo lays a translucent page-coloured box under a label so that grid
// and guide lines crossing it do not cut through the letters.
func drawHalo(c *draw.Canvas, r vg.Rectangle) {
	m := vg.Points(1)
	r = vg.Rectangle{Min: vg.Point{X: r.Min.X - m, Y: r.Min.Y}, Max: vg.Point{X: r.Max.X + m, Y: r.Max.Y}}
	c.SetColor(color.NRGBA{R: 0xff, G: 0xff, B: 0xff, A: 0xe0})
	c.Fill(r.Path())
}
