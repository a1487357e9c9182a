package ac

import (
	"math"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/lapack"
)

// borderedPencil is the single-input, single-output problem in balanced units
// (see balance) written as one (n+1)×(n+1) pencil whose last column
// carries the input u and last row the output y:
//
//	M(t)·[x; u] = [0; y],   M(t) = M0 + t·M1 = [ g + t·c    −(b + t·b1) ]
//	                                           [ o + t·o1     d + t·e   ]
//
// with g = Dr·G·Dc, c = w0·Dr·C·Dc, b = Dr·B, o = Out·Dc, s = w0·t and
// initially b1 = o1 = 0, d = e = 0. Then
//
//	H = (o + t·o1)·(g + t·c)⁻¹·(b + t·b1) + d + t·e,
//	det M(t) = det(g + t·c)·H(t),
//
// so the finite eigenvalues of the interior pencil g + t·c are the poles
// and those of M the zeros (both before cancellation). The border
// entries b1, o1, d and e appear when algebraic unknowns are eliminated
// (borderedPencil.reduce).
type borderedPencil struct {
	n      int       // order of the interior pencil
	m0, m1 []float64 // (n+1)×(n+1), row-major, stride n+1
	w0     float64   // rad/s per balanced frequency unit
}

// newBordered balances p and writes its bordered pencil.
func newBordered(p *Problem) (*borderedPencil, error) {
	sp, err := balance(p.G, p.C)
	if err != nil {
		return nil, err
	}
	n := sp.n
	N := n + 1
	bp := &borderedPencil{n: n, m0: make([]float64, N*N), m1: make([]float64, N*N), w0: sp.w0}
	for i := 0; i < n; i++ {
		copy(bp.m0[i*N:i*N+n], sp.g[i*n:(i+1)*n])
		copy(bp.m1[i*N:i*N+n], sp.c[i*n:(i+1)*n])
		bp.m0[i*N+n] = -sp.dr[i] * p.B[i]
		bp.m0[n*N+i] = p.Out[i] * sp.dc[i]
	}
	return bp, nil
}

// pencilBordered wraps an already balanced pencil with an empty border
// (for the poles of a bare pencil).
func pencilBordered(sp *scaledPencil) *borderedPencil {
	n := sp.n
	N := n + 1
	bp := &borderedPencil{n: n, m0: make([]float64, N*N), m1: make([]float64, N*N), w0: sp.w0}
	for i := 0; i < n; i++ {
		copy(bp.m0[i*N:i*N+n], sp.g[i*n:(i+1)*n])
		copy(bp.m1[i*N:i*N+n], sp.c[i*n:(i+1)*n])
	}
	return bp
}

// pivotThreshold is the threshold of partial pivoting in reduce: a
// pivot that keeps the pencil free of new derivative terms is preferred
// when it is at least this fraction of the largest candidate of its
// column, which bounds the multipliers by 1/pivotThreshold (threshold
// pivoting as in sparse LU codes; Duff, Erisman & Reid, Direct Methods for
// Sparse Matrices, 1986; from memory).
const pivotThreshold = 0.1

