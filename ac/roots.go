package ac

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"sort"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/lapack"
	"gonum.org/v1/gonum/mat"

	"tangent/internal/cdense"
)

// Tolerances of root refinement and tidying, relative to |s|.
const (
	// refineAgain: a first Rayleigh-quotient correction larger than this
	// means the eigenvector estimates were poor (a root far from the
	// spectrum's centre, or in a cluster); the root is then refined by
	// Rayleigh-quotient iteration on the pencil itself.
	refineAgain = 1e-8
	// refineReach: a refined root is accepted only within this distance of
	// its first estimate; a refinement that wanders further has converged
	// to a different root and is discarded.
	refineReach = 1e-2
	// clusterTol: roots closer than this are one multiple root computed
	// with the O(ε^(1/k)) error of a k-fold defective eigenvalue; they are
	// replaced by their mean, which is accurate to O(ε) (Wilkinson, The
	// Algebraic Eigenvalue Problem, 1965, on clusters; from memory).
	clusterTol = 1e-6
)

// PencilRoots returns the finite generalized eigenvalues of the square
// pencil G + s·C, the roots of det(G + s·C) = 0, in rad/s when G is in
// siemens and C in farads (any consistent units in general).
//
// The method (no polynomial is formed; see systemRoots):
//
//  1. balance the pencil by exact power-of-two row, column and frequency
//     scaling (see balance);
//  2. remove the infinite eigenvalues exactly by Gaussian elimination of
//     the unknowns and equations that carry no capacitance or inductance
//     (borderedPencil.reduce), and of the equations that exact row combinations
//     of a singular c expose (a floating capacitor; exposeAlgebraic); a
//     singular pencil is found here and reported as ErrSingularPencil;
//  3. the remaining pencil g + t·c has c nonsingular: the eigenvalues of
//     A = −c⁻¹·g (lapack Dgeev, no vectors) are the roots, as many at
//     t = 0 as g has null vectors being set exactly to zero;
//  4. refine the roots whose estimated error ε·‖A‖_F/|t| exceeds 1e-12
//     by two-sided Rayleigh-quotient iteration on the reduced pencil with
//     banded complex LU solves (see bandPencil, refinePole);
//  5. tidy: roots of a multiple-root cluster (relative spread < 1e-6) are
//     replaced by their mean, real eigenvalues are returned exactly real,
//     conjugate pairs exactly conjugate.
//
// Where step 2 leaves c singular with no exact dependence to explain it
// (not met in circuit matrices so far), the general path takes over:
// an orthogonal staircase with rank decisions at n·ε·‖·‖_F, shift and
// invert, Rayleigh-quotient refinement (see generalRoots).
//
// The roots are sorted by modulus, then imaginary part, then real part.
// Poles spread over 12 decades come out within 1e-9 relative. That c is
// nonsingular is decided on exact dependences (exposeAlgebraic), not on
// its condition number, so a capacitance 18 decades below the largest
// still gives its pole.
func PencilRoots(G, C mat.Matrix) ([]complex128, error) {
	p0, err := balance(G, C)
	if err != nil {
		return nil, err
	}
	poles, _, de, err := systemRoots(pencilBordered(p0), false)
	if err != nil || de != nil {
		return poles, err
	}
	return generalRoots(p0)
}

// generalRoots is the path of PencilRoots for pencils whose infinite
// eigenvalues are not all removed by structure: the orthogonal staircase
// with rank decisions (see staircase), the eigenvalues of the shifted and
// inverted remainder (finiteRoots, lapack Dgeev with left and right
// eigenvectors) and their refinement on the balanced pencil by two-sided
// Rayleigh quotients, then Rayleigh-quotient iteration with complex LU
// solves where the first correction exceeds 1e-8 relative.
func generalRoots(p0 *scaledPencil) ([]complex128, error) {
	p, err := eliminate(p0)
	if err != nil {
		return nil, err
	}
	p, err = rebalance(p)
	if err != nil {
		return nil, err
	}
	st, err := newStaircase(p)
	if err != nil {
		return nil, err
	}
	ts, err := finiteRoots(p, st)
	if err != nil {
		return nil, err
	}
	roots := make([]complex128, 0, len(ts)+st.nzero)
	for i := 0; i < st.nzero; i++ {
		roots = append(roots, 0)
	}
	for _, t := range ts {
		roots = append(roots, complex(p.w0, 0)*t)
	}
	return tidyRoots(roots), nil
}

