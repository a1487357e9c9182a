package explain

import (
	"math"

	"gonum.org/v1/gonum/mat"
)

// Row-major dense helpers: an n×n matrix is a slice of length n·n with
// stride n.

// abs1 is |re| + |im|, the cheap magnitude that the pivot search of
// cdense.LU compares.
func abs1(z complex128) float64 { return math.Abs(real(z)) + math.Abs(imag(z)) }

// pow2 returns the largest power of two not above x > 0: a scale factor
// that adds no rounding error.
func pow2(x float64) float64 {
	_, e := math.Frexp(x)
	return math.Ldexp(1, e-1)
}

// equilibrate returns power-of-two row and column scales r, c that bring
// the largest entry of every row, then of every column, of the n×n matrix
// with entries at(i, j) into (0.5, 1]: circuit matrices mix siemens,
// dimensionless incidence and farads over many decades, and pivoting and
// rank decisions are only meaningful after such scaling. A zero row or
// column keeps the scale 1.
func equilibrate(n int, at func(i, j int) float64) (r, c []float64) {
	r, c = make([]float64, n), make([]float64, n)
	for i := 0; i < n; i++ {
		var m float64
		for j := 0; j < n; j++ {
			m = math.Max(m, math.Abs(at(i, j)))
		}
		r[i] = 1
		if m > 0 {
			r[i] = pow2(1 / m)
		}
	}
	for j := 0; j < n; j++ {
		var m float64
		for i := 0; i < n; i++ {
			m = math.Max(m, math.Abs(r[i]*at(i, j)))
		}
		c[j] = 1
		if m > 0 {
			c[j] = pow2(1 / m)
		}
	}
	return r, c
}

// minRcond is the reciprocal condition number (1-norm estimate, after
// equilibration) below which a real matrix is treated as singular: the
// threshold package ac uses for its direct solves, about 450·ε.
const minRcond = 1e-13

// realSolver solves A·x = b for a real n×n matrix after power-of-two
// equilibration, Â = R·A·Cs, A⁻¹ = Cs·Â⁻¹·R.
type realSolver struct {
	n    int
	r, c []float64
	lu   mat.LU
}

// newRealSolver factors a (row-major, n×n; not kept). ok is false when a is
// singular to working precision.
func newRealSolver(a []float64, n int) (*realSolver, bool) {
	if n == 0 {
		return &realSolver{}, true
	}
	r, c := equilibrate(n, func(i, j int) float64 { return a[i*n+j] })
	s := make([]float64, n*n)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			s[i*n+j] = r[i] * a[i*n+j] * c[j]
		}
	}
	rs := &realSolver{n: n, r: r, c: c}
	rs.lu.Factorize(mat.NewDense(n, n, s))
	if rc := 1 / rs.lu.Cond(); !(rc >= minRcond) {
		return nil, false
	}
	return rs, true
}

// solve returns A⁻¹·b.
func (rs *realSolver) solve(b []float64) []float64 {
	n := rs.n
	x := make([]float64, n)
	if n == 0 {
		return x
	}
	for i := range x {
		x[i] = rs.r[i] * b[i]
	}
	v := mat.NewVecDense(n, x)
	if err := rs.lu.SolveVecTo(v, false, v); err != nil {
		// Cond was checked at factorization; a failure here would be a
		// bug of ours, and a NaN result says so to every caller.
		for i := range x {
			x[i] = math.NaN()
		}
		return x
	}
	for i := range x {
		x[i] = rs.c[i] * v.AtVec(i)
	}
	return x
}
