package plot

import (
	"bytes"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/plot/vg"
)

// Roots over 12 decades and both half planes: −10 rad/s, −1 G rad/s, a
// pair at −1 k ± j1 M, and a right-half-plane zero at 2.1 G rad/s.
var (
	spreadPoles = []complex128{-10, -1e9, complex(-1e3, 1e6), complex(-1e3, -1e6), -3.3e5}
	spreadZeros = []complex128{0, 2.1e9}
)

// Frequency labels are f = |s|/2π (closed form); e.g. 6.2e5/2π = 98.7 kHz,
// 1e4/2π = 1.59 kHz, |−3 k ± j60 k|/2π ≈ 9.56 kHz, |±j300 k|/2π = 47.7 kHz.
func TestPoleZeroCases(t *testing.T) {
	tests := []struct {
		name         string
		poles, zeros []complex128
		texts        []string
		rhp          int // glyphs expected right of the jω axis
	}{
		{"spread over 12 decades", spreadPoles, spreadZeros,
			// |−10|/2π = 1.59 Hz, 1e9/2π = 159 MHz (closed form).
			[]string{"−1 G", "−1 M", "−1 k", "0", "1 k", "1 G", "1.59 Hz", "159 MHz", "pole (5)", "zero (2)"}, 1},
		{"no zeros", []complex128{-6.2e5, -5.1e9}, nil, []string{"zero (0)", "98.7 kHz"}, 0},
		{"root at the origin", []complex128{0, -1e4}, []complex128{-1e2}, []string{"0", "1.59 kHz", "15.9 Hz"}, 0},
		{"only real roots", []complex128{-1, -10, -100}, []complex128{5}, []string{"159 mHz", "796 mHz"}, 1},
		{"conjugate pairs", []complex128{complex(-3e3, 6e4), complex(-3e3, -6e4), complex(4e6, 9e7), complex(4e6, -9e7)},
			[]complex128{complex(0, 3e5), complex(0, -3e5)}, []string{"47.7 kHz"}, 2},
		{"double pole", []complex128{-2e3, -2e3}, nil, []string{"(2)", "318 Hz"}, 0},
		{"nothing", nil, nil, []string{"pole (0)", "zero (0)"}, 0},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			var b bytes.Buffer
			info, err := renderPoleZero(&b, "Brightwater soil probe", tt.poles, tt.zeros, PoleZeroOptions{})
			if err != nil {
				t.Fatal(err)
			}
			texts := svgTexts(t, b.Bytes())
			wantTexts(t, texts, append(tt.texts, "Brightwater soil probe", "Re s = σ (rad/s)", "Im s = ω (rad/s)")...)
			// Every root visible, inside the data area, and no two distinct
			// roots closer than a symbol's width.
			rhp := 0
			for i, p := range info.glyphs {
				if p.X < info.area.Min.X || p.X > info.area.Max.X || p.Y < info.area.Min.Y || p.Y > info.area.Max.Y {
					t.Errorf("root %v drawn at %v, outside %v", info.groups[i].s, p, info.area)
				}
				s := info.groups[i].s
				switch {
				case real(s) > 0 && p.X <= info.origin.X, real(s) < 0 && p.X >= info.origin.X, real(s) == 0 && p.X != info.origin.X:
					t.Errorf("root %v on the wrong side of the jω axis", s)
				}
				if p.X > info.origin.X {
					rhp++
				}
				for j := 0; j < i; j++ {
					q := info.glyphs[j]
					if info.groups[i].s != info.groups[j].s && math.Hypot(float64(p.X-q.X), float64(p.Y-q.Y)) < float64(vg.Points(8)) {
						t.Errorf("roots %v and %v overlap on the map", info.groups[i].s, info.groups[j].s)
					}
				}
			}
			if rhp != tt.rhp {
				t.Errorf("%d roots right of the jω axis, want %d", rhp, tt.rhp)
			}
		})
	}
}

func TestPoleZeroMultiplicityAndPairs(t *testing.T) {
	info, err := renderPoleZero(&bytes.Buffer{}, "", []complex128{-2e3, complex(-2e3, 1e-6), complex(-5, 7), complex(-5, -7)}, nil, PoleZeroOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if len(info.groups) != 3 || info.groups[0].n != 2 {
		t.Fatalf("groups %+v: want the double pole merged", info.groups)
	}
	// A conjugate pair is labelled once: |−5 ± j7|/2π = 1.37 Hz.
	if n := strings.Count(strings.Join(info.labels, "|"), "1.37 Hz"); n != 1 {
		t.Errorf("pair labelled %d times: %q", n, info.labels)
	}
}

func TestPoleZeroOptions(t *testing.T) {
	var b bytes.Buffer
	info, err := renderPoleZero(&b, "", spreadPoles, spreadZeros, PoleZeroOptions{X0: 1e3, NoFrequencyLabels: true, Width: 9 * vg.Centimeter, Height: 9 * vg.Centimeter})
	if err != nil {
		t.Fatal(err)
	}
	if info.x0 != 1e3 || len(info.labels) != 0 {
		t.Errorf("x0 = %g, labels %q", info.x0, info.labels)
	}
	if !bytes.Contains(b.Bytes(), []byte(`width="255.12pt" height="255.12pt"`)) {
		t.Errorf("size not 9 cm × 9 cm: %s", b.Bytes()[:200])
	}
	texts := svgTexts(t, b.Bytes())
	wantTexts(t, texts, "signed log axes: u = sign(x)·log10(1 + |x|/x0), x0 = 1 krad/s")
}

func TestPoleZeroBadInput(t *testing.T) {
	tests := []struct {
		name         string
		poles, zeros []complex128
		opt          PoleZeroOptions
		want         string
	}{
		{"NaN pole", []complex128{complex(math.NaN(), 0)}, nil, PoleZeroOptions{}, "pole 0"},
		{"infinite zero", nil, []complex128{-1, complex(0, math.Inf(1))}, PoleZeroOptions{}, "zero 1"},
		{"negative x0", nil, nil, PoleZeroOptions{X0: -1}, "x0"},
		{"too small", nil, nil, PoleZeroOptions{Width: 3 * vg.Centimeter, Height: 8 * vg.Centimeter}, "too small"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			var b bytes.Buffer
			err := PoleZero(&b, "", tt.poles, tt.zeros, tt.opt)
			if err == nil || !strings.HasPrefix(err.Error(), "plot: ") || !strings.Contains(err.Error(), tt.want) {
				t.Fatalf("error %v, want one containing %q", err, tt.want)
			}
			if b.Len() != 0 {
				t.Error("wrote output despite the error")
			}
		})
	}
}
