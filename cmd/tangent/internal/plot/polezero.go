package plot

import (
	"fmt"
	"io"
	"math"
	"math/cmplx"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// PoleZeroOptions adjust a pole-zero map. The zero value gives the
// defaults.
type PoleZeroOptions struct {
	// Width and Height of the figure; default 12 cm × 10 cm.
	Width, Height vg.Length
	// X0 is the symlog scale in rad/s (see PoleZero); 0 chooses it from
	// the roots.
	X0 float64
	// NoFrequencyLabels leaves out the |s|/2π label beside each root.
	NoFrequencyLabels bool
	// EmbedFonts: see BodeOptions.
	EmbedFonts bool
}

// PoleZero writes a pole-zero map of the s-plane (rad/s) to w as one SVG
// document: poles as ×, zeros as ○, the real axis σ and the jω axis drawn
// through the origin, right-half-plane roots to the right of the jω axis.
// Coincident roots are drawn once with their multiplicity, "(2)". Each
// root with a nonzero part is labelled with its natural frequency |s|/2π
// in Hz (for a conjugate pair, the upper member only) where the label
// finds room.
//
// Roots decades apart share the map through a signed logarithmic scale on
// both axes,
//
//	u = sign(x)·log10(1 + |x|/x0),
//
// linear within about ±x0 of the axes and one unit per decade far from
// them. x0 defaults to the power of ten at least one decade below the
// smallest nonzero real or imaginary part of any root, so that part lies
// one to two decades out from the axis; tick labels give rad/s with SI
// prefixes (−1 G, −1 M, −1 k, 0, 1 k ...). Parts smaller than 10⁻⁶·|s|
// are drawn as zero: they are residue of root finding (a true one would
// mean a quality factor above 5·10⁵).
func PoleZero(w io.Writer, title string, poles, zeros []complex128, opt PoleZeroOptions) error {
	_, err := renderPoleZero(w, title, poles, zeros, opt)
	return err
}

// rootGroup is a set of coincident roots of one kind drawn as one symbol.
type rootGroup struct {
	s    complex128 // cleaned
	n    int
	pole bool
}

// groupRoots merges coincident roots (within residueRel·|s|), keeping the
// order of first appearance.
func groupRoots(roots []complex128, pole bool) []rootGroup {
	var gs []rootGroup
next:
	for _, r := range roots {
		r = cleanRoot(r)
		for i := range gs {
			d := cmplx.Abs(r - gs[i].s)
			if d <= residueRel*math.Max(cmplx.Abs(r), cmplx.Abs(gs[i].s)) {
				gs[i].n++
				continue next
			}
		}
		gs = append(gs, rootGroup{s: r, n: 1, pole: pole})
	}
	return gs
}

// pzInfo reports where things landed, for tests.
type pzInfo struct {
	x0     float64
	area   vg.Rectangle
	origin vg.Point   // where the axes cross
	glyphs []vg.Point // canvas position of each group: poles' groups, then zeros'
	groups []rootGroup
	labels []string // frequency labels drawn
}

func renderPoleZero(w io.Writer, title string, poles, zeros []complex128, opt PoleZeroOptions) (pzInfo, error) {
	var info pzInfo
	for _, set := range []struct {
		name  string
		roots []complex128
	}{{"pole", poles}, {"zero", zeros}} {
		for i, r := range set.roots {
			if !finite(real(r)) || !finite(imag(r)) {
				return info, fmt.Errorf("plot: %s %d is %v; expected a finite complex number in rad/s", set.name, i, r)
			}
		}
	}
	if opt.X0 != 0 && !(finite(opt.X0) && opt.X0 > 0) {
		return info, fmt.Errorf("plot: symlog scale x0 = %g rad/s; expected a finite value above 0", opt.X0)
	}
	if opt.Width == 0 {
		opt.Width = defaultPZWidth
	}
	if opt.Height == 0 {
		opt.Height = defaultPZHeight
	}
	groups := append(groupRoots(poles, true), groupRoots(zeros, false)...)
	info.groups = groups
	x0 := opt.X0
	if x0 == 0 {
		var all []complex128
		for _, g := range groups {
			all = append(all, g.s)
		}
		x0 = autoX0(all)
	}
	info.x0 = x0
	sl := symlog{x0: x0}

	// Ranges in u: both half planes always show (to |u| ≥ 1.3, just past
	// the ±10·x0 ticks), with a margin around the outermost roots.
	uxLo, uxHi, uyMax := 0.0, 0.0, 0.0
	for _, g := range groups {
		ux, uy := sl.forward(real(g.s)), sl.forward(imag(g.s))
		uxLo, uxHi = math.Min(uxLo, ux), math.Max(uxHi, ux)
		uyMax = math.Max(uyMax, math.Abs(uy))
	}
	pad := math.Max(0.6, 0.06*(uxHi-uxLo))
	uxLo, uxHi = math.Min(uxLo-pad, -1.3), math.Max(uxHi+pad, 1.3)
	uyMax = math.Max(uyMax+pad, 1.3)

	poleGlyph := draw.GlyphStyle{Color: colPole, Radius: vg.Points(4.2),
		Shape: glyph{kind: glyphCross, stroke: vg.Points(1.6)}}
	zeroGlyph := draw.GlyphStyle{Color: colZero, Radius: vg.Points(3.8),
		Shape: glyph{kind: glyphRing, stroke: vg.Points(1.5), fill: colPage}}
	legend := []legendEntry{
		{label: fmt.Sprintf("pole (%d)", len(poles)), glyph: poleGlyph},
		{label: fmt.Sprintf("zero (%d)", len(zeros)), glyph: zeroGlyph},
	}
	labelled := false
	for _, g := range groups {
		labelled = labelled || g.s != 0
	}
	if !opt.NoFrequencyLabels && labelled {
		legend = append(legend, legendEntry{label: "labels: |s|/2π"})
	}
	footer := "signed log axes: u = sign(x)·log10(1 + |x|/x0), x0 = " + formatEng(x0, 3, "rad/s")

	err := renderSVG(w, opt.Width, opt.Height, opt.EmbedFonts, func(dc draw.Canvas) error {
		body := drawFrame(dc, title, legend, footer)
		tick := textStyle(sizeTick, colText, false)
		dataW := body.Max.X - body.Min.X - vg.Points(55)
		dataH := body.Max.Y - body.Min.Y - vg.Points(35)
		xT := symlogTicks(sl, uxLo, uxHi, maxLabelsAlong(dataW, tick.Width(minus+"100 k")+vg.Points(10)))
		yT := symlogTicks(sl, -uyMax, uyMax, maxLabelsAlong(dataH, vg.Points(18)))
		// Near the origin the decades crowd together: thin the labels there.
		xT = thinLabels(xT, float64(tick.Width(minus+"100 k")+vg.Points(4))*(uxHi-uxLo)/float64(dataW))
		yT = thinLabels(yT, float64(tick.Height("0")+vg.Points(4))*2*uyMax/float64(dataH))

		p := newPanel()
		p.X.Min, p.X.Max = uxLo, uxHi
		p.Y.Min, p.Y.Max = -uyMax, uyMax
		p.X.Tick.Marker = plot.ConstantTicks(xT.marks)
		p.Y.Tick.Marker = plot.ConstantTicks(yT.marks)
		p.X.Label.Text = "Re s = σ (rad/s)"
		p.Y.Label.Text = "Im s = ω (rad/s)"
		p.Add(gridPlotter{xMajor: xT.gridMajor, xMinor: xT.gridMinor, yMajor: yT.gridMajor, yMinor: yT.gridMinor})
		p.Add(plotterFunc(func(c draw.Canvas, p *plot.Plot) {
			tx, ty := p.Transforms(&c)
			info.area = c.Rectangle
			axis := draw.LineStyle{Color: colAxisZero, Width: vg.Points(0.9)}
			ox, oy := tx(0), ty(0)
			info.origin = vg.Point{X: ox, Y: oy}
			c.StrokeLine2(axis, c.Min.X, oy, c.Max.X, oy) // real axis
			c.StrokeLine2(axis, ox, c.Min.Y, ox, c.Max.Y) // jω axis
			// Name the jω axis at its top, and the half planes.
			ns := textStyle(sizeNote, colSubtle, false)
			fillTextAt(&c, ns, ox+vg.Points(3), c.Max.Y-vg.Points(10), draw.XLeft, "jω")

			// Labels keep off the real axis, where most roots sit; they may
			// cross the jω axis on their halo.
			pl := placer{area: c.Rectangle}
			pl.block(vg.Rectangle{Min: vg.Point{X: c.Min.X, Y: oy - 1}, Max: vg.Point{X: c.Max.X, Y: oy + 1}})
			pl.block(textBox(ns, ox+vg.Points(3), c.Max.Y-vg.Points(10), "jω"))
			pts := make([]vg.Point, len(groups))
			for i, g := range groups {
				pts[i] = vg.Point{X: tx(sl.forward(real(g.s))), Y: ty(sl.forward(imag(g.s)))}
				pl.blockPoint(pts[i], vg.Points(5))
			}
			info.glyphs = pts
			// Zeros under poles, so a pole on a zero shows both.
			for i := len(groups) - 1; i >= 0; i-- {
				gs := zeroGlyph
				if groups[i].pole {
					gs = poleGlyph
				}
				c.DrawGlyph(gs, pts[i])
			}
			ms := textStyle(sizeNote, colText, true)
			for i, g := range groups {
				if g.n < 2 {
					continue
				}
				txt := fmt.Sprintf("(%d)", g.n)
				ms.Color = colZero
				if g.pole {
					ms.Color = colPole
				}
				x, y := pts[i].X+vg.Points(5), pts[i].Y+vg.Points(4)
				fillTextAt(&c, ms, x, y, draw.XLeft, txt)
				pl.block(textBox(ms, x, y, txt))
			}
			if opt.NoFrequencyLabels {
				return
			}
			ls := textStyle(sizeNote, colText, false)
			for i, g := range groups {
				if g.s == 0 || imag(g.s) < 0 {
					continue
				}
				txt := formatEng(cmplx.Abs(g.s)/(2*math.Pi), 3, "Hz")
				ls.Color = colZero
				if g.pole {
					ls.Color = colPole
				}
				if r, ok := pl.place(ownedBy(rootLabelCandidates(ls, txt, pts[i]), i, pts)); ok {
					drawHalo(&c, r)
					fillTextAt(&c, ls, r.Min.X, r.Min.Y+ls.FontExtents().Descent, draw.XLeft, txt)
					info.labels = append(info.labels, txt)
				}
			}
		}))
		p.Add(framePlotter{})
		p.Draw(body)
		return nil
	})
	return info, err
}

// rootLabelCandidates lists places for a root's label right around its
// symbol at pt: above, below, right, left, then the corners. Nothing
// further out: a label away from its root could be read as another's.
func rootLabelCandidates(sty text.Style, txt string, pt vg.Point) []vg.Rectangle {
	w := sty.Width(txt)
	e := sty.FontExtents()
	h := e.Ascent + e.Descent
	g := vg.Points(6)
	var out []vg.Rectangle
	at := func(x, y vg.Length) {
		out = append(out, vg.Rectangle{Min: vg.Point{X: x, Y: y}, Max: vg.Point{X: x + w, Y: y + h}})
	}
	at(pt.X-w/2, pt.Y+g)   // above
	at(pt.X-w/2, pt.Y-g-h) // below
	at(pt.X+g, pt.Y-h/2)   // right
	at(pt.X-g-w, pt.Y-h/2) // left
	at(pt.X+g, pt.Y+g)     // above right
	at(pt.X-g-w, pt.Y+g)   // above left
	at(pt.X+g, pt.Y-g-h)   // below right
	at(pt.X-g-w, pt.Y-g-h) // below left
	return out
}

// ownedBy keeps the candidate label places whose centre is nearer to
// symbol i than to any other symbol, so a label is not read as another
// root's.
func ownedBy(cands []vg.Rectangle, i int, pts []vg.Point) []vg.Rectangle {
	var out []vg.Rectangle
	for _, r := range cands {
		c := vg.Point{X: (r.Min.X + r.Max.X) / 2, Y: (r.Min.Y + r.Max.Y) / 2}
		d := func(p vg.Point) float64 { return math.Hypot(float64(c.X-p.X), float64(c.Y-p.Y)) }
		own := d(pts[i])
		ok := true
		for j, p := range pts {
			if j != i && p != pts[i] && d(p) < own {
				ok = false
				break
			}
		}
		if ok {
			out = append(out, r)
		}
	}
	return out
}
