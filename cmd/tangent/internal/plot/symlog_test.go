package plot

import (
	"math"
	"testing"
)

// Closed form: u = sign(x)·log10(1 + |x|/x0) is odd and strictly
// increasing, with inverse x = sign(u)·x0·(10^|u| − 1).
func TestSymlogInvertibleAndMonotonic(t *testing.T) {
	for _, x0 := range []float64{1e-3, 0.1, 1, 100, 1e6} {
		s := symlog{x0: x0}
		// A grid from −1e15 to 1e15 through 0, dense around x0.
		var xs []float64
		for e := 15.0; e >= -6; e -= 0.125 {
			xs = append(xs, -math.Pow(10, e))
		}
		xs = append(xs, 0)
		for e := -6.0; e <= 15; e += 0.125 {
			xs = append(xs, math.Pow(10, e))
		}
		prev := math.Inf(-1)
		for _, x := range xs {
			u := s.forward(x)
			if !(u > prev) {
				t.Fatalf("x0 = %g: not strictly increasing at x = %g (u = %g after %g)", x0, x, u, prev)
			}
			prev = u
			if back := s.inverse(u); math.Abs(back-x) > 1e-12*math.Max(math.Abs(x), x0) {
				t.Fatalf("x0 = %g: inverse(forward(%g)) = %g", x0, x, back)
			}
			if s.forward(-x) != -u {
				t.Fatalf("x0 = %g: not odd at %g", x0, x)
			}
		}
		// Definition: u = k exactly at |x| = x0·(10ᵏ − 1).
		for k := 0.0; k <= 12; k++ {
			if u := s.forward(x0 * (math.Pow(10, k) - 1)); math.Abs(u-k) > 1e-12*math.Max(1, k) {
				t.Errorf("x0 = %g: forward(x0·(10^%g − 1)) = %g", x0, k, u)
			}
		}
	}
}

// The rule documented on autoX0: x0 = 10^(⌊log10 m⌋ − 1), m the smallest
// nonzero part.
func TestAutoX0(t *testing.T) {
	tests := []struct {
		name  string
		roots []complex128
		want  float64
	}{
		{"none", nil, 1},
		{"origin only", []complex128{0}, 1},
		{"decades apart", []complex128{-10, -1e9}, 1},
		{"pair with small real part", []complex128{complex(-3, 3e6)}, 0.1},
		{"smallest part is imaginary", []complex128{complex(-1e6, 250)}, 10},
		{"just below a power of ten", []complex128{-9.99}, 0.1},
		{"power of ten", []complex128{-100}, 10},
	}
	for _, tt := range tests {
		if got := autoX0(tt.roots); math.Abs(got-tt.want) > 1e-12*tt.want {
			t.Errorf("%s: autoX0 = %g, want %g", tt.name, got, tt.want)
		}
	}
}

// The rule documented on residueRel: parts below 10⁻⁶·|s| are zero; a
// pair's quality factor is Q = |s|/(2·|Re s|) (common practice).
func TestCleanRoot(t *testing.T) {
	tests := []struct{ in, want complex128 }{
		{complex(-1e9, 3), -1e9},                 // root-finder residue on a real root
		{complex(1e-4, 1e6), complex(0, 1e6)},    // on the jω axis
		{complex(-1e3, 1e6), complex(-1e3, 1e6)}, // Q = 500: kept
		{0, 0},
	}
	for _, tt := range tests {
		if got := cleanRoot(tt.in); got != tt.want {
			t.Errorf("cleanRoot(%v) = %v, want %v", tt.in, got, tt.want)
		}
	}
}
