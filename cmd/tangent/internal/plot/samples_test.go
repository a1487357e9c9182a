package plot

import (
	"bytes"
	"math"
	"math/cmplx"
	"os"
	"path/filepath"
	"testing"

	"gonum.org/v1/plot/vg"
)

// sweep returns n log-spaced frequencies per decade from lo to hi Hz.
func sweep(lo, hi float64, perDecade int) []float64 {
	n := int(math.Round(math.Log10(hi/lo)*float64(perDecade))) + 1
	f := make([]float64, n)
	for i := range f {
		f[i] = lo * math.Pow(10, float64(i)/float64(perDecade))
	}
	return f
}

// respond evaluates H(s) at s = j2πf.
func respond(f []float64, h func(s complex128) complex128) []complex128 {
	out := make([]complex128, len(f))
	for i, v := range f {
		out[i] = h(complex(0, 2*math.Pi*v))
	}
	return out
}

// ratio evaluates k·Π(1 − s/z)/Π(1 − s/p).
func ratio(k complex128, poles, zeros []complex128) func(s complex128) complex128 {
	return func(s complex128) complex128 {
		h := k
		for _, z := range zeros {
			h *= 1 - s/z
		}
		for _, p := range poles {
			h /= 1 - s/p
		}
		return h
	}
}