// reduce removes algebraic unknowns by exact Gaussian elimination
// on the bordered pencil, never pivoting on the border. A pivot M0[p][j]
// is allowed when row p or column j is free of t (no entry in M1,
// border included): with row p free of t, the multipliers
// (M0[i][j] + t·M1[i][j])/M0[p][j] are linear in t and row p is
// constant; with column j free of t, the multipliers are constant. Either
// way M stays linear in t, column j is left with its pivot alone, and
// det M and det(g + t·c) change by the constant factor ±M0[p][j]: poles
// and zeros are unchanged. Unknowns without capacitance, inductance or
// charge (source branches, nodes without capacitors) go this way, which is
// the structural index reduction of a descriptor system: it is exact
// (only exact zeros are tested) and takes out most infinite eigenvalues
// before any rank has to be decided numerically.
//
// Eliminating with a row that holds t moves t into the border (an input
// that enters through a capacitor gives b1, an output read through one
// gives o1); pivots that keep the border constant are preferred, within
// pivotThreshold of the largest entry.
//
// The result has no interior row or column free of t. An interior row or
// column that is zero in both M0 and M1 makes det(g + t·c) ≡ 0:
// ErrSingularPencil.
func (bp *borderedPencil) reduce() (*borderedPencil, error) {
	n := bp.n
	N := n + 1
	m0 := append([]float64(nil), bp.m0...)
	m1 := append([]float64(nil), bp.m1...)
	on := make([]bool, N) // active rows
	colOn := make([]bool, N)
	for i := range on {
		on[i], colOn[i] = true, true
	}
	// t-entries per row and column over the active part, border included.
	rowT := make([]int, N)
	colT := make([]int, N)
	for i := 0; i < N; i++ {
		for k := 0; k < N; k++ {
			if m1[i*N+k] != 0 {
				rowT[i]++
				colT[k]++
			}
		}
	}
	for left := n; left > 0; left-- {
		p, j, ok, err := choosePivot(m0, m1, N, n, on, colOn, rowT, colT)
		if err != nil {
			return nil, err
		}
		if !ok {
			break
		}
		piv := m0[p*N+j]
		rp0, rp1 := m0[p*N:(p+1)*N], m1[p*N:(p+1)*N]
		for i := 0; i < N; i++ {
			if !on[i] || i == p {
				continue
			}
			l0, l1 := m0[i*N+j]/piv, m1[i*N+j]/piv
			if l0 == 0 && l1 == 0 {
				continue
			}
			ri0, ri1 := m0[i*N:(i+1)*N], m1[i*N:(i+1)*N]
			for k := 0; k < N; k++ {
				if !colOn[k] {
					continue
				}
				was := ri1[k] != 0
				if l0 != 0 {
					ri0[k] -= l0 * rp0[k]
					ri1[k] -= l0 * rp1[k]
				}
				if l1 != 0 {
					ri1[k] -= l1 * rp0[k]
				}
				if now := ri1[k] != 0; now != was {
					if now {
						rowT[i]++
						colT[k]++
					} else {
						rowT[i]--
						colT[k]--
					}
				}
			}
			ri0[j] = 0
			if ri1[j] != 0 {
				ri1[j] = 0
				rowT[i]--
				colT[j]--
			}
		}
		for k := 0; k < N; k++ {
			if colOn[k] && rp1[k] != 0 {
				colT[k]--
			}
		}
		on[p], colOn[j] = false, false
	}
	var rows, cols []int
	for i := 0; i < n; i++ {
		if on[i] {
			rows = append(rows, i)
		}
		if colOn[i] {
			cols = append(cols, i)
		}
	}
	rows = append(rows, n)
	cols = append(cols, n)
	m := len(rows) - 1
	M := m + 1
	q := &borderedPencil{n: m, m0: make([]float64, M*M), m1: make([]float64, M*M), w0: bp.w0}
	for a, i := range rows {
		for b, k := range cols {
			q.m0[a*M+b] = m0[i*N+k]
			q.m1[a*M+b] = m1[i*N+k]
		}
	}
	return q, nil
}

