package plot

import (
	"bytes"
	"fmt"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/plot/vg"
)

// firstOrder is H = 1/(1 + s/ωc) sampled 10 Hz … 10 MHz, 20 points a decade.
func firstOrder(fc float64) Curve {
	f := sweep(10, 10e6, 20)
	return Curve{F: f, H: respond(f, ratio(1, []complex128{complex(-2*math.Pi*fc, 0)}, nil))}
}

// A first-order low-pass is 3.0103 dB down at fc (closed form:
// |1/(1 + j)| = 1/√2): the marker must sit at fc on that level.
func TestBodeFirstOrderMarkerAtCorner(t *testing.T) {
	const fc = 1e3
	var b bytes.Buffer
	info, err := renderBode(&b, "Soil-probe preamp", []Curve{firstOrder(fc)},
		BodeOptions{Markers: []Marker{{F: fc, Label: "−3 dB"}}})
	if err != nil {
		t.Fatal(err)
	}
	if len(info.markers) != 1 {
		t.Fatalf("%d markers drawn, want 1", len(info.markers))
	}
	pt, a := info.markers[0], info.magArea
	// Back from canvas to data: log frequency across, dB up.
	fx := math.Pow(10, math.Log10(info.fLo)+float64((pt.X-a.Min.X)/(a.Max.X-a.Min.X))*math.Log10(info.fHi/info.fLo))
	db := info.magLo + float64((pt.Y-a.Min.Y)/(a.Max.Y-a.Min.Y))*(info.magHi-info.magLo)
	if math.Abs(fx/fc-1) > 1e-6 {
		t.Errorf("marker at %g Hz, want %g Hz", fx, fc)
	}
	if want := -10 * math.Log10(2); math.Abs(db-want) > 0.01 {
		t.Errorf("marker at %g dB, want %g dB", db, want)
	}
	texts := svgTexts(t, b.Bytes())
	wantTexts(t, texts, "Soil-probe preamp", "−3 dB 1 kHz", "|H| (dB)", "Phase (°)", "Frequency (Hz)",
		"10 Hz", "1 kHz", "1 MHz", "10 MHz", "0", "−90°")
	// Frequency tick labels only under the lower panel.
	n := 0
	for _, s := range texts {
		if s == "1 kHz" {
			n++
		}
	}
	if n != 1 {
		t.Errorf(`"1 kHz" appears %d times, want once (tick label)`, n)
	}
	if !bytes.Contains(b.Bytes(), []byte(`font-family:'Liberation Sans',Arial,Helvetica,sans-serif`)) {
		t.Error("SVG does not name fallback fonts")
	}
}

func variantCurves() []Curve {
	var cs []Curve
	for i, name := range []string{"base", "no_early", "hot_85C", "R&D <draft>"} {
		c := firstOrder(1e3 * math.Pow(2, float64(i)))
		c.Label = name
		for j := range c.H {
			c.H[j] *= complex(-100, 0)
		}
		cs = append(cs, c)
	}
	return cs
}

func TestBodeVariantsLegendAndUnits(t *testing.T) {
	var b bytes.Buffer
	err := Bode(&b, "River-level gauge", variantCurves(), BodeOptions{
		MagnitudeLabel: "|Z| (dBΩ)",
		Markers:        []Marker{{F: 1e3, Label: "−3 dB", Curve: 0}, {F: 4e3, Label: "−3 dB", Curve: 2}},
		Width:          18 * vg.Centimeter, Height: 13 * vg.Centimeter,
	})
	if err != nil {
		t.Fatal(err)
	}
	// The markup escapes & and <, and parses.
	texts := svgTexts(t, b.Bytes())
	wantTexts(t, texts, "base", "no_early", "hot_85C", "R&D <draft>", "|Z| (dBΩ)", "−3 dB 1 kHz", "−3 dB 4 kHz", "180°")
	if !bytes.Contains(b.Bytes(), []byte(`width="510.24pt" height="368.5pt"`)) {
		t.Errorf("size not 18 cm × 13 cm: %s", b.Bytes()[:200])
	}
}

// Curves must differ in more than colour: any two of the first six differ
// in dash pattern and in glyph as well, and no two of a dozen share all
// three.
func TestSeriesStylesNotByColourAlone(t *testing.T) {
	key := func(s seriesStyle) (string, string, int) {
		d := ""
		for _, v := range s.line.Dashes {
			d += strings.TrimSpace(formatNum(float64(v))) + ","
		}
		return fmt.Sprint(s.line.Color), d, int(s.glyph.Shape.(glyph).kind)
	}
	for _, n := range []int{6, 12} {
		for i := 0; i < n; i++ {
			for j := i + 1; j < n; j++ {
				ci, di, gi := key(seriesStyleFor(i, n))
				cj, dj, gj := key(seriesStyleFor(j, n))
				if n == 6 && (ci == cj || di == dj || gi == gj) {
					t.Errorf("curves %d and %d of %d share colour, dash or glyph", i, j, n)
				}
				if ci == cj && di == dj && gi == gj {
					t.Errorf("curves %d and %d of %d look the same", i, j, n)
				}
			}
		}
	}
	if s := seriesStyleFor(0, 1); s.glyph.Shape != nil || s.line.Dashes != nil {
		t.Error("a single curve should be a plain solid line")
	}
}

