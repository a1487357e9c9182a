package dc

import (
	"errors"
	"path/filepath"
	"testing"

	"tangent/cases"
)

// The circuits in testdata/hard defeat plain Newton-Raphson from zero (each
// file says why). Every one must converge with the fallbacks; the table
// records which method solved it, and whether source ramping alone (with
// conductance continuation skipped) also does.
func TestHardCircuits(t *testing.T) {
	tests := []struct {
		file       string
		method     Method
		rampAlone  bool
		checkNodes map[string]float64 // V, to 1 mV, from the hand analysis in the file (where one is given)
	}{
		{"beta_multiplier.toml", ConductanceContinuation, false, nil},
		{"beta_multiplier_startup.toml", ConductanceContinuation, true, nil},
		{"cascode_mirror.toml", ConductanceContinuation, true, nil},
		{"cmos_inverter_switching.toml", ConductanceContinuation, true, map[string]float64{"out": 1.65}},
		{"diff_pair_open_loop.toml", ConductanceContinuation, true, nil},
		{"inverter_ring.toml", ConductanceContinuation, true, map[string]float64{"n1": 1.65, "n2": 1.65, "n3": 1.65}},
		{"latch_cmos.toml", ConductanceContinuation, true, nil},
		{"schmitt_bjt.toml", ConductanceContinuation, true, nil},
		{"schmitt_cmos.toml", ConductanceContinuation, true, nil},
		{"stacked_junctions.toml", ConductanceContinuation, true, nil},
		{"zener_stack.toml", ConductanceContinuation, true, nil},
	}
	files, err := filepath.Glob(filepath.Join("..", "testdata", "hard", "*.toml"))
	if err != nil {
		t.Fatal(err)
	}
	if len(files) != len(tests) {
		t.Errorf("%d files in testdata/hard, %d in the table", len(files), len(tests))
	}
	for _, tt := range tests {
		t.Run(tt.file, func(t *testing.T) {
			c, err := cases.Load(filepath.Join("..", "testdata", "hard", tt.file))
			if err != nil {
				t.Fatal(err)
			}
			_, err = SolveWith(c, Options{NoFallbacks: true})
			var nc *NoConvergenceError
			if !errors.As(err, &nc) {
				t.Fatalf("plain Newton: err = %v, want a *NoConvergenceError", err)
			}
			if len(nc.Attempts) != 1 || nc.Attempts[0].Method != Newton {
				t.Errorf("attempts %+v, want plain Newton only", nc.Attempts)
			}
			op, err := Solve(c)
			if err != nil {
				t.Fatal(err)
			}
			if op.Method != tt.method {
				t.Errorf("solved by %s, want %s", op.Method, tt.method)
			}
			if op.HelperConductance != 0 {
				t.Errorf("helper conductance %g S left in", op.HelperConductance)
			}
			checkBalance(t, op, 1e-9, 1e-14)
			for n, want := range tt.checkNodes {
				if got := nodeV(t, op, n); !near(got, want, 0, 1e-3) {
					t.Errorf("V(%s) = %g V, want %g V", n, got, want)
				}
			}
			ramp, err := SolveWith(c, Options{Fallbacks: []Method{SourceRamp}})
			if tt.rampAlone {
				if err != nil {
					t.Errorf("source ramp alone: %v", err)
				} else {
					checkBalance(t, ramp, 1e-9, 1e-14)
				}
			} else if err == nil {
				t.Errorf("source ramp alone converged (by %s); the table says it does not", ramp.Method)
			}
		})
	}
}
