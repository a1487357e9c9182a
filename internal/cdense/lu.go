// Package cdense factors dense complex matrices: LU with partial pivoting,
// for the inverse and Rayleigh-quotient iterations of packages ac and
// explain. gonum has no complex LU; the matrices here have at most a few
// hundred rows, where a plain O(n³) elimination is quick enough.
package cdense

import (
	"fmt"
	"math"
	"math/cmplx"
)

// epsilon is the float64 machine epsilon, 2⁻⁵², the spacing of floats at 1.
const epsilon = 0x1p-52

// LU is the LU factorization with partial pivoting of an n×n complex
// matrix A,
//
//	P·A = L·U,
//
// L unit lower triangular and U upper triangular, both stored row-major in
// one n×n slice (entry (i, j) at i·n + j, L's unit diagonal implied). P is
// the sequence of row interchanges piv: at step k, row k was swapped with
// row piv[k] ≥ k, the row of the column's entry of largest |re| + |im|
// (the first one on a tie).
//
// A zero pivot (A singular to working precision, as it is at an
// eigenvalue) is replaced by ε·max|aᵢⱼ|, ε = 2⁻⁵²: the usual remedy of
// inverse iteration, where a solve then returns a large multiple of a null
// vector instead of Inf or NaN. Factor counts the pivots it replaced; a
// caller that needs a nonsingular A must check that count. No condition
// estimate is made. The remedy needs A scaled to entries above about
// 1e-290: below, ε·max|aᵢⱼ| (the smallest subnormal when A = 0) has no
// finite reciprocal, and a replaced pivot fills the factors with NaN.
//
// The zero value is an empty factorization, ready for Factor. The storage
// is kept across calls: factoring again with an n no larger allocates
// nothing.
type LU struct {
	n   int
	lu  []complex128
	piv []int
}

// Factor computes the factorization of the n×n matrix a (row-major,
// len(a) = n·n; a is not modified) into the receiver, replacing any earlier
// one, and returns the number of zero pivots replaced (0 for a matrix
// nonsingular to working precision). It panics when len(a) ≠ n·n.
func (f *LU) Factor(a []complex128, n int) (replaced int) {
	if n < 0 || len(a) != n*n {
		panic(fmt.Sprintf("cdense: Factor of a %d-entry slice as %d×%d", len(a), n, n))
	}
	f.n = n
	if cap(f.lu) < n*n {
		f.lu = make([]complex128, n*n)
	}
	if cap(f.piv) < n {
		f.piv = make([]int, n)
	}
	f.lu = f.lu[:n*n]
	f.piv = f.piv[:n]
	lu := f.lu
	copy(lu, a)

	var amax float64
	for _, v := range lu {
		amax = math.Max(amax, cmplx.Abs(v))
	}
	tiny := epsilon * amax
	if tiny == 0 {
		tiny = math.SmallestNonzeroFloat64
	}
	for k := 0; k < n; k++ {
		p, pm := k, abs1(lu[k*n+k])
		for i := k + 1; i < n; i++ {
			if v := abs1(lu[i*n+k]); v > pm {
				p, pm = i, v
			}
		}
		f.piv[k] = p
		rk := lu[k*n : (k+1)*n]
		if p != k {
			rp := lu[p*n : (p+1)*n]
			for j := range rk {
				rk[j], rp[j] = rp[j], rk[j]
			}
		}
		if rk[k] == 0 {
			rk[k] = complex(tiny, 0)
			replaced++
		}
		inv := 1 / rk[k]
		for i := k + 1; i < n; i++ {
			ri := lu[i*n : (i+1)*n]
			l := ri[k] * inv
			ri[k] = l
			if l == 0 {
				continue
			}
			for j := k + 1; j < n; j++ {
				ri[j] -= l * rk[j]
			}
		}
	}
	return replaced
}

// checkLen panics unless x has one entry per row of the factored matrix.
func (f *LU) checkLen(x []complex128, what string) {
	if len(x) != f.n {
		panic(fmt.Sprintf("cdense: %s of a %d-vector with a %d×%d factorization", what, len(x), f.n, f.n))
	}
}

// Solve overwrites x with A⁻¹·x: x ← P·x, then L·y = x forward and
// U·x = y backward. It panics when len(x) ≠ n.
func (f *LU) Solve(x []complex128) {
	f.checkLen(x, "Solve")
	n, a := f.n, f.lu
	for k, p := range f.piv {
		if p != k {
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

// SolveT overwrites x with A⁻ᵀ·x, the plain transpose (no conjugation), as
// for a left null vector wᵀ·A = 0: with Aᵀ = Uᵀ·Lᵀ·P, Uᵀ·y = x forward,
// Lᵀ·z = y backward, then x = Pᵀ·z. It panics when len(x) ≠ n.
func (f *LU) SolveT(x []complex128) {
	f.checkLen(x, "SolveT")
	n, a := f.n, f.lu
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
	f.unpivot(x)
}

// SolveH overwrites x with A⁻ᴴ·x, the conjugate transpose, as for a left
// null vector yᴴ·A = 0: with Aᴴ = Uᴴ·Lᴴ·P, Uᴴ·y = x forward, Lᴴ·z = y
// backward, then x = Pᵀ·z. It panics when len(x) ≠ n.
func (f *LU) SolveH(x []complex128) {
	f.checkLen(x, "SolveH")
	n, a := f.n, f.lu
	for i := 0; i < n; i++ {
		s := x[i]
		for j := 0; j < i; j++ {
			s -= cmplx.Conj(a[j*n+i]) * x[j]
		}
		x[i] = s / cmplx.Conj(a[i*n+i])
	}
	for i := n - 1; i >= 0; i-- {
		s := x[i]
		for j := i + 1; j < n; j++ {
			s -= cmplx.Conj(a[j*n+i]) * x[j]
		}
		x[i] = s
	}
	f.unpivot(x)
}

// unpivot applies Pᵀ: the interchanges of Factor in reverse order.
func (f *LU) unpivot(x []complex128) {
	for k := f.n - 1; k >= 0; k-- {
		if p := f.piv[k]; p != k {
			x[k], x[p] = x[p], x[k]
		}
	}
}

// abs1 is |re| + |im|, a cheap magnitude for pivoting.
func abs1(z complex128) float64 { return math.Abs(real(z)) + math.Abs(imag(z)) }