func TestDeterministicOutput(t *testing.T) {
	render := func() []byte {
		var b bytes.Buffer
		if err := Bode(&b, "Determinism", variantCurves(), BodeOptions{Markers: []Marker{{F: 2e3, Label: "−3 dB", Curve: 1}}}); err != nil {
			t.Fatal(err)
		}
		if err := PoleZero(&b, "Determinism", spreadPoles, spreadZeros, PoleZeroOptions{}); err != nil {
			t.Fatal(err)
		}
		return b.Bytes()
	}
	first := render()
	for i := 0; i < 3; i++ {
		if !bytes.Equal(first, render()) {
			t.Fatal("same input gave different SVG")
		}
	}
}

func TestBodeGapAtExactZero(t *testing.T) {
	// A notch with its zero on a sweep point: the curve breaks, no error.
	f := []float64{1e3, 2e3, 5e3, 1e4, 2e4, 5e4}
	h := []complex128{1, 0.8, 0.3, 0, -0.3i, -0.8i}
	var b bytes.Buffer
	if err := Bode(&b, "", []Curve{{Label: "notch", F: f, H: h}}, BodeOptions{}); err != nil {
		t.Fatal(err)
	}
	svgTexts(t, b.Bytes())
}

func TestBodeEmbedFonts(t *testing.T) {
	var b bytes.Buffer
	if err := Bode(&b, "Embedded", []Curve{firstOrder(1e3)}, BodeOptions{EmbedFonts: true}); err != nil {
		t.Fatal(err)
	}
	if !bytes.Contains(b.Bytes(), []byte("@font-face")) {
		t.Error("no embedded font")
	}
	svgTexts(t, b.Bytes())
}

func TestBodeBadInput(t *testing.T) {
	good := firstOrder(1e3)
	tests := []struct {
		name   string
		curves []Curve
		opt    BodeOptions
		want   string
	}{
		{"no curves", nil, BodeOptions{}, "at least one curve"},
		{"lengths differ", []Curve{{F: []float64{1, 2}, H: []complex128{1}}}, BodeOptions{}, "2 frequencies but 1 response"},
		{"one point", []Curve{{F: []float64{1}, H: []complex128{1}}}, BodeOptions{}, "at least 2"},
		{"zero frequency", []Curve{{F: []float64{0, 1}, H: []complex128{1, 1}}}, BodeOptions{}, "above 0 Hz"},
		{"not increasing", []Curve{{Label: "x", F: []float64{2, 1}, H: []complex128{1, 1}}}, BodeOptions{}, `curve 0 ("x"): frequencies must increase`},
		{"NaN response", []Curve{{F: []float64{1, 2}, H: []complex128{complex(math.NaN(), 0), 1}}}, BodeOptions{}, "finite complex"},
		{"all zero", []Curve{{F: []float64{1, 2}, H: []complex128{0, 0}}}, BodeOptions{}, "zero at every frequency"},
		{"marker off sweep", []Curve{good}, BodeOptions{Markers: []Marker{{F: 1, Label: "−3 dB"}}}, "outside curve 0"},
		{"marker bad curve", []Curve{good}, BodeOptions{Markers: []Marker{{F: 1e3, Curve: 3}}}, "refers to curve 3"},
		{"too small", []Curve{good}, BodeOptions{Width: 2 * vg.Centimeter, Height: 2 * vg.Centimeter}, "too small"},
		{"bad range", []Curve{good}, BodeOptions{MagnitudeRange: [2]float64{0, -10}}, "magnitude range"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			var b bytes.Buffer
			err := Bode(&b, "", tt.curves, tt.opt)
			if err == nil || !strings.HasPrefix(err.Error(), "plot: ") || !strings.Contains(err.Error(), tt.want) {
				t.Fatalf("error %v, want one containing %q", err, tt.want)
			}
			if b.Len() != 0 {
				t.Error("wrote output despite the error")
			}
		})
	}
}

func TestBodeMagnitudeRange(t *testing.T) {
	info, err := renderBode(&bytes.Buffer{}, "", []Curve{firstOrder(1e3)}, BodeOptions{MagnitudeRange: [2]float64{-60, 10}})
	if err != nil {
		t.Fatal(err)
	}
	if info.magLo != -60 || info.magHi != 10 {
		t.Errorf("magnitude axis [%g, %g], want [−60, 10]", info.magLo, info.magHi)
	}
}

// Two variants of an inverting stage, one with H(0) a hair above the
// negative real axis and one a hair below, must both start near +180°,
// not 360° apart.
func TestBodeAlignsPhaseBetweenCurves(t *testing.T) {
	f := []float64{1, 10, 100}
	d := newBodeData([]Curve{
		{F: f, H: []complex128{complex(-100, 1e-9), complex(-100, -50), complex(-10, -80)}},
		{F: f, H: []complex128{complex(-90, -1e-9), complex(-90, -40), complex(-9, -70)}},
	})
	for i := range d.ph {
		if got := d.ph[i][0]; math.Abs(got-180) > 1e-6 {
			t.Errorf("curve %d starts at %g°, want 180°", i, got)
		}
	}
}
