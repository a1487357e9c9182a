package cdense

import (
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// The three solves, by the operator they apply the inverse of.
var solves = []struct {
	name  string
	solve func(*LU, []complex128)
	op    func(a []complex128, n int) []complex128 // op(A), row-major
}{
	{"Solve", (*LU).Solve, func(a []complex128, n int) []complex128 { return append([]complex128(nil), a...) }},
	{"SolveT", (*LU).SolveT, func(a []complex128, n int) []complex128 { return transpose(a, n, false) }},
	{"SolveH", (*LU).SolveH, func(a []complex128, n int) []complex128 { return transpose(a, n, true) }},
}

func transpose(a []complex128, n int, conj bool) []complex128 {
	t := make([]complex128, n*n)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			v := a[i*n+j]
			if conj {
				v = cmplx.Conj(v)
			}
			t[j*n+i] = v
		}
	}
	return t
}

// A 2×2 system against Cramer's rule (closed form). a₁₁ = 0 forces a row
// interchange.
func TestSolve2x2Cramer(t *testing.T) {
	a := []complex128{0, 1 + 2i, 3 - 1i, 4}
	b := []complex128{2 - 1i, -1 + 5i}
	var f LU
	if r := f.Factor(a, 2); r != 0 {
		t.Fatalf("Factor replaced %d pivots of a nonsingular matrix", r)
	}
	for _, tc := range solves {
		m := tc.op(a, 2)
		// Cramer: x₁ = (b₁·m₂₂ − m₁₂·b₂)/det, x₂ = (m₁₁·b₂ − m₂₁·b₁)/det.
		det := m[0]*m[3] - m[1]*m[2]
		want := []complex128{(b[0]*m[3] - m[1]*b[1]) / det, (m[0]*b[1] - m[2]*b[0]) / det}
		x := append([]complex128(nil), b...)
		tc.solve(&f, x)
		for i := range x {
			if cmplx.Abs(x[i]-want[i]) > 8*epsilon*cmplx.Abs(want[i]) {
				t.Errorf("%s: x[%d] = %v, want %v (Cramer's rule)", tc.name, i, x[i], want[i])
			}
		}
	}
}

// randomMatrix has standard normal real and imaginary parts, with about a
// fifth of the off-diagonal entries zero (so that eliminations skip zero
// multipliers).
func randomMatrix(rng *rand.Rand, n int) []complex128 {
	a := make([]complex128, n*n)
	for i := range a {
		if i%(n+1) == 0 || rng.Float64() < 0.8 {
			a[i] = complex(rng.NormFloat64(), rng.NormFloat64())
		}
	}
	return a
}

// realForm returns the 2n×2n real matrix [Re A, −Im A; Im A, Re A], which
// maps [Re x; Im x] to [Re A·x; Im A·x].
func realForm(a []complex128, n int) *mat.Dense {
	m := mat.NewDense(2*n, 2*n, nil)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			v := a[i*n+j]
			m.Set(i, j, real(v))
			m.Set(i, n+j, -imag(v))
			m.Set(n+i, j, imag(v))
			m.Set(n+i, n+j, real(v))
		}
	}
	return m
}

func normInf(x []complex128) float64 {
	var m float64
	for _, v := range x {
		m = math.Max(m, cmplx.Abs(v))
	}
	return m
}

