package ac

import (
	"math"
	"math/cmplx"
	"testing"

	"tangent/internal/cdense"
)

// rqi, the refinement of last resort in the root finder, run directly
// on pencils g + t·c whose eigenvalues are known in closed form (the
// roots of det(g + t·c) = 0). It must converge to the exact root from a
// nearby estimate and rough vectors, real roots staying real.
func TestRayleighQuotientIteration(t *testing.T) {
	tests := []struct {
		name  string
		g, c  []float64 // row-major n×n
		start complex128
		want  complex128
		real  bool
	}{
		// Diagonal: det = (2 + t)(5 + t)(−1 + 3t): roots −2, −5, 1/3.
		{"diagonal, root −2", []float64{2, 0, 0, 0, 5, 0, 0, 0, -1}, []float64{1, 0, 0, 0, 1, 0, 0, 0, 3},
			-2.1, -2, true},
		{"diagonal, root 1/3", []float64{2, 0, 0, 0, 5, 0, 0, 0, -1}, []float64{1, 0, 0, 0, 1, 0, 0, 0, 3},
			0.3, complex(1.0/3, 0), true},
		// Non-normal upper triangular: roots −g_ii/c_ii whatever the
		// coupling above the diagonal: −1 and −4.
		{"non-normal, root −4", []float64{1, 30, 0, 4}, []float64{1, 0, 0, 1}, -3.7, -4, true},
		// A rotation block: det(g + t·I) = (t + 1)² + 4, roots −1 ± 2j.
		{"complex pair, root −1+2j", []float64{1, -2, 2, 1}, []float64{1, 0, 0, 1}, complex(-0.9, 2.1), complex(-1, 2), false},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			n := int(math.Sqrt(float64(len(tt.g))))
			p := &scaledPencil{n: n, g: tt.g, c: tt.c}
			x := make([]complex128, n)
			y := make([]complex128, n)
			for i := range x { // rough vectors: every component present
				x[i] = complex(1+0.1*float64(i), 0)
				y[i] = complex(1-0.1*float64(i), 0)
			}
			var f cdense.LU
			got, ok := rqi(&f, p, tt.start, x, y, tt.real)
			if !ok {
				t.Fatalf("no convergence (last %v)", got)
			}
			if cmplx.Abs(got-tt.want) > 1e-13*cmplx.Abs(tt.want) {
				t.Errorf("root %v, want %v", got, tt.want)
			}
			if tt.real && imag(got) != 0 {
				t.Errorf("real root came back complex: %v", got)
			}
		})
	}
}
