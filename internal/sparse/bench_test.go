package sparse

import (
	"math/rand/v2"
	"testing"
)

// circuit42 returns the matrix the small benchmarks use: 42 unknowns
// (41 nodes in a chain of stages, each tied to nodes at most 4 away, and
// one source branch), 163 structural nonzeros, as the Newton matrix of a
// 10-transistor circuit has.
func circuit42() (*Matrix, [][2]int) {
	rng := rand.New(rand.NewPCG(5, 2))
	m, pos := circuitLike(rng, 42, 1, 4)
	fillValues(rng, m)
	return m, pos
}

// benchMatrices are the matrices the analysis and refactor benchmarks
// run on: the 42-unknown circuit42, a chain of 100 unknowns (three source
// branches) and one of 300 (30 branches, wider reach).
func benchMatrices() []struct {
	name string
	m    *Matrix
} {
	rng := rand.New(rand.NewPCG(5, 2))
	m100, _ := circuitLike(rng, 100, 3, 4)
	fillValues(rng, m100)
	rng = rand.New(rand.NewPCG(1, 2))
	m300, _ := circuitLike(rng, 300, 30, 6)
	fillValues(rng, m300)
	m42, _ := circuit42()
	return []struct {
		name string
		m    *Matrix
	}{{"n=42", m42}, {"n=100", m100}, {"n=300", m300}}
}

// BenchmarkAnalyse times a first factorization: the pivot analysis and
// the layout of the factors.
func BenchmarkAnalyse(b *testing.B) {
	for _, bm := range benchMatrices() {
		b.Run(bm.name, func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				var f LU
				if err := f.Factor(bm.m); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkRefactor refactors with every value changed (two value sets in
// turn), so no row's factors can be kept.
func BenchmarkRefactor(b *testing.B) {
	for _, bm := range benchMatrices() {
		m := bm.m
		b.Run(bm.name, func(b *testing.B) {
			sets := [2][]float64{append([]float64(nil), m.Values...), make([]float64, m.Len())}
			for s, v := range sets[0] {
				sets[1][s] = v * 1.001
			}
			var f LU
			if err := f.Factor(m); err != nil {
				b.Fatal(err)
			}
			b.ReportMetric(float64(f.Fill()), "fill")
			b.ReportAllocs()
			k := 0
			for b.Loop() {
				copy(m.Values, sets[k%2])
				k++
				if err := f.Factor(m); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkSolve42 times one forward and back substitution.
func BenchmarkSolve42(b *testing.B) {
	m, _ := circuit42()
	var f LU
	if err := f.Factor(m); err != nil {
		b.Fatal(err)
	}
	x := make([]float64, m.N())
	for i := range x {
		x[i] = float64(i%7) - 3
	}
	b.ReportAllocs()
	for b.Loop() {
		f.Solve(x, x)
	}
}

// pattern42Calls returns the Slot calls of a nodal matrix of 42 unknowns
// built as a circuit program does: four positions for every two-terminal
// conductance (two of them diagonal, so positions repeat), then the
// diagonal once more: about 380 calls.
func pattern42Calls() [][2]int {
	_, pos := circuit42()
	var calls [][2]int
	for _, p := range pos {
		i, j := p[0], p[1]
		if i == j {
			continue
		}
		if i < j {
			calls = append(calls, [2]int{i, i}, [2]int{i, j}, [2]int{j, i}, [2]int{j, j})
		}
	}
	for i := 0; i < 42; i++ {
		calls = append(calls, [2]int{i, i})
	}
	return calls
}

// BenchmarkPattern42 builds the pattern of pattern42Calls (size hint: the
// number of calls, as an upper bound on the positions) and its matrix.
func BenchmarkPattern42(b *testing.B) {
	calls := pattern42Calls()
	b.ReportMetric(float64(len(calls)), "calls")
	b.ReportAllocs()
	for b.Loop() {
		p := NewPatternSize(42, len(calls))
		for _, c := range calls {
			p.Slot(c[0], c[1])
		}
		if m := p.Matrix(); m.Len() == 0 {
			b.Fatal("empty")
		}
	}
}
