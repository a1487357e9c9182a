package explain

import (
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/mat"
)

// Row-major dense helpers: an n×n matrix is a slice of length n·n with
// stride n.

// epsilon is the float64 machine epsilon, 2⁻⁵².
const epsilon = 0x1p-52

// clu is a dense complex LU factorization with partial pivoting,
//
//	P·A = L·U,
//
// L unit lower triangular and U upper triangular, stored over A; P is the
// row interchanges piv (row k was swapped with row piv[k] at step k).
// gonum has no complex LU; the circuits here have at most a few hundred
// unknowns, where a plain O(n³) elimination is quick enough.
//
// A zero pivot (A singular to working precision, as it is at an
// eigenvalue) is replaced by epsilon·max|A|, the usual remedy of inverse
// iteration: a solve then returns a large multiple of the null vector.
type clu struct {
	n   int
	a   []complex128
	piv []int
}

// factorC factors the n×n matrix a in place (a is kept by the result).
func factorC(a []complex128, n int) *clu {
	f := &clu{n: n, a: a, piv: make([]int, n)}
	var amax float64
	for _, v := range a {
		amax = math.Max(amax, cmplx.Abs(v))
	}
	tiny := epsilon * amax
	if tiny == 0 {
		tiny = math.SmallestNonzeroFloat64
	}
	for k := 0; k < n; k++ {
		p, pm := k, abs1(a[k*n+k])
		for i := k + 1; i < n; i++ {
			if v := abs1(a[i*n+k]); v > pm {
				p, pm = i, v
			}
		}
		f.piv[k] = p
		if p != k {
			rk, rp := a[k*n:(k+1)*n], a[p*n:(p+1)*n]
			for j := range rk {
				rk[j], rp[j] = rp[j], rk[j]
			}
		}
		if a[k*n+k] == 0 {
			a[k*n+k] = complex(tiny, 0)
		}
		inv := 1 / a[k*n+k]
		rk := a[k*n : (k+1)*n]
		for i := k + 1; i < n; i++ {
			l := a[i*n+k] * inv
			a[i*n+k] = l
			if l == 0 {
				continue
			}
			ri := a[i*n : (i+1)*n]
			for j := k + 1; j < n; j++ {
				ri[j] -= l * rk[j]
			}
		}
	}
	return f
}

// solve overwrites x with A⁻¹·x.
func (f *clu) solve(x []complex128) {
	n, a := f.n, f.a
	for k := 0; k < n; k++ {
		if p := f.piv[k]; p != k {
			x[k], x[p] = x[p], x[k]
		}
	}
	for i := 0; i < n; i++ {
		s := x[i]
		for j := 0; j < i; j++ {
			s -= a[i*n+j] * x[j]
		}
		x[i] = s
	}
	for i := n - 1; i >= 0; i-- {
		s := x[i]
		for j := i + 1; j < n; j++ {
			s -= a[i*n+j] * x[j]
		}
		x[i] = s / a[i*n+i]
	}
}

// solveT overwrites x with A⁻ᵀ·x (plain transpose, no conjugation: the
// left eigenvector of the first-order perturbation formula is wᵀ·A = 0).
func (f *clu) solveT(x []complex128) {
	n, a := f.n, f.a
	// Aᵀ = Uᵀ·Lᵀ·P: solve Uᵀ·y = x, Lᵀ·z = y, then x = Pᵀ·z.
	for i := 0; i < n; i++ {
		s := x[i]
		for j := 0; j < i; j++ {
			s -= a[j*n+i] * x[j]
		}
		x[i] = s / a[i*n+i]
	}
	for i := n - 1; i >= 0; i-- {
		s := x[i]
		for j := i + 1; j < n; j++ {
			s -= a[j*n+i] * x[j]
		}
		x[i] = s
	}
	for k := n - 1; k >= 0; k-- {
		if p := f.piv[k]; p != k {
			x[k], x[p] = x[p], x[k]
		}
	}
}

// abs1 is |re| + |im|, a cheap magnitude for pivoting.
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
