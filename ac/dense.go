package ac

import (
	"math"

	"gonum.org/v1/gonum/blas"
	blasgonum "gonum.org/v1/gonum/blas/gonum"
	"gonum.org/v1/gonum/lapack"
	lapackgonum "gonum.org/v1/gonum/lapack/gonum"
	"gonum.org/v1/gonum/mat"
)

// Row-major dense helpers shared by the pencil, sweep and rational code.
// Every n×n matrix is a []float64 of length n·n with stride n, the layout
// of gonum's lapack and blas implementations.

// epsilon is the float64 machine epsilon, 2⁻⁵², the spacing of floats at
// 1. Tolerances below are multiples of it and say why.
const epsilon = 0x1p-52

var (
	lp lapackgonum.Implementation // stateless (zero-size) lapack
	bl blasgonum.Implementation   // stateless (zero-size) blas
)

// denseCopy returns the entries of m in row-major order and its dimensions.
func denseCopy(m mat.Matrix) ([]float64, int, int) {
	r, c := m.Dims()
	a := make([]float64, r*c)
	for i := 0; i < r; i++ {
		for j := 0; j < c; j++ {
			a[i*c+j] = m.At(i, j)
		}
	}
	return a, r, c
}

func identity(n int) []float64 {
	a := make([]float64, n*n)
	for i := 0; i < n; i++ {
		a[i*n+i] = 1
	}
	return a
}

// frob returns the Frobenius norm of a (any shape, given as a flat slice).
func frob(a []float64) float64 {
	var scale, ssq float64 = 0, 1
	for _, v := range a {
		if v == 0 {
			continue
		}
		av := math.Abs(v)
		if scale < av {
			ssq = 1 + ssq*(scale/av)*(scale/av)
			scale = av
		} else {
			ssq += (av / scale) * (av / scale)
		}
	}
	return scale * math.Sqrt(ssq)
}

// pow2 returns the power of two nearest to x > 0 (in the log sense), so
// that scaling by it is exact.
func pow2(x float64) float64 {
	fr, e := math.Frexp(x) // x = fr·2^e, fr in [0.5, 1)
	if fr < math.Sqrt2/2 {
		e--
	}
	return math.Ldexp(1, e)
}

// subCopy copies the r×c block of the n-stride matrix a at (i0, j0).
func subCopy(a []float64, n, i0, j0, r, c int) []float64 {
	b := make([]float64, r*c)
	for i := 0; i < r; i++ {
		copy(b[i*c:(i+1)*c], a[(i0+i)*n+j0:(i0+i)*n+j0+c])
	}
	return b
}

// gemm computes C = A·B for row-major A (m×k, stride lda), B (k×n, stride
// ldb), C (m×n, stride ldc).
func gemm(m, n, k int, a []float64, lda int, b []float64, ldb int, c []float64, ldc int) {
	if m == 0 || n == 0 {
		return
	}
	if k == 0 {
		for i := 0; i < m; i++ {
			for j := 0; j < n; j++ {
				c[i*ldc+j] = 0
			}
		}
		return
	}
	bl.Dgemm(blas.NoTrans, blas.NoTrans, m, n, k, 1, a, lda, b, ldb, 0, c, ldc)
}

// shiftCandidates are the real shifts σ (in the balanced frequency unit)
// tried in turn for G + σ·C: zero first, then values spread over two
// decades on both sides of the pencil's balanced frequency scale 1. They
// are not powers of two so that they do not land on eigenvalues of
// pencils with dyadic entries.
var shiftCandidates = [...]float64{0, 0.8, 0.4, 1.6, 0.2, 3.2, 0.1, 6.4, -0.8, -1.6, -0.4, -3.2, 0.05, 12.8}

// goodRcond is the reciprocal condition number (1-norm estimate) above
// which a shifted matrix G + σ·C is accepted at once: it loses at most
// about 5 of the 16 digits in the solves built on it.
const goodRcond = 1e-5

// shiftedLU factors F = g + σ·c (m×m) for the first σ of shiftCandidates
// whose estimated reciprocal condition number is at least goodRcond, or the
// best one tried. It returns σ, the LU factors and pivots, and ok = false
// when every candidate is exactly singular.
func shiftedLU(g, c []float64, m int) (sigma float64, lu []float64, ipiv []int, ok bool) {
	best := -1.0
	work := make([]float64, 4*m)
	iwork := make([]int, m)
	f := make([]float64, m*m)
	piv := make([]int, m)
	for _, s := range shiftCandidates {
		for i := range f {
			f[i] = g[i] + s*c[i]
		}
		anorm := lp.Dlange(lapack.MaxColumnSum, m, m, f, m, work)
		if !lp.Dgetrf(m, m, f, m, piv) {
			continue
		}
		rc := lp.Dgecon(lapack.MaxColumnSum, m, f, m, anorm, work, iwork)
		if rc > best {
			best = rc
			sigma = s
			lu = append(lu[:0], f...)
			ipiv = append(ipiv[:0], piv...)
		}
		if rc >= goodRcond {
			break
		}
	}
	return sigma, lu, ipiv, best > 0
}

// abs1 is |re| + |im|, a cheap magnitude for pivoting.
func abs1(z complex128) float64 { return math.Abs(real(z)) + math.Abs(imag(z)) }