// finiteRoots computes and refines the finite nonzero eigenvalues t of the
// balanced pencil from its staircase form. Each complex pair is returned
// as both members.
func finiteRoots(p *scaledPencil, st *staircase) ([]complex128, error) {
	n := p.n
	o := st.ninf + st.nzero
	m := n - o
	if m == 0 {
		return nil, nil
	}
	g2 := subCopy(st.gw, n, o, o, m, m)
	c2 := subCopy(st.cw, n, o, o, m, m)
	sigma, lu, ipiv, ok := shiftedLU(g2, c2, m)
	if !ok {
		return nil, errors.New("ac: pencil: no real shift makes G + σ·C nonsingular")
	}
	a := c2
	lp.Dgetrs(blas.NoTrans, m, m, lu, m, ipiv, a, m)
	normA := lp.Dlange(lapack.Frobenius, m, m, a, m, nil)

	wr := make([]float64, m)
	wi := make([]float64, m)
	vl := make([]float64, m*m)
	vr := make([]float64, m*m)
	work := make([]float64, 1)
	lp.Dgeev(lapack.LeftEVCompute, lapack.RightEVCompute, m, a, m, wr, wi, vl, m, vr, m, work, -1)
	work = make([]float64, int(work[0]))
	if first := lp.Dgeev(lapack.LeftEVCompute, lapack.RightEVCompute, m, a, m, wr, wi, vl, m, vr, m, work, len(work)); first > 0 {
		return nil, fmt.Errorf("ac: pencil: the QR algorithm did not converge (%d of %d eigenvalues)", m-first, m)
	}
	// Left eigenvectors of the pencil: yᴴ·(g2 + t·c2) = 0 for y = F⁻ᵀ·w,
	// with w a left eigenvector of A and F = g2 + σ·c2.
	lp.Dgetrs(blas.Trans, m, m, lu, m, ipiv, vl, m)

	// The eigenvalues kept, with their estimates t0. Pairs occupy columns
	// j (real part) and j+1 (imaginary part) of vr and vl, as Dgeev leaves
	// them.
	type est struct {
		col  int
		pair bool
		t0   complex128
	}
	var ests []est
	dropTol := float64(m) * epsilon * normA
	for j := 0; j < m; j++ {
		pair := wi[j] != 0
		lam := complex(wr[j], wi[j])
		if cmplx.Abs(lam) > dropTol {
			t0 := complex(sigma, 0) - 1/lam
			if !pair {
				t0 = complex(real(t0), 0)
			}
			ests = append(ests, est{j, pair, t0})
		}
		if pair {
			j++
		}
	}
	if len(ests) == 0 {
		return nil, nil
	}

	// Right eigenvectors of the whole pencil: x̃ = [x1; x2] with x2 from
	// vr and P11(t)·x1 = −P12(t)·x2, then x = V·x̃; left: y = U·[0; y2].
	xt := make([]float64, n*m)
	for i := 0; i < m; i++ {
		copy(xt[(o+i)*m:(o+i+1)*m], vr[i*m:(i+1)*m])
	}
	if o > 0 {
		x1 := make([]complex128, o)
		for _, e := range ests {
			t := e.t0
			for i := 0; i < o; i++ {
				var sum complex128
				for j := 0; j < m; j++ {
					pij := complex(st.gw[i*n+o+j], 0) + t*complex(st.cw[i*n+o+j], 0)
					sum -= pij * pairAt(vr, m, j, e.col, e.pair)
				}
				x1[i] = sum
			}
			for i := o - 1; i >= 0; i-- {
				sum := x1[i]
				for l := i + 1; l < o; l++ {
					sum -= (complex(st.gw[i*n+l], 0) + t*complex(st.cw[i*n+l], 0)) * x1[l]
				}
				x1[i] = sum / (complex(st.gw[i*n+i], 0) + t*complex(st.cw[i*n+i], 0))
			}
			for i := 0; i < o; i++ {
				xt[i*m+e.col] = real(x1[i])
				if e.pair {
					xt[i*m+e.col+1] = imag(x1[i])
				}
			}
		}
	}
	x := make([]float64, n*m)
	gemm(n, m, n, st.v, n, xt, m, x, m)
	y := make([]float64, n*m)
	gemm(n, m, m, st.u[o:], n, vl, m, y, m)
	gx := make([]float64, n*m)
	gemm(n, m, n, p.g, n, x, m, gx, m)
	cx := make([]float64, n*m)
	gemm(n, m, n, p.c, n, x, m, cx, m)

	var f cdense.LU
	out := make([]complex128, 0, m)
	xv := make([]complex128, n)
	yv := make([]complex128, n)
	for _, e := range ests {
		var num, den complex128
		for i := 0; i < n; i++ {
			yc := cmplx.Conj(pairAt(y, m, i, e.col, e.pair))
			num += yc * pairAt(gx, m, i, e.col, e.pair)
			den += yc * pairAt(cx, m, i, e.col, e.pair)
		}
		t := e.t0
		t1 := -num / den
		if !e.pair {
			t1 = complex(real(t1), 0)
		}
		if isFinite(t1) && cmplx.Abs(t1-t) <= refineReach*cmplx.Abs(t) {
			t, t1 = t1, t
		}
		if !isFinite(t1) || cmplx.Abs(t-t1) > refineAgain*cmplx.Abs(t) {
			for i := 0; i < n; i++ {
				xv[i] = pairAt(x, m, i, e.col, e.pair)
				yv[i] = pairAt(y, m, i, e.col, e.pair)
			}
			if tr, ok := rqi(&f, p, t, xv, yv, !e.pair); ok && cmplx.Abs(tr-e.t0) <= refineReach*cmplx.Abs(e.t0) {
				t = tr
			}
		}
		if e.pair {
			out = append(out, t, cmplx.Conj(t))
		} else {
			out = append(out, complex(real(t), 0))
		}
	}
	return out, nil
}

