package sparse

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"
)

// solveBits factors m with f and returns the bits of the solution of
// m·x = b.
func solveBits(t *testing.T, f *LU, m *Matrix, b []float64) []uint64 {
	t.Helper()
	if err := f.Factor(m); err != nil {
		t.Fatal(err)
	}
	x := make([]float64, m.N())
	f.Solve(x, b)
	out := make([]uint64, len(x))
	for i, v := range x {
		out[i] = math.Float64bits(v)
	}
	return out
}

// An LU restarted from an analysed one gives the same numbers at every
// restart, whatever it did in between (refactors with other values, a
// re-analysis forced by a zero pivot), and never changes the analysed
// LU's order. The solutions are checked against gonum's dense solve
// (checkSolve) and against each other bit for bit (determinism).
func TestRestart(t *testing.T) {
	rng := rand.New(rand.NewPCG(42, 1))
	m, _ := circuitLike(rng, 42, 1, 4)
	fillValues(rng, m)
	start := append([]float64(nil), m.Values...)
	b := make([]float64, m.N())
	for i := range b {
		b[i] = rng.Float64()
	}
	var base LU
	if err := base.Factor(m); err != nil {
		t.Fatal(err)
	}
	order := append(append([]int32(nil), base.rowPerm...), base.colPerm...)
	lCol := append([]int32(nil), base.lCol...)

	var f LU
	f.Restart(&base)
	first := solveBits(t, &f, m, b)
	checkSolve(t, &f, m, rng)
	for round := 0; round < 3; round++ {
		// Other values, then a matrix with a pivot of the order too
		// small: f refactors, then must choose a new order.
		fillValues(rng, m)
		solveBits(t, &f, m, b)
		// A pivot made tiny against the rest of its row, in a row
		// that nothing is eliminated from (so the refactor meets the
		// value itself).
		for step, k := range base.rowPerm {
			if len(m.RowSlots(int(k))) < 2 || base.lStart[step] != base.lStart[step+1] {
				continue
			}
			for _, s := range m.RowSlots(int(k)) {
				if _, j := m.Position(int(s)); int32(j) == base.colPerm[step] {
					m.Values[s] *= 1e-9
				}
			}
			break
		}
		before := f.Analyses
		solveBits(t, &f, m, b)
		if f.Analyses != before+1 {
			t.Fatalf("round %d: no re-analysis (analyses %d)", round, f.Analyses)
		}
		copy(m.Values, start)
		f.Restart(&base)
		if got := solveBits(t, &f, m, b); !slices.Equal(got, first) {
			t.Fatalf("round %d: the restarted solution differs from the first", round)
		}
		if f.Analyses != base.Analyses {
			t.Errorf("round %d: restarted LU analysed again", round)
		}
	}
	if got := append(append([]int32(nil), base.rowPerm...), base.colPerm...); !slices.Equal(got, order) || !slices.Equal(base.lCol, lCol) {
		t.Error("the analysed LU's order or structure changed")
	}
	// Restarting reuses f's own buffers: no allocation.
	if n := testing.AllocsPerRun(10, func() { f.Restart(&base) }); n != 0 {
		t.Errorf("Restart allocates %v times", n)
	}
}
