package plot

import (
	"fmt"
	"io"
	"math"
	"sort"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Curve is one frequency response H(j2πf), sampled at F.
type Curve struct {
	Label string       // legend text; may be empty for a single curve
	F     []float64    // frequencies in Hz, positive, strictly increasing
	H     []complex128 // H(j2πf) at each F; zero samples leave a gap
}

// Marker marks a frequency on one curve of a Bode plot, typically a −3 dB
// point: a dot on the magnitude and phase curves, a thin vertical guide
// line through both panels and, on the magnitude panel, the text
// Label + " " + F with an SI prefix, e.g. "−3 dB 12.4 kHz".
type Marker struct {
	F     float64 // Hz, within the curve's sweep
	Label string  // e.g. "−3 dB"; the frequency is appended
	Curve int     // index into the curves passed to Bode
}

// BodeOptions adjust a Bode plot. The zero value gives the defaults.
type BodeOptions struct {
	// Width and Height of the figure; default 16 cm × 12 cm.
	Width, Height vg.Length
	// MagnitudeLabel is the magnitude axis title, default "|H| (dB)"; for
	// impedances say "|Z| (dBΩ)", for transconductances "|Y| (dBS)".
	MagnitudeLabel string
	// MagnitudeRange fixes the magnitude axis [low, high] in dB; the zero
	// value chooses it from the data.
	MagnitudeRange [2]float64
	// Markers to draw, such as the −3 dB points.
	Markers []Marker
	// EmbedFonts embeds the Liberation Sans faces in the SVG (about
	// 0.5 MB each) so it looks the same on every viewer. Without it the
	// SVG asks for Liberation Sans, then Arial, Helvetica, sans-serif.
	EmbedFonts bool
}

// Bode writes a Bode plot of curves to w as one SVG document: the
// magnitude 20·log10|H| in dB on top, the phase in degrees (unwrapped
// along each curve, see UnwrapPhaseDeg) below, over a shared logarithmic
// frequency axis in Hz. Several curves differ in colour, dash pattern and
// point glyph and are named in a legend.
func Bode(w io.Writer, title string, curves []Curve, opt BodeOptions) error {
	_, err := renderBode(w, title, curves, opt)
	return err
}

// bodeInfo reports where things landed, for tests.
type bodeInfo struct {
	magArea      vg.Rectangle
	markers      []vg.Point // dots drawn on the magnitude panel
	fLo, fHi     float64
	magLo, magHi float64
}

func validateCurves(curves []Curve, markers []Marker) error {
	if len(curves) == 0 {
		return fmt.Errorf("plot: Bode needs at least one curve")
	}
	for i, c := range curves {
		name := curveName(c, i)
		if len(c.F) != len(c.H) {
			return fmt.Errorf("plot: curve %s has %d frequencies but %d response values", name, len(c.F), len(c.H))
		}
		if len(c.F) < 2 {
			return fmt.Errorf("plot: curve %s has %d points; a Bode plot needs at least 2", name, len(c.F))
		}
		for j, f := range c.F {
			if !finite(f) || f <= 0 {
				return fmt.Errorf("plot: curve %s: frequency %d is %g Hz; expected a finite frequency above 0 Hz", name, j, f)
			}
			if j > 0 && f <= c.F[j-1] {
				return fmt.Errorf("plot: curve %s: frequencies must increase strictly, but point %d (%g Hz) follows %g Hz", name, j, f, c.F[j-1])
			}
		}
		nonzero := false
		for j, h := range c.H {
			if !finite(real(h)) || !finite(imag(h)) {
				return fmt.Errorf("plot: curve %s: response at %g Hz is %v; expected a finite complex number", name, c.F[j], h)
			}
			nonzero = nonzero || h != 0
		}
		if !nonzero {
			return fmt.Errorf("plot: curve %s is zero at every frequency; nothing to draw in dB", name)
		}
	}
	for i, m := range markers {
		if m.Curve < 0 || m.Curve >= len(curves) {
			return fmt.Errorf("plot: marker %d (%q) refers to curve %d; there are %d curves", i, m.Label, m.Curve, len(curves))
		}
		c := curves[m.Curve]
		if !finite(m.F) || m.F < c.F[0] || m.F > c.F[len(c.F)-1] {
			return fmt.Errorf("plot: marker %d (%q) at %g Hz lies outside curve %s, swept from %g Hz to %g Hz",
				i, m.Label, m.F, curveName(c, m.Curve), c.F[0], c.F[len(c.F)-1])
		}
	}
	return nil
}

func curveName(c Curve, i int) string {
	if c.Label != "" {
		return fmt.Sprintf("%d (%q)", i, c.Label)
	}
	return fmt.Sprint(i)
}

// interpLogF interpolates y(f) linearly in log f; NaN outside [F0, Fn] or
// next to a gap.
func interpLogF(fs, ys []float64, f float64) float64 {
	n := len(fs)
	if n == 0 || f < fs[0] || f > fs[n-1] {
		return math.NaN()
	}
	i := sort.SearchFloat64s(fs, f) // fs[i] >= f
	if fs[i] == f {
		return ys[i]
	}
	a, b := i-1, i
	t := (math.Log(f) - math.Log(fs[a])) / (math.Log(fs[b]) - math.Log(fs[a]))
	if !finite(ys[a]) || !finite(ys[b]) {
		return math.NaN()
	}
	return ys[a] + t*(ys[b]-ys[a])
}

// slopeAt is the sign of dy/dlog f around f: −1, 0 or +1.
func slopeAt(fs, ys []float64, f float64) float64 {
	d := interpLogF(fs, ys, f*1.05) - interpLogF(fs, ys, f/1.05)
	switch {
	case d < 0:
		return -1
	case d > 0:
		return 1
	}
	return 0
}

// bodeData is what a Bode plot shows, computed from the curves: levels in
// dB, unwrapped phases in degrees, the curves' styles and the data ranges.
type bodeData struct {
	curves   []Curve
	mag, ph  [][]float64
	styles   []seriesStyle
	fLo, fHi float64 // Hz
	mLo, mHi float64 // dB, finite samples
	pLo, pHi float64 // degrees
}

func newBodeData(curves []Curve) bodeData {
	n := len(curves)
	d := bodeData{curves: curves, mag: make([][]float64, n), ph: make([][]float64, n), styles: make([]seriesStyle, n),
		fLo: math.Inf(1), fHi: math.Inf(-1), mLo: math.Inf(1), mHi: math.Inf(-1), pLo: math.Inf(1), pHi: math.Inf(-1)}
	for i, c := range curves {
		d.mag[i] = magnitudeDB(c.H)
		d.ph[i] = UnwrapPhaseDeg(c.H)
		if i > 0 {
			alignPhase(d.ph[i], c.F, d.ph[0], curves[0].F)
		}
		d.styles[i] = seriesStyleFor(i, n)
		d.fLo, d.fHi = math.Min(d.fLo, c.F[0]), math.Max(d.fHi, c.F[len(c.F)-1])
		for j := range c.H {
			if finite(d.mag[i][j]) {
				d.mLo, d.mHi = math.Min(d.mLo, d.mag[i][j]), math.Max(d.mHi, d.mag[i][j])
			}
			if finite(d.ph[i][j]) {
				d.pLo, d.pHi = math.Min(d.pLo, d.ph[i][j]), math.Max(d.pHi, d.ph[i][j])
			}
		}
	}
	return d
}

// alignPhase shifts the unwrapped phase ph (at frequencies f) by the
// multiple of 360° that brings its first value within 180° of the
// reference curve's phase at that frequency (or of the reference's first
// value, outside its sweep). Two variants of one inverting stage then both
// start near +180° instead of one at +180° and one at −180°.
func alignPhase(ph, f, ref, refF []float64) {
	for j, v := range ph {
		if !finite(v) {
			continue
		}
		r := interpLogF(refF, ref, f[j])
		for k := 0; !finite(r) && k < len(ref); k++ {
			r = ref[k]
		}
		if !finite(r) {
			return
		}
		shift := 360 * math.Round((r-v)/360)
		for k := range ph {
			ph[k] += shift
		}
		return
	}
}

// Tick steps of the two axes, dB and degrees.
var (
	dbSteps  = []float64{1, 2, 5, 10, 20, 50, 100, 200, 500}
	degSteps = []float64{5, 10, 15, 30, 45, 90, 180, 360, 720}
)

// magnitudeAxis returns the magnitude axis range and ticks: opt's range if
// given, else the data's, with headroom above the highest level for up to
// two rows of marker labels on a panel about panelH tall.
func magnitudeAxis(d bodeData, opt BodeOptions, panelH vg.Length, maxTicks int) (lo, hi float64, t ticks) {
	if r := opt.MagnitudeRange; r != [2]float64{} {
		_, _, t = linearRange(r[0], r[1], 0, dbSteps, maxTicks, formatNum)
		return r[0], r[1], t
	}
	room := 0.05 // of the axis, a little air
	if k := min(len(opt.Markers), 2); k > 0 {
		ls := markerTextStyle()
		room = float64(vg.Length(k)*(ls.Height("0")+vg.Points(1))+vg.Points(5)) / float64(panelH)
		room = math.Min(room, 0.25) // a small figure keeps its curves
	}
	top := math.Max(d.mHi, d.mLo+6) // linearRange widens spans under 6 dB
	top = (top - room*d.mLo) / (1 - room)
	return linearRange(d.mLo, top, 6, dbSteps, maxTicks, formatNum)
}

func markerTextStyle() text.Style { return textStyle(sizeNote+0.5, colText, false) }

func renderBode(w io.Writer, title string, curves []Curve, opt BodeOptions) (bodeInfo, error) {
	var info bodeInfo
	if err := validateCurves(curves, opt.Markers); err != nil {
		return info, err
	}
	if opt.Width == 0 {
		opt.Width = defaultBodeWidth
	}
	if opt.Height == 0 {
		opt.Height = defaultBodeHeight
	}
	if opt.MagnitudeLabel == "" {
		opt.MagnitudeLabel = "|H| (dB)"
	}
	if r := opt.MagnitudeRange; r != [2]float64{} && !(finite(r[0]) && finite(r[1]) && r[0] < r[1]) {
		return info, fmt.Errorf("plot: magnitude range [%g, %g] dB: expected finite low < high", r[0], r[1])
	}
	d := newBodeData(curves)
	n := len(curves)

	var legend []legendEntry
	if n > 1 || curves[0].Label != "" {
		for i, c := range curves {
			label := c.Label
			if label == "" {
				label = fmt.Sprintf("curve %d", i+1)
			}
			line := d.styles[i].line
			legend = append(legend, legendEntry{label: label, line: &line, glyph: d.styles[i].glyph})
		}
	}

	err := renderSVG(w, opt.Width, opt.Height, opt.EmbedFonts, func(dc draw.Canvas) error {
		body := drawFrame(dc, title, legend, "")

		// Estimated data-area size, to decide how many tick labels fit.
		tick := textStyle(sizeTick, colText, false)
		gap := vg.Points(8)
		xAxisH := tick.Height("0") + vg.Points(4+4) + textStyle(sizeLabel, colText, false).Height("F")
		panelH := (body.Max.Y - body.Min.Y - xAxisH - gap) / 2
		dataW := body.Max.X - body.Min.X - vg.Points(55)
		maxY := min(int(math.Floor(float64(panelH/vg.Points(22))))+1, 9)

		fT := logTicks(d.fLo, d.fHi, maxLabelsAlong(dataW, tick.Width("100 kHz")+vg.Points(12)),
			dataW/vg.Length(math.Log10(d.fHi/d.fLo)) >= vg.Points(40), "Hz")
		mMin, mMax, mT := magnitudeAxis(d, opt, panelH, maxY)
		pMin, pMax, pT := linearRange(d.pLo, d.pHi, 20, degSteps, maxY, formatDeg)
		info.fLo, info.fHi, info.magLo, info.magHi = d.fLo, d.fHi, mMin, mMax

		top, bot := newPanel(), newPanel()
		for _, p := range []*plot.Plot{top, bot} {
			p.X.Scale = plot.LogScale{}
			p.X.Min, p.X.Max = d.fLo, d.fHi
		}
		top.X.Tick.Marker = plot.ConstantTicks(nil) // the panels share the lower one's labels
		top.X.Tick.Length = 0
		bot.X.Tick.Marker = plot.ConstantTicks(fT.marks)
		bot.X.Label.Text = "Frequency (Hz)"
		top.Y.Min, top.Y.Max = mMin, mMax
		top.Y.Tick.Marker = plot.ConstantTicks(mT.marks)
		top.Y.Label.Text = opt.MagnitudeLabel
		bot.Y.Min, bot.Y.Max = pMin, pMax
		bot.Y.Tick.Marker = plot.ConstantTicks(pT.marks)
		bot.Y.Label.Text = "Phase (°)"

		guides := guidePlotter{markers: opt.Markers, styles: d.styles}
		top.Add(gridPlotter{xMajor: fT.gridMajor, xMinor: fT.gridMinor, yMajor: mT.gridMajor}, guides,
			curvesPlotter{d: d, ys: d.mag}, markerPlotter{d: d, ys: d.mag, markers: opt.Markers, info: &info, labels: true},
			framePlotter{})
		bot.Add(gridPlotter{xMajor: fT.gridMajor, xMinor: fT.gridMinor, yMajor: pT.gridMajor}, guides,
			curvesPlotter{d: d, ys: d.ph}, markerPlotter{d: d, ys: d.ph, markers: opt.Markers},
			framePlotter{})

		cs := plot.Align([][]*plot.Plot{{top}, {bot}}, draw.Tiles{Rows: 2, Cols: 1, PadY: gap}, body)
		top.Draw(cs[0][0])
		bot.Draw(cs[1][0])
		return nil
	})
	return info, err
}

// guidePlotter draws each marker's thin dashed vertical line, in its
// curve's colour, across the panel.
type guidePlotter struct {
	markers []Marker
	styles  []seriesStyle
}

func (g guidePlotter) Plot(c draw.Canvas, p *plot.Plot) {
	tx, _ := p.Transforms(&c)
	for _, m := range g.markers {
		sty := draw.LineStyle{Color: g.styles[m.Curve].line.Color, Width: vg.Points(0.7),
			Dashes: []vg.Length{vg.Points(2.5), vg.Points(2)}}
		c.StrokeLine2(sty, tx(m.F), c.Min.Y, tx(m.F), c.Max.Y)
	}
}

// markerPlotter draws the markers' dots on the curves ys and, with labels
// set, their texts where they overlap no curve, glyph or other label.
type markerPlotter struct {
	d       bodeData
	ys      [][]float64
	markers []Marker
	labels  bool
	info    *bodeInfo // with labels: records the magnitude panel's layout
}

func (mp markerPlotter) Plot(c draw.Canvas, p *plot.Plot) {
	tx, ty := p.Transforms(&c)
	d := mp.d
	dot := func(i int) draw.GlyphStyle {
		return draw.GlyphStyle{Color: d.styles[i].line.Color, Radius: vg.Points(3.2),
			Shape: glyph{kind: glyphDot, stroke: vg.Points(1), fill: colPage}}
	}
	type dotAt struct {
		pt vg.Point
		m  Marker
	}
	var dots []dotAt
	for _, m := range mp.markers {
		if y := interpLogF(d.curves[m.Curve].F, mp.ys[m.Curve], m.F); finite(y) {
			pt := vg.Point{X: tx(m.F), Y: ty(y)}
			c.DrawGlyph(dot(m.Curve), pt)
			dots = append(dots, dotAt{pt, m})
		}
	}
	if !mp.labels {
		return
	}
	mp.info.magArea = c.Rectangle
	pl := placer{area: c.Rectangle}
	for i, cv := range d.curves {
		pl.blockPolyline(polyline(cv.F, mp.ys[i], tx, ty), vg.Points(1.5))
		for _, g := range glyphPoints(cv, mp.ys[i], i, len(d.curves), d.fLo, d.fHi, d.styles[i]) {
			pl.blockPoint(vg.Point{X: tx(g.x), Y: ty(g.y)}, vg.Points(4))
		}
	}
	for _, dt := range dots {
		pl.blockPoint(dt.pt, vg.Points(4))
	}
	ls := markerTextStyle()
	for _, dt := range dots {
		mp.info.markers = append(mp.info.markers, dt.pt)
		txt := strings.TrimSpace(dt.m.Label + " " + formatEng(dt.m.F, 3, "Hz"))
		ls.Color = d.styles[dt.m.Curve].line.Color
		r, ok := pl.place(markerLabelCandidates(ls, txt, dt.pt, slopeAt(d.curves[dt.m.Curve].F, mp.ys[dt.m.Curve], dt.m.F)))
		if !ok { // crowded: next to the dot, inside the panel
			r = clampRect(markerLabelCandidates(ls, txt, dt.pt, 0)[0], c.Rectangle)
		}
		drawHalo(&c, r)
		fillTextAt(&c, ls, r.Min.X, r.Min.Y+ls.FontExtents().Descent, draw.XLeft, txt)
	}
}

// markerLabelCandidates lists places for a marker's label beside its
// guide line, nearest to the dot at pt first: on the side where the curve
// moves away (right of a falling curve, left of a rising one) going up,
// then the other side going up, then both sides going down.
func markerLabelCandidates(sty text.Style, txt string, pt vg.Point, slope float64) []vg.Rectangle {
	w := sty.Width(txt)
	e := sty.FontExtents()
	h := e.Ascent + e.Descent
	g := vg.Points(4)
	right := pt.X + g
	left := pt.X - g - w
	sides := []vg.Length{right, left}
	if slope > 0 {
		sides = []vg.Length{left, right}
	}
	var out []vg.Rectangle
	at := func(x, y vg.Length) {
		out = append(out, vg.Rectangle{Min: vg.Point{X: x, Y: y}, Max: vg.Point{X: x + w, Y: y + h}})
	}
	const rows = 12
	for _, down := range []bool{false, true} {
		for _, x := range sides {
			for k := 0; k < rows; k++ {
				dy := vg.Length(k) * (h/2 + vg.Points(0.5))
				if down {
					at(x, pt.Y-vg.Points(3)-h-dy)
				} else {
					at(x, pt.Y+vg.Points(3)+dy)
				}
			}
		}
	}
	return out
}

func clampRect(r, area vg.Rectangle) vg.Rectangle {
	dx := vg.Length(0)
	if r.Max.X > area.Max.X {
		dx = area.Max.X - r.Max.X
	}
	if r.Min.X+dx < area.Min.X {
		dx = area.Min.X - r.Min.X
	}
	dy := vg.Length(0)
	if r.Max.Y > area.Max.Y {
		dy = area.Max.Y - r.Max.Y
	}
	if r.Min.Y+dy < area.Min.Y {
		dy = area.Min.Y - r.Min.Y
	}
	return r.Add(vg.Point{X: dx, Y: dy})
}

// polyline maps the finite samples of a curve to canvas points (a gap is
// simply bridged: this is for label avoidance, not for drawing).
func polyline(fs, ys []float64, tx, ty func(float64) vg.Length) []vg.Point {
	var pts []vg.Point
	for j, f := range fs {
		if finite(ys[j]) {
			pts = append(pts, vg.Point{X: tx(f), Y: ty(ys[j])})
		}
	}
	return pts
}

// glyphsPerCurve is how many point glyphs mark each curve when several
// curves share a plot: enough to follow a curve, few enough not to hide it.
const glyphsPerCurve = 8

// curvesPlotter draws the curves of d (x: frequency, y: ys) as lines
// broken at gaps, and their glyphs at log-spaced frequencies staggered
// between curves so that glyphs of different curves do not sit on one
// another.
type curvesPlotter struct {
	d  bodeData
	ys [][]float64
}

func (cp curvesPlotter) Plot(c draw.Canvas, p *plot.Plot) {
	tx, ty := p.Transforms(&c)
	d := cp.d
	for i, cv := range d.curves {
		var segs [][]vg.Point
		var seg []vg.Point
		for j, f := range cv.F {
			y := cp.ys[i][j]
			if !finite(y) {
				if len(seg) > 0 {
					segs = append(segs, seg)
				}
				seg = nil
				continue
			}
			seg = append(seg, vg.Point{X: tx(f), Y: ty(y)})
		}
		if len(seg) > 0 {
			segs = append(segs, seg)
		}
		c.StrokeLines(d.styles[i].line, c.ClipLinesXY(segs...)...)
	}
	for i, cv := range d.curves {
		for _, g := range glyphPoints(cv, cp.ys[i], i, len(d.curves), d.fLo, d.fHi, d.styles[i]) {
			c.DrawGlyph(d.styles[i].glyph, vg.Point{X: tx(g.x), Y: ty(g.y)})
		}
	}
}

// glyphPoints returns the (f, y) places of curve i's glyphs, none if the
// style has no glyph: glyphsPerCurve log-spaced frequencies over [fLo,
// fHi], shifted by i/n of their spacing so that n curves take turns.
func glyphPoints(cv Curve, ys []float64, i, n int, fLo, fHi float64, st seriesStyle) []xy {
	if st.glyph.Shape == nil {
		return nil
	}
	var out []xy
	lo, hi := math.Log10(fLo), math.Log10(fHi)
	step := (hi - lo) / glyphsPerCurve
	for k := 0; k < glyphsPerCurve; k++ {
		f := math.Pow(10, lo+step*(float64(k)+(float64(i)+0.5)/float64(n)))
		if y := interpLogF(cv.F, ys, f); finite(y) {
			out = append(out, xy{f, y})
		}
	}
	return out
}

// xy is a point in data coordinates.
type xy struct{ x, y float64 }