// pairAt returns entry (i, col) of a row-major n×m eigenvector matrix in
// Dgeev's layout: real, or real part in col and imaginary part in col+1.
func pairAt(a []float64, m, i, col int, pair bool) complex128 {
	if pair {
		return complex(a[i*m+col], a[i*m+col+1])
	}
	return complex(a[i*m+col], 0)
}

func isFinite(z complex128) bool { return !cmplx.IsInf(z) && !cmplx.IsNaN(z) }

// rqi is two-sided Rayleigh-quotient iteration on the balanced pencil
// g + t·c (Parlett, The Rayleigh quotient iteration and some
// generalizations for nonnormal matrices, Math. Comp. 28, 1974; from
// memory):
//
//	x ← (g + t·c)⁻¹·c·x,  y ← (g + t·c)⁻ᴴ·cᵀ·y,  t ← −(yᴴ·g·x)/(yᴴ·c·x),
//
// with complex LU solves in f, whose storage is reused across calls. It
// stops when t changes by less than 8·ε·|t| or after 8 steps, and reports
// whether it converged. With real set, t, x and y stay real.
func rqi(f *cdense.LU, p *scaledPencil, t complex128, x, y []complex128, real_ bool) (complex128, bool) {
	n := p.n
	cx := make([]complex128, n)
	gx := make([]complex128, n)
	m := make([]complex128, n*n)
	for it := 0; it < 8; it++ {
		for i := range m {
			m[i] = complex(p.g[i], 0) + t*complex(p.c[i], 0)
		}
		// A zero pivot (t an eigenvalue to working precision) is
		// replaced, the remedy of inverse iteration: the solves then
		// return large multiples of the eigenvectors.
		f.Factor(m, n)
		matVec(cx, p.c, x, false)
		f.Solve(cx)
		copy(x, cx)
		matVec(cx, p.c, y, true)
		f.SolveH(cx)
		copy(y, cx)
		normalize(x)
		normalize(y)
		matVec(gx, p.g, x, false)
		matVec(cx, p.c, x, false)
		var num, den complex128
		for i := 0; i < n; i++ {
			yc := cmplx.Conj(y[i])
			num += yc * gx[i]
			den += yc * cx[i]
		}
		tn := -num / den
		if real_ {
			tn = complex(real(tn), 0)
		}
		if !isFinite(tn) {
			return t, false
		}
		d := cmplx.Abs(tn - t)
		t = tn
		if d <= 8*epsilon*cmplx.Abs(t) {
			return t, true
		}
	}
	return t, false
}

