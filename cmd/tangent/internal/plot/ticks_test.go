package plot

import (
	"math"
	"testing"
)

// Prefixes and their powers: SI Brochure, 9th ed., table 7. Rounding to
// three significant digits: common practice.
func TestFormatEng(t *testing.T) {
	tests := []struct {
		v    float64
		unit string
		want string
	}{
		{12400, "Hz", "12.4 kHz"},
		{1e3, "Hz", "1 kHz"},
		{10, "Hz", "10 Hz"},
		{100e6, "Hz", "100 MHz"},
		{999.96, "Hz", "1 kHz"}, // rounding carries to the next prefix
		{1.5915494, "Hz", "1.59 Hz"},
		{1e-3, "Hz", "1 mHz"},
		{4.7e-6, "", "4.7 µ"},
		{-1e9, "", "−1 G"},
		{-1e6, "", "−1 M"},
		{-1e3, "", "−1 k"},
		{0, "", "0"},
		{0, "Hz", "0 Hz"},
		{250, "", "250"},
		{1e30, "Hz", "1e30 Hz"},
	}
	for _, tt := range tests {
		if got := formatEng(tt.v, 3, tt.unit); got != tt.want {
			t.Errorf("formatEng(%g, %q) = %q, want %q", tt.v, tt.unit, got, tt.want)
		}
	}
	if got := formatDeg(-90); got != "−90°" {
		t.Errorf("formatDeg(-90) = %q", got)
	}
	if got := formatNum(math.Copysign(0, -1)); got != "0" {
		t.Errorf("formatNum(−0) = %q", got)
	}
}

func labels(tk ticks) []string {
	var out []string
	for _, m := range tk.marks {
		if m.Label != "" {
			out = append(out, m.Label)
		}
	}
	return out
}

// Decade labels 10 Hz, 100 Hz, 1 kHz …: common practice for Bode plots.
func TestLogTicks(t *testing.T) {
	got := labels(logTicks(10, 100e6, 20, true, "Hz"))
	want := []string{"10 Hz", "100 Hz", "1 kHz", "10 kHz", "100 kHz", "1 MHz", "10 MHz", "100 MHz"}
	if len(got) != len(want) {
		t.Fatalf("labels %q, want %q", got, want)
	}
	for i := range want {
		if got[i] != want[i] {
			t.Fatalf("labels %q, want %q", got, want)
		}
	}
	// Twelve decades in little room: every third decade, on whole prefixes.
	got = labels(logTicks(1, 1e12, 6, false, "Hz"))
	if want := "1 Hz 1 kHz 1 MHz 1 GHz 1 THz"; join(got) != want {
		t.Errorf("labels %q, want %q", join(got), want)
	}
	// Less than a decade: still at least two labels.
	if got := labels(logTicks(3e3, 2e4, 10, false, "Hz")); len(got) < 2 {
		t.Errorf("short span labels %q", got)
	}
}

func join(s []string) string {
	out := ""
	for i, v := range s {
		if i > 0 {
			out += " "
		}
		out += v
	}
	return out
}

// Properties, not values: the range covers the data and holds the ticks.
func TestLinearRange(t *testing.T) {
	steps := []float64{1, 2, 5, 10, 20, 50, 100, 200, 500}
	tests := []struct{ lo, hi float64 }{
		{-80, 0}, {-263, 21}, {-0.1, 0.1}, {43.5, 43.5}, {-1e5, 1e5},
	}
	for _, tt := range tests {
		lo, hi, tk := linearRange(tt.lo, tt.hi, 6, steps, 7, formatNum)
		if lo > tt.lo || hi < tt.hi {
			t.Errorf("[%g, %g]: range [%g, %g] does not cover the data", tt.lo, tt.hi, lo, hi)
		}
		if n := len(tk.marks); n < 2 || n > 7 {
			t.Errorf("[%g, %g]: %d ticks", tt.lo, tt.hi, n)
		}
		for _, m := range tk.marks {
			if m.Value < lo-1e-9 || m.Value > hi+1e-9 {
				t.Errorf("[%g, %g]: tick %g outside [%g, %g]", tt.lo, tt.hi, m.Value, lo, hi)
			}
		}
	}
}

// With x0 = 1 rad/s, 10ᵏ sits at u ≈ k: labels every third decade are on
// whole SI prefixes (SI Brochure, 9th ed., table 7).
func TestSymlogTicks(t *testing.T) {
	s := symlog{x0: 1}
	tk := symlogTicks(s, s.forward(-2e9), s.forward(2e9), 7)
	if got, want := join(labels(tk)), "−1 G −1 M −1 k 0 1 k 1 M 1 G"; got != want {
		t.Errorf("labels %q, want %q", got, want)
	}
	for i := 1; i < len(tk.marks); i++ {
		if tk.marks[i].Value <= tk.marks[i-1].Value {
			t.Fatalf("ticks not ascending: %v", tk.marks)
		}
	}
	// Thinning drops the crowded labels next to the origin, not the outer
	// ones: with x0 = 100 rad/s, ±1 k sit at u = ±1.04, the rest 3 apart.
	s = symlog{x0: 100}
	th := thinLabels(symlogTicks(s, s.forward(-2e9), s.forward(2e9), 7), 1.5)
	if got, want := join(labels(th)), "−1 G −1 M 0 1 M 1 G"; got != want {
		t.Errorf("thinned labels %q, want %q", got, want)
	}
}
