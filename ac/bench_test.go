package ac

import (
	"fmt"
	"testing"

	"tangent/cases"
)

// Poles and zeros (Analyze) of generated RC and RLC networks.
func BenchmarkAnalyze(b *testing.B) {
	for _, n := range []int{50, 200, 500} {
		for _, rlc := range []bool{false, true} {
			p := randomNetwork(n, 1, rlc)
			kind := "RC"
			if rlc {
				kind = "RLC"
			}
			b.Run(fmt.Sprintf("%s-%d", kind, n), func(b *testing.B) {
				for i := 0; i < b.N; i++ {
					if _, err := Analyze(p); err != nil {
						b.Fatal(err)
					}
				}
			})
		}
	}
}

// Poles only, on a uniform RC ladder (no finite zeros).
func BenchmarkPolesLadder(b *testing.B) {
	for _, n := range []int{50, 200, 500} {
		p := rcLadder(b, n, 1e3, 1e-9)
		b.Run(fmt.Sprint(n), func(b *testing.B) {
			for i := 0; i < b.N; i++ {
				if _, err := Poles(p); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// A 1,000-point sweep of a 200-node network, reduction included and
// excluded.
func BenchmarkSweep1000(b *testing.B) {
	p := randomNetwork(200, 1, false)
	f := (&cases.Sweep{Start: 10, Stop: 1e8, PointsPerDecade: 143}).Frequencies()[:1000]
	dst := make([]complex128, len(f))
	b.Run("points", func(b *testing.B) {
		sw, err := NewSweeper(p)
		if err != nil {
			b.Fatal(err)
		}
		b.ResetTimer()
		for i := 0; i < b.N; i++ {
			sw.direct = 0
			sw.Response(f, dst)
		}
		b.ReportMetric(float64(sw.direct), "fallbacks")
	})
	b.Run("with-reduction", func(b *testing.B) {
		for i := 0; i < b.N; i++ {
			sw, err := NewSweeper(p)
			if err != nil {
				b.Fatal(err)
			}
			sw.Response(f, dst)
		}
	})
}
