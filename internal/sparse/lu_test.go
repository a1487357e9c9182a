package sparse

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// randomCircuitLike returns a pattern like a nodal matrix: a nonzero
// diagonal for the first nodes, symmetric off-diagonal pairs, and a few
// zero-diagonal "branch" rows with ±1 incidence (as voltage sources give).
func randomCircuitLike(rng *rand.Rand, n, branches int) (*Matrix, [][2]int) {
	return circuitLike(rng, n, branches, n)
}

// circuitLike is randomCircuitLike with each node tied only to nodes at
// most reach indices away, as in a chain of amplifier stages.
func circuitLike(rng *rand.Rand, n, branches, reach int) (*Matrix, [][2]int) {
	p := NewPattern(n)
	var pos [][2]int
	add := func(i, j int) {
		p.Slot(i, j)
		pos = append(pos, [2]int{i, j})
	}
	nodes := n - branches
	for i := 0; i < nodes; i++ {
		add(i, i)
		for k := 0; k < 2; k++ {
			j := i + rng.IntN(2*reach+1) - reach
			if j < 0 || j >= nodes {
				continue
			}
			if j != i {
				add(i, j)
				add(j, i)
			}
		}
	}
	for b := nodes; b < n; b++ {
		j := b - nodes // distinct nodes, as independent sources need
		add(b, j)
		add(j, b)
	}
	return p.Matrix(), pos
}

func fillValues(rng *rand.Rand, m *Matrix) {
	for s := range m.Values {
		i, j := m.Position(s)
		switch {
		case i == j:
			m.Values[s] = 5 + rng.Float64()
		default:
			m.Values[s] = rng.Float64()*2 - 1
		}
	}
}

func dense(m *Matrix) *mat.Dense {
	d := mat.NewDense(m.N(), m.N(), nil)
	for s, v := range m.Values {
		i, j := m.Position(s)
		d.Set(i, j, d.At(i, j)+v)
	}
	return d
}

// The reference is gonum's dense LU solve (a general-purpose library).
func checkSolve(t *testing.T, f *LU, m *Matrix, rng *rand.Rand) {
	t.Helper()
	n := m.N()
	b := make([]float64, n)
	for i := range b {
		b[i] = rng.Float64()*2 - 1
	}
	x := make([]float64, n)
	f.Solve(x, b)
	var want mat.VecDense
	if err := want.SolveVec(dense(m), mat.NewVecDense(n, append([]float64(nil), b...))); err != nil {
		t.Fatalf("gonum: %v", err)
	}
	for i := range x {
		if d := math.Abs(x[i] - want.AtVec(i)); d > 1e-9*(1+math.Abs(want.AtVec(i))) {
			t.Fatalf("x[%d] = %g, gonum gives %g", i, x[i], want.AtVec(i))
		}
	}
	// Residual check: A·x = b.
	r := make([]float64, n)
	m.MulVec(r, x)
	for i := range r {
		if math.Abs(r[i]-b[i]) > 1e-10 {
			t.Fatalf("residual row %d: %g", i, r[i]-b[i])
		}
	}
}

func TestFactorAgainstDense(t *testing.T) {
	for _, tc := range []struct{ n, branches int }{{1, 0}, {5, 1}, {40, 6}, {300, 30}} {
		rng := rand.New(rand.NewPCG(uint64(tc.n), 7))
		m, _ := randomCircuitLike(rng, tc.n, tc.branches)
		fillValues(rng, m)
		var f LU
		if err := f.Factor(m); err != nil {
			t.Fatalf("n=%d: %v", tc.n, err)
		}
		checkSolve(t, &f, m, rng)
		// New values, same pattern: refactorization.
		for it := 0; it < 5; it++ {
			fillValues(rng, m)
			if err := f.Factor(m); err != nil {
				t.Fatalf("n=%d refactor: %v", tc.n, err)
			}
			checkSolve(t, &f, m, rng)
		}
	}
}

// A pivot that becomes tiny forces a new analysis, and the result stays right.
func TestRepivot(t *testing.T) {
	p := NewPattern(2)
	s00, s01, s10, s11 := p.Slot(0, 0), p.Slot(0, 1), p.Slot(1, 0), p.Slot(1, 1)
	m := p.Matrix()
	m.Values[s00], m.Values[s01], m.Values[s10], m.Values[s11] = 4, 1, 1, 3
	var f LU
	if err := f.Factor(m); err != nil {
		t.Fatal(err)
	}
	if f.rowPerm[0] != 0 || f.colPerm[0] != 0 {
		t.Fatalf("first pivot (%d, %d), want (0, 0)", f.rowPerm[0], f.colPerm[0])
	}
	first := f.Analyses
	m.Values[s00] = 0 // [[0 1] [1 3]]: the old first pivot is now zero
	if err := f.Factor(m); err != nil {
		t.Fatal(err)
	}
	if f.Analyses != first+1 {
		t.Errorf("analyses = %d, want %d", f.Analyses, first+1)
	}
	x := make([]float64, 2)
	f.Solve(x, []float64{2, 7}) // y = 2, x + 3y = 7 → x = 1 (by hand)
	if math.Abs(x[0]-1) > 1e-15 || math.Abs(x[1]-2) > 1e-15 {
		t.Errorf("x = %v, want [1 2]", x)
	}
}

