package cdense_test

import (
	"fmt"
	"math"
	"math/cmplx"

	"tangent/internal/cdense"
)

// The two-section RC filter ahead of a Brightwater Instruments soil probe's
// converter (R1 = R2 = 10 kΩ, C1 = 10 nF, C2 = 1 nF), driven by 1 V through
// R1, at 1 kHz: the node equations Y·v = i with Y = G + jω·C (siemens) and
// the source as a Norton current 1 V/R1 into node a.
func Example() {
	const (
		r1, r2 = 10e3, 10e3
		c1, c2 = 10e-9, 1e-9
	)
	w := 2 * math.Pi * 1e3
	y := []complex128{
		complex(1/r1+1/r2, w*c1), complex(-1/r2, 0),
		complex(-1/r2, 0), complex(1/r2, w*c2),
	}
	var f cdense.LU
	if f.Factor(y, 2) != 0 {
		fmt.Println("singular")
		return
	}
	v := []complex128{1 / r1, 0}
	f.Solve(v)
	for i, name := range []string{"a", "out"} {
		fmt.Printf("v(%s) = %.4f V at %.2f°\n", name, cmplx.Abs(v[i]), cmplx.Phase(v[i])*180/math.Pi)
	}
	// Output:
	// v(a) = 0.8205 V at -34.54°
	// v(out) = 0.8189 V at -38.13°
}
