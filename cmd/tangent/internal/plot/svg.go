package plot

import (
	"bytes"
	"fmt"
	"io"

	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgsvg"
)

// A4-ish report column: defaults sized to sit in an HTML page at 100 %.
const (
	defaultBodeWidth  = 16 * vg.Centimeter
	defaultBodeHeight = 12 * vg.Centimeter
	defaultPZWidth    = 12 * vg.Centimeter
	defaultPZHeight   = 10 * vg.Centimeter

	// minSide is the smallest accepted figure side; below it the text no
	// longer fits.
	minSide = 4 * vg.Centimeter
)

// fontFamily is how the SVG writer names the face; fontFallback adds faces
// with the same metrics for viewers without Liberation Sans.
var (
	fontFamily   = []byte("font-family:Liberation Sans;")
	fontFallback = []byte("font-family:'Liberation Sans',Arial,Helvetica,sans-serif;")
)

// renderSVG draws a w×h figure with paint and writes it to out as one SVG
// document. Nothing is written if paint fails. A panic inside the drawing
// library becomes an error: bad input must never crash the caller.
func renderSVG(out io.Writer, w, h vg.Length, embed bool, paint func(dc draw.Canvas) error) (err error) {
	if w < minSide || h < minSide {
		return fmt.Errorf("plot: figure size %.3g cm × %.3g cm is too small (each side at least %.3g cm)",
			w/vg.Centimeter, h/vg.Centimeter, minSide/vg.Centimeter)
	}
	defer func() {
		if r := recover(); r != nil {
			err = fmt.Errorf("plot: drawing failed: %v", r)
		}
	}()
	c := vgsvg.NewWith(vgsvg.UseWH(w, h), vgsvg.EmbedFonts(embed))
	dc := draw.New(c)
	dc.SetColor(colPage)
	dc.Fill(dc.Rectangle.Path())
	if err := paint(dc); err != nil {
		return err
	}
	var buf bytes.Buffer
	if _, err := c.WriteTo(&buf); err != nil {
		return fmt.Errorf("plot: writing SVG: %w", err)
	}
	svg := buf.Bytes()
	if !embed {
		svg = bytes.ReplaceAll(svg, fontFamily, fontFallback)
	}
	if _, err := out.Write(svg); err != nil {
		return fmt.Errorf("plot: writing SVG: %w", err)
	}
	return nil
}