func TestSingular(t *testing.T) {
	// Structural: row 1 has no entry.
	p := NewPattern(2)
	p.Slot(0, 0)
	p.Slot(0, 1)
	m := p.Matrix()
	m.Values[0], m.Values[1] = 1, 1
	var f LU
	err := f.Factor(m)
	var se *SingularError
	if !errors.As(err, &se) || !se.Structural || len(se.Rows) != 1 || se.Rows[0] != 1 {
		t.Fatalf("err = %v, want structural singularity at row 1", err)
	}
	rows, cols := p.StructuralDefect()
	if len(rows) != 1 || rows[0] != 1 || len(cols) != 1 {
		t.Errorf("defect rows %v cols %v", rows, cols)
	}
	// Numerical: full pattern, rank one.
	p = NewPattern(2)
	for i := 0; i < 2; i++ {
		for j := 0; j < 2; j++ {
			p.Slot(i, j)
		}
	}
	m = p.Matrix()
	copy(m.Values, []float64{1, 2, 2, 4})
	err = (&LU{}).Factor(m)
	if !errors.As(err, &se) || se.Structural {
		t.Fatalf("err = %v, want numerical singularity", err)
	}
	if r, c := p.StructuralDefect(); len(r)+len(c) != 0 {
		t.Errorf("full pattern reported defect %v %v", r, c)
	}
}

// Kuhn's matching must find a perfect matching that needs augmenting
// paths: rows 0 and 1 both prefer column 0.
func TestStructuralDefectAugments(t *testing.T) {
	p := NewPattern(3)
	p.Slot(0, 0)
	p.Slot(1, 0)
	p.Slot(1, 1)
	p.Slot(2, 1)
	p.Slot(2, 2)
	p.Slot(0, 1)
	if r, c := p.StructuralDefect(); len(r)+len(c) != 0 {
		t.Errorf("defect %v %v, want none", r, c)
	}
}

func TestRefactorAllocatesNothing(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 3))
	m, _ := randomCircuitLike(rng, 200, 20)
	fillValues(rng, m)
	var f LU
	if err := f.Factor(m); err != nil {
		t.Fatal(err)
	}
	b := make([]float64, m.N())
	x := make([]float64, m.N())
	allocs := testing.AllocsPerRun(20, func() {
		m.Values[0] *= 1.0001
		if err := f.Factor(m); err != nil {
			t.Fatal(err)
		}
		f.Solve(x, b)
	})
	if allocs != 0 {
		t.Errorf("refactor+solve allocates %v times", allocs)
	}
}

// A re-analysis of a small matrix (forced here by calling analyse
// directly) reuses the factorization's storage and keeps its temporaries
// on the stack.
func TestReanalysisAllocatesNothing(t *testing.T) {
	rng := rand.New(rand.NewPCG(4, 4))
	m, _ := circuitLike(rng, 42, 1, 4)
	fillValues(rng, m)
	var f LU
	if err := f.Factor(m); err != nil {
		t.Fatal(err)
	}
	allocs := testing.AllocsPerRun(20, func() {
		if err := f.analyse(m); err != nil {
			t.Fatal(err)
		}
	})
	if allocs != 0 {
		t.Errorf("re-analysis allocates %v times", allocs)
	}
}

// Refactoring with only some rows' values changed (as in a Newton
// iteration, where only the devices' entries move) recomputes just the
// rows that depend on them, and gives the same factors, bit for bit, as
// recomputing every row.
func TestRefactorKeepsUnchangedRows(t *testing.T) {
	rng := rand.New(rand.NewPCG(8, 8))
	m, _ := circuitLike(rng, 120, 12, 5)
	fillValues(rng, m)
	var f, full LU // full recomputes every row: the reference
	if err := f.Factor(m); err != nil {
		t.Fatal(err)
	}
	if err := full.Factor(m); err != nil {
		t.Fatal(err)
	}
	same := func(a, b []float64) bool {
		for i := range a {
			if math.Float64bits(a[i]) != math.Float64bits(b[i]) {
				return false
			}
		}
		return len(a) == len(b)
	}
	for round := 0; round < 6; round++ {
		for s := range m.Values {
			if i, _ := m.Position(s); i%7 == round {
				m.Values[s] *= 1.01
			}
		}
		full.aValid = false
		if err := f.Factor(m); err != nil {
			t.Fatal(err)
		}
		if err := full.Factor(m); err != nil {
			t.Fatal(err)
		}
		if f.Analyses != 1 || full.Analyses != 1 {
			t.Fatalf("round %d: %d and %d analyses, want 1", round, f.Analyses, full.Analyses)
		}
		kept := 0
		for _, c := range f.rowChanged {
			if c == 0 {
				kept++
			}
		}
		if round > 0 && kept == 0 {
			t.Errorf("round %d: every row recomputed", round)
		}
		if !same(f.lVal, full.lVal) || !same(f.uVal, full.uVal) || !same(f.uDiag, full.uDiag) {
			t.Fatalf("round %d: factors differ from recomputing every row", round)
		}
	}
}