// TestWriteSamples writes the sample figures to $TANGENT_PLOT_SAMPLES (a
// directory) for a look by eye; skipped when the variable is unset.
func TestWriteSamples(t *testing.T) {
	dir := os.Getenv("TANGENT_PLOT_SAMPLES")
	if dir == "" {
		t.Skip("set TANGENT_PLOT_SAMPLES=/some/dir to write sample SVGs")
	}
	write := func(name string, render func(*bytes.Buffer) error) {
		var b bytes.Buffer
		if err := render(&b); err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		if err := os.WriteFile(filepath.Join(dir, name+".svg"), b.Bytes(), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	wc := 2 * math.Pi * 12.4e3
	f := sweep(10, 100e6, 20)
	write("bode_lowpass1", func(b *bytes.Buffer) error {
		return Bode(b, "Soil-probe preamp: first-order roll-off",
			[]Curve{{F: f, H: respond(f, ratio(1, []complex128{complex(-wc, 0)}, nil))}},
			BodeOptions{Markers: []Marker{{F: 12.4e3, Label: "−3 dB"}}})
	})
	write("bode_lowpass4", func(b *bytes.Buffer) error {
		p := complex(-2*math.Pi*1e3, 0)
		return Bode(b, "Four coincident poles at 1 kHz",
			[]Curve{{Label: "(1 + s/ωc)⁻⁴", F: sweep(1, 1e6, 30), H: respond(sweep(1, 1e6, 30), ratio(1, []complex128{p, p, p, p}, nil))}},
			BodeOptions{Markers: []Marker{{F: 1e3 * math.Sqrt(math.Pow(2, 0.25)-1), Label: "−3 dB"}}})
	})
	var cs []Curve
	var ms []Marker
	for i, v := range []struct {
		name string
		k    float64
		p1   float64
		p2   float64
		z    float64
	}{
		{"base", -152, 6.2e5, 5.1e9, 2.1e9},
		{"no_early", -190, 5.0e5, 5.1e9, 2.1e9},
		{"hot_85C", -140, 7.4e5, 4.0e9, 1.8e9},
		{"low_bias", -60, 2.4e6, 2.2e9, 2.5e9},
	} {
		h := ratio(complex(v.k, 0), []complex128{complex(-v.p1, 0), complex(-v.p2, 0)}, []complex128{complex(v.z, 0)})
		cs = append(cs, Curve{Label: v.name, F: f, H: respond(f, h)})
		fc := v.p1 / (2 * math.Pi) // near enough for a sample
		ms = append(ms, Marker{F: fc, Label: "−3 dB", Curve: i})
	}
	write("bode_variants", func(b *bytes.Buffer) error {
		return Bode(b, "River-level gauge front end: variants", cs, BodeOptions{Markers: ms})
	})
	fz := sweep(1, 10e6, 25)
	write("bode_impedance", func(b *bytes.Buffer) error {
		w0 := 2 * math.Pi * 50e3
		q := 4.0
		h := func(s complex128) complex128 { // parallel RLC, R = 10 kΩ
			return 1e4 * (s / complex(w0*q, 0)) / (1 + s/complex(w0*q, 0) + s*s/complex(w0*w0, 0))
		}
		return Bode(b, "Weather-mast sensor: input impedance",
			[]Curve{{Label: "Z_in", F: fz, H: respond(fz, h)}},
			BodeOptions{MagnitudeLabel: "|Z| (dBΩ)", Markers: []Marker{
				{F: 50e3 * (math.Sqrt(1+1/(4*q*q)) - 1/(2*q)), Label: "−3 dB"},
				{F: 50e3 * (math.Sqrt(1+1/(4*q*q)) + 1/(2*q)), Label: "−3 dB"},
			}})
	})
	write("pz_spread", func(b *bytes.Buffer) error {
		return PoleZero(b, "Soil-probe preamp: poles and zeros",
			[]complex128{-10, -1e9, complex(-1e3, 1e6), complex(-1e3, -1e6), -3.3e5},
			[]complex128{0, 2.1e9}, PoleZeroOptions{})
	})
	write("pz_real", func(b *bytes.Buffer) error {
		return PoleZero(b, "Only real poles, no zeros",
			[]complex128{-6.2e5, -5.1e9, -4.4e7, -120}, nil, PoleZeroOptions{})
	})
	write("pz_origin", func(b *bytes.Buffer) error {
		return PoleZero(b, "Integrator", []complex128{0}, nil, PoleZeroOptions{})
	})
	write("pz_pairs", func(b *bytes.Buffer) error {
		wn := 2 * math.Pi * 1e4
		pr := cmplx.Rect(wn, math.Pi-math.Acos(0.3))
		return PoleZero(b, "Pairs, a double pole and a right-half-plane pair",
			[]complex128{pr, cmplx.Conj(pr), -2e3, -2e3, complex(4e6, 9e7), complex(4e6, -9e7)},
			[]complex128{complex(0, 3e5), complex(0, -3e5), 1e12}, PoleZeroOptions{})
	})
	write("pz_empty", func(b *bytes.Buffer) error {
		return PoleZero(b, "Nothing", nil, nil, PoleZeroOptions{})
	})
}

func TestWriteSamplesStress(t *testing.T) {
	dir := os.Getenv("TANGENT_PLOT_SAMPLES")
	if dir == "" {
		t.Skip("set TANGENT_PLOT_SAMPLES=/some/dir to write sample SVGs")
	}
	write := func(name string, render func(*bytes.Buffer) error) {
		var b bytes.Buffer
		if err := render(&b); err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		if err := os.WriteFile(filepath.Join(dir, name+".svg"), b.Bytes(), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	f := sweep(1, 1e12, 10)
	var cs []Curve
	for i := 0; i < 7; i++ {
		p := complex(-2*math.Pi*1e3*math.Pow(3, float64(i)), 0)
		cs = append(cs, Curve{Label: "variant " + string(rune('A'+i)), F: f, H: respond(f, ratio(complex(10, 0), []complex128{p, p * 1e4}, nil))})
	}
	write("bode_seven_small", func(b *bytes.Buffer) error {
		return Bode(b, "Seven variants, 12 decades, 10 cm × 8 cm", cs,
			BodeOptions{Width: 10 * vg.Centimeter, Height: 8 * vg.Centimeter, Markers: []Marker{{F: 1e3, Label: "−3 dB", Curve: 0}, {F: 3e3, Label: "−3 dB", Curve: 1}}})
	})
	fn := sweep(100, 1e5, 40)
	write("bode_notch_narrow", func(b *bytes.Buffer) error {
		w0 := complex(2*math.Pi*1e4, 0)
		h := func(s complex128) complex128 { return (1 + s*s/(w0*w0)) / (1 + s/(w0*0.5) + s*s/(w0*w0)) }
		fn2 := sweep(3e3, 2e4, 200)
		return Bode(b, "Twin-T notch (exact zero on the grid) and a short sweep",
			[]Curve{{Label: "notch", F: fn, H: respond(fn, h)}, {Label: "short sweep", F: fn2, H: respond(fn2, h)}}, BodeOptions{})
	})
	write("pz_crowded", func(b *bytes.Buffer) error {
		var ps []complex128
		for k := 0; k < 12; k++ {
			ps = append(ps, complex(-math.Pow(10, float64(k)), 0))
		}
		return PoleZero(b, "A pole every decade, 1 rad/s to 100 G rad/s", ps,
			[]complex128{complex(-3, 3), complex(-3, -3), 5e10, -2e5}, PoleZeroOptions{Width: 10 * vg.Centimeter, Height: 8 * vg.Centimeter})
	})
}