// Random matrices, every solve, against gonum's real LU of the equivalent
// real system (a general-purpose library), and by the normwise backward
// error ‖b − op(A)·x‖∞ / (‖op(A)‖∞·‖x‖∞), which LU with partial pivoting
// keeps to a small multiple of n·ε for matrices with modest element growth
// (Higham, Accuracy and Stability of Numerical Algorithms, ch. 9; from
// memory).
func TestSolveRandom(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	var f LU
	for _, n := range []int{1, 2, 3, 7, 20, 60} {
		for trial := 0; trial < 3; trial++ {
			a := randomMatrix(rng, n)
			if r := f.Factor(a, n); r != 0 {
				t.Fatalf("n=%d: Factor replaced %d pivots of a random matrix", n, r)
			}
			for _, tc := range solves {
				m := tc.op(a, n)
				b := make([]complex128, n)
				for i := range b {
					b[i] = complex(rng.NormFloat64(), rng.NormFloat64())
				}
				x := append([]complex128(nil), b...)
				tc.solve(&f, x)

				var ref mat.LU
				ref.Factorize(realForm(m, n))
				cond := ref.Cond()
				if cond > 1e8 {
					continue // too ill-conditioned to compare forward errors
				}
				rb := mat.NewVecDense(2*n, nil)
				for i, v := range b {
					rb.SetVec(i, real(v))
					rb.SetVec(n+i, imag(v))
				}
				if err := ref.SolveVecTo(rb, false, rb); err != nil {
					t.Fatal(err)
				}
				var diff, scale float64
				for i := range x {
					w := complex(rb.AtVec(i), rb.AtVec(n+i))
					diff = math.Max(diff, cmplx.Abs(x[i]-w))
					scale = math.Max(scale, cmplx.Abs(w))
				}
				// Forward error ≤ κ·(backward error), both solvers.
				if tol := 64 * float64(n) * epsilon * cond; diff > tol*scale {
					t.Errorf("n=%d %s: ‖x − x_gonum‖∞ = %.3g·‖x‖∞ > %.3g (κ₁ = %.3g)", n, tc.name, diff/scale, tol, cond)
				}

				var res, anorm float64
				for i := 0; i < n; i++ {
					s, rowSum := b[i], 0.0
					for j := 0; j < n; j++ {
						s -= m[i*n+j] * x[j]
						rowSum += cmplx.Abs(m[i*n+j])
					}
					res = math.Max(res, cmplx.Abs(s))
					anorm = math.Max(anorm, rowSum)
				}
				if eta := res / (anorm * normInf(x)); eta > 8*float64(n)*epsilon {
					t.Errorf("n=%d %s: backward error %.3g > 8·n·ε", n, tc.name, eta)
				}
			}
		}
	}
}

// collinear reports whether x is a multiple of v to a relative tolerance
// tol: |xᵢ·vⱼ − xⱼ·vᵢ| ≤ tol·‖x‖∞·‖v‖∞ for all i, j.
func collinear(x, v []complex128, tol float64) bool {
	s := normInf(x) * normInf(v)
	if s == 0 || math.IsInf(s, 0) || math.IsNaN(s) {
		return false
	}
	for i := range x {
		for j := range x {
			if cmplx.Abs(x[i]*v[j]-x[j]*v[i]) > tol*s {
				return false
			}
		}
	}
	return true
}

// Singular matrices: Factor replaces each zero pivot, and the solves then
// return multiples of the null vectors, the behaviour inverse iteration
// relies on. Null vectors by hand (closed form).
func TestSingular(t *testing.T) {
	const c = 1 + 1i
	for _, tc := range []struct {
		name     string
		n        int
		a        []complex128
		replaced int
		// Null vectors: A·x = 0, Aᵀ·w = 0, Aᴴ·z = 0 (nil: not checked).
		x, w, z []complex128
	}{
		// Row 2 = c·row 1; after the interchange the second pivot is
		// exactly 2 − (1/c)·2c = 0.
		{"rank 1, 2×2", 2, []complex128{1, 2, c, 2 * c}, 1,
			[]complex128{2, -1}, []complex128{c, -1}, []complex128{cmplx.Conj(c), -1}},
		// A zero column: the first pivot is zero.
		{"zero column, 3×3", 3, []complex128{0, 1, 2i, 0, 3, 1, 0, 1i, 4}, 1,
			[]complex128{1, 0, 0}, nil, nil},
		// An outer product u·vᵀ has rank 1: two zero pivots. vᵀ·x = 0 for
		// x = (2, −1, 0); wᵀ·u = 0 for w = (0, 1, −2).
		{"outer product, 3×3", 3, []complex128{1, 2, 4, 2, 4, 8, 1, 2, 4}, 2, nil, nil, nil},
	} {
		var f LU
		if r := f.Factor(tc.a, tc.n); r != tc.replaced {
			t.Errorf("%s: Factor replaced %d pivots, want %d", tc.name, r, tc.replaced)
		}
		for k, want := range [][]complex128{tc.x, tc.w, tc.z} {
			if want == nil {
				continue
			}
			x := make([]complex128, tc.n)
			for i := range x {
				x[i] = complex(1+0.3*float64(i), 0.1)
			}
			solves[k].solve(&f, x)
			if !collinear(x, want, 1e-12) {
				t.Errorf("%s: %s gives %v, not a multiple of the null vector %v", tc.name, solves[k].name, x, want)
			}
		}
	}

	// A = 0: the first pivot becomes the smallest subnormal, whose
	// reciprocal overflows, so the factors and solutions are NaN (the
	// documented limit; a zero pencil matrix does not arise in practice).
	var f LU
	if r := f.Factor(make([]complex128, 9), 3); r != 1 {
		t.Errorf("zero 3×3: Factor replaced %d pivots, want 1", r)
	}
	x := []complex128{1, 2, 3}
	f.Solve(x)
	for _, v := range x {
		if !cmplx.IsNaN(v) {
			t.Errorf("zero 3×3: Solve gives %v, want NaN", x)
			break
		}
	}
}