// matVec sets dst = A·x (or Aᵀ·x) for a real row-major n×n A.
func matVec(dst []complex128, a []float64, x []complex128, trans bool) {
	n := len(x)
	for i := range dst {
		dst[i] = 0
	}
	for i := 0; i < n; i++ {
		row := a[i*n : (i+1)*n]
		if trans {
			xi := x[i]
			for j, v := range row {
				if v != 0 {
					dst[j] += complex(v, 0) * xi
				}
			}
			continue
		}
		var s complex128
		for j, v := range row {
			if v != 0 {
				s += complex(v, 0) * x[j]
			}
		}
		dst[i] = s
	}
}

func normalize(x []complex128) {
	var m float64
	for _, v := range x {
		m = math.Max(m, abs1(v))
	}
	if m == 0 || math.IsInf(m, 0) || math.IsNaN(m) {
		return
	}
	for i := range x {
		x[i] /= complex(m, 0)
	}
}

// tidyRoots merges clusters, makes conjugate pairs exact and sorts.
func tidyRoots(r []complex128) []complex128 {
	sortRoots(r)
	// Single-linkage clusters of roots within clusterTol of each other.
	n := len(r)
	parent := make([]int, n)
	for i := range parent {
		parent[i] = i
	}
	var find func(int) int
	find = func(i int) int {
		for parent[i] != i {
			parent[i] = parent[parent[i]]
			i = parent[i]
		}
		return i
	}
	for i := 0; i < n; i++ {
		for j := i + 1; j < n; j++ {
			ai, aj := cmplx.Abs(r[i]), cmplx.Abs(r[j])
			if aj-ai > clusterTol*aj {
				break // sorted by modulus: no closer root beyond
			}
			if cmplx.Abs(r[i]-r[j]) <= clusterTol*math.Max(ai, aj) {
				parent[find(j)] = find(i)
			}
		}
	}
	sum := map[int]complex128{}
	cnt := map[int]int{}
	for i := range r {
		k := find(i)
		sum[k] += r[i]
		cnt[k]++
	}
	for i := range r {
		k := find(i)
		if cnt[k] > 1 {
			r[i] = sum[k] / complex(float64(cnt[k]), 0)
		}
	}
	// Exact conjugate symmetry: pair each root of positive imaginary part
	// with the nearest unpaired root of negative imaginary part.
	sortRoots(r)
	used := make([]bool, n)
	for i := 0; i < n; i++ {
		if imag(r[i]) <= 0 || used[i] {
			continue
		}
		best, bd := -1, math.Inf(1)
		for j := 0; j < n; j++ {
			if used[j] || j == i || imag(r[j]) >= 0 {
				continue
			}
			if d := cmplx.Abs(r[j] - cmplx.Conj(r[i])); d < bd {
				best, bd = j, d
			}
		}
		if best >= 0 {
			used[i], used[best] = true, true
			r[best] = cmplx.Conj(r[i])
		}
	}
	sortRoots(r)
	return r
}

// sortRoots orders roots by modulus, then imaginary part, then real part.
func sortRoots(r []complex128) {
	sort.SliceStable(r, func(i, j int) bool {
		ai, aj := cmplx.Abs(r[i]), cmplx.Abs(r[j])
		if ai != aj {
			return ai < aj
		}
		if imag(r[i]) != imag(r[j]) {
			return imag(r[i]) < imag(r[j])
		}
		return real(r[i]) < real(r[j])
	})
}