// choosePivot returns the next pivot of reduce, ok = false when
// there is none.
func choosePivot(m0, m1 []float64, N, n int, on, colOn []bool, rowT, colT []int) (p, j int, ok bool, err error) {
	type cand struct {
		p, j  int
		clean bool
	}
	var fallback *cand
	// Columns free of t: the pivot row may be any row; a row free of t
	// keeps the border constant, and so does any row when o_j = 0.
	for k := 0; k < n; k++ {
		if !colOn[k] || colT[k] != 0 {
			continue
		}
		best, bestV, free, freeV := -1, 0.0, -1, 0.0
		for i := 0; i < n; i++ {
			if !on[i] {
				continue
			}
			v := math.Abs(m0[i*N+k])
			if v > bestV {
				best, bestV = i, v
			}
			if rowT[i] == 0 && v > freeV {
				free, freeV = i, v
			}
		}
		if best < 0 {
			return 0, 0, false, ErrSingularPencil
		}
		if free >= 0 && freeV >= pivotThreshold*bestV {
			return free, k, true, nil
		}
		if m0[n*N+k] == 0 {
			return best, k, true, nil
		}
		if fallback == nil {
			fallback = &cand{best, k, false}
		}
	}
	// Rows free of t: the pivot column may hold t; the border stays
	// constant when the row's input entry is zero.
	for i := 0; i < n; i++ {
		if !on[i] || rowT[i] != 0 {
			continue
		}
		best, bestV := -1, 0.0
		for k := 0; k < n; k++ {
			if colOn[k] {
				if v := math.Abs(m0[i*N+k]); v > bestV {
					best, bestV = k, v
				}
			}
		}
		if best < 0 {
			return 0, 0, false, ErrSingularPencil
		}
		if m0[i*N+n] == 0 {
			return i, best, true, nil
		}
		if fallback == nil {
			fallback = &cand{i, best, false}
		}
	}
	if fallback != nil {
		return fallback.p, fallback.j, true, nil
	}
	return 0, 0, false, nil
}

// stateSpace is H(t) = d + e·t + o·(t·I − A)⁻¹·b, in balanced units, the
// standard form of a reduced bordered pencil whose interior c is
// nonsingular; A = −c⁻¹·g has the poles as eigenvalues (all of them
// finite).
type stateSpace struct {
	m    int
	a    []float64 // m×m
	b, o []float64
	d, e float64
	w0   float64

	g, c []float64 // the interior pencil g + t·c it came from
}

// toStateSpace turns a reduced bordered pencil with nonsingular interior c
// into standard form; ok = false when c may be singular: its condition
// estimate is below suspectRcond (unless force is set) or its LU
// factorization has an exact zero pivot. With v1 = c⁻¹·b1, the change of
// unknowns x = x̃ + v1·u removes the input's derivative,
//
//	(g + t·c)·x̃ = (b − g·v1)·u = b̃·u,
//
// and with w1ᵀ = o1·c⁻¹ the output's derivative is t·o1·x̃ =
// w1ᵀ·(b̃·u − g·x̃), so that
//
//	A = −c⁻¹·g,  b = c⁻¹·b̃,  o = o − w1ᵀ·g,
//	d = d + o·v1 + w1ᵀ·b̃,  e = e + w1ᵀ·b1.
func (bp *borderedPencil) toStateSpace(force bool) (*stateSpace, bool) {
	m := bp.n
	M := m + 1
	ss := &stateSpace{m: m, w0: bp.w0, g: make([]float64, m*m), c: make([]float64, m*m)}
	for i := 0; i < m; i++ {
		copy(ss.g[i*m:(i+1)*m], bp.m0[i*M:i*M+m])
		copy(ss.c[i*m:(i+1)*m], bp.m1[i*M:i*M+m])
	}
	b, b1 := make([]float64, m), make([]float64, m)
	o, o1 := make([]float64, m), make([]float64, m)
	for i := 0; i < m; i++ {
		b[i], b1[i] = -bp.m0[i*M+m], -bp.m1[i*M+m]
		o[i], o1[i] = bp.m0[m*M+i], bp.m1[m*M+i]
	}
	d, e := bp.m0[m*M+m], bp.m1[m*M+m]
	if m == 0 {
		ss.d, ss.e = d, e
		return ss, true
	}
	clu := append([]float64(nil), ss.c...)
	cpiv := make([]int, m)
	work := make([]float64, 4*m)
	anorm := lp.Dlange(lapack.MaxColumnSum, m, m, clu, m, work)
	if !lp.Dgetrf(m, m, clu, m, cpiv) {
		return nil, false
	}
	if !force && lp.Dgecon(lapack.MaxColumnSum, m, clu, m, anorm, work, make([]int, m)) < suspectRcond {
		return nil, false
	}
	if !allZero(b1) {
		v1 := append([]float64(nil), b1...)
		lp.Dgetrs(blas.NoTrans, m, 1, clu, m, cpiv, v1, 1)
		bl.Dgemv(blas.NoTrans, m, m, -1, ss.g, m, v1, 1, 1, b, 1)
		d += bl.Ddot(m, o, 1, v1, 1)
	}
	if !allZero(o1) {
		w1 := append([]float64(nil), o1...)
		lp.Dgetrs(blas.Trans, m, 1, clu, m, cpiv, w1, 1)
		d += bl.Ddot(m, w1, 1, b, 1)
		e += bl.Ddot(m, w1, 1, b1, 1)
		bl.Dgemv(blas.Trans, m, m, -1, ss.g, m, w1, 1, 1, o, 1)
	}
	ss.a = make([]float64, m*m)
	for i, v := range ss.g {
		ss.a[i] = -v
	}
	lp.Dgetrs(blas.NoTrans, m, m, clu, m, cpiv, ss.a, m)
	lp.Dgetrs(blas.NoTrans, m, 1, clu, m, cpiv, b, 1)
	ss.b, ss.o, ss.d, ss.e = b, o, d, e
	return ss, true
}

