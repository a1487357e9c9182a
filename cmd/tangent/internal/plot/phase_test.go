package plot

import (
	"math"
	"math/cmplx"
	"testing"
)

// Four coincident real poles: H = 1/(1 + s/ωc)⁴ has, at s = j2πf,
// arg H = −4·atan(f/fc) (closed form: the argument of a product is the sum
// of the arguments), running continuously from 0° to −360°.
func TestUnwrapPhaseFourthOrderLowPass(t *testing.T) {
	const fc = 1e3
	f := sweep(1, 1e7, 20)
	h := respond(f, ratio(1, []complex128{-2 * math.Pi * fc, -2 * math.Pi * fc, -2 * math.Pi * fc, -2 * math.Pi * fc}, nil))
	got := UnwrapPhaseDeg(h)
	crossed := false
	for i := range f {
		want := -4 * math.Atan(f[i]/fc) * 180 / math.Pi // closed form
		if math.Abs(got[i]-want) > 1e-9 {
			t.Fatalf("f = %g Hz: unwrapped phase %.12g°, want %.12g°", f[i], got[i], want)
		}
		if i > 0 && math.Abs(got[i]-got[i-1]) > 20 {
			t.Fatalf("phase jumps by %g° at %g Hz", got[i]-got[i-1], f[i])
		}
		crossed = crossed || got[i] < -180
	}
	if !crossed || got[len(got)-1] > -359 {
		t.Errorf("phase should pass −180° and approach −360°; last value %g°", got[len(got)-1])
	}
}

// A pure delay e^(−sτ) has phase −360°·f·τ (closed form), many turns down.
func TestUnwrapPhaseDelay(t *testing.T) {
	const tau = 1e-6
	f := make([]float64, 401)
	for i := range f {
		f[i] = float64(i) * 25e3 // 0 … 10 MHz: 10 turns, 9° a step
	}
	h := respond(f, func(s complex128) complex128 { return cmplx.Exp(-s * tau) })
	got := UnwrapPhaseDeg(h)
	for i := range f {
		if want := -360 * f[i] * tau; math.Abs(got[i]-want) > 1e-6 {
			t.Fatalf("f = %g Hz: %g°, want %g°", f[i], got[i], want)
		}
	}
}

func TestUnwrapPhaseEdges(t *testing.T) {
	negZero := math.Copysign(0, -1)
	tests := []struct {
		name string
		h    []complex128
		want []float64 // NaN where no phase
	}{
		{"empty", nil, []float64{}},
		{"inverting starts at +180", []complex128{-1, complex(-1, -0.1)}, []float64{180, 180 + 5.710593137499643}},
		{"−1 − 0i is +180", []complex128{complex(-1, negZero)}, []float64{180}},
		{"gap keeps continuity", []complex128{complex(-1, 0.1), 0, complex(-1, -0.1)},
			[]float64{180 - 5.710593137499643, math.NaN(), 180 + 5.710593137499643}},
		{"leading zero", []complex128{0, 1i}, []float64{math.NaN(), 90}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			got := UnwrapPhaseDeg(tt.h)
			if len(got) != len(tt.want) {
				t.Fatalf("len %d, want %d", len(got), len(tt.want))
			}
			for i := range got {
				w := tt.want[i]
				if math.IsNaN(w) != math.IsNaN(got[i]) || (!math.IsNaN(w) && math.Abs(got[i]-w) > 1e-9) {
					t.Errorf("[%d] = %g, want %g", i, got[i], w)
				}
			}
		})
	}
}

// 20·log10|1/(1 + j)| = −10·log10 2 = −3.0103 dB (closed form).
func TestMagnitudeDB(t *testing.T) {
	got := magnitudeDB([]complex128{1 / (1 + 1i), 10, 0})
	if math.Abs(got[0]+10*math.Log10(2)) > 1e-12 || math.Abs(got[1]-20) > 1e-12 || !math.IsInf(got[2], -1) {
		t.Errorf("magnitudeDB = %v", got)
	}
}