// Factor keeps a unchanged, and a factorization with storage left over
// from a larger one is bit for bit that of a fresh LU.
func TestFactorReuse(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	var f LU
	for _, n := range []int{6, 3, 0, 5, 6} {
		a := randomMatrix(rng, n)
		keep := append([]complex128(nil), a...)
		f.Factor(a, n)
		var fresh LU
		fresh.Factor(a, n)
		for i := range a {
			if a[i] != keep[i] {
				t.Fatalf("n=%d: Factor modified a[%d]", n, i)
			}
		}
		for _, tc := range solves {
			x := make([]complex128, n)
			for i := range x {
				x[i] = complex(rng.NormFloat64(), rng.NormFloat64())
			}
			y := append([]complex128(nil), x...)
			tc.solve(&f, x)
			tc.solve(&fresh, y)
			for i := range x {
				if x[i] != y[i] && !(cmplx.IsNaN(x[i]) && cmplx.IsNaN(y[i])) {
					t.Errorf("n=%d %s: reused %v, fresh %v", n, tc.name, x[i], y[i])
				}
			}
		}
	}
}

// Factor allocates nothing once its storage is large enough; the solves
// never allocate.
func TestZeroAllocs(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	big, small := randomMatrix(rng, 12), randomMatrix(rng, 7)
	x := make([]complex128, 7)
	var f LU
	f.Factor(big, 12)
	allocs := testing.AllocsPerRun(20, func() {
		f.Factor(small, 7)
		f.Solve(x)
		f.SolveT(x)
		f.SolveH(x)
		f.Factor(big, 12)
	})
	if allocs != 0 {
		t.Errorf("Factor and solves: %v allocations a run, want 0", allocs)
	}
}

// Misuse panics with a package-prefixed message.
func TestPanics(t *testing.T) {
	var f LU
	f.Factor(make([]complex128, 4), 2)
	for _, tc := range []struct {
		name string
		call func()
	}{
		{"Factor short slice", func() { f.Factor(make([]complex128, 3), 2) }},
		{"Factor negative n", func() { f.Factor(nil, -1) }},
		{"Solve wrong length", func() { f.Solve(make([]complex128, 3)) }},
		{"SolveT wrong length", func() { f.SolveT(make([]complex128, 1)) }},
		{"SolveH wrong length", func() { f.SolveH(nil) }},
	} {
		func() {
			defer func() {
				msg, _ := recover().(string)
				if !strings.HasPrefix(msg, "cdense: ") {
					t.Errorf("%s: panic %q, want a message prefixed cdense:", tc.name, msg)
				}
			}()
			tc.call()
		}()
	}
}

func BenchmarkFactorSolve(b *testing.B) {
	for _, n := range []int{20, 100, 300} {
		a := randomMatrix(rand.New(rand.NewPCG(7, 8)), n)
		x := make([]complex128, n)
		for i := range x {
			x[i] = 1
		}
		var f LU
		b.Run(fmt.Sprint(n), func(b *testing.B) {
			for b.Loop() {
				f.Factor(a, n)
				f.Solve(x)
				f.SolveT(x)
			}
		})
	}
}
