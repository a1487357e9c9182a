package dc

import (
	"path/filepath"
	"testing"

	"tangent/cases"
)

// The circuits in testdata/dc are ordinary ones with a hand analysis in
// their comments; they must converge (any method) with the balances
// holding, near the hand values.
func TestCaseFiles(t *testing.T) {
	tests := []struct {
		file  string
		nodes map[string]float64 // V
		tol   float64            // V, the hand analysis's accuracy
	}{
		// VBE1 + R2·VT·ln(8)/R3 (file comment).
		{"bandgap_opamp.toml", map[string]float64{"out": 0.597 + 10e3*vtRoom*2.0794415416798357/1e3}, 0.01},
		// 10 µA · (180+1) · ... : V(out) = 10 Ω · Ie2 ≈ 3.8 V (file comment).
		{"darlington_sources.toml", map[string]float64{"out": 3.8}, 0.05},
		{"latch_bjt.toml", map[string]float64{"c1": 1.08, "c2": 1.08}, 0.01},
		// RE carries VT·ln(8) ≈ 53.8 mV (file comment; the 10 MΩ leak and
		// Early effect add a little).
		{"ptat_bjt.toml", map[string]float64{"e2": vtRoom * 2.0794415416798357}, 0.003},
		// Latched on: the anode sits one VBE plus a saturation drop up.
		{"thyristor_bjt.toml", map[string]float64{"anode": 0.8}, 0.05},
	}
	for _, tt := range tests {
		t.Run(tt.file, func(t *testing.T) {
			c, err := cases.Load(filepath.Join("..", "testdata", "dc", tt.file))
			if err != nil {
				t.Fatal(err)
			}
			op, err := Solve(c)
			if err != nil {
				t.Fatal(err)
			}
			checkBalance(t, op, 1e-9, 1e-14)
			for n, want := range tt.nodes {
				if got := nodeV(t, op, n); !near(got, want, 0, tt.tol) {
					t.Errorf("V(%s) = %.4g V, hand analysis %.4g V", n, got, want)
				}
			}
		})
	}
}