func allZero(v []float64) bool {
	for _, x := range v {
		if x != 0 {
			return false
		}
	}
	return true
}

// exposeAlgebraic looks for exact linear dependences among the interior
// rows of c, as a floating capacitor (one between two nodes that have no
// other capacitance) or a loop of capacitors makes: Gaussian elimination
// with partial pivoting on c's rows, applied to whole rows of the
// bordered pencil (a constant, unit-triangular combination of interior
// equations, which changes neither det M nor det(g + t·c)), with the
// componentwise zero test of originCount. Rows left without a pivot then
// have no t in the interior; those whose input entry has none either are
// free of t and reduce can eliminate them. It reports whether it found
// any such row, and only then changes bp; it returns false when c has no
// exact dependence (a badly conditioned but nonsingular c, as poles over
// 12 decades make) or when every dependence carries the input's
// derivative.
func (bp *borderedPencil) exposeAlgebraic() bool {
	m := bp.n
	M := m + 1
	m0 := append([]float64(nil), bp.m0...)
	m1 := append([]float64(nil), bp.m1...)
	mag := make([]float64, m*M) // magnitudes behind m1's interior rows
	for i := 0; i < m*M; i++ {
		mag[i] = math.Abs(m1[i])
	}
	tol := 8 * float64(m) * epsilon
	used := make([]bool, m)
	for j := 0; j < m; j++ {
		p, best := -1, 0.0
		for i := 0; i < m; i++ {
			if used[i] {
				continue
			}
			v := math.Abs(m1[i*M+j])
			if v <= tol*mag[i*M+j] {
				m1[i*M+j] = 0
				continue
			}
			if v > best {
				p, best = i, v
			}
		}
		if p < 0 {
			continue
		}
		used[p] = true
		for i := 0; i < m; i++ {
			if used[i] || m1[i*M+j] == 0 {
				continue
			}
			l := m1[i*M+j] / m1[p*M+j]
			al := math.Abs(l)
			for k := 0; k < M; k++ {
				m0[i*M+k] -= l * m0[p*M+k]
				if k == j {
					continue
				}
				m1[i*M+k] -= l * m1[p*M+k]
				mag[i*M+k] += al * mag[p*M+k]
				if math.Abs(m1[i*M+k]) <= tol*mag[i*M+k] {
					m1[i*M+k] = 0
				}
			}
			m1[i*M+j] = 0
		}
	}
	for i := 0; i < m; i++ {
		if !used[i] && m1[i*M+m] == 0 {
			bp.m0, bp.m1 = m0, m1
			return true
		}
	}
	return false
}
